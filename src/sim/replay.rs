//! Replay of a speed profile: the figures a test bench needs before a profile
//! goes onto a ride.
//!
//! * **Peak angle** (`peak_angle_deg`): the largest angle of the link from
//!   vertical over the whole run.
//! * **Residual swing** (`residual_swing_deg`): the largest angle, during the
//!   settling window after the profile, between the link and its steady
//!   direction at the final speed. It is an amplitude in any direction, so it
//!   also catches circling (conical) motion about the steady direction, which
//!   a peak-to-peak of the angle from vertical would miss.
//! * **Peak load factor**: the largest force of link (and hinge) on the
//!   rider per unit weight.
//! * **Chain slack**: every interval in which a chain's tension is ≤ 0, and
//!   every speed step whose impulse a chain would have to push; either makes
//!   the run invalid, since a slack chain is outside the model (the results
//!   after it are those of a rigid link).

use serde::Serialize;

use crate::geometry::Suspension;

use super::check_f64;
use super::drive::DriveModel;
use super::dynamics::{LinkState, SeatDynamics, SpeedStepResponse};
use super::engine::{simulate, Observation, Observer, SimError, SimOptions, Tolerance};
use super::profile::{ProfileStats, SpeedProfile, MAX_PROFILE_DURATION_S};

/// Finest grid on which peaks and slack are looked for, s. Between samples
/// 1 ms apart a swing of period T changes by at most a fraction
/// (2π · 1 ms / T)² / 8 of its amplitude near a peak, about 2e-7 for T = 5 s.
pub const MONITOR_STEP_S: f64 = 1.0e-3;

/// Speed steps whose tension impulse is above −this (m/s) count as passing
/// no impulse rather than a compressive one: rounding, not physics.
pub const IMPULSE_NOISE_MPS: f64 = 1.0e-9;

/// Most slack events listed one by one; further ones are only counted.
pub const MAX_LISTED_SLACK_EVENTS: usize = 100;

/// How the seat starts.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum StartCondition {
    /// The ride at standstill, the seat hanging straight down at rest. A
    /// non-zero first speed is then a speed step at the first sample.
    #[default]
    Hanging,
    /// The seat in steady rotation at the first sample's speed.
    Steady,
    /// The seat in the given state (turning frame), the top turning at the
    /// first sample's speed.
    Given(LinkState),
}

/// Options of a replay.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ReplayOptions {
    /// Settling window after the last sample, s, in [0, 86400]; the last
    /// speed holds and the residual swing is measured. Default 60 s.
    pub settle_s: f64,
    /// How the seat starts. Default hanging at standstill.
    pub start: StartCondition,
    /// Time between rows of the recorded trace, s, in [1e-4, 10]. Peaks and
    /// slack are looked for on a grid at least as fine as [`MONITOR_STEP_S`].
    /// Default 0.01 s.
    pub output_step_s: f64,
    /// Solver tolerances.
    pub tolerance: Tolerance,
    /// Shaft drive model; `None`: the shaft follows the profile exactly.
    pub drive: Option<DriveModel>,
    /// Time the run permit drops (needs `drive`); `None`: never.
    pub permit_drop_s: Option<f64>,
    /// Keep the trace (time series); without it only the summary is built.
    pub record_trace: bool,
}

impl Default for ReplayOptions {
    fn default() -> Self {
        Self {
            settle_s: 60.0,
            start: StartCondition::Hanging,
            output_step_s: 0.01,
            tolerance: Tolerance::default(),
            drive: None,
            permit_drop_s: None,
            record_trace: true,
        }
    }
}

/// One row of the trace.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TraceSample {
    /// Time, s.
    pub time_s: f64,
    /// Commanded speed, rad/s.
    pub command_rad_s: f64,
    /// Shaft speed, rad/s.
    pub speed_rad_s: f64,
    /// Shaft speed, rpm.
    pub speed_rpm: f64,
    /// Shaft acceleration, rad/s².
    pub accel_rad_s2: f64,
    /// Radial swing angle, degrees (outward positive).
    pub radial_angle_deg: f64,
    /// Tangential swing angle, degrees (ahead of the pivot positive).
    pub tangential_angle_deg: f64,
    /// Angle of the link from vertical, degrees.
    pub angle_from_vertical_deg: f64,
    /// Load factor on the rider.
    pub load_factor: f64,
    /// Link tension over weight (≤ 0: slack chain).
    pub tension_ratio: f64,
}

/// What made a chain go slack.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SlackKind {
    /// The tension fell to zero or below.
    Tension,
    /// A speed step needed the chain to push.
    Impulse,
}

/// One slack event of a chain.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SlackEvent {
    /// Why.
    pub kind: SlackKind,
    /// First sample (or step time) at which the chain was slack, s.
    pub start_s: f64,
    /// Last sample at which it was slack, s (= start for an impulse).
    pub end_s: f64,
    /// Lowest tension over weight in the event (tension events).
    pub min_tension_ratio: Option<f64>,
    /// Tension impulse per unit mass, m/s (impulse events; negative).
    pub tension_impulse_mps: Option<f64>,
}

/// Solver figures of a replay.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SolverSummary {
    /// Relative tolerance used.
    pub relative_tolerance: f64,
    /// Absolute tolerance used.
    pub absolute_tolerance: f64,
    /// Accepted steps.
    pub accepted_steps: usize,
    /// Rejected steps.
    pub rejected_steps: usize,
    /// Evaluations of the equations of motion.
    pub evaluations: usize,
    /// Intervals between breakpoints.
    pub intervals: usize,
    /// Largest constraint error before projection (unit-vector length and
    /// n·ω), a measure of the integration error.
    pub max_constraint_error: f64,
}

/// The figures of a replay (JSON keys in `docs/files.md`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReplaySummary {
    /// `"chain"` or `"rod"`.
    pub suspension: &'static str,
    /// First sample of the profile, s.
    pub start_s: f64,
    /// Last sample of the profile, s.
    pub profile_end_s: f64,
    /// End of the run (profile end + settling window), s.
    pub end_s: f64,
    /// Largest angle of the link from vertical, degrees.
    pub peak_angle_deg: f64,
    /// When it occurred, s.
    pub peak_angle_time_s: f64,
    /// Steady angle at the largest commanded speed, degrees.
    pub max_steady_angle_deg: f64,
    /// Peak angle minus that steady angle, degrees: how far the seats swing
    /// beyond where the profile's top speed would hold them.
    pub overshoot_deg: f64,
    /// Largest |tangential swing angle|, degrees.
    pub peak_tangential_deg: f64,
    /// Residual swing in the settling window, degrees.
    pub residual_swing_deg: f64,
    /// Start of the window it was measured in, s (the profile end, or the
    /// permit drop if later).
    pub residual_window_start_s: f64,
    /// The speed the shaft settles to, rad/s.
    pub final_speed_rad_s: f64,
    /// Steady angle at that speed, degrees.
    pub final_steady_angle_deg: f64,
    /// Largest load factor on the rider.
    pub peak_load_factor: f64,
    /// When it occurred, s.
    pub peak_load_factor_time_s: f64,
    /// Lowest link tension over weight.
    pub min_tension_ratio: f64,
    /// When it occurred, s.
    pub min_tension_time_s: f64,
    /// `true` if a chain went slack at any time (the run is then invalid).
    pub chain_slack: bool,
    /// Number of slack events.
    pub slack_event_count: usize,
    /// The first [`MAX_LISTED_SLACK_EVENTS`] slack events.
    pub slack_events: Vec<SlackEvent>,
    /// Acceleration, jerk and step figures of the profile.
    pub profile: ProfileStats,
    /// Solver figures.
    pub solver: SolverSummary,
}

/// Trace and summary of a replay.
#[derive(Debug, Clone, PartialEq)]
pub struct ReplayOutcome {
    /// The time series (empty unless `record_trace`).
    pub trace: Vec<TraceSample>,
    /// The figures.
    pub summary: ReplaySummary,
}

/// Follows the samples and keeps the figures.
struct Tracker<'a, 'p> {
    model: &'a SeatDynamics,
    drive: Option<DriveModel>,
    record_every: u64,
    count: u64,
    trace: Option<Vec<TraceSample>>,
    window_start_s: f64,
    target: Option<([f64; 3], f64)>,
    residual_rad: f64,
    peak_angle: (f64, f64),
    peak_tangential: f64,
    peak_load: (f64, f64),
    min_tension: (f64, f64),
    slack_open: bool,
    slack_count: usize,
    slack_events: Vec<SlackEvent>,
    progress: Option<&'p mut dyn FnMut(f64)>,
    progress_span: (f64, f64),
    progress_next: f64,
}

impl Tracker<'_, '_> {
    fn add_event(&mut self, event: SlackEvent) {
        self.slack_count += 1;
        if self.slack_events.len() < MAX_LISTED_SLACK_EVENTS {
            self.slack_events.push(event);
        }
    }

    fn chain(&self) -> bool {
        self.model.suspension() == Suspension::Chain
    }
}

impl Observer for Tracker<'_, '_> {
    fn observe(&mut self, o: &Observation) {
        let t = o.time_s;
        let angle = o.state.angle_from_vertical_rad();
        if angle > self.peak_angle.0 {
            self.peak_angle = (angle, t);
        }
        self.peak_tangential = self
            .peak_tangential
            .max(o.state.tangential_angle_rad().abs());
        if o.link.load_factor > self.peak_load.0 {
            self.peak_load = (o.link.load_factor, t);
        }
        if o.link.tension_ratio < self.min_tension.0 {
            self.min_tension = (o.link.tension_ratio, t);
        }
        if self.chain() {
            let slack = o.link.tension_ratio <= 0.0;
            match (slack, self.slack_open) {
                (true, false) => {
                    self.slack_open = true;
                    self.add_event(SlackEvent {
                        kind: SlackKind::Tension,
                        start_s: t,
                        end_s: t,
                        min_tension_ratio: Some(o.link.tension_ratio),
                        tension_impulse_mps: None,
                    });
                }
                (true, true) => {
                    let listed = self.slack_count <= self.slack_events.len();
                    if let (true, Some(e)) = (listed, self.slack_events.last_mut()) {
                        e.end_s = t;
                        let worst = e
                            .min_tension_ratio
                            .map_or(o.link.tension_ratio, |m| m.min(o.link.tension_ratio));
                        e.min_tension_ratio = Some(worst);
                    }
                }
                (false, _) => self.slack_open = false,
            }
        }
        if t >= self.window_start_s {
            let (direction, _) = *self.target.get_or_insert_with(|| {
                let speed = if o.permit {
                    o.command_rad_s
                } else {
                    let stops = self.drive.is_some_and(|d| {
                        d.coast_friction_rad_s2() > 0.0 || d.coast_viscous_per_s() > 0.0
                    });
                    if stops {
                        0.0
                    } else {
                        o.shaft.speed_rad_s
                    }
                };
                (self.model.steady_state(speed).direction(), speed)
            });
            self.residual_rad = self.residual_rad.max(o.state.angle_to(direction));
        }
        if self.count.is_multiple_of(self.record_every) {
            if let Some(trace) = self.trace.as_mut() {
                trace.push(TraceSample {
                    time_s: t,
                    command_rad_s: o.command_rad_s,
                    speed_rad_s: o.shaft.speed_rad_s,
                    speed_rpm: o.shaft.speed_rad_s * 60.0 / core::f64::consts::TAU,
                    accel_rad_s2: o.shaft.accel_rad_s2,
                    radial_angle_deg: o.state.radial_angle_rad().to_degrees(),
                    tangential_angle_deg: o.state.tangential_angle_rad().to_degrees(),
                    angle_from_vertical_deg: angle.to_degrees(),
                    load_factor: o.link.load_factor,
                    tension_ratio: o.link.tension_ratio,
                });
            }
        }
        self.count += 1;
        let (start, end) = self.progress_span;
        if t >= self.progress_next {
            if let Some(progress) = self.progress.as_mut() {
                let span = (end - start).max(f64::MIN_POSITIVE);
                progress(((t - start) / span).clamp(0.0, 1.0));
            }
            self.progress_next = t + 0.01 * (end - start);
        }
    }

    fn speed_step(&mut self, time_s: f64, response: &SpeedStepResponse) {
        if self.chain() && response.tension_impulse_mps < -IMPULSE_NOISE_MPS {
            self.add_event(SlackEvent {
                kind: SlackKind::Impulse,
                start_s: time_s,
                end_s: time_s,
                min_tension_ratio: None,
                tension_impulse_mps: Some(response.tension_impulse_mps),
            });
        }
    }
}

/// Replays `profile` on `model`: from the start condition through the
/// profile, then the settling window at the last speed.
///
/// `progress`, if given, is called with the fraction done (0..1) about every
/// 1 % of simulated time.
///
/// # Errors
/// [`SimError::Param`] naming `settle_s` or `output_step_s`, or any error of
/// [`simulate`].
#[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
pub fn replay(
    model: &SeatDynamics,
    profile: &SpeedProfile,
    options: &ReplayOptions,
    progress: Option<&mut dyn FnMut(f64)>,
) -> Result<ReplayOutcome, SimError> {
    let settle = check_f64(
        "settle_s",
        options.settle_s,
        0.0,
        MAX_PROFILE_DURATION_S,
        true,
    )?;
    let output_step = check_f64("output_step_s", options.output_step_s, 1e-4, 10.0, false)?;
    // The monitor grid divides the output grid, so every output row is a sample.
    let record_every = (output_step / MONITOR_STEP_S).ceil().max(1.0);
    let sample_step = output_step / record_every;
    let sim = SimOptions {
        sample_step_s: sample_step,
        tolerance: options.tolerance,
        drive: options.drive,
        permit_drop_s: options.permit_drop_s,
    };
    let start_s = profile.start_s();
    let profile_end_s = profile.end_s();
    let end_s = profile_end_s + settle;
    let (start, start_speed) = match options.start {
        StartCondition::Hanging => (LinkState::HANGING, 0.0),
        StartCondition::Steady => {
            let w = profile.first_speed_rad_s();
            (model.steady_state(w), w)
        }
        StartCondition::Given(state) => (state, profile.first_speed_rad_s()),
    };
    let window_start_s = options
        .permit_drop_s
        .map_or(profile_end_s, |drop| drop.clamp(profile_end_s, end_s));
    let rows = ((end_s - start_s) / output_step).ceil() as usize + 2;
    let mut tracker = Tracker {
        model,
        drive: options.drive,
        record_every: record_every as u64,
        count: 0,
        trace: options
            .record_trace
            .then(|| Vec::with_capacity(rows.min(50_000_000))),
        window_start_s,
        target: None,
        residual_rad: 0.0,
        peak_angle: (f64::NEG_INFINITY, start_s),
        peak_tangential: 0.0,
        peak_load: (f64::NEG_INFINITY, start_s),
        min_tension: (f64::INFINITY, start_s),
        slack_open: false,
        slack_count: 0,
        slack_events: Vec::new(),
        progress,
        progress_span: (start_s, end_s),
        progress_next: start_s,
    };
    let stats = simulate(
        model,
        profile,
        start,
        start_speed,
        end_s,
        &sim,
        &mut tracker,
    )?;
    if let Some(progress) = tracker.progress.as_mut() {
        progress(1.0);
    }
    let final_speed = tracker
        .target
        .map_or(stats.final_speed_rad_s, |(_, speed)| speed);
    let max_steady = model.steady_angle_rad(profile.max_abs_speed_rad_s());
    let peak_angle = tracker.peak_angle.0.max(0.0);
    let summary = ReplaySummary {
        suspension: match model.suspension() {
            Suspension::Chain => "chain",
            Suspension::Rod => "rod",
        },
        start_s,
        profile_end_s,
        end_s,
        peak_angle_deg: peak_angle.to_degrees(),
        peak_angle_time_s: tracker.peak_angle.1,
        max_steady_angle_deg: max_steady.to_degrees(),
        overshoot_deg: (peak_angle - max_steady).to_degrees(),
        peak_tangential_deg: tracker.peak_tangential.to_degrees(),
        residual_swing_deg: tracker.residual_rad.to_degrees(),
        residual_window_start_s: window_start_s,
        final_speed_rad_s: final_speed,
        final_steady_angle_deg: model.steady_angle_rad(final_speed).to_degrees(),
        peak_load_factor: tracker.peak_load.0,
        peak_load_factor_time_s: tracker.peak_load.1,
        min_tension_ratio: tracker.min_tension.0,
        min_tension_time_s: tracker.min_tension.1,
        chain_slack: tracker.slack_count > 0,
        slack_event_count: tracker.slack_count,
        slack_events: tracker.slack_events,
        profile: profile.stats(),
        solver: SolverSummary {
            relative_tolerance: options.tolerance.relative,
            absolute_tolerance: options.tolerance.absolute,
            accepted_steps: stats.accepted_steps,
            rejected_steps: stats.rejected_steps,
            evaluations: stats.evaluations,
            intervals: stats.intervals,
            max_constraint_error: stats.max_constraint_error,
        },
    };
    Ok(ReplayOutcome {
        trace: tracker.trace.unwrap_or_default(),
        summary,
    })
}
