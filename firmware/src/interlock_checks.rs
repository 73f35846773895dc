//! Interlock fault scenarios on the target, against the host's outcomes
//! (tests/target_interlock_vectors.rs states the tolerances).

use crate::checks::Tally;
use crate::interlock_scenario::run_scenario;

/// One scenario and how it ended on the host.
pub struct ScenarioCase {
    /// Fault kind (see `interlock_scenario`).
    pub kind: u8,
    /// Reverse rotation allowed.
    pub reverse: bool,
    /// Tick the fault starts at.
    pub fault_at: u32,
    /// Ticks in all.
    pub ticks: u32,
    /// Requested speed, rad/s.
    pub request: f32,
    /// Final state (`InterlockState as u8`).
    pub state: u8,
    /// Latched cause (`TripCause as u8`, 0 = none).
    pub cause: u8,
    /// First tick that left running/limiting, 0 if none.
    pub left_run_at: u32,
    /// Events recorded.
    pub events: u32,
    /// Final commanded speed, rad/s.
    pub command: f32,
    /// Largest accepted deviation of the final command, rad/s.
    pub command_tol: f64,
    /// The host's final command, as bits.
    pub host_command_bits: u32,
}

/// Runs every scenario.
pub fn interlock(tally: &mut Tally) {
    for (i, c) in crate::interlock_vectors::SCENARIOS.iter().enumerate() {
        match run_scenario(c.kind, c.reverse, c.fault_at, c.ticks, c.request) {
            Some(o) => {
                let same = o.state == c.state
                    && o.cause == c.cause
                    && o.left_run_at == c.left_run_at
                    && o.events == c.events;
                let close =
                    libm::fabs(f64::from(o.command_rad_s) - f64::from(c.command)) <= c.command_tol;
                tally.numeric(
                    "interlock scenario",
                    i,
                    same && close,
                    Some(o.command_rad_s.to_bits() == c.host_command_bits),
                );
                if !(same && close) {
                    crate::say(format_args!(
                        "  kind {}: state {} cause {} left {} events {} command {}; expected {} {} {} {} {}",
                        c.kind,
                        o.state,
                        o.cause,
                        o.left_run_at,
                        o.events,
                        o.command_rad_s,
                        c.state,
                        c.cause,
                        c.left_run_at,
                        c.events,
                        c.command
                    ));
                }
            }
            None => tally.check("interlock scenario refused", false),
        }
    }
}
