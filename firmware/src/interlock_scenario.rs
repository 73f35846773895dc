// Interlock fault scenarios, shared word for word by the firmware (a module)
// and the host's vector generator (tests/target_interlock_vectors.rs, through
// `include!`), so that both run the same inputs tick by tick.
//
// A demo ride (invented, demo data) with both speed channels and an angle
// sensor fitted. The drive is ideal (the measured speed is the previous
// command) until `fault_at`; then one fault is injected for `FAULT_TICKS`
// ticks, after which the sensors read normally again. Nothing here may panic:
// it runs on the target.

use swingdrive::{
    Interlock, InterlockState, Reverse, SafetyConfig, SafetyParams, Sample, TickInputs,
};

/// Ticks a fault lasts.
pub const FAULT_TICKS: u32 = 40;

/// Number of fault kinds (0 is a fault-free run).
pub const FAULT_KINDS: u8 = 11;

/// Demo data: an invented ride (see the module comment).
pub fn scenario_config(reverse: bool) -> SafetyConfig {
    SafetyConfig {
        certified_angle_deg: 40.0,
        max_load_factor: None,
        mechanical_max_rad_s: 1.6,
        hub_offset_max_m: 3.6,
        length_max_m: 6.2,
        gravity_min_mps2: 9.79,
        speed_margin_rad_s: 0.02,
        max_acceleration_rad_s2: 0.8,
        max_deceleration_rad_s2: 1.0,
        max_jerk_rad_s3: 4.0,
        overspeed_tolerance_rad_s: 0.05,
        following_tolerance_rad_s: 0.06,
        channel_tolerance_rad_s: 0.04,
        sensor_max_rad_s: 10.0,
        standstill_rad_s: 0.01,
        tick_s: 0.001,
        overrun_tick_s: 0.002,
        stop_time_margin_s: 1.0,
        brake_delay_s: 5.0,
        debounce_ticks: 3,
        stale_ticks: 5,
        standstill_ticks: 20,
        reverse: if reverse {
            Reverse::Allowed
        } else {
            Reverse::Forbidden
        },
        second_channel: true,
        angle_sensor: true,
    }
}

/// What a scenario ended with.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ScenarioOutcome {
    /// Final state (`InterlockState as u8`).
    pub state: u8,
    /// Latched cause (`TripCause as u8`, 0 = none).
    pub cause: u8,
    /// First tick (1-based) that left running/limiting, 0 if none.
    pub left_run_at: u32,
    /// Events recorded.
    pub events: u32,
    /// Final commanded speed, rad/s.
    pub command_rad_s: f32,
    /// Largest |commanded speed| over the run, rad/s.
    pub peak_rad_s: f32,
}

/// Runs one scenario: `kind` in 0..FAULT_KINDS, the fault starting at tick
/// `fault_at`, `ticks` ticks in all, request `request_rad_s`.
pub fn run_scenario(
    kind: u8,
    reverse: bool,
    fault_at: u32,
    ticks: u32,
    request_rad_s: f32,
) -> Option<ScenarioOutcome> {
    let params = SafetyParams::new(scenario_config(reverse)).ok()?;
    let ceiling = params.ceiling().ceiling_rad_s();
    let c = *params.config();
    let mut il: Interlock = Interlock::new(params);
    let mut measured = 0.0_f32;
    let mut seq: u8 = 0;
    let mut angle_seq: u8 = 0;
    let mut left_run_at = 0;
    let mut peak = 0.0_f32;
    for k in 1..=ticks {
        let faulty = k >= fault_at && k < fault_at + FAULT_TICKS;
        let fault = if faulty { kind } else { 0 };
        let mut speed = measured;
        let mut second = measured;
        let mut angle = 0.3_f32;
        let mut run_enable = true;
        let mut dt = c.tick_s;
        let mut request = request_rad_s;
        match fault {
            // Both channels see it: a real overspeed or a drive that does not follow.
            1 => {
                speed = ceiling + 2.0 * c.overspeed_tolerance_rad_s;
                second = speed;
            }
            2 => {
                speed = measured + 2.0 * c.following_tolerance_rad_s;
                second = speed;
            }
            4 => second = measured + 2.0 * c.channel_tolerance_rad_s,
            5 => angle = 0.8, // above the certified 40° = 0.698 rad
            7 => run_enable = false,
            8 => dt = 2.0 * c.overrun_tick_s,
            9 => speed = f32::NAN,
            10 => request = f32::INFINITY,
            _ => {}
        }
        // Kind 3: the speed sensor stops delivering; kind 6: the angle sensor.
        if fault != 3 {
            seq = seq.wrapping_add(1);
        }
        if fault != 6 {
            angle_seq = angle_seq.wrapping_add(1);
        }
        let out = il.tick(
            &TickInputs {
                request_rad_s: request,
                speed: Sample::new(speed, seq),
                second_speed: Sample::new(second, seq),
                angle: Sample::new(angle, angle_seq),
                run_enable,
                reset: false,
            },
            dt,
        );
        let v = out.command.speed.rad_per_s();
        peak = peak.max(v.abs());
        // The ideal drive follows the command while the permit is on, and
        // coasts down at 0.5 rad/s² when it is off.
        measured = if out.run_permit {
            v
        } else if measured > 0.0 {
            (measured - 0.5 * c.tick_s).max(0.0)
        } else {
            (measured + 0.5 * c.tick_s).min(0.0)
        };
        let running = matches!(
            out.state,
            InterlockState::Running | InterlockState::Limiting
        );
        if !running && left_run_at == 0 && k > 1 {
            left_run_at = k;
        }
    }
    Some(ScenarioOutcome {
        state: il.state() as u8,
        cause: il.cause().map_or(0, |c| c as u8),
        left_run_at,
        events: il.events().len() as u32,
        command_rad_s: il.command().speed.rad_per_s(),
        peak_rad_s: peak,
    })
}
