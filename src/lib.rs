#![doc = include_str!("../README.md")]
#![cfg_attr(not(any(test, feature = "std")), no_std)]

pub mod error;
pub mod geometry;
pub mod gravity;
pub mod units;

pub use error::ParamError;
pub use geometry::{RideGeometry, Suspension};
pub use gravity::Gravity;
pub use units::{Angle, AngularSpeed, DriveReference, DriveScale, GearRatio};
