#![doc = include_str!("../README.md")]
#![cfg_attr(not(any(test, feature = "std")), no_std)]

pub mod error;
pub mod geometry;
pub mod gravity;
pub mod ramp;
/// Host-only `f64` reference implementations, written independently of the
/// `f32` target code; the tests cross-check the two.
#[cfg(feature = "std")]
pub mod reference;
pub mod units;

pub use error::ParamError;
pub use geometry::{RideGeometry, Suspension};
pub use gravity::Gravity;
pub use ramp::{
    Plan, RampLimits, RampPhase, ReseedError, ReseedReason, Reverse, Setpoint, SpeedRamp,
    TargetStatus,
};
pub use units::{Angle, AngularSpeed, DriveReference, DriveScale, GearRatio};
