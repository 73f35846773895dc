//! Sampling of designed profiles, the profiles they are compared with, and
//! the check of a profile over the tolerance band in the simulator.

use serde::Serialize;

use crate::reference::ramp::{plan, Limits};
use crate::ride_file::RideLimits;
use crate::sim::dynamics::SeatDynamics;
use crate::sim::profile::SpeedProfile;
use crate::sim::{replay, ReplayOptions, SimError, StartCondition};

use super::shape::AccelSpline;
use super::DesignError;

/// One band member's figures in the simulator.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct BandCheck {
    /// Effective length, m.
    pub length_m: f64,
    /// Damping, 1/s.
    pub damping_per_s: f64,
    /// Residual swing after the profile, degrees.
    pub residual_swing_deg: f64,
    /// Largest angle from vertical, degrees.
    pub peak_angle_deg: f64,
    /// Peak angle minus this member's steady angle at the profile's largest
    /// speed, degrees: how far the seats swing past where that speed holds them.
    pub overshoot_deg: f64,
}

/// Most samples of a table or comparison profile.
pub const MAX_SAMPLES: usize = 1_000_000;

/// Samples `spline` every `period_s` from 0 to its end, speeds rounded to f32
/// as the table stores them; the last sample is `end_speed` exactly (in f32).
#[must_use]
#[allow(clippy::cast_possible_truncation)]
pub fn sample_spline(spline: &AccelSpline, period_s: f64, end_speed: f64) -> Vec<(f64, f64)> {
    let count = ((spline.duration_s() / period_s).round() as usize).min(MAX_SAMPLES);
    let mut out: Vec<(f64, f64)> = (0..=count)
        .map(|k| {
            let t = k as f64 * period_s;
            (t, f64::from(spline.state_at(t).0 as f32))
        })
        .collect();
    if let Some(last) = out.last_mut() {
        last.1 = f64::from(end_speed as f32);
    }
    if let Some(first) = out.first_mut() {
        first.1 = f64::from(spline.start_speed_rad_s() as f32);
    }
    out
}

/// Samples of the time-optimal jerk-limited ramp from `from` to `to` (f64
/// reference ramp), every `period_s`, ending exactly at `to`.
#[must_use]
#[allow(clippy::cast_possible_truncation)]
pub fn time_optimal_samples(
    limits: &RideLimits,
    from: f64,
    to: f64,
    period_s: f64,
) -> Vec<(f64, f64)> {
    let l = Limits {
        accel: limits.max_accel_rad_s2,
        decel: limits.max_decel_rad_s2,
        jerk: limits.max_jerk_rad_s3,
    };
    let p = plan(&l, false, from, 0.0, to);
    let duration = p.duration();
    let count = ((duration / period_s).ceil() as usize).min(MAX_SAMPLES);
    let mut out: Vec<(f64, f64)> = (0..=count)
        .map(|k| {
            let t = (k as f64 * period_s).min(duration);
            (t, p.state_at(t).0)
        })
        .collect();
    if let Some(last) = out.last_mut() {
        *last = (duration, to);
    }
    out.dedup_by(|b, a| b.0 <= a.0);
    out
}

/// Samples of a cubic ("smoothstep") speed ramp `ω = from + Δω (3s² − 2s³)`,
/// `s = t / duration`: peak acceleration 1.5 Δω / T, jerk 6 Δω / T² at the ends.
#[must_use]
#[allow(clippy::cast_possible_truncation)]
pub fn cubic_samples(from: f64, to: f64, duration_s: f64, period_s: f64) -> Vec<(f64, f64)> {
    let count = ((duration_s / period_s).ceil() as usize).clamp(1, MAX_SAMPLES);
    (0..=count)
        .map(|k| {
            let t = duration_s * k as f64 / count as f64;
            let s = t / duration_s;
            (t, from + (to - from) * s * s * (3.0 - 2.0 * s))
        })
        .collect()
}

/// A validated profile from samples.
///
/// # Errors
/// [`DesignError::Sim`] if the samples are refused.
pub fn to_profile(samples: &[(f64, f64)]) -> Result<SpeedProfile, DesignError> {
    SpeedProfile::new(samples).map_err(|_| {
        DesignError::Sim(SimError::Param(crate::error::ParamError::OutOfRange(
            "samples",
        )))
    })
}

/// Replays `profile` on every seat (start: hanging at rest if the profile
/// starts at zero speed, else in steady rotation) and returns their figures.
///
/// # Errors
/// [`DesignError::Sim`] if a replay fails.
pub fn check_band(
    seats: &[SeatDynamics],
    profile: &SpeedProfile,
    settle_s: f64,
) -> Result<Vec<BandCheck>, DesignError> {
    let start = if profile.first_speed_rad_s() == 0.0 {
        StartCondition::Hanging
    } else {
        StartCondition::Steady
    };
    let options = ReplayOptions {
        settle_s,
        start,
        record_trace: false,
        output_step_s: 0.01,
        ..ReplayOptions::default()
    };
    seats
        .iter()
        .map(|seat| {
            let out = replay(seat, profile, &options, None)?;
            Ok(BandCheck {
                length_m: seat.length_m(),
                damping_per_s: seat.damping_per_s(),
                residual_swing_deg: out.summary.residual_swing_deg,
                peak_angle_deg: out.summary.peak_angle_deg,
                overshoot_deg: out.summary.overshoot_deg,
            })
        })
        .collect()
}

/// Worst residual and worst peak angle over `checks`, degrees.
#[must_use]
pub fn worst(checks: &[BandCheck]) -> (f64, f64) {
    checks.iter().fold((0.0, 0.0), |(r, p), c| {
        (r.max(c.residual_swing_deg), p.max(c.peak_angle_deg))
    })
}

/// Worst overshoot over `checks` (peak angle past the member's own steady
/// angle at the profile's top speed), degrees.
#[must_use]
pub fn worst_overshoot(checks: &[BandCheck]) -> f64 {
    checks
        .iter()
        .map(|c| c.overshoot_deg)
        .fold(f64::NEG_INFINITY, f64::max)
}
