//! A profile table played through the speed interlock: the table is refused
//! unless stamped for the interlock's parameter set, the player's output is
//! the interlock's request every tick, and the interlock's clamp still
//! applies. Ride, limits and profile are demo data (an invented ride).
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::design::table::encode;
use swingdrive::interlock::{Sample, DEFAULT_EVENT_CAPACITY};
use swingdrive::player::{ProfilePlayer, ProfileTable, TableError};
use swingdrive::{Interlock, SafetyConfig, SafetyParams, TickInputs};

#[path = "common/demo_rides.rs"]
mod demo_rides;

/// Demo data (invented ride): the 40° ride with the certified limits of a
/// slow chain ride (0.1 rad/s², 0.12 rad/s² down, 0.05 rad/s³), no angle
/// sensor.
fn config() -> SafetyConfig {
    SafetyConfig {
        max_acceleration_rad_s2: 0.1,
        max_deceleration_rad_s2: 0.12,
        max_jerk_rad_s3: 0.05,
        angle_sensor: false,
        ..demo_rides::forty_degree_ride()
    }
}

const DT: f32 = 0.01;

/// Demo data: a cubic ("smoothstep") rise from rest to `top` in 30 s, every
/// 0.05 s: peak acceleration 1.5·top/30 s, jerk 6·top/(30 s)², inside the limits
/// above for `top` up to 1.1 rad/s (hand calculation, common practice).
fn rise(top: f64) -> Vec<f64> {
    (0..=600)
        .map(|k| {
            let s = f64::from(k) / 600.0;
            top * s * s * (3.0 - 2.0 * s)
        })
        .collect()
}

/// Plays `bytes` through the interlock with an ideal drive (the sensors read
/// the command); returns (request, command) per tick.
fn play(params: SafetyParams, bytes: &[u8], ticks: u32) -> Vec<(f32, f32)> {
    let table = ProfileTable::parse(bytes, params.stamp()).unwrap();
    let mut player = ProfilePlayer::new(table);
    let mut il = Interlock::<DEFAULT_EVENT_CAPACITY>::new(params);
    let mut measured = 0.0_f32;
    let mut out = Vec::new();
    for seq in 0..ticks {
        let request = player.step(DT).unwrap().request_rad_s;
        let inputs = TickInputs {
            request_rad_s: request,
            speed: Sample::new(measured, seq as u8),
            second_speed: Sample::new(measured, seq as u8),
            angle: Sample::new(0.0, seq as u8),
            run_enable: true,
            reset: false,
        };
        let o = il.tick(&inputs, DT);
        assert!(o.run_permit, "tick {seq}: {o:?}");
        measured = o.command.speed.rad_per_s();
        out.push((request, measured));
    }
    out
}

#[test]
fn only_a_table_stamped_for_the_parameter_set_in_force_is_played() {
    let params = SafetyParams::new(config()).unwrap();
    let bytes = encode(&rise(0.8), 0.05, params.stamp()).unwrap();
    assert!(ProfileTable::parse(&bytes, params.stamp()).is_ok());
    // The stamp is the CRC-32 of the parameter block, so any change of a value
    // (here the certified angle) changes it and the table is refused.
    let mut other = config();
    other.certified_angle_deg = 38.0;
    let other = SafetyParams::new(other).unwrap();
    assert_ne!(other.stamp(), params.stamp());
    assert_eq!(
        ProfileTable::parse(&bytes, other.stamp()),
        Err(TableError::StampMismatch {
            expected: other.stamp(),
            found: params.stamp()
        })
    );
}

#[test]
fn the_player_is_the_interlocks_request_and_its_ramp_follows_within_limits() {
    let params = SafetyParams::new(config()).unwrap();
    let bytes = encode(&rise(0.8), 0.05, params.stamp()).unwrap();
    let run = play(params, &bytes, 3_500);
    // A profile inside the certified limits passes the clamp and the ramp:
    // the command follows the request closely and ends on it exactly. Hand
    // calculation, common practice: a ramp that must reach its target with zero
    // acceleration trails a target rising at α by at most about α²/(2 j) =
    // 0.04²/(2 · 0.05) = 0.016 rad/s (α = 1.5 · 0.8 / 30 s at the steepest point).
    let lag = run
        .iter()
        .map(|(r, c)| (r - c).abs())
        .fold(0.0_f32, f32::max);
    assert!(lag < 0.02, "largest |request − command| {lag} rad/s");
    let (r, c) = *run.last().unwrap();
    assert_eq!(r, 0.8_f64 as f32);
    assert!((c - r).abs() <= 4.0 * f32::EPSILON, "{c} vs {r}");
}

#[test]
fn the_interlocks_clamp_applies_to_a_table_that_asks_too_much() {
    let params = SafetyParams::new(config()).unwrap();
    let ceiling = params.ceiling().ceiling_rad_s();
    // Demo data: a table asking for 1.5 rad/s, above the ceiling for 40°.
    assert!(ceiling < 1.5);
    let bytes = encode(&rise(1.5), 0.05, params.stamp()).unwrap();
    let run = play(params, &bytes, 3_500);
    assert!(run.iter().all(|&(_, c)| c <= ceiling));
    assert!(run.last().unwrap().0 > ceiling);
    assert!((run.last().unwrap().1 - ceiling).abs() <= 4.0 * f32::EPSILON);
}
