//! The whole job on the demo ride (demo data: an invented chain ride, see
//! `examples/demo_cycle_ride.toml`), in three runs on the simulated ride:
//!
//! 1. a complete ride cycle (`examples/demo_cycle.toml`) through the
//!    interlock — swing-free spin-up, holds, a swing-free change of angle, a
//!    time-optimal ramp back, spin-down — then the same with the swing
//!    governor in the interlock's path;
//! 2. the same cycle with the primary speed encoder frozen mid-cycle: the
//!    interlock trips and stops the ride safely;
//! 3. an operator rocking the speed request between 75 % and 100 % of the
//!    ceiling every half swing period — within every speed, acceleration
//!    and jerk limit — without and with the swing governor.
//!
//! It prints a log and a summary, and writes CSV and SVG files into
//! `target/demo/`.
//!
//! ```sh
//! cargo run --release --example ride_cycle_demo
//! ```
//!
//! This is a simulation of an invented ride, not a ride's safety case.
#![allow(clippy::unwrap_used, clippy::expect_used)]

use std::error::Error;
use std::path::{Path, PathBuf};

use swingdrive::program_file::ProgramFile;
use swingdrive::ride_file::RideFile;
use swingdrive::sim::closed_loop::SensorFault;
use swingdrive::sim::cycle::{
    governor_for, render_cycle_svg, run_cycle, run_requests, write_cycle_csv, CycleOptions,
    CycleOutcome,
};
use swingdrive::sim::output::{render_panels, Curve, Panel};
use swingdrive::{AngularSpeed, SwingModes};

const RPM: f64 = 60.0 / std::f64::consts::TAU;

fn print_cycle(out: &CycleOutcome, program: &ProgramFile) {
    print!("{}", out.step_table("  "));
    println!(
        "  {} of {} steps done; peak angle {:.2}°, peak load factor {:.3}, interlock limiting {:.1} s",
        out.steps.iter().filter(|s| s.report.is_some()).count(),
        program.steps.len(),
        out.peak_angle_deg,
        out.peak_load_factor,
        out.limiting_s
    );
}

fn write_outputs(
    dir: &Path,
    name: &str,
    out: &CycleOutcome,
    title: &str,
) -> Result<(), Box<dyn Error>> {
    let mut csv = Vec::new();
    write_cycle_csv(out, &mut csv)?;
    std::fs::write(dir.join(format!("{name}.csv")), csv)?;
    std::fs::write(
        dir.join(format!("{name}.svg")),
        render_cycle_svg(out, title)?,
    )?;
    println!("  wrote {}/{name}.csv and {name}.svg", dir.display());
    Ok(())
}

fn main() -> Result<(), Box<dyn Error>> {
    let ride = RideFile::from_path(Path::new("examples/demo_cycle_ride.toml"))?;
    let program = ProgramFile::from_path(Path::new("examples/demo_cycle.toml"))?;
    let params = ride
        .interlock
        .expect("the demo ride has an [interlock] table");
    let certified = f64::from(params.config().certified_angle_deg);
    let ceiling = params.ceiling().ceiling_rad_s();
    let dir = PathBuf::from("target/demo");
    std::fs::create_dir_all(&dir)?;
    let governor = governor_for(&ride);

    println!("swingdrive demo — an invented chain ride (demo data), simulated");
    println!(
        "  hub offset {} m, effective length {} m; certified angle {certified}°; speed ceiling {:.4} rad/s ({:.2} rpm) at the worst-case geometry",
        ride.geometry.hub_offset_m(),
        ride.geometry.length_m(),
        ceiling,
        f64::from(ceiling) * RPM
    );
    println!(
        "  parameter set: {} bytes, CRC stamp {:#010x}",
        swingdrive::SafetyParams::BYTES,
        params.stamp()
    );

    // 1. The cycle: first with the interlock alone (ceiling, certified ramp,
    // monitoring), then with the swing governor in its path as well.
    println!(
        "\n1. Ride cycle \"{}\" through the interlock (speed ceiling, certified ramp, monitoring)",
        program.name.as_deref().unwrap_or("")
    );
    let plain = run_cycle(&ride, &program, &CycleOptions::default(), None)?;
    print_cycle(&plain, &program);
    write_outputs(&dir, "cycle", &plain, "demo cycle through the interlock")?;

    println!("\n1b. The same cycle with the swing governor in the interlock's path");
    let options = CycleOptions {
        governor,
        ..CycleOptions::default()
    };
    let normal = run_cycle(&ride, &program, &options, None)?;
    print_cycle(&normal, &program);
    println!(
        "  with the governor the swing-free tables are designed within its rate (0.45 × 0.02 rad/s², design::limits_for_governor):\n  they take longer but pass it unaltered (\"limiting s\" 0 on their rows) and still leave the seats still;\n  the time-optimal ramps are held back by the governor (docs/dynamic_protection.md)"
    );
    write_outputs(
        &dir,
        "cycle_governed",
        &normal,
        "demo cycle with the swing governor",
    )?;

    // 2. The same cycle (interlock alone) with a frozen encoder during the
    // ramp back to 30°. (A freeze while the speed holds still is invisible to
    // any speed check: the frozen count is the true one until the speed
    // changes; with the governor in the path a freeze can also hold the
    // command still — docs/safety.md.)
    let ramp_back_start = plain
        .steps
        .get(5)
        .and_then(|s| s.report.as_ref())
        .map_or(85.0, |r| r.start_s);
    let freeze_at = ramp_back_start + 1.0;
    println!("\n2. The same cycle, primary speed encoder frozen at {freeze_at:.2} s (a second channel is fitted)");
    let faulty = run_cycle(
        &ride,
        &program,
        &CycleOptions {
            fault: Some((freeze_at, SensorFault::FreezePrimary)),
            ..CycleOptions::default()
        },
        None,
    )?;
    print_cycle(&faulty, &program);
    let trip_at = faulty
        .trace
        .iter()
        .find(|s| !s.state.follows_requests() && s.time_s > freeze_at)
        .map_or(f64::NAN, |s| s.time_s);
    let permit_off = faulty
        .trace
        .iter()
        .find(|s| !s.permit && s.time_s > freeze_at)
        .map_or(f64::NAN, |s| s.time_s);
    let last = faulty.trace.last().expect("a trace");
    println!(
        "  fault at {freeze_at:.2} s → trip {:?} after {:.2} s; controlled stop on the time-monitored ramp; run permit removed at {permit_off:.2} s; at the end: shaft {:.4} rad/s, brake {}",
        faulty.trip,
        trip_at - freeze_at,
        last.shaft_rad_s,
        if last.brake { "applied" } else { "released" }
    );
    write_outputs(
        &dir,
        "cycle_encoder_freeze",
        &faulty,
        "demo cycle, encoder frozen",
    )?;

    // 3. A resonant back-and-forth request.
    let at_ceiling = ride
        .geometry
        .steady_state_at_speed(AngularSpeed::from_rad_per_s(ceiling))?;
    let slow_period = match ride.geometry.swing_modes(&at_ceiling) {
        SwingModes::Chain { slow, .. } => slow.period_s(),
        SwingModes::Rod { radial } => radial.period_s(),
    };
    let half = f64::from(slow_period) / 2.0;
    let high = f64::from(ceiling);
    let low = 0.75 * high;
    let rocking = move |t: f64| {
        if t < 60.0 || ((t - 60.0) / half).floor() as i64 % 2 == 0 {
            high
        } else {
            low
        }
    };
    println!(
        "\n3. Request rocked between {low:.3} and {high:.3} rad/s (75 % and 100 % of the ceiling) every {half:.2} s (half the slow swing period at the ceiling), 240 s"
    );
    let without = run_requests(&ride, rocking, None, 240.0)?;
    let with = run_requests(&ride, rocking, governor, 240.0)?;
    println!(
        "  through the interlock without the governor: peak angle {:.2}° ({})",
        without.peak_angle_deg,
        if without.peak_angle_deg > certified {
            "ABOVE the certified angle"
        } else {
            "within the certified angle"
        }
    );
    println!(
        "  through the interlock with the swing governor: peak angle {:.2}° ({})",
        with.peak_angle_deg,
        if with.peak_angle_deg > certified {
            "ABOVE the certified angle"
        } else {
            "within the certified angle"
        }
    );
    let speed = |run: &swingdrive::sim::cycle::RequestRun| {
        run.trace
            .iter()
            .map(|s| (s.time_s, s.command_rad_s * RPM))
            .collect::<Vec<_>>()
    };
    let angle = |run: &swingdrive::sim::cycle::RequestRun| {
        run.seat
            .iter()
            .map(|o| (o.time_s, o.state.angle_from_vertical_rad().to_degrees()))
            .collect::<Vec<_>>()
    };
    let request: Vec<(f64, f64)> = without
        .trace
        .iter()
        .map(|s| (s.time_s, s.request_rad_s * RPM))
        .collect();
    let svg = render_panels(
        "rocked request: without and with the swing governor",
        &[
            Panel {
                axis: "shaft speed [rpm]".into(),
                curves: vec![
                    Curve::new("request", request, (200, 200, 200), 1),
                    Curve::new("command, no governor", speed(&without), (255, 0, 0), 1),
                    Curve::new("command, governor", speed(&with), (0, 0, 255), 2),
                ],
            },
            Panel {
                axis: "swing angle from vertical [deg]".into(),
                curves: vec![
                    Curve::new("no governor", angle(&without), (255, 0, 0), 1),
                    Curve::new("governor", angle(&with), (0, 0, 255), 2),
                    Curve::new(
                        "certified angle",
                        vec![(0.0, certified), (240.0, certified)],
                        (0, 0, 0),
                        1,
                    ),
                ],
            },
        ],
    )?;
    std::fs::write(dir.join("rocking.svg"), svg)?;
    println!("  wrote {}/rocking.svg", dir.display());

    println!("\nSummary");
    for (what, run) in [("interlock", &plain), ("interlock + governor", &normal)] {
        let residual = run
            .steps
            .iter()
            .filter(|s| s.title.contains("swing-free"))
            .filter_map(|s| s.report.as_ref().and_then(|r| r.residual_swing_deg))
            .reduce(f64::max)
            .map_or_else(|| "not measurable".to_owned(), |d| format!("{d:.2}°"));
        let duration: f64 = run
            .steps
            .iter()
            .filter_map(|s| s.report.as_ref())
            .map(|r| r.duration_s)
            .sum();
        println!(
            "  cycle ({what}): {} in {duration:.0} s, peak {:.2}° of {certified}° certified, largest residual swing after a swing-free step {residual}",
            if run.finished { "completed" } else { "NOT completed" },
            run.peak_angle_deg,
        );
    }
    println!(
        "  encoder freeze: tripped ({:?}), ride stopped and braked: {}",
        faulty.trip,
        last.brake && last.shaft_rad_s.abs() < 1e-6
    );
    println!(
        "  rocked request: {:.1}° without the governor, {:.1}° with it",
        without.peak_angle_deg, with.peak_angle_deg
    );
    Ok(())
}
