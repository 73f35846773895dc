#![doc = include_str!("../README.md")]
#![cfg_attr(not(any(test, feature = "std")), no_std)]

pub mod commissioning;
pub mod error;
#[cfg(feature = "fixed")]
pub mod fixed_point;
pub mod geometry;
pub mod gravity;
pub mod math;
pub mod modes;
pub mod ramp;
pub mod request_governor;
pub mod seat_model;
pub mod steady;
pub mod units;

#[cfg(feature = "std")]
pub mod reference;
#[cfg(feature = "std")]
pub mod ride_file;
#[cfg(feature = "std")]
pub mod sim;

pub use error::ParamError;
pub use geometry::{RideGeometry, Suspension};
pub use gravity::Gravity;
pub use modes::{SwingMode, SwingModes};
pub use ramp::{
    Plan, RampLimits, RampPhase, ReseedError, ReseedReason, Reverse, Setpoint, SpeedRamp,
    TargetStatus,
};
pub use request_governor::{
    GovernorDecision, GovernorInput, GovernorStatus, PassThrough, RequestGovernor,
};
pub use seat_model::{SeatModel, SeatState};
pub use steady::{Sensitivity, SteadyState};
pub use units::{Angle, AngularSpeed, DriveReference, DriveScale, GearRatio};
