//! Runs a [`Program`] tick by tick, always through the interlock.

use super::{CheckedStep, Program};
use crate::interlock::{Interlock, TickInputs, TickOutput};
use crate::player::ProfilePlayer;
use crate::request_governor::RequestGovernor;

/// Where the cycle stands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum CycleState {
    /// A step is under way.
    Running,
    /// A confirmation step waits for the operator's rising edge.
    WaitingForConfirmation,
    /// The last step is done (or a stop step ended the program at rest).
    Finished,
    /// The interlock tripped or faulted: the program requests zero from then
    /// on and never resumes by itself (start a new run with
    /// [`CycleRunner::new`] once the interlock has been reset).
    Aborted,
}

/// The runner's report for one tick.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CycleStatus {
    /// Index of the current step (from 0); the last step once finished.
    pub step: usize,
    /// Time left in the current step, s, where it is known: the rest of a
    /// hold or a table, the rest of the certified ramp of a ramp or stop
    /// step; `None` while waiting for the operator.
    pub time_left_s: Option<f32>,
    /// Where the cycle stands after this tick.
    pub state: CycleState,
    /// The request handed to the interlock this tick, rad/s.
    pub request_rad_s: f32,
    /// What the interlock commanded this tick.
    pub output: TickOutput,
}

/// Runs a program's steps in order.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CycleRunner<'t> {
    index: usize,
    /// Time in the current step while the run permit was given, s.
    elapsed_s: f32,
    state: CycleState,
    player: Option<ProfilePlayer<'t>>,
    request_rad_s: f32,
    confirm_before: bool,
}

impl<'t> CycleRunner<'t> {
    /// A runner at the first step of a program, requesting standstill.
    #[must_use]
    pub fn new<const S: usize>(program: &Program<'t, S>) -> Self {
        let mut runner = Self {
            index: 0,
            elapsed_s: 0.0,
            state: CycleState::Running,
            player: None,
            request_rad_s: 0.0,
            confirm_before: true,
        };
        runner.enter(program, 0);
        runner
    }

    /// Where the cycle stands.
    #[must_use]
    pub const fn state(&self) -> CycleState {
        self.state
    }

    /// Index of the current step.
    #[must_use]
    pub const fn step_index(&self) -> usize {
        self.index
    }

    /// One control tick: works out this tick's request from the current step,
    /// hands it to `interlock` (with `governor`), then advances the step.
    ///
    /// * `sensors`: the interlock's inputs; their `request_rad_s` is replaced
    ///   by the program's request.
    /// * `confirm`: the operator's confirmation input; a step waiting for it
    ///   ends on its rising edge (a button held down since before does not
    ///   count).
    /// * `dt_s`: the tick period, as for [`Interlock::tick_with`].
    pub fn tick<const S: usize, const N: usize, G: RequestGovernor>(
        &mut self,
        program: &Program<'t, S>,
        interlock: &mut Interlock<N>,
        governor: &mut G,
        sensors: &TickInputs,
        confirm: bool,
        dt_s: f32,
    ) -> CycleStatus {
        let confirm_edge = confirm && !self.confirm_before;
        self.confirm_before = confirm;
        let step = program.step(self.index).copied();

        // This tick's request.
        if matches!(self.state, CycleState::Finished | CycleState::Aborted) {
            self.request_rad_s = 0.0;
        } else {
            match step {
                Some(CheckedStep::Ramp { speed_rad_s }) => self.request_rad_s = speed_rad_s,
                Some(CheckedStep::Play(_)) => {
                    if let Some(player) = self.player.as_mut() {
                        if interlock.state().permits_running() {
                            // A refused dt leaves the player where it was; the
                            // interlock trips on the same dt.
                            if let Ok(out) = player.step(dt_s) {
                                self.request_rad_s = lead(
                                    out.request_rad_s,
                                    out.slope_rad_s2,
                                    interlock.params().ramp_limits().max_jerk_rad_s3(),
                                );
                            }
                        } else {
                            self.request_rad_s = player.output().request_rad_s;
                        }
                    }
                }
                Some(CheckedStep::Stop) | None => self.request_rad_s = 0.0,
                // Hold and confirmation keep the speed reached.
                Some(CheckedStep::Hold { .. } | CheckedStep::Confirm) => {}
            }
        }

        let inputs = TickInputs {
            request_rad_s: self.request_rad_s,
            ..*sensors
        };
        let output = interlock.tick_with(&inputs, dt_s, governor);

        // A latched trip ends the program.
        if interlock.cause().is_some() && self.state != CycleState::Finished {
            self.state = CycleState::Aborted;
            self.request_rad_s = 0.0;
        }

        let mut time_left_s = None;
        if matches!(
            self.state,
            CycleState::Running | CycleState::WaitingForConfirmation
        ) {
            if output.run_permit && dt_s.is_finite() && dt_s > 0.0 {
                self.elapsed_s += dt_s;
            }
            let settled = |target: f32| {
                output.command.target_reached() && output.command.speed.rad_per_s() == target
            };
            let ramp_left = interlock.ramp_remaining_s();
            let done = match step {
                Some(CheckedStep::Ramp { speed_rad_s }) => {
                    time_left_s = Some(ramp_left);
                    settled(speed_rad_s)
                }
                Some(CheckedStep::Play(table)) => {
                    let finished = self.player.is_some_and(|p| p.output().finished);
                    #[allow(clippy::cast_precision_loss)]
                    let table_s = table.duration_us() as f32 * 1.0e-6;
                    let played_s = self
                        .player
                        .map_or(0.0, |p| p.output().elapsed_us as f32 * 1.0e-6);
                    time_left_s = Some((table_s - played_s).max(0.0) + ramp_left);
                    finished && settled(table.speed(table.count().saturating_sub(1)))
                }
                Some(CheckedStep::Hold { duration_s }) => {
                    time_left_s = Some((duration_s - self.elapsed_s).max(0.0));
                    self.elapsed_s >= duration_s
                }
                Some(CheckedStep::Confirm) => {
                    self.state = CycleState::WaitingForConfirmation;
                    confirm_edge
                }
                Some(CheckedStep::Stop) => {
                    time_left_s = Some(ramp_left);
                    settled(0.0)
                }
                None => true,
            };
            if done {
                let stop = matches!(step, Some(CheckedStep::Stop));
                if stop || self.index + 1 >= program.len() {
                    self.state = CycleState::Finished;
                    time_left_s = Some(0.0);
                } else {
                    self.enter(program, self.index + 1);
                    // Known ahead only for a hold; a ramp's time is known
                    // once it has been planned, on the next tick.
                    time_left_s = match program.step(self.index) {
                        Some(CheckedStep::Hold { duration_s }) => Some(*duration_s),
                        _ => None,
                    };
                }
            }
        }
        CycleStatus {
            step: self.index,
            time_left_s,
            state: self.state,
            request_rad_s: self.request_rad_s,
            output,
        }
    }

    fn enter<const S: usize>(&mut self, program: &Program<'t, S>, index: usize) {
        self.index = index;
        self.elapsed_s = 0.0;
        self.state = CycleState::Running;
        self.player = match program.step(index) {
            Some(CheckedStep::Play(table)) => Some(ProfilePlayer::new(*table)),
            _ => None,
        };
    }
}

/// The request that makes the interlock's jerk-limited ramp follow a table
/// rather than trail it: the table's speed plus the speed the ramp would
/// still gain while braking the table's slope `a` at the jerk limit `j`,
/// a·|a|/(2j). Re-planning every tick toward that point, the time-optimal
/// ramp alternates its jerk around the table's path (a sliding mode, with an
/// acceleration ripple of j·dt) instead of lagging it by up to a²/(2j); at
/// the table's end the slope is zero and the ramp lands on the last sample.
fn lead(speed_rad_s: f32, slope_rad_s2: f32, jerk_rad_s3: f32) -> f32 {
    speed_rad_s + slope_rad_s2 * libm::fabsf(slope_rad_s2) / (2.0 * jerk_rad_s3)
}
