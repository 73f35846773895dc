//! `swingdrive design` end to end: the built binary on a small ride (demo
//! data), its outputs read back, and its exit codes.
#![cfg(feature = "cli")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::Value;
use swingdrive::player::{ProfilePlayer, ProfileTable};

/// Demo data: a small chain ride with brisk limits (a design takes seconds).
const RIDE: &str = "[geometry]\nhub_offset_m = 1.0\nlength_m = 2.0\nsuspension = \"chain\"\n\
[limits]\nmax_accel_rad_s2 = 0.4\nmax_decel_rad_s2 = 0.5\nmax_jerk_rad_s3 = 0.4\n";

fn dir(test: &str) -> PathBuf {
    let d = Path::new(env!("CARGO_TARGET_TMPDIR")).join(test);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn design(args: &[&str]) -> (i32, Value) {
    let out = Command::new(env!("CARGO_BIN_EXE_swingdrive"))
        .arg("--json")
        .arg("design")
        .args(args)
        .output()
        .unwrap();
    let text = String::from_utf8(out.stdout).unwrap();
    (
        out.status.code().unwrap(),
        serde_json::from_str(text.trim()).unwrap(),
    )
}

#[test]
fn design_writes_table_csv_and_svg_and_reports_the_figures() {
    let d = dir("design_writes");
    let ride = d.join("ride.toml");
    std::fs::write(&ride, RIDE).unwrap();
    let (csv, table, svg) = (d.join("p.csv"), d.join("p.bin"), d.join("p.svg"));
    let (code, json) = design(&[
        ride.to_str().unwrap(),
        "--to-deg",
        "35",
        "--duration",
        "11",
        "--csv",
        csv.to_str().unwrap(),
        "--table",
        table.to_str().unwrap(),
        "--svg",
        svg.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{json}");
    assert_eq!(json["passed"], true);
    assert_eq!(json["duration_s"].as_f64().unwrap(), 11.0);
    // The target: at most 0.2° residual swing, worst over the band.
    assert!(json["residual_swing_deg"].as_f64().unwrap() <= 0.2);
    assert!(json["peak_angle_deg"].as_f64().unwrap() > 30.0);
    assert_eq!(json["stamp_source"], "none");
    // CSV and table carry the same samples; the player plays them back.
    let csv_text = std::fs::read_to_string(&csv).unwrap();
    let mut lines = csv_text.lines();
    assert_eq!(lines.next(), Some("time_s,speed_rad_s"));
    let speeds: Vec<f64> = lines
        .map(|l| l.split(',').nth(1).unwrap().parse().unwrap())
        .collect();
    assert_eq!(speeds.len(), 221);
    let bytes = std::fs::read(&table).unwrap();
    assert_eq!(json["table_bytes"].as_u64().unwrap() as usize, bytes.len());
    let mut player = ProfilePlayer::new(ProfileTable::parse(&bytes, 0).unwrap());
    for w in speeds.iter().skip(1) {
        assert_eq!(f64::from(player.step(0.05).unwrap().request_rad_s), *w);
    }
    assert!(std::fs::read_to_string(&svg).unwrap().starts_with("<svg"));
}

#[test]
fn design_exit_codes() {
    let d = dir("design_exit_codes");
    let ride = d.join("ride.toml");
    std::fs::write(&ride, RIDE).unwrap();
    let r = ride.to_str().unwrap();
    // Bad input: exit 2 with the reason.
    let (code, json) = design(&[r, "--to-deg", "95"]);
    assert_eq!(code, 2);
    assert!(json["error"].as_str().unwrap().contains("--to-deg"));
    let (code, _) = design(&[r, "--to-deg", "0"]);
    assert_eq!(code, 2);
    // Shorter than the limits allow: the check fails, exit 1, with the reason.
    let (code, json) = design(&[r, "--to-deg", "35", "--duration", "3"]);
    assert_eq!(code, 1);
    assert_eq!(json["passed"], false);
    assert!(json["error"].as_str().unwrap().contains("limits"));
}

/// Demo data: the small ride with an interlock parameter set (certified 40°).
const INTERLOCK: &str = "[interlock]\ncertified_angle_deg = 40.0\nmechanical_max_rad_s = 3.0\n\
speed_margin_rad_s = 0.02\nmax_acceleration_rad_s2 = 0.4\nmax_deceleration_rad_s2 = 0.5\n\
max_jerk_rad_s3 = 0.4\noverspeed_tolerance_rad_s = 0.05\nfollowing_tolerance_rad_s = 0.08\n\
channel_tolerance_rad_s = 0.04\nsensor_max_rad_s = 5.0\nstandstill_rad_s = 0.01\ntick_s = 0.001\n\
overrun_tick_s = 0.002\nstop_time_margin_s = 2.0\nbrake_delay_s = 30.0\ndebounce_ticks = 5\n\
stale_ticks = 10\nstandstill_ticks = 50\nreverse_permitted = false\nsecond_channel = true\n\
angle_sensor = false\n";

#[test]
fn with_an_interlock_table_the_stamp_is_the_parameter_sets() {
    let d = dir("design_interlock");
    let ride = d.join("ride.toml");
    std::fs::write(&ride, format!("{RIDE}{INTERLOCK}")).unwrap();
    let params = swingdrive::ride_file::RideFile::from_path(&ride)
        .unwrap()
        .interlock
        .unwrap();
    let table = d.join("t.bin");
    let r = ride.to_str().unwrap();
    let (code, json) = design(&[
        r,
        "--to-deg",
        "30",
        "--duration",
        "11",
        "--table",
        table.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{json}");
    assert_eq!(json["stamp_source"], "interlock");
    assert_eq!(json["stamp"], format!("{:#010x}", params.stamp()));
    let bytes = std::fs::read(&table).unwrap();
    assert!(ProfileTable::parse(&bytes, params.stamp()).is_ok());
    assert!(ProfileTable::parse(&bytes, 0).is_err());
    // An end angle beyond the certified one is above the ceiling: bad input.
    let (code, json) = design(&[r, "--to-deg", "45", "--duration", "11"]);
    assert_eq!(code, 2);
    assert!(json["error"].as_str().unwrap().contains("ceiling"));
}
