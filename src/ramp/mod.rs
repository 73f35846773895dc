//! Time-optimal, jerk-limited, online speed ramp: the setpoint generator
//! between a speed request and the drive.
//!
//! * The ramp plans from its **own** commanded state (speed and acceleration),
//!   never from the measured speed; [`SpeedRamp::reseed`] is the one, named,
//!   exception, and only lowers the speed's magnitude.
//! * A new target may arrive on any tick; the ramp re-plans in closed form
//!   ([`Plan`]) and the setpoint stays continuous in speed and acceleration.
//! * Each plan is a fixed array of at most [`MAX_SEGMENTS`] constant-jerk
//!   segments, each evaluated from its own anchor; time is kept in integer
//!   quanta of 2⁻³⁶ s ([`QUANTA_PER_SECOND`]), so nothing drifts over long rides.
//! * No heap, no panics, every loop bounded by [`MAX_SEGMENTS`] or by a
//!   const-generic capacity.
//!
//! The derivation, the overshoot and reverse cases and the loop bounds are in
//! `docs/ramp.md`. This is a component of a drive controller, not a certified
//! safety function: the ride's safety functions must not rely on it alone.
//!
//! ```
//! use swingdrive::{AngularSpeed, RampLimits, Reverse, SpeedRamp};
//! // Demo data (invented ride): 0.05 rad/s² up, 0.08 rad/s² down, 0.1 rad/s³.
//! let limits = RampLimits::new(0.05, 0.08, 0.1)?;
//! let mut ramp = SpeedRamp::new(limits, Reverse::Forbidden);
//! ramp.set_target(AngularSpeed::from_rpm(10.0))?;
//! let mut ticks = 0;
//! while !ramp.step(0.001)?.target_reached() {
//!     ticks += 1;
//! }
//! assert_eq!(ramp.setpoint().speed, AngularSpeed::from_rpm(10.0));
//! assert!(ticks > 20_000);
//! # Ok::<(), swingdrive::ParamError>(())
//! ```

mod clock;
mod limits;
mod plan;
mod reseed;
mod setpoint;

pub use clock::{QUANTA_PER_SECOND, SECONDS_PER_QUANTUM};
pub use limits::{RampLimits, Reverse};
pub use plan::{Plan, Segment, MAX_INITIAL_ACCELERATION_RAD_S2, MAX_SEGMENTS, MAX_SPEED_RAD_S};
pub use reseed::{ReseedError, ReseedReason};
pub use setpoint::{RampPhase, Setpoint};

use crate::error::ParamError;
use crate::units::AngularSpeed;
pub(crate) use clock::quanta_from_s;
use clock::{s_from_quanta, TickCache};
pub(crate) use plan::{admit_target, check_speed};
use plan::{build, Anchor};

/// Longest accepted tick, s. A setpoint generator that has not run for longer
/// has a fault of its own; the caller must stop the ride, not catch up.
pub const MAX_TICK_S: f32 = 1.0;

/// Shortest accepted sampling period for [`SpeedRamp::sample`], s.
pub const MIN_SAMPLE_PERIOD_S: f32 = 1.0e-6;

/// Longest accepted look-ahead or sampling period, s (about 3 years, well inside
/// the time-quantum range).
pub const MAX_LOOK_AHEAD_S: f32 = 1.0e8;

/// What [`SpeedRamp::set_target`] did with a target.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[must_use]
pub enum TargetStatus {
    /// Taken as given.
    Accepted,
    /// Negative while reverse is forbidden: zero is the target instead.
    ClampedToZero,
}

/// A plan sampled at a fixed period into a fixed-capacity buffer.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Samples<const N: usize> {
    /// The samples that fit, starting now, `period_s` apart.
    pub points: heapless::Vec<Setpoint, N>,
    /// Sampling period, s.
    pub period_s: f32,
    /// How many further samples (up to and including the first one at or after
    /// the end of the plan) did not fit into `N`.
    pub not_stored: u64,
}

/// The online speed ramp.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SpeedRamp {
    limits: RampLimits,
    reverse: Reverse,
    plan: Plan,
    /// Current segment of `plan` (`plan.segments().len()` when complete).
    segment: usize,
    /// Time quanta since the start of the current segment, always below its
    /// duration (0 when the plan is complete).
    into: u64,
    /// The last tick period in quanta.
    tick: TickCache,
}

impl SpeedRamp {
    /// A ramp at standstill with target zero.
    #[must_use]
    pub const fn new(limits: RampLimits, reverse: Reverse) -> Self {
        Self {
            limits,
            reverse,
            plan: Plan::at_rest(0.0),
            segment: 0,
            into: 0,
            tick: TickCache::INITIAL,
        }
    }

    /// Sets the target speed and re-plans from the current commanded state if
    /// it changed. May be called on any tick, also every tick with the same value
    /// (an unchanged target costs a comparison, not a re-plan).
    ///
    /// * `target`: within ±[`MAX_SPEED_RAD_S`]. With [`Reverse::Forbidden`] a
    ///   negative target is replaced by zero and [`TargetStatus::ClampedToZero`]
    ///   is returned.
    ///
    /// # Errors
    /// [`ParamError`] naming `target` when NaN, infinite or out of range; the
    /// previous target and plan are then kept unchanged.
    pub fn set_target(&mut self, target: AngularSpeed) -> Result<TargetStatus, ParamError> {
        let (vt, clamped) = admit_target(self.reverse, check_speed("target", target.rad_per_s())?);
        if vt.to_bits() != self.plan.target().rad_per_s().to_bits() {
            self.replan(vt);
        }
        Ok(if clamped {
            TargetStatus::ClampedToZero
        } else {
            TargetStatus::Accepted
        })
    }

    /// Advances the ramp by `dt_s` and returns the new setpoint.
    ///
    /// * `dt_s`: time since the previous tick, s, in (0, [`MAX_TICK_S`]]; it may
    ///   vary from tick to tick.
    ///
    /// # Errors
    /// [`ParamError`] naming `dt_s` when NaN, infinite, not positive or above
    /// [`MAX_TICK_S`]. The ramp then does not advance: its state is unchanged
    /// and [`SpeedRamp::setpoint`] still returns the previous setpoint.
    #[inline]
    pub fn step(&mut self, dt_s: f32) -> Result<Setpoint, ParamError> {
        // A controller ticks at a fixed period: a period equal, bit for bit, to
        // the last accepted one needs neither the range check nor the
        // conversion. Otherwise one comparison pair (false for NaN too); the
        // error is classified off it.
        let quanta = match self.tick.hit(dt_s) {
            Some(quanta) => quanta,
            None => {
                if !(dt_s > 0.0 && dt_s <= MAX_TICK_S) {
                    return Err(refused_tick(dt_s));
                }
                self.tick.store(dt_s)
            }
        };
        // `into` stays below its segment's duration (< 2⁶³ quanta) and a tick
        // adds at most 2³⁶ (1 s), so the sum cannot wrap.
        let into = self.into.wrapping_add(quanta);
        // The common tick stays inside the current segment.
        if let Some(setpoint) = self.plan.within(self.segment, into) {
            self.into = into;
            return Ok(setpoint);
        }
        let (segment, into) = self.plan.advance(self.segment, into);
        self.segment = segment;
        self.into = into;
        Ok(self.setpoint())
    }

    /// The current setpoint, without advancing.
    #[must_use]
    #[inline]
    pub fn setpoint(&self) -> Setpoint {
        match self.plan.segments().get(self.segment) {
            Some(seg) => seg.state_at(self.into),
            None => Setpoint::at_target(self.plan.target()),
        }
    }

    /// The current target (after clamping).
    #[must_use]
    pub const fn target(&self) -> AngularSpeed {
        self.plan.target()
    }

    /// The limits in force.
    #[must_use]
    pub const fn limits(&self) -> RampLimits {
        self.limits
    }

    /// Whether reverse rotation is allowed.
    #[must_use]
    pub const fn reverse(&self) -> Reverse {
        self.reverse
    }

    /// The plan being followed (its time zero is the last re-plan).
    #[must_use]
    pub const fn plan(&self) -> &Plan {
        &self.plan
    }

    /// Replaces the limits (for example by a steeper set for a controlled stop)
    /// and re-plans from the current commanded state. An acceleration outside
    /// the new limits is braked back at the new jerk limit; see
    /// [`Plan::braked_initial_acceleration`] and [`Plan::jerk_raised`].
    pub fn set_limits(&mut self, limits: RampLimits) {
        self.limits = limits;
        let target = self.plan.target().rad_per_s();
        self.replan(target);
    }

    /// Takes a measured speed as the ramp's own commanded speed, with zero
    /// acceleration, and re-plans toward the current target.
    ///
    /// Allowed only in the named situations of [`ReseedReason`] and only toward a
    /// lower speed magnitude in the same direction (zero is always allowed), so
    /// that a re-seed can never make the ride faster than it was commanded to be.
    ///
    /// # Errors
    /// [`ReseedError`]; the ramp is then unchanged.
    pub fn reseed(
        &mut self,
        measured: AngularSpeed,
        reason: ReseedReason,
    ) -> Result<Setpoint, ReseedError> {
        // The reason is part of the call for the reader and the log; every
        // named situation obeys the same rule.
        let _ = reason;
        let m = measured.rad_per_s();
        if !m.is_finite() {
            return Err(ReseedError::NonFinite);
        }
        let v = self.setpoint().speed.rad_per_s();
        if m.abs() > v.abs() {
            return Err(ReseedError::Faster);
        }
        if m != 0.0 && (m > 0.0) != (v > 0.0) {
            return Err(ReseedError::OppositeDirection);
        }
        let m = if m == 0.0 { 0.0 } else { m };
        let target = self.plan.target().rad_per_s();
        self.start(Anchor::exact(m, 0.0), target);
        Ok(self.setpoint())
    }

    /// Time until the target is reached, s (0 when it is).
    #[must_use]
    pub fn remaining_s(&self) -> f32 {
        s_from_quanta(self.plan.remaining_quanta(self.segment, self.into))
    }

    /// The planned setpoint `ahead_s` seconds from now, assuming the target does
    /// not change (for display and for look-ahead checks).
    ///
    /// * `ahead_s`: in \[0, [`MAX_LOOK_AHEAD_S`]\].
    ///
    /// # Errors
    /// [`ParamError`] naming `ahead_s`.
    pub fn predict(&self, ahead_s: f32) -> Result<Setpoint, ParamError> {
        let quanta = checked_period("ahead_s", ahead_s, Zero::Allowed, 0.0, MAX_LOOK_AHEAD_S)?;
        Ok(self
            .plan
            .state_after(self.segment, self.into.saturating_add(quanta)))
    }

    /// Samples the rest of the plan, from now until the target is reached, every
    /// `period_s`, into a buffer of capacity `N`.
    ///
    /// The sample count is `floor(remaining / period) + 1`, plus one more when
    /// the end falls between two samples, so that the last sample shows the
    /// target. Samples beyond `N` are counted in [`Samples::not_stored`].
    /// Work is bounded by `N` evaluations.
    ///
    /// * `period_s`: in \[[`MIN_SAMPLE_PERIOD_S`], [`MAX_LOOK_AHEAD_S`]\].
    ///
    /// # Errors
    /// [`ParamError`] naming `period_s`.
    pub fn sample<const N: usize>(&self, period_s: f32) -> Result<Samples<N>, ParamError> {
        let period = checked_period(
            "period_s",
            period_s,
            Zero::Refused,
            MIN_SAMPLE_PERIOD_S,
            MAX_LOOK_AHEAD_S,
        )?;
        // At least one quantum (1 µs is 68,719 of them); the floor keeps the
        // division visibly total for the no-panic link check.
        let period = period.max(1);
        let remaining = self.plan.remaining_quanta(self.segment, self.into);
        let whole = remaining / period;
        let total = whole
            .saturating_add(1)
            .saturating_add(u64::from(!remaining.is_multiple_of(period)));
        let mut points = heapless::Vec::new();
        let mut k: u64 = 0;
        while k < total {
            let at = self.into.saturating_add(k.saturating_mul(period));
            if points
                .push(self.plan.state_after(self.segment, at))
                .is_err()
            {
                break;
            }
            k += 1;
        }
        Ok(Samples {
            points,
            period_s,
            not_stored: total.saturating_sub(k),
        })
    }

    fn replan(&mut self, target: f32) {
        let now = self.plan.anchor_after(self.segment, self.into);
        self.start(now, target);
    }

    /// Plans in place from `from` to `target` and starts at its beginning.
    fn start(&mut self, from: Anchor, target: f32) {
        build(&mut self.plan, &self.limits, self.reverse, from, target);
        self.segment = 0;
        self.into = 0;
    }
}

/// Why a tick period was refused.
#[cold]
fn refused_tick(dt_s: f32) -> ParamError {
    match checked_period("dt_s", dt_s, Zero::Refused, 0.0, MAX_TICK_S) {
        Err(e) => e,
        Ok(_) => ParamError::OutOfRange("dt_s"),
    }
}

/// Whether a period of exactly zero is accepted.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Zero {
    Allowed,
    Refused,
}

/// A period in seconds, checked to be finite and in `[min, max]` (and not zero
/// when refused), in quanta.
fn checked_period(
    name: &'static str,
    s: f32,
    zero: Zero,
    min: f32,
    max: f32,
) -> Result<u64, ParamError> {
    if !s.is_finite() {
        Err(ParamError::NonFinite(name))
    } else if s < 0.0 {
        Err(ParamError::Negative(name))
    } else if s == 0.0 && zero == Zero::Refused {
        Err(ParamError::NotPositive(name))
    } else if s < min || s > max {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(quanta_from_s(s))
    }
}
