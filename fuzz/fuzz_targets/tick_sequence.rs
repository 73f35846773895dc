//! Input sequences through `Interlock::tick`, checking the invariants after
//! every tick: the command stays finite and within the ceiling (and ≥ 0 with
//! reverse forbidden), changes no faster than the certified limits allow,
//! the permit matches the state and never comes with the brake, and a latched
//! trip clears only on a reset edge with the command at zero and a still
//! reading. Ride values are demo data (an invented ride).
#![no_main]

use libfuzzer_sys::fuzz_target;
use swingdrive::interlock::Sample;
use swingdrive::ramp::Reverse;
use swingdrive::{Interlock, InterlockState, SafetyConfig, SafetyParams, TickInputs};

#[path = "../../tests/common/demo_rides.rs"]
mod demo_rides;

const TICK: f32 = 0.01;

fn config(reverse: Reverse, second: bool, angle: bool) -> SafetyConfig {
    demo_rides::brisk_ride(TICK, reverse, second, angle)
}

/// A value from a byte pair: mostly the command plus an offset, sometimes wild.
fn value(kind: u8, raw: u8, command: f32) -> f32 {
    match kind % 8 {
        0..=3 => command,
        4 => command + (f32::from(raw) - 128.0) / 256.0,
        5 => (f32::from(raw) - 64.0) / 32.0,
        6 => [
            f32::NAN,
            f32::INFINITY,
            f32::NEG_INFINITY,
            1.0e30,
            -1.0e30,
            f32::MAX,
            -0.0,
            0.0,
        ][usize::from(raw % 8)],
        _ => f32::from_bits(u32::from(raw).wrapping_mul(0x0101_0101)),
    }
}

fuzz_target!(|data: &[u8]| {
    let Some((&setup, data)) = data.split_first() else {
        return;
    };
    let reverse = if setup & 1 != 0 {
        Reverse::Allowed
    } else {
        Reverse::Forbidden
    };
    let c = config(reverse, setup & 2 != 0, setup & 4 != 0);
    let params = SafetyParams::new(c).unwrap();
    let ceiling = params.ceiling().ceiling_rad_s();
    let fastest = c.max_acceleration_rad_s2.max(c.max_deceleration_rad_s2);
    let mut il = Interlock::<8>::new(params);
    let (mut s1, mut s2, mut s3) = (0u8, 0u8, 0u8);
    let mut previous = 0.0f32;
    let mut state = il.state();
    let mut reset_before = false;
    let mut last_valid = f32::NAN;
    for chunk in data.chunks_exact(8) {
        let [req_kind, req_raw, m_kind, m_raw, m2_kind, flags, dt_raw, repeat] = [
            chunk[0], chunk[1], chunk[2], chunk[3], chunk[4], chunk[5], chunk[6], chunk[7],
        ];
        for _ in 0..=(repeat % 32) {
            let request = value(req_kind, req_raw, f32::from(req_raw) / 64.0 - 1.0);
            let m1 = value(m_kind, m_raw, previous);
            let m2 = value(m2_kind, m_raw, previous);
            if flags & 1 == 0 {
                s1 = s1.wrapping_add(1);
                if m1.abs() <= c.sensor_max_rad_s {
                    last_valid = m1;
                }
            }
            if flags & 2 == 0 {
                s2 = s2.wrapping_add(1);
            }
            if flags & 4 == 0 {
                s3 = s3.wrapping_add(1);
            }
            let dt = match dt_raw {
                0 => f32::NAN,
                1 => 0.0,
                2 => -TICK,
                3 => 0.05,
                _ => TICK * (0.5 + f32::from(dt_raw) / 255.0),
            };
            let inputs = TickInputs {
                request_rad_s: request,
                speed: Sample::new(m1, s1),
                second_speed: Sample::new(m2, s2),
                angle: Sample::new(f32::from(m_raw) / 255.0, s3),
                run_enable: flags & 8 == 0,
                reset: flags & 16 != 0,
            };
            let o = il.tick(&inputs, dt);
            let v = o.command.speed.rad_per_s();
            assert!(v.is_finite());
            assert!(v.abs() <= ceiling, "{v} above the ceiling {ceiling}");
            if reverse == Reverse::Forbidden {
                assert!(v >= 0.0);
            }
            let dt_ok = dt > 0.0 && dt <= c.overrun_tick_s;
            let allowed = if dt_ok { fastest * dt } else { 0.0 } + 4.0 * f32::EPSILON * ceiling;
            assert!((v - previous).abs() <= allowed, "{previous} -> {v} in {dt}");
            assert_eq!(o.run_permit, o.state.permits_running());
            assert!(!(o.run_permit && o.brake));
            let edge = inputs.reset && !reset_before;
            if state == InterlockState::Tripped && o.state != InterlockState::Tripped {
                assert_eq!(o.state, InterlockState::Ready);
                assert!(edge, "cleared without a reset edge");
                assert_eq!(v, 0.0);
                assert!(last_valid.abs() <= c.standstill_rad_s);
            }
            if state == InterlockState::Faulted {
                assert_eq!(o.state, InterlockState::Faulted);
            }
            reset_before = inputs.reset;
            previous = v;
            state = o.state;
        }
    }
});
