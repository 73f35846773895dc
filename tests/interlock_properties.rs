//! Property tests of the interlock over random input sequences: requests and
//! sensor values including NaN, ±∞, negative and huge values, jittered and
//! bad tick periods, random run-enable and reset. Demo data (invented ride).
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use proptest::prelude::*;
use swingdrive::interlock::Sample;
use swingdrive::ramp::Reverse;
use swingdrive::{Interlock, InterlockState, SafetyConfig, SafetyParams, TickInputs};

#[path = "common/demo_rides.rs"]
mod demo_rides;

const TICK: f32 = 0.01;

/// Demo data (invented ride), a fast ramp so that sequences reach speed.
fn config(reverse: Reverse) -> SafetyConfig {
    demo_rides::brisk_ride(TICK, reverse, true, false)
}

/// Any f32 the outside world might send: ordinary, negative, huge, NaN, ±∞.
fn wild() -> impl Strategy<Value = f32> {
    prop_oneof![
        6 => -2.0f32..4.0,
        1 => Just(f32::NAN),
        1 => Just(f32::INFINITY),
        1 => Just(f32::NEG_INFINITY),
        1 => prop_oneof![Just(1.0e30f32), Just(-1.0e30f32), Just(f32::MAX), Just(-0.0f32)],
    ]
}

/// How the sensors behave on one step.
#[derive(Debug, Clone, Copy)]
enum Sensor {
    /// Reads the command (an ideal drive).
    Follows,
    /// Reads the command plus an offset.
    Offset(f32),
    /// Reads this value.
    Reads(f32),
    /// Delivers no new sample.
    Silent,
}

fn sensor() -> impl Strategy<Value = Sensor> {
    prop_oneof![
        8 => Just(Sensor::Follows),
        2 => (-0.5f32..0.5).prop_map(Sensor::Offset),
        1 => wild().prop_map(Sensor::Reads),
        1 => Just(Sensor::Silent),
    ]
}

fn period() -> impl Strategy<Value = f32> {
    prop_oneof![
        20 => (0.5f32..1.5).prop_map(|k| k * TICK),
        1 => Just(0.03f32),
        1 => Just(f32::NAN),
        1 => Just(0.0f32),
        1 => Just(-0.01f32),
    ]
}

#[derive(Debug, Clone, Copy)]
struct Step {
    request: f32,
    primary: Sensor,
    secondary: Sensor,
    run_enable: bool,
    reset: bool,
    dt: f32,
    /// Repeat the step this many ticks.
    hold: u16,
}

fn step() -> impl Strategy<Value = Step> {
    (
        wild(),
        sensor(),
        sensor(),
        prop::bool::weighted(0.9),
        prop::bool::weighted(0.2),
        period(),
        1u16..60,
    )
        .prop_map(
            |(request, primary, secondary, run_enable, reset, dt, hold)| Step {
                request,
                primary,
                secondary,
                run_enable,
                reset,
                dt,
                hold,
            },
        )
}

fn read(s: Sensor, command: f32) -> Option<f32> {
    match s {
        Sensor::Follows => Some(command),
        Sensor::Offset(o) => Some(command + o),
        Sensor::Reads(v) => Some(v),
        Sensor::Silent => None,
    }
}

fn check(reverse: Reverse, steps: &[Step]) -> Result<(), TestCaseError> {
    let c = config(reverse);
    let params = SafetyParams::new(c).unwrap();
    let ceiling = params.ceiling().ceiling_rad_s();
    let fastest = c.max_acceleration_rad_s2.max(c.max_deceleration_rad_s2);
    let mut il = Interlock::<8>::new(params);
    let (mut seq1, mut seq2) = (0u8, 0u8);
    let mut reset_before = false;
    // The last fresh, valid primary sample: what the interlock believes.
    let mut last_valid = f32::NAN;
    let mut previous = il.command().speed.rad_per_s();
    let mut state = il.state();
    for s in steps {
        for _ in 0..s.hold {
            let m1 = read(s.primary, previous);
            let m2 = read(s.secondary, previous);
            if let Some(m) = m1 {
                seq1 = seq1.wrapping_add(1);
                if m.abs() <= c.sensor_max_rad_s {
                    last_valid = m;
                }
            }
            if m2.is_some() {
                seq2 = seq2.wrapping_add(1);
            }
            let inputs = TickInputs {
                request_rad_s: s.request,
                speed: Sample::new(m1.unwrap_or(f32::NAN), seq1),
                second_speed: Sample::new(m2.unwrap_or(f32::NAN), seq2),
                angle: Sample::ABSENT,
                run_enable: s.run_enable,
                reset: s.reset,
            };
            let o = il.tick(&inputs, s.dt);
            let v = o.command.speed.rad_per_s();
            // The command never exceeds the ceiling, nor goes backwards when
            // reverse is forbidden.
            prop_assert!(v.is_finite());
            prop_assert!(v.abs() <= ceiling, "{v} above {ceiling}");
            if reverse == Reverse::Forbidden {
                prop_assert!(v >= 0.0);
            }
            // It never changes faster than the certified limits allow (4 ulps
            // of rounding; hand calculation, common practice); it holds on a
            // refused tick period.
            let dt_ok = s.dt > 0.0 && s.dt <= c.overrun_tick_s;
            let allowed = if dt_ok { fastest * s.dt } else { 0.0 } + 4.0 * f32::EPSILON * ceiling;
            prop_assert!(
                (v - previous).abs() <= allowed,
                "{previous} -> {v} in {}",
                s.dt
            );
            // A latched trip clears only on a reset edge at standstill, with
            // the command at zero; a fault never clears.
            let edge = s.reset && !reset_before;
            if matches!(state, InterlockState::Tripped) && o.state != InterlockState::Tripped {
                prop_assert_eq!(o.state, InterlockState::Ready);
                prop_assert!(edge, "cleared without a reset edge");
                prop_assert_eq!(v, 0.0);
                prop_assert!(
                    last_valid.abs() <= c.standstill_rad_s,
                    "cleared while reading {}",
                    last_valid
                );
            }
            if matches!(
                state,
                InterlockState::Stopping | InterlockState::StoppingTimed
            ) {
                prop_assert!(matches!(
                    o.state,
                    InterlockState::Stopping
                        | InterlockState::StoppingTimed
                        | InterlockState::Tripped
                ));
            }
            prop_assert_eq!(o.run_permit, o.state.permits_running());
            prop_assert!(
                !(o.run_permit && o.brake),
                "brake applied with the permit on"
            );
            reset_before = s.reset;
            previous = v;
            state = o.state;
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    #[test]
    fn invariants_hold_forward_only(steps in prop::collection::vec(step(), 1..40)) {
        check(Reverse::Forbidden, &steps)?;
    }

    #[test]
    fn invariants_hold_with_reverse(steps in prop::collection::vec(step(), 1..40)) {
        check(Reverse::Allowed, &steps)?;
    }
}
