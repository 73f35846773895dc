//! Ride-cycle programs: a fixed-capacity list of steps, checked against the
//! interlock's parameter set once, then run tick by tick through the
//! interlock by a [`CycleRunner`].
//!
//! A cycle is written down once — load, spin up, hold, change angle, hold,
//! spin down, unload — as [`Step`]s. [`Program::new`] checks every step
//! against the parameter set *before* the ride runs: a step whose speed is
//! above the speed ceiling is an error naming the step, never a silent clamp
//! (the interlock would clamp it, but then the ride would not do what the
//! program says). The runner never drives the ride itself: each tick it
//! hands its request to [`Interlock::tick_with`](crate::interlock::Interlock::tick_with),
//! so the ceiling, the governor, the certified ramp and the monitoring always
//! apply.
//!
//! ```
//! use swingdrive::interlock::{Interlock, SafetyParams};
//! use swingdrive::program::{Program, Step};
//! use swingdrive::{Angle, Gravity, RideGeometry, Suspension};
//! # use swingdrive::interlock::SafetyConfig;
//! # fn demo(params: SafetyParams) -> Result<(), swingdrive::program::ProgramError> {
//! // Demo data: an invented chain ride.
//! let ride = RideGeometry::new(3.8, 6.4, Suspension::Chain, Gravity::STANDARD).unwrap();
//! let program: Program<8> = Program::new(
//!     &[
//!         Step::WaitForConfirmation,
//!         Step::RampToAngle(Angle::from_deg(35.0)),
//!         Step::Hold { duration_s: 20.0 },
//!         Step::Stop,
//!     ],
//!     &ride,
//!     &params,
//! )?;
//! assert_eq!(program.len(), 4);
//! # Ok(()) }
//! ```

mod runner;

pub use runner::{CycleRunner, CycleState, CycleStatus};

use core::fmt;

use crate::error::ParamError;
use crate::geometry::RideGeometry;
use crate::interlock::SafetyParams;
use crate::player::ProfileTable;
use crate::ramp::Reverse;
use crate::units::{Angle, AngularSpeed};

/// Longest hold a step may ask for, s (one day).
pub const MAX_HOLD_S: f32 = 86_400.0;

/// One step of a ride cycle.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Step<'t> {
    /// Ramp (time-optimal under the certified limits) to the speed whose
    /// steady swing angle, at the *nominal* geometry, is the given angle.
    RampToAngle(Angle),
    /// Ramp (time-optimal under the certified limits) to a shaft speed.
    RampToSpeed(AngularSpeed),
    /// Play a designed swing-free profile table (already checked against the
    /// parameter set's stamp); the step ends at the table's last sample and
    /// once the command has settled there.
    Play(ProfileTable<'t>),
    /// Keep the speed for a time, s, in (0, [`MAX_HOLD_S`]].
    Hold {
        /// Duration, s.
        duration_s: f32,
    },
    /// Keep the speed until the operator confirms (a rising edge of the
    /// confirmation input).
    WaitForConfirmation,
    /// Ramp down to rest and end the program there.
    Stop,
}

impl Step<'_> {
    /// A short name for logs and reports.
    #[must_use]
    pub const fn name(&self) -> &'static str {
        match self {
            Self::RampToAngle(_) => "ramp to angle",
            Self::RampToSpeed(_) => "ramp to speed",
            Self::Play(_) => "play table",
            Self::Hold { .. } => "hold",
            Self::WaitForConfirmation => "wait for confirmation",
            Self::Stop => "stop",
        }
    }
}

/// A step that was checked: speeds resolved once, so that the runner's tick
/// does no steady-state solve.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub(crate) enum CheckedStep<'t> {
    Ramp { speed_rad_s: f32 },
    Play(ProfileTable<'t>),
    Hold { duration_s: f32 },
    Confirm,
    Stop,
}

/// Why a program was refused.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum ProgramError {
    /// The program has no step.
    Empty,
    /// More steps than the program's capacity.
    TooManySteps {
        /// The capacity.
        capacity: usize,
    },
    /// A step is refused.
    Step {
        /// Index of the step, from 0.
        index: usize,
        /// What is wrong with it.
        problem: StepProblem,
    },
}

/// What is wrong with one step.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum StepProblem {
    /// A parameter of the step is refused (the angle, the speed or the
    /// duration), by name.
    Param(ParamError),
    /// The step's speed is above the interlock's speed ceiling.
    AboveCeiling,
    /// The step's speed is negative and the parameter set forbids reverse.
    ReverseForbidden,
    /// The table's stamp is not the parameter set's stamp.
    TableStamp,
    /// A sample of the table is above the ceiling (or below the lowest
    /// allowed speed).
    TableOutsideCeiling,
}

impl fmt::Display for ProgramError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Self::Empty => write!(f, "the program has no step"),
            Self::TooManySteps { capacity } => {
                write!(f, "the program has more than {capacity} steps")
            }
            Self::Step { index, problem } => {
                write!(f, "step {}: ", index + 1)?;
                match problem {
                    StepProblem::Param(e) => write!(f, "{e}"),
                    StepProblem::AboveCeiling => {
                        write!(f, "its speed is above the interlock's speed ceiling")
                    }
                    StepProblem::ReverseForbidden => {
                        write!(f, "its speed is negative and reverse is forbidden")
                    }
                    StepProblem::TableStamp => write!(
                        f,
                        "its table was made for another parameter set (stamp mismatch)"
                    ),
                    StepProblem::TableOutsideCeiling => {
                        write!(f, "its table leaves the allowed speed range")
                    }
                }
            }
        }
    }
}

impl core::error::Error for ProgramError {}

/// A checked ride cycle of at most `S` steps.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Program<'t, const S: usize> {
    steps: heapless::Vec<CheckedStep<'t>, S>,
    stamp: u32,
}

impl<'t, const S: usize> Program<'t, S> {
    /// Checks `steps` against the parameter set `params` (its speed ceiling,
    /// reverse permission and stamp); angles are turned into speeds with the
    /// nominal geometry `ride`.
    ///
    /// # Errors
    /// [`ProgramError::Empty`], [`ProgramError::TooManySteps`], or
    /// [`ProgramError::Step`] naming the first refused step and why.
    pub fn new(
        steps: &[Step<'t>],
        ride: &RideGeometry,
        params: &SafetyParams,
    ) -> Result<Self, ProgramError> {
        if steps.is_empty() {
            return Err(ProgramError::Empty);
        }
        if steps.len() > S {
            return Err(ProgramError::TooManySteps { capacity: S });
        }
        let mut checked = heapless::Vec::new();
        for (index, step) in steps.iter().enumerate() {
            let step = check_step(step, ride, params)
                .map_err(|problem| ProgramError::Step { index, problem })?;
            // Cannot fail: steps.len() <= S was checked above.
            if checked.push(step).is_err() {
                return Err(ProgramError::TooManySteps { capacity: S });
            }
        }
        Ok(Self {
            steps: checked,
            stamp: params.stamp(),
        })
    }

    /// Number of steps.
    #[must_use]
    pub fn len(&self) -> usize {
        self.steps.len()
    }

    /// Always `false`: a program has at least one step.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.steps.is_empty()
    }

    /// The stamp of the parameter set the program was checked against.
    #[must_use]
    pub const fn stamp(&self) -> u32 {
        self.stamp
    }

    /// The target speed of step `index` once it is complete, rad/s: `None`
    /// for a step that keeps the speed (hold, confirmation) or beyond the end.
    #[must_use]
    pub fn target_rad_s(&self, index: usize) -> Option<f32> {
        match self.steps.get(index)? {
            CheckedStep::Ramp { speed_rad_s } => Some(*speed_rad_s),
            CheckedStep::Play(table) => Some(table.speed(table.count().saturating_sub(1))),
            CheckedStep::Stop => Some(0.0),
            CheckedStep::Hold { .. } | CheckedStep::Confirm => None,
        }
    }

    pub(crate) fn step(&self, index: usize) -> Option<&CheckedStep<'t>> {
        self.steps.get(index)
    }
}

fn check_speed(speed_rad_s: f32, params: &SafetyParams) -> Result<f32, StepProblem> {
    if !speed_rad_s.is_finite() {
        return Err(StepProblem::Param(ParamError::NonFinite("speed")));
    }
    if speed_rad_s < 0.0 && params.config().reverse == Reverse::Forbidden {
        return Err(StepProblem::ReverseForbidden);
    }
    if speed_rad_s.abs() > params.ceiling().ceiling_rad_s() {
        return Err(StepProblem::AboveCeiling);
    }
    Ok(speed_rad_s)
}

fn check_step<'t>(
    step: &Step<'t>,
    ride: &RideGeometry,
    params: &SafetyParams,
) -> Result<CheckedStep<'t>, StepProblem> {
    Ok(match *step {
        Step::RampToAngle(angle) => {
            let speed = ride
                .speed_for_angle(angle)
                .map_err(StepProblem::Param)?
                .rad_per_s();
            CheckedStep::Ramp {
                speed_rad_s: check_speed(speed, params)?,
            }
        }
        Step::RampToSpeed(speed) => CheckedStep::Ramp {
            speed_rad_s: check_speed(speed.rad_per_s(), params)?,
        },
        Step::Play(table) => {
            if table.stamp() != params.stamp() {
                return Err(StepProblem::TableStamp);
            }
            // At most the table's sample count (bounded by the table format).
            for i in 0..table.count() {
                check_speed(table.speed(i), params)
                    .map_err(|_| StepProblem::TableOutsideCeiling)?;
            }
            CheckedStep::Play(table)
        }
        Step::Hold { duration_s } => {
            if !duration_s.is_finite() {
                return Err(StepProblem::Param(ParamError::NonFinite("duration_s")));
            }
            if duration_s <= 0.0 {
                return Err(StepProblem::Param(ParamError::NotPositive("duration_s")));
            }
            if duration_s > MAX_HOLD_S {
                return Err(StepProblem::Param(ParamError::OutOfRange("duration_s")));
            }
            CheckedStep::Hold { duration_s }
        }
        Step::WaitForConfirmation => CheckedStep::Confirm,
        Step::Stop => CheckedStep::Stop,
    })
}
