//! Compile-time check that every public type can be logged with defmt.
//! Adding a public type? Add it here too.
#![cfg(feature = "defmt")]

use swingdrive::interlock::CeilingSource;
use swingdrive::{
    Angle, AngularSpeed, DriveReference, DriveScale, GearRatio, GovernorDecision, GovernorInput,
    GovernorStatus, Gravity, ParamError, PassThrough, Plan, RampLimits, RampPhase, RideGeometry,
    SeatModel, SeatState, Sensitivity, Setpoint, SpeedRamp, SteadyState, Suspension, SwingMode,
    SwingModes,
};
use swingdrive::{
    BlockError, Event, EventKind, EventLog, Interlock, InterlockState, SafetyConfig, SafetyParams,
    Sample, SpeedCeiling, TickInputs, TickOutput, TripCause,
};
use swingdrive::{PlayerOutput, ProfilePlayer, ProfileTable, TableError};

fn loggable<T: defmt::Format>() {}

#[cfg(feature = "hal")]
#[test]
fn hal_types_implement_defmt_format() {
    use embedded_hal_mock::eh1::digital::Mock as Pin;
    use embedded_hal_mock::eh1::pwm::Mock as Pwm;
    use swingdrive::interlock::{HalIo, PinFault, ReferenceMode, SpeedReference};
    loggable::<HalIo<Pin, Pin, Pwm, Pin, Pin>>();
    loggable::<PinFault>();
    loggable::<ReferenceMode>();
    loggable::<SpeedReference>();
}

#[cfg(feature = "fixed")]
#[test]
fn fixed_point_types_implement_defmt_format() {
    use swingdrive::fixed_point::{
        FixedCeiling, FixedFindings, FixedMonitor, FixedRamp, FixedRampPlayer, FixedSetpoint,
        FixedSpeedLimit,
    };
    loggable::<FixedCeiling>();
    loggable::<FixedFindings>();
    loggable::<FixedMonitor>();
    loggable::<FixedRamp>();
    loggable::<FixedRampPlayer>();
    loggable::<FixedSetpoint>();
    loggable::<FixedSpeedLimit>();
}

#[test]
fn public_types_implement_defmt_format() {
    loggable::<swingdrive::program::CycleRunner<'static>>();
    loggable::<swingdrive::program::CycleState>();
    loggable::<swingdrive::program::CycleStatus>();
    loggable::<swingdrive::program::Program<'static, 4>>();
    loggable::<swingdrive::program::ProgramError>();
    loggable::<swingdrive::program::Step<'static>>();
    loggable::<swingdrive::program::StepProblem>();
    loggable::<BlockError>();
    loggable::<CeilingSource>();
    loggable::<Event>();
    loggable::<EventKind>();
    loggable::<EventLog<4>>();
    loggable::<Interlock<4>>();
    loggable::<InterlockState>();
    loggable::<SafetyConfig>();
    loggable::<SafetyParams>();
    loggable::<Sample>();
    loggable::<SpeedCeiling>();
    loggable::<TickInputs>();
    loggable::<TickOutput>();
    loggable::<TripCause>();
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
    loggable::<PlayerOutput>();
    loggable::<ProfilePlayer<'static>>();
    loggable::<ProfileTable<'static>>();
    loggable::<TableError>();
    loggable::<swingdrive::protection::Certificate>();
    loggable::<swingdrive::protection::EstimatorFault>();
    loggable::<swingdrive::protection::GovernorParams>();
    loggable::<swingdrive::protection::SwingEnvelope>();
    loggable::<swingdrive::protection::SwingEstimator>();
    loggable::<swingdrive::protection::SwingGovernor>();
}
