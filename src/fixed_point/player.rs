//! The fixed-point ramp player: a plan converted once, evaluated each tick in
//! closed form from the current segment's anchor.

use super::{round_out_coef, round_out_wide, Accel, Coef, Speed, Time, Wide};
use crate::error::ParamError;
use crate::ramp::{quanta_from_s, Plan, RampPhase, MAX_SEGMENTS, MAX_TICK_S};

/// What the player hands to the drive each tick.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct FixedSetpoint {
    /// Commanded speed, rad/s (I16F16, rounded to nearest).
    pub speed: Speed,
    /// Commanded acceleration, rad/s² (I16F16, rounded to nearest).
    pub acceleration: Accel,
    /// Jerk phase, or [`RampPhase::AtTarget`].
    pub phase: RampPhase,
}

#[cfg(feature = "defmt")]
impl defmt::Format for FixedSetpoint {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(
            f,
            "FixedSetpoint {{ speed: {=i32} / 65536 rad/s, acceleration: {=i32} / 65536 rad/s², phase: {} }}",
            self.speed.to_bits(),
            self.acceleration.to_bits(),
            self.phase
        );
    }
}

impl FixedSetpoint {
    /// `true` once the plan is complete.
    #[must_use]
    pub fn target_reached(&self) -> bool {
        self.phase == RampPhase::AtTarget
    }
}

/// One constant-jerk segment in fixed point.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct FixedSegment {
    start_v: Wide,
    start_a: Coef,
    end_v: Wide,
    end_a: Coef,
    half_jerk: Coef,
    duration: u64,
    phase: RampPhase,
}

impl FixedSegment {
    const EMPTY: Self = Self {
        start_v: Wide::ZERO,
        start_a: Coef::ZERO,
        end_v: Wide::ZERO,
        end_a: Coef::ZERO,
        half_jerk: Coef::ZERO,
        duration: 0,
        phase: RampPhase::AtTarget,
    };

    /// Speed and acceleration `q` quanta after the start (`q` below the
    /// duration), from the nearer anchor, limited to the segment's range.
    #[inline]
    fn evaluate(&self, q: u64) -> (Wide, Coef) {
        let (v, a) = if q <= self.duration / 2 {
            let t = time(q);
            // inner = a₀ + t·j/2; v = v₀ + t·inner; a = a₀ + t·j = 2·inner − a₀.
            let inner = self.start_a.saturating_add(mul_coef(t, self.half_jerk));
            (
                self.start_v.saturating_add(mul_wide(t, inner)),
                inner.saturating_add(inner).saturating_sub(self.start_a),
            )
        } else {
            let tau = time(self.duration - q);
            // From the end: inner = a₁ − τ·j/2; v = v₁ − τ·inner; a = 2·inner − a₁.
            let inner = self.end_a.saturating_sub(mul_coef(tau, self.half_jerk));
            (
                self.end_v.saturating_sub(mul_wide(tau, inner)),
                inner.saturating_add(inner).saturating_sub(self.end_a),
            )
        };
        (
            between(v, self.start_v, self.end_v),
            between(a, self.start_a, self.end_a),
        )
    }
}

/// Quanta as seconds (the quanta are the raw bits of I28F36; beyond 2²⁷ s,
/// far past any plan's segment, saturates).
#[inline]
fn time(q: u64) -> Time {
    Time::from_bits(i64::try_from(q).unwrap_or(i64::MAX))
}

/// `t·c` as I24F40 (product rounded toward −∞, saturating).
#[inline]
fn mul_coef(t: Time, c: Coef) -> Coef {
    t.wide_mul(c).saturating_to_num::<Coef>()
}

/// `t·c` as I32F32 (product rounded toward −∞, saturating).
#[inline]
fn mul_wide(t: Time, c: Coef) -> Wide {
    t.wide_mul(c).saturating_to_num::<Wide>()
}

/// `x` limited to the interval spanned by `p` and `q`.
#[inline]
fn between<T: PartialOrd + Copy>(x: T, p: T, q: T) -> T {
    let (lo, hi) = if p <= q { (p, q) } else { (q, p) };
    if x < lo {
        lo
    } else if x > hi {
        hi
    } else {
        x
    }
}

/// Plays a [`Plan`] at a fixed tick period in fixed point.
///
/// The plan is converted once ([`FixedRampPlayer::load`], soft-float on a core
/// without an FPU); each [`FixedRampPlayer::step`] then uses integer
/// instructions only: the time since the current segment's start is kept in
/// integer quanta of 2⁻³⁶ s (exact: a tick period of at least 2⁻¹³ s is a whole
/// number of quanta), and speed and acceleration are evaluated in closed form
/// from the segment's nearer anchor, so no rounding accumulates over any number
/// of ticks.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FixedRampPlayer {
    segments: [FixedSegment; MAX_SEGMENTS],
    len: u8,
    target: Wide,
    segment: u8,
    into: u64,
    tick: u64,
}

#[cfg(feature = "defmt")]
impl defmt::Format for FixedRampPlayer {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(
            f,
            "FixedRampPlayer {{ segment: {=u8} of {=u8}, into: {=u64} quanta, tick: {=u64} quanta }}",
            self.segment,
            self.len,
            self.into,
            self.tick
        );
    }
}

impl FixedRampPlayer {
    /// A player at standstill with nothing to play, ticking every `tick_s`.
    ///
    /// * `tick_s`: tick period, s, in (0, [`MAX_TICK_S`]]; whole quanta from
    ///   2⁻¹³ s (122 µs) up, shorter periods round to the nearest quantum.
    ///
    /// # Errors
    /// [`ParamError`] naming `tick_s`.
    pub fn new(tick_s: f32) -> Result<Self, ParamError> {
        if !tick_s.is_finite() {
            return Err(ParamError::NonFinite("tick_s"));
        }
        if tick_s <= 0.0 {
            return Err(ParamError::NotPositive("tick_s"));
        }
        if tick_s > MAX_TICK_S {
            return Err(ParamError::OutOfRange("tick_s"));
        }
        Ok(Self {
            segments: [FixedSegment::EMPTY; MAX_SEGMENTS],
            len: 0,
            target: Wide::ZERO,
            segment: 0,
            into: 0,
            tick: quanta_from_s(tick_s),
        })
    }

    /// The tick period in quanta of 2⁻³⁶ s.
    #[must_use]
    pub const fn tick_quanta(&self) -> u64 {
        self.tick
    }

    /// Converts `plan` (values rounded to nearest; durations exact) and starts
    /// playing it from its beginning. Runs once per plan, not per tick.
    pub fn load(&mut self, plan: &Plan) {
        let mut len = 0_u8;
        // At most MAX_SEGMENTS iterations (the zip stops at the shorter side).
        for (slot, s) in self.segments.iter_mut().zip(plan.segments()) {
            *slot = FixedSegment {
                start_v: Wide::saturating_from_num(s.start_speed_rad_s()),
                start_a: Coef::saturating_from_num(s.start_acceleration_rad_s2()),
                end_v: Wide::saturating_from_num(s.end_speed_rad_s()),
                end_a: Coef::saturating_from_num(s.end_acceleration_rad_s2()),
                half_jerk: Coef::saturating_from_num(0.5 * s.jerk_rad_s3()),
                duration: s.duration_quanta(),
                phase: s.phase(),
            };
            len += 1;
        }
        self.len = len;
        self.target = Wide::saturating_from_num(plan.target().rad_per_s());
        self.segment = 0;
        self.into = 0;
    }

    /// Advances by one tick and returns the new setpoint. Integer arithmetic
    /// only; at most [`MAX_SEGMENTS`] segment boundaries are crossed.
    #[inline]
    pub fn step(&mut self) -> FixedSetpoint {
        let mut into = self.into.saturating_add(self.tick);
        let mut index = self.segment;
        // At most MAX_SEGMENTS iterations.
        while let Some(seg) = self.active(index) {
            if into < seg.duration {
                break;
            }
            into -= seg.duration;
            index += 1;
        }
        if index >= self.len {
            into = 0;
            index = self.len;
        }
        self.segment = index;
        self.into = into;
        self.setpoint()
    }

    /// The current setpoint, without advancing.
    #[must_use]
    #[inline]
    pub fn setpoint(&self) -> FixedSetpoint {
        let (v, a) = self.state();
        FixedSetpoint {
            speed: round_out_wide(v),
            acceleration: round_out_coef(a),
            phase: match self.active(self.segment) {
                Some(seg) => seg.phase,
                None => RampPhase::AtTarget,
            },
        }
    }

    /// The current speed (rad/s) and acceleration (rad/s²) at the internal
    /// resolution, as `f32`: the start state for the next plan.
    #[must_use]
    pub fn state_f32(&self) -> (f32, f32) {
        let (v, a) = self.state();
        (v.to_num::<f32>(), a.to_num::<f32>())
    }

    /// `true` once the plan is complete.
    #[must_use]
    pub fn target_reached(&self) -> bool {
        self.segment >= self.len
    }

    fn state(&self) -> (Wide, Coef) {
        match self.active(self.segment) {
            Some(seg) => seg.evaluate(self.into),
            None => (self.target, Coef::ZERO),
        }
    }

    #[inline]
    fn active(&self, index: u8) -> Option<&FixedSegment> {
        if index < self.len {
            self.segments.get(usize::from(index))
        } else {
            None
        }
    }
}
