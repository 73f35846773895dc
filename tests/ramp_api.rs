//! The ramp's interface: refused inputs, reverse policy, re-seeding, queries.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::ramp::{ReseedError, ReseedReason, Samples, MAX_SEGMENTS};
use swingdrive::{
    AngularSpeed, ParamError, Plan, RampLimits, RampPhase, Reverse, SpeedRamp, TargetStatus,
};

fn rad_s(v: f32) -> AngularSpeed {
    AngularSpeed::from_rad_per_s(v)
}

/// Demo data (an invented ride): 0.2 rad/s² up, 0.3 rad/s² down, 0.4 rad/s³.
fn ramp(reverse: Reverse) -> SpeedRamp {
    SpeedRamp::new(RampLimits::new(0.2, 0.3, 0.4).unwrap(), reverse)
}

fn run_until_reached(ramp: &mut SpeedRamp, dt: f32) -> usize {
    let bound = (ramp.remaining_s() / dt) as usize + 2;
    for k in 0..bound {
        if ramp.step(dt).unwrap().target_reached() {
            return k + 1;
        }
    }
    panic!("not reached within the remaining time");
}

#[test]
fn bad_targets_and_ticks_are_refused_by_name_and_change_nothing() {
    let mut r = ramp(Reverse::Allowed);
    let _ = r.set_target(rad_s(2.0)).unwrap();
    for _ in 0..100 {
        let _ = r.step(0.01).unwrap();
    }
    let before = r.clone();
    assert_eq!(
        r.set_target(rad_s(f32::NAN)),
        Err(ParamError::NonFinite("target"))
    );
    assert_eq!(
        r.set_target(rad_s(f32::NEG_INFINITY)),
        Err(ParamError::NonFinite("target"))
    );
    assert_eq!(
        r.set_target(rad_s(2.0e4)),
        Err(ParamError::OutOfRange("target"))
    );
    assert_eq!(r.step(f32::NAN), Err(ParamError::NonFinite("dt_s")));
    assert_eq!(r.step(0.0), Err(ParamError::NotPositive("dt_s")));
    assert_eq!(r.step(-1e-3), Err(ParamError::Negative("dt_s")));
    assert_eq!(r.step(1.5), Err(ParamError::OutOfRange("dt_s")));
    assert_eq!(r, before);
    assert_eq!(r.predict(-1.0), Err(ParamError::Negative("ahead_s")));
    assert_eq!(
        r.sample::<4>(0.0).map(|s| s.not_stored),
        Err(ParamError::NotPositive("period_s"))
    );
    assert_eq!(
        Plan::new(
            &r.limits(),
            Reverse::Forbidden,
            rad_s(-1.0),
            0.0,
            rad_s(1.0)
        ),
        Err(ParamError::Negative("speed"))
    );
    assert_eq!(
        Plan::new(
            &r.limits(),
            Reverse::Allowed,
            rad_s(0.0),
            f32::NAN,
            rad_s(1.0)
        ),
        Err(ParamError::NonFinite("acceleration"))
    );
}

#[test]
fn negative_targets_are_clamped_and_reported_when_reverse_is_forbidden() {
    let mut r = ramp(Reverse::Forbidden);
    let _ = r.set_target(rad_s(1.0)).unwrap();
    run_until_reached(&mut r, 0.01);
    assert_eq!(r.set_target(rad_s(-3.0)), Ok(TargetStatus::ClampedToZero));
    assert_eq!(r.target(), rad_s(0.0));
    run_until_reached(&mut r, 0.01);
    assert_eq!(r.setpoint().speed, rad_s(0.0));
    // Reverse allowed: taken as given, and reached exactly.
    let mut r = ramp(Reverse::Allowed);
    assert_eq!(r.set_target(rad_s(-3.0)), Ok(TargetStatus::Accepted));
    run_until_reached(&mut r, 0.01);
    assert_eq!(r.setpoint().speed, rad_s(-3.0));
}

#[test]
fn reseed_only_lowers_the_speed_magnitude() {
    let mut r = ramp(Reverse::Allowed);
    let _ = r.set_target(rad_s(4.0)).unwrap();
    run_until_reached(&mut r, 0.01);
    let before = r.clone();
    let why = ReseedReason::CoastingTakeover;
    assert_eq!(r.reseed(rad_s(4.5), why), Err(ReseedError::Faster));
    assert_eq!(
        r.reseed(rad_s(-1.0), why),
        Err(ReseedError::OppositeDirection)
    );
    assert_eq!(r.reseed(rad_s(f32::NAN), why), Err(ReseedError::NonFinite));
    assert_eq!(r, before);
    // Lower, same direction: the ramp takes the measured speed with zero
    // acceleration and plans back up to its target from there.
    let s = r.reseed(rad_s(2.5), ReseedReason::DriveFellBehind).unwrap();
    assert_eq!(s.speed, rad_s(2.5));
    assert_eq!(s.acceleration_rad_s2, 0.0);
    assert_eq!(r.target(), rad_s(4.0));
    // Hand calculation: 1.5 rad/s at 0.2 rad/s², 0.4 rad/s³ (Biagiotti &
    // Melchiorri 2008 §3.4): 1.5/0.2 + 0.2/0.4 = 8 s.
    assert!((r.remaining_s() - 8.0).abs() < 1e-4);
    run_until_reached(&mut r, 0.01);
    assert_eq!(r.setpoint().speed, rad_s(4.0));
    // Zero is always allowed.
    assert!(r.reseed(rad_s(0.0), ReseedReason::CoastingTakeover).is_ok());
    assert!(ReseedError::Faster.to_string().contains("measured_speed"));
}

#[test]
fn predictions_match_the_ticks_that_follow() {
    let mut r = ramp(Reverse::Allowed);
    let _ = r.set_target(rad_s(-2.0)).unwrap();
    for _ in 0..37 {
        let _ = r.step(0.01).unwrap();
    }
    let _ = r.set_target(rad_s(3.0)).unwrap();
    assert_eq!(r.predict(0.0).unwrap(), r.setpoint());
    let ahead: Vec<_> = (1..=500).map(|k| r.predict(k as f32 * 0.01)).collect();
    let total = r.remaining_s();
    for (k, predicted) in ahead.into_iter().enumerate() {
        let s = r.step(0.01).unwrap();
        // Tolerance 1e-6 (hand calculation): `k as f32 * 0.01` differs from the
        // sum of k ticks of 0.01 by up to an f32 ulp of the look-ahead time
        // (≤ 5e-7 s here), times |a| ≤ 0.3 or j = 0.4.
        let p = predicted.unwrap();
        assert!(
            (p.speed.rad_per_s() - s.speed.rad_per_s()).abs() <= 1e-6
                && (p.acceleration_rad_s2 - s.acceleration_rad_s2).abs() <= 1e-6,
            "tick {k}: {p:?} vs {s:?}"
        );
        // Remaining time falls by one tick per tick (to within one quantum).
        let expected = (total - 0.01 * (k + 1) as f32).max(0.0);
        assert!((r.remaining_s() - expected).abs() < 1e-4);
    }
    let far = r.predict(1.0e6).unwrap();
    assert_eq!(far.phase, RampPhase::AtTarget);
    assert_eq!(far.speed, rad_s(3.0));
}

#[test]
fn sampling_reports_what_did_not_fit() {
    let mut r = ramp(Reverse::Forbidden);
    let _ = r.set_target(rad_s(1.0)).unwrap();
    // Hand calculation: 1/0.2 + 0.2/0.4 = 5.5 s; at 0.5 s that is samples at
    // 0, 0.5, ..., 5.5: 12 of them.
    assert!((r.remaining_s() - 5.5).abs() < 1e-5);
    let small: Samples<5> = r.sample(0.5).unwrap();
    assert_eq!(small.points.len(), 5);
    assert_eq!(small.not_stored, 7);
    for (k, p) in small.points.iter().enumerate() {
        assert_eq!(*p, r.predict(k as f32 * 0.5).unwrap());
    }
    let all: Samples<64> = r.sample(0.5).unwrap();
    assert_eq!(all.points.len(), 12);
    assert_eq!(all.not_stored, 0);
    assert_eq!(all.points.last().unwrap().speed, rad_s(1.0));
    assert!(all.points.last().unwrap().target_reached());
    // A period that does not divide the plan gets one extra sample at the end.
    let odd: Samples<64> = r.sample(0.4).unwrap();
    assert_eq!(odd.points.len(), 15);
    assert!(odd.points.last().unwrap().target_reached());
    // Standing still: one sample, the target.
    run_until_reached(&mut r, 0.01);
    let still: Samples<4> = r.sample(0.1).unwrap();
    assert_eq!(still.points.len(), 1);
    assert_eq!(still.not_stored, 0);
}

#[test]
fn a_steeper_limit_set_brakes_the_acceleration_back() {
    let mut r = ramp(Reverse::Forbidden);
    let _ = r.set_target(rad_s(10.0)).unwrap();
    for _ in 0..300 {
        let _ = r.step(0.01).unwrap();
    }
    assert!((r.setpoint().acceleration_rad_s2 - 0.2).abs() < 1e-6);
    // Demo data: a gentler set, 0.1 rad/s² up, same jerk 0.4 rad/s³.
    r.set_limits(RampLimits::new(0.1, 0.3, 0.4).unwrap());
    assert!(r.plan().braked_initial_acceleration());
    // Hand calculation: braking 0.2 → 0.1 at 0.4 rad/s³ takes 0.25 s.
    let s = r.predict(0.25).unwrap();
    assert!((s.acceleration_rad_s2 - 0.1).abs() < 1e-5);
    run_until_reached(&mut r, 0.01);
    assert_eq!(r.setpoint().speed, rad_s(10.0));
}

#[test]
fn a_lower_jerk_near_standstill_stops_at_zero_and_says_so() {
    let mut r = ramp(Reverse::Forbidden);
    let _ = r.set_target(rad_s(1.0)).unwrap();
    run_until_reached(&mut r, 0.01);
    let _ = r.set_target(rad_s(0.0)).unwrap();
    // Run into the final jerk phase of the stop, where speed ≈ a²/(2j).
    while r.remaining_s() > 0.3 {
        let _ = r.step(0.01).unwrap();
    }
    let s = r.setpoint();
    assert!(s.acceleration_rad_s2 < -0.05);
    // Demo data: a jerk limit ten times lower would pass zero speed.
    r.set_limits(RampLimits::new(0.2, 0.3, 0.04).unwrap());
    assert!(r.plan().jerk_raised());
    // The raised jerk is never above the old limit (hand calculation: the state
    // was consistent with 0.4 rad/s³, so a²/(2v) ≤ 0.4).
    for seg in r.plan().segments() {
        assert!(seg.jerk_rad_s3().abs() <= 0.4 * (1.0 + 1e-4));
    }
    let steps = run_until_reached(&mut r, 0.001);
    assert!(steps > 0);
    assert_eq!(r.setpoint().speed, rad_s(0.0));
}

#[test]
fn plans_never_need_more_segments_than_the_capacity() {
    // Hand-picked worst cases: a prefix segment followed by a five-segment
    // crossing; checked over a grid of starts as well.
    let limit_sets = [
        (0.5, 1.0, 1.0),
        (1.0, 0.5, 1.0),
        (0.3, 2.0, 5.0),
        (2.0, 0.3, 0.2),
    ];
    let mut most = 0;
    for (up, down, j) in limit_sets {
        let l = RampLimits::new(up, down, j).unwrap();
        for v0 in [-6.0, -2.0, -0.3, -0.01, 0.0, 0.01, 0.3, 2.0, 6.0] {
            for a0 in [-3.0, -1.0, -0.5, -0.1, 0.0, 0.1, 0.5, 1.0, 3.0] {
                for vt in [-6.0, -1.0, -0.05, 0.0, 0.05, 1.0, 6.0] {
                    let p = Plan::new(&l, Reverse::Allowed, rad_s(v0), a0, rad_s(vt)).unwrap();
                    most = most.max(p.segments().len());
                    let end = p.state_at(1.0e7).unwrap();
                    assert_eq!(end.speed, rad_s(vt));
                    assert_eq!(end.acceleration_rad_s2, 0.0);
                }
            }
        }
    }
    assert_eq!(most, MAX_SEGMENTS);
}
