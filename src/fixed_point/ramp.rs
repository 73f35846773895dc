//! A speed ramp for cores without an FPU: plans in `f32` when the target or
//! the limits change, ticks in fixed point.

use super::player::{FixedRampPlayer, FixedSetpoint};
use crate::error::ParamError;
use crate::ramp::{admit_target, check_speed, Plan, RampLimits, Reverse, TargetStatus};
use crate::units::AngularSpeed;

/// The online speed ramp with a fixed-point tick: the same time-optimal plans
/// as [`SpeedRamp`](crate::SpeedRamp), played by a [`FixedRampPlayer`].
///
/// Like `SpeedRamp`, it plans from its own commanded state (the player's,
/// converted to `f32`), never from a measured speed.
#[derive(Debug, Clone, PartialEq)]
pub struct FixedRamp {
    limits: RampLimits,
    reverse: Reverse,
    /// The target in force (after the reverse policy), rad/s.
    target: f32,
    player: FixedRampPlayer,
}

#[cfg(feature = "defmt")]
impl defmt::Format for FixedRamp {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(
            f,
            "FixedRamp {{ limits: {}, reverse: {}, target: {=f32} rad/s, player: {} }}",
            self.limits,
            self.reverse,
            self.target,
            self.player
        );
    }
}

impl FixedRamp {
    /// A ramp at standstill with target zero, ticking every `tick_s`.
    ///
    /// # Errors
    /// [`ParamError`] naming `tick_s` (see [`FixedRampPlayer::new`]).
    pub fn new(limits: RampLimits, reverse: Reverse, tick_s: f32) -> Result<Self, ParamError> {
        Ok(Self {
            limits,
            reverse,
            target: 0.0,
            player: FixedRampPlayer::new(tick_s)?,
        })
    }

    /// Sets the target; re-plans (in `f32`) from the current commanded state if
    /// it changed. An unchanged target costs a comparison.
    ///
    /// # Errors
    /// [`ParamError`] naming `target` when NaN, infinite or beyond
    /// ±[`MAX_SPEED_RAD_S`](crate::ramp::MAX_SPEED_RAD_S); the previous target
    /// and plan are kept.
    pub fn set_target(&mut self, target: AngularSpeed) -> Result<TargetStatus, ParamError> {
        let (vt, clamped) = admit_target(self.reverse, check_speed("target", target.rad_per_s())?);
        if vt.to_bits() != self.target.to_bits() {
            let (v, a) = self.player.state_f32();
            let plan = Plan::new(
                &self.limits,
                self.reverse,
                AngularSpeed::from_rad_per_s(v),
                a,
                AngularSpeed::from_rad_per_s(vt),
            )?;
            self.target = vt;
            self.player.load(&plan);
        }
        Ok(if clamped {
            TargetStatus::ClampedToZero
        } else {
            TargetStatus::Accepted
        })
    }

    /// Advances one tick (fixed point, integer instructions only).
    #[inline]
    pub fn step(&mut self) -> FixedSetpoint {
        self.player.step()
    }

    /// The current setpoint, without advancing.
    #[must_use]
    pub fn setpoint(&self) -> FixedSetpoint {
        self.player.setpoint()
    }

    /// The target in force, rad/s.
    #[must_use]
    pub fn target(&self) -> AngularSpeed {
        AngularSpeed::from_rad_per_s(self.target)
    }

    /// The limits in force.
    #[must_use]
    pub const fn limits(&self) -> RampLimits {
        self.limits
    }
}
