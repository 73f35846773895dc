//! Adversarial search over admissible request sequences on six rides, with
//! and without the swing governor (docs/dynamic_protection.md).
//!
//! `cargo run --release --features std --example envelope_search [RANDOM] [RESTARTS]`
use swingdrive::protection::closed_loop::Rig;
use swingdrive::protection::search::{search, SearchSize, RIDES};
use swingdrive::{Angle, GovernorParams, Gravity, RampLimits, RideGeometry};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let mut args = std::env::args().skip(1);
    let random: usize = args.next().map_or(Ok(1000), |a| a.parse())?;
    let restarts: usize = args.next().map_or(Ok(20), |a| a.parse())?;
    // Demo limits: 0.1 rad/s² and 0.05 rad/s³ (the study's), stops at the same limits.
    let limits = RampLimits::new(0.1, 0.1, 0.05)?;
    println!("| ride | susp. | certified ° | ceiling rad/s | runs | worst peak without governor ° (case) | worst peak with governor ° (case) | sideways with governor ° | governed > certified | faults |");
    println!("|---|---|---:|---:|---:|---|---|---:|---:|---:|");
    let handles: Vec<_> = RIDES
        .iter()
        .enumerate()
        .map(|(k, &(name, r0, l, suspension, certified))| {
            std::thread::spawn(move || -> Result<String, String> {
                let g = RideGeometry::new(r0, l, suspension, Gravity::STANDARD).map_err(|e| e.to_string())?;
                let ceiling = g.speed_for_angle(Angle::from_deg(certified)).map_err(|e| e.to_string())?.rad_per_s();
                let rig = Rig { geometry: g, limits, stop_limits: limits, ceiling_rad_s: ceiling, params: GovernorParams::demo(&g, certified, 0.05) };
                let size = SearchSize { random, restarts, steps: 10, duration_s: 150, seed: 0x5EED + k as u64 };
                let r = search(&rig, &size);
                Ok(format!(
                    "| {name} | {suspension:?} | {certified} | {ceiling:.4} | {} | {:.1} ({}) | {:.1} ({}) | {:.1} | {} | {} |",
                    r.runs, r.bare.peak_deg, r.bare.case, r.governed.peak_deg, r.governed.case, r.governed.sideways_deg, r.governed_exceedances, r.governed_faults
                ))
            })
        })
        .collect();
    for h in handles {
        match h.join() {
            Ok(Ok(line)) => println!("{line}"),
            Ok(Err(e)) => eprintln!("error: {e}"),
            Err(_) => eprintln!("a search thread failed"),
        }
    }
    Ok(())
}
