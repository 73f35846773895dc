//! Safety parameter sets of invented demo rides shared by several test files
//! (demo data, not the figures of any real ride). A test that needs a
//! variant changes single fields with struct-update syntax.
#![allow(dead_code)]

use swingdrive::ramp::Reverse;
use swingdrive::SafetyConfig;

/// Demo data (invented ride): r0 3.6 m, L 6.2 m, certified 40°, 10 ms ticks,
/// quick ramp limits (0.5 rad/s², 0.6 rad/s² down, 2 rad/s³), two speed
/// channels and a swing-angle sensor.
pub fn forty_degree_ride() -> SafetyConfig {
    SafetyConfig {
        certified_angle_deg: 40.0,
        max_load_factor: None,
        mechanical_max_rad_s: 2.0,
        hub_offset_max_m: 3.6,
        length_max_m: 6.2,
        gravity_min_mps2: 9.78,
        speed_margin_rad_s: 0.02,
        max_acceleration_rad_s2: 0.5,
        max_deceleration_rad_s2: 0.6,
        max_jerk_rad_s3: 2.0,
        overspeed_tolerance_rad_s: 0.05,
        following_tolerance_rad_s: 0.08,
        channel_tolerance_rad_s: 0.04,
        sensor_max_rad_s: 5.0,
        standstill_rad_s: 0.01,
        tick_s: 0.01,
        overrun_tick_s: 0.02,
        stop_time_margin_s: 1.0,
        brake_delay_s: 20.0,
        debounce_ticks: 5,
        stale_ticks: 8,
        standstill_ticks: 20,
        reverse: Reverse::Forbidden,
        second_channel: true,
        angle_sensor: true,
    }
}

/// Demo data (invented ride) for property tests and fuzzing: r0 2 m, L 4 m,
/// certified 45°, brisk limits (2 rad/s², 3 rad/s² down, 20 rad/s³),
/// tick `tick_s`, reverse and channels as asked.
pub fn brisk_ride(
    tick_s: f32,
    reverse: Reverse,
    second_channel: bool,
    angle_sensor: bool,
) -> SafetyConfig {
    SafetyConfig {
        certified_angle_deg: 45.0,
        max_load_factor: None,
        mechanical_max_rad_s: 3.0,
        hub_offset_max_m: 2.0,
        length_max_m: 4.0,
        gravity_min_mps2: 9.78,
        speed_margin_rad_s: 0.05,
        max_acceleration_rad_s2: 2.0,
        max_deceleration_rad_s2: 3.0,
        max_jerk_rad_s3: 20.0,
        overspeed_tolerance_rad_s: 0.1,
        following_tolerance_rad_s: 0.2,
        channel_tolerance_rad_s: 0.1,
        sensor_max_rad_s: 10.0,
        standstill_rad_s: 0.02,
        tick_s,
        overrun_tick_s: 0.02,
        stop_time_margin_s: 0.5,
        brake_delay_s: 5.0,
        debounce_ticks: 3,
        stale_ticks: 4,
        standstill_ticks: 10,
        reverse,
        second_channel,
        angle_sensor,
    }
}
