//! `swingdrive cycle` end to end: the built binary on the demo ride (demo
//! data, an invented ride) with small programs.
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

fn ride() -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/demo_cycle_ride.toml")
        .display()
        .to_string()
}

fn scratch(test: &str, name: &str, contents: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(test);
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(name);
    std::fs::write(&path, contents).unwrap();
    path
}

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_swingdrive"))
        .args(args)
        .output()
        .unwrap()
}

fn json(output: &Output) -> Value {
    serde_json::from_slice(&output.stdout).expect("one JSON object on stdout")
}

const PROGRAM: &str = "name = \"short\"\n[[step]]\nkind = \"confirm\"\n[[step]]\nkind = \"ramp\"\nto_angle_deg = 25.0\n[[step]]\nkind = \"hold\"\nduration_s = 10.0\n[[step]]\nkind = \"stop\"\n";

#[test]
fn a_short_cycle_reports_every_step_and_writes_csv_and_svg() {
    let program = scratch("cycle_short", "program.toml", PROGRAM);
    let csv = program.with_file_name("run.csv");
    let svg = program.with_file_name("run.svg");
    let out = run(&[
        "cycle",
        &ride(),
        program.to_str().unwrap(),
        "--auto-confirm",
        "--json",
        "--csv",
        csv.to_str().unwrap(),
        "--svg",
        svg.to_str().unwrap(),
    ]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v = json(&out);
    assert_eq!(v["finished"], true);
    assert_eq!(v["governor"], true);
    assert_eq!(v["trip"], Value::Null);
    let steps = v["steps"].as_array().unwrap();
    assert_eq!(steps.len(), 4);
    for (s, line) in steps.iter().zip([3, 5, 8, 11]) {
        assert_eq!(s["line"], line);
        assert!(s["duration_s"].as_f64().unwrap() > 0.0);
        assert!(s["peak_load_factor"].as_f64().unwrap() >= 1.0);
    }
    // The hold lasted 10 s, to a 10 ms tick (hand calculation).
    assert!((steps[2]["duration_s"].as_f64().unwrap() - 10.0).abs() < 0.011);
    // 25° steady: the peak is at least that, and under the certified 50°.
    let peak = v["peak_angle_deg"].as_f64().unwrap();
    assert!(peak > 24.9 && peak < 50.0, "{peak}");
    assert!(std::fs::read_to_string(&csv)
        .unwrap()
        .starts_with("time_s,step,cycle_state"));
    assert!(std::fs::read_to_string(&svg).unwrap().contains("<svg"));
}

#[test]
fn a_frozen_encoder_trips_and_the_check_fails() {
    let program = scratch("cycle_freeze", "program.toml", PROGRAM);
    // The ramp to 25° runs from about 1 s to 15 s: freeze in the middle.
    let out = run(&[
        "cycle",
        &ride(),
        program.to_str().unwrap(),
        "--auto-confirm",
        "--freeze-encoder-at",
        "5",
        "--json",
    ]);
    assert_eq!(out.status.code(), Some(1));
    let v = json(&out);
    assert_eq!(v["finished"], false);
    assert_eq!(v["trip"], "ChannelDisagreement");
    assert!(v["events"]
        .as_array()
        .unwrap()
        .iter()
        .any(|e| e["what"].as_str().unwrap().contains("ChannelDisagreement")));
}

#[test]
fn refused_programs_name_the_step_and_line() {
    let above = scratch(
        "cycle_refused",
        "above.toml",
        "[[step]]\nkind = \"ramp\"\nto_angle_deg = 30.0\n[[step]]\nkind = \"ramp\"\nto_angle_deg = 52.0\n",
    );
    let out = run(&["cycle", &ride(), above.to_str().unwrap(), "--json"]);
    assert_eq!(out.status.code(), Some(2));
    let message = json(&out)["error"].as_str().unwrap().to_owned();
    assert!(message.contains("step 2"), "{message}");
    assert!(message.contains("line 5"), "{message}");
    assert!(message.contains("ceiling"), "{message}");

    let unanswered = scratch(
        "cycle_refused",
        "confirm.toml",
        "[[step]]\nkind = \"confirm\"\n",
    );
    let out = run(&["cycle", &ride(), unanswered.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("--auto-confirm"));

    let typo = scratch(
        "cycle_refused",
        "typo.toml",
        "[[step]]\nkind = \"hold\"\nduraton_s = 3.0\n",
    );
    let out = run(&["cycle", &ride(), typo.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("typo.toml") && err.contains("line 3"), "{err}");
}
