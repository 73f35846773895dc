//! Closed-form durations of the speed ramp, checked against the textbook and
//! against hand calculations (each check names its source).
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]
// Uses the f64 reference, which is host-only (feature `std`).
#![cfg(feature = "std")]

use swingdrive::reference::ramp as reference;
use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse};

fn plan(up: f32, down: f32, jerk: f32, reverse: Reverse, v0: f32, a0: f32, vt: f32) -> Plan {
    Plan::new(
        &RampLimits::new(up, down, jerk).unwrap(),
        reverse,
        AngularSpeed::from_rad_per_s(v0),
        a0,
        AngularSpeed::from_rad_per_s(vt),
    )
    .unwrap()
}

/// f32 durations: 1e-5 relative (a few f32 roundings of each phase time).
fn assert_duration(p: &Plan, expected: f64) {
    let got = f64::from(p.duration_s());
    assert!(
        (got - expected).abs() <= 1e-5 * expected,
        "duration {got} s, expected {expected} s"
    );
}

/// Largest |acceleration| while the speed's magnitude rises and while it falls,
/// and the speed extremes, sampled every millisecond.
fn extremes(p: &Plan) -> (f32, f32, f32, f32) {
    let (mut rising, mut falling) = (0.0_f32, 0.0_f32);
    let (mut lo, mut hi) = (f32::INFINITY, f32::NEG_INFINITY);
    let n = (p.duration_s() * 1000.0) as usize + 2;
    for k in 0..=n {
        let s = p.state_at(k as f32 * 1e-3).unwrap();
        let (v, a) = (s.speed.rad_per_s(), s.acceleration_rad_s2);
        if v * a < 0.0 {
            falling = falling.max(a.abs());
        } else {
            rising = rising.max(a.abs());
        }
        lo = lo.min(v);
        hi = hi.max(v);
    }
    (rising, falling, lo, hi)
}

#[test]
fn rest_to_rest_acceleration_limit_reached() {
    // Biagiotti & Melchiorri (2008) §3.4: T = dv/a + a/j = 4/1 + 1/2 = 4.5 s.
    assert_duration(&plan(1.0, 1.0, 2.0, Reverse::Forbidden, 0.0, 0.0, 4.0), 4.5);
    // Same formula on the way down, with the deceleration limit:
    // 4/0.5 + 0.5/2 = 8.25 s (hand calculation, common practice).
    assert_duration(
        &plan(1.0, 0.5, 2.0, Reverse::Forbidden, 4.0, 0.0, 0.0),
        8.25,
    );
    // And in reverse, where a positive acceleration lowers |v|: from -4 to 0
    // the deceleration limit applies again, 8.25 s (hand calculation).
    assert_duration(&plan(1.0, 0.5, 2.0, Reverse::Allowed, -4.0, 0.0, 0.0), 8.25);
    // From 0 to -4 the acceleration limit: 4/1 + 1/2 = 4.5 s (hand calculation).
    assert_duration(&plan(1.0, 0.5, 2.0, Reverse::Allowed, 0.0, 0.0, -4.0), 4.5);
}

#[test]
fn rest_to_rest_acceleration_limit_not_reached() {
    // Biagiotti & Melchiorri (2008) §3.4: T = 2·sqrt(dv/j) = 2·sqrt(0.125/2) = 0.5 s,
    // with peak acceleration sqrt(dv·j) = 0.5 rad/s² < 1.
    let p = plan(1.0, 1.0, 2.0, Reverse::Forbidden, 0.0, 0.0, 0.125);
    assert_duration(&p, 0.5);
    assert_eq!(p.segments().len(), 2);
    let (rising, _, _, hi) = extremes(&p);
    assert!((rising - 0.5).abs() < 1e-3 && hi <= 0.125);
}

#[test]
fn textbook_formulas_over_a_sweep() {
    // Biagiotti & Melchiorri (2008) §3.4, both branches, over 200 speed changes
    // (the reference implements the formula literally).
    for k in 1..=200 {
        let dv = k as f32 * 0.05;
        let p = plan(0.8, 0.8, 1.5, Reverse::Forbidden, 1.0, 0.0, 1.0 + dv);
        assert_duration(&p, reference::rest_to_rest_duration(dv.into(), 0.8, 1.5));
    }
}

#[test]
fn initial_acceleration_toward_the_target() {
    // Hand calculation: v0 = 0, a0 = 0.5, target 4, a = 1, j = 2. Rise 0.5→1 takes
    // 0.25 s, the fall 1→0 takes 0.5 s, the hold covers
    // 4 - (1 - 0.25)/4 - 1/4 = 3.5625 rad/s at 1 rad/s²: T = 4.3125 s.
    // (Equivalently: virtual rest start 0.5²/4 = 0.0625 lower and 0.25 s
    // earlier, 4.0625/1 + 1/2 - 0.25 = 4.3125 s.)
    let p = plan(1.0, 1.0, 2.0, Reverse::Forbidden, 0.0, 0.5, 4.0);
    assert_duration(&p, 4.3125);
    assert!(!p.overshoots() && !p.braked_initial_acceleration());
}

#[test]
fn initial_acceleration_pointing_away() {
    // Hand calculation: v0 = 2, a0 = -1, target 4, a = 1, j = 2. First a → 0 at
    // full jerk: 0.5 s, speed falls to 2 - 1/4 = 1.75; then a rest-to-rest rise of
    // 2.25: 2.25/1 + 1/2 = 2.75 s. T = 3.25 s.
    let p = plan(1.0, 1.0, 2.0, Reverse::Forbidden, 2.0, -1.0, 4.0);
    assert_duration(&p, 3.25);
    let (_, _, lo, hi) = extremes(&p);
    assert!((lo - 1.75).abs() < 1e-5 && hi == 4.0);
}

#[test]
fn unavoidable_overshoot_is_the_smallest_possible() {
    // Hand calculation: v0 = 0, a0 = 1 toward target 0.1, j = 2: even bringing
    // a to zero at once (0.5 s) ends at 0 + 1²/4 = 0.25 > 0.1, the smallest
    // possible peak. Then down 0.15 without reaching a = 1:
    // 2·sqrt(0.15/2) = 0.547723 s. T = 1.047723 s.
    let p = plan(1.0, 1.0, 2.0, Reverse::Forbidden, 0.0, 1.0, 0.1);
    assert!(p.overshoots());
    assert_duration(&p, 0.5 + 2.0 * (0.15_f64 / 2.0).sqrt());
    let (_, _, _, hi) = extremes(&p);
    assert!((hi - 0.25).abs() < 1e-6 && hi <= 0.25);
}

#[test]
fn acceleration_outside_the_limits_is_braked_first() {
    // Hand calculation: v0 = 0, a0 = 3 > a = 1, j = 2, target 10. Brake 3→1 takes
    // 1 s and gains (9 - 1)/4 = 2 rad/s; then from (2, 1): hold
    // 8 - 1/2 + 1/4 = 7.75 s and fall 0.5 s. T = 9.25 s.
    let p = plan(1.0, 1.0, 2.0, Reverse::Forbidden, 0.0, 3.0, 10.0);
    assert!(p.braked_initial_acceleration());
    assert_duration(&p, 9.25);
    let s = p.state_at(1.0).unwrap();
    assert!((s.speed.rad_per_s() - 2.0).abs() < 1e-5);
    assert!((s.acceleration_rad_s2 - 1.0).abs() < 1e-5);
}

#[test]
fn reverse_crossing_with_a_looser_limit_after_zero() {
    // Hand calculation: 2 → -2 rad/s, acceleration limit 1, deceleration 0.5,
    // j = 1. Before zero |a| ≤ 0.5: rise to 0.5 (0.5 s, 0.125 rad/s), hold until
    // zero speed (1.875/0.5 = 3.75 s); after zero |a| ≤ 1: from (0, 0.5) the
    // virtual rest start lies 0.125 behind, (2.125/1 + 1/1) - 0.5 = 2.625 s.
    // T = 6.875 s, against 4.5 + 3 = 7.5 s for stopping at zero and restarting.
    let p = plan(1.0, 0.5, 1.0, Reverse::Allowed, 2.0, 0.0, -2.0);
    assert_duration(&p, 6.875);
    let (rising, falling, _, _) = extremes(&p);
    assert!(falling <= 0.5 + 1e-5 && (rising - 1.0).abs() < 1e-5);
}

#[test]
fn reverse_crossing_with_a_tighter_limit_after_zero() {
    // Hand calculation: the time reverse of the previous case (acceleration 0.5,
    // deceleration 1): rise to 1 (1 s), hold 1.125 s, fall to 0.5 exactly at zero
    // speed (0.5 s), hold 3.75 s, fall 0.5 s. T = 6.875 s.
    let p = plan(0.5, 1.0, 1.0, Reverse::Allowed, 2.0, 0.0, -2.0);
    assert_duration(&p, 6.875);
    let (rising, falling, _, _) = extremes(&p);
    assert!(rising <= 0.5 + 1e-5 && (falling - 1.0).abs() < 1e-5);
    assert_eq!(p.segments().len(), 5);
}

#[test]
fn reverse_crossing_early_or_late_in_the_profile() {
    // Hand calculation: from 0.1 the first ramp reaches zero speed at
    // a = sqrt(2·1·0.1) = 0.447 < 0.5, so the deceleration limit never binds:
    // 5.1/1 + 1/1 = 6.1 s.
    assert_duration(&plan(1.0, 0.5, 1.0, Reverse::Allowed, 0.1, 0.0, -5.0), 6.1);
    // Hand calculation: to -0.1 the crossing falls in the final ramp, where
    // |a| = sqrt(2·0.1) = 0.447 < 0.5: the whole move keeps 0.5:
    // 4.1/0.5 + 0.5/1 = 8.7 s.
    assert_duration(&plan(1.0, 0.5, 1.0, Reverse::Allowed, 4.0, 0.0, -0.1), 8.7);
}
