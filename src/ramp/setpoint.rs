//! What the ramp hands to the drive each tick.

use crate::units::AngularSpeed;

/// Which way the acceleration is moving (the sign of the jerk), or that the
/// target has been reached.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum RampPhase {
    /// Jerk at `+max_jerk` (or the raised jerk of a forward-only floor stop):
    /// the acceleration grows algebraically.
    AccelerationIncreasing,
    /// Zero jerk inside a plan: constant acceleration at a limit.
    AccelerationConstant,
    /// Jerk at `-max_jerk`: the acceleration falls algebraically.
    AccelerationDecreasing,
    /// The plan is complete: speed equals the target exactly, acceleration is zero.
    AtTarget,
}

/// A commanded (or planned) state of the ramp.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Setpoint {
    /// Commanded shaft speed.
    pub speed: AngularSpeed,
    /// Commanded angular acceleration, rad/s² (derivative of `speed`).
    pub acceleration_rad_s2: f32,
    /// Jerk of the current segment, rad/s³ (0 at the target).
    pub jerk_rad_s3: f32,
    /// Jerk phase, or [`RampPhase::AtTarget`].
    pub phase: RampPhase,
}

impl Setpoint {
    /// Standing at `speed` with no acceleration: the target has been reached.
    #[must_use]
    pub const fn at_target(speed: AngularSpeed) -> Self {
        Self {
            speed,
            acceleration_rad_s2: 0.0,
            jerk_rad_s3: 0.0,
            phase: RampPhase::AtTarget,
        }
    }

    /// `true` once the plan is complete.
    #[must_use]
    pub fn target_reached(&self) -> bool {
        self.phase == RampPhase::AtTarget
    }
}
