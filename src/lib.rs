#![doc = include_str!("../README.md")]
#![cfg_attr(not(any(test, feature = "std")), no_std)]

pub mod commissioning;
pub mod error;
#[cfg(feature = "fixed")]
pub mod fixed_point;
pub mod geometry;
pub mod gravity;
pub mod interlock;
pub mod math;
pub mod modes;
pub mod player;
pub mod program;
pub mod protection;
pub mod ramp;
pub mod request_governor;
pub mod seat_model;
pub mod steady;
pub mod units;

#[cfg(feature = "std")]
pub mod design;
#[cfg(feature = "std")]
pub mod program_file;
#[cfg(feature = "std")]
pub mod reference;
#[cfg(feature = "std")]
pub mod ride_file;
#[cfg(feature = "std")]
pub mod sim;

pub use error::ParamError;
pub use geometry::{RideGeometry, Suspension};
pub use gravity::Gravity;
pub use interlock::{
    BlockError, Event, EventKind, EventLog, Interlock, InterlockState, SafetyConfig, SafetyParams,
    Sample, SpeedCeiling, TickInputs, TickOutput, TripCause,
};
pub use modes::{SwingMode, SwingModes};
pub use player::{PlayerOutput, ProfilePlayer, ProfileTable, TableError};
pub use protection::{
    Certificate, EstimatorFault, GovernorParams, SwingEnvelope, SwingEstimator, SwingGovernor,
};
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
