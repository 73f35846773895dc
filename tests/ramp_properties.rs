//! Property tests of the online speed ramp: limits at every tick, no passing of
//! a target approached monotonically, exact landing, no NaN; random target
//! changes every few ticks and jittered tick periods.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use proptest::prelude::*;
use swingdrive::{AngularSpeed, RampLimits, RampPhase, Reverse, SpeedRamp};

/// One target change: the target, how many ticks it is held, and the jitter of
/// each of those ticks (a factor in [0.5, 1.5] of the base period).
#[derive(Debug, Clone)]
struct Change {
    target: f32,
    jitter: Vec<f32>,
}

fn changes(max_speed: f32) -> impl Strategy<Value = Vec<Change>> {
    prop::collection::vec(
        (
            -max_speed..max_speed,
            prop::collection::vec(0.5_f32..1.5, 1..60),
        )
            .prop_map(|(target, jitter)| Change { target, jitter }),
        1..25,
    )
}

fn reverse() -> impl Strategy<Value = Reverse> {
    prop_oneof![Just(Reverse::Forbidden), Just(Reverse::Allowed)]
}

/// Checks of one tick against the previous one; returns the new state.
struct Checker {
    limits: RampLimits,
    reverse: Reverse,
    range: f32,
}

impl Checker {
    fn tick(&self, prev: (f32, f32), now: (f32, f32), dt: f32) {
        let (v, a) = now;
        assert!(v.is_finite() && a.is_finite());
        if self.reverse == Reverse::Forbidden {
            assert!(v >= 0.0, "negative speed {v} with reverse forbidden");
        }
        // The limit that applies: by the signs of speed and acceleration; within
        // a rounding band around zero speed the larger one (the sign of v there
        // is decided by rounding). Float tolerance: 1e-5 relative.
        let near_zero = v.abs() <= 1e-5 * self.range;
        let bound = if near_zero {
            self.limits
                .max_acceleration_rad_s2()
                .max(self.limits.max_deceleration_rad_s2())
        } else {
            self.limits.bound_for(v, a)
        };
        assert!(
            a.abs() <= bound * (1.0 + 1e-5),
            "|a| = {a} above {bound} at v = {v}"
        );
        // Continuity of the speed: |Δv| ≤ (max |a| at the ends + j·dt)·dt (a
        // is piecewise linear; inside one tick it can exceed its end values by
        // at most j·dt/2), plus a few f32 roundings of the speed.
        let j = self.limits.max_jerk_rad_s3();
        let dv = (v - prev.0).abs();
        let dv_max = (a.abs().max(prev.1.abs()) + j * dt) * dt + 4.0 * f32::EPSILON * self.range;
        assert!(dv <= dv_max, "speed step {dv} above {dv_max}");
        // Jerk: |Δa| ≤ j·dt, plus a few f32 roundings of the acceleration.
        let da = (a - prev.1).abs();
        let a_scale = self
            .limits
            .max_acceleration_rad_s2()
            .max(self.limits.max_deceleration_rad_s2());
        assert!(
            da <= j * dt * (1.0 + 1e-4) + 8.0 * f32::EPSILON * a_scale,
            "jerk {} above {j}",
            da / dt
        );
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn limits_hold_and_targets_are_landed_exactly(
        up in 0.05_f32..3.0,
        down in 0.05_f32..3.0,
        jerk in 0.05_f32..30.0,
        reverse in reverse(),
        base_dt in 1e-4_f32..2e-2,
        plan in changes(20.0),
    ) {
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let mut ramp = SpeedRamp::new(limits, reverse);
        let check = Checker { limits, reverse, range: 20.0 };
        let mut prev = (0.0_f32, 0.0_f32);
        for change in &plan {
            let _ = ramp.set_target(AngularSpeed::from_rad_per_s(change.target)).unwrap();
            let vt = ramp.target().rad_per_s();
            let start = ramp.setpoint().speed.rad_per_s();
            // Without a forced overshoot the speed stays on its side of the
            // target (exactly, no tolerance), whatever the initial acceleration.
            let side = (vt - start).signum();
            let monotone = !ramp.plan().overshoots();
            for &f in &change.jitter {
                let dt = base_dt * f;
                let s = ramp.step(dt).unwrap();
                let now = (s.speed.rad_per_s(), s.acceleration_rad_s2);
                check.tick(prev, now, dt);
                if monotone {
                    prop_assert!(side * (vt - now.0) >= 0.0, "passed target {vt}: {}", now.0);
                }
                if s.phase == RampPhase::AtTarget {
                    prop_assert_eq!(now, (vt, 0.0));
                }
                prev = now;
            }
        }
        // Run out the last plan: it lands exactly, with zero acceleration, within
        // the predicted time (bounded loop).
        let ticks = (ramp.remaining_s() / base_dt) as usize + 2;
        for _ in 0..ticks {
            let s = ramp.step(base_dt).unwrap();
            let now = (s.speed.rad_per_s(), s.acceleration_rad_s2);
            check.tick(prev, now, base_dt);
            prev = now;
        }
        let end = ramp.setpoint();
        prop_assert_eq!(end.phase, RampPhase::AtTarget);
        prop_assert_eq!(end.speed, ramp.target());
        prop_assert_eq!(end.acceleration_rad_s2, 0.0);
    }

    #[test]
    fn a_limit_change_mid_ramp_is_braked_at_the_new_jerk(
        up in 0.05_f32..3.0,
        down in 0.05_f32..3.0,
        jerk in 0.05_f32..30.0,
        new_up in 0.05_f32..3.0,
        new_down in 0.05_f32..3.0,
        new_jerk in 0.05_f32..30.0,
        reverse in reverse(),
        target in -20.0_f32..20.0,
        switch_after in 1_usize..3000,
    ) {
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let mut ramp = SpeedRamp::new(limits, reverse);
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(target)).unwrap();
        let dt = 1e-3;
        for _ in 0..switch_after {
            let _ = ramp.step(dt).unwrap();
        }
        let new = RampLimits::new(new_up, new_down, new_jerk).unwrap();
        ramp.set_limits(new);
        let raised = ramp.plan().jerk_raised();
        let mut prev = ramp.setpoint();
        let ticks = (ramp.remaining_s() / dt) as usize + 2;
        for _ in 0..ticks {
            let s = ramp.step(dt).unwrap();
            let v = s.speed.rad_per_s();
            prop_assert!(v.is_finite());
            if reverse == Reverse::Forbidden {
                prop_assert!(v >= 0.0);
            }
            let (a, a_prev) = (s.acceleration_rad_s2, prev.acceleration_rad_s2);
            let dv = (v - prev.speed.rad_per_s()).abs();
            let jerk_now = if raised { jerk.max(new_jerk) } else { new_jerk };
            prop_assert!(
                dv <= (a.abs().max(a_prev.abs()) + jerk_now * dt) * dt + 1e-4,
                "speed step {dv}"
            );
            let da = (a - a_prev).abs();
            if !raised {
                prop_assert!(da <= new_jerk * dt * (1.0 + 1e-4) + 1e-5);
            }
            // Once inside the new limit, the acceleration stays inside it.
            let bound = new.bound_for(v, s.acceleration_rad_s2);
            let was_inside = prev.acceleration_rad_s2.abs()
                <= new.bound_for(prev.speed.rad_per_s(), prev.acceleration_rad_s2);
            if was_inside && v.abs() > 1e-4 {
                prop_assert!(s.acceleration_rad_s2.abs() <= bound * (1.0 + 1e-5));
            }
            prev = s;
        }
        prop_assert_eq!(ramp.setpoint().speed, ramp.target());
        prop_assert_eq!(ramp.setpoint().acceleration_rad_s2, 0.0);
    }

    #[test]
    fn any_finite_input_gives_a_finite_setpoint_or_an_error(
        up in 1e-3_f32..1e3,
        down in 1e-3_f32..1e3,
        jerk in 1e-3_f32..1e5,
        reverse in reverse(),
        inputs in prop::collection::vec((any::<f32>(), any::<f32>()), 1..40),
    ) {
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let mut ramp = SpeedRamp::new(limits, reverse);
        for (target, dt) in inputs {
            let accepted = ramp.set_target(AngularSpeed::from_rad_per_s(target)).is_ok();
            prop_assert_eq!(accepted, target.is_finite() && target.abs() <= 1e4);
            let before = ramp.setpoint();
            match ramp.step(dt) {
                Ok(s) => {
                    prop_assert!(dt > 0.0 && dt <= 1.0);
                    prop_assert!(s.speed.is_finite() && s.acceleration_rad_s2.is_finite());
                    prop_assert!(ramp.remaining_s().is_finite());
                }
                Err(_) => {
                    prop_assert!(!(dt > 0.0 && dt <= 1.0));
                    prop_assert_eq!(ramp.setpoint(), before);
                }
            }
        }
    }
}
