//! Host-side closed loop (feature `std`): a request time series through the
//! ceiling clamp, optionally the swing governor, and the ramp, ticked at the
//! estimator rate; then the resulting shaft speed through the f64 simulator
//! (the truth) for the peak angle. The drive follows the ramp exactly, and
//! the governor's estimator sees that speed (plus an optional sensor bias).

use crate::geometry::RideGeometry;
use crate::ramp::{RampLimits, Reverse, Setpoint, SpeedRamp};
use crate::request_governor::{GovernorInput, GovernorStatus, RequestGovernor};
use crate::sim::{replay, ReplayOptions, SeatDynamics, SimError, SpeedProfile, StartCondition};
use crate::units::AngularSpeed;

use super::governor::{GovernorParams, SwingGovernor};

/// A ride under test: geometry, ramp limits, the stop's limits, the speed
/// ceiling and (when governed) the governor's parameters.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rig {
    /// Nominal geometry (the governor's nominal length).
    pub geometry: RideGeometry,
    /// The ramp's normal limits.
    pub limits: RampLimits,
    /// The limits of a controlled stop.
    pub stop_limits: RampLimits,
    /// Speed ceiling (steady angle = certified angle), rad/s.
    pub ceiling_rad_s: f32,
    /// Governor parameters.
    pub params: GovernorParams,
}

/// A request sequence: piecewise-constant requests (time s, request rad/s)
/// and an optional stop time.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Scenario {
    /// (from time s, requested speed rad/s), times increasing.
    pub requests: Vec<(f64, f64)>,
    /// Duration, s.
    pub duration_s: f64,
    /// Time a controlled stop starts, s.
    pub stop_at_s: Option<f64>,
}

impl Scenario {
    fn request_at(&self, t: f64) -> f64 {
        let mut r = 0.0;
        for &(t0, v) in &self.requests {
            if t0 <= t {
                r = v;
            } else {
                break;
            }
        }
        r
    }
}

/// Tick of the closed loop, s (= the estimator period of the demo parameters).
pub const TICK_S: f32 = 0.01;
/// Every how many ticks a speed sample goes to the simulator.
const PROFILE_EVERY: usize = 5;

/// What one closed-loop run produced.
#[derive(Debug, Clone, PartialEq)]
pub struct LoopRun {
    /// Shaft speed samples (time s, rad/s) for the simulator.
    pub profile: Vec<(f64, f64)>,
    /// Largest angle the governor's estimator saw (over its lengths), degrees.
    pub estimated_peak_deg: f64,
    /// Ticks the governor restricted the request.
    pub restricted_ticks: usize,
    /// Ticks the governor reported a fault.
    pub fault_ticks: usize,
    /// Ticks at which the admitted target was not certified.
    pub uncertified_ticks: usize,
    /// First time the commanded speed came within 0.1 % of the last request, s.
    pub settled_at_s: Option<f64>,
}

/// Runs `scenario` on `rig`, governed or not; `sensor_bias_rad_s` is added
/// to the speed the governor sees.
///
/// # Errors
/// A parameter the governor or the ramp refused.
pub fn run_loop(
    rig: &Rig,
    scenario: &Scenario,
    governed: bool,
    sensor_bias_rad_s: f32,
) -> Result<LoopRun, crate::ParamError> {
    let mut ramp = SpeedRamp::new(rig.limits, Reverse::Forbidden);
    let mut governor = if governed {
        let mut g = SwingGovernor::new(&rig.geometry, &rig.params)?;
        g.confirm_rest(0.0);
        Some(g)
    } else {
        None
    };
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let ticks = (scenario.duration_s / f64::from(TICK_S)).ceil() as usize;
    let mut run = LoopRun {
        profile: Vec::with_capacity(ticks / PROFILE_EVERY + 2),
        estimated_peak_deg: 0.0,
        restricted_ticks: 0,
        fault_ticks: 0,
        uncertified_ticks: 0,
        settled_at_s: None,
    };
    run.profile.push((0.0, 0.0));
    let mut stopping = false;
    let mut setpoint = Setpoint::at_target(AngularSpeed::from_rad_per_s(0.0));
    for k in 0..ticks {
        #[allow(clippy::cast_precision_loss)]
        let t = k as f64 * f64::from(TICK_S);
        if let Some(ts) = scenario.stop_at_s {
            if !stopping && t >= ts {
                stopping = true;
                ramp.set_limits(rig.stop_limits);
            }
        }
        #[allow(clippy::cast_possible_truncation)]
        let request = (scenario.request_at(t) as f32).clamp(0.0, rig.ceiling_rad_s);
        let request = if stopping { 0.0 } else { request };
        let target = match governor.as_mut() {
            Some(g) => {
                let d = g.govern(&GovernorInput {
                    clamped_request_rad_s: request,
                    commanded: setpoint,
                    measured_rad_s: Some(setpoint.speed.rad_per_s() + sensor_bias_rad_s),
                    dt_s: TICK_S,
                    stopping,
                });
                match d.status {
                    GovernorStatus::Restricting => run.restricted_ticks += 1,
                    GovernorStatus::Fault => run.fault_ticks += 1,
                    _ => {}
                }
                if !g.certificate().certified && !stopping {
                    run.uncertified_ticks += 1;
                }
                run.estimated_peak_deg = run
                    .estimated_peak_deg
                    .max(f64::from(g.estimator().largest_angle_rad()).to_degrees());
                d.admitted_rad_s.clamp(0.0, rig.ceiling_rad_s)
            }
            None => request,
        };
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(target))?;
        setpoint = ramp.step(TICK_S)?;
        let v = f64::from(setpoint.speed.rad_per_s());
        if run.settled_at_s.is_none()
            && request > 0.0
            && (v - f64::from(request)).abs() <= 1e-3 * f64::from(request)
        {
            run.settled_at_s = Some(t + f64::from(TICK_S));
        }
        if (k + 1) % PROFILE_EVERY == 0 || k + 1 == ticks {
            run.profile.push((t + f64::from(TICK_S), v));
        }
    }
    Ok(run)
}

/// Peak angle and peak tangential angle (degrees) of the f64 simulator on a
/// speed profile, for the seat `truth`, starting hanging at rest, with a
/// settling window.
///
/// # Errors
/// [`SimError`].
pub fn simulate_peak(
    truth: &SeatDynamics,
    profile: &[(f64, f64)],
    settle_s: f64,
) -> Result<(f64, f64), SimError> {
    let profile = SpeedProfile::new(profile)
        .map_err(|_| SimError::Param(crate::ParamError::OutOfRange("profile")))?;
    let options = ReplayOptions {
        settle_s,
        start: StartCondition::Hanging,
        record_trace: false,
        ..ReplayOptions::default()
    };
    let out = replay(truth, &profile, &options, None)?;
    Ok((out.summary.peak_angle_deg, out.summary.peak_tangential_deg))
}
