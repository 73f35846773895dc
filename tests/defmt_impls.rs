//! Compile-time check that every public type can be logged with defmt.
//! Adding a public type? Add it here too.
#![cfg(feature = "defmt")]

use swingdrive::{
    Angle, AngularSpeed, DriveReference, DriveScale, GearRatio, GovernorDecision, GovernorInput,
    GovernorStatus, Gravity, ParamError, PassThrough, Plan, RampLimits, RampPhase, RideGeometry,
    SeatModel, SeatState, Sensitivity, Setpoint, SpeedRamp, SteadyState, Suspension, SwingMode,
    SwingModes,
};

fn loggable<T: defmt::Format>() {}

#[cfg(feature = "fixed")]
#[test]
fn fixed_point_types_implement_defmt_format() {
    use swingdrive::fixed_point::{
        FixedCeiling, FixedRamp, FixedRampPlayer, FixedSetpoint, FixedSpeedLimit,
    };
    loggable::<FixedCeiling>();
    loggable::<FixedRamp>();
    loggable::<FixedRampPlayer>();
    loggable::<FixedSetpoint>();
    loggable::<FixedSpeedLimit>();
}

#[test]
fn public_types_implement_defmt_format() {
    loggable::<GovernorDecision>();
    loggable::<GovernorInput>();
    loggable::<GovernorStatus>();
    loggable::<PassThrough>();
    loggable::<Plan>();
    loggable::<RampLimits>();
    loggable::<RampPhase>();
    loggable::<Setpoint>();
    loggable::<SpeedRamp>();
    loggable::<Angle>();
    loggable::<AngularSpeed>();
    loggable::<DriveReference>();
    loggable::<DriveScale>();
    loggable::<GearRatio>();
    loggable::<Gravity>();
    loggable::<ParamError>();
    loggable::<RideGeometry>();
    loggable::<SeatModel>();
    loggable::<SeatState>();
    loggable::<Sensitivity>();
    loggable::<SteadyState>();
    loggable::<Suspension>();
    loggable::<SwingMode>();
    loggable::<SwingModes>();
}
