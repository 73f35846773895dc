//! Fixed-point tick path for cores without an FPU (Cortex-M0/M0+), feature
//! `fixed`: a ramp player that evaluates a [`Plan`](crate::Plan) each tick in
//! fixed point, and the interlock's per-tick clamp and comparisons in fixed
//! point. Planning stays in `f32` (software floating point on such cores, run
//! only when the target or the limits change); the per-tick path uses integer
//! instructions only.
//!
//! # Formats (chosen for range and resolution, see `docs/fixed_point.md`)
//!
//! | quantity | type | range | resolution |
//! |---|---|---|---|
//! | speed out, limits, thresholds | [`Speed`] = I16F16 | ±32,768 rad/s | 2⁻¹⁶ ≈ 1.5·10⁻⁵ rad/s |
//! | acceleration out | [`Accel`] = I16F16 | ±32,768 rad/s² | 2⁻¹⁶ rad/s² |
//! | anchor speeds (internal) | I32F32 | ±2.1·10⁹ rad/s | 2⁻³² rad/s |
//! | anchor accelerations (internal) | `i64` at a scale chosen per segment | — | ≤ A·2⁻⁶⁰ |
//! | time within a segment | integer quanta of 2⁻³⁶ s (`u64`) | 8.5 years | exact |
//!
//! The ramp's limits (speed ≤ 10⁴ rad/s, acceleration ≤ 10⁴ rad/s² at the
//! start of a plan, jerk ≤ 10⁵ rad/s³) fit every format. Per-tick increments
//! (`½·j·dt²` is about 10⁻⁸ rad/s at 0.02 rad/s³ and 1 kHz) are far below the
//! output's resolution, so nothing is accumulated: every tick is evaluated in
//! closed form from the segment's anchor, `v = v₀ + t·(a₀ + t·j/2)`, with the
//! time since the anchor kept exactly in integer quanta.
//!
//! Error bound against the exact polynomial of the `f32` plan: at most 2⁻¹⁷ rad/s
//! from rounding the output to I16F16, plus the internal terms, below 2⁻²² rad/s
//! for ride-like plans (`docs/fixed_point.md`); against the f64 reference ramp
//! add the `f32` plan's own bound
//! (16 f32 epsilons of the speed range, tests/ramp_reference.rs).
//!
//! A component of a drive controller, not a certified safety function.

mod limit;
mod monitor;
mod player;
mod ramp;

pub use limit::{following_error_exceeds, FixedCeiling, FixedSpeedLimit};
pub use monitor::{FixedFindings, FixedMonitor};
pub use player::{FixedRampPlayer, FixedSetpoint};
pub use ramp::FixedRamp;

/// Speed in rad/s, I16F16.
pub type Speed = fixed::types::I16F16;

/// Acceleration in rad/s², I16F16.
pub type Accel = fixed::types::I16F16;

/// Internal anchor speed, rad/s.
type Wide = fixed::types::I32F32;

/// `x` rounded to the nearest I16F16 (ties up), saturating.
fn round_out_wide(x: Wide) -> Speed {
    x.saturating_add(Wide::from_bits(1 << 15))
        .saturating_to_num::<Speed>()
}
