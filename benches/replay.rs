//! Replay speed: a two-minute profile with a 1 ms trace, as a test bench
//! would run it (`cargo bench --features std --bench replay`).
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use std::hint::black_box;
use std::time::Duration;

use criterion::{criterion_group, criterion_main, Criterion};
use swingdrive::sim::output::write_trace_csv;
use swingdrive::sim::{replay, ReplayOptions, SeatDynamics, SpeedProfile};
use swingdrive::Suspension;

/// Demo data (invented ride): r0 = 3.6 m, L = 6.2 m, chain.
fn seat() -> SeatDynamics {
    SeatDynamics::new(3.6, 6.2, Suspension::Chain, 9.80665).unwrap()
}

/// Two minutes: a 40 s smooth ramp to 1.2 rad/s, a hold, a 30 s ramp down,
/// a hold, sampled every `step_ms` milliseconds (each sample a breakpoint).
fn two_minute_profile(step_ms: u32) -> SpeedProfile {
    let mut samples = Vec::new();
    for i in 0..=120_000 / step_ms {
        let t = f64::from(i * step_ms) * 1e-3;
        let smooth = |s: f64| s * s * (3.0 - 2.0 * s);
        let w = if t < 40.0 {
            1.2 * smooth(t / 40.0)
        } else if t < 80.0 {
            1.2
        } else if t < 110.0 {
            1.2 * (1.0 - smooth((t - 80.0) / 30.0))
        } else {
            0.0
        };
        samples.push((t, w));
    }
    SpeedProfile::new(&samples).unwrap()
}

fn bench(c: &mut Criterion) {
    let seat = seat();
    let profile = two_minute_profile(100);
    let dense = two_minute_profile(1);
    let options = ReplayOptions {
        settle_s: 0.0,
        output_step_s: 1e-3,
        ..ReplayOptions::default()
    };
    let mut group = c.benchmark_group("replay");
    group
        .sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(3));
    group.bench_function("two_minutes_1ms_trace", |b| {
        b.iter(|| replay(&seat, black_box(&profile), &options, None).unwrap());
    });
    let summary_only = ReplayOptions {
        record_trace: false,
        ..options
    };
    group.bench_function("two_minutes_1ms_samples_summary", |b| {
        b.iter(|| replay(&seat, black_box(&dense), &summary_only, None).unwrap());
    });
    let outcome = replay(&seat, &profile, &options, None).unwrap();
    group.bench_function("two_minutes_1ms_csv", |b| {
        b.iter(|| {
            let mut bytes = Vec::with_capacity(16 << 20);
            write_trace_csv(black_box(&outcome.trace), &mut bytes).unwrap();
            bytes
        });
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
