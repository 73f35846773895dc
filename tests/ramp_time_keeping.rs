//! Long rides at fast ticks: the f32 ramp must not drift from the f64 reference.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]
// Uses the f64 reference, which is host-only (feature `std`).
#![cfg(feature = "std")]

use proptest::prelude::RngExt;
use proptest::test_runner::{RngAlgorithm, TestRng};
use swingdrive::reference::ramp as reference;
use swingdrive::{AngularSpeed, RampLimits, RampPhase, Reverse, SpeedRamp};

/// Demo data (an invented ride): a slow ramp to 6 rad/s that takes 122.5 s,
/// 6/0.05 + 0.05/0.02 (Biagiotti & Melchiorri 2008, §3.4).
const UP: f32 = 0.05;
const JERK: f32 = 0.02;
const TOP: f32 = 6.0;

fn reference_profile() -> reference::Profile {
    reference::plan(
        &reference::Limits {
            accel: UP.into(),
            decel: UP.into(),
            jerk: JERK.into(),
        },
        false,
        0.0,
        0.0,
        TOP.into(),
    )
}

fn ramp() -> SpeedRamp {
    let mut ramp = SpeedRamp::new(RampLimits::new(UP, UP, JERK).unwrap(), Reverse::Forbidden);
    let _ = ramp.set_target(AngularSpeed::from_rad_per_s(TOP)).unwrap();
    ramp
}

/// Runs `ticks` steps with the given periods and returns the largest speed
/// deviation from the reference, evaluated at the exact sum of the periods.
fn run(ramp: &mut SpeedRamp, periods: impl Iterator<Item = f32>) -> f64 {
    let r = reference_profile();
    let mut t = 0.0_f64;
    let mut worst = 0.0_f64;
    for dt in periods {
        let s = ramp.step(dt).unwrap();
        t += f64::from(dt);
        let (v, _) = r.state_at(t);
        worst = worst.max((f64::from(s.speed.rad_per_s()) - v).abs());
    }
    worst
}

#[test]
fn two_minutes_at_one_kilohertz_do_not_drift() {
    let mut ramp = ramp();
    let worst = run(&mut ramp, std::iter::repeat_n(1.0e-3, 120_000));
    // Tolerance: 4 f32 epsilons of the speed range (hand calculation: one
    // rounding of the in-segment time and two or three in the polynomial). A
    // time accumulated in f32 seconds would be off by up to ~0.5 s after
    // 120,000 additions of 1 ms (half an ulp of 120 s per tick), i.e. 0.025 rad/s
    // here; integer time quanta avoid that entirely.
    let tolerance = 4.0 * f64::from(f32::EPSILON) * f64::from(TOP);
    assert!(worst <= tolerance, "deviation {worst} > {tolerance}");
    // After 120 s the ramp is still on its way (the plan takes 122.5 s) ...
    assert!((ramp.remaining_s() - 2.5).abs() < 1e-4);
    // ... and lands exactly.
    for _ in 0..2_600 {
        let _ = ramp.step(1.0e-3).unwrap();
    }
    let end = ramp.setpoint();
    assert_eq!(end.phase, RampPhase::AtTarget);
    assert_eq!(end.speed.rad_per_s(), TOP);
}

#[test]
fn jittered_ticks_do_not_drift() {
    // Demo data: tick periods drawn uniformly from 0.5 ms to 1.5 ms.
    let mut rng = TestRng::deterministic_rng(RngAlgorithm::ChaCha);
    let periods: Vec<f32> = (0..120_000)
        .map(|_| rng.random_range(0.5e-3..1.5e-3))
        .collect();
    let mut ramp = ramp();
    let worst = run(&mut ramp, periods.into_iter());
    // Same tolerance as above: periods ≥ 2⁻¹³ s convert to time quanta exactly,
    // so the ramp's clock equals the f64 sum of the periods.
    let tolerance = 4.0 * f64::from(f32::EPSILON) * f64::from(TOP);
    assert!(worst <= tolerance, "deviation {worst} > {tolerance}");
}

#[test]
fn re_planning_every_tick_follows_the_same_trajectory() {
    // A target that changes on every tick, by one f32 step, forces a re-plan on
    // every tick. Each re-plan anchors at the ramp's own state with its rounding
    // error carried along (compensated summation), so 12,000 re-plans follow
    // the trajectory of a constant target: no drift, no chatter.
    let limits = RampLimits::new(0.4, 0.6, 0.5).unwrap();
    let mut steady = SpeedRamp::new(limits, Reverse::Forbidden);
    let mut busy = SpeedRamp::new(limits, Reverse::Forbidden);
    let _ = steady
        .set_target(AngularSpeed::from_rad_per_s(3.0))
        .unwrap();
    let below = f32::from_bits(3.0_f32.to_bits() - 1);
    let mut worst = 0.0_f32;
    for k in 0..12_000 {
        let target = if k % 2 == 0 { 3.0 } else { below };
        let _ = busy
            .set_target(AngularSpeed::from_rad_per_s(target))
            .unwrap();
        let a = steady.step(1.0e-3).unwrap();
        let b = busy.step(1.0e-3).unwrap();
        worst = worst.max((a.speed.rad_per_s() - b.speed.rad_per_s()).abs());
    }
    // Tolerance: 4 f32 epsilons of the speed range (hand calculation: one
    // rounding of each output, plus the one-step difference of the targets).
    // Without the carried rounding error the re-anchoring drifted by 1.1e-4
    // rad/s (about 300 epsilons) in this very test.
    assert!(worst <= 4.0 * f32::EPSILON * 3.0, "deviation {worst}");
    // A target that follows a toggling input follows it; once the input
    // settles, the ramp lands exactly.
    let _ = busy.set_target(AngularSpeed::from_rad_per_s(3.0)).unwrap();
    for _ in 0..100 {
        let _ = busy.step(1.0e-3).unwrap();
    }
    let end = busy.setpoint();
    assert_eq!(end.phase, RampPhase::AtTarget);
    assert_eq!(end.speed.rad_per_s(), 3.0);
}
