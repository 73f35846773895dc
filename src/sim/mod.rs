//! Seat dynamics and profile replay: how far the seats swing when the top
//! follows a speed profile (host only, feature `std`, f64).
//!
//! * [`dynamics`]: the equations of motion of one seat in the frame turning
//!   with the top, for chains and hinged rods, with speed steps as impulses.
//! * [`drive`]: an optional model of a real shaft (speed-loop lag, torque
//!   limit, coast-down when the run permit drops).
//! * [`profile`]: a commanded speed profile (piecewise linear), from memory or CSV.
//! * [`engine`]: adaptive Dormand–Prince integration across the profile's
//!   breakpoints, sampling the motion on a fixed grid for an [`Observer`].
//! * [`mod@replay`]: the test-bench questions answered — peak angle, residual
//!   swing, peak load factor, chain slack — plus a time series.
//! * [`closed_loop`]: the controller in the loop — interlock, governor and ride
//!   program commanding the drive model through simulated sensors.
//! * [`cycle`]: a ride-cycle program file run on the simulated ride.
//! * [`output`]: the time series as CSV and as an SVG plot.
//!
//! The equations, the impulse rule, slack detection and the accuracy achieved
//! are written up in `docs/simulator.md`; file formats in `docs/files.md`.
//!
//! This is an engineering estimate for test benches, not a certified safety
//! function: it models one rigid seat on a massless link and nothing else.

pub mod closed_loop;
pub mod cycle;
pub mod drive;
pub mod dynamics;
pub mod engine;
pub mod output;
pub mod profile;
pub mod replay;

pub use drive::DriveModel;
pub use dynamics::{LinkForce, LinkState, SeatDynamics, ShaftMotion, SpeedStepResponse};
pub use engine::{simulate, Observation, Observer, SimError, SimOptions, SimStats, Tolerance};
pub use profile::{ProfileError, ProfileSample, SpeedProfile};
pub use replay::{
    replay, ReplayOptions, ReplayOutcome, ReplaySummary, SlackEvent, SlackKind, StartCondition,
    TraceSample,
};

use crate::error::ParamError;

/// Checks an f64 parameter: finite and inside `[min, max]`; with
/// `zero_allowed == false` also strictly positive.
pub(crate) fn check_f64(
    name: &'static str,
    value: f64,
    min: f64,
    max: f64,
    zero_allowed: bool,
) -> Result<f64, ParamError> {
    if !value.is_finite() {
        Err(ParamError::NonFinite(name))
    } else if !zero_allowed && value <= 0.0 && min >= 0.0 {
        Err(ParamError::NotPositive(name))
    } else if value < 0.0 && min >= 0.0 {
        Err(ParamError::Negative(name))
    } else if value < min || value > max {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(value)
    }
}
