//! Cross-check of the speed ramp against rsruckig, an independent open-source
//! time-optimal jerk-limited trajectory generator (a Rust port of Ruckig:
//! Berscheid & Kröger, "Jerk-limited Real-time Trajectory Generation with
//! Arbitrary Target States", RSS 2021), through its velocity-control interface.
//!
//! rsruckig limits the acceleration by sign (`min_acceleration` ≤ a ≤
//! `max_acceleration`), not by whether the speed's magnitude rises or falls, so
//! the cases use equal acceleration and deceleration limits, where the two
//! notions agree.
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
use rsruckig::prelude::*;
use swingdrive::reference::ramp as reference;
use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse};

/// Number of random cases (the brief asks for at least 10,000).
const CASES: usize = 10_000;
/// Speed samples compared per case.
const SAMPLES: usize = 64;

struct Case {
    accel: f32,
    jerk: f32,
    v0: f32,
    a0: f32,
    vt: f32,
}

/// Demo data: random limits and states over a wide but realistic span. One case
/// in four starts with an acceleration outside the limit (up to 1.5×).
fn cases() -> Vec<Case> {
    let mut rng = TestRng::deterministic_rng(RngAlgorithm::ChaCha);
    (0..CASES)
        .map(|i| {
            let accel: f32 = rng.random_range(0.05..5.0);
            let jerk: f32 = rng.random_range(0.05..50.0);
            let reach = if i % 4 == 0 { 1.5 } else { 1.0 };
            Case {
                accel,
                jerk,
                v0: rng.random_range(-20.0..20.0),
                a0: rng.random_range(-reach..reach) * accel,
                vt: rng.random_range(-20.0..20.0),
            }
        })
        .collect()
}

fn ruckig(c: &Case) -> Trajectory<1> {
    let mut otg = Ruckig::<1, ThrowErrorHandler>::new(None, 0.001);
    let mut input = InputParameter::new(None);
    input.control_interface = ControlInterface::Velocity;
    input.current_velocity[0] = f64::from(c.v0);
    input.current_acceleration[0] = f64::from(c.a0);
    input.target_velocity[0] = f64::from(c.vt);
    input.target_acceleration[0] = 0.0;
    input.max_velocity[0] = 1.0e3;
    input.max_acceleration[0] = f64::from(c.accel);
    input.max_jerk[0] = f64::from(c.jerk);
    let mut traj = Trajectory::new(None);
    let result = otg.calculate(&input, &mut traj).unwrap();
    assert_eq!(result, RuckigResult::Working);
    traj
}

fn ruckig_speed(traj: &Trajectory<1>, t: f64) -> (f64, f64) {
    let mut p = daov_stack![0.0];
    let mut v = daov_stack![0.0];
    let mut a = daov_stack![0.0];
    let mut j = daov_stack![0.0];
    traj.at_time(
        t,
        &mut Some(&mut p),
        &mut Some(&mut v),
        &mut Some(&mut a),
        &mut Some(&mut j),
        &mut None,
    );
    (v[0], a[0])
}

#[test]
fn reference_durations_agree_with_rsruckig() {
    // Tolerance from the brief: 1e-9 relative (rsruckig itself pads a brake
    // phase by f64::EPSILON seconds, far below this).
    let mut worst = 0.0_f64;
    for c in cases() {
        let limits = reference::Limits {
            accel: f64::from(c.accel),
            decel: f64::from(c.accel),
            jerk: f64::from(c.jerk),
        };
        let ours = reference::plan(&limits, true, c.v0.into(), c.a0.into(), c.vt.into());
        let theirs = ruckig(&c).get_duration();
        let rel = (ours.duration() - theirs).abs() / theirs.max(f64::MIN_POSITIVE);
        worst = worst.max(rel);
        assert!(
            rel <= 1e-9,
            "duration {} vs rsruckig {} for v0={} a0={} vt={} a={} j={}",
            ours.duration(),
            theirs,
            c.v0,
            c.a0,
            c.vt,
            c.accel,
            c.jerk
        );
    }
    println!("largest relative duration difference: {worst:e}");
}

#[test]
fn f32_speed_trajectories_agree_with_rsruckig() {
    // Durations of the f32 plan are not compared: near the overshoot boundary a
    // phase time is a difference of nearly equal square roots and is
    // ill-conditioned, while the speed trajectory is not. Tolerance: 8 f32
    // epsilons of the speed range of the case (hand calculation: the anchors
    // carry a few roundings of |v| each, and evaluation adds a few more).
    let mut worst = 0.0_f64;
    for c in cases() {
        let limits = RampLimits::new(c.accel, c.accel, c.jerk).unwrap();
        let plan = Plan::new(
            &limits,
            Reverse::Allowed,
            AngularSpeed::from_rad_per_s(c.v0),
            c.a0,
            AngularSpeed::from_rad_per_s(c.vt),
        )
        .unwrap();
        let traj = ruckig(&c);
        let end = traj.get_duration().max(f64::from(plan.duration_s())) * 1.02 + 1e-3;
        let mut range = f64::from(c.v0.abs().max(c.vt.abs()));
        let mut deviation = 0.0_f64;
        for k in 0..=SAMPLES {
            // Evaluate both at the same instant, exactly representable in f32.
            let t = (end * k as f64 / SAMPLES as f64) as f32;
            let ours = plan.state_at(t).unwrap().speed.rad_per_s();
            let (theirs, _) = ruckig_speed(&traj, f64::from(t));
            range = range.max(theirs.abs());
            deviation = deviation.max((f64::from(ours) - theirs).abs());
        }
        // Same final state: the plan ends exactly on the target, rsruckig to
        // within its f64 rounding.
        let (theirs_end, theirs_acc) = ruckig_speed(&traj, traj.get_duration());
        assert!((theirs_end - f64::from(c.vt)).abs() <= 1e-9 * range.max(1.0));
        assert!(theirs_acc.abs() <= 1e-9 * f64::from(c.accel).max(1.0));
        let after = plan.state_at(plan.duration_s() * 1.001 + 1e-3).unwrap();
        assert_eq!(after.speed.rad_per_s(), c.vt);
        assert_eq!(after.acceleration_rad_s2, 0.0);
        let tolerance = 8.0 * f64::from(f32::EPSILON) * range;
        let relative = deviation / (f64::from(f32::EPSILON) * range);
        worst = worst.max(relative);
        assert!(
            deviation <= tolerance,
            "speed deviation {deviation} > {tolerance} for v0={} a0={} vt={} a={} j={}",
            c.v0,
            c.a0,
            c.vt,
            c.accel,
            c.jerk
        );
    }
    println!("largest speed deviation: {worst:.2} f32 epsilons of the speed range");
}
