//! Ride-cycle programs: checks against the parameter set when built, and the
//! runner stepping through a cycle, always through the interlock. The ride is
//! demo data (an invented chain ride); the drive follows the command exactly
//! unless a test says otherwise.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::design::table::encode;
use swingdrive::interlock::Sample;
use swingdrive::program::{CycleRunner, CycleState, Program, ProgramError, Step, StepProblem};
use swingdrive::{
    Angle, AngularSpeed, Gravity, Interlock, InterlockState, PassThrough, ProfileTable,
    RideGeometry, SafetyConfig, SafetyParams, Suspension, TickInputs,
};

#[path = "common/demo_rides.rs"]
mod demo_rides;

/// Demo data (invented ride): nominal r0 3.4 m, L 5.8 m; band up to 3.5 m and
/// 6.1 m; certified 45°, 10 ms ticks.
fn params() -> SafetyParams {
    SafetyParams::new(SafetyConfig {
        certified_angle_deg: 45.0,
        hub_offset_max_m: 3.5,
        length_max_m: 6.1,
        max_acceleration_rad_s2: 0.10,
        max_deceleration_rad_s2: 0.12,
        max_jerk_rad_s3: 0.05,
        stop_time_margin_s: 2.0,
        brake_delay_s: 60.0,
        standstill_ticks: 50,
        second_channel: false,
        angle_sensor: false,
        ..demo_rides::forty_degree_ride()
    })
    .unwrap()
}

fn ride() -> RideGeometry {
    RideGeometry::new(3.4, 5.8, Suspension::Chain, Gravity::STANDARD).unwrap()
}

const DT: f32 = 0.01;

/// Runs `program` with a drive that follows the command exactly (measured =
/// commanded, plus `offset` from `offset_from_s`), pressing the confirmation
/// input at the times in `presses` (one tick each). Returns every status.
fn run(
    program: &Program<'_, 8>,
    presses: &[f32],
    offset: Option<(f32, f32)>,
    max_s: f32,
) -> Vec<swingdrive::program::CycleStatus> {
    let mut il: Interlock = Interlock::new(params());
    let mut runner = CycleRunner::new(program);
    let mut measured = 0.0_f32;
    let mut out = Vec::new();
    let ticks = (max_s / DT) as u32;
    for k in 0..ticks {
        let t = k as f32 * DT;
        let confirm = presses.iter().any(|p| (t - p).abs() < 0.5 * DT);
        let reading = match offset {
            Some((from, d)) if t >= from => measured + d,
            _ => measured,
        };
        let sensors = TickInputs {
            request_rad_s: f32::NAN, // replaced by the runner
            speed: Sample::new(reading, (k % 256) as u8),
            second_speed: Sample::ABSENT,
            angle: Sample::ABSENT,
            run_enable: true,
            reset: false,
        };
        let status = runner.tick(program, &mut il, &mut PassThrough, &sensors, confirm, DT);
        measured = status.output.command.speed.rad_per_s();
        out.push(status);
        if matches!(status.state, CycleState::Finished | CycleState::Aborted)
            && status.output.command.speed.rad_per_s() == 0.0
        {
            break;
        }
    }
    out
}

#[test]
fn steps_beyond_the_envelope_are_refused_by_index() {
    let p = params();
    let r = ride();
    let ceiling = p.ceiling().ceiling_rad_s();
    // The certified angle at the *nominal* geometry needs a speed above the
    // ceiling, which holds at the longest length and largest offset
    // (hand calculation: ω(45°) falls as r0 and L grow).
    let err = Program::<8>::new(
        &[
            Step::RampToAngle(Angle::from_deg(30.0)),
            Step::RampToAngle(Angle::from_deg(45.0)),
        ],
        &r,
        &p,
    )
    .unwrap_err();
    assert_eq!(
        err,
        ProgramError::Step {
            index: 1,
            problem: StepProblem::AboveCeiling
        }
    );
    assert!(err.to_string().starts_with("step 2:"), "{err}");
    let above = AngularSpeed::from_rad_per_s(ceiling * 1.0001);
    assert_eq!(
        Program::<8>::new(&[Step::RampToSpeed(above)], &r, &p).unwrap_err(),
        ProgramError::Step {
            index: 0,
            problem: StepProblem::AboveCeiling
        }
    );
    // At the ceiling itself: accepted.
    let at = AngularSpeed::from_rad_per_s(ceiling);
    assert!(Program::<8>::new(&[Step::RampToSpeed(at)], &r, &p).is_ok());
    assert_eq!(
        Program::<8>::new(
            &[Step::RampToSpeed(AngularSpeed::from_rad_per_s(-0.2))],
            &r,
            &p
        )
        .unwrap_err(),
        ProgramError::Step {
            index: 0,
            problem: StepProblem::ReverseForbidden
        }
    );
    for (d, name) in [
        (f32::NAN, "duration_s"),
        (-1.0, "duration_s"),
        (1e9, "duration_s"),
    ] {
        let err = Program::<8>::new(&[Step::Hold { duration_s: d }], &r, &p).unwrap_err();
        let ProgramError::Step {
            index: 0,
            problem: StepProblem::Param(e),
        } = err
        else {
            panic!("{err:?}")
        };
        assert_eq!(e.parameter(), name);
    }
    assert_eq!(
        Program::<8>::new(&[], &r, &p).unwrap_err(),
        ProgramError::Empty
    );
    assert_eq!(
        Program::<2>::new(&[Step::Stop, Step::Stop, Step::Stop], &r, &p).unwrap_err(),
        ProgramError::TooManySteps { capacity: 2 }
    );
}

#[test]
fn tables_for_another_parameter_set_or_beyond_the_ceiling_are_refused() {
    let p = params();
    let r = ride();
    let ceiling = f64::from(p.ceiling().ceiling_rad_s());
    let speeds: Vec<f64> = (0..=100).map(|i| 0.8 * f64::from(i) / 100.0).collect();
    let other = encode(&speeds, 0.1, p.stamp() ^ 1).unwrap();
    // The player's parse checks the stamp it is given; a program checks the
    // table's own stamp against the parameter set.
    let table = ProfileTable::parse(&other, p.stamp() ^ 1).unwrap();
    assert_eq!(
        Program::<8>::new(&[Step::Play(table)], &r, &p).unwrap_err(),
        ProgramError::Step {
            index: 0,
            problem: StepProblem::TableStamp
        }
    );
    let high: Vec<f64> = (0..=100)
        .map(|i| 1.01 * ceiling * f64::from(i) / 100.0)
        .collect();
    let bytes = encode(&high, 0.1, p.stamp()).unwrap();
    let table = ProfileTable::parse(&bytes, p.stamp()).unwrap();
    assert_eq!(
        Program::<8>::new(&[Step::Play(table)], &r, &p).unwrap_err(),
        ProgramError::Step {
            index: 0,
            problem: StepProblem::TableOutsideCeiling
        }
    );
}

#[test]
fn a_cycle_waits_ramps_holds_and_stops_through_the_interlock() {
    let p = params();
    let r = ride();
    let target = r
        .speed_for_angle(Angle::from_deg(35.0))
        .unwrap()
        .rad_per_s();
    let program = Program::<8>::new(
        &[
            Step::WaitForConfirmation,
            Step::RampToAngle(Angle::from_deg(35.0)),
            Step::Hold { duration_s: 10.0 },
            Step::Stop,
        ],
        &r,
        &p,
    )
    .unwrap();
    // The confirmation is pressed at 2 s (a button held at start-up would not
    // count: the runner starts as if it had been held).
    let log = run(&program, &[2.0], None, 200.0);
    let last = log.last().unwrap();
    assert_eq!(last.state, CycleState::Finished);
    assert_eq!(last.output.command.speed.rad_per_s(), 0.0);

    // Nothing moves before the confirmation.
    for s in log.iter().take(199) {
        assert_eq!(s.step, 0);
        assert_eq!(s.state, CycleState::WaitingForConfirmation);
        assert_eq!(s.output.command.speed.rad_per_s(), 0.0);
    }
    // Step 1 ends on the tick the command lands exactly on the angle's speed
    // (that tick already reports the next step); the hold lasts 10 s to the tick.
    let first_hold = log.iter().position(|s| s.step == 2).unwrap();
    assert_eq!(log[first_hold].output.command.speed.rad_per_s(), target);
    assert_ne!(log[first_hold - 1].output.command.speed.rad_per_s(), target);
    let first_stop = log.iter().position(|s| s.step == 3).unwrap();
    let hold_ticks = first_stop - first_hold;
    // 10 s at 10 ms: 1000 ticks, ±1 for the tick that ends the step
    // (hand calculation).
    assert!((999..=1001).contains(&hold_ticks), "{hold_ticks}");
    // Time left in the hold counts down.
    assert!(log[first_hold].time_left_s.unwrap() > 9.9);
    assert!(log[first_stop - 2].time_left_s.unwrap() < 0.05);
    // The ramp step reports the ramp's time left, which falls to zero.
    let ramp: Vec<f32> = log
        .iter()
        .filter(|s| s.step == 1)
        .filter_map(|s| s.time_left_s)
        .collect();
    assert!(ramp.windows(2).all(|w| w[1] <= w[0] + 1e-3));
    // Never above the ceiling; the interlock was running throughout the motion.
    let ceiling = p.ceiling().ceiling_rad_s();
    for s in &log {
        assert!(s.output.command.speed.rad_per_s() <= ceiling);
        if s.output.command.speed.rad_per_s() > 0.0 {
            assert!(s.output.state.permits_running());
        }
    }
}

#[test]
fn a_trip_aborts_the_program_and_it_requests_zero_from_then_on() {
    let p = params();
    let r = ride();
    let program = Program::<8>::new(
        &[
            Step::RampToAngle(Angle::from_deg(30.0)),
            Step::Hold { duration_s: 30.0 },
            Step::Stop,
        ],
        &r,
        &p,
    )
    .unwrap();
    // From 20 s the speed sensor reads 0.2 rad/s high: following error.
    let log = run(&program, &[], Some((20.0, 0.2)), 120.0);
    let aborted = log
        .iter()
        .position(|s| s.state == CycleState::Aborted)
        .unwrap();
    assert!(log[aborted].output.state == InterlockState::Stopping);
    assert!(log[aborted..].iter().all(|s| s.request_rad_s == 0.0));
    assert!(log[aborted..]
        .iter()
        .all(|s| s.state == CycleState::Aborted));
}

#[test]
fn a_played_table_ends_the_step_at_its_last_sample() {
    let p = params();
    let r = ride();
    // A smooth demo table from rest to 0.8 rad/s over 30 s (smoothstep, within
    // the certified limits: peak acceleration 1.5 · 0.8 / 30 = 0.04 rad/s²,
    // hand calculation).
    let speeds: Vec<f64> = (0..=300)
        .map(|i| {
            let x = f64::from(i) / 300.0;
            0.8 * x * x * (3.0 - 2.0 * x)
        })
        .collect();
    let bytes = encode(&speeds, 0.1, p.stamp()).unwrap();
    let table = ProfileTable::parse(&bytes, p.stamp()).unwrap();
    let program = Program::<8>::new(
        &[
            Step::Play(table),
            Step::Hold { duration_s: 1.0 },
            Step::Stop,
        ],
        &r,
        &p,
    )
    .unwrap();
    assert_eq!(program.target_rad_s(0), Some(0.8));
    let log = run(&program, &[], None, 200.0);
    assert_eq!(log.last().unwrap().state, CycleState::Finished);
    let hold = log.iter().position(|s| s.step == 1).unwrap();
    // The table lasts 30 s; the step ends when the command has settled on the
    // last sample (the ramp lags the table by at most a few seconds here).
    let t_end = hold as f32 * DT;
    assert!((30.0..40.0).contains(&t_end), "{t_end}");
    assert_eq!(log[hold].output.command.speed.rad_per_s(), 0.8);
}
