//! The `swingdrive` tool end to end: the built binary on real files.
#![cfg(feature = "cli")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use serde_json::Value;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_swingdrive"))
}

fn example(name: &str) -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples")
        .join(name)
        .display()
        .to_string()
}

/// A scratch file for one test.
fn scratch(test: &str, name: &str, contents: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(test);
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(name);
    std::fs::write(&path, contents).unwrap();
    path
}

fn run(args: &[&str]) -> Output {
    bin().args(args).output().unwrap()
}

/// Exactly one JSON object on stdout.
fn json(output: &Output) -> Value {
    let text = String::from_utf8(output.stdout.clone()).unwrap();
    let mut stream = serde_json::Deserializer::from_str(&text).into_iter::<Value>();
    let value = stream.next().expect("no JSON on stdout").unwrap();
    assert!(stream.next().is_none(), "more than one JSON value: {text}");
    assert!(value.is_object());
    value
}

const RIDE: &str = "[geometry]\nhub_offset_m = 3.0\nlength_m = 5.0\nsuspension = \"chain\"\ngravity_mps2 = 9.80\n\n[limits]\nmax_accel_rad_s2 = 0.10\nmax_decel_rad_s2 = 0.12\nmax_jerk_rad_s3 = 0.05\n";

#[test]
fn table_json_rows() {
    let ride = scratch("table_json_rows", "ride.toml", RIDE);
    let out = run(&[
        "table",
        ride.to_str().unwrap(),
        "--json",
        "--step-deg",
        "10",
    ]);
    assert_eq!(out.status.code(), Some(0));
    let v = json(&out);
    let rows = v["rows"].as_array().unwrap();
    assert_eq!(rows.len(), 7); // 0°, 10°, …, 60°
    let row = rows.iter().find(|r| r["angle_deg"] == 30.0).unwrap();
    // Hand calculation, common practice: r0 = 3 m, L = 5 m, φ = 30°,
    // g = 9.80 m/s² → ω = 1.01426 rad/s = 9.6856 rpm, load factor 1.1547.
    assert!((row["speed_rad_s"].as_f64().unwrap() - 1.01426).abs() < 1e-5);
    assert!((row["speed_rpm"].as_f64().unwrap() - 9.6856).abs() < 1e-3);
    assert!((row["load_factor"].as_f64().unwrap() - 1.1547).abs() < 1e-4);
    for key in [
        "speed_deg_s",
        "sensitivity_deg_per_rpm",
        "slow_mode_period_s",
    ] {
        assert!(row[key].is_number(), "{key}");
    }
    let text = run(&["table", ride.to_str().unwrap()]);
    assert_eq!(text.status.code(), Some(0));
    assert!(String::from_utf8(text.stdout).unwrap().contains("rpm"));
}

#[test]
fn demo_step_start_swings_far_and_the_slow_ramp_little() {
    // The demo ride and profiles in examples/ (demo data). Linear-oscillator
    // estimate (hand calculation): a step of the steady angle (0 → 45°) leaves
    // a swing of about that amplitude; the 60 s smooth ramp leaves about
    // 12 Δφ / (Ω T)² ≈ 0.5° (Ω ≈ 0.53 rad/s, the slowest mode on the way).
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join("demo");
    std::fs::create_dir_all(&dir).unwrap();
    let ride = example("demo_chain_ride.toml");
    let mut figures = Vec::new();
    for (name, expected_exit) in [("step_start", 1), ("slow_ramp", 0)] {
        let csv = dir.join(format!("{name}.csv"));
        let svg = dir.join(format!("{name}.svg"));
        let _ = std::fs::remove_file(&csv);
        let _ = std::fs::remove_file(&svg);
        let out = run(&[
            "replay",
            &ride,
            &example(&format!("{name}.csv")),
            "--csv",
            csv.to_str().unwrap(),
            "--svg",
            svg.to_str().unwrap(),
            "--json",
        ]);
        // The step exceeds the ride's [limits] (a step has no finite
        // acceleration): a failed check, exit 1, outputs written all the same.
        assert_eq!(out.status.code(), Some(expected_exit), "{name}");
        let v = json(&out);
        assert_eq!(v["passed"], expected_exit == 0);
        assert_eq!(v["chain_slack"], false);
        assert_eq!(v["limits"]["ok"], expected_exit == 0);
        let trace = std::fs::read_to_string(&csv).unwrap();
        let mut lines = trace.lines();
        assert_eq!(
            lines.next().unwrap(),
            "time_s,command_rad_s,speed_rad_s,speed_rpm,accel_rad_s2,radial_angle_deg,tangential_angle_deg,angle_from_vertical_deg,load_factor,tension_ratio"
        );
        assert_eq!(lines.count(), 18_001); // 0 to 180 s every 10 ms
        let plot = std::fs::read_to_string(&svg).unwrap();
        assert!(plot.starts_with("<svg") && plot.contains("swing angle"));
        figures.push(v);
    }
    let (step, ramp) = (&figures[0], &figures[1]);
    let f = |v: &Value, key: &str| v[key].as_f64().unwrap();
    assert!(f(step, "overshoot_deg") > 20.0);
    assert!(f(step, "residual_swing_deg") > 20.0);
    assert!(f(ramp, "overshoot_deg") < 1.5);
    assert!(f(ramp, "residual_swing_deg") < 1.5);
    assert!(f(step, "peak_load_factor") > f(ramp, "peak_load_factor"));
    assert!(f(step, "peak_angle_deg") > f(ramp, "peak_angle_deg") + 20.0);
}

#[test]
fn a_slack_chain_fails_the_replay() {
    // Slowing down swings the seats ahead; the step back up would need the
    // chain to push (see tests/sim_replay.rs).
    let ride = scratch("slack", "ride.toml", RIDE);
    let profile = scratch(
        "slack",
        "profile.csv",
        "time_s,speed_rad_s\n0,1.0\n4,0.6\n4,1.0\n20,1.0\n",
    );
    let out = run(&[
        "replay",
        ride.to_str().unwrap(),
        profile.to_str().unwrap(),
        "--start-steady",
        "--settle",
        "5",
        "--json",
    ]);
    assert_eq!(out.status.code(), Some(1));
    let v = json(&out);
    assert_eq!(v["chain_slack"], true);
    assert_eq!(v["slack_events"][0]["kind"], "impulse");
    assert_eq!(v["slack_events"][0]["start_s"], 4.0);
    let text = run(&[
        "replay",
        ride.to_str().unwrap(),
        profile.to_str().unwrap(),
        "--start-steady",
        "--settle",
        "5",
    ]);
    assert_eq!(text.status.code(), Some(1));
    assert!(String::from_utf8(text.stdout)
        .unwrap()
        .contains("FAIL (slack chain)"));
}

#[test]
fn bad_input_names_file_line_and_field() {
    let bad_ride = scratch(
        "bad",
        "ride.toml",
        &RIDE.replace("length_m = 5.0", "length_m = -5.0"),
    );
    let ride = scratch("bad", "good.toml", RIDE);
    let bad_csv = scratch("bad", "profile.csv", "time_s,speed_rpm\n0,0\n10,fast\n");
    let good_csv = scratch("bad", "good.csv", "time_s,speed_rpm\n0,0\n10,5\n");

    let out = run(&["table", bad_ride.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(
        err.contains("ride.toml: line 3, field `geometry.length_m`"),
        "{err}"
    );

    let out = run(&[
        "replay",
        ride.to_str().unwrap(),
        bad_csv.to_str().unwrap(),
        "--json",
    ]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr.clone()).unwrap();
    assert!(
        err.contains("profile.csv: line 3, field `speed_rpm`: not a number"),
        "{err}"
    );
    let v = json(&out);
    assert!(v["error"].as_str().unwrap().contains("line 3"));

    let out = run(&["replay", ride.to_str().unwrap(), "no/such/file.csv"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8(out.stderr)
        .unwrap()
        .contains("no/such/file.csv: cannot open"));

    // A permit drop needs a [drive] table to coast with.
    let out = run(&[
        "replay",
        ride.to_str().unwrap(),
        good_csv.to_str().unwrap(),
        "--permit-drop",
        "3",
    ]);
    assert_eq!(out.status.code(), Some(2));

    // Argument errors are bad input too.
    assert_eq!(run(&["replay"]).status.code(), Some(2));
    assert_eq!(
        run(&["table", ride.to_str().unwrap(), "--step-deg", "0"])
            .status
            .code(),
        Some(2)
    );
}

#[test]
fn the_drive_table_smooths_a_step_and_a_permit_drop_coasts() {
    let ride = scratch(
        "drive",
        "ride.toml",
        &format!(
            "{RIDE}\n[drive]\nlag_s = 1.0\naccel_limit_rad_s2 = 0.05\ncoast_friction_rad_s2 = 0.02\n"
        ),
    );
    let profile = scratch("drive", "p.csv", "time_s,speed_rad_s\n0,0\n0,1.0\n60,1.0\n");
    let replay = |extra: &[&str]| {
        let mut args = vec![
            "replay",
            ride.to_str().unwrap(),
            profile.to_str().unwrap(),
            "--json",
            "--settle",
            "30",
        ];
        args.extend_from_slice(extra);
        json(&run(&args))
    };
    let modelled = replay(&[]);
    let ideal = replay(&["--ideal-drive"]);
    assert_eq!(modelled["drive_model"], true);
    // The torque limit turns the step into a 20 s ramp: far less swing.
    let f = |v: &Value, key: &str| v[key].as_f64().unwrap();
    assert!(f(&modelled, "overshoot_deg") < 0.5 * f(&ideal, "overshoot_deg"));
    let dropped = replay(&["--permit-drop", "40"]);
    assert_eq!(dropped["final_speed_rad_s"], 0.0);
    assert_eq!(dropped["residual_window_start_s"], 60.0);
}

#[test]
fn envelope_reports_the_bare_and_the_governed_peak() {
    // A small search on the demo ride at a 45° certified angle: the bare worst case goes
    // past the certified angle (a jerk-limited move straight to the ceiling alone swings
    // past it on this ride), the governed one stays inside, and exit status 0 says so.
    let out = run(&[
        "envelope",
        &example("demo_chain_ride.toml"),
        "--certified-deg",
        "45",
        "--random",
        "1",
        "--restarts",
        "0",
        "--json",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!(v["peak_angle_deg"].as_f64().unwrap() > 45.0);
    assert!(v["governed_peak_angle_deg"].as_f64().unwrap() < 45.0);
    assert_eq!(v["governed_exceedances"].as_u64(), Some(0));
    // Without an [interlock] table and without --certified-deg: a clear input error.
    let out = run(&["envelope", &example("demo_chain_ride.toml")]);
    assert_eq!(out.status.code(), Some(2));
}

#[test]
fn replay_through_the_interlock_reports_the_governed_peak() {
    // Demo data: the demo ride with a demo [interlock] table (certified 45°, 10 ms ticks).
    // The profile steps straight to 1.15 rad/s: applied directly the seats swing far past
    // 45° (75° here); as a request through ceiling, swing governor and ramp they stay inside.
    let ride = scratch(
        "replay_through_interlock",
        "ride.toml",
        r#"
[geometry]
hub_offset_m = 3.4        # shaft axis to the chain's upper pivot
length_m = 5.8            # pivot to the centre of mass of seat + rider
suspension = "chain"      # or "rod" (hinged in the radial plane)
gravity_mps2 = 9.80665    # optional; standard gravity if absent

[limits]
max_accel_rad_s2 = 0.10
max_decel_rad_s2 = 0.12
max_jerk_rad_s3 = 0.05

[interlock]
certified_angle_deg = 45.0
max_load_factor = 1.3            # optional
mechanical_max_rad_s = 2.0
hub_offset_max_m = 3.5           # optional; default [geometry] hub_offset_m
length_max_m = 6.2               # optional; default [geometry] length_m + 5 %
gravity_min_mps2 = 9.78          # optional; default [geometry] gravity_mps2
speed_margin_rad_s = 0.02
max_acceleration_rad_s2 = 0.10
max_deceleration_rad_s2 = 0.12
max_jerk_rad_s3 = 0.05
overspeed_tolerance_rad_s = 0.05
following_tolerance_rad_s = 0.08
channel_tolerance_rad_s = 0.04
sensor_max_rad_s = 5.0
standstill_rad_s = 0.01
tick_s = 0.01
overrun_tick_s = 0.02
stop_time_margin_s = 2.0
brake_delay_s = 30.0
debounce_ticks = 5
stale_ticks = 10
standstill_ticks = 50
reverse_permitted = false
second_channel = true
angle_sensor = false
"#,
    );
    let out = run(&[
        "replay",
        ride.to_str().unwrap(),
        &example("step_start.csv"),
        "--settle",
        "30",
        "--through-interlock",
        "--json",
    ]);
    let v = json(&out);
    assert!(v["peak_angle_deg"].as_f64().unwrap() > 60.0, "{v}");
    let governed = v["governed_peak_angle_deg"].as_f64().unwrap();
    assert!(governed < 45.0 && governed > 30.0, "{v}");
    assert_eq!(v["governed_tripped"].as_bool(), Some(false));
    // Without an [interlock] table the option is refused with a clear message.
    let out = run(&[
        "replay",
        &example("demo_chain_ride.toml"),
        &example("step_start.csv"),
        "--through-interlock",
    ]);
    assert_eq!(out.status.code(), Some(2));
}
