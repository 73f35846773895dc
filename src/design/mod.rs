//! Swing-free speed profiles: a speed change shaped so that the seats arrive
//! at their new steady angle and stay there, for every effective length in a
//! tolerance band (host only, feature `std`, f64).
//!
//! * [`shape`]: the profile, an acceleration B-spline whose limits are linear
//!   constraints.
//! * [`mod@swing`]: the end state of the seats, fixed-step RK4 on the
//!   simulator's equations.
//! * [`qp`]: the constrained steps, quadratic programs solved by Clarabel.
//! * [`compare`]: the profiles the design is compared with (time-optimal
//!   jerk-limited ramp, cubic ramps) and a band check in the simulator.
//! * [`table`]: the designed profile as a firmware table (byte format in
//!   `docs/swing_free.md`), played by [`crate::player::ProfilePlayer`].
//! * [`plot`]: SVG comparison of designed and time-optimal profiles.
//!
//! # Method
//! The design variables are the free control points of the acceleration
//! spline. The objective is the sum of squares, over the members of the
//! tolerance band (effective lengths across the band, optionally with light
//! damping), of each member's end-state offset from rest in its steady
//! direction. A Levenberg–Marquardt iteration (Madsen, Nielsen & Tingleff,
//! *Methods for Non-Linear Least Squares Problems*, 2004) takes each step from
//! a quadratic program — the damped Gauss–Newton model under the linear limit
//! constraints — so every iterate keeps the limits. The design is then
//! sampled into the table and checked in the adaptive simulator
//! ([`fn@crate::sim::replay`]) on a finer set of lengths; the figures reported are
//! those of the check, not of the optimiser.
//!
//! # Convergence and failure
//! The iteration stops when the worst member is below
//! [`DesignOptions::stop_deg`], when a step no longer lowers the objective by
//! 1e-6 of itself, or after [`DesignOptions::max_iterations`]. A duration for
//! which the limits cannot take the speed from start to end (shorter than a
//! jerk-limited ramp within the spline's convex-hull bounds) is
//! [`DesignError::Infeasible`]. "Shortest" searches durations by bisection
//! between the first duration that meets the residual target and the longest
//! one that did not; if none up to [`DesignOptions::max_duration_s`] meets it,
//! the answer is [`DesignError::TargetNotMet`] with the best residual found.
//!
//! This is an engineering tool for test benches and commissioning: a designed
//! table is a request to the drive controller, which still passes the
//! interlock's clamp and ramp; it is not a safety function.

pub mod compare;
pub mod plot;
pub mod qp;
pub mod shape;
pub mod swing;
pub mod table;

use std::fmt;

use crate::error::ParamError;
use crate::ride_file::RideLimits;
use crate::sim::dynamics::{LinkState, SeatDynamics};
use crate::sim::profile::ProfileStats;
use crate::sim::{check_f64, SimError};

use qp::{Constraints, QpFailure};
use shape::AccelSpline;
use swing::BandMember;

/// Largest accepted duration of a designed profile, s.
pub const MAX_DURATION_S: f64 = 600.0;

/// How long the designed change may last.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DurationChoice {
    /// Exactly this long, s (rounded up to the table period).
    Fixed(f64),
    /// The shortest duration (to the table period) whose check meets the
    /// residual target.
    Shortest,
}

/// Settings of the designer. Defaults: 48 free control points, ±5 % band in
/// 5 members, 0.2° target, 0.05 s table period.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
pub struct DesignOptions {
    /// Free control points of the acceleration spline, 4 to 60.
    pub free_points: usize,
    /// Effective lengths of the band, m (lowest, highest); `None`: the nominal
    /// length ±[`DesignOptions::band_fraction`].
    pub length_band_m: Option<(f64, f64)>,
    /// Half-width of the default band as a fraction of the length, 0 to 0.3.
    pub band_fraction: f64,
    /// Lengths across the band the optimiser uses, 1 to 15.
    pub band_samples: usize,
    /// Lengths across the band the check uses, 1 to 101.
    pub check_samples: usize,
    /// Light damping, 1/s: when given, every length is also optimised (and
    /// checked) with this damping besides the ride's own.
    pub extra_damping_per_s: Option<f64>,
    /// Residual swing the design must meet, degrees, in (0, 10].
    pub residual_target_deg: f64,
    /// The optimiser stops once every member is below this, degrees.
    pub stop_deg: f64,
    /// Table (and check) sampling period, s, in [0.001, 1].
    pub table_period_s: f64,
    /// Most Levenberg–Marquardt iterations per duration.
    pub max_iterations: usize,
    /// Settling window of the check, s.
    pub settle_s: f64,
    /// Longest duration "shortest" may try, s.
    pub max_duration_s: f64,
}

impl Default for DesignOptions {
    fn default() -> Self {
        Self {
            free_points: 48,
            length_band_m: None,
            band_fraction: 0.05,
            band_samples: 5,
            check_samples: 11,
            extra_damping_per_s: None,
            residual_target_deg: 0.2,
            stop_deg: 0.02,
            table_period_s: 0.05,
            max_iterations: 40,
            settle_s: 60.0,
            max_duration_s: 180.0,
        }
    }
}

/// Relative margins kept inside the limits while optimising, so that the f32
/// table (speeds rounded to 24 bits) still keeps them when checked:
/// acceleration and deceleration, jerk.
const ACCEL_MARGIN: f64 = 0.005;
const JERK_MARGIN: f64 = 0.02;

/// Speed-bound samples per span (no overshoot past the end speed, no reversal).
const SPEED_CHECKS_PER_SPAN: usize = 4;

/// A designed speed change and its check in the simulator.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// Start speed, rad/s.
    pub from_speed_rad_s: f64,
    /// End speed, rad/s.
    pub to_speed_rad_s: f64,
    /// Duration, s.
    pub duration_s: f64,
    /// The profile.
    pub spline: AccelSpline,
    /// Table period, s.
    pub table_period_s: f64,
    /// The table's samples (time s, speed rad/s as stored in f32).
    pub samples: Vec<(f64, f64)>,
    /// Figures of the sampled profile (acceleration, jerk estimate).
    pub stats: ProfileStats,
    /// `true` when the sampled profile keeps the limits.
    pub limits_ok: bool,
    /// The check, one entry per band member.
    pub checks: Vec<compare::BandCheck>,
    /// Worst residual swing of the check, degrees.
    pub residual_swing_deg: f64,
    /// Worst peak angle from vertical of the check, degrees (the longest
    /// length of the band has the largest steady angle at a given speed).
    pub peak_angle_deg: f64,
    /// Worst overshoot of the check: peak angle past each member's own steady
    /// angle at the profile's top speed, degrees.
    pub overshoot_deg: f64,
    /// Steady angle at the larger of start and end speed (nominal), degrees.
    pub steady_angle_deg: f64,
    /// The residual target, degrees.
    pub residual_target_deg: f64,
    /// `residual_swing_deg ≤ residual_target_deg` and the limits kept.
    pub meets_target: bool,
    /// Optimiser figures.
    pub optimiser: OptimiserReport,
}

/// What the optimiser did.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct OptimiserReport {
    /// Levenberg–Marquardt iterations (last duration).
    pub iterations: usize,
    /// Worst member's end-state residual as the optimiser saw it, degrees.
    pub model_residual_deg: f64,
    /// Durations tried (1 for a fixed duration).
    pub durations_tried: usize,
    /// Runs of the seat model (all durations).
    pub model_runs: usize,
}

/// Why no profile was designed.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum DesignError {
    /// An input is out of range.
    Param(ParamError),
    /// No profile of this duration within the limits reaches the end speed.
    Infeasible {
        /// The duration, s.
        duration_s: f64,
    },
    /// No profile within the limits up to the longest duration tried meets
    /// the residual target.
    TargetNotMet {
        /// Longest duration tried, s.
        longest_s: f64,
        /// Best residual swing found, degrees.
        best_residual_deg: f64,
        /// The target, degrees.
        target_deg: f64,
    },
    /// The check in the simulator failed.
    Sim(SimError),
    /// The quadratic-program solver stopped without an answer.
    Solver,
}

impl fmt::Display for DesignError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Param(e) => write!(f, "{e}"),
            Self::Infeasible { duration_s } => write!(
                f,
                "no profile of {duration_s:.2} s within the acceleration, deceleration and jerk limits reaches the end speed"
            ),
            Self::TargetNotMet {
                longest_s,
                best_residual_deg,
                target_deg,
            } => write!(
                f,
                "no profile within the limits up to {longest_s:.1} s meets the residual target of {target_deg}° (best {best_residual_deg:.3}°)"
            ),
            Self::Sim(e) => write!(f, "check in the simulator failed: {e}"),
            Self::Solver => write!(f, "the quadratic-program solver stopped without an answer"),
        }
    }
}

impl std::error::Error for DesignError {}

impl From<ParamError> for DesignError {
    fn from(e: ParamError) -> Self {
        Self::Param(e)
    }
}

impl From<SimError> for DesignError {
    fn from(e: SimError) -> Self {
        Self::Sim(e)
    }
}

/// One speed change to design.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DesignRequest {
    /// The nominal seat (geometry and the ride's damping).
    pub seat: SeatDynamics,
    /// The ride's limits.
    pub limits: RideLimits,
    /// Start speed, rad/s, ≥ 0 (0: from rest, seats hanging still).
    pub from_speed_rad_s: f64,
    /// End speed, rad/s, ≥ 0 (0: spin-down to rest).
    pub to_speed_rad_s: f64,
    /// Duration or shortest.
    pub duration: DurationChoice,
}

/// Everything fixed for one request: band members, options.
struct Problem {
    members: Vec<BandMember>,
    check_members: Vec<SeatDynamics>,
    from: f64,
    to: f64,
    limits: RideLimits,
    options: DesignOptions,
    runs: usize,
}

fn validate(request: &DesignRequest, options: &DesignOptions) -> Result<(), ParamError> {
    let max_speed = f64::from(crate::steady::MAX_SHAFT_SPEED_RAD_S);
    check_f64(
        "from_speed_rad_s",
        request.from_speed_rad_s,
        0.0,
        max_speed,
        true,
    )?;
    check_f64(
        "to_speed_rad_s",
        request.to_speed_rad_s,
        0.0,
        max_speed,
        true,
    )?;
    if (request.from_speed_rad_s - request.to_speed_rad_s).abs() < 1e-9 {
        return Err(ParamError::OutOfRange("to_speed_rad_s"));
    }
    if let DurationChoice::Fixed(d) = request.duration {
        check_f64("duration_s", d, 0.0, MAX_DURATION_S, false)?;
    }
    let l = request.limits;
    check_f64("max_accel_rad_s2", l.max_accel_rad_s2, 0.0, 10.0, false)?;
    check_f64("max_decel_rad_s2", l.max_decel_rad_s2, 0.0, 10.0, false)?;
    check_f64("max_jerk_rad_s3", l.max_jerk_rad_s3, 0.0, 100.0, false)?;
    if !(4..=60).contains(&options.free_points) {
        return Err(ParamError::OutOfRange("free_points"));
    }
    check_f64("band_fraction", options.band_fraction, 0.0, 0.3, true)?;
    if let Some((lo, hi)) = options.length_band_m {
        check_f64("length_band_m", lo, 0.0, 100.0, false)?;
        check_f64("length_band_m", hi, lo, 100.0, false)?;
    }
    if !(1..=15).contains(&options.band_samples) {
        return Err(ParamError::OutOfRange("band_samples"));
    }
    if !(1..=101).contains(&options.check_samples) {
        return Err(ParamError::OutOfRange("check_samples"));
    }
    if let Some(c) = options.extra_damping_per_s {
        check_f64("extra_damping_per_s", c, 0.0, 10.0, false)?;
    }
    check_f64(
        "residual_target_deg",
        options.residual_target_deg,
        0.0,
        10.0,
        false,
    )?;
    check_f64("stop_deg", options.stop_deg, 0.0, 10.0, false)?;
    check_f64("table_period_s", options.table_period_s, 0.001, 1.0, false)?;
    if !(1..=500).contains(&options.max_iterations) {
        return Err(ParamError::OutOfRange("max_iterations"));
    }
    check_f64("settle_s", options.settle_s, 0.0, 3600.0, true)?;
    check_f64(
        "max_duration_s",
        options.max_duration_s,
        0.0,
        MAX_DURATION_S,
        false,
    )?;
    Ok(())
}

/// Effective lengths spread evenly over `[lo, hi]` (`count` of them).
fn spread(lo: f64, hi: f64, count: usize) -> Vec<f64> {
    if count <= 1 || hi <= lo {
        return vec![0.5 * (lo + hi)];
    }
    (0..count)
        .map(|i| lo + (hi - lo) * i as f64 / (count - 1) as f64)
        .collect()
}

/// The seats of the band: every length with the ride's damping, and with the
/// extra damping if asked.
fn band_seats(
    seat: &SeatDynamics,
    options: &DesignOptions,
    count: usize,
) -> Result<Vec<SeatDynamics>, ParamError> {
    let l = seat.length_m();
    let (lo, hi) = options.length_band_m.unwrap_or((
        (1.0 - options.band_fraction) * l,
        (1.0 + options.band_fraction) * l,
    ));
    let mut seats = Vec::new();
    for length in spread(lo, hi, count) {
        let s = SeatDynamics::new(
            seat.hub_offset_m(),
            length,
            seat.suspension(),
            seat.gravity_mps2(),
        )?
        .with_damping(seat.damping_per_s())?;
        seats.push(s);
        if let Some(c) = options.extra_damping_per_s {
            seats.push(s.with_damping(c)?);
        }
    }
    Ok(seats)
}

fn start_state(seat: &SeatDynamics, speed: f64) -> LinkState {
    if speed == 0.0 {
        LinkState::HANGING
    } else {
        seat.steady_state(speed)
    }
}

impl Problem {
    fn new(request: &DesignRequest, options: &DesignOptions) -> Result<Self, DesignError> {
        validate(request, options)?;
        let from = request.from_speed_rad_s;
        let to = request.to_speed_rad_s;
        let members = band_seats(&request.seat, options, options.band_samples)?
            .into_iter()
            .map(|seat| {
                let phi = seat.steady_angle_rad(to);
                let (slow, _) = seat.steady_reference().swing_modes(phi);
                let at_rest = (seat.gravity_mps2() / seat.length_m()).sqrt();
                BandMember {
                    seat,
                    target_direction: seat.steady_state(to).direction(),
                    rate_scale_rad_s: slow.max(0.1 * at_rest),
                    start: start_state(&seat, from),
                }
            })
            .collect();
        let check_members = band_seats(&request.seat, options, options.check_samples)?;
        Ok(Self {
            members,
            check_members,
            from,
            to,
            limits: request.limits,
            options: *options,
            runs: 0,
        })
    }

    fn free(&self) -> usize {
        self.options.free_points
    }

    fn spans(&self) -> usize {
        AccelSpline::spans_for(self.free())
    }

    /// Residuals of all members for the free points `x` at duration `t`.
    fn residuals(
        &mut self,
        t: f64,
        x: &[f64],
        knots: Option<&mut Vec<Vec<LinkState>>>,
    ) -> Vec<f64> {
        let spline = AccelSpline::new(self.from, t, x);
        let mut r = Vec::with_capacity(6 * self.members.len());
        let spans = self.spans();
        let mut knots = knots;
        for (m, member) in self.members.iter().enumerate() {
            let mut store = knots.as_deref_mut().and_then(|k| k.get_mut(m));
            if let Some(v) = store.as_deref_mut() {
                v.clear();
                v.resize(spans, member.start);
            }
            let end = swing::run(member, &spline, 0, member.start, store);
            r.extend(swing::residual(member, &end));
        }
        self.runs += self.members.len();
        r
    }

    /// Forward-difference Jacobian (rows: residuals, columns: variables),
    /// restarting each perturbed run at the first span the variable touches.
    fn jacobian(
        &mut self,
        t: f64,
        x: &[f64],
        r: &[f64],
        knots: &[Vec<LinkState>],
    ) -> Vec<Vec<f64>> {
        let n = x.len();
        let scale = self
            .limits
            .max_accel_rad_s2
            .max(self.limits.max_decel_rad_s2);
        let step = 1e-6 * scale;
        let mut jac = vec![vec![0.0; n]; r.len()];
        for k in 0..n {
            let mut xp = x.to_vec();
            if let Some(v) = xp.get_mut(k) {
                *v += step;
            }
            let spline = AccelSpline::new(self.from, t, &xp);
            for (m, member) in self.members.iter().enumerate() {
                let from = knots
                    .get(m)
                    .and_then(|v| v.get(k))
                    .copied()
                    .unwrap_or(member.start);
                let end = swing::run(member, &spline, k, from, None);
                for (i, value) in swing::residual(member, &end).iter().enumerate() {
                    let row = 6 * m + i;
                    if let (Some(jrow), Some(r0)) = (jac.get_mut(row), r.get(row)) {
                        if let Some(cell) = jrow.get_mut(k) {
                            *cell = (value - r0) / step;
                        }
                    }
                }
            }
            self.runs += self.members.len();
        }
        jac
    }

    /// The limit constraints `G x ≤ g`, `E x = e` on the free points at duration `t`.
    fn constraints(&self, t: f64) -> Constraints {
        let n = self.free();
        let spans = self.spans();
        let h = t / spans as f64;
        let l = self.limits;
        let a = l.max_accel_rad_s2 * (1.0 - ACCEL_MARGIN);
        let d = l.max_decel_rad_s2 * (1.0 - ACCEL_MARGIN);
        let jh = l.max_jerk_rad_s3 * (1.0 - JERK_MARGIN) * h;
        let mut c = Constraints {
            eq_rows: vec![vec![1.0; n]],
            eq_rhs: vec![(self.to - self.from) / h],
            ..Constraints::default()
        };
        let unit = |k: usize, v: f64| {
            let mut row = vec![0.0; n];
            if let Some(cell) = row.get_mut(k) {
                *cell = v;
            }
            row
        };
        for k in 0..n {
            c.le_rows.push(unit(k, 1.0));
            c.le_rhs.push(a);
            c.le_rows.push(unit(k, -1.0));
            c.le_rhs.push(d);
        }
        // Jerk: differences of neighbouring control points, the fixed zeros included.
        for m in 0..=n {
            let mut row = vec![0.0; n];
            if let Some(cell) = row.get_mut(m) {
                *cell = 1.0;
            }
            if m > 0 {
                if let Some(cell) = row.get_mut(m - 1) {
                    *cell = -1.0;
                }
            }
            c.le_rows.push(row.clone());
            c.le_rhs.push(jh);
            c.le_rows.push(row.iter().map(|v| -v).collect());
            c.le_rhs.push(jh);
        }
        // Speed between the start and end speeds: no overshoot of the target
        // angle, no reversal.
        let (lo, hi) = (self.from.min(self.to), self.from.max(self.to));
        let probe = AccelSpline::new(self.from, t, &vec![0.0; n]);
        for s in 1..spans * SPEED_CHECKS_PER_SPAN {
            let ts = t * s as f64 / (spans * SPEED_CHECKS_PER_SPAN) as f64;
            let g = probe.speed_gradient(ts);
            c.le_rows.push(g.clone());
            c.le_rhs.push(hi - self.from);
            c.le_rows.push(g.iter().map(|v| -v).collect());
            c.le_rhs.push(self.from - lo);
        }
        c
    }

    /// The feasible point nearest to `reference` (least squares).
    fn nearest_feasible(&self, t: f64, reference: &[f64]) -> Result<Vec<f64>, DesignError> {
        let n = reference.len();
        let p: Vec<Vec<f64>> = (0..n)
            .map(|i| (0..n).map(|j| if i == j { 1.0 } else { 0.0 }).collect())
            .collect();
        let q: Vec<f64> = reference.iter().map(|v| -v).collect();
        qp::solve(&p, &q, &self.constraints(t)).map_err(|e| match e {
            QpFailure::Infeasible => DesignError::Infeasible { duration_s: t },
            QpFailure::NoSolution => DesignError::Solver,
        })
    }

    /// A smooth first guess: a sine bump of acceleration that reaches the end speed.
    fn first_guess(&self, t: f64) -> Vec<f64> {
        let n = self.free();
        let h = t / self.spans() as f64;
        let bump: Vec<f64> = (0..n)
            .map(|k| (core::f64::consts::PI * (k + 1) as f64 / (n + 1) as f64).sin())
            .collect();
        let sum: f64 = bump.iter().sum();
        let total = (self.to - self.from) / h;
        bump.iter().map(|b| b * total / sum).collect()
    }

    fn worst_member_deg(&self, r: &[f64]) -> f64 {
        r.chunks(6)
            .map(|c| c.iter().map(|v| v * v).sum::<f64>().sqrt())
            .fold(0.0, f64::max)
    }

    /// Levenberg–Marquardt under the limit constraints, from `x0` (feasible).
    fn optimise(
        &mut self,
        t: f64,
        x0: Vec<f64>,
    ) -> Result<(Vec<f64>, OptimiserReport), DesignError> {
        let n = x0.len();
        let mut x = x0;
        let mut knots: Vec<Vec<LinkState>> = vec![Vec::new(); self.members.len()];
        let mut r = self.residuals(t, &x, Some(&mut knots));
        let mut cost: f64 = r.iter().map(|v| v * v).sum();
        let mut lambda = 1e-3;
        let constraints = self.constraints(t);
        let mut iterations = 0;
        for _ in 0..self.options.max_iterations {
            if self.worst_member_deg(&r) < self.options.stop_deg {
                break;
            }
            iterations += 1;
            let jac = self.jacobian(t, &x, &r, &knots);
            // Normal equations JᵀJ and Jᵀr.
            let mut jtj = vec![vec![0.0; n]; n];
            let mut jtr = vec![0.0; n];
            for (row, ri) in jac.iter().zip(&r) {
                for (i, a) in row.iter().enumerate() {
                    if let Some(g) = jtr.get_mut(i) {
                        *g += a * ri;
                    }
                    if let Some(jrow) = jtj.get_mut(i) {
                        for (cell, b) in jrow.iter_mut().zip(row) {
                            *cell += a * b;
                        }
                    }
                }
            }
            let diag_max = (0..n)
                .map(|i| {
                    jtj.get(i)
                        .and_then(|row| row.get(i))
                        .copied()
                        .unwrap_or(0.0)
                })
                .fold(0.0, f64::max)
                .max(f64::MIN_POSITIVE);
            // Constraints on the step δ: G (x + δ) ≤ g, E (x + δ) = e.
            let shift = |rows: &[Vec<f64>], rhs: &[f64]| -> Vec<f64> {
                rows.iter()
                    .zip(rhs)
                    .map(|(row, b)| b - row.iter().zip(&x).map(|(g, xi)| g * xi).sum::<f64>())
                    .collect()
            };
            let step_constraints = Constraints {
                eq_rows: constraints.eq_rows.clone(),
                eq_rhs: shift(&constraints.eq_rows, &constraints.eq_rhs),
                le_rows: constraints.le_rows.clone(),
                le_rhs: shift(&constraints.le_rows, &constraints.le_rhs)
                    .into_iter()
                    .map(|v| v.max(0.0))
                    .collect(),
            };
            let mut accepted = false;
            let mut improvement = 0.0;
            // At most 12 increases of the damping per iteration.
            for _ in 0..12 {
                let mut p = jtj.clone();
                for (i, row) in p.iter_mut().enumerate() {
                    if let Some(cell) = row.get_mut(i) {
                        *cell += lambda * (*cell + 1e-9 * diag_max);
                    }
                }
                let delta = match qp::solve(&p, &jtr, &step_constraints) {
                    Ok(d) => d,
                    Err(_) => {
                        lambda *= 4.0;
                        continue;
                    }
                };
                let trial: Vec<f64> = x.iter().zip(&delta).map(|(a, b)| a + b).collect();
                let mut trial_knots: Vec<Vec<LinkState>> = vec![Vec::new(); self.members.len()];
                let rt = self.residuals(t, &trial, Some(&mut trial_knots));
                let ct: f64 = rt.iter().map(|v| v * v).sum();
                if ct < cost {
                    improvement = (cost - ct) / cost.max(f64::MIN_POSITIVE);
                    x = trial;
                    r = rt;
                    cost = ct;
                    knots = trial_knots;
                    lambda = (lambda / 3.0).max(1e-9);
                    accepted = true;
                    break;
                }
                lambda *= 4.0;
            }
            if !accepted || improvement < 1e-6 {
                break;
            }
        }
        let report = OptimiserReport {
            iterations,
            model_residual_deg: self.worst_member_deg(&r),
            durations_tried: 1,
            model_runs: self.runs,
        };
        Ok((x, report))
    }

    /// Designs at duration `t` from a reference shape, then checks it.
    fn design_at(&mut self, t: f64, reference: Option<&[f64]>) -> Result<Design, DesignError> {
        let guess = match reference {
            Some(r) => r.to_vec(),
            None => self.first_guess(t),
        };
        let x0 = self.nearest_feasible(t, &guess)?;
        let (x, report) = self.optimise(t, x0)?;
        let spline = AccelSpline::new(self.from, t, &x);
        self.check(spline, report)
    }

    fn check(
        &self,
        spline: AccelSpline,
        optimiser: OptimiserReport,
    ) -> Result<Design, DesignError> {
        let period = self.options.table_period_s;
        let samples = compare::sample_spline(&spline, period, self.to);
        let profile = compare::to_profile(&samples)?;
        let stats = profile.stats();
        let limits_ok = self.limits.check(&stats).ok;
        let checks = compare::check_band(&self.check_members, &profile, self.options.settle_s)?;
        let residual = checks
            .iter()
            .map(|c| c.residual_swing_deg)
            .fold(0.0, f64::max);
        let overshoot_deg = compare::worst_overshoot(&checks);
        let peak = checks.iter().map(|c| c.peak_angle_deg).fold(0.0, f64::max);
        let nominal = self
            .check_members
            .get(self.check_members.len() / 2)
            .copied();
        let steady = nominal.map_or(0.0, |s| {
            s.steady_angle_rad(self.from.max(self.to)).to_degrees()
        });
        Ok(Design {
            from_speed_rad_s: self.from,
            to_speed_rad_s: self.to,
            duration_s: spline.duration_s(),
            spline,
            table_period_s: period,
            samples,
            stats,
            limits_ok,
            checks,
            residual_swing_deg: residual,
            peak_angle_deg: peak,
            overshoot_deg,
            steady_angle_deg: steady,
            residual_target_deg: self.options.residual_target_deg,
            meets_target: limits_ok && residual <= self.options.residual_target_deg,
            optimiser,
        })
    }

    /// Rounds a duration up to the table period.
    fn on_grid(&self, t: f64) -> f64 {
        let p = self.options.table_period_s;
        (t / p - 1e-9).ceil().max(1.0) * p
    }
}

/// Share of the swing governor's admitted-target rate that a table designed
/// to pass the governor may use for its acceleration (see
/// [`limits_for_governor`]).
pub const GOVERNOR_RATE_SHARE: f64 = 0.45;

/// The limits within which a designed table passes the swing governor
/// unaltered, as far as the governor's explicit rate goes: the ride's limits
/// with the acceleration and deceleration capped at
/// [`GOVERNOR_RATE_SHARE`] × `target_rate_rad_s2` (the governor's
/// `target_rate_rad_s2`) and the jerk at the interlock ramp's
/// `ramp_jerk_rad_s3`.
///
/// Why the share: the ride program plays a table ahead of itself by
/// a·|a|/(2j) (j the ramp's jerk) so that the ramp's output follows it; the
/// request then changes at a·(1 + |da/dt|/j) ≤ 2a while the table's jerk is
/// at most j. With a ≤ 0.45 × rate the request moves at most 0.9 × rate, so
/// each of the governor's decisions can admit it as it is (one decision moves
/// the admitted target by up to rate × period), with a tenth left for
/// rounding. Hand calculation, common practice.
///
/// The governor's certificate (the swing room at each speed) is the other
/// half of passing unaltered; a slow table leaves little swing, and the
/// ride-cycle simulation reports, step by step, any time the interlock spent
/// limiting (`swingdrive cycle`, [`crate::sim::cycle`]).
#[must_use]
pub fn limits_for_governor(
    limits: &RideLimits,
    target_rate_rad_s2: f64,
    ramp_jerk_rad_s3: f64,
) -> RideLimits {
    let cap = GOVERNOR_RATE_SHARE * target_rate_rad_s2;
    RideLimits {
        max_accel_rad_s2: limits.max_accel_rad_s2.min(cap),
        max_decel_rad_s2: limits.max_decel_rad_s2.min(cap),
        max_jerk_rad_s3: limits.max_jerk_rad_s3.min(ramp_jerk_rad_s3),
    }
}

/// The shortest jerk-limited duration of the speed change (time-optimal
/// ramp, Biagiotti & Melchiorri 2008, §3.4), s.
#[must_use]
pub fn time_optimal_duration_s(limits: &RideLimits, from: f64, to: f64) -> f64 {
    let a = if to > from {
        limits.max_accel_rad_s2
    } else {
        limits.max_decel_rad_s2
    };
    crate::reference::ramp::rest_to_rest_duration((to - from).abs(), a, limits.max_jerk_rad_s3)
}

/// The duration bound of the swing-free targets: the longer of 1.5 × the slow
/// swing-mode period at the higher of the two speeds and 2 × the time-optimal
/// ramp's duration, s.
#[must_use]
pub fn target_duration_bound_s(
    seat: &SeatDynamics,
    limits: &RideLimits,
    from: f64,
    to: f64,
) -> f64 {
    let phi = seat.steady_angle_rad(from.max(to));
    let (slow, _) = seat.steady_reference().swing_modes(phi);
    let period = if slow > 0.0 {
        core::f64::consts::TAU / slow
    } else {
        0.0
    };
    (1.5 * period).max(2.0 * time_optimal_duration_s(limits, from, to))
}

/// Designs a swing-free speed change.
///
/// # Errors
/// [`DesignError::Param`] naming a bad input; [`DesignError::Infeasible`] for
/// a fixed duration the limits cannot fill; [`DesignError::TargetNotMet`]
/// when no duration up to [`DesignOptions::max_duration_s`] meets the target
/// ("shortest"); [`DesignError::Sim`] or [`DesignError::Solver`] when a tool
/// underneath fails. A fixed duration whose check misses the target is
/// returned with [`Design::meets_target`] `false`.
pub fn design(request: &DesignRequest, options: &DesignOptions) -> Result<Design, DesignError> {
    let mut problem = Problem::new(request, options)?;
    match request.duration {
        DurationChoice::Fixed(t) => {
            let t = problem.on_grid(t);
            problem.design_at(t, None)
        }
        DurationChoice::Shortest => shortest(&mut problem),
    }
}

fn rescaled(x: &[f64], from_t: f64, to_t: f64) -> Vec<f64> {
    x.iter().map(|v| v * from_t / to_t).collect()
}

fn shortest(problem: &mut Problem) -> Result<Design, DesignError> {
    let opts = problem.options;
    let seat = problem
        .check_members
        .get(problem.check_members.len() / 2)
        .copied();
    let bound = seat.map_or(10.0, |s| {
        target_duration_bound_s(&s, &problem.limits, problem.from, problem.to)
    });
    let t_min = time_optimal_duration_s(&problem.limits, problem.from, problem.to);
    let mut tried = 0;
    let mut best_fail: Option<(f64, f64)> = None; // (duration, residual)
    let mut lower = t_min; // longest known failure (or infeasible)
    let mut success: Option<Design> = None;
    // Upward search from the target bound: at most 12 probes, ×1.25 each.
    let mut t = problem.on_grid(bound.min(opts.max_duration_s));
    for _ in 0..12 {
        tried += 1;
        match problem.design_at(t, None) {
            Ok(d) if d.meets_target => {
                success = Some(d);
                break;
            }
            Ok(d) => {
                if best_fail.is_none_or(|(_, r)| d.residual_swing_deg < r) {
                    best_fail = Some((t, d.residual_swing_deg));
                }
                lower = t;
            }
            Err(DesignError::Infeasible { .. }) => lower = t,
            Err(e) => return Err(e),
        }
        if t >= opts.max_duration_s {
            break;
        }
        t = problem.on_grid((t * 1.25).min(opts.max_duration_s));
    }
    let Some(mut best) = success else {
        return Err(DesignError::TargetNotMet {
            longest_s: t,
            best_residual_deg: best_fail.map_or(f64::INFINITY, |(_, r)| r),
            target_deg: opts.residual_target_deg,
        });
    };
    // Bisection down to the table period (at most 40 halvings).
    let mut upper = best.duration_s;
    for _ in 0..40 {
        if upper - lower <= 2.0 * opts.table_period_s.max(0.05) {
            break;
        }
        let mid = problem.on_grid(0.5 * (lower + upper));
        if mid >= upper || mid <= lower {
            break;
        }
        tried += 1;
        let reference = rescaled(best.spline.free(), best.duration_s, mid);
        match problem.design_at(mid, Some(&reference)) {
            Ok(d) if d.meets_target => {
                upper = mid;
                best = d;
            }
            Ok(_) | Err(DesignError::Infeasible { .. }) => lower = mid,
            Err(e) => return Err(e),
        }
    }
    best.optimiser.durations_tried = tried;
    best.optimiser.model_runs = problem.runs;
    Ok(best)
}
