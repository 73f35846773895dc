//! Ramp check vectors for the on-target tests (firmware/), generated from the
//! independent f64 reference ramp (`swingdrive::reference::ramp`) and the
//! host's f32 results.
//!
//! Two kinds of vector:
//!
//! * **plan samples**: `Plan::new` from a start state (speed, acceleration,
//!   possibly outside the limits, possibly crossing zero speed) to a target,
//!   sampled with `Plan::state_at` at a time inside the plan;
//! * **tick runs**: `SpeedRamp` from rest, stepped at 1 ms, with one target
//!   change on the way (a re-plan on the target from the ramp's own state),
//!   checked after a given number of ticks. The fixed-point player (feature
//!   `fixed`) runs the same vectors on the target.
//!
//! Tolerances (stated per vector, checked here against the host's f32 so that
//! a vector that the f32 code itself misses is never written):
//!
//! * speed: 16 f32 epsilons of the speed range, the bound of
//!   tests/ramp_reference.rs (hand calculation: each f32 segment duration
//!   carries a few epsilons of its own length, which shifts later segments by
//!   that much time, times the acceleration; the anchors carry a few epsilons of
//!   the speed range); for tick runs with a re-plan, 32 epsilons (the re-plan
//!   starts from the f32 anchor, which adds the same error once more);
//! * acceleration: 16 epsilons of (largest |acceleration| + jerk × duration),
//!   the same time-shift argument applied to a ramp of slope `jerk`;
//! * fixed-point speed (tick runs only): the speed tolerance plus 2⁻¹⁶ rad/s,
//!   the bound documented in `docs/fixed_point.md` (rounding of the output to
//!   I16F16, ≤ 2⁻¹⁷, plus internal rounding far below that).
//!
//! This test fails when firmware/src/ramp_vectors.rs is out of date; regenerate
//! with `UPDATE_TARGET_VECTORS=1 cargo test --features std --test target_ramp_vectors`.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

#[path = "common/firmware_vectors.rs"]
mod firmware_vectors;

use std::fmt::Write as _;

use proptest::prelude::RngExt;
use proptest::test_runner::{RngAlgorithm, TestRng};
use swingdrive::reference::ramp as reference;
use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse, SpeedRamp};

const EPS: f64 = f32::EPSILON as f64;
/// Tick period of the tick runs, s (a dyadic f32: whole time quanta).
const DT: f32 = 1.0e-3;
const PLAN_SAMPLES: usize = 72;
const TICK_RUNS: usize = 36;
/// 2⁻¹⁶ rad/s: the fixed-point path's own share of the bound.
const FIXED_MARGIN: f64 = 1.0 / 65_536.0;

fn reference_limits(l: &RampLimits) -> reference::Limits {
    reference::Limits {
        accel: l.max_acceleration_rad_s2().into(),
        decel: l.max_deceleration_rad_s2().into(),
        jerk: l.max_jerk_rad_s3().into(),
    }
}

/// Largest |speed| and |acceleration| of a reference profile, sampled densely.
fn ranges(p: &reference::Profile, v_floor: f64) -> (f64, f64) {
    let end = p.duration();
    let (mut v, mut a) = (v_floor.abs().max(p.v0.abs()).max(p.target.abs()), 0.0_f64);
    for k in 0..=400 {
        let (vv, aa) = p.state_at(end * f64::from(k) / 400.0);
        v = v.max(vv.abs());
        a = a.max(aa.abs());
    }
    (v, a)
}

fn plan_samples(rng: &mut TestRng) -> String {
    let mut out = String::new();
    for i in 0..PLAN_SAMPLES {
        // Demo data: random limits, states and targets.
        let up: f32 = rng.random_range(0.05..3.0);
        let down: f32 = rng.random_range(0.05..3.0);
        let jerk: f32 = rng.random_range(0.1..20.0);
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let reverse = i % 3 != 0;
        let (v0, vt): (f32, f32) = if reverse {
            (rng.random_range(-8.0..8.0), rng.random_range(-8.0..8.0))
        } else {
            (rng.random_range(0.0..8.0), rng.random_range(0.0..8.0))
        };
        // Every fourth case starts outside the limit that applies; forward-only
        // cases start with an acceleration that can be brought to zero before
        // zero speed (the reference does not model the raised-jerk floor stop).
        let reach = if i % 4 == 0 { 1.6 } else { 1.0 };
        let guess: f32 = rng.random_range(-reach..reach);
        let mut a0 = guess * limits.bound_for(v0, guess);
        if !reverse && a0 < 0.0 {
            let stop = (2.0 * jerk * v0).sqrt() * 0.9;
            a0 = a0.max(-stop);
        }
        let plan = Plan::new(
            &limits,
            if reverse {
                Reverse::Allowed
            } else {
                Reverse::Forbidden
            },
            AngularSpeed::from_rad_per_s(v0),
            a0,
            AngularSpeed::from_rad_per_s(vt),
        )
        .unwrap();
        let r = reference::plan(
            &reference_limits(&limits),
            reverse,
            v0.into(),
            a0.into(),
            vt.into(),
        );
        let fraction: f64 = rng.random_range(0.05..0.95);
        let t = (r.duration() * fraction) as f32;
        let (v, a) = r.state_at(f64::from(t));
        let (v_range, a_range) = ranges(&r, 0.0);
        let v_tol = 16.0 * EPS * v_range;
        let a_tol = 16.0 * EPS * (a_range + f64::from(jerk) * r.duration());
        let host = plan.state_at(t).unwrap();
        let (hv, ha) = (host.speed.rad_per_s(), host.acceleration_rad_s2);
        assert!(
            (f64::from(hv) - v).abs() <= v_tol && (f64::from(ha) - a).abs() <= a_tol,
            "host f32 misses the reference: case {i}: {hv} vs {v} ± {v_tol}, {ha} vs {a} ± {a_tol}"
        );
        writeln!(
            out,
            "    PlanSample {{ up: {up:?}, down: {down:?}, jerk: {jerk:?}, reverse: {reverse}, v0: {v0:?}, a0: {a0:?}, target: {vt:?}, t_s: {t:?}, speed: {v:?}, speed_tol: {v_tol:e}, accel: {a:?}, accel_tol: {a_tol:e}, host_speed_bits: {:#010x}, host_accel_bits: {:#010x} }},",
            hv.to_bits(),
            ha.to_bits()
        )
        .unwrap();
    }
    out
}

fn tick_runs(rng: &mut TestRng) -> String {
    let mut out = String::new();
    let dt = f64::from(DT);
    for i in 0..TICK_RUNS {
        // Demo data: ride-like limits, ramps of a few seconds.
        let up: f32 = rng.random_range(0.2..2.0);
        let down: f32 = rng.random_range(0.2..2.0);
        let jerk: f32 = rng.random_range(0.5..8.0);
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let reverse = i % 2 == 0;
        let lo = if reverse { -4.0 } else { 0.0 };
        let first: f32 = rng.random_range(lo..4.0);
        let second: f32 = rng.random_range(lo..4.0);
        let change: u32 = rng.random_range(200..3000);
        let rl = reference_limits(&limits);
        let p1 = reference::plan(&rl, reverse, 0.0, 0.0, first.into());
        let (v1, a1) = p1.state_at(f64::from(change) * dt);
        let p2 = reference::plan(&rl, reverse, v1, a1, second.into());
        // Checked somewhere in the second plan or shortly after its end.
        let after: u32 = rng.random_range(1..((p2.duration() * 1.1 / dt) as u32 + 2));
        let ticks = change + after;
        let (v, _) = p2.state_at(f64::from(after) * dt);
        let (r1, _) = ranges(&p1, 0.0);
        let (r2, _) = ranges(&p2, 0.0);
        let v_tol = 32.0 * EPS * r1.max(r2);

        let mut ramp = SpeedRamp::new(
            limits,
            if reverse {
                Reverse::Allowed
            } else {
                Reverse::Forbidden
            },
        );
        let _ = ramp
            .set_target(AngularSpeed::from_rad_per_s(first))
            .unwrap();
        let mut host = 0.0_f32;
        for k in 1..=ticks {
            host = ramp.step(DT).unwrap().speed.rad_per_s();
            if k == change {
                let _ = ramp
                    .set_target(AngularSpeed::from_rad_per_s(second))
                    .unwrap();
            }
        }
        assert!(
            (f64::from(host) - v).abs() <= v_tol,
            "host f32 misses the reference: run {i}: {host} vs {v} ± {v_tol}"
        );
        writeln!(
            out,
            "    TickRun {{ up: {up:?}, down: {down:?}, jerk: {jerk:?}, reverse: {reverse}, first: {first:?}, change_after: {change}, second: {second:?}, ticks: {ticks}, speed: {v:?}, speed_tol: {v_tol:e}, fixed_tol: {:e}, host_speed_bits: {:#010x} }},",
            v_tol + FIXED_MARGIN,
            host.to_bits()
        )
        .unwrap();
    }
    out
}

fn generate() -> String {
    let mut rng = TestRng::deterministic_rng(RngAlgorithm::ChaCha);
    let plans = plan_samples(&mut rng);
    let ticks = tick_runs(&mut rng);
    format!(
        "//! Ramp check vectors generated from the f64 reference by the host test\n\
         //! tests/target_ramp_vectors.rs; do not edit by hand.\n\
         \n\
         use crate::ramp_checks::{{PlanSample, TickRun}};\n\
         \n\
         /// Tick period of the tick runs, s.\n\
         pub const TICK_S: f32 = {DT:?};\n\
         \n\
         /// `Plan::new` + `Plan::state_at`: speed (rad/s) and acceleration (rad/s²).\n\
         pub const PLAN_SAMPLES: &[PlanSample] = &[\n{plans}];\n\
         \n\
         /// `SpeedRamp` from rest with one target change: speed (rad/s) after `ticks` ticks.\n\
         pub const TICK_RUNS: &[TickRun] = &[\n{ticks}];\n"
    )
}

#[test]
fn firmware_ramp_vectors_are_current() {
    firmware_vectors::keep_current("ramp_vectors.rs", "target_ramp_vectors", &generate());
}
