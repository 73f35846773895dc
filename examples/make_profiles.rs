//! Writes the demo speed profiles `examples/step_start.csv` and
//! `examples/slow_ramp.csv` (demo data for the invented ride in
//! `examples/demo_chain_ride.toml`):
//!
//! ```text
//! cargo run --example make_profiles
//! ```
//!
//! Both take the top from standstill to 1.15 rad/s (about 11 rpm, a steady
//! angle of about 45°) and hold it until 120 s:
//! * step start: the full speed at once (two samples at t = 0);
//! * slow ramp: a cubic "smoothstep" `ω = W (3s² − 2s³)`, `s = t / 60 s`,
//!   sampled every 0.5 s; peak acceleration 1.5 W / 60 s ≈ 0.029 rad/s²,
//!   jerk 6 W / (60 s)² ≈ 0.0019 rad/s³, inside the demo ride's limits.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use std::fmt::Write as _;

/// Top speed of the demo profiles, rad/s.
const TOP_SPEED_RAD_S: f64 = 1.15;
/// Duration of the slow ramp, s.
const RAMP_S: f64 = 60.0;
/// End of both profiles, s.
const END_S: f64 = 120.0;

fn main() -> std::io::Result<()> {
    let header = "# Demo data (invented ride): see examples/make_profiles.rs\ntime_s,speed_rad_s\n";

    let mut step = String::from(header);
    writeln!(step, "0,0").unwrap();
    writeln!(step, "0,{TOP_SPEED_RAD_S}").unwrap();
    writeln!(step, "{END_S},{TOP_SPEED_RAD_S}").unwrap();
    std::fs::write("examples/step_start.csv", step)?;

    let mut ramp = String::from(header);
    for i in 0..=120_u32 {
        let t = f64::from(i) * 0.5;
        let s = t / RAMP_S;
        let w = TOP_SPEED_RAD_S * s * s * (3.0 - 2.0 * s);
        writeln!(ramp, "{t},{:.6}", w).unwrap();
    }
    writeln!(ramp, "{END_S},{TOP_SPEED_RAD_S}").unwrap();
    std::fs::write("examples/slow_ramp.csv", ramp)?;
    Ok(())
}
