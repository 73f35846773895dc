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
/// values past the `u64` range saturate (Rust's float-to-int cast is
/// saturating, never UB).
///
/// Adding one half and truncating rounds correctly: below 2²⁴ the sum is
/// exact, and from 2²⁴ on every `f32` is a whole number, so the sum rounds back
/// to it.
#[must_use]
#[inline]
pub(crate) fn quanta_from_s(seconds: f32) -> u64 {
    // Through i64: one conversion instruction on common targets; the values
    // used stay far below 2⁶³ (2²⁷ s), and negatives are cut to 0.
    let q = (seconds * QUANTA_PER_SECOND + 0.5) as i64;
    q.max(0) as u64
}

/// Quanta to seconds (rounded to `f32`, relative error ≤ 2⁻²⁴; used only for
/// in-segment evaluation and for reporting).
#[must_use]
#[inline]
pub(crate) fn s_from_quanta(quanta: u64) -> f32 {
    // Through i64 for the same reason; larger values saturate at 2⁶³ quanta.
    let q = i64::try_from(quanta).unwrap_or(i64::MAX);
    q as f32 * SECONDS_PER_QUANTUM
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
}
