//! How the ramp keeps time: integer quanta of 2⁻³⁶ s.
//!
//! Converting an `f32` period in seconds to quanta multiplies by a power of two,
//! which is exact in binary floating point; for any period of at least 2⁻¹³ s
//! (122 µs) the result is already a whole number, so adding up ticks loses
//! nothing at all. Shorter periods round to the nearest quantum (≤ 7.3 ps per
//! tick). A `u64` of quanta spans 2²⁸ s (8.5 years), far beyond the longest plan.
//! Time is only ever converted back to `f32` seconds *inside one segment*, to
//! evaluate that segment's polynomial from its anchor, so no rounding accumulates.

/// Quanta per second: 2³⁶.
pub const QUANTA_PER_SECOND: f32 = 68_719_476_736.0;

/// Seconds per quantum: 2⁻³⁶ s (about 14.6 ps).
pub const SECONDS_PER_QUANTUM: f32 = 1.0 / QUANTA_PER_SECOND;

/// Seconds to quanta, rounded to nearest (ties up). Negative or NaN give 0;
/// values from 2⁶³ quanta (2²⁷ s) on saturate there.
///
/// Two implementations with identical results (both tested against the float
/// formula on the host; the integer one also runs in the firmware checks): on
/// cores with a one-instruction conversion between `f64` and 64-bit integers
/// (x86-64, AArch64) the float formula itself, elsewhere (32-bit Arm, where the
/// conversion is a library routine) integer code on the bits.
#[must_use]
#[inline]
pub(crate) fn quanta_from_s(seconds: f32) -> u64 {
    #[cfg(any(target_arch = "x86_64", target_arch = "aarch64"))]
    {
        quanta_from_s_float(seconds)
    }
    #[cfg(not(any(target_arch = "x86_64", target_arch = "aarch64")))]
    {
        quanta_from_s_bits(seconds)
    }
}

/// [`quanta_from_s`] by the float formula: `seconds·2³⁶` is exact in `f64`
/// (a 24-bit significand times a power of two), adding ½ is exact below 2⁵²
/// and a tie to even above it (where the value is already an even integer),
/// and the `as` cast truncates toward zero (saturating; NaN gives 0), after
/// which negative values are raised to 0.
#[cfg(any(test, target_arch = "x86_64", target_arch = "aarch64"))]
#[inline]
fn quanta_from_s_float(seconds: f32) -> u64 {
    // `as i64` saturates at 2⁶³ − 1 and gives 0 for NaN.
    let q = (f64::from(seconds) * 68_719_476_736.0 + 0.5) as i64;
    q.max(0) as u64
}

/// [`quanta_from_s`] in integer arithmetic on the bits.
#[cfg(any(test, not(any(target_arch = "x86_64", target_arch = "aarch64"))))]
#[inline]
fn quanta_from_s_bits(seconds: f32) -> u64 {
    // From the bits, in integer arithmetic: the float-to-64-bit conversion is a
    // library routine on 32-bit Arm, this is a shift. `seconds = m·2^(e−150)`
    // with the 24-bit significand `m`, so `seconds·2³⁶ = m·2^(e−114)`.
    let bits = seconds.to_bits();
    // The common case, positive and normal with 2⁻¹³ s ≤ seconds < 2²⁷ s: the
    // 24-bit significand shifted left by 0 to 39 places, exact.
    if bits.wrapping_sub(0x3900_0000) < 0x4d00_0000 - 0x3900_0000 {
        let m = u64::from(bits & 0x007f_ffff | 0x0080_0000);
        return m << ((bits >> 23) - 114);
    }
    if bits >= 0x8000_0000 || bits == 0 {
        // Negative (also −0.0 and negative NaN) or +0.0.
        return 0;
    }
    let exp = (bits >> 23) as i32;
    if exp == 0xff {
        // +∞ saturates; NaN gives 0, like `as` casts.
        return if bits & 0x007f_ffff == 0 {
            i64::MAX as u64
        } else {
            0
        };
    }
    let m = if exp == 0 {
        u64::from(bits & 0x007f_ffff) // subnormal: far below half a quantum
    } else {
        u64::from(bits & 0x007f_ffff | 0x0080_0000)
    };
    let shift = exp.max(1) - 114;
    if shift >= 0 {
        // At most 2^63: saturate like the float cast through i64 did.
        if shift > 39 {
            return i64::MAX as u64;
        }
        m << shift
    } else if shift > -26 {
        // Round half up: add half of the last kept place, then shift.
        let s = shift.unsigned_abs();
        (m + (1 << (s - 1))) >> s
    } else {
        0
    }
}

/// Quanta to seconds (rounded to `f32`, relative error ≤ 2⁻²⁴; used only for
/// in-segment evaluation and for reporting).
///
/// As for [`quanta_from_s`], two implementations with identical results: the
/// hardware's 64-bit conversion where there is one, integer code elsewhere.
#[must_use]
#[inline]
pub(crate) fn s_from_quanta(quanta: u64) -> f32 {
    #[cfg(any(target_arch = "x86_64", target_arch = "aarch64"))]
    {
        // Correctly rounded by the conversion instruction; the scaling by a
        // power of two is exact.
        #[allow(clippy::cast_possible_wrap, clippy::cast_precision_loss)]
        let s = quanta.min(i64::MAX as u64) as i64 as f32;
        s * SECONDS_PER_QUANTUM
    }
    #[cfg(not(any(target_arch = "x86_64", target_arch = "aarch64")))]
    {
        s_from_quanta_bits(quanta)
    }
}

/// [`s_from_quanta`] without a 64-bit conversion.
#[cfg(any(test, not(any(target_arch = "x86_64", target_arch = "aarch64"))))]
#[inline]
fn s_from_quanta_bits(quanta: u64) -> f32 {
    // Correctly rounded without the 64-bit conversion routine: below 2³² one
    // hardware conversion; above, shift into 32 bits and keep the dropped bits as
    // a sticky bit far below the rounding position (bit 7 of 32 significant
    // bits), so that the 32-bit conversion still rounds correctly. Values from
    // 2⁶³ on saturate there, as before.
    let quanta = quanta.min(i64::MAX as u64);
    let high = (quanta >> 32) as u32;
    if high == 0 {
        return quanta as u32 as f32 * SECONDS_PER_QUANTUM;
    }
    let k = 32 - high.leading_zeros();
    let kept = (quanta >> k) as u32;
    let sticky = u32::from(quanta & ((1_u64 << k) - 1) != 0);
    // 2^(k−36) is a normal f32 for k in 1..=32: the multiplication is exact.
    let scale = f32::from_bits((127 + k - 36) << 23);
    (kept | sticky) as f32 * scale
}

/// The last tick period and its conversion to quanta: a controller ticks at a
/// fixed period, so the conversion is done once, not every tick. A cache, not
/// state: two caches always compare equal.
#[derive(Debug, Clone, Copy)]
pub(crate) struct TickCache {
    bits: u32,
    quanta: u64,
}

impl TickCache {
    /// A cache that holds the common 1 ms tick. It only ever holds periods the
    /// ramp has accepted, so a hit needs no range check either.
    pub(crate) const INITIAL: Self = Self {
        bits: 0.001_f32.to_bits(),
        // 0.001_f32 = 8,589,935 · 2⁻³³ exactly, so 2³⁶ times it is 8 · 8,589,935.
        quanta: 68_719_480,
    };

    /// The cached quanta if `seconds` is, bit for bit, the cached period.
    #[inline]
    pub(crate) fn hit(&self, seconds: f32) -> Option<u64> {
        (seconds.to_bits() == self.bits).then_some(self.quanta)
    }

    /// Caches `seconds`, a period the caller has checked, and returns it in quanta.
    #[inline]
    pub(crate) fn store(&mut self, seconds: f32) -> u64 {
        self.bits = seconds.to_bits();
        self.quanta = quanta_from_s(seconds);
        self.quanta
    }
}

impl PartialEq for TickCache {
    fn eq(&self, _: &Self) -> bool {
        true
    }
}

#[cfg(feature = "defmt")]
impl defmt::Format for TickCache {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(f, "TickCache");
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn millisecond_ticks_add_up_exactly() {
        // Hand calculation, common practice: 0.001_f32 is a dyadic rational with a
        // 24-bit mantissa and exponent -10, so 0.001_f32 * 2^36 is an integer.
        let q = quanta_from_s(0.001);
        assert_eq!(q as f64, 0.001_f32 as f64 * 68_719_476_736.0);
        let total: u64 = (0..120_000).map(|_| q).sum();
        let exact = 120_000.0 * f64::from(0.001_f32);
        assert_eq!(total as f64 / 68_719_476_736.0, exact);
        assert_eq!(quanta_from_s(-1.0), 0);
        assert_eq!(quanta_from_s(f32::NAN), 0);
        assert!((s_from_quanta(q) - 0.001).abs() < 1e-10);
    }

    /// Round half up of `seconds·2³⁶`, in f64 (exact for every f32 input below
    /// 2²⁷ s), saturating at 2⁶³ like the float cast through i64.
    fn quanta_by_float(seconds: f32) -> u64 {
        let q = (f64::from(seconds) * 68_719_476_736.0 + 0.5).floor() as i64;
        q.max(0) as u64
    }

    fn seconds_by_float(quanta: u64) -> f32 {
        let q = i64::try_from(quanta).unwrap_or(i64::MAX);
        q as f32 * SECONDS_PER_QUANTUM
    }

    /// A named conversion from seconds to quanta.
    type ToQuanta = (&'static str, fn(f32) -> u64);
    /// A named conversion from quanta to seconds.
    type ToSeconds = (&'static str, fn(u64) -> f32);

    /// Both implementations of each conversion (the host uses the float one, the
    /// 32-bit Arm targets the integer one).
    const TO_QUANTA: [ToQuanta; 2] = [("bits", quanta_from_s_bits), ("float", quanta_from_s_float)];
    const TO_SECONDS: [ToSeconds; 2] = [("bits", s_from_quanta_bits), ("dispatch", s_from_quanta)];

    #[test]
    fn integer_conversions_equal_the_float_formulas() {
        for (name, to_quanta) in TO_QUANTA {
            // Every 997th f32 bit pattern (both signs, NaN, infinities, subnormals).
            let mut bits: u32 = 0;
            loop {
                let x = f32::from_bits(bits);
                assert_eq!(to_quanta(x), quanta_by_float(x), "{name} {x:e} ({bits:#x})");
                match bits.checked_add(997) {
                    Some(b) => bits = b,
                    None => break,
                }
            }
            for x in [
                0.0,
                -0.0,
                f32::MIN_POSITIVE,
                1e-3,
                0.5,
                1.0,
                1e8,
                f32::MAX,
                f32::INFINITY,
                f32::NEG_INFINITY,
                f32::NAN,
                // Around 2⁻³⁷ s (half a quantum), 2⁻¹³ s (the first whole quantum
                // count, where the integer fast path starts) and 2²⁷ s (2⁶³ quanta,
                // where it ends); hand calculation from the f32 bit layout.
                f32::from_bits(0x3900_0000),
                f32::from_bits(0x38ff_ffff),
                f32::from_bits(0x2d00_0000),
                f32::from_bits(0x2cff_ffff),
                f32::from_bits(0x2d00_0001),
                f32::from_bits(0x4d00_0000),
                f32::from_bits(0x4cff_ffff),
            ] {
                assert_eq!(to_quanta(x), quanta_by_float(x), "{name} {x:e}");
            }
        }
        assert_eq!(quanta_from_s(0.001), quanta_by_float(0.001));
        for (name, to_seconds) in TO_SECONDS {
            // Quanta: every power of two and its neighbours, plus a scattered sweep.
            for k in 0..64 {
                let p = 1_u64 << k;
                for q in [p - 1, p, p + 1, p + p / 3, p | 0x55] {
                    assert_eq!(
                        to_seconds(q).to_bits(),
                        seconds_by_float(q).to_bits(),
                        "{name} {q}"
                    );
                }
            }
            let mut q: u64 = 1;
            for _ in 0..200_000 {
                assert_eq!(
                    to_seconds(q).to_bits(),
                    seconds_by_float(q).to_bits(),
                    "{name} {q}"
                );
                q = q
                    .wrapping_mul(6_364_136_223_846_793_005)
                    .wrapping_add(1_442_695_040_888_963_407);
            }
            assert_eq!(to_seconds(u64::MAX), seconds_by_float(u64::MAX), "{name}");
        }
    }

    #[test]
    fn tick_cache_converts_like_the_function() {
        // The initial entry: hand calculation, 0.001_f32 has significand
        // 0x83126F = 8,589,935 and exponent −33.
        assert_eq!(TickCache::INITIAL.hit(1e-3), Some(quanta_from_s(1e-3)));
        let mut cache = TickCache::INITIAL;
        for dt in [1e-3_f32, 1e-3, 2.5e-4, 2.5e-4, 1e-3, 1.0, 1.0] {
            let q = match cache.hit(dt) {
                Some(q) => q,
                None => cache.store(dt),
            };
            assert_eq!(q, quanta_from_s(dt));
            assert_eq!(cache.hit(dt), Some(q));
        }
        // Only the cached period hits (also not +0.0, the old empty entry).
        assert_eq!(cache.hit(0.0), None);
        assert_eq!(cache.hit(-1.0), None);
        assert_eq!(cache.hit(f32::NAN), None);
    }
}
