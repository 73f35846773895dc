//! The swing-free designer on a small, fast geometry (demo data): residual
//! target met over the band in the simulator, limits kept at every sample,
//! no overshoot of the end speed, the table round trip, and the errors.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::design::compare::{check_band, to_profile, worst};
use swingdrive::design::table::encode;
use swingdrive::design::{
    design, time_optimal_duration_s, DesignError, DesignOptions, DesignRequest, DurationChoice,
};
use swingdrive::player::{ProfilePlayer, ProfileTable};
use swingdrive::ride_file::RideLimits;
use swingdrive::sim::SeatDynamics;
use swingdrive::Suspension;

/// Demo data: a small chain ride (r0 1 m, L 2 m) with brisk limits, so that
/// a design takes seconds in a debug build.
fn seat() -> SeatDynamics {
    SeatDynamics::new(1.0, 2.0, Suspension::Chain, 9.80665).unwrap()
}

fn limits() -> RideLimits {
    RideLimits {
        max_accel_rad_s2: 0.4,
        max_decel_rad_s2: 0.5,
        max_jerk_rad_s3: 0.4,
    }
}

fn coarse() -> DesignOptions {
    let mut o = DesignOptions::default();
    o.check_samples = 5;
    o.settle_s = 20.0;
    o
}

fn speed_at(deg: f64) -> f64 {
    seat().steady_reference().speed_for_angle(deg.to_radians())
}

fn request(from: f64, to: f64, duration: DurationChoice) -> DesignRequest {
    DesignRequest {
        seat: seat(),
        limits: limits(),
        from_speed_rad_s: from,
        to_speed_rad_s: to,
        duration,
    }
}

#[test]
fn a_spin_up_leaves_less_than_the_target_over_the_band_and_keeps_the_limits() {
    let to = speed_at(35.0);
    let t_opt = time_optimal_duration_s(&limits(), 0.0, to);
    // Hand calculation, common practice (Biagiotti & Melchiorri 2008, §3.4):
    // T = Δω/a + a/j for Δω·j ≥ a².
    assert!((t_opt - (to / 0.4 + 1.0)).abs() < 1e-12);
    let d = design(
        &request(0.0, to, DurationChoice::Fixed(2.0 * t_opt)),
        &coarse(),
    )
    .unwrap();
    assert!(d.meets_target, "{:?}", d.checks);
    // The target (residual swing ≤ 0.2° over the band), checked again
    // independently of the designer's own check, on a finer band (9 lengths ±5 %).
    let profile = to_profile(&d.samples).unwrap();
    let seats: Vec<SeatDynamics> = (0..9)
        .map(|i| {
            let l = 2.0 * (0.95 + 0.1 * f64::from(i) / 8.0);
            SeatDynamics::new(1.0, l, Suspension::Chain, 9.80665).unwrap()
        })
        .collect();
    let (residual, peak) = worst(&check_band(&seats, &profile, 20.0).unwrap());
    assert!(residual <= 0.2, "residual {residual}°");
    // The time-optimal ramp of the same change swings far more (simulator
    // issue: tens of degrees for a ramp of about one swing period).
    let ramp = swingdrive::design::compare::time_optimal_samples(&limits(), 0.0, to, 0.05);
    let (ramp_residual, _) =
        worst(&check_band(&seats[4..5], &to_profile(&ramp).unwrap(), 20.0).unwrap());
    assert!(
        ramp_residual > 10.0 * residual.max(0.05),
        "ramp {ramp_residual}°"
    );

    // Limits at every sample: acceleration between samples, jerk between
    // neighbouring intervals (the simulator's estimate), and the speed never
    // beyond the end speed nor below the start.
    let s = &d.samples;
    let dt = d.table_period_s;
    let l = limits();
    for w in s.windows(2) {
        let a = (w[1].1 - w[0].1) / dt;
        assert!(a <= l.max_accel_rad_s2 && -a <= l.max_decel_rad_s2, "{a}");
    }
    for w in s.windows(3) {
        let j = ((w[2].1 - w[1].1) - (w[1].1 - w[0].1)) / (dt * dt);
        assert!(j.abs() <= l.max_jerk_rad_s3, "{j}");
    }
    assert!(s
        .iter()
        .all(|&(_, w)| (0.0..=f64::from(to as f32)).contains(&w)));
    assert_eq!(s.first().unwrap().1, 0.0);
    assert_eq!(s.last().unwrap().1, f64::from(to as f32));
    assert!(d.limits_ok);
    // The continuous profile too (every 1 ms), exactly against the limits.
    for k in 0..=((d.duration_s * 1000.0) as usize) {
        let (_, a, j) = d.spline.state_at(k as f64 * 1e-3);
        assert!(
            a <= l.max_accel_rad_s2 && -a <= l.max_decel_rad_s2 && j.abs() <= l.max_jerk_rad_s3
        );
    }
    // No overshoot of the target speed, so the peak angle stays near the target's.
    assert!(peak < 35.0 + 2.0, "peak {peak}°");

    // The table: encoded, parsed with the right stamp, played back equal to the samples.
    let speeds: Vec<f64> = s.iter().map(|p| p.1).collect();
    let bytes = encode(&speeds, dt, 0xA5A5_0001).unwrap();
    assert!(ProfileTable::parse(&bytes, 0xA5A5_0002).is_err());
    let table = ProfileTable::parse(&bytes, 0xA5A5_0001).unwrap();
    let mut player = ProfilePlayer::new(table);
    for (k, &(_, w)) in s.iter().enumerate().skip(1) {
        let out = player.step(dt as f32).unwrap();
        assert_eq!(out.elapsed_us, (k as u64) * 50_000);
        assert_eq!(f64::from(out.request_rad_s), w, "sample {k}");
    }
    assert!(player.output().finished);
}

#[test]
fn a_duration_the_limits_cannot_fill_is_a_clear_error() {
    let to = speed_at(35.0);
    let t_opt = time_optimal_duration_s(&limits(), 0.0, to);
    let err = design(
        &request(0.0, to, DurationChoice::Fixed(0.9 * t_opt)),
        &coarse(),
    )
    .unwrap_err();
    assert!(matches!(err, DesignError::Infeasible { .. }), "{err}");
    assert!(err.to_string().contains("within the acceleration"));
}

#[test]
fn shortest_reports_when_no_duration_meets_the_target() {
    let to = speed_at(35.0);
    let mut o = coarse();
    o.max_duration_s = 1.05 * time_optimal_duration_s(&limits(), 0.0, to);
    o.max_iterations = 3;
    let err = design(&request(0.0, to, DurationChoice::Shortest), &o).unwrap_err();
    assert!(matches!(err, DesignError::TargetNotMet { .. }), "{err}");
}

#[test]
fn bad_inputs_are_refused_by_name() {
    let bad = |r: DesignRequest, o: DesignOptions, name: &str| match design(&r, &o) {
        Err(DesignError::Param(e)) => assert_eq!(e.parameter(), name),
        other => panic!("{other:?}"),
    };
    bad(
        request(f64::NAN, 1.0, DurationChoice::Shortest),
        coarse(),
        "from_speed_rad_s",
    );
    bad(
        request(0.0, -1.0, DurationChoice::Shortest),
        coarse(),
        "to_speed_rad_s",
    );
    bad(
        request(1.0, 1.0, DurationChoice::Shortest),
        coarse(),
        "to_speed_rad_s",
    );
    bad(
        request(0.0, 1.0, DurationChoice::Fixed(f64::INFINITY)),
        coarse(),
        "duration_s",
    );
    let mut o = coarse();
    o.free_points = 2;
    bad(
        request(0.0, 1.0, DurationChoice::Shortest),
        o,
        "free_points",
    );
    let mut o = coarse();
    o.table_period_s = 0.0;
    bad(
        request(0.0, 1.0, DurationChoice::Shortest),
        o,
        "table_period_s",
    );
}
