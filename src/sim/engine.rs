//! Integration of the seat dynamics across a speed profile.
//!
//! The state `[n, ω, shaft speed]` (7 numbers) is integrated with the
//! adaptive Dormand–Prince 5(4) method of the `differential-equations` crate.
//! The right-hand side jumps wherever the commanded acceleration jumps, so
//! the solver is restarted at every breakpoint: each profile sample, the
//! permit drop, the moment a coasting top stops, and the end of the run. At
//! each breakpoint the state is projected back onto the constraints
//! (`|n| = 1`, `n·ω = 0`, rods in the radial plane) and a speed step, if the
//! profile has one there, is applied as an impulse
//! ([`SeatDynamics::speed_step`]).
//!
//! Between breakpoints the solver's dense output (4th order) is sampled on a
//! fixed time grid (`sample_step_s`) and every sample is handed to an
//! [`Observer`].

use std::fmt;

use differential_equations::error::Error as SolverError;
use differential_equations::interpolate::Interpolation;
use differential_equations::methods::ExplicitRungeKutta;
use differential_equations::ode::{solve_ode, OrdinaryNumericalMethod, ODE};
use differential_equations::prelude::{ControlFlag, Solout, Solution};

use crate::error::ParamError;

use super::check_f64;
use super::drive::DriveModel;
use super::dynamics::{LinkForce, LinkState, SeatDynamics, ShaftMotion, SpeedStepResponse};
use super::profile::SpeedProfile;

/// Integrator state: link direction (3), link angular velocity (3), shaft speed.
type Y = [f64; 7];

/// Most solver steps allowed in one interval between breakpoints.
pub const MAX_STEPS_PER_INTERVAL: usize = 2_000_000;

/// Smallest accepted sample step, s.
pub const MIN_SAMPLE_STEP_S: f64 = 1.0e-5;
/// Largest accepted sample step, s.
pub const MAX_SAMPLE_STEP_S: f64 = 10.0;

/// Error tolerances of the adaptive solver (per component of the state,
/// whose components are all of order 1: unit vector, rad/s).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tolerance {
    /// Relative tolerance, in [1e-14, 1e-3].
    pub relative: f64,
    /// Absolute tolerance, in [1e-16, 1e-3].
    pub absolute: f64,
}

impl Default for Tolerance {
    /// 1e-9 relative, 1e-11 absolute: link directions within 4e-7 rad of a
    /// 1e-12 run over three minutes of violent swinging, within 2e-8 rad for
    /// smooth profiles (measured, see `docs/simulator.md`).
    fn default() -> Self {
        Self {
            relative: 1.0e-9,
            absolute: 1.0e-11,
        }
    }
}

/// How to integrate and sample.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SimOptions {
    /// Time between samples handed to the observer, s, in
    /// [[`MIN_SAMPLE_STEP_S`], [`MAX_SAMPLE_STEP_S`]].
    pub sample_step_s: f64,
    /// Solver tolerances.
    pub tolerance: Tolerance,
    /// The shaft drive; `None`: the shaft follows the profile exactly.
    pub drive: Option<DriveModel>,
    /// Time at which the run permit drops and the top coasts (needs a
    /// drive model for the friction); `None`: it never drops.
    pub permit_drop_s: Option<f64>,
}

impl Default for SimOptions {
    fn default() -> Self {
        Self {
            sample_step_s: 1.0e-3,
            tolerance: Tolerance::default(),
            drive: None,
            permit_drop_s: None,
        }
    }
}

/// Everything known about the seat and the shaft at one sample time.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Observation {
    /// Time, s.
    pub time_s: f64,
    /// The seat (projected onto the constraints).
    pub state: LinkState,
    /// The shaft.
    pub shaft: ShaftMotion,
    /// The commanded speed, rad/s.
    pub command_rad_s: f64,
    /// Link force and load factor.
    pub link: LinkForce,
    /// `false` once the run permit has dropped.
    pub permit: bool,
}

/// Receives the samples of a simulation.
pub trait Observer {
    /// One sample of the motion, in time order.
    fn observe(&mut self, observation: &Observation);

    /// A speed step was applied at `time_s` (before the sample at that time,
    /// if there is one).
    fn speed_step(&mut self, time_s: f64, response: &SpeedStepResponse) {
        let _ = (time_s, response);
    }
}

/// Collects every observation (handy in tests and small runs).
impl Observer for Vec<Observation> {
    fn observe(&mut self, observation: &Observation) {
        self.push(*observation);
    }
}

/// Work done and accuracy kept by a simulation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SimStats {
    /// Accepted solver steps.
    pub accepted_steps: usize,
    /// Rejected solver steps.
    pub rejected_steps: usize,
    /// Evaluations of the equations of motion.
    pub evaluations: usize,
    /// Intervals integrated (breakpoint to breakpoint).
    pub intervals: usize,
    /// Largest constraint error found at a breakpoint before projection
    /// ([`LinkState::constraint_error`]).
    pub max_constraint_error: f64,
    /// State at the end.
    pub final_state: LinkState,
    /// Shaft speed at the end, rad/s.
    pub final_speed_rad_s: f64,
}

/// Why a simulation could not be run or finished.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
pub enum SimError {
    /// An option is out of range.
    Param(ParamError),
    /// A permit drop was asked for without a drive model to coast with.
    PermitDropWithoutDrive,
    /// The solver gave up at `time_s`.
    Solver {
        /// Simulated time, s.
        time_s: f64,
        /// What happened.
        reason: &'static str,
    },
}

impl fmt::Display for SimError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Param(e) => write!(f, "{e}"),
            Self::PermitDropWithoutDrive => {
                write!(f, "a permit drop needs a drive model (coast-down friction)")
            }
            Self::Solver { time_s, reason } => {
                write!(f, "the solver stopped at t = {time_s} s: {reason}")
            }
        }
    }
}

impl std::error::Error for SimError {}

impl From<ParamError> for SimError {
    fn from(e: ParamError) -> Self {
        Self::Param(e)
    }
}

/// How the shaft moves on one interval between breakpoints.
#[derive(Debug, Clone, Copy)]
enum ShaftLaw {
    /// Exactly as commanded: ω = ω0 + α (t − t0).
    Commanded { t0: f64, speed0: f64, accel: f64 },
    /// A drive following the command (linear in the interval); ω is state.
    Following {
        t0: f64,
        command0: f64,
        command_accel: f64,
        drive: DriveModel,
    },
    /// Coasting since `t_drop` from `speed_drop`, closed form.
    Coasting {
        t_drop: f64,
        speed_drop: f64,
        drive: DriveModel,
    },
}

impl ShaftLaw {
    fn command(&self, t: f64) -> f64 {
        match *self {
            Self::Commanded { t0, speed0, accel } => speed0 + accel * (t - t0),
            Self::Following {
                t0,
                command0,
                command_accel,
                ..
            } => command0 + command_accel * (t - t0),
            Self::Coasting { .. } => 0.0,
        }
    }

    fn shaft(&self, t: f64, speed_state: f64) -> ShaftMotion {
        match *self {
            Self::Commanded { accel, .. } => ShaftMotion {
                speed_rad_s: self.command(t),
                accel_rad_s2: accel,
            },
            Self::Following { drive, .. } => ShaftMotion {
                speed_rad_s: speed_state,
                accel_rad_s2: drive.following_accel(self.command(t), speed_state),
            },
            Self::Coasting {
                t_drop,
                speed_drop,
                drive,
            } => {
                let (speed_rad_s, accel_rad_s2) = drive.coast(speed_drop, t - t_drop);
                ShaftMotion {
                    speed_rad_s,
                    accel_rad_s2,
                }
            }
        }
    }
}

/// The equations of motion on one interval, in the solver's terms.
struct Interval<'a> {
    model: &'a SeatDynamics,
    law: ShaftLaw,
}

fn unpack(y: &Y) -> LinkState {
    let [n0, n1, n2, w0, w1, w2, _] = *y;
    LinkState::from_raw([n0, n1, n2], [w0, w1, w2])
}

fn pack(state: &LinkState, speed: f64) -> Y {
    let [n0, n1, n2] = state.direction();
    let [w0, w1, w2] = state.angular_velocity();
    [n0, n1, n2, w0, w1, w2, speed]
}

impl ODE<f64, Y> for Interval<'_> {
    fn diff(&self, t: f64, y: &Y, dydt: &mut Y) {
        let shaft = self.law.shaft(t, y[6]);
        let rate = self.model.rate(&unpack(y), shaft);
        let [a, b, c] = rate.direction;
        let [d, e, f] = rate.angular_velocity;
        *dydt = [a, b, c, d, e, f, shaft.accel_rad_s2];
    }
}

/// The sample times: `start + k · step` up to `end`, by index so that no
/// rounding accumulates.
struct Grid {
    start: f64,
    step: f64,
    index: u64,
    end: f64,
}

impl Grid {
    /// Times within this slack of a bound count as on it.
    fn slack(&self) -> f64 {
        1e-9 * self.step
    }

    /// The next sample time if it is at or before `t`.
    #[allow(clippy::cast_precision_loss)]
    fn next_until(&self, t: f64) -> Option<f64> {
        let next = self.start + self.index as f64 * self.step;
        (next <= t + self.slack() && next <= self.end + self.slack()).then_some(next)
    }
}

/// Samples the solver's dense output on the grid and hands it on.
struct Monitor<'a, O: Observer + ?Sized> {
    model: &'a SeatDynamics,
    law: ShaftLaw,
    grid: &'a mut Grid,
    observer: &'a mut O,
    permit: bool,
    failed: Option<f64>,
}

impl<O: Observer + ?Sized> Monitor<'_, O> {
    fn sample(&mut self, t: f64, y: &Y) {
        let raw = unpack(y);
        let state = raw.projected(self.model.suspension());
        let shaft = self.law.shaft(t, y[6]);
        let observation = Observation {
            time_s: t,
            state,
            shaft,
            command_rad_s: self.law.command(t),
            link: self.model.link_force(&state, shaft),
            permit: self.permit,
        };
        self.observer.observe(&observation);
    }
}

impl<O: Observer + ?Sized> Solout<f64, Y> for Monitor<'_, O> {
    fn solout<I>(
        &mut self,
        t_curr: f64,
        t_prev: f64,
        y_curr: &Y,
        _y_prev: &Y,
        interpolator: &mut I,
        _solution: &mut Solution<f64, Y>,
    ) -> ControlFlag<f64, Y>
    where
        I: Interpolation<f64, Y> + ?Sized,
    {
        while let Some(t) = self.grid.next_until(t_curr) {
            let t = t.clamp(t_prev, t_curr);
            let y = if t == t_curr {
                Ok(*y_curr)
            } else {
                interpolator.interpolate(t)
            };
            match y {
                Ok(y) => self.sample(t, &y),
                Err(_) => {
                    self.failed = Some(t);
                    return ControlFlag::Terminate;
                }
            }
            self.grid.index += 1;
        }
        ControlFlag::Continue
    }
}

/// Simulates one seat from `start` (shaft at `start_speed_rad_s` just before
/// the profile's first sample) through `profile`, holding its last speed
/// until `end_s`.
///
/// At the first sample the shaft jumps from `start_speed_rad_s` to the
/// commanded speed if they differ (with the ideal drive), which is a speed
/// step like any other. Samples are handed to `observer` at
/// `profile.start_s() + k · options.sample_step_s`, up to `end_s`.
///
/// # Errors
/// [`SimError::Param`] naming `sample_step_s`, `relative_tolerance`,
/// `absolute_tolerance`, `end_s` (before the profile's start or not finite),
/// `start_speed_rad_s` or `permit_drop_s`; [`SimError::PermitDropWithoutDrive`];
/// [`SimError::Solver`] if the solver gives up.
pub fn simulate<O: Observer + ?Sized>(
    model: &SeatDynamics,
    profile: &SpeedProfile,
    start: LinkState,
    start_speed_rad_s: f64,
    end_s: f64,
    options: &SimOptions,
    observer: &mut O,
) -> Result<SimStats, SimError> {
    let step = check_f64(
        "sample_step_s",
        options.sample_step_s,
        MIN_SAMPLE_STEP_S,
        MAX_SAMPLE_STEP_S,
        false,
    )?;
    let rtol = check_f64(
        "relative_tolerance",
        options.tolerance.relative,
        1e-14,
        1e-3,
        false,
    )?;
    let atol = check_f64(
        "absolute_tolerance",
        options.tolerance.absolute,
        1e-16,
        1e-3,
        false,
    )?;
    let t_start = profile.start_s();
    if !end_s.is_finite() {
        return Err(ParamError::NonFinite("end_s").into());
    }
    if end_s < t_start || end_s > t_start + 2.0 * super::profile::MAX_PROFILE_DURATION_S {
        return Err(ParamError::OutOfRange("end_s").into());
    }
    let end = end_s;
    let max_speed = f64::from(crate::steady::MAX_SHAFT_SPEED_RAD_S);
    check_f64(
        "start_speed_rad_s",
        start_speed_rad_s,
        -max_speed,
        max_speed,
        true,
    )?;
    let permit_drop = match options.permit_drop_s {
        None => None,
        Some(t) if !t.is_finite() => return Err(ParamError::NonFinite("permit_drop_s").into()),
        Some(t) => Some(t.max(t_start)),
    };
    if permit_drop.is_some() && options.drive.is_none() {
        return Err(SimError::PermitDropWithoutDrive);
    }

    let suspension = model.suspension();
    // Breakpoints still ahead, latest first: the next one is popped off the end.
    let mut pending: Vec<f64> = profile
        .breakpoints()
        .chain(permit_drop)
        .chain(core::iter::once(end))
        .filter(|&t| t > t_start && t <= end)
        .collect();
    pending.sort_by(|a, b| b.total_cmp(a));
    pending.dedup();

    let mut grid = Grid {
        start: t_start,
        step,
        index: 0,
        end,
    };
    let mut stats = SimStats {
        accepted_steps: 0,
        rejected_steps: 0,
        evaluations: 0,
        intervals: 0,
        max_constraint_error: start.constraint_error(),
        final_state: start,
        final_speed_rad_s: start_speed_rad_s,
    };
    let mut state = start.projected(suspension);
    let mut speed = start_speed_rad_s;
    let mut coasting: Option<(f64, f64)> = None;
    let mut t = t_start;
    let mut next_h: f64 = 0.0;
    loop {
        // Events at the breakpoint t: permit drop, or a commanded step.
        if coasting.is_none() && permit_drop.is_some_and(|drop| drop <= t) {
            coasting = Some((t, speed));
            if let Some(stop) = options
                .drive
                .and_then(|d| d.coast_stop_time_s(speed))
                .map(|s| t + s)
                .filter(|&s| s > t && s < end)
            {
                let at = pending.partition_point(|&b| b > stop);
                if pending.get(at) != Some(&stop) {
                    pending.insert(at, stop);
                }
            }
        }
        if coasting.is_none() && options.drive.is_none() {
            let (command, _) = profile.command_at(t);
            let delta = if t == t_start {
                command - start_speed_rad_s
            } else {
                profile
                    .step_at(t)
                    .map_or(0.0, |(before, after)| after - before)
            };
            if delta != 0.0 {
                let response = model.speed_step(&state, delta);
                state = response.state;
                observer.speed_step(t, &response);
            }
            // Snap to the command, removing the rounding of ω0 + α Δt.
            speed = command;
        }

        let law = match (coasting, options.drive) {
            (Some((t_drop, speed_drop)), Some(drive)) => ShaftLaw::Coasting {
                t_drop,
                speed_drop,
                drive,
            },
            (_, Some(drive)) => {
                let (command0, command_accel) = profile.command_at(t);
                ShaftLaw::Following {
                    t0: t,
                    command0,
                    command_accel,
                    drive,
                }
            }
            (_, None) => {
                let (speed0, accel) = profile.command_at(t);
                ShaftLaw::Commanded {
                    t0: t,
                    speed0,
                    accel,
                }
            }
        };

        let Some(next) = pending.pop() else {
            // The end: samples due at the end itself.
            let mut monitor = Monitor {
                model,
                law,
                grid: &mut grid,
                observer,
                permit: coasting.is_none(),
                failed: None,
            };
            let y = pack(&state, speed);
            while let Some(ts) = monitor.grid.next_until(t) {
                monitor.sample(ts.min(t), &y);
                monitor.grid.index += 1;
            }
            break;
        };

        let system = Interval { model, law };
        let mut method = ExplicitRungeKutta::dopri5()
            .rtol(rtol)
            .atol(atol)
            // The solver refuses a first step longer than the interval.
            .h0(next_h.min(next - t))
            .max_steps(MAX_STEPS_PER_INTERVAL);
        let mut monitor = Monitor {
            model,
            law,
            grid: &mut grid,
            observer,
            permit: coasting.is_none(),
            failed: None,
        };
        let y0 = pack(&state, speed);
        let solution = solve_ode(&mut method, &system, t, next, &y0, &mut monitor);
        if let Some(time_s) = monitor.failed {
            return Err(SimError::Solver {
                time_s,
                reason: "dense output outside the step",
            });
        }
        let solution = solution.map_err(solver_error)?;
        stats.accepted_steps += solution.steps.accepted;
        stats.rejected_steps += solution.steps.rejected;
        stats.evaluations += solution.evals.function;
        stats.intervals += 1;
        let h = OrdinaryNumericalMethod::<f64, Y>::h(&method);
        next_h = if h.is_finite() && h > 0.0 { h } else { 0.0 };
        let y = *OrdinaryNumericalMethod::<f64, Y>::y(&method);
        let raw = unpack(&y);
        stats.max_constraint_error = stats.max_constraint_error.max(raw.constraint_error());
        state = raw.projected(suspension);
        speed = law.shaft(next, y[6]).speed_rad_s;
        t = next;
    }
    stats.final_state = state;
    stats.final_speed_rad_s = speed;
    Ok(stats)
}

fn solver_error(e: SolverError<f64, Y>) -> SimError {
    let (time_s, reason) = match e {
        SolverError::MaxSteps { t, .. } => (t, "too many steps in one interval"),
        SolverError::StepSize { t, .. } => (t, "step size underflow"),
        SolverError::Stiffness { t, .. } => (
            t,
            "the equations became stiff (is the drive lag very short?)",
        ),
        SolverError::BadInput { .. } => (f64::NAN, "bad input to the solver"),
        _ => (f64::NAN, "solver failure"),
    };
    SimError::Solver { time_s, reason }
}
