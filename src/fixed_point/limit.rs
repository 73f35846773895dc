//! The interlock's per-tick clamp and comparisons in fixed point. Every limit
//! is converted from `f32` once, rounding its magnitude **down**: a clamp then
//! never lets through more than the `f32` limit, and a trip threshold trips no
//! later than the `f32` comparison would.

use super::Speed;
use crate::error::ParamError;
use crate::ramp::Reverse;

/// Largest accepted limit, rad/s (the top of I16F16, less one step).
const MAX_LIMIT_RAD_S: f32 = 32_767.0;

/// A non-negative speed limit (a magnitude) in I16F16, rounded down from `f32`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct FixedSpeedLimit(Speed);

#[cfg(feature = "defmt")]
impl defmt::Format for FixedSpeedLimit {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(f, "{=i32} / 65536 rad/s", self.0.to_bits());
    }
}

impl FixedSpeedLimit {
    /// Converts `limit_rad_s`, rounding down to a multiple of 2⁻¹⁶ rad/s
    /// (exactly: `limit·2¹⁶` is an exact `f32` product and `floor` is exact).
    ///
    /// * `name`: the parameter's name for the error.
    /// * `limit_rad_s`: in \[0, 32,767\] rad/s.
    ///
    /// # Errors
    /// [`ParamError`] naming `name` when NaN, infinite, negative or too large.
    pub fn new(name: &'static str, limit_rad_s: f32) -> Result<Self, ParamError> {
        if !limit_rad_s.is_finite() {
            return Err(ParamError::NonFinite(name));
        }
        if limit_rad_s < 0.0 {
            return Err(ParamError::Negative(name));
        }
        if limit_rad_s > MAX_LIMIT_RAD_S {
            return Err(ParamError::OutOfRange(name));
        }
        // Below 2³¹ after scaling: the cast is exact.
        let bits = libm::floorf(limit_rad_s * 65_536.0) as i32;
        Ok(Self(Speed::from_bits(bits)))
    }

    /// The limit, rad/s.
    #[must_use]
    pub const fn rad_s(self) -> Speed {
        self.0
    }

    /// `true` if `|speed|` is above the limit (the overspeed comparison).
    #[must_use]
    #[inline]
    pub fn exceeded_by(self, speed: Speed) -> bool {
        speed.unsigned_abs() > self.0.unsigned_abs()
    }

    /// `true` if `|speed|` is at or below the limit (for example a standstill
    /// window).
    #[must_use]
    #[inline]
    pub fn holds(self, speed: Speed) -> bool {
        !self.exceeded_by(speed)
    }
}

/// `true` if `|measured − commanded|` is above `tolerance` (the following-error
/// and channel-agreement comparisons). The difference is taken in 33 bits, so
/// it cannot wrap.
#[must_use]
#[inline]
pub fn following_error_exceeds(
    measured: Speed,
    commanded: Speed,
    tolerance: FixedSpeedLimit,
) -> bool {
    let diff = i64::from(measured.to_bits()) - i64::from(commanded.to_bits());
    diff.unsigned_abs() > u64::from(tolerance.rad_s().to_bits().unsigned_abs())
}

/// The speed ceiling as a clamp on requests: `[lower, ceiling]` with `lower`
/// = −ceiling when reverse is allowed, 0 otherwise. The ceiling is rounded down
/// (never up), so a clamped request never exceeds the `f32` ceiling.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct FixedCeiling {
    upper: Speed,
    lower: Speed,
}

#[cfg(feature = "defmt")]
impl defmt::Format for FixedCeiling {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(
            f,
            "FixedCeiling {{ [{=i32}, {=i32}] / 65536 rad/s }}",
            self.lower.to_bits(),
            self.upper.to_bits()
        );
    }
}

impl FixedCeiling {
    /// A clamp for `ceiling_rad_s` (in \[0, 32,767\] rad/s).
    ///
    /// # Errors
    /// [`ParamError`] naming `ceiling_rad_s`.
    pub fn new(ceiling_rad_s: f32, reverse: Reverse) -> Result<Self, ParamError> {
        let upper = FixedSpeedLimit::new("ceiling_rad_s", ceiling_rad_s)?.rad_s();
        let lower = match reverse {
            Reverse::Allowed => -upper,
            Reverse::Forbidden => Speed::ZERO,
        };
        Ok(Self { upper, lower })
    }

    /// The ceiling (rounded down), rad/s.
    #[must_use]
    pub const fn ceiling(self) -> Speed {
        self.upper
    }

    /// The lowest admitted speed (−ceiling or 0), rad/s.
    #[must_use]
    pub const fn floor(self) -> Speed {
        self.lower
    }

    /// `request` limited to `[floor, ceiling]`; also `true` if it was changed.
    #[must_use]
    #[inline]
    pub fn clamp(self, request: Speed) -> (Speed, bool) {
        if request > self.upper {
            (self.upper, true)
        } else if request < self.lower {
            (self.lower, true)
        } else {
            (request, false)
        }
    }
}
