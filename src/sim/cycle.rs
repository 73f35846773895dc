//! A ride cycle on the simulated ride: a program file checked against the
//! ride file's parameter set, run tick by tick through the interlock (with
//! the swing governor when asked), against the drive model and simulated
//! speed sensors, and the seats simulated on the shaft speed that resulted.
//! What `swingdrive cycle` and the demo print comes from here.

use std::fmt;

use crate::design::{
    design, limits_for_governor, table::encode, DesignError, DesignOptions, DesignRequest,
    DurationChoice, MAX_DURATION_S,
};
use crate::interlock::{Event, EventKind, Interlock, TripCause};
use crate::player::ProfileTable;
use crate::program::{CycleRunner, CycleState, Program, ProgramError, Step};
use crate::program_file::{ProgramFile, StepAction};
use crate::protection::{GovernorParams, SwingGovernor};
use crate::request_governor::{GovernorDecision, GovernorInput, PassThrough, RequestGovernor};
use crate::ride_file::RideFile;
use crate::units::AngularSpeed;
use crate::ParamError;

use super::closed_loop::{
    run_loop, seat_on_trace, step_reports, ControllerTick, LoopSample, LoopSetup, SensorFault,
    StepReport,
};
use super::engine::{Observation, SimError};

/// Program capacity used by the host runs.
pub const HOST_PROGRAM_STEPS: usize = crate::program_file::MAX_PROGRAM_STEPS;

/// Seconds after a confirmation step starts at which `auto_confirm` answers.
pub const AUTO_CONFIRM_AFTER_S: f64 = 1.0;

/// Time step of the seat simulation over the loop trace, s.
pub const SEAT_SAMPLE_S: f64 = 0.01;

/// How to run a cycle.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CycleOptions {
    /// Answer every confirmation step [`AUTO_CONFIRM_AFTER_S`] after it
    /// starts, where the program gives no scripted answer.
    pub auto_confirm: bool,
    /// The swing governor's parameters; `None`: no governor (the ceiling
    /// alone).
    pub governor: Option<GovernorParams>,
    /// A speed-sensor fault injected at a time, s.
    pub fault: Option<(f64, SensorFault)>,
    /// Time at which the operator presses reset, s.
    pub reset_at_s: Option<f64>,
    /// Longest simulated time, s.
    pub max_time_s: f64,
}

impl Default for CycleOptions {
    fn default() -> Self {
        Self {
            auto_confirm: false,
            governor: None,
            fault: None,
            reset_at_s: None,
            max_time_s: 3600.0,
        }
    }
}

/// Why a cycle could not be run.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum CycleError {
    /// The ride file has no `[interlock]` table.
    NoInterlock,
    /// The ride file has no `[drive]` table.
    NoDrive,
    /// A confirmation step has no scripted answer and `auto_confirm` is off.
    Unanswered {
        /// Step number, from 1.
        step: usize,
        /// Its line in the program file.
        line: usize,
    },
    /// A step's target could not be turned into a speed.
    Target {
        /// Step number, from 1.
        step: usize,
        /// Its line in the program file.
        line: usize,
        /// Why.
        error: ParamError,
    },
    /// A swing-free step could not be designed.
    Design {
        /// Step number, from 1.
        step: usize,
        /// Its line in the program file.
        line: usize,
        /// Why.
        error: DesignError,
    },
    /// The program does not fit the parameter set.
    Program {
        /// Why (the step index inside counts from 0).
        error: ProgramError,
        /// Line of the refused step in the program file, when it is one.
        line: Option<usize>,
    },
    /// The governor's parameters were refused.
    Governor(ParamError),
    /// The seat simulation failed.
    Sim(SimError),
}

impl fmt::Display for CycleError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::NoInterlock => write!(f, "the ride file needs an [interlock] table to run a cycle"),
            Self::NoDrive => write!(f, "the ride file needs a [drive] table to run a cycle"),
            Self::Unanswered { step, line } => write!(
                f,
                "step {step} (line {line}) waits for the operator but has no answer_after_s; use --auto-confirm"
            ),
            Self::Target { step, line, error } => write!(f, "step {step} (line {line}): {error}"),
            Self::Design { step, line, error } => write!(f, "step {step} (line {line}): {error}"),
            Self::Program { error, line } => match line {
                Some(line) => write!(f, "{error} (line {line})"),
                None => write!(f, "{error}"),
            },
            Self::Governor(e) => write!(f, "governor: {e}"),
            Self::Sim(e) => write!(f, "{e}"),
        }
    }
}

impl std::error::Error for CycleError {}

/// One step's outcome.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct StepOutcome {
    /// The step's label or kind.
    pub title: String,
    /// Its line in the program file.
    pub line: usize,
    /// What it did to the seats (absent for steps never reached).
    #[serde(flatten)]
    pub report: Option<StepReport>,
}

/// One interlock event, timed.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct TimedEvent {
    /// Time, s.
    pub time_s: f64,
    /// What happened.
    pub what: String,
}

/// What a cycle did.
#[derive(Debug, Clone, PartialEq)]
pub struct CycleOutcome {
    /// Per program step.
    pub steps: Vec<StepOutcome>,
    /// The interlock's events.
    pub events: Vec<TimedEvent>,
    /// The loop, tick by tick.
    pub trace: Vec<LoopSample>,
    /// The seat, every [`SEAT_SAMPLE_S`].
    pub seat: Vec<Observation>,
    /// `true` when the program reached its end.
    pub finished: bool,
    /// The trip that ended it, if one did.
    pub trip: Option<TripCause>,
    /// Largest angle from vertical over the run, °.
    pub peak_angle_deg: f64,
    /// Largest load factor over the run.
    pub peak_load_factor: f64,
    /// Time the interlock was limiting the request (the governor or the
    /// ceiling held it back), s.
    pub limiting_s: f64,
}

/// A program step with its target resolved (and its table designed).
enum Prepared {
    Ramp(f64),
    Table(Vec<u8>),
    Hold(f64),
    Confirm,
    Stop,
}

/// The request governor of a host run: none, or the swing governor.
enum HostGovernor {
    None(PassThrough),
    Swing(Box<SwingGovernor>),
}

impl HostGovernor {
    /// No governor, or the swing governor for `ride` with the seats at rest
    /// (the simulated seats start hanging still).
    fn new(ride: &RideFile, params: Option<GovernorParams>) -> Result<Self, CycleError> {
        Ok(match params {
            None => Self::None(PassThrough),
            Some(g) => {
                let mut swing =
                    SwingGovernor::new(&ride.geometry, &g).map_err(CycleError::Governor)?;
                swing.confirm_rest(0.0);
                Self::Swing(Box::new(swing))
            }
        })
    }
}

/// Largest angle of the link from vertical over a run, °.
fn peak_angle_deg(seat: &[Observation]) -> f64 {
    seat.iter()
        .map(|o| o.state.angle_from_vertical_rad())
        .fold(0.0, f64::max)
        .to_degrees()
}

impl RequestGovernor for HostGovernor {
    fn govern(&mut self, input: &GovernorInput) -> GovernorDecision {
        match self {
            Self::None(g) => g.govern(input),
            Self::Swing(g) => g.govern(input),
        }
    }
}

impl CycleOutcome {
    /// The per-step table and the interlock's events as text, each line
    /// starting with `indent` (what `swingdrive cycle` and the demo print).
    #[must_use]
    pub fn step_table(&self, indent: &str) -> String {
        let mut text = format!(
            "{indent}step  line  what                                  time s  peak deg  residual deg  load   limiting s\n"
        );
        for (i, s) in self.steps.iter().enumerate() {
            let row = match &s.report {
                Some(r) => format!(
                    "{:>6.1}  {:>8.2}  {:>12}  {:>4.3}  {:>10.2}",
                    r.duration_s,
                    r.peak_angle_deg,
                    r.residual_swing_deg
                        .map_or_else(|| "-".to_owned(), |d| format!("{d:.2}")),
                    r.peak_load_factor,
                    r.limiting_s
                ),
                None => "not reached".to_owned(),
            };
            text.push_str(&format!(
                "{indent}{:>4}  {:>4}  {:<36}  {row}\n",
                i + 1,
                s.line,
                s.title
            ));
        }
        if !self.events.is_empty() {
            text.push_str(&format!("{indent}interlock events:\n"));
            for e in &self.events {
                text.push_str(&format!("{indent}  {:>8.2} s  {}\n", e.time_s, e.what));
            }
        }
        text
    }
}

/// Describes an event for a log.
#[must_use]
pub fn describe(event: &Event) -> String {
    match event.kind {
        EventKind::Trip(cause) => format!(
            "trip: {cause:?} (measured {:.3} rad/s, commanded {:.3} rad/s)",
            event.measured_rad_s, event.value_rad_s
        ),
        kind => format!("{kind:?} (measured {:.3} rad/s)", event.measured_rad_s),
    }
}

/// Runs `program` on `ride` (see the module documentation). `progress` is
/// called with the fraction done of the controller loop.
///
/// # Errors
/// [`CycleError`] naming what is missing or refused.
#[allow(clippy::too_many_lines)]
pub fn run_cycle(
    ride: &RideFile,
    program: &ProgramFile,
    options: &CycleOptions,
    mut progress: Option<&mut dyn FnMut(f64)>,
) -> Result<CycleOutcome, CycleError> {
    let params = ride.interlock.ok_or(CycleError::NoInterlock)?;
    let drive = ride.drive.ok_or(CycleError::NoDrive)?;

    // Targets, designed tables and confirmation answers, step by step (each
    // resolved once, here).
    let mut prepared: Vec<Prepared> = Vec::with_capacity(program.steps.len());
    let mut answers: Vec<Option<f64>> = Vec::with_capacity(program.steps.len());
    let mut speed = 0.0_f64;
    for (i, s) in program.steps.iter().enumerate() {
        let step = i + 1;
        let target = |t: &crate::program_file::TargetSpec| {
            t.speed_rad_s(&ride.geometry)
                .map_err(|error| CycleError::Target {
                    step,
                    line: s.line,
                    error,
                })
        };
        let mut answer = None;
        prepared.push(match s.action {
            StepAction::Ramp(t) => {
                speed = target(&t)?;
                Prepared::Ramp(speed)
            }
            StepAction::Stop => {
                speed = 0.0;
                Prepared::Stop
            }
            StepAction::SwingFree {
                target: t,
                duration_s,
            } => {
                let to = target(&t)?;
                // With the swing governor the table is designed within the
                // governor's rate, so that it passes unaltered (slower
                // tables need the longer durations).
                let (limits, design_options) = match options.governor {
                    Some(g) => (
                        limits_for_governor(
                            &ride.limits,
                            f64::from(g.target_rate_rad_s2),
                            f64::from(params.ramp_limits().max_jerk_rad_s3()),
                        ),
                        DesignOptions {
                            max_duration_s: MAX_DURATION_S,
                            ..DesignOptions::default()
                        },
                    ),
                    None => (ride.limits, DesignOptions::default()),
                };
                let request = DesignRequest {
                    seat: ride.seat,
                    limits,
                    from_speed_rad_s: speed,
                    to_speed_rad_s: to,
                    duration: duration_s.map_or(DurationChoice::Shortest, DurationChoice::Fixed),
                };
                let d = design(&request, &design_options).map_err(|error| CycleError::Design {
                    step,
                    line: s.line,
                    error,
                })?;
                let speeds: Vec<f64> = d.samples.iter().map(|&(_, w)| w).collect();
                speed = to;
                Prepared::Table(encode(&speeds, d.table_period_s, params.stamp()).map_err(
                    |error| CycleError::Target {
                        step,
                        line: s.line,
                        error,
                    },
                )?)
            }
            StepAction::Confirm { answer_after_s } => {
                answer = answer_after_s.or(options.auto_confirm.then_some(AUTO_CONFIRM_AFTER_S));
                if answer.is_none() {
                    return Err(CycleError::Unanswered { step, line: s.line });
                }
                Prepared::Confirm
            }
            StepAction::Hold { duration_s } => Prepared::Hold(duration_s),
        });
        answers.push(answer);
    }
    let mut steps: Vec<Step<'_>> = Vec::with_capacity(program.steps.len());
    for (i, (s, p)) in program.steps.iter().zip(&prepared).enumerate() {
        #[allow(clippy::cast_possible_truncation)]
        steps.push(match p {
            Prepared::Ramp(w) => Step::RampToSpeed(AngularSpeed::from_rad_per_s(*w as f32)),
            Prepared::Table(bytes) => {
                Step::Play(ProfileTable::parse(bytes, params.stamp()).map_err(|_| {
                    CycleError::Target {
                        step: i + 1,
                        line: s.line,
                        error: ParamError::OutOfRange("table"),
                    }
                })?)
            }
            Prepared::Hold(d) => Step::Hold {
                duration_s: *d as f32,
            },
            Prepared::Confirm => Step::WaitForConfirmation,
            Prepared::Stop => Step::Stop,
        });
    }
    let checked: Program<'_, HOST_PROGRAM_STEPS> = Program::new(&steps, &ride.geometry, &params)
        .map_err(|error| {
            let line = match error {
                ProgramError::Step { index, .. } => program.steps.get(index).map(|s| s.line),
                _ => None,
            };
            CycleError::Program { error, line }
        })?;

    let mut governor = HostGovernor::new(ride, options.governor)?;
    let mut interlock: Interlock<64> = Interlock::new(params);
    let mut runner = CycleRunner::new(&checked);
    let c = *params.config();
    let setup = LoopSetup {
        tick_s: f64::from(c.tick_s),
        drive,
        second_channel: c.second_channel,
        fault: options.fault,
        reset_at_s: options.reset_at_s,
        max_time_s: options.max_time_s,
    };
    let mut wait_started: Option<(usize, f64)> = None;
    let mut limiting_s = 0.0;
    let mut seen_events = 0_u32;
    let mut events = Vec::new();
    let mut last_percent = u32::MAX;
    // After the program's end the operator switches the ride off once it has
    // stood still for twice the interlock's standstill confirmation, and at
    // least 10 s (two rest-pendulum periods of a 6 m link: the last step's
    // residual swing is measured meanwhile).
    let mut still_ticks = 0_u32;
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let settle_ticks = (2 * u32::from(c.standstill_ticks)).max((10.0 / c.tick_s) as u32);
    let trace = run_loop(
        &setup,
        |sensors, t, dt| {
            let mut sensors = *sensors;
            if runner.state() == CycleState::Finished {
                still_ticks = if sensors.speed.value.abs() <= c.standstill_rad_s {
                    still_ticks + 1
                } else {
                    0
                };
                sensors.run_enable = still_ticks <= settle_ticks;
            }
            let sensors = &sensors;
            let index = runner.step_index();
            let waiting = runner.state() == CycleState::WaitingForConfirmation;
            if waiting && wait_started.is_none_or(|(i, _)| i != index) {
                wait_started = Some((index, t));
            }
            let confirm = waiting
                && wait_started.is_some_and(|(i, start)| {
                    answers
                        .get(i)
                        .copied()
                        .flatten()
                        .is_some_and(|after| t >= start + after)
                });
            let status = runner.tick(
                &checked,
                &mut interlock,
                &mut governor,
                sensors,
                confirm,
                dt,
            );
            if status.output.state == crate::interlock::InterlockState::Limiting {
                limiting_s += f64::from(dt);
            }
            // New events, in order (the record keeps the last 64; the loop
            // reads them every tick, so none is missed).
            #[allow(clippy::cast_possible_truncation)]
            let recorded = interlock.events().len() as u32 + interlock.events().overflowed();
            if recorded > seen_events {
                let fresh = (recorded - seen_events) as usize;
                let all: Vec<&Event> = interlock.events().iter().collect();
                for e in all.iter().skip(all.len().saturating_sub(fresh)) {
                    events.push(TimedEvent {
                        time_s: t + f64::from(dt),
                        what: describe(e),
                    });
                }
                seen_events = recorded;
            }
            if let Some(p) = progress.as_mut() {
                #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
                let percent = (100.0 * t / options.max_time_s) as u32;
                if percent != last_percent {
                    last_percent = percent;
                    p(t / options.max_time_s);
                }
            }
            ControllerTick {
                request_rad_s: status.request_rad_s,
                output: status.output,
                step: status.step,
                cycle: status.state,
            }
        },
        |s| {
            matches!(s.cycle, CycleState::Finished | CycleState::Aborted)
                && s.shaft_rad_s.abs() < 1e-6
                && s.brake
        },
    );
    if let Some(p) = progress.as_mut() {
        p(1.0);
    }
    let seat = seat_on_trace(&ride.seat, &trace, SEAT_SAMPLE_S).map_err(CycleError::Sim)?;
    let reports = step_reports(&ride.seat, &trace, &seat);
    let steps_out = program
        .steps
        .iter()
        .enumerate()
        .map(|(i, s)| StepOutcome {
            title: s.title(),
            line: s.line,
            report: reports.iter().find(|r| r.index == i).cloned(),
        })
        .collect();
    let last = trace.last().map(|s| s.cycle);
    Ok(CycleOutcome {
        steps: steps_out,
        events,
        finished: last == Some(CycleState::Finished),
        trip: interlock.cause(),
        peak_angle_deg: peak_angle_deg(&seat),
        peak_load_factor: seat.iter().map(|o| o.link.load_factor).fold(0.0, f64::max),
        limiting_s,
        trace,
        seat,
    })
}

/// The loop sample at or just before `time_s` (trace in time order).
fn sample_at(trace: &[LoopSample], time_s: f64) -> Option<&LoopSample> {
    let i = trace.partition_point(|s| s.time_s <= time_s + 1e-9);
    trace.get(i.saturating_sub(1))
}

/// Writes the run as CSV, one row per seat sample: `time_s, step,
/// cycle_state, interlock_state, request_rad_s, command_rad_s, shaft_rad_s,
/// measured_rad_s, run_permit, brake, angle_from_vertical_deg,
/// radial_angle_deg, tangential_angle_deg, load_factor` (docs/files.md).
///
/// # Errors
/// Any error of the writer.
pub fn write_cycle_csv<W: std::io::Write>(
    outcome: &CycleOutcome,
    writer: W,
) -> Result<(), csv::Error> {
    let mut csv = csv::Writer::from_writer(writer);
    csv.write_record([
        "time_s",
        "step",
        "cycle_state",
        "interlock_state",
        "request_rad_s",
        "command_rad_s",
        "shaft_rad_s",
        "measured_rad_s",
        "run_permit",
        "brake",
        "angle_from_vertical_deg",
        "radial_angle_deg",
        "tangential_angle_deg",
        "load_factor",
    ])?;
    for o in &outcome.seat {
        let Some(s) = sample_at(&outcome.trace, o.time_s) else {
            continue;
        };
        csv.write_record([
            format!("{:.3}", o.time_s),
            (s.step + 1).to_string(),
            format!("{:?}", s.cycle),
            format!("{:?}", s.state),
            format!("{:.6}", s.request_rad_s),
            format!("{:.6}", s.command_rad_s),
            format!("{:.6}", s.shaft_rad_s),
            format!("{:.6}", s.measured_rad_s),
            u8::from(s.permit).to_string(),
            u8::from(s.brake).to_string(),
            format!("{:.4}", o.state.angle_from_vertical_rad().to_degrees()),
            format!("{:.4}", o.state.radial_angle_rad().to_degrees()),
            format!("{:.4}", o.state.tangential_angle_rad().to_degrees()),
            format!("{:.5}", o.link.load_factor),
        ])?;
    }
    csv.flush()?;
    Ok(())
}

/// Draws the run: requested, commanded and true shaft speed (rpm) over the
/// swing angles (°) and the program step, as an SVG document.
///
/// # Errors
/// [`super::output::PlotError`] if plotters fails.
pub fn render_cycle_svg(
    outcome: &CycleOutcome,
    title: &str,
) -> Result<String, super::output::PlotError> {
    use super::output::{render_panels, Curve, Panel, RPM_PER_RAD_S};
    let speed = |f: fn(&LoopSample) -> f64| -> Vec<(f64, f64)> {
        outcome
            .trace
            .iter()
            .map(|s| (s.time_s, f(s) * RPM_PER_RAD_S))
            .collect()
    };
    let angle = |f: fn(&Observation) -> f64| -> Vec<(f64, f64)> {
        outcome
            .seat
            .iter()
            .map(|o| (o.time_s, f(o).to_degrees()))
            .collect()
    };
    #[allow(clippy::cast_precision_loss)]
    let step: Vec<(f64, f64)> = outcome
        .trace
        .iter()
        .map(|s| (s.time_s, (s.step + 1) as f64))
        .collect();
    render_panels(
        title,
        &[
            Panel {
                axis: "shaft speed [rpm]".into(),
                curves: vec![
                    Curve::new("request", speed(|s| s.request_rad_s), (200, 200, 200), 1),
                    Curve::new("command", speed(|s| s.command_rad_s), (120, 120, 120), 1),
                    Curve::new("shaft", speed(|s| s.shaft_rad_s), (0, 0, 255), 2),
                ],
            },
            Panel {
                axis: "swing angle [deg]".into(),
                curves: vec![
                    Curve::new(
                        "from vertical",
                        angle(|o| o.state.angle_from_vertical_rad()),
                        (255, 0, 0),
                        2,
                    ),
                    Curve::new(
                        "tangential",
                        angle(|o| o.state.tangential_angle_rad()),
                        (255, 0, 255),
                        1,
                    ),
                ],
            },
            Panel {
                axis: "program step".into(),
                curves: vec![Curve::new("step", step, (0, 128, 0), 2)],
            },
        ],
    )
}

/// The swing governor's parameters for a ride file, from its `[interlock]`
/// table: the certified angle, the length band (the table's longest length
/// and, as far below the nominal length, its mirror), the certified jerk and
/// a 100 Hz estimator; the admitted target's rate, speed uncertainty, rest
/// hold, margin and sensor tolerance as in [`GovernorParams::demo`]. `None`
/// without an `[interlock]` table.
#[must_use]
pub fn governor_for(ride: &RideFile) -> Option<GovernorParams> {
    let c = *ride.interlock?.config();
    let nominal = ride.geometry.length_m();
    let band = (c.length_max_m - nominal).max(0.0);
    Some(GovernorParams {
        length_min_m: (nominal - band).max(0.5 * nominal),
        length_max_m: c.length_max_m.max(nominal),
        // The admitted target's rate stays at the demo value (0.02 rad/s²):
        // the adversarial search on the demo ride found governed runs past
        // the certified angle at 0.1 and 0.2 rad/s² (docs/dynamic_protection.md),
        // so a faster rate is not offered even though played tables then get
        // slowed down.
        ..GovernorParams::demo(&ride.geometry, c.certified_angle_deg, c.max_jerk_rad_s3)
    })
}

/// A requested-speed series run through the interlock (and the governor)
/// against the drive model, and the seats on the shaft speed that resulted.
#[derive(Debug, Clone, PartialEq)]
pub struct RequestRun {
    /// The loop, tick by tick.
    pub trace: Vec<LoopSample>,
    /// The seat, every [`SEAT_SAMPLE_S`].
    pub seat: Vec<Observation>,
    /// Largest angle from vertical, °.
    pub peak_angle_deg: f64,
    /// The trip that ended the run early, if any.
    pub trip: Option<TripCause>,
}

/// Runs `request` (rad/s as a function of time, s) for `duration_s` through
/// the ride file's interlock — with the swing governor when `governor` is
/// given — against its drive model, then simulates the seats.
///
/// # Errors
/// [`CycleError::NoInterlock`], [`CycleError::NoDrive`],
/// [`CycleError::Governor`], [`CycleError::Sim`].
pub fn run_requests(
    ride: &RideFile,
    mut request: impl FnMut(f64) -> f64,
    governor: Option<GovernorParams>,
    duration_s: f64,
) -> Result<RequestRun, CycleError> {
    let params = ride.interlock.ok_or(CycleError::NoInterlock)?;
    let drive = ride.drive.ok_or(CycleError::NoDrive)?;
    let mut governor = HostGovernor::new(ride, governor)?;
    let mut interlock: Interlock<64> = Interlock::new(params);
    let c = *params.config();
    let setup = LoopSetup {
        tick_s: f64::from(c.tick_s),
        drive,
        second_channel: c.second_channel,
        fault: None,
        reset_at_s: None,
        max_time_s: duration_s,
    };
    let trace = run_loop(
        &setup,
        |sensors, t, dt| {
            #[allow(clippy::cast_possible_truncation)]
            let request_rad_s = request(t) as f32;
            let inputs = crate::interlock::TickInputs {
                request_rad_s,
                ..*sensors
            };
            let output = interlock.tick_with(&inputs, dt, &mut governor);
            ControllerTick {
                request_rad_s,
                output,
                step: 0,
                cycle: CycleState::Running,
            }
        },
        |_| false,
    );
    let seat = seat_on_trace(&ride.seat, &trace, SEAT_SAMPLE_S).map_err(CycleError::Sim)?;
    Ok(RequestRun {
        peak_angle_deg: peak_angle_deg(&seat),
        trip: interlock.cause(),
        trace,
        seat,
    })
}
