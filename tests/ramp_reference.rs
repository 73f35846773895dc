//! The `f32` closed-form plan against the independent `f64` reference, with
//! different acceleration and deceleration limits and moves through zero speed.
//!
//! The two choose the profile through zero speed by different means: the target
//! code by a closed-form case analysis, the reference by numerically minimising
//! the total time over the acceleration at the crossing. Agreement of the speed
//! trajectories therefore checks that the case analysis is time-optimal.
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
use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse};

const CASES: usize = 4_000;
const SAMPLES: usize = 100;

#[test]
fn unequal_limits_and_zero_crossings_match_the_reference() {
    let mut rng = TestRng::deterministic_rng(RngAlgorithm::ChaCha);
    let (mut crossings_up, mut crossings_down) = (0, 0);
    let (mut worst_speed, mut worst_duration) = (0.0_f64, 0.0_f64);
    for i in 0..CASES {
        // Demo data: random limits and states.
        let up: f32 = rng.random_range(0.2..3.0);
        let down: f32 = rng.random_range(0.2..3.0);
        let jerk: f32 = rng.random_range(0.2..20.0);
        let v0: f32 = rng.random_range(-10.0..10.0);
        let vt: f32 = rng.random_range(-10.0..10.0);
        // Every fifth case may start outside the limit that applies.
        let reach = if i % 5 == 0 { 1.5 } else { 1.0 };
        let a_guess: f32 = rng.random_range(-reach..reach);
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let a0 = a_guess * limits.bound_for(v0, a_guess);
        if v0 * vt < 0.0 {
            if up > down {
                crossings_up += 1;
            } else {
                crossings_down += 1;
            }
        }
        let plan = Plan::new(
            &limits,
            Reverse::Allowed,
            AngularSpeed::from_rad_per_s(v0),
            a0,
            AngularSpeed::from_rad_per_s(vt),
        )
        .unwrap();
        let r = reference::plan(
            &reference::Limits {
                accel: up.into(),
                decel: down.into(),
                jerk: jerk.into(),
            },
            true,
            v0.into(),
            a0.into(),
            vt.into(),
        );
        let end = r.duration().max(f64::from(plan.duration_s())) * 1.02 + 1e-3;
        let mut range = f64::from(v0.abs().max(vt.abs()));
        let mut deviation = 0.0_f64;
        for k in 0..=SAMPLES {
            let t = (end * k as f64 / SAMPLES as f64) as f32;
            let ours = plan.state_at(t).unwrap().speed.rad_per_s();
            let (theirs, _) = r.state_at(f64::from(t));
            range = range.max(theirs.abs());
            deviation = deviation.max((f64::from(ours) - theirs).abs());
        }
        // Tolerance: 16 f32 epsilons of the speed range (hand calculation: with
        // up to five segments and holds of tens of seconds, each f32 duration
        // carries a few epsilons of its own length, which shifts the later
        // segments in time by that much; the reference's golden-section search
        // adds ~1e-12 of its own).
        let relative = deviation / (f64::from(f32::EPSILON) * range);
        worst_speed = worst_speed.max(relative);
        assert!(
            relative <= 16.0,
            "speed deviation {relative} eps: up={up} down={down} j={jerk} v0={v0} a0={a0} vt={vt}"
        );
        // Durations, only where they are well conditioned: no overshoot and no
        // initial brake (see the rsruckig cross-check for why).
        if !plan.overshoots() && !plan.braked_initial_acceleration() && r.duration() > 0.1 {
            let rel = (f64::from(plan.duration_s()) - r.duration()).abs() / r.duration();
            worst_duration = worst_duration.max(rel);
            assert!(
                rel <= 1e-5,
                "duration {} vs {}: up={up} down={down} j={jerk} v0={v0} a0={a0} vt={vt}",
                plan.duration_s(),
                r.duration()
            );
        }
    }
    println!(
        "largest speed deviation {worst_speed:.2} eps of range; largest duration difference \
         {worst_duration:e}; crossings with accel > decel: {crossings_up}, accel < decel: {crossings_down}"
    );
    assert!(crossings_up > 500 && crossings_down > 500);
}
