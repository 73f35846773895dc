//! Replay figures, speed-step impulses, slack detection and the drive model.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::sim::{
    replay, simulate, DriveModel, LinkState, Observation, ReplayOptions, SeatDynamics, SimError,
    SimOptions, SlackKind, SpeedProfile, StartCondition,
};
use swingdrive::{ParamError, Suspension};

const G: f64 = 9.806_65;

fn seat(suspension: Suspension) -> SeatDynamics {
    // Demo data (invented ride): r0 = 3.4 m, L = 5.8 m.
    SeatDynamics::new(3.4, 5.8, suspension, G).unwrap()
}

fn options(settle_s: f64) -> ReplayOptions {
    ReplayOptions {
        settle_s,
        ..ReplayOptions::default()
    }
}

#[test]
fn a_step_from_standstill_passes_no_impulse_through_a_hanging_chain() {
    // Hand calculation, common practice: the vertical chain passes no
    // horizontal impulse, so just after a step of Δω the seat is still at
    // rest in the ground frame and moves at Δω r0 relative to the top; the
    // chain then carries its weight plus the centripetal force of that
    // relative motion about the pivot: n = 1 + (Δω r0)² / (g L).
    let model = seat(Suspension::Chain);
    let dw = 1.15;
    let profile = SpeedProfile::new(&[(0.0, 0.0), (0.0, dw), (10.0, dw)]).unwrap();
    let mut samples: Vec<Observation> = Vec::new();
    let sim = SimOptions::default();
    simulate(
        &model,
        &profile,
        LinkState::HANGING,
        0.0,
        10.0,
        &sim,
        &mut samples,
    )
    .unwrap();
    let first = samples[0];
    assert_eq!(first.time_s, 0.0);
    let v = model.seat_velocity_mps(&first.state);
    assert!((v[1] + dw * 3.4).abs() < 1e-12 && v[0].abs() < 1e-12);
    let expected = 1.0 + (dw * 3.4_f64).powi(2) / (G * 5.8);
    assert!((first.link.tension_ratio - expected).abs() < 1e-12);
    // A rod's hinge passes the tangential impulse: the seat moves with the top.
    let rod = seat(Suspension::Rod);
    let mut samples: Vec<Observation> = Vec::new();
    simulate(
        &rod,
        &profile,
        LinkState::HANGING,
        0.0,
        10.0,
        &sim,
        &mut samples,
    )
    .unwrap();
    assert_eq!(rod.seat_velocity_mps(&samples[0].state), [0.0; 3]);
}

#[test]
fn a_speed_up_step_with_the_chain_leading_is_flagged_as_slack() {
    // Hand calculation, common practice: while the top slows down the seats
    // swing ahead (tangential angle > 0); a step up then needs a tension
    // impulse of −Δω r0 n_y < 0, i.e. a push, which a chain cannot give.
    let profile = SpeedProfile::new(&[(0.0, 1.0), (4.0, 0.6), (4.0, 1.0), (20.0, 1.0)]).unwrap();
    let start = ReplayOptions {
        start: StartCondition::Steady,
        settle_s: 0.0,
        ..ReplayOptions::default()
    };
    let chain = replay(&seat(Suspension::Chain), &profile, &start, None).unwrap();
    let s = &chain.summary;
    assert!(s.chain_slack);
    let event = s.slack_events[0];
    assert_eq!(event.kind, SlackKind::Impulse);
    assert_eq!(event.start_s, 4.0);
    // The trace row at 4 s is taken before the step: n_y = sin(tangential angle).
    let before = chain.trace.iter().find(|r| r.time_s == 4.0).unwrap();
    let ny = before.tangential_angle_deg.to_radians().sin();
    assert!(ny > 0.0);
    let expected = -0.4 * 3.4 * ny;
    assert!((event.tension_impulse_mps.unwrap() - expected).abs() < 1e-9);
    // A rod takes the same step through its hinge.
    let rod = replay(&seat(Suspension::Rod), &profile, &start, None).unwrap();
    assert!(!rod.summary.chain_slack && rod.summary.slack_events.is_empty());
}

#[test]
fn a_seat_released_above_the_pivot_plane_is_slack_until_it_has_fallen_far_enough() {
    // A simple pendulum released at rest at θ0 from the downward vertical
    // has tension m g (3 cos θ − 2 cos θ0) (standard textbook result, e.g.
    // Halliday, Resnick & Walker, Fundamentals of Physics, ch. 8). From
    // θ0 = 100° the tension is negative until cos θ = 2 cos θ0 / 3, i.e.
    // θ = 96.65°. Top at standstill, so the seat is such a pendulum.
    let theta0 = 100.0_f64.to_radians();
    let profile = SpeedProfile::new(&[(0.0, 0.0), (5.0, 0.0)]).unwrap();
    let opts = ReplayOptions {
        start: StartCondition::Given(LinkState::swung_out(theta0)),
        settle_s: 0.0,
        output_step_s: 1e-3,
        ..ReplayOptions::default()
    };
    let out = replay(&seat(Suspension::Chain), &profile, &opts, None).unwrap();
    let s = &out.summary;
    assert!(s.chain_slack);
    // Slack while falling, then again when it has swung up the other side.
    assert_eq!(s.slack_event_count, 2);
    let slack_end = (2.0 * theta0.cos() / 3.0).acos().to_degrees();
    let angle_at = |t: f64| {
        out.trace
            .iter()
            .find(|r| r.time_s == t)
            .unwrap()
            .angle_from_vertical_deg
    };
    let falling = s.slack_events[0];
    assert_eq!(falling.kind, SlackKind::Tension);
    assert_eq!(falling.start_s, 0.0);
    assert!((falling.min_tension_ratio.unwrap() - theta0.cos()).abs() < 1e-12);
    // Slack samples lie beyond that angle, within one 1 ms step of it: there
    // θ̇ = √(2 g (cos θ − cos θ0) / L) ≈ 25 °/s, so 0.025°.
    let end = angle_at(falling.end_s);
    assert!(end >= slack_end && end - slack_end < 0.03, "{end}");
    let rising = s.slack_events[1];
    let start = angle_at(rising.start_s);
    assert!(start >= slack_end && start - slack_end < 0.03, "{start}");
}

#[test]
fn residual_swing_catches_circling_that_the_angle_from_vertical_hides() {
    // On the axis (r0 = 0) a seat may circle on a cone of its own, φ' = φ + 5°,
    // at its own conical rate √(g / (L cos φ')) (standard textbook result),
    // which differs from the top's: its angle from vertical stays φ' (an
    // exact solution), so a peak-to-peak of it shows nothing, while relative
    // to the top the seat drifts round the axis. The residual swing sees the
    // seat reach the far side of the cone, φ + φ' from the steady direction.
    let model = SeatDynamics::new(0.0, 5.0, Suspension::Chain, G).unwrap();
    let w = 2.0;
    let phi = model.steady_angle_rad(w);
    let cone = phi + 5.0_f64.to_radians();
    let own_rate = (G / (5.0 * cone.cos())).sqrt();
    let n = [cone.sin(), 0.0, -cone.cos()];
    // Relative velocity (ω' − ω) ẑ × x, x = L n; link angular velocity n × v / L.
    let v_rel = [0.0, (own_rate - w) * 5.0 * cone.sin(), 0.0];
    let spin = [-n[2] * v_rel[1] / 5.0, 0.0, n[0] * v_rel[1] / 5.0];
    let profile = SpeedProfile::new(&[(0.0, w)]).unwrap();
    let opts = ReplayOptions {
        start: StartCondition::Given(LinkState::new(n, spin).unwrap()),
        settle_s: 60.0,
        ..ReplayOptions::default()
    };
    let out = replay(&model, &profile, &opts, None).unwrap();
    let (lo, hi) = out.trace.iter().fold((f64::MAX, f64::MIN), |(lo, hi), r| {
        (
            lo.min(r.angle_from_vertical_deg),
            hi.max(r.angle_from_vertical_deg),
        )
    });
    assert!(hi - lo < 1e-6, "peak-to-peak {}", hi - lo);
    assert!((hi - cone.to_degrees()).abs() < 1e-6);
    // Half a relative turn takes π / (ω' − ω) ≈ 17 s, well inside the window.
    let far_side = (phi + cone).to_degrees();
    assert!(
        (out.summary.residual_swing_deg - far_side).abs() < 0.01,
        "{}",
        out.summary.residual_swing_deg
    );
}

#[test]
fn a_slow_ramp_leaves_little_swing_and_a_step_a_lot() {
    // Linear-oscillator estimate (hand calculation): a step of the steady
    // angle by Δφ leaves a swing of amplitude Δφ; a smooth ramp of duration
    // T ≫ 2π/Ω leaves about 12 Δφ / (Ω T)², here (Δφ = 45°, Ω ≈ 0.53 rad/s,
    // T = 60 s) about 0.5°.
    let model = seat(Suspension::Chain);
    let w = 1.15;
    let ramp: Vec<(f64, f64)> = (0..=120)
        .map(|i| {
            let t = f64::from(i) * 0.5;
            let s = t / 60.0;
            (t, w * s * s * (3.0 - 2.0 * s))
        })
        .chain([(120.0, w)])
        .collect();
    let slow = replay(
        &model,
        &SpeedProfile::new(&ramp).unwrap(),
        &options(60.0),
        None,
    )
    .unwrap();
    let step = SpeedProfile::new(&[(0.0, 0.0), (0.0, w), (120.0, w)]).unwrap();
    let fast = replay(&model, &step, &options(60.0), None).unwrap();
    assert!(slow.summary.residual_swing_deg < 1.5);
    assert!(slow.summary.overshoot_deg < 1.5);
    assert!(fast.summary.residual_swing_deg > 20.0);
    assert!(fast.summary.overshoot_deg > 20.0);
    assert!(fast.summary.peak_load_factor > slow.summary.peak_load_factor);
    // 180 s at 10 ms rows plus the first.
    assert_eq!(slow.trace.len(), 18_001);
}

fn drive_trace(
    drive: DriveModel,
    profile: &SpeedProfile,
    permit_drop_s: Option<f64>,
) -> Vec<(f64, f64, f64)> {
    let opts = ReplayOptions {
        settle_s: 0.0,
        drive: Some(drive),
        permit_drop_s,
        ..ReplayOptions::default()
    };
    replay(&seat(Suspension::Chain), profile, &opts, None)
        .unwrap()
        .trace
        .iter()
        .map(|r| (r.time_s, r.speed_rad_s, r.accel_rad_s2))
        .collect()
}

#[test]
fn the_drive_lags_as_a_first_order_system() {
    // First-order lag, command step W at t = 0: ω = W (1 − e^(−t/T))
    // (standard control result). Torque limit set high enough not to act.
    let drive = DriveModel::new(2.0, 10.0, 0.0, 0.0).unwrap();
    let profile = SpeedProfile::new(&[(0.0, 0.0), (0.0, 1.0), (20.0, 1.0)]).unwrap();
    for (t, w, a) in drive_trace(drive, &profile, None) {
        assert!((w - (1.0 - (-t / 2.0).exp())).abs() < 1e-8, "t {t}: {w}");
        assert!((a - 0.5 * (-t / 2.0).exp()).abs() < 1e-8);
    }
}

#[test]
fn the_torque_limit_caps_the_acceleration() {
    // Hand calculation: with lag 0.5 s and limit 0.05 rad/s², a command step
    // to 1 rad/s is followed at 0.05 rad/s² until (1 − ω)/0.5 < 0.05, i.e.
    // ω = 0.975 at t = 19.5 s; then the lag takes over.
    let drive = DriveModel::new(0.5, 0.05, 0.0, 0.0).unwrap();
    let profile = SpeedProfile::new(&[(0.0, 0.0), (0.0, 1.0), (40.0, 1.0)]).unwrap();
    for (t, w, a) in drive_trace(drive, &profile, None) {
        if t <= 19.4 {
            assert!((w - 0.05 * t).abs() < 1e-9 && a == 0.05, "t {t}: {w} {a}");
        } else if t >= 19.6 {
            let expected = 1.0 - 0.025 * (-(t - 19.5) / 0.5).exp();
            assert!((w - expected).abs() < 1e-8, "t {t}: {w} vs {expected}");
        }
    }
}

#[test]
fn the_top_coasts_to_a_stop_when_the_permit_drops() {
    // Closed form (hand calculation): Coulomb 0.02 rad/s² and viscous
    // 0.01 1/s from 1 rad/s: ω = (1 + 2) e^(−0.01 t) − 2, stopping at
    // t = ln(1.5) / 0.01 ≈ 40.5 s after the drop.
    let drive = DriveModel::new(0.5, 1.0, 0.02, 0.01).unwrap();
    let profile = SpeedProfile::new(&[(0.0, 1.0), (100.0, 1.0)]).unwrap();
    let opts = ReplayOptions {
        settle_s: 30.0,
        start: StartCondition::Steady,
        drive: Some(drive),
        permit_drop_s: Some(20.0),
        ..ReplayOptions::default()
    };
    let out = replay(&seat(Suspension::Chain), &profile, &opts, None).unwrap();
    let stop = 1.5_f64.ln() / 0.01;
    for r in &out.trace {
        let expected = if r.time_s < 20.0 {
            1.0
        } else if r.time_s < 20.0 + stop {
            3.0 * (-0.01 * (r.time_s - 20.0)).exp() - 2.0
        } else {
            0.0
        };
        assert!(
            (r.speed_rad_s - expected).abs() < 1e-9,
            "t {}: {}",
            r.time_s,
            r.speed_rad_s
        );
    }
    // The top comes to rest, so the residual swing is measured about the
    // vertical from the drop on.
    assert_eq!(out.summary.final_speed_rad_s, 0.0);
    assert!(out.summary.final_steady_angle_deg.abs() < 1e-9);
    assert_eq!(out.summary.residual_window_start_s, 100.0);
    let coasting = SimOptions {
        drive: None,
        permit_drop_s: Some(5.0),
        ..SimOptions::default()
    };
    let mut sink: Vec<Observation> = Vec::new();
    assert_eq!(
        simulate(
            &seat(Suspension::Chain),
            &profile,
            LinkState::HANGING,
            0.0,
            10.0,
            &coasting,
            &mut sink
        ),
        Err(SimError::PermitDropWithoutDrive)
    );
}

#[test]
fn bad_replay_options_are_refused_by_name() {
    let profile = SpeedProfile::new(&[(0.0, 0.0), (1.0, 0.1)]).unwrap();
    let model = seat(Suspension::Rod);
    let bad = |opts: ReplayOptions| replay(&model, &profile, &opts, None).unwrap_err();
    assert_eq!(
        bad(ReplayOptions {
            settle_s: -1.0,
            ..ReplayOptions::default()
        }),
        SimError::Param(ParamError::Negative("settle_s"))
    );
    assert_eq!(
        bad(ReplayOptions {
            output_step_s: f64::NAN,
            ..ReplayOptions::default()
        }),
        SimError::Param(ParamError::NonFinite("output_step_s"))
    );
    let mut tolerance = ReplayOptions::default().tolerance;
    tolerance.relative = 0.5;
    assert_eq!(
        bad(ReplayOptions {
            tolerance,
            ..ReplayOptions::default()
        }),
        SimError::Param(ParamError::OutOfRange("relative_tolerance"))
    );
}

#[test]
fn progress_is_reported_up_to_completion() {
    let profile = SpeedProfile::new(&[(0.0, 0.0), (10.0, 1.0)]).unwrap();
    let mut seen = Vec::new();
    let mut progress = |f: f64| seen.push(f);
    replay(
        &seat(Suspension::Chain),
        &profile,
        &options(10.0),
        Some(&mut progress),
    )
    .unwrap();
    assert!(seen.len() >= 50);
    assert!(seen.windows(2).all(|w| w[0] <= w[1]));
    assert_eq!(seen.last(), Some(&1.0));
}
