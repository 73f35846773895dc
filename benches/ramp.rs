//! Host timings of the speed ramp against rsruckig (velocity interface), on the
//! same cases, in one run: the cost of one tick (`step`) and of one re-plan.
//!
//! Run with `cargo bench --bench ramp`. Figures and ratios are recorded in
//! `docs/performance.md`.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]
#![allow(missing_docs)]

use std::hint::black_box;
use std::time::Duration;

use criterion::{criterion_group, criterion_main, Criterion};
use proptest::prelude::RngExt;
use proptest::test_runner::{RngAlgorithm, TestRng};
use rsruckig::prelude::*;
use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse, SpeedRamp};

/// Tick period, s.
const DT: f32 = 1.0e-3;

/// A start state and target, within what rsruckig supports (equal limits).
#[derive(Clone, Copy)]
struct Case {
    v0: f32,
    a0: f32,
    vt: f32,
}

/// Demo data: 256 random re-plan cases, limits 0.5 rad/s² and 1 rad/s³.
const ACCEL: f32 = 0.5;
const JERK: f32 = 1.0;

fn cases() -> Vec<Case> {
    let mut rng = TestRng::deterministic_rng(RngAlgorithm::ChaCha);
    (0..256)
        .map(|_| Case {
            v0: rng.random_range(-10.0..10.0),
            a0: rng.random_range(-ACCEL..ACCEL),
            vt: rng.random_range(-10.0..10.0),
        })
        .collect()
}

fn ruckig_input(c: Case, accel: f32, jerk: f32) -> InputParameter<1> {
    let mut input = InputParameter::new(None);
    input.control_interface = ControlInterface::Velocity;
    input.current_velocity[0] = f64::from(c.v0);
    input.current_acceleration[0] = f64::from(c.a0);
    input.target_velocity[0] = f64::from(c.vt);
    input.target_acceleration[0] = 0.0;
    input.max_velocity[0] = 1.0e3;
    input.max_acceleration[0] = f64::from(accel);
    input.max_jerk[0] = f64::from(jerk);
    input
}

/// Sends the ramp back the other way once it has arrived (rare: once per
/// plan), kept out of line like any cold path.
#[cold]
#[inline(never)]
fn reverse_target(ramp: &mut SpeedRamp) {
    let back = -ramp.target().rad_per_s();
    let _ = ramp.set_target(AngularSpeed::from_rad_per_s(back)).unwrap();
}

fn step(c: &mut Criterion) {
    // Demo data: a long ramp between ±6 rad/s at 0.05 rad/s², 0.02 rad/s³ (one
    // plan lasts 242.5 s = 242,500 ticks, so the occasional re-plan when the
    // target is reached is negligible on both sides).
    let (accel, jerk, top) = (0.05_f32, 0.02_f32, 6.0_f32);
    let mut group = c.benchmark_group("step");
    group.bench_function("swingdrive", |b| {
        let limits = RampLimits::new(accel, accel, jerk).unwrap();
        let mut ramp = SpeedRamp::new(limits, Reverse::Allowed);
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(top)).unwrap();
        b.iter(|| {
            let s = ramp.step(black_box(DT)).unwrap();
            if s.target_reached() {
                reverse_target(&mut ramp);
            }
            // The two outputs a drive uses, as on the rsruckig side.
            (
                black_box(s.speed.rad_per_s()),
                black_box(s.acceleration_rad_s2),
            )
        });
    });
    group.bench_function("rsruckig", |b| {
        let mut otg = Ruckig::<1, IgnoreErrorHandler>::new(None, f64::from(DT));
        let start = Case {
            v0: 0.0,
            a0: 0.0,
            vt: top,
        };
        let mut input = ruckig_input(start, accel, jerk);
        let mut output = OutputParameter::new(None);
        b.iter(|| {
            let result = otg.update(black_box(&input), &mut output).unwrap();
            output.pass_to_input(&mut input);
            if result == RuckigResult::Finished {
                input.target_velocity[0] = -input.target_velocity[0];
            }
            (
                black_box(output.new_velocity[0]),
                black_box(output.new_acceleration[0]),
            )
        });
    });
    group.finish();
}

fn replan(c: &mut Criterion) {
    let cases = cases();
    let limits = RampLimits::new(ACCEL, ACCEL, JERK).unwrap();
    let mut group = c.benchmark_group("replan");
    group.bench_function("swingdrive", |b| {
        // Into one plan kept across calls, as rsruckig fills one trajectory.
        let mut plan = Plan::new(
            &limits,
            Reverse::Allowed,
            AngularSpeed::ZERO,
            0.0,
            AngularSpeed::ZERO,
        )
        .unwrap();
        let mut i = 0;
        b.iter(|| {
            let k = cases[i % cases.len()];
            i += 1;
            plan.replan(
                &limits,
                Reverse::Allowed,
                AngularSpeed::from_rad_per_s(black_box(k.v0)),
                black_box(k.a0),
                AngularSpeed::from_rad_per_s(black_box(k.vt)),
            )
            .unwrap();
            black_box(plan.segments().len())
        });
    });
    group.bench_function("rsruckig", |b| {
        let inputs: Vec<_> = cases
            .iter()
            .map(|&k| ruckig_input(k, ACCEL, JERK))
            .collect();
        let mut otg = Ruckig::<1, IgnoreErrorHandler>::new(None, f64::from(DT));
        let mut traj = Trajectory::new(None);
        let mut i = 0;
        b.iter(|| {
            let input = &inputs[i % inputs.len()];
            i += 1;
            let r = otg.calculate(black_box(input), &mut traj).unwrap();
            black_box((r, traj.get_duration()))
        });
    });
    group.finish();
}

criterion_group! {
    name = benches;
    // Short runs: the machine's two cores are shared.
    config = Criterion::default()
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2))
        .sample_size(40);
    targets = step, replan
}
criterion_main!(benches);
