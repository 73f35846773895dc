//! The swing-free targets, measured: for the demo ride and two more
//! geometries (demo data, invented rides), spin-up from rest to a target angle
//! and spin-down back to rest, the shortest designed profile against the
//! time-optimal jerk-limited ramp, a cubic ramp of equal duration, a 60 s
//! cubic ramp, and ZV/ZVD input shapers (Singer & Seering 1990) tuned to the
//! slow swing mode at the target angle. Residual swing, peak angle and
//! overshoot (peak angle past each length's own steady angle at the profile's
//! top speed) are the worst over 11 effective lengths across ±5 %, from the
//! adaptive simulator (60 s settling window).
//! Writes the designed tables to `target/swing_free/`.
//!
//! ```text
//! cargo run --release --features std --example swing_free_figures
//! ```
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use std::time::Instant;

use swingdrive::design::compare::{
    check_band, cubic_samples, time_optimal_samples, to_profile, worst, worst_overshoot,
};
use swingdrive::design::table::encode;
use swingdrive::design::{
    design, target_duration_bound_s, time_optimal_duration_s, DesignOptions, DesignRequest,
    DurationChoice,
};
use swingdrive::ride_file::{RideFile, RideLimits};
use swingdrive::sim::SeatDynamics;

/// Demo data: invented rides.
const RIDES: [(&str, &str, f64); 3] = [
    (
        "demo chain (r0 3.4 m, L 5.8 m)",
        include_str!("demo_chain_ride.toml"),
        40.0,
    ),
    (
        "chain B (r0 2.5 m, L 4.2 m)",
        "[geometry]\nhub_offset_m = 2.5\nlength_m = 4.2\nsuspension = \"chain\"\n\
         [limits]\nmax_accel_rad_s2 = 0.15\nmax_decel_rad_s2 = 0.15\nmax_jerk_rad_s3 = 0.08\n",
        45.0,
    ),
    (
        "rod C (r0 3.0 m, L 3.5 m)",
        "[geometry]\nhub_offset_m = 3.0\nlength_m = 3.5\nsuspension = \"rod\"\n\
         [limits]\nmax_accel_rad_s2 = 0.12\nmax_decel_rad_s2 = 0.15\nmax_jerk_rad_s3 = 0.06\n",
        35.0,
    ),
];

const PERIOD_S: f64 = 0.05;
const SETTLE_S: f64 = 60.0;

/// The band of the check: 11 lengths across ±5 %.
fn band(seat: &SeatDynamics) -> Vec<SeatDynamics> {
    (0..11)
        .map(|i| {
            let l = seat.length_m() * (0.95 + 0.01 * f64::from(i));
            SeatDynamics::new(
                seat.hub_offset_m(),
                l,
                seat.suspension(),
                seat.gravity_mps2(),
            )
            .unwrap()
            .with_damping(seat.damping_per_s())
            .unwrap()
        })
        .collect()
}

/// Speed `samples` shaped by impulses (time s, amplitude), sampled every PERIOD_S.
fn shaped(samples: &[(f64, f64)], impulses: &[(f64, f64)]) -> Vec<(f64, f64)> {
    let end = samples.last().unwrap().0 + impulses.last().unwrap().0;
    let at = |t: f64| -> f64 {
        if t <= 0.0 {
            return samples[0].1;
        }
        match samples.iter().position(|s| s.0 >= t) {
            None => samples.last().unwrap().1,
            Some(0) => samples[0].1,
            Some(i) => {
                let (a, b) = (samples[i - 1], samples[i]);
                a.1 + (b.1 - a.1) * (t - a.0) / (b.0 - a.0)
            }
        }
    };
    let n = (end / PERIOD_S).ceil() as usize;
    let mut out: Vec<(f64, f64)> = (0..=n)
        .map(|k| {
            let t = (k as f64 * PERIOD_S).min(end);
            (t, impulses.iter().map(|(ti, a)| a * at(t - ti)).sum())
        })
        .collect();
    out.dedup_by(|b, a| b.0 <= a.0);
    out
}

/// Duration, worst peak angle, worst overshoot, worst residual over the band.
fn figures(seats: &[SeatDynamics], samples: &[(f64, f64)]) -> (f64, f64, f64, f64) {
    let profile = to_profile(samples).unwrap();
    let checks = check_band(seats, &profile, SETTLE_S).unwrap();
    let (r, p) = worst(&checks);
    (
        samples.last().unwrap().0 - samples[0].0,
        p,
        worst_overshoot(&checks),
        r,
    )
}

fn row(what: &str, f: (f64, f64, f64, f64)) {
    println!(
        "| {what} | {:.2} | {:.2} | {:.2} | {:.3} |",
        f.0, f.1, f.2, f.3
    );
}

fn main() {
    std::fs::create_dir_all("target/swing_free").unwrap();
    let mut summary = Vec::new();
    for (name, toml, angle) in RIDES {
        let ride = RideFile::from_toml_str(toml, name).unwrap();
        let seat = ride.seat;
        let limits: RideLimits = ride.limits;
        let w = seat.steady_reference().speed_for_angle(angle.to_radians());
        let (slow, _) = seat.steady_reference().swing_modes(angle.to_radians());
        let slow_period = std::f64::consts::TAU / slow;
        let seats = band(&seat);
        for (from, to, label) in [(0.0, w, "spin-up"), (w, 0.0, "spin-down")] {
            let t_opt = time_optimal_duration_s(&limits, from, to);
            let bound = target_duration_bound_s(&seat, &limits, from, to);
            let started = Instant::now();
            let d = design(
                &DesignRequest {
                    seat,
                    limits,
                    from_speed_rad_s: from,
                    to_speed_rad_s: to,
                    duration: DurationChoice::Shortest,
                },
                &DesignOptions::default(),
            )
            .unwrap();
            let took = started.elapsed();
            println!(
                "\n### {name}, {label} {}° → {}° ({from:.4} → {to:.4} rad/s)\n",
                if from == 0.0 { 0.0 } else { angle },
                if to == 0.0 { 0.0 } else { angle }
            );
            println!(
                "slow swing-mode period at {angle}°: {slow_period:.2} s; time-optimal ramp {t_opt:.2} s; \
                 target duration bound max(1.5 × {slow_period:.2}, 2 × {t_opt:.2}) = {bound:.2} s; \
                 design took {took:.1?} ({} durations tried)\n",
                d.optimiser.durations_tried
            );
            println!("| profile | duration s | peak angle ° | overshoot ° | residual swing ° |");
            println!("|---|---:|---:|---:|---:|");
            let designed = figures(&seats, &d.samples);
            row("**swing-free, designed (shortest)**", designed);
            row(
                "time-optimal jerk-limited ramp",
                figures(&seats, &time_optimal_samples(&limits, from, to, PERIOD_S)),
            );
            row(
                "cubic ramp, equal duration",
                figures(&seats, &cubic_samples(from, to, d.duration_s, PERIOD_S)),
            );
            row(
                "cubic ramp, 60 s",
                figures(&seats, &cubic_samples(from, to, 60.0, PERIOD_S)),
            );
            let ramp = time_optimal_samples(&limits, from, to, PERIOD_S);
            let half = 0.5 * slow_period;
            row(
                "ZV shaper on the time-optimal ramp (slow mode at target)",
                figures(&seats, &shaped(&ramp, &[(0.0, 0.5), (half, 0.5)])),
            );
            row(
                "ZVD shaper on the time-optimal ramp (slow mode at target)",
                figures(
                    &seats,
                    &shaped(&ramp, &[(0.0, 0.25), (half, 0.5), (2.0 * half, 0.25)]),
                ),
            );
            let speeds: Vec<f64> = d.samples.iter().map(|s| s.1).collect();
            let bytes = encode(&speeds, d.table_period_s, 0).unwrap();
            let file = format!(
                "target/swing_free/{}_{label}.bin",
                name.split_whitespace()
                    .take(2)
                    .collect::<Vec<_>>()
                    .join("_")
            );
            std::fs::write(&file, &bytes).unwrap();
            println!(
                "\nlimits kept: {} (accel {:.4}, decel {:.4}, jerk {:.4}); table {file}, {} bytes",
                d.limits_ok,
                d.stats.peak_accel_rad_s2,
                d.stats.peak_decel_rad_s2,
                d.stats.peak_jerk_rad_s3,
                bytes.len()
            );
            summary.push((
                name,
                label,
                d.duration_s,
                bound,
                designed.3,
                designed.1,
                designed.2,
            ));
        }
    }
    println!("\n### Summary\n");
    println!("| ride | transition | shortest duration s | target bound s | residual ° | peak angle ° | overshoot ° |");
    println!("|---|---|---:|---:|---:|---:|---:|");
    for (name, label, t, bound, r, p, o) in summary {
        println!("| {name} | {label} | {t:.2} | {bound:.2} | {r:.3} | {p:.2} | {o:.2} |");
    }
}
