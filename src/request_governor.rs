//! The seam between the interlock's speed clamp and its ramp, where a
//! request governor decides each tick how much of the requested speed change
//! may be admitted.
//!
//! The interlock clamps every request to its speed ceiling, then asks a
//! [`RequestGovernor`] which target the ramp may plan towards this tick. The
//! default, [`PassThrough`], admits the clamped request unchanged (the ceiling
//! alone protects the *steady* angle). A model-based governor that keeps the
//! *peak* swing angle inside the certified angle implements the same trait, so
//! it slots into the same per-tick path without changing the interlock.

use crate::ramp::Setpoint;

/// What the interlock tells the governor each tick.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GovernorInput {
    /// The request after the interlock's clamp (ceiling, reverse), rad/s.
    pub clamped_request_rad_s: f32,
    /// The ramp's commanded state before this tick's step.
    pub commanded: Setpoint,
    /// The measured shaft speed, rad/s, when the interlock trusts it this
    /// tick (live, finite, in range); `None` otherwise.
    pub measured_rad_s: Option<f32>,
    /// Time since the previous tick, s (already checked by the interlock:
    /// finite and in (0, 1]).
    pub dt_s: f32,
    /// `true` while the interlock runs a controlled stop: the governor must
    /// then admit zero (it may not hold a stop back) and may only report.
    pub stopping: bool,
}

/// The governor's verdict for one tick.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GovernorDecision {
    /// Target the ramp may plan towards this tick, rad/s. The interlock clamps
    /// it again to the ceiling, so a faulty governor cannot raise the speed
    /// past it.
    pub admitted_rad_s: f32,
    /// How the decision came about.
    pub status: GovernorStatus,
}

/// How the governor decided.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum GovernorStatus {
    /// The request was admitted unchanged.
    Free,
    /// The request was held back: only part of the change was admitted.
    Restricting,
    /// The governor cannot vouch for the seats any more (its estimate
    /// disagrees with a swing-angle sensor, or its state is not finite); the
    /// interlock treats this as a trip cause.
    Fault,
}

/// A per-tick decision on how much of the clamped request the ramp may
/// follow. Implementations must be total: no panic, bounded work per call.
pub trait RequestGovernor {
    /// Decides this tick's admitted target.
    fn govern(&mut self, input: &GovernorInput) -> GovernorDecision;
}

/// No governor: admits the clamped request unchanged (or zero while stopping).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct PassThrough;

impl RequestGovernor for PassThrough {
    fn govern(&mut self, input: &GovernorInput) -> GovernorDecision {
        GovernorDecision {
            admitted_rad_s: if input.stopping {
                0.0
            } else {
                input.clamped_request_rad_s
            },
            status: GovernorStatus::Free,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::AngularSpeed;

    fn input(stopping: bool) -> GovernorInput {
        GovernorInput {
            clamped_request_rad_s: 1.25,
            commanded: Setpoint::at_target(AngularSpeed::from_rad_per_s(0.5)),
            measured_rad_s: Some(0.5),
            dt_s: 1.0e-3,
            stopping,
        }
    }

    #[test]
    fn pass_through_admits_the_request_and_zero_while_stopping() {
        let mut g = PassThrough;
        assert_eq!(g.govern(&input(false)).admitted_rad_s, 1.25);
        assert_eq!(g.govern(&input(false)).status, GovernorStatus::Free);
        assert_eq!(g.govern(&input(true)).admitted_rad_s, 0.0);
    }
}
