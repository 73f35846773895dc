//! The speed ramp's side of `benches/ramp.rs`, as a plain program: the same
//! tick (a long ramp between ±6 rad/s, 1 ms ticks) or the same 256 re-plan
//! cases (same random generator and seed), repeated `n` times.
//!
//! It exists for two measurements that a shared, loaded machine does not spoil
//! (docs/performance.md, "Speed ramp on the host"):
//!
//! * instructions per call, repeatable to the instruction, under callgrind:
//!   `valgrind --tool=callgrind target/release/examples/ramp_work step 1000000`
//!   (divide the total by `n`; it includes the loop and a fixed start-up cost);
//! * time per call as the smallest over chunks of about 2.5 ms each (a chunk
//!   that the scheduler interrupts is slower, never faster), printed on stderr:
//!   `cargo run --release --example ramp_work -- replan 5000000`.
//!
//! The benchmark itself, side by side with rsruckig, stays `cargo bench --bench ramp`.
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::indexing_slicing)]

use std::hint::black_box;
use std::time::Instant;

use proptest::prelude::RngExt;
use proptest::test_runner::{RngAlgorithm, TestRng};
use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse, SpeedRamp};

/// Demo data, as in benches/ramp.rs: limits 0.5 rad/s² and 1 rad/s³ for the
/// re-plan cases.
const ACCEL: f32 = 0.5;
const JERK: f32 = 1.0;

#[derive(Clone, Copy)]
struct Case {
    v0: f32,
    a0: f32,
    vt: f32,
}

/// The benchmark's 256 re-plan cases (same generator, same order).
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

#[inline(never)]
fn replans(plan: &mut Plan, limits: &RampLimits, cases: &[Case], n: usize) -> usize {
    let mut segments = 0;
    for i in 0..n {
        let k = cases[i % cases.len()];
        plan.replan(
            limits,
            Reverse::Allowed,
            AngularSpeed::from_rad_per_s(black_box(k.v0)),
            black_box(k.a0),
            AngularSpeed::from_rad_per_s(black_box(k.vt)),
        )
        .unwrap();
        segments += black_box(plan.segments().len());
    }
    segments
}

/// Sends the ramp back the other way once it has arrived (as in the benchmark).
#[cold]
#[inline(never)]
fn reverse_target(ramp: &mut SpeedRamp) {
    let back = -ramp.target().rad_per_s();
    let _ = ramp.set_target(AngularSpeed::from_rad_per_s(back)).unwrap();
}

#[inline(never)]
fn steps(ramp: &mut SpeedRamp, n: usize) -> f32 {
    let mut sum = 0.0;
    for _ in 0..n {
        let s = ramp.step(black_box(1.0e-3)).unwrap();
        if s.target_reached() {
            reverse_target(ramp);
        }
        sum += black_box(s.speed.rad_per_s()) + black_box(s.acceleration_rad_s2);
    }
    sum
}

fn main() {
    let mut args = std::env::args().skip(1);
    let what = args.next().unwrap_or_else(|| "step".into());
    let n: usize = args
        .next()
        .and_then(|s| s.parse().ok())
        .unwrap_or(1_000_000);
    let cases = cases();
    let limits = RampLimits::new(ACCEL, ACCEL, JERK).unwrap();
    let mut plan = Plan::new(
        &limits,
        Reverse::Allowed,
        AngularSpeed::ZERO,
        0.0,
        AngularSpeed::ZERO,
    )
    .unwrap();
    // The benchmark's tick: ±6 rad/s at 0.05 rad/s², 0.02 rad/s³ (demo data).
    let mut ramp = SpeedRamp::new(RampLimits::new(0.05, 0.05, 0.02).unwrap(), Reverse::Allowed);
    let _ = ramp.set_target(AngularSpeed::from_rad_per_s(6.0)).unwrap();
    let chunk = match what.as_str() {
        "replan" => 25_600,
        "step" => 100_000,
        _ => {
            eprintln!("usage: ramp_work step|replan [n]");
            std::process::exit(2);
        }
    };
    let mut best = f64::INFINITY;
    let mut done = 0;
    while done < n {
        let m = chunk.min(n - done);
        let t = Instant::now();
        if what == "replan" {
            black_box(replans(&mut plan, &limits, &cases, m));
        } else {
            black_box(steps(&mut ramp, m));
        }
        best = best.min(t.elapsed().as_secs_f64() * 1e9 / m as f64);
        done += m;
    }
    eprintln!("{what}: {best:.2} ns per call (smallest over chunks of {chunk})");
}
