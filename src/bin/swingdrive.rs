//! `swingdrive`: steady-state tables and profile replays for test benches
//! and commissioning (host only, feature `cli`).
//!
//! Exit status: 0 on success, 1 when a check the command performs fails
//! (a slack chain, a profile outside the ride's limits), 2 on bad input or
//! when an output cannot be written. With `--json` exactly one JSON object
//! is printed on stdout, also on failure (`{"error": …}`). File formats and
//! JSON keys: `docs/files.md`.

use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::{Args, Parser, Subcommand};
use serde::Serialize;
use serde_json::{json, Value};
use swingdrive::ride_file::RideFile;
use swingdrive::sim::output::{render_svg, write_trace_csv};
use swingdrive::sim::{replay, ReplayOptions, SpeedProfile, StartCondition};
use swingdrive::{Angle, Suspension};

/// Seat swing of rotating swing rides: steady-state tables and profile replays.
#[derive(Parser)]
#[command(name = "swingdrive", version, about)]
struct Cli {
    /// Print exactly one JSON object on stdout instead of text.
    #[arg(long, global = true)]
    json: bool,
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Steady-state table: speed, load factor, sensitivity and slow swing
    /// period for a range of swing angles.
    Table(TableArgs),
    /// Replay a speed profile and report peak angle, residual swing, peak
    /// load factor and chain slack.
    Replay(ReplayArgs),
    /// Adversarial search for the worst peak swing angle over admissible
    /// request sequences, without and with the swing governor.
    Envelope(EnvelopeArgs),
    /// Design a swing-free speed change between two steady angles and write
    /// it as a firmware table, CSV and SVG.
    Design(DesignArgs),
    /// Run a ride-cycle program on the simulated ride, through the interlock,
    /// and report per step the duration, peak angle, residual swing and load.
    Cycle(CycleArgs),
}

#[derive(Args)]
struct CycleArgs {
    /// Ride description (TOML) with [drive] and [interlock] tables.
    ride: PathBuf,
    /// Ride-cycle program (TOML, [[step]] tables).
    program: PathBuf,
    /// Answer every operator confirmation after 1 s where the program has no scripted answer.
    #[arg(long)]
    auto_confirm: bool,
    /// Run without the swing governor (the speed ceiling alone protects the angle).
    #[arg(long)]
    no_governor: bool,
    /// Freeze the primary speed channel at this time, s (fault injection).
    #[arg(long)]
    freeze_encoder_at: Option<f64>,
    /// Write the run as CSV to this file.
    #[arg(long)]
    csv: Option<PathBuf>,
    /// Write a plot of speeds, swing angle and program step as SVG to this file.
    #[arg(long)]
    svg: Option<PathBuf>,
}

#[derive(Args)]
struct EnvelopeArgs {
    /// Ride description (TOML); the certified angle and limits come from its
    /// [interlock] table when it has one.
    ride: PathBuf,
    /// Certified angle, degrees (needed without an [interlock] table).
    #[arg(long)]
    certified_deg: Option<f32>,
    /// Random request sequences.
    #[arg(long, default_value_t = 1000)]
    random: usize,
    /// Hill-climb restarts (each objective).
    #[arg(long, default_value_t = 20)]
    restarts: usize,
    /// Seed of the search.
    #[arg(long, default_value_t = 1)]
    seed: u64,
}

#[derive(Args)]
struct TableArgs {
    /// Ride description (TOML).
    ride: PathBuf,
    /// Angle step between rows, degrees (0.1 to 45).
    #[arg(long, default_value_t = 5.0)]
    step_deg: f64,
    /// Largest angle, degrees (up to 89).
    #[arg(long, default_value_t = 60.0)]
    max_deg: f64,
}

#[derive(Args)]
struct ReplayArgs {
    /// Ride description (TOML).
    ride: PathBuf,
    /// Speed profile (CSV: time_s and speed_rad_s or speed_rpm).
    profile: PathBuf,
    /// Settling window after the profile, s, in which the residual swing is measured.
    #[arg(long, default_value_t = 60.0)]
    settle: f64,
    /// Start in steady rotation at the first sample's speed (default: hanging at standstill).
    #[arg(long)]
    start_steady: bool,
    /// Time step of the CSV trace, s.
    #[arg(long, default_value_t = 0.01)]
    dt: f64,
    /// Drop the run permit at this time, s (the top coasts; needs a [drive] table).
    #[arg(long)]
    permit_drop: Option<f64>,
    /// Ignore the ride file's [drive] table: the shaft follows the profile exactly.
    #[arg(long)]
    ideal_drive: bool,
    /// Write the time series as CSV to this file.
    #[arg(long)]
    csv: Option<PathBuf>,
    /// Write a plot of speed and swing angles as SVG to this file.
    #[arg(long)]
    svg: Option<PathBuf>,
    /// Also treat the profile as the *requested* speed and pass it through
    /// the interlock (ceiling, swing governor, ramp) of the ride file's
    /// [interlock] table; reports `governed_peak_angle_deg` beside the direct
    /// `peak_angle_deg`.
    #[arg(long)]
    through_interlock: bool,
}

/// Why a command did not succeed.
enum Failure {
    /// Bad input or an output that could not be written (exit 2).
    Input(String),
}

/// What a command produced: text, a JSON object, and whether its checks passed.
struct Report {
    text: String,
    json: Value,
    passed: bool,
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match &cli.command {
        Command::Table(args) => table(args),
        Command::Replay(args) => replay_command(args, cli.json),
        Command::Envelope(args) => envelope_command(args),
        Command::Design(args) => design_command(args),
        Command::Cycle(args) => cycle_command(args),
    };
    let mut stdout = std::io::stdout().lock();
    match result {
        Ok(report) => {
            let printed = if cli.json {
                writeln!(stdout, "{}", report.json)
            } else {
                write!(stdout, "{}", report.text)
            };
            if printed.is_err() {
                return ExitCode::from(2);
            }
            if report.passed {
                ExitCode::SUCCESS
            } else {
                ExitCode::from(1)
            }
        }
        Err(Failure::Input(message)) => {
            eprintln!("error: {message}");
            if cli.json {
                let _ = writeln!(stdout, "{}", json!({ "error": message }));
            }
            ExitCode::from(2)
        }
    }
}

/// One row of the steady-state table.
#[derive(Serialize)]
struct TableRow {
    angle_deg: f64,
    speed_rad_s: f64,
    speed_rpm: f64,
    speed_deg_s: f64,
    load_factor: f64,
    sensitivity_deg_per_rpm: Option<f64>,
    slow_mode_period_s: Option<f64>,
}

/// An f32 result as the f64 with the same shortest decimal form, so JSON
/// shows 1.0038198 rather than 1.0038198232650757.
fn widen(x: f32) -> f64 {
    x.to_string().parse().unwrap_or(f64::from(x))
}

fn finite(x: f32) -> Option<f64> {
    x.is_finite().then(|| widen(x))
}

fn table(args: &TableArgs) -> Result<Report, Failure> {
    let ride = RideFile::from_path(&args.ride).map_err(|e| Failure::Input(e.to_string()))?;
    if !(args.step_deg.is_finite() && (0.1..=45.0).contains(&args.step_deg)) {
        return Err(Failure::Input(
            "--step-deg must be between 0.1 and 45".into(),
        ));
    }
    if !(args.max_deg.is_finite() && (0.0..=89.0).contains(&args.max_deg)) {
        return Err(Failure::Input("--max-deg must be between 0 and 89".into()));
    }
    let geometry = ride.geometry;
    let mut rows = Vec::new();
    // At most 891 rows (89° in 0.1° steps).
    for k in 0..=890_u32 {
        let angle_deg = f64::from(k) * args.step_deg;
        if angle_deg > args.max_deg + 1e-9 {
            break;
        }
        #[allow(clippy::cast_possible_truncation)]
        let state = geometry
            .steady_state_at_angle(Angle::from_deg(angle_deg as f32))
            .map_err(|e| Failure::Input(e.to_string()))?;
        let slow = geometry.swing_modes(&state).slowest();
        rows.push(TableRow {
            angle_deg,
            speed_rad_s: widen(state.speed.rad_per_s()),
            speed_rpm: widen(state.speed.rpm()),
            speed_deg_s: widen(state.speed.deg_per_s()),
            load_factor: widen(state.load_factor),
            sensitivity_deg_per_rpm: finite(state.sensitivity.deg_per_rpm()),
            slow_mode_period_s: finite(slow.period_s()),
        });
    }
    let suspension = suspension_name(geometry.suspension());
    let mut text = format!(
        "ride {}: {suspension}, hub offset {} m, length {} m, g {} m/s²\n\
         {:>9} {:>10} {:>8} {:>8} {:>7} {:>10} {:>10}\n",
        args.ride.display(),
        geometry.hub_offset_m(),
        geometry.length_m(),
        geometry.gravity().mps2(),
        "angle °",
        "rad/s",
        "rpm",
        "°/s",
        "load",
        "°/rpm",
        "period s",
    );
    let opt = |x: Option<f64>, digits: usize| {
        x.map_or_else(|| "-".to_owned(), |v| format!("{v:.digits$}"))
    };
    for r in &rows {
        text.push_str(&format!(
            "{:>9.1} {:>10.4} {:>8.3} {:>8.2} {:>7.3} {:>10} {:>10}\n",
            r.angle_deg,
            r.speed_rad_s,
            r.speed_rpm,
            r.speed_deg_s,
            r.load_factor,
            opt(r.sensitivity_deg_per_rpm, 2),
            opt(r.slow_mode_period_s, 2),
        ));
    }
    let json = json!({
        "ride_file": args.ride.display().to_string(),
        "suspension": suspension,
        "hub_offset_m": ride.seat.hub_offset_m(),
        "length_m": ride.seat.length_m(),
        "gravity_mps2": ride.seat.gravity_mps2(),
        "rows": rows,
    });
    Ok(Report {
        text,
        json,
        passed: true,
    })
}

fn suspension_name(s: Suspension) -> &'static str {
    match s {
        Suspension::Chain => "chain",
        Suspension::Rod => "rod",
    }
}

fn write_file(path: &Path, bytes: &[u8]) -> Result<(), Failure> {
    std::fs::write(path, bytes)
        .map_err(|e| Failure::Input(format!("{}: cannot write: {e}", path.display())))
}

fn replay_command(args: &ReplayArgs, json_out: bool) -> Result<Report, Failure> {
    let ride = RideFile::from_path(&args.ride).map_err(|e| Failure::Input(e.to_string()))?;
    let profile =
        SpeedProfile::from_csv_path(&args.profile).map_err(|e| Failure::Input(e.to_string()))?;
    let drive = if args.ideal_drive { None } else { ride.drive };
    if args.permit_drop.is_some() && drive.is_none() {
        return Err(Failure::Input(
            "--permit-drop needs a [drive] table in the ride file (coast-down friction)".into(),
        ));
    }
    let options = ReplayOptions {
        settle_s: args.settle,
        start: if args.start_steady {
            StartCondition::Steady
        } else {
            StartCondition::Hanging
        },
        output_step_s: args.dt,
        drive,
        permit_drop_s: args.permit_drop,
        record_trace: args.csv.is_some() || args.svg.is_some(),
        ..ReplayOptions::default()
    };
    let mut stderr = std::io::stderr();
    let show_progress = stderr.is_terminal();
    let mut last_percent = u32::MAX;
    let mut progress = |fraction: f64| {
        #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
        let percent = (fraction * 100.0).floor() as u32;
        if percent != last_percent {
            last_percent = percent;
            let _ = write!(stderr, "\rreplay {percent:3}%");
            if percent >= 100 {
                let _ = writeln!(stderr);
            }
        }
    };
    let outcome = replay(
        &ride.seat,
        &profile,
        &options,
        if show_progress {
            Some(&mut progress)
        } else {
            None
        },
    )
    .map_err(|e| Failure::Input(e.to_string()))?;

    if let Some(path) = &args.csv {
        let mut bytes = Vec::new();
        write_trace_csv(&outcome.trace, &mut bytes)
            .map_err(|e| Failure::Input(format!("{}: {e}", path.display())))?;
        write_file(path, &bytes)?;
    }
    if let Some(path) = &args.svg {
        let title = format!("{} on {}", file_name(&args.profile), file_name(&args.ride));
        let svg = render_svg(&outcome.trace, &title).map_err(|e| Failure::Input(e.to_string()))?;
        write_file(path, svg.as_bytes())?;
    }

    let governed = if args.through_interlock {
        Some(through_interlock(&ride, &profile, args.settle)?)
    } else {
        None
    };
    let s = &outcome.summary;
    let limits = ride.limits.check(&s.profile);
    let passed = !s.chain_slack && limits.ok;
    let mut text = if json_out {
        String::new()
    } else {
        replay_text(args, &ride, &outcome.summary, &limits, passed)
    };
    if let (Some(g), false) = (&governed, json_out) {
        text.push_str(&format!(
            "through the interlock (ceiling, swing governor, ramp): peak angle {:.2} deg, sideways {:.2} deg{}\n",
            g.peak_deg,
            g.sideways_deg,
            if g.tripped { ", the interlock tripped" } else { "" }
        ));
    }
    let mut json = serde_json::to_value(s).map_err(|e| Failure::Input(e.to_string()))?;
    if let Value::Object(map) = &mut json {
        map.insert("ride_file".into(), json!(args.ride.display().to_string()));
        map.insert(
            "profile_file".into(),
            json!(args.profile.display().to_string()),
        );
        map.insert(
            "start".into(),
            json!(if args.start_steady {
                "steady"
            } else {
                "hanging"
            }),
        );
        map.insert("drive_model".into(), json!(drive.is_some()));
        map.insert(
            "limits".into(),
            serde_json::to_value(&limits).unwrap_or(Value::Null),
        );
        map.insert(
            "csv_file".into(),
            json!(args.csv.as_ref().map(|p| p.display().to_string())),
        );
        map.insert(
            "svg_file".into(),
            json!(args.svg.as_ref().map(|p| p.display().to_string())),
        );
        map.insert("passed".into(), json!(passed));
        if let Some(g) = &governed {
            map.insert("governed_peak_angle_deg".into(), json!(g.peak_deg));
            map.insert("governed_peak_tangential_deg".into(), json!(g.sideways_deg));
            map.insert("governed_tripped".into(), json!(g.tripped));
        }
    }
    Ok(Report { text, json, passed })
}

/// The profile as a request through the interlock with the swing governor.
struct Governed {
    peak_deg: f64,
    sideways_deg: f64,
    tripped: bool,
}

/// Ticks the ride file's interlock with a swing governor on the profile as
/// the requested speed (the drive follows the command exactly), then
/// simulates the command.
fn through_interlock(
    ride: &RideFile,
    profile: &SpeedProfile,
    settle_s: f64,
) -> Result<Governed, Failure> {
    use swingdrive::interlock::{EventKind, Sample, TripCause, DEFAULT_EVENT_CAPACITY};
    use swingdrive::protection::closed_loop::simulate_peak;
    use swingdrive::{GovernorParams, Interlock, SwingGovernor, TickInputs};
    let Some(params) = ride.interlock else {
        return Err(Failure::Input(
            "--through-interlock needs an [interlock] table in the ride file".into(),
        ));
    };
    let config = *params.config();
    // The same governor parameters as `swingdrive cycle` (from [interlock]).
    let governor_params = swingdrive::sim::cycle::governor_for(ride).unwrap_or_else(|| {
        GovernorParams::demo(
            &ride.geometry,
            config.certified_angle_deg,
            params.ramp_limits().max_jerk_rad_s3(),
        )
    });
    let mut governor = SwingGovernor::new(&ride.geometry, &governor_params)
        .map_err(|e| Failure::Input(format!("swing governor: {e}")))?;
    governor.confirm_rest(0.0);
    let mut interlock = Interlock::<DEFAULT_EVENT_CAPACITY>::new(params);
    let dt = config.tick_s;
    let end = profile.end_s() + settle_s;
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let ticks = ((end - profile.start_s()) / f64::from(dt)).ceil() as u64;
    let mut measured = 0.0_f32;
    let mut samples = vec![(profile.start_s(), 0.0)];
    let every = (0.05 / f64::from(dt)).ceil().max(1.0) as u64;
    let mut tripped = false;
    for k in 0..ticks {
        #[allow(clippy::cast_precision_loss)]
        let t = profile.start_s() + k as f64 * f64::from(dt);
        #[allow(clippy::cast_possible_truncation)]
        let request = profile.command_at(t).0 as f32;
        let inputs = TickInputs {
            request_rad_s: request,
            #[allow(clippy::cast_possible_truncation)]
            speed: Sample::new(measured, (k % 256) as u8),
            second_speed: Sample::new(measured, (k % 256) as u8),
            angle: Sample::ABSENT,
            run_enable: true,
            reset: false,
        };
        let out = interlock.tick_with(&inputs, dt, &mut governor);
        measured = out.command.speed.rad_per_s();
        #[allow(clippy::cast_precision_loss)]
        if (k + 1) % every == 0 || k + 1 == ticks {
            samples.push((t + f64::from(dt), f64::from(measured)));
        }
    }
    tripped |= interlock
        .events()
        .iter()
        .any(|e| matches!(e.kind, EventKind::Trip(cause) if cause != TripCause::RunEnableDropped));
    let (peak_deg, sideways_deg) =
        simulate_peak(&ride.seat, &samples, 0.0).map_err(|e| Failure::Input(e.to_string()))?;
    Ok(Governed {
        peak_deg,
        sideways_deg,
        tripped,
    })
}

fn file_name(path: &Path) -> String {
    path.file_name().map_or_else(
        || path.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}

fn replay_text(
    args: &ReplayArgs,
    ride: &RideFile,
    s: &swingdrive::sim::ReplaySummary,
    limits: &swingdrive::ride_file::LimitReport,
    passed: bool,
) -> String {
    let mut t = String::new();
    let g = ride.geometry;
    t.push_str(&format!(
        "ride     {}: {}, hub offset {} m, length {} m{}\n",
        args.ride.display(),
        s.suspension,
        g.hub_offset_m(),
        g.length_m(),
        if ride.seat.damping_per_s() > 0.0 {
            format!(", damping {} 1/s", ride.seat.damping_per_s())
        } else {
            String::new()
        }
    ));
    t.push_str(&format!(
        "profile  {}: {:.2} s to {:.2} s, settling {:.1} s\n",
        args.profile.display(),
        s.start_s,
        s.profile_end_s,
        s.end_s - s.profile_end_s
    ));
    t.push_str(&format!(
        "peak angle from vertical  {:7.2}° at {:.2} s (steady at top speed {:.2}°, overshoot {:.2}°)\n",
        s.peak_angle_deg, s.peak_angle_time_s, s.max_steady_angle_deg, s.overshoot_deg
    ));
    t.push_str(&format!(
        "peak tangential swing     {:7.2}°\n",
        s.peak_tangential_deg
    ));
    t.push_str(&format!(
        "residual swing            {:7.2}° (from {:.2} s, about the steady {:.2}° at {:.4} rad/s)\n",
        s.residual_swing_deg, s.residual_window_start_s, s.final_steady_angle_deg, s.final_speed_rad_s
    ));
    t.push_str(&format!(
        "peak load factor          {:7.3}  at {:.2} s\n",
        s.peak_load_factor, s.peak_load_factor_time_s
    ));
    t.push_str(&format!(
        "lowest tension / weight   {:7.3}  at {:.2} s\n",
        s.min_tension_ratio, s.min_tension_time_s
    ));
    if s.chain_slack {
        t.push_str(&format!(
            "chain slack               {} event(s), the first at {:.3} s: results after it are not physical\n",
            s.slack_event_count,
            s.slack_events.first().map_or(f64::NAN, |e| e.start_s)
        ));
    } else if s.suspension == "chain" {
        t.push_str("chain slack               none\n");
    }
    let mut limit_line = String::new();
    if limits.steps > 0 {
        limit_line.push_str(&format!("{} speed step(s); ", limits.steps));
    }
    for c in &limits.checks {
        limit_line.push_str(&format!(
            "{} {:.4} {} {:.4}; ",
            c.limit,
            c.profile,
            if c.ok { "<=" } else { ">" },
            c.allowed
        ));
    }
    t.push_str(&format!(
        "profile vs [limits]       {}: {}\n",
        if limits.ok { "ok" } else { "EXCEEDED" },
        limit_line.trim_end_matches("; ")
    ));
    t.push_str(&format!(
        "solver                    {} steps ({} rejected), rtol {:e}, atol {:e}\n",
        s.solver.accepted_steps,
        s.solver.rejected_steps,
        s.solver.relative_tolerance,
        s.solver.absolute_tolerance
    ));
    for (what, path) in [("csv", &args.csv), ("svg", &args.svg)] {
        if let Some(p) = path {
            t.push_str(&format!("wrote {what:<19} {}\n", p.display()));
        }
    }
    t.push_str(if passed {
        "result: pass\n"
    } else if s.chain_slack {
        "result: FAIL (slack chain)\n"
    } else {
        "result: FAIL (profile outside the ride's limits)\n"
    });
    t
}

/// The adversarial search on one ride (see docs/dynamic_protection.md).
fn envelope_command(args: &EnvelopeArgs) -> Result<Report, Failure> {
    use swingdrive::protection::closed_loop::Rig;
    use swingdrive::protection::search::{search, SearchSize};
    use swingdrive::{GovernorParams, RampLimits};
    let ride = RideFile::from_path(&args.ride).map_err(|e| Failure::Input(e.to_string()))?;
    let (certified, ceiling, limits) = match (&ride.interlock, args.certified_deg) {
        (_, Some(deg)) => {
            let ceiling = ride
                .geometry
                .speed_for_angle(Angle::from_deg(deg))
                .map_err(|e| Failure::Input(format!("--certified-deg: {e}")))?
                .rad_per_s();
            #[allow(clippy::cast_possible_truncation)]
            let limits = RampLimits::new(
                ride.limits.max_accel_rad_s2 as f32,
                ride.limits.max_decel_rad_s2 as f32,
                ride.limits.max_jerk_rad_s3 as f32,
            )
            .map_err(|e| Failure::Input(e.to_string()))?;
            (deg, ceiling, limits)
        }
        (Some(p), None) => (
            p.config().certified_angle_deg,
            p.ceiling().ceiling_rad_s(),
            p.ramp_limits(),
        ),
        (None, None) => {
            return Err(Failure::Input(
                "the ride file has no [interlock] table: give --certified-deg".into(),
            ))
        }
    };
    // With [interlock], the governor of `swingdrive cycle`; otherwise the demo parameters.
    let from_file = swingdrive::sim::cycle::governor_for(&ride);
    let params = from_file.unwrap_or_else(|| {
        GovernorParams::demo(&ride.geometry, certified, limits.max_jerk_rad_s3())
    });
    let rig = Rig {
        geometry: ride.geometry,
        limits,
        stop_limits: limits,
        ceiling_rad_s: ceiling,
        params,
    };
    let size = SearchSize {
        random: args.random,
        restarts: args.restarts,
        steps: 10,
        duration_s: 150,
        seed: args.seed,
    };
    let r = search(&rig, &size);
    let passed = r.governed_exceedances == 0 && r.governed_faults == 0;
    let text = format!(
        "certified angle {certified} deg, steady-state ceiling {ceiling:.4} rad/s\n\
         runs: {} (each without and with the governor)\n\
         worst peak without governor: {:.2} deg ({})\n\
         worst peak with governor:    {:.2} deg ({}), sideways {:.2} deg\n\
         governed runs above the certified angle: {}, with a governor fault: {}\n",
        r.runs,
        r.bare.peak_deg,
        r.bare.case,
        r.governed.peak_deg,
        r.governed.case,
        r.governed.sideways_deg,
        r.governed_exceedances,
        r.governed_faults
    );
    let json = json!({
        "certified_angle_deg": certified,
        "ceiling_rad_s": ceiling,
        "runs": r.runs,
        "peak_angle_deg": r.bare.peak_deg,
        "peak_case": r.bare.case,
        "governed_peak_angle_deg": r.governed.peak_deg,
        "governed_peak_case": r.governed.case,
        "governed_sideways_deg": r.governed.sideways_deg,
        "governed_exceedances": r.governed_exceedances,
        "governed_faults": r.governed_faults,
        "note": if from_file.is_some() {
            "governor parameters: swingdrive::sim::cycle::governor_for (from [interlock]: certified angle, length band, jerk; target rate 0.02 rad/s² as in GovernorParams::demo)"
        } else {
            "governor parameters: GovernorParams::demo (length band +-2 %, speed uncertainty 0.005 rad/s)"
        },
    });
    Ok(Report { text, json, passed })
}

#[derive(Args)]
struct DesignArgs {
    /// Ride description (TOML); limits from [limits] (and [interlock] if given).
    ride: PathBuf,
    /// Start angle, degrees (0: from rest, seats hanging).
    #[arg(long, default_value_t = 0.0)]
    from_deg: f64,
    /// End angle, degrees (0: spin-down to rest).
    #[arg(long)]
    to_deg: f64,
    /// Duration, s; without it the shortest that meets the residual target.
    #[arg(long)]
    duration: Option<f64>,
    /// Residual-swing target over the tolerance band, degrees.
    #[arg(long, default_value_t = 0.2)]
    target_deg: f64,
    /// Also design (and check) every length with this light seat damping, 1/s.
    #[arg(long)]
    extra_damping: Option<f64>,
    /// Write the designed profile as CSV (time_s,speed_rad_s).
    #[arg(long)]
    csv: Option<PathBuf>,
    /// Write the firmware table: Rust source if the name ends in `.rs`, else raw bytes.
    #[arg(long)]
    table: Option<PathBuf>,
    /// Write an SVG comparing the designed and the time-optimal profiles.
    #[arg(long)]
    svg: Option<PathBuf>,
}

fn design_command(args: &DesignArgs) -> Result<Report, Failure> {
    use swingdrive::design::{
        compare, design, plot, table as tables, target_duration_bound_s, time_optimal_duration_s,
        DesignError, DesignOptions, DesignRequest, DurationChoice,
    };

    let ride = RideFile::from_path(&args.ride).map_err(|e| Failure::Input(e.to_string()))?;
    for (name, v) in [("--from-deg", args.from_deg), ("--to-deg", args.to_deg)] {
        if !(v.is_finite() && (0.0..=85.0).contains(&v)) {
            return Err(Failure::Input(format!("{name} must be between 0 and 85")));
        }
    }
    if (args.from_deg - args.to_deg).abs() < 1e-6 {
        return Err(Failure::Input("--from-deg and --to-deg must differ".into()));
    }
    if let Some(d) = args.duration {
        if !(d.is_finite() && d > 0.0 && d <= swingdrive::design::MAX_DURATION_S) {
            return Err(Failure::Input("--duration must be in (0, 600] s".into()));
        }
    }
    if !(args.target_deg.is_finite() && args.target_deg > 0.0 && args.target_deg <= 10.0) {
        return Err(Failure::Input("--target-deg must be in (0, 10]".into()));
    }
    let reference = ride.seat.steady_reference();
    let speed = |deg: f64| {
        if deg == 0.0 {
            0.0
        } else {
            reference.speed_for_angle(deg.to_radians())
        }
    };
    let (from, to) = (speed(args.from_deg), speed(args.to_deg));
    let mut options = DesignOptions::default();
    options.residual_target_deg = args.target_deg;
    options.extra_damping_per_s = args.extra_damping;
    let mut limits = ride.limits;
    let nominal_length = ride.seat.length_m();
    // The parameter set: its stamp, its length band and its certified limits.
    let (stamp, stamp_source) = match &ride.interlock {
        Some(params) => {
            let c = params.config();
            let ceiling = f64::from(params.ceiling().ceiling_rad_s());
            if from.max(to) > ceiling {
                return Err(Failure::Input(format!(
                    "the end speed {:.4} rad/s is above the interlock's speed ceiling {ceiling:.4} rad/s",
                    from.max(to)
                )));
            }
            let half_width = f64::from(c.length_max_m) - nominal_length;
            if half_width > 0.0 {
                options.length_band_m =
                    Some((nominal_length - half_width, nominal_length + half_width));
            }
            limits.max_accel_rad_s2 = limits
                .max_accel_rad_s2
                .min(f64::from(c.max_acceleration_rad_s2));
            limits.max_decel_rad_s2 = limits
                .max_decel_rad_s2
                .min(f64::from(c.max_deceleration_rad_s2));
            limits.max_jerk_rad_s3 = limits.max_jerk_rad_s3.min(f64::from(c.max_jerk_rad_s3));
            (params.stamp(), "interlock")
        }
        None => (0, "none"),
    };
    let band = options.length_band_m.unwrap_or((
        (1.0 - options.band_fraction) * nominal_length,
        (1.0 + options.band_fraction) * nominal_length,
    ));
    let request = DesignRequest {
        seat: ride.seat,
        limits,
        from_speed_rad_s: from,
        to_speed_rad_s: to,
        duration: args
            .duration
            .map_or(DurationChoice::Shortest, DurationChoice::Fixed),
    };
    let t_opt = time_optimal_duration_s(&limits, from, to);
    let bound = target_duration_bound_s(&ride.seat, &limits, from, to);
    let base = json!({
        "ride_file": args.ride.display().to_string(),
        "suspension": suspension_name(ride.geometry.suspension()),
        "from_deg": args.from_deg,
        "to_deg": args.to_deg,
        "from_speed_rad_s": from,
        "to_speed_rad_s": to,
        "length_band_m": [band.0, band.1],
        "residual_target_deg": args.target_deg,
        "extra_damping_per_s": args.extra_damping,
        "time_optimal_duration_s": t_opt,
        "target_duration_bound_s": bound,
        "stamp": format!("{stamp:#010x}"),
        "stamp_source": stamp_source,
    });
    let d = match design(&request, &options) {
        Ok(d) => d,
        Err(e @ (DesignError::Param(_) | DesignError::Sim(_))) => {
            return Err(Failure::Input(e.to_string()))
        }
        Err(e) => {
            let mut json = base;
            if let Value::Object(map) = &mut json {
                map.insert("passed".into(), json!(false));
                map.insert("error".into(), json!(e.to_string()));
            }
            return Ok(Report {
                text: format!("design failed: {e}\nresult: FAIL\n"),
                json,
                passed: false,
            });
        }
    };

    let speeds: Vec<f64> = d.samples.iter().map(|s| s.1).collect();
    let bytes = tables::encode(&speeds, d.table_period_s, stamp)
        .map_err(|e| Failure::Input(e.to_string()))?;
    if let Some(path) = &args.table {
        let is_rust = path.extension().is_some_and(|e| e == "rs");
        if is_rust {
            let comments = vec![
                format!(
                    "Swing-free profile for {}: {}° -> {}° in {:.2} s, designed by `swingdrive design`.",
                    file_name(&args.ride),
                    args.from_deg,
                    args.to_deg,
                    d.duration_s
                ),
                format!(
                    "Stamp {stamp:#010x} ({}); residual swing {:.3}° worst over lengths {:.3}..{:.3} m.",
                    if stamp_source == "interlock" {
                        "the [interlock] parameter set"
                    } else {
                        "no parameter set: a player expecting a real stamp refuses it"
                    },
                    d.residual_swing_deg,
                    band.0,
                    band.1
                ),
            ];
            let source = tables::to_rust_source(&bytes, "SWING_FREE_TABLE", &comments);
            write_file(path, source.as_bytes())?;
        } else {
            write_file(path, &bytes)?;
        }
    }
    if let Some(path) = &args.csv {
        let mut csv = String::from("time_s,speed_rad_s\n");
        for (t, w) in &d.samples {
            csv.push_str(&format!("{t:.6},{w}\n"));
        }
        write_file(path, csv.as_bytes())?;
    }
    if let Some(path) = &args.svg {
        let ramp = compare::time_optimal_samples(&limits, from, to, d.table_period_s);
        let span = d.duration_s.max(ramp.last().map_or(0.0, |s| s.0));
        let trace_of =
            |samples: &[(f64, f64)]| -> Result<Vec<swingdrive::sim::TraceSample>, Failure> {
                let mut padded = samples.to_vec();
                if let Some(&(t, w)) = samples.last() {
                    if t < span {
                        padded.push((span, w));
                    }
                }
                let profile =
                    compare::to_profile(&padded).map_err(|e| Failure::Input(e.to_string()))?;
                let options = ReplayOptions {
                    settle_s: 0.5 * span,
                    start: if from == 0.0 {
                        StartCondition::Hanging
                    } else {
                        StartCondition::Steady
                    },
                    output_step_s: 0.05,
                    ..ReplayOptions::default()
                };
                replay(&ride.seat, &profile, &options, None)
                    .map(|o| o.trace)
                    .map_err(|e| Failure::Input(e.to_string()))
            };
        let designed = trace_of(&d.samples)?;
        let optimal = trace_of(&ramp)?;
        let title = format!(
            "{}: {}° -> {}°, swing-free {:.2} s vs time-optimal {:.2} s",
            file_name(&args.ride),
            args.from_deg,
            args.to_deg,
            d.duration_s,
            t_opt
        );
        let curves = [
            plot::Curve {
                label: "swing-free (designed)",
                colour: plotters::style::RGBColor(0, 90, 200),
                trace: &designed,
            },
            plot::Curve {
                label: "time-optimal ramp",
                colour: plotters::style::RGBColor(210, 40, 40),
                trace: &optimal,
            },
        ];
        let svg =
            plot::render_comparison(&curves, &title).map_err(|e| Failure::Input(e.to_string()))?;
        write_file(path, svg.as_bytes())?;
    }

    let passed = d.meets_target;
    let mut json = base;
    if let Value::Object(map) = &mut json {
        map.insert("passed".into(), json!(passed));
        map.insert("duration_s".into(), json!(d.duration_s));
        map.insert("residual_swing_deg".into(), json!(d.residual_swing_deg));
        map.insert("peak_angle_deg".into(), json!(d.peak_angle_deg));
        map.insert("steady_angle_deg".into(), json!(d.steady_angle_deg));
        map.insert("overshoot_deg".into(), json!(d.overshoot_deg));
        map.insert("limits_ok".into(), json!(d.limits_ok));
        map.insert(
            "profile".into(),
            serde_json::to_value(d.stats).unwrap_or(Value::Null),
        );
        map.insert(
            "limits".into(),
            serde_json::to_value(limits).unwrap_or(Value::Null),
        );
        map.insert(
            "band".into(),
            serde_json::to_value(&d.checks).unwrap_or(Value::Null),
        );
        map.insert("table_period_s".into(), json!(d.table_period_s));
        map.insert("table_samples".into(), json!(d.samples.len()));
        map.insert("table_bytes".into(), json!(bytes.len()));
        map.insert("optimiser_iterations".into(), json!(d.optimiser.iterations));
        map.insert("durations_tried".into(), json!(d.optimiser.durations_tried));
        for (key, path) in [
            ("csv_file", &args.csv),
            ("table_file", &args.table),
            ("svg_file", &args.svg),
        ] {
            map.insert(
                key.into(),
                json!(path.as_ref().map(|p| p.display().to_string())),
            );
        }
    }
    let mut text = format!(
        "ride     {}: {}, {}° -> {}° ({:.4} -> {:.4} rad/s)\n",
        args.ride.display(),
        suspension_name(ride.geometry.suspension()),
        args.from_deg,
        args.to_deg,
        from,
        to
    );
    text.push_str(&format!(
        "duration                  {:7.2} s (time-optimal ramp {:.2} s; target bound {:.2} s)\n",
        d.duration_s, t_opt, bound
    ));
    text.push_str(&format!(
        "residual swing            {:7.3}° worst over lengths {:.3}..{:.3} m (target {}°)\n",
        d.residual_swing_deg, band.0, band.1, args.target_deg
    ));
    text.push_str(&format!(
        "peak angle from vertical  {:7.2}° worst over the band (nominal steady {:.2}°; overshoot past each length's own steady angle {:.2}°)\n",
        d.peak_angle_deg, d.steady_angle_deg, d.overshoot_deg
    ));
    text.push_str(&format!(
        "profile vs limits         {}: accel {:.4}, decel {:.4}, jerk {:.4}\n",
        if d.limits_ok { "ok" } else { "EXCEEDED" },
        d.stats.peak_accel_rad_s2,
        d.stats.peak_decel_rad_s2,
        d.stats.peak_jerk_rad_s3
    ));
    text.push_str(&format!(
        "table                     {} samples every {} s, {} bytes, stamp {stamp:#010x} ({stamp_source})\n",
        d.samples.len(),
        d.table_period_s,
        bytes.len()
    ));
    for (what, path) in [
        ("csv", &args.csv),
        ("table", &args.table),
        ("svg", &args.svg),
    ] {
        if let Some(p) = path {
            text.push_str(&format!("wrote {what:<19} {}\n", p.display()));
        }
    }
    text.push_str(if passed {
        "result: pass\n"
    } else {
        "result: FAIL (residual target not met)\n"
    });
    Ok(Report { text, json, passed })
}

fn cycle_command(args: &CycleArgs) -> Result<Report, Failure> {
    use swingdrive::program_file::ProgramFile;
    use swingdrive::sim::closed_loop::SensorFault;
    use swingdrive::sim::cycle::{
        governor_for, render_cycle_svg, run_cycle, write_cycle_csv, CycleOptions,
    };

    let ride = RideFile::from_path(&args.ride).map_err(|e| Failure::Input(e.to_string()))?;
    let program =
        ProgramFile::from_path(&args.program).map_err(|e| Failure::Input(e.to_string()))?;
    let options = CycleOptions {
        auto_confirm: args.auto_confirm,
        governor: if args.no_governor {
            None
        } else {
            governor_for(&ride)
        },
        fault: match args.freeze_encoder_at {
            Some(t) if !t.is_finite() || t < 0.0 => {
                return Err(Failure::Input(
                    "--freeze-encoder-at must be a time of 0 s or more".into(),
                ))
            }
            Some(t) => Some((t, SensorFault::FreezePrimary)),
            None => None,
        },
        ..CycleOptions::default()
    };
    let mut stderr = std::io::stderr();
    let show_progress = stderr.is_terminal();
    let mut progress = |fraction: f64| {
        let _ = write!(stderr, "\rcycle {:3.0}%", (fraction * 100.0).floor());
        if fraction >= 1.0 {
            let _ = writeln!(stderr);
        }
    };
    let out = run_cycle(
        &ride,
        &program,
        &options,
        if show_progress {
            Some(&mut progress)
        } else {
            None
        },
    )
    .map_err(|e| Failure::Input(format!("{}: {e}", args.program.display())))?;
    if let Some(path) = &args.csv {
        let mut bytes = Vec::new();
        write_cycle_csv(&out, &mut bytes)
            .map_err(|e| Failure::Input(format!("{}: {e}", path.display())))?;
        write_file(path, &bytes)?;
    }
    if let Some(path) = &args.svg {
        let title = format!("{} on {}", file_name(&args.program), file_name(&args.ride));
        let svg = render_cycle_svg(&out, &title).map_err(|e| Failure::Input(e.to_string()))?;
        write_file(path, svg.as_bytes())?;
    }
    let certified = ride
        .interlock
        .map_or(f64::NAN, |p| f64::from(p.config().certified_angle_deg));
    let passed = out.finished && out.peak_angle_deg <= certified;
    let mut text = format!(
        "cycle {} on {} ({} steps, governor {})\n\n",
        program.name.as_deref().unwrap_or("(unnamed)"),
        file_name(&args.ride),
        program.steps.len(),
        if options.governor.is_some() {
            "on"
        } else {
            "off"
        }
    );
    text.push_str(&out.step_table(""));
    text.push_str(&format!(
        "\npeak angle {:.2} deg (certified {certified:.1}), peak load factor {:.3}, the interlock limited the request for {:.1} s\n",
        out.peak_angle_deg, out.peak_load_factor, out.limiting_s
    ));
    if let Some(cause) = out.trip {
        text.push_str(&format!("tripped: {cause:?}; the ride was stopped\n"));
    }
    text.push_str(if passed {
        "result: pass\n"
    } else {
        "result: FAIL (not finished, or peak angle above the certified angle)\n"
    });
    let json = json!({
        "ride_file": args.ride.display().to_string(),
        "program_file": args.program.display().to_string(),
        "governor": options.governor.is_some(),
        "finished": out.finished,
        "trip": out.trip.map(|c| format!("{c:?}")),
        "peak_angle_deg": out.peak_angle_deg,
        "certified_angle_deg": certified,
        "peak_load_factor": out.peak_load_factor,
        "limiting_s": out.limiting_s,
        "steps": out.steps,
        "events": out.events,
        "csv_file": args.csv.as_ref().map(|p| p.display().to_string()),
        "svg_file": args.svg.as_ref().map(|p| p.display().to_string()),
        "passed": passed,
    });
    Ok(Report { text, json, passed })
}
