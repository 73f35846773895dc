//! The swing governor in the interlock's path (`Interlock::tick_with`): the
//! study's pumping request and a stop mid-sequence, with the shaft following
//! the interlock's command and the f64 simulator as the truth.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::interlock::{EventKind, Sample, DEFAULT_EVENT_CAPACITY};
use swingdrive::protection::closed_loop::simulate_peak;
use swingdrive::ramp::Reverse;
use swingdrive::sim::SeatDynamics;
use swingdrive::*;

const DT: f32 = 0.01;

/// The study's ride: r0 4 m, L 6.5 m (band 6.37–6.63 m), 50° certified,
/// 0.1 rad/s², 0.05 rad/s³; the other values are demo data.
fn config() -> SafetyConfig {
    SafetyConfig {
        certified_angle_deg: 50.0,
        max_load_factor: None,
        mechanical_max_rad_s: 2.0,
        hub_offset_max_m: 4.0,
        length_max_m: 6.63,
        gravity_min_mps2: 9.80665,
        speed_margin_rad_s: 0.0,
        max_acceleration_rad_s2: 0.1,
        max_deceleration_rad_s2: 0.1,
        max_jerk_rad_s3: 0.05,
        overspeed_tolerance_rad_s: 0.05,
        following_tolerance_rad_s: 0.08,
        channel_tolerance_rad_s: 0.04,
        sensor_max_rad_s: 5.0,
        standstill_rad_s: 0.01,
        tick_s: DT,
        overrun_tick_s: 0.02,
        stop_time_margin_s: 2.0,
        brake_delay_s: 60.0,
        debounce_ticks: 5,
        stale_ticks: 8,
        standstill_ticks: 20,
        reverse: Reverse::Forbidden,
        second_channel: false,
        angle_sensor: false,
    }
}

/// Runs `request(t)` for `seconds` through the interlock, with the governor
/// or without; `enable_until` drops the run enable (a controlled stop).
/// Returns the commanded speed every 50 ms, and whether the interlock tripped.
fn run(
    governed: bool,
    seconds: f32,
    enable_until: f32,
    request: impl Fn(f32, f32) -> f32,
) -> (Vec<(f64, f64)>, bool) {
    let params = SafetyParams::new(config()).unwrap();
    let ceiling = params.ceiling().ceiling_rad_s();
    let mut il = Interlock::<DEFAULT_EVENT_CAPACITY>::new(params);
    let ride = RideGeometry::new(4.0, 6.5, Suspension::Chain, Gravity::STANDARD).unwrap();
    let mut gov = SwingGovernor::new(&ride, &GovernorParams::demo(&ride, 50.0, 0.05)).unwrap();
    assert!(gov.confirm_rest(0.0));
    let mut measured = 0.0_f32;
    let mut profile = vec![(0.0, 0.0)];
    let mut tripped = false;
    let ticks = (seconds / DT) as u32;
    for k in 0..ticks {
        let t = k as f32 * DT;
        let inputs = TickInputs {
            request_rad_s: request(t, ceiling),
            speed: Sample::new(measured, (k % 256) as u8),
            second_speed: Sample::ABSENT,
            angle: Sample::ABSENT,
            run_enable: t < enable_until,
            reset: false,
        };
        let out = if governed {
            il.tick_with(&inputs, DT, &mut gov)
        } else {
            il.tick(&inputs, DT)
        };
        // A trip other than the dropped run enable (a governor fault, a
        // following error, ...) counts.
        tripped |= il.events().iter().any(
            |e| matches!(e.kind, EventKind::Trip(cause) if cause != TripCause::RunEnableDropped),
        );
        measured = out.command.speed.rad_per_s();
        if (k + 1) % 5 == 0 {
            profile.push((f64::from(t + DT), f64::from(measured)));
        }
    }
    (profile, tripped)
}

/// Half the slowest swing period at 87.5 % of the ceiling, s.
fn half_period(ceiling: f32) -> f32 {
    let ride = RideGeometry::new(4.0, 6.5, Suspension::Chain, Gravity::STANDARD).unwrap();
    let s = ride
        .steady_state_at_speed(AngularSpeed::from_rad_per_s(0.875 * ceiling))
        .unwrap();
    0.5 * ride.swing_modes(&s).slowest().period_s()
}

fn pumping(t: f32, ceiling: f32) -> f32 {
    if t < 40.0 {
        return ceiling;
    }
    let n = ((t - 40.0) / half_period(ceiling)) as u32;
    if n.is_multiple_of(2) {
        0.75 * ceiling
    } else {
        ceiling
    }
}

#[test]
fn pumping_through_the_interlock_stays_inside_the_certified_angle_with_the_governor() {
    // The study found about 79° for this pumping without protection; the interlock's
    // ceiling alone does not prevent it (peak beyond 75° here), the governor does
    // (peak below 50°, the certified angle).
    let truth = SeatDynamics::from_geometry(
        &RideGeometry::new(4.0, 6.5, Suspension::Chain, Gravity::STANDARD).unwrap(),
    );
    let (bare, _) = run(false, 200.0, f32::INFINITY, pumping);
    let (bare_peak, _) = simulate_peak(&truth, &bare, 20.0).unwrap();
    assert!(bare_peak > 75.0, "{bare_peak}");
    let (governed, tripped) = run(true, 200.0, f32::INFINITY, pumping);
    assert!(!tripped);
    let (peak, _) = simulate_peak(&truth, &governed, 20.0).unwrap();
    assert!(peak < 50.0 && peak > 40.0, "{peak}");
}

#[test]
fn a_stop_mid_sequence_through_the_interlock_stays_inside_the_certified_angle() {
    // Run enable dropped after 120 s of pumping: the interlock's controlled stop at
    // the certified deceleration and jerk, the governor admitting zero meanwhile.
    let truth = SeatDynamics::from_geometry(
        &RideGeometry::new(4.0, 6.5, Suspension::Chain, Gravity::STANDARD).unwrap(),
    );
    let (governed, tripped) = run(true, 200.0, 120.0, pumping);
    assert!(!tripped);
    assert!(
        governed.last().unwrap().1 == 0.0,
        "the stop must reach standstill"
    );
    let (peak, sideways) = simulate_peak(&truth, &governed, 20.0).unwrap();
    assert!(peak < 50.0, "{peak}");
    assert!(sideways < 50.0, "{sideways}");
}
