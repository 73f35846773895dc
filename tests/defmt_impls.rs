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
    loggable::<swingdrive::protection::Certificate>();
    loggable::<swingdrive::protection::EstimatorFault>();
    loggable::<swingdrive::protection::GovernorParams>();
    loggable::<swingdrive::protection::SwingEnvelope>();
    loggable::<swingdrive::protection::SwingEstimator>();
    loggable::<swingdrive::protection::SwingGovernor>();
}
