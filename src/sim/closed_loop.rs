//! The controller in the loop: the interlock (with its governor, and a ride
//! program when there is one) commands the drive model tick by tick, reads
//! back the shaft speed through simulated sensors (with faults injected on
//! request), and the seat is then simulated on the shaft speed that resulted.
//!
//! The shaft does not feel the seats (a top's inertia dwarfs a seat's
//! reaction), so the loop is closed through the drive and the sensors only:
//! controller and drive run first, at the control tick, in f64; the seat
//! simulation ([`simulate`]) then replays the shaft's speed exactly as it
//! turned. A swing-angle sensor, which would close the loop through the seat,
//! is not simulated here.

use crate::interlock::{InterlockState, Sample, TickInputs, TickOutput};
use crate::program::CycleState;

use super::drive::DriveModel;
use super::dynamics::{LinkState, SeatDynamics};
use super::engine::{simulate, Observation, SimError, SimOptions};
use super::profile::SpeedProfile;

/// A fault of the speed sensors, injected from a time on.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum SensorFault {
    /// The primary channel keeps reporting the value it had (its driver still
    /// delivers samples: a frozen encoder count, not a dead one).
    FreezePrimary,
    /// The primary channel stops delivering samples (stale).
    SilencePrimary,
    /// The primary channel reads this many rad/s too high.
    OffsetPrimary(f64),
}

/// How the loop is set up.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoopSetup {
    /// Control tick, s.
    pub tick_s: f64,
    /// The drive.
    pub drive: DriveModel,
    /// Whether a second speed channel is fitted (it reads the true speed).
    pub second_channel: bool,
    /// A sensor fault and the time it starts, s.
    pub fault: Option<(f64, SensorFault)>,
    /// Time at which the operator resets a latched trip (a one-tick pulse), s.
    pub reset_at_s: Option<f64>,
    /// Longest simulated time, s.
    pub max_time_s: f64,
}

/// One control tick of the loop.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoopSample {
    /// Time at the end of the tick, s.
    pub time_s: f64,
    /// Speed asked for, rad/s (before the interlock).
    pub request_rad_s: f64,
    /// Speed commanded to the drive by the interlock's ramp, rad/s.
    pub command_rad_s: f64,
    /// True shaft speed, rad/s.
    pub shaft_rad_s: f64,
    /// What the primary speed channel reported, rad/s.
    pub measured_rad_s: f64,
    /// Run permit.
    pub permit: bool,
    /// Brake applied.
    pub brake: bool,
    /// The interlock's state after the tick.
    pub state: InterlockState,
    /// The program step (0 when there is no program).
    pub step: usize,
    /// The program's state ([`CycleState::Running`] when there is no program).
    pub cycle: CycleState,
}

/// What the controller hands back each tick.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ControllerTick {
    /// The request it passed to the interlock, rad/s.
    pub request_rad_s: f32,
    /// The interlock's output.
    pub output: TickOutput,
    /// The program step.
    pub step: usize,
    /// The program's state.
    pub cycle: CycleState,
}

/// Runs the controller (a closure around the interlock, called once per tick
/// with the sensor inputs, the time and the tick period) against the drive
/// model until `until` says stop or `max_time_s` is reached.
///
/// The drive follows the command while the permit is given (first-order lag
/// with a torque limit, integrated exactly over the tick for the lag) and
/// coasts when it is removed.
pub fn run_loop<C, U>(setup: &LoopSetup, mut controller: C, mut until: U) -> Vec<LoopSample>
where
    C: FnMut(&TickInputs, f64, f32) -> ControllerTick,
    U: FnMut(&LoopSample) -> bool,
{
    let dt = setup.tick_s;
    let mut shaft = 0.0_f64;
    let mut coast: Option<(f64, f64)> = None; // (time of drop, speed at drop)
    let mut sequence = 0_u8;
    let mut frozen: Option<f64> = None;
    let mut trace = Vec::new();
    let steps = (setup.max_time_s / dt).ceil().max(0.0);
    // Bounded by max_time_s / tick_s ticks.
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    for k in 0..steps as u64 {
        #[allow(clippy::cast_precision_loss)]
        let t = (k as f64) * dt;
        sequence = sequence.wrapping_add(1);
        let fault = setup.fault.filter(|(start, _)| t >= *start).map(|(_, f)| f);
        let (primary, primary_seq) = match fault {
            Some(SensorFault::FreezePrimary) => (*frozen.get_or_insert(shaft), sequence),
            Some(SensorFault::SilencePrimary) => (*frozen.get_or_insert(shaft), 0),
            Some(SensorFault::OffsetPrimary(d)) => (shaft + d, sequence),
            None => (shaft, sequence),
        };
        let reset = setup.reset_at_s.is_some_and(|r| t >= r && t < r + dt * 1.5);
        #[allow(clippy::cast_possible_truncation)]
        let inputs = TickInputs {
            request_rad_s: 0.0,
            speed: Sample::new(primary as f32, primary_seq),
            second_speed: if setup.second_channel {
                Sample::new(shaft as f32, sequence)
            } else {
                Sample::ABSENT
            },
            angle: Sample::ABSENT,
            run_enable: true,
            reset,
        };
        #[allow(clippy::cast_possible_truncation)]
        let tick = controller(&inputs, t, dt as f32);
        let command = f64::from(tick.output.command.speed.rad_per_s());
        // The drive over this tick.
        if tick.output.run_permit {
            coast = None;
            let a = setup.drive.following_accel(command, shaft);
            shaft += a * dt;
        } else {
            let (t_drop, w_drop) = *coast.get_or_insert((t, shaft));
            shaft = setup.drive.coast(w_drop, t + dt - t_drop).0;
        }
        let sample = LoopSample {
            time_s: t + dt,
            request_rad_s: f64::from(tick.request_rad_s),
            command_rad_s: command,
            shaft_rad_s: shaft,
            measured_rad_s: primary,
            permit: tick.output.run_permit,
            brake: tick.output.brake,
            state: tick.output.state,
            step: tick.step,
            cycle: tick.cycle,
        };
        trace.push(sample);
        if until(&sample) {
            break;
        }
    }
    trace
}

/// The seat simulated on the shaft speed of a loop trace, sampled every
/// `sample_s` (the shaft speed taken every `sample_s` as well, linear between
/// — at the control tick this is the drive's own piecewise-linear motion).
///
/// # Errors
/// [`SimError`] from the simulator (for example an empty trace).
pub fn seat_on_trace(
    seat: &SeatDynamics,
    trace: &[LoopSample],
    sample_s: f64,
) -> Result<Vec<Observation>, SimError> {
    let mut points = vec![(0.0, 0.0)];
    let mut next = sample_s;
    for s in trace {
        if s.time_s + 1e-9 >= next {
            points.push((s.time_s, s.shaft_rad_s));
            next = s.time_s + sample_s;
        }
    }
    let profile = SpeedProfile::new(&points).map_err(|_| crate::ParamError::OutOfRange("trace"))?;
    let options = SimOptions {
        sample_step_s: sample_s,
        ..SimOptions::default()
    };
    let mut out = Vec::new();
    simulate(
        seat,
        &profile,
        LinkState::HANGING,
        0.0,
        profile.end_s(),
        &options,
        &mut out,
    )?;
    Ok(out)
}

/// What one program step did to the seats.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct StepReport {
    /// Index of the step, from 0.
    pub index: usize,
    /// Start of the step, s.
    pub start_s: f64,
    /// End of the step, s.
    pub end_s: f64,
    /// Duration, s.
    pub duration_s: f64,
    /// Largest angle of the link from vertical during the step, °.
    pub peak_angle_deg: f64,
    /// Largest angle between the link and its steady direction at the
    /// step's final commanded speed, over the settling window after the step
    /// (one rest-pendulum period 2π√(L/g), cut short when the next step
    /// changes the command) — or, when the next step changes the command at
    /// once, over the last such window of the step itself while its command
    /// was already final (a hold) —, °; `None` when neither gives half a
    /// window to look at.
    pub residual_swing_deg: Option<f64>,
    /// Largest load factor during the step.
    pub peak_load_factor: f64,
    /// Time during the step the interlock was limiting the request (the
    /// ceiling or the request governor held it back), s: zero when the step's
    /// requests passed unaltered.
    pub limiting_s: f64,
}

/// Splits a loop trace and the seat simulated on it into per-step reports.
/// `seat_samples` are the observations of [`seat_on_trace`] over the same run.
#[must_use]
pub fn step_reports(
    seat: &SeatDynamics,
    trace: &[LoopSample],
    seat_samples: &[Observation],
) -> Vec<StepReport> {
    let window = std::f64::consts::TAU * (seat.length_m() / seat.gravity_mps2()).sqrt();
    let mut reports: Vec<StepReport> = Vec::new();
    let mut start = 0.0;
    let trace_end = trace.last().map_or(0.0, |s| s.time_s);
    for (i, s) in trace.iter().enumerate() {
        let last = trace.get(i + 1).is_none_or(|n| n.step != s.step);
        if !last {
            continue;
        }
        let end = s.time_s;
        let during = seat_samples
            .iter()
            .filter(|o| o.time_s >= start && o.time_s <= end);
        let (mut peak, mut load) = (0.0_f64, 0.0_f64);
        // Each tick counts with its own period (the time since the previous one).
        let mut limiting = 0.0_f64;
        let mut previous = start;
        for t in trace
            .get(..=i)
            .unwrap_or(&[])
            .iter()
            .filter(|t| t.time_s > start)
        {
            if t.state == InterlockState::Limiting {
                limiting += t.time_s - previous;
            }
            previous = t.time_s;
        }
        for o in during {
            peak = peak.max(o.state.angle_from_vertical_rad());
            load = load.max(o.link.load_factor);
        }
        // The settling window: from the end of the step while the command
        // stays at the step's final speed (the shaft follows it with the
        // drive's lag).
        let final_speed = s.command_rad_s;
        let steady = seat.steady_state(final_speed);
        let moved = trace
            .get(i + 1..)
            .unwrap_or(&[])
            .iter()
            .find(|n| n.command_rad_s != final_speed || n.time_s > end + window)
            .map_or(trace_end.min(end + window), |n| n.time_s);
        // When the next step changes the command at once (a hold followed by
        // a ramp), the step's own tail at that command is the window.
        let settled_from = trace
            .get(..=i)
            .unwrap_or(&[])
            .iter()
            .rev()
            .take_while(|p| p.command_rad_s == final_speed && p.time_s >= start)
            .last()
            .map_or(end, |p| p.time_s);
        let (from, to) = if moved - end >= 0.5 * window {
            (end, moved)
        } else {
            ((end - window).max(settled_from), end)
        };
        let residual = (to - from >= 0.5 * window).then(|| {
            seat_samples
                .iter()
                .filter(|o| o.time_s >= from && o.time_s <= to)
                .map(|o| o.state.angle_to(steady.direction()))
                .fold(0.0_f64, f64::max)
                .to_degrees()
        });
        reports.push(StepReport {
            index: s.step,
            start_s: start,
            end_s: end,
            duration_s: end - start,
            peak_angle_deg: peak.to_degrees(),
            residual_swing_deg: residual,
            peak_load_factor: load,
            limiting_s: limiting,
        });
        start = end;
    }
    reports
}
