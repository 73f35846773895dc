//! The interlock's per-tick comparisons in fixed point, with its thresholds
//! taken from a checked [`SafetyParams`] and rounded down.

use super::limit::{following_error_exceeds, FixedCeiling, FixedSpeedLimit};
use super::Speed;
use crate::error::ParamError;
use crate::interlock::SafetyParams;

/// The interlock's clamp and thresholds in I16F16, each rounded down from the
/// `f32` value the interlock uses, so that every fixed-point comparison trips
/// no later than the `f32` one on the same (I16F16) measurement, and the clamp
/// never admits more than the `f32` ceiling.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct FixedMonitor {
    ceiling: FixedCeiling,
    overspeed: FixedSpeedLimit,
    following: FixedSpeedLimit,
    channel: FixedSpeedLimit,
    standstill: FixedSpeedLimit,
}

#[cfg(feature = "defmt")]
impl defmt::Format for FixedMonitor {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(
            f,
            "FixedMonitor {{ ceiling: {}, overspeed: {}, following: {}, channel: {}, standstill: {} }}",
            self.ceiling,
            self.overspeed,
            self.following,
            self.channel,
            self.standstill
        );
    }
}

/// What the comparisons found this tick (before debouncing, which stays with
/// the interlock's counters).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FixedFindings {
    /// |measured| above ceiling + overspeed tolerance.
    pub overspeed: bool,
    /// |measured − commanded| above the following tolerance.
    pub following_error: bool,
    /// During a stop: |measured| above |commanded| + following tolerance.
    pub stop_ahead: bool,
    /// During a stop: |measured| + following tolerance below |commanded|.
    pub stop_behind: bool,
    /// |measured − second channel| above the channel tolerance.
    pub channels_disagree: bool,
    /// |measured| (and |second channel|) at or below the standstill speed.
    pub still: bool,
}

impl FixedMonitor {
    /// Converts the thresholds of `params` exactly as the interlock derives
    /// them (overspeed = ceiling + overspeed tolerance, summed in `f32`), each
    /// rounded down to I16F16.
    ///
    /// # Errors
    /// [`ParamError`] naming the parameter whose value does not fit I16F16
    /// (above 32,767 rad/s; a checked parameter set never is).
    pub fn from_params(params: &SafetyParams) -> Result<Self, ParamError> {
        let c = params.config();
        let ceiling = params.ceiling().ceiling_rad_s();
        Ok(Self {
            ceiling: FixedCeiling::new(ceiling, c.reverse)?,
            overspeed: FixedSpeedLimit::new(
                "overspeed_tolerance_rad_s",
                ceiling + c.overspeed_tolerance_rad_s,
            )?,
            following: FixedSpeedLimit::new(
                "following_tolerance_rad_s",
                c.following_tolerance_rad_s,
            )?,
            channel: FixedSpeedLimit::new("channel_tolerance_rad_s", c.channel_tolerance_rad_s)?,
            standstill: FixedSpeedLimit::new("standstill_rad_s", c.standstill_rad_s)?,
        })
    }

    /// The request clamp.
    #[must_use]
    pub const fn ceiling(&self) -> FixedCeiling {
        self.ceiling
    }

    /// Overspeed threshold (ceiling + tolerance), rounded down.
    #[must_use]
    pub const fn overspeed(&self) -> FixedSpeedLimit {
        self.overspeed
    }

    /// The comparisons of one tick. `second`: the second channel, if fitted.
    #[must_use]
    #[inline]
    pub fn check(&self, measured: Speed, second: Option<Speed>, commanded: Speed) -> FixedFindings {
        let m = measured.to_bits().unsigned_abs();
        let c = commanded.to_bits().unsigned_abs();
        let tol = self.following.rad_s().to_bits().unsigned_abs();
        let mut still = self.standstill.holds(measured);
        let mut disagree = false;
        if let Some(s) = second {
            disagree = following_error_exceeds(measured, s, self.channel);
            still = still && self.standstill.holds(s);
        }
        FixedFindings {
            overspeed: self.overspeed.exceeded_by(measured),
            following_error: following_error_exceeds(measured, commanded, self.following),
            // In 64 bits: magnitudes up to 2³¹ plus a tolerance cannot wrap.
            stop_ahead: u64::from(m) > u64::from(c) + u64::from(tol),
            stop_behind: u64::from(m) + u64::from(tol) < u64::from(c),
            channels_disagree: disagree,
            still,
        }
    }
}
