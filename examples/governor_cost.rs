//! What the swing governor costs and what stops do (docs/dynamic_protection.md):
//! transition times with and without the governor on the demo ride, and
//! controlled stops from the ceiling (seat in steady rotation there) on the
//! searched rides.
//!
//! `cargo run --release --features std --example governor_cost`
#![allow(clippy::indexing_slicing)]

use swingdrive::protection::closed_loop::{run_loop, simulate_peak, Rig, Scenario};
use swingdrive::protection::search::RIDES;
use swingdrive::sim::{replay, ReplayOptions, SeatDynamics, SpeedProfile, StartCondition};
use swingdrive::*;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    // The demo ride of examples/demo_chain_ride.toml (demo data), certified 45°.
    let g = RideGeometry::new(3.4, 5.8, Suspension::Chain, Gravity::STANDARD)?;
    let limits = RampLimits::new(0.10, 0.12, 0.05)?;
    let certified = 45.0;
    let ceiling = g.speed_for_angle(Angle::from_deg(certified))?.rad_per_s();
    let rig = Rig {
        geometry: g,
        limits,
        stop_limits: limits,
        ceiling_rad_s: ceiling,
        params: GovernorParams::demo(&g, certified, 0.05),
    };
    let truth = SeatDynamics::from_geometry(&g);
    println!(
        "Demo ride (r0 3.4 m, L 5.8 m, chain), certified {certified}°, ceiling {ceiling:.4} rad/s"
    );
    println!();
    println!("| transition | time without governor s | peak without ° | time with governor s | peak with ° | time ratio |");
    println!("|---|---:|---:|---:|---:|---:|");
    for (from_deg, to_deg) in [
        (0.0_f32, 30.0_f32),
        (0.0, 40.0),
        (0.0, 43.0),
        (40.0, 20.0),
        (30.0, 40.0),
    ] {
        let speed = |d: f32| -> Result<f64, ParamError> {
            Ok(if d == 0.0 {
                0.0
            } else {
                f64::from(g.speed_for_angle(Angle::from_deg(d))?.rad_per_s())
            })
        };
        let (v0, v1) = (speed(from_deg)?, speed(to_deg)?);
        // Reach the start speed gently (the governor's own pace), let it settle, then request the move at 200 s.
        let scenario = Scenario {
            requests: vec![(0.0, v0), (200.0, v1)],
            duration_s: 500.0,
            stop_at_s: None,
        };
        let mut cells = Vec::new();
        for governed in [false, true] {
            let run = run_loop(&rig, &scenario, governed, 0.0)?;
            let (peak, _) = simulate_peak(&truth, &run.profile, 20.0)?;
            // First time after 200 s within 0.1 % (or 1e-3 rad/s) of the new request.
            let done = run
                .profile
                .iter()
                .find(|p| p.0 >= 200.0 && (p.1 - v1).abs() <= (1e-3 * v1).max(1e-3))
                .map(|p| p.0 - 200.0);
            cells.push((done, peak));
        }
        let fmt =
            |d: Option<f64>| d.map_or("not reached in 300 s".to_string(), |d| format!("{d:.1}"));
        let ratio = match (cells[0].0, cells[1].0) {
            (Some(a), Some(b)) if a > 0.0 => format!("{:.1}×", b / a),
            _ => "–".to_string(),
        };
        println!(
            "| {from_deg}° → {to_deg}° | {} | {:.1} | {} | {:.1} | {ratio} |",
            fmt(cells[0].0),
            cells[0].1,
            fmt(cells[1].0),
            cells[1].1
        );
    }
    println!();
    println!("Controlled stops from the ceiling (seat in steady rotation at the ceiling; stop at 0.1 rad/s², 0.05 rad/s³):");
    println!();
    println!("| ride | certified ° | peak angle ° | peak sideways (tangential) ° | sideways excursion at the seat m |");
    println!("|---|---:|---:|---:|---:|");
    let stop = RampLimits::new(0.1, 0.1, 0.05)?;
    for &(name, r0, l, suspension, cert) in RIDES.iter() {
        let g = RideGeometry::new(r0, l, suspension, Gravity::STANDARD)?;
        let top = g.speed_for_angle(Angle::from_deg(cert))?;
        let plan = Plan::new(
            &stop,
            Reverse::Forbidden,
            top,
            0.0,
            AngularSpeed::from_rad_per_s(0.0),
        )?;
        let mut samples = Vec::new();
        let mut t = 0.0_f32;
        while t <= plan.duration_s() + 0.01 {
            samples.push((f64::from(t), f64::from(plan.state_at(t)?.speed.rad_per_s())));
            t += 0.01;
        }
        let out = replay(
            &SeatDynamics::from_geometry(&g),
            &SpeedProfile::new(&samples)?,
            &ReplayOptions {
                settle_s: 30.0,
                start: StartCondition::Steady,
                record_trace: false,
                ..ReplayOptions::default()
            },
            None,
        )?;
        let s = &out.summary;
        println!(
            "| {name} | {cert} | {:.2} | {:.2} | {:.2} |",
            s.peak_angle_deg,
            s.peak_tangential_deg,
            f64::from(l) * s.peak_tangential_deg.to_radians().sin()
        );
    }
    Ok(())
}
