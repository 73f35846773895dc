//! The fixed-point ramp player: a plan converted once, evaluated each tick in
//! closed form from the current segment's anchor.

use super::{round_out_wide, Accel, Speed, Wide};
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

/// One constant-jerk segment in fixed point, with scales chosen per segment
/// (block floating point) so that every per-tick product is 32 × 32 → 64 bits
/// and only two shifts by a variable amount remain:
///
/// * time since the nearer anchor in units of 2^sh quanta, a `u32`; `sh`
///   (possibly negative) puts the whole duration in \[2³¹, 2³²) units, so
///   |α|·2³¹ below stays within the segment's acceleration range;
/// * accelerations as `i64` at scale 2^(fb+32), `fb` as large as the segment's
///   largest |acceleration| allows (below 2²⁹ after scaling), so that the
///   high word is the same acceleration as an `i32` at scale 2^fb;
/// * the acceleration's slope per time unit, `α = (j/2)·2^(sh−36)`, as an
///   `i32` at scale 2^(fb+32).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct FixedSegment {
    /// Anchor speeds, I32F32 bits.
    start_v: i64,
    end_v: i64,
    /// Anchor accelerations at scale 2^(fb+32).
    start_a: i64,
    end_a: i64,
    /// `(j/2)·2^(sh−36)·2^(fb+32)`.
    alpha: i32,
    duration: u64,
    /// Time unit 2^sh quanta.
    sh: i8,
    /// Scale of the `i32` accelerations.
    fb: u8,
    /// Shift from `mean × time` (scale 2^(fb+36−sh)) to I32F32 (right).
    to_speed: u8,
    phase: RampPhase,
}

impl FixedSegment {
    const EMPTY: Self = Self {
        start_v: 0,
        end_v: 0,
        start_a: 0,
        end_a: 0,
        alpha: 0,
        duration: 0,
        sh: 0,
        fb: 0,
        to_speed: 0,
        phase: RampPhase::AtTarget,
    };

    /// Converts one `f32` segment (once per plan; soft-float on the M0).
    fn from_segment(s: &crate::ramp::Segment) -> Self {
        let duration = s.duration_quanta();
        // 2³¹ ≤ duration / 2^sh < 2³² (sh < 0 scales up: exact).
        let sh = 64 - duration.leading_zeros() as i32 - 32;
        let (a0, a1) = (s.start_acceleration_rad_s2(), s.end_acceleration_rad_s2());
        let amax = abs(a0).max(abs(a1));
        // fb: |a|·2^fb < 2²⁹ (two bits spare for 2·mean − a), between 0 and 30.
        let fb = (28 - exponent(amax)).clamp(0, 30);
        let fa = fb + 32;
        let alpha_f = 0.5 * s.jerk_rad_s3() * pow2(sh - 36);
        // fb + 36 − sh − 32 ≥ 0 for every duration below 2⁶³ quanta.
        let to_speed = (fb + 4 - sh).clamp(0, 63);
        Self {
            start_v: wide(s.start_speed_rad_s()).to_bits(),
            end_v: wide(s.end_speed_rad_s()).to_bits(),
            start_a: scaled(a0, fa),
            end_a: scaled(a1, fa),
            alpha: libm::roundf(alpha_f * pow2(fa.min(100) - 50) * pow2(50)) as i32,
            duration,
            sh: sh as i8,
            fb: fb as u8,
            to_speed: to_speed as u8,
            phase: s.phase(),
        }
    }

    /// Speed (I32F32) and acceleration (scale 2^fb) `q` quanta after the start
    /// (`q` below the duration), from the nearer anchor, limited to the
    /// segment's range. Integer instructions only.
    #[inline]
    fn evaluate(&self, q: u64) -> (Wide, i32) {
        let from_start = q <= self.duration / 2;
        let dq = if from_start { q } else { self.duration - q };
        // Time in units, rounded to nearest (below 2³²: dq ≤ duration / 2).
        let t = if self.sh > 0 {
            let sh = self.sh as u32;
            ((dq + (1 << (sh - 1))) >> sh) as u32
        } else {
            (dq << (-self.sh) as u32) as u32
        };
        let slope = mul_i32_u32(self.alpha, t);
        // mean = a_anchor ± α·t (the mean acceleration since the anchor);
        // v = v_anchor ± mean·t; a = 2·mean − a_anchor. No overflow: every
        // term stays within the segment's scaled range (|a|·2^(fb+32) < 2⁶¹).
        let (v, a) = if from_start {
            let mean = self.start_a.wrapping_add(slope);
            let m = (mean >> 32) as i32;
            let dv = mul_i32_u32(m, t) >> self.to_speed;
            (
                self.start_v.wrapping_add(dv),
                m.wrapping_mul(2).wrapping_sub((self.start_a >> 32) as i32),
            )
        } else {
            let mean = self.end_a.wrapping_sub(slope);
            let m = (mean >> 32) as i32;
            let dv = mul_i32_u32(m, t) >> self.to_speed;
            (
                self.end_v.wrapping_sub(dv),
                m.wrapping_mul(2).wrapping_sub((self.end_a >> 32) as i32),
            )
        };
        let (lo_v, hi_v) = order(self.start_v, self.end_v);
        let (lo_a, hi_a) = order((self.start_a >> 32) as i32, (self.end_a >> 32) as i32);
        (Wide::from_bits(v.clamp(lo_v, hi_v)), a.clamp(lo_a, hi_a))
    }

    /// An acceleration at scale 2^fb as I16F16, rounded to nearest (ties up).
    #[inline]
    fn accel_out(&self, a: i32) -> Accel {
        let bits = if self.fb > 16 {
            let s = u32::from(self.fb) - 16;
            (i64::from(a) + (1 << (s - 1))) >> s
        } else {
            i64::from(a) << (16 - u32::from(self.fb))
        };
        Accel::from_bits(bits.clamp(i64::from(i32::MIN), i64::from(i32::MAX)) as i32)
    }
}

/// `(min, max)` of two values.
#[inline]
fn order<T: PartialOrd>(p: T, q: T) -> (T, T) {
    if p <= q {
        (p, q)
    } else {
        (q, p)
    }
}

/// A speed as I32F32, rounded to nearest. A plan's speeds are finite and
/// within ±10⁴ rad/s; anything else (never produced) saturates, NaN gives 0,
/// without the panic of `saturating_from_num` on NaN.
fn wide(x: f32) -> Wide {
    Wide::checked_from_num(x).unwrap_or(if x > 0.0 {
        Wide::MAX
    } else if x < 0.0 {
        Wide::MIN
    } else {
        Wide::ZERO
    })
}

/// `2^e` as `f32` for `e` in −126..=127 (exact).
fn pow2(e: i32) -> f32 {
    f32::from_bits(((e.clamp(-126, 127) + 127) as u32) << 23)
}

/// `floor(log2 x)` for a positive finite `x` (−127 for zero).
fn exponent(x: f32) -> i32 {
    ((x.to_bits() >> 23) & 0xff) as i32 - 127
}

fn abs(x: f32) -> f32 {
    f32::from_bits(x.to_bits() & 0x7fff_ffff)
}

/// `x·2^f` rounded to nearest, as `i64` (saturating).
fn scaled(x: f32, f: i32) -> i64 {
    // Two steps of at most 2³¹ keep every factor an exact power of two in f32.
    let y = x * pow2(f.min(31)) * pow2((f - 31).max(0));
    libm::roundf(y) as i64
}

/// `a·b` exactly, from 32-bit pieces: on the Cortex-M0 (no long multiply) four
/// 16 × 16 → 32 multiplies instead of the 64 × 64 library routine.
#[inline]
pub(crate) fn mul_i32_u32(a: i32, b: u32) -> i64 {
    let ua = a.unsigned_abs();
    let p = mul_u32_u32(ua, b) as i64;
    if a < 0 {
        -p
    } else {
        p
    }
}

#[cfg(all(target_arch = "arm", not(target_abi = "eabihf")))]
#[inline]
fn mul_u32_u32(a: u32, b: u32) -> u64 {
    mul_u32_u32_split(a, b)
}

#[cfg(not(all(target_arch = "arm", not(target_abi = "eabihf"))))]
#[inline]
fn mul_u32_u32(a: u32, b: u32) -> u64 {
    u64::from(a) * u64::from(b)
}

/// 32 × 32 → 64 from four 16 × 16 → 32 products (each fits 32 bits).
#[inline]
#[allow(dead_code)] // used on the M0 and by the tests
pub(crate) fn mul_u32_u32_split(a: u32, b: u32) -> u64 {
    let (al, ah) = (a & 0xffff, a >> 16);
    let (bl, bh) = (b & 0xffff, b >> 16);
    let lo = u64::from(al * bl);
    let mid = u64::from(ah * bl) + u64::from(al * bh);
    let hi = u64::from(ah * bh);
    (hi << 32) + (mid << 16) + lo
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
            *slot = FixedSegment::from_segment(s);
            len += 1;
        }
        self.len = len;
        self.target = wide(plan.target().rad_per_s());
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
        match self.active(self.segment) {
            Some(seg) => {
                let (v, a) = seg.evaluate(self.into);
                FixedSetpoint {
                    speed: round_out_wide(v),
                    acceleration: seg.accel_out(a),
                    phase: seg.phase,
                }
            }
            None => FixedSetpoint {
                speed: round_out_wide(self.target),
                acceleration: Accel::ZERO,
                phase: RampPhase::AtTarget,
            },
        }
    }

    /// The current speed (rad/s) and acceleration (rad/s²) at the internal
    /// resolution, as `f32`: the start state for the next plan.
    #[must_use]
    pub fn state_f32(&self) -> (f32, f32) {
        match self.active(self.segment) {
            Some(seg) => {
                let (v, a) = seg.evaluate(self.into);
                // a·2^−fb: the scale is an exact power of two.
                (v.to_num::<f32>(), a as f32 * pow2(-i32::from(seg.fb)))
            }
            None => (self.target.to_num::<f32>(), 0.0),
        }
    }

    /// `true` once the plan is complete.
    #[must_use]
    pub fn target_reached(&self) -> bool {
        self.segment >= self.len
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn split_multiply_is_exact() {
        // Hand calculation, common practice: the products are compared with the
        // 64-bit product at the corners and on a scattered sweep.
        let corners = [
            0_u32,
            1,
            0xffff,
            0x1_0000,
            0x7fff_ffff,
            0x8000_0000,
            u32::MAX,
        ];
        for a in corners {
            for b in corners {
                assert_eq!(mul_u32_u32_split(a, b), u64::from(a) * u64::from(b));
            }
        }
        let mut x: u32 = 12345;
        for _ in 0..100_000 {
            x = x.wrapping_mul(1_664_525).wrapping_add(1_013_904_223);
            let y = x.rotate_left(13) ^ 0x9e37_79b9;
            assert_eq!(mul_u32_u32_split(x, y), u64::from(x) * u64::from(y));
            let s = x as i32;
            assert_eq!(mul_i32_u32(s, y), i64::from(s) * i64::from(y));
        }
    }
}
