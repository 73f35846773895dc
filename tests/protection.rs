//! Dynamic angle protection: each step of the certificate in
//! docs/dynamic_protection.md, the estimator against the host simulator, and
//! the governor in closed loop against the simulator.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::protection::closed_loop::{run_loop, simulate_peak, Rig, Scenario};
use swingdrive::protection::envelope::{
    sampled_k_with, CELLS, K_ALLOWANCE, K_AZIMUTH, K_POLAR, K_STRIDE,
};
use swingdrive::protection::estimator::{EstimatorFault, SwingEstimator};
use swingdrive::sim::{replay, ReplayOptions, SeatDynamics, SpeedProfile, StartCondition};
use swingdrive::*;

fn issue_ride(suspension: Suspension) -> RideGeometry {
    // The ride of the dynamic-protection study: hub offset 4 m, effective length 6.5 m.
    RideGeometry::new(4.0, 6.5, suspension, Gravity::STANDARD).unwrap()
}

fn rig(g: RideGeometry, certified_deg: f32) -> Rig {
    let limits = RampLimits::new(0.1, 0.1, 0.05).unwrap();
    Rig {
        geometry: g,
        limits,
        stop_limits: limits,
        ceiling_rad_s: g
            .speed_for_angle(Angle::from_deg(certified_deg))
            .unwrap()
            .rad_per_s(),
        params: GovernorParams::demo(&g, certified_deg, 0.05),
    }
}

/// Requests alternating between 75 % and 100 % of the ceiling every half
/// period of the slowest swing mode at 87.5 % of the ceiling (scaled by `detune`).
fn pumping(g: &RideGeometry, ceiling: f32, detune: f64, duration_s: f64) -> Scenario {
    let s = g
        .steady_state_at_speed(AngularSpeed::from_rad_per_s(0.875 * ceiling))
        .unwrap();
    let half = 0.5 * f64::from(g.swing_modes(&s).slowest().period_s()) * detune;
    let mut requests = vec![(0.0, f64::from(ceiling))];
    let (mut t, mut high) = (40.0, false);
    while t < duration_s {
        requests.push((t, if high { 1.0 } else { 0.75 } * f64::from(ceiling)));
        high = !high;
        t += half;
    }
    Scenario {
        requests,
        duration_s,
        stop_at_s: None,
    }
}

/// Uniform numbers in [0, 1) from a xorshift64 generator (Marsaglia, "Xorshift
/// RNGs", J. Stat. Software 2003): repeatable demo inputs for the random checks.
fn uniform(mut seed: u64) -> impl FnMut() -> f32 {
    move || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        (seed >> 11) as f32 / (1u64 << 53) as f32
    }
}

#[test]
fn envelope_level_set_boundary_is_never_below_the_admissible_energy() {
    // Step 1 of the argument: on the cone φ = φc the effective potential is at least
    // E_adm(ω) = −b cos φc − ½ω²(a + sin φc)² (hand calculation, common practice:
    // ρ² = a² + 2a sin φc cos β + sin² φc is largest at β = 0).
    let g = issue_ride(Suspension::Chain);
    let (a, b) = (4.0_f64 / 6.5, 9.80665_f64 / 6.5);
    let phi_c = 50.0_f64.to_radians();
    let c = a + phi_c.sin();
    for w in [0.0, 0.4, 0.8, 1.1] {
        let e_adm = -b * phi_c.cos() - 0.5 * w * w * c * c;
        for k in 0..=360 {
            let beta = f64::from(k).to_radians();
            let rho2 = a * a + 2.0 * a * phi_c.sin() * beta.cos() + phi_c.sin().powi(2);
            let v = -b * phi_c.cos() - 0.5 * w * w * rho2;
            assert!(v >= e_adm - 1e-12, "w {w} beta {k}: {v} < {e_adm}");
        }
    }
    let _ = g;
}

#[test]
fn swing_inside_the_room_stays_inside_the_cone_at_constant_speed() {
    // Step 2: at constant speed the Jacobi integral is conserved, so a seat whose
    // swing energy bound is below the room never reaches the cone. Checked with the
    // f64 simulator (the truth) from swung-out starts just inside the room.
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let g = issue_ride(suspension);
        let env = SwingEnvelope::new(&g, Angle::from_deg(50.0)).unwrap();
        let truth = SeatDynamics::from_geometry(&g);
        for w in [0.5_f32, 0.9, 1.05] {
            let steady = g
                .angle_for_speed(AngularSpeed::from_rad_per_s(w))
                .unwrap()
                .rad();
            // Largest tangential rate whose swing energy bound is 95 % of the room squared.
            let room = env.room(w);
            let mut rate = 0.0_f32;
            for k in 0..400 {
                let trial = k as f32 * 0.002;
                let s = SeatState {
                    radial_rad: steady,
                    tangential_rate: if suspension == Suspension::Chain {
                        trial
                    } else {
                        0.0
                    },
                    radial_rate: if suspension == Suspension::Rod {
                        trial
                    } else {
                        0.0
                    },
                    ..SeatState::REST
                };
                if env.swing_energy(&s, w).sqrt() < 0.95 * room {
                    rate = trial;
                }
            }
            assert!(rate > 0.0);
            let (sn, cs) = f64::from(steady).sin_cos();
            let n = [sn, 0.0, -cs];
            let r = f64::from(rate);
            // (c, 0, s) × n = (0, 1, 0): a tangential swing; (0, 1, 0) × n is radial.
            let omega = if suspension == Suspension::Chain {
                [cs * r, 0.0, sn * r]
            } else {
                [0.0, r, 0.0]
            };
            let state = swingdrive::sim::LinkState::new(n, omega).unwrap();
            let profile = SpeedProfile::new(&[(0.0, f64::from(w)), (60.0, f64::from(w))]).unwrap();
            let out = replay(
                &truth,
                &profile,
                &ReplayOptions {
                    settle_s: 0.0,
                    start: StartCondition::Given(state),
                    record_trace: false,
                    ..ReplayOptions::default()
                },
                None,
            )
            .unwrap();
            assert!(
                out.summary.peak_angle_deg < 50.0,
                "{suspension:?} at {w} rad/s: {} deg",
                out.summary.peak_angle_deg
            );
        }
    }
}

#[test]
fn sampled_bound_k_covers_a_ten_times_finer_sample() {
    // Step 3: K is a sampled supremum; the allowance K_ALLOWANCE must cover a
    // sample ten times finer in each direction (hand calculation, common practice).
    for (r0, l) in [(4.0_f32, 6.5_f32), (0.0, 5.0), (2.0, 8.0)] {
        let (a, b) = (r0 / l, 9.80665 / l);
        let phi_c = 50.0_f32.to_radians();
        let g = RideGeometry::new(r0, l, Suspension::Chain, Gravity::STANDARD).unwrap();
        let top = g
            .speed_for_angle(Angle::from_deg(50.0))
            .unwrap()
            .rad_per_s();
        for frac in [0.0_f32, 0.3, 0.6, 0.85, 0.92] {
            let w = frac * top;
            let th = g
                .angle_for_speed(AngularSpeed::from_rad_per_s(w))
                .unwrap()
                .rad();
            let rho_s2 = (a + th.sin()).powi(2);
            let v_eq = -b * th.cos() - 0.5 * w * w * rho_s2;
            for chain in [true, false] {
                let coarse =
                    sampled_k_with(a, b, w, phi_c, v_eq, rho_s2, chain, K_POLAR, K_AZIMUTH);
                let fine = sampled_k_with(
                    a,
                    b,
                    w,
                    phi_c,
                    v_eq,
                    rho_s2,
                    chain,
                    10 * K_POLAR,
                    10 * K_AZIMUTH,
                );
                // The cell between two K samples takes the larger: the speeds between must be covered.
                let w2 = (w + 0.08 * top).min(top);
                let th2 = g
                    .angle_for_speed(AngularSpeed::from_rad_per_s(w2))
                    .unwrap()
                    .rad()
                    .min(phi_c);
                let rho2_2 = (a + th2.sin()).powi(2);
                let v_eq2 = -b * th2.cos() - 0.5 * w2 * w2 * rho2_2;
                let coarse2 =
                    sampled_k_with(a, b, w2, phi_c, v_eq2, rho2_2, chain, K_POLAR, K_AZIMUTH);
                let mid = 0.5 * (w + w2);
                let th_m = g
                    .angle_for_speed(AngularSpeed::from_rad_per_s(mid))
                    .unwrap()
                    .rad()
                    .min(phi_c);
                let rho2_m = (a + th_m.sin()).powi(2);
                let v_eq_m = -b * th_m.cos() - 0.5 * mid * mid * rho2_m;
                let fine_mid = sampled_k_with(
                    a,
                    b,
                    mid,
                    phi_c,
                    v_eq_m,
                    rho2_m,
                    chain,
                    10 * K_POLAR,
                    10 * K_AZIMUTH,
                );
                assert!(
                    fine_mid <= K_ALLOWANCE * coarse.max(coarse2),
                    "between samples, r0 {r0} L {l} w {mid} chain {chain}: {fine_mid} vs {coarse} {coarse2}"
                );
                assert!(
                    fine <= K_ALLOWANCE * coarse,
                    "r0 {r0} L {l} w {w} chain {chain}: fine {fine} coarse {coarse}"
                );
            }
        }
    }
}

#[test]
fn sampled_bound_k_covers_every_cell_of_the_grid() {
    // Step 3 on the envelope's own grid (uniform in ω², so the K samples lie far apart
    // at low speed): in every cell, K from a ten times finer sample of the cone at the
    // cell's ends and middle stays within K_ALLOWANCE times the larger of the two coarse
    // samples the cell takes (hand calculation, common practice). Three geometries,
    // chains and rods.
    for (r0, l) in [(4.0_f32, 6.5_f32), (0.0, 5.0), (2.0, 8.0)] {
        for suspension in [Suspension::Chain, Suspension::Rod] {
            let chain = suspension == Suspension::Chain;
            let g = RideGeometry::new(r0, l, suspension, Gravity::STANDARD).unwrap();
            let env = SwingEnvelope::new(&g, Angle::from_deg(50.0)).unwrap();
            let (a, b) = (r0 / l, 9.80665 / l);
            let phi_c = 50.0_f32.to_radians();
            let k_at = |w: f32, polar: usize, azimuth: usize| {
                let th = g
                    .angle_for_speed(AngularSpeed::from_rad_per_s(w))
                    .unwrap()
                    .rad()
                    .min(phi_c);
                let rho_s2 = (a + th.sin()).powi(2);
                let v_eq = -b * th.cos() - 0.5 * w * w * rho_s2;
                sampled_k_with(a, b, w, phi_c, v_eq, rho_s2, chain, polar, azimuth)
            };
            for i in 0..CELLS {
                let below = i - i % K_STRIDE;
                let above = (below + K_STRIDE).min(CELLS);
                let coarse = k_at(env.grid_speed(below), K_POLAR, K_AZIMUTH).max(k_at(
                    env.grid_speed(above),
                    K_POLAR,
                    K_AZIMUTH,
                ));
                let (w0, w1) = (env.grid_speed(i), env.grid_speed(i + 1));
                for w in [w0, 0.5 * (w0 + w1), w1] {
                    let fine = k_at(w, 10 * K_POLAR, 10 * K_AZIMUTH);
                    assert!(
                        fine <= K_ALLOWANCE * coarse,
                        "r0 {r0} L {l} {suspension:?} cell {i} w {w}: fine {fine} coarse {coarse}"
                    );
                }
            }
        }
    }
}

#[test]
fn swing_energy_grows_no_faster_than_the_bound_while_the_speed_changes() {
    // Step 4: √S(t) ≤ √S(0) + ∫ ½ G |dω| along any speed history (the pumping bound),
    // checked on the f32 model with the envelope's own cell bounds over random
    // jerky speed histories (demo data: piecewise-constant accelerations up to 0.3 rad/s²).
    let mut next = uniform(0x2545_f491_u64);
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let g = issue_ride(suspension);
        let env = SwingEnvelope::new(&g, Angle::from_deg(50.0)).unwrap();
        let model = env.model();
        let top = env.top_rad_s();
        for _ in 0..20 {
            let mut state = SeatState::REST;
            let mut w = 0.0_f32;
            let mut budget = 0.0_f32;
            let mut alpha = 0.0_f32;
            for k in 0..6000 {
                if k % 150 == 0 {
                    alpha = (next() - 0.4) * 0.6;
                }
                let target = (w + alpha * 0.01).clamp(0.0, 0.97 * top);
                let a = (target - w) / 0.01;
                state = model.step(&state, w, a, 0.01).unwrap();
                budget += (env.growth_to(target) - env.growth_to(w)).abs();
                w = target;
                // Exact swing energy: Jacobi integral minus the steady state's potential.
                let th = g
                    .angle_for_speed(AngularSpeed::from_rad_per_s(w))
                    .unwrap()
                    .rad();
                let (a, b) = (4.0_f32 / 6.5, 9.80665_f32 / 6.5);
                let v_eq = -b * th.cos() - 0.5 * w * w * (a + th.sin()).powi(2);
                let exact = (model.jacobi(&state, w) - v_eq).max(0.0);
                // The envelope's value is an upper bound (chord of the concave V_eq).
                assert!(env.swing_energy(&state, w) >= exact - 1e-6);
                let s = exact.sqrt();
                if state.angle_from_vertical() < 50.0_f32.to_radians() {
                    assert!(
                        s <= budget + 1e-3,
                        "{suspension:?} step {k}: sqrt S {s} > bound {budget}"
                    );
                } else {
                    break;
                }
            }
        }
    }
}

#[test]
fn estimator_follows_the_simulator_at_100_hz() {
    // Accuracy of the open-loop estimator (nominal length, exact speed) against the
    // f64 simulator over a 170 s jerky profile: within 0.05° (hand calculation, common
    // practice: RK4 at 10 ms on swing periods of 3–5 s leaves errors near f32 rounding).
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let g = issue_ride(suspension);
        let samples = [
            (0.0, 0.0),
            (5.0, 0.1),
            (25.0, 1.0),
            (60.0, 1.0),
            (70.0, 0.7),
            (90.0, 0.7),
            (120.0, 0.0),
            (170.0, 0.0),
        ];
        let profile = SpeedProfile::new(&samples).unwrap();
        let out = replay(
            &SeatDynamics::from_geometry(&g),
            &profile,
            &ReplayOptions {
                settle_s: 0.0,
                output_step_s: 0.01,
                ..ReplayOptions::default()
            },
            None,
        )
        .unwrap();
        let m = SeatModel::new(&g, 0.0).unwrap();
        let mut est = SwingEstimator::new([m, m, m], 0.01, 120.0);
        assert!(est.confirm_rest(0.0));
        let mut worst = 0.0_f64;
        for row in out.trace.iter().skip(1) {
            let stepped = est.advance(row.speed_rad_s as f32, 0.01).unwrap();
            assert!(stepped);
            let s = est.states()[1];
            worst = worst
                .max((f64::from(s.radial_rad).to_degrees() - row.radial_angle_deg).abs())
                .max((f64::from(s.tangential_rad).to_degrees() - row.tangential_angle_deg).abs());
        }
        assert!(worst < 0.05, "{suspension:?}: {worst} deg");
    }
}

#[test]
fn estimator_refuses_to_vouch_without_a_confirmed_rest_and_on_disagreement() {
    let g = issue_ride(Suspension::Chain);
    let m = SeatModel::new(&g, 0.0).unwrap();
    let mut est = SwingEstimator::new([m, m, m], 0.01, 5.0);
    assert_eq!(
        est.advance(0.5, 0.01),
        Err(EstimatorFault::RestNotConfirmed)
    );
    assert!(!est.confirm_rest(0.5));
    // Standing still for the rest hold confirms rest by itself.
    for _ in 0..501 {
        let _ = est.advance(0.0, 0.01);
    }
    assert!(est.is_confirmed());
    assert_eq!(est.advance(f32::NAN, 0.01), Err(EstimatorFault::NotFinite));
    assert!(est.confirm_rest(0.0));
    // A sensor reading 10° away from a hanging seat: disagreement beyond 5°.
    assert_eq!(
        est.correct(10.0_f32.to_radians(), 0.0, 5.0_f32.to_radians()),
        Err(EstimatorFault::SensorDisagreement)
    );
    assert!(est.confirm_rest(0.0));
    // Within tolerance the observer pulls the estimate toward the reading.
    let d = est
        .correct(2.0_f32.to_radians(), 0.0, 5.0_f32.to_radians())
        .unwrap();
    assert!((d - 2.0_f32.to_radians()).abs() < 1e-6);
    assert!(est.states()[1].radial_rad > 0.0);
}

#[test]
fn observer_converges_from_a_wrong_start() {
    // With a seat-angle sensor, a model started 3° off follows the true seat to
    // within 0.2° after 60 s (demo gains of the estimator).
    let g = issue_ride(Suspension::Rod);
    let m = SeatModel::new(&g, 0.0).unwrap();
    // At standstill the true seat swings 3° while the estimate starts hanging still.
    let w = 0.0_f32;
    let mut truth = SeatState {
        radial_rad: 3.0_f32.to_radians(),
        ..SeatState::REST
    };
    let mut est = SwingEstimator::new([m, m, m], 0.01, 120.0);
    assert!(est.confirm_rest(0.0));
    let mut last_error = 1.0_f32;
    for _ in 0..6000 {
        truth = m.step(&truth, w, 0.0, 0.01).unwrap();
        est.advance(w, 0.01).unwrap();
        est.correct(truth.radial_rad, 0.0, 0.5).unwrap();
        last_error = (est.states()[1].radial_rad - truth.radial_rad).abs();
    }
    assert!(last_error < 0.2_f32.to_radians(), "{last_error}");
}

#[test]
fn governor_keeps_the_issue_cases_inside_the_certified_angle() {
    // The study's ride (hub 4 m, L 6.5 m, 0.1 rad/s², 0.05 rad/s³, 50° certified):
    // without the governor a time-optimal ramp to the ceiling swings past 60° and the
    // 75 %/100 % pumping goes beyond 75° (the study found about 65° and 79°); with it,
    // the simulated peak stays below 50°.
    let g = issue_ride(Suspension::Chain);
    let rig = rig(g, 50.0);
    let truth = SeatDynamics::from_geometry(&g);
    let step = Scenario {
        requests: vec![(0.0, f64::from(rig.ceiling_rad_s))],
        duration_s: 150.0,
        stop_at_s: None,
    };
    let pump = pumping(&g, rig.ceiling_rad_s, 1.0, 200.0);
    let bare_step = simulate_peak(
        &truth,
        &run_loop(&rig, &step, false, 0.0).unwrap().profile,
        20.0,
    )
    .unwrap();
    let bare_pump = simulate_peak(
        &truth,
        &run_loop(&rig, &pump, false, 0.0).unwrap().profile,
        20.0,
    )
    .unwrap();
    assert!(bare_step.0 > 60.0, "{bare_step:?}");
    assert!(bare_pump.0 > 75.0, "{bare_pump:?}");
    for scenario in [&step, &pump] {
        let run = run_loop(&rig, scenario, true, 0.0).unwrap();
        assert_eq!(run.fault_ticks, 0);
        let (peak, _) = simulate_peak(&truth, &run.profile, 20.0).unwrap();
        assert!(peak < 50.0, "governed peak {peak}");
        assert!(
            peak > 40.0,
            "governed peak {peak}: the ride must still get near the angle"
        );
    }
}

#[test]
fn governor_refuses_bad_parameters_by_name() {
    let g = issue_ride(Suspension::Chain);
    let good = GovernorParams::demo(&g, 50.0, 0.05);
    let cases: [(GovernorParams, &str); 5] = [
        (
            GovernorParams {
                certified_angle_deg: f32::NAN,
                ..good
            },
            "certified_angle_deg",
        ),
        (
            GovernorParams {
                length_min_m: 7.0,
                ..good
            },
            "length_min_m",
        ),
        (
            GovernorParams {
                jerk_rad_s3: 0.0,
                ..good
            },
            "jerk_rad_s3",
        ),
        (
            GovernorParams {
                estimator_period_s: 0.5,
                ..good
            },
            "estimator_period_s",
        ),
        (
            GovernorParams {
                target_rate_rad_s2: -1.0,
                ..good
            },
            "target_rate_rad_s2",
        ),
    ];
    for (p, name) in cases {
        assert_eq!(SwingGovernor::new(&g, &p).unwrap_err().parameter(), name);
    }
}

#[test]
fn governor_faults_without_a_speed_and_admits_zero_while_stopping() {
    let g = issue_ride(Suspension::Chain);
    let mut gov = SwingGovernor::new(&g, &GovernorParams::demo(&g, 50.0, 0.05)).unwrap();
    let input = GovernorInput {
        clamped_request_rad_s: 0.5,
        commanded: Setpoint::at_target(AngularSpeed::from_rad_per_s(0.0)),
        measured_rad_s: Some(0.0),
        dt_s: 0.01,
        stopping: false,
    };
    // Rest not confirmed yet: nothing may start.
    let d = gov.govern(&input);
    assert_eq!(
        (d.admitted_rad_s, d.status),
        (0.0, GovernorStatus::Restricting)
    );
    assert!(gov.confirm_rest(0.0));
    let d = gov.govern(&GovernorInput {
        measured_rad_s: None,
        ..input
    });
    assert_eq!(d.status, GovernorStatus::Fault);
    assert!(gov.confirm_rest(0.0));
    let d = gov.govern(&GovernorInput {
        stopping: true,
        ..input
    });
    assert_eq!(d.admitted_rad_s, 0.0);
    let d = gov.govern(&GovernorInput {
        measured_rad_s: Some(f32::INFINITY),
        ..input
    });
    assert_eq!(d.status, GovernorStatus::Fault);
}

#[test]
fn band_envelope_folds_the_three_lengths_conservatively() {
    // Step 5: the certificate reads one folded envelope for the length band. At any
    // speed its room must not exceed any length's room, its growth integral must not
    // fall below any length's, and its swing bound must not fall below any length's
    // (each length's own envelope on the common grid is the reference; hand
    // calculation, common practice). Chains and rods, random states and speeds.
    let mut next = uniform(0x9e37_79b9_u64);
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let g = issue_ride(suspension);
        let params = GovernorParams::demo(&g, 50.0, 0.05);
        let gov = SwingGovernor::new(&g, &params).unwrap();
        let band = gov.band();
        let envs = &SwingGovernor::length_envelopes(&g, &params).unwrap();
        for env in envs {
            assert_eq!(env.top_rad_s(), band.top_rad_s());
        }
        for _ in 0..3000 {
            let w = 1.02 * band.top_rad_s() * next();
            let w2 = 1.02 * band.top_rad_s() * next();
            let state = SeatState {
                radial_rad: 0.9 * next(),
                radial_rate: 0.4 * (next() - 0.5),
                tangential_rad: if suspension == Suspension::Chain {
                    0.5 * (next() - 0.5)
                } else {
                    0.0
                },
                tangential_rate: if suspension == Suspension::Chain {
                    0.4 * (next() - 0.5)
                } else {
                    0.0
                },
            };
            let jacobi = [
                envs[0].model().jacobi(&state, w),
                envs[1].model().jacobi(&state, w),
                envs[2].model().jacobi(&state, w),
            ];
            let swing = band.swing(&jacobi, w);
            for env in envs {
                assert!(
                    band.room(w) <= env.room(w),
                    "room at {w}: {} > {}",
                    band.room(w),
                    env.room(w)
                );
                let (lo, hi) = (w.min(w2), w.max(w2));
                assert!(
                    band.growth_to(hi) - band.growth_to(lo)
                        >= env.growth_to(hi) - env.growth_to(lo) - 1e-6,
                    "growth over [{lo}, {hi}]"
                );
                assert!(swing >= env.swing_energy(&state, w).sqrt() - 1e-6);
            }
        }
    }
}

#[test]
fn down_slack_from_the_table_equals_the_cell_by_cell_check() {
    // The governor reads a down move's slack from the per-cell terms of the band's
    // envelope (one comparison per whole cell); it must give the cell-by-cell check,
    // up to f32 rounding (1e-5), on pieces of every length, partly above the top too.
    let mut next = uniform(0x9e37_79b9_u64);
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let g = issue_ride(suspension);
        for u in [0.0_f32, 0.005, 0.02] {
            let params = GovernorParams {
                speed_uncertainty_rad_s: u,
                ..GovernorParams::demo(&g, 50.0, 0.05)
            };
            let gov = SwingGovernor::new(&g, &params).unwrap();
            let band = gov.band();
            for _ in 0..2000 {
                let x = 1.05 * band.top_rad_s() * next();
                let y = 1.05 * band.top_rad_s() * next();
                let (lo, hi) = (x.min(y), x.max(y));
                let start = 0.3 * next();
                let slow = band.down_slack_by_cells(start, lo, hi);
                let fast = band.down_slack(start, lo, hi);
                assert!(
                    (slow - fast).abs() <= 1e-5 * (1.0 + slow.abs()),
                    "{suspension:?} u {u} [{lo}, {hi}] start {start}: {slow} vs {fast}"
                );
            }
        }
    }
}

#[test]
fn governor_lowers_from_its_highest_admitted_speed() {
    // The reserve kept on every ascent (docs/dynamic_protection.md, "Reserve for
    // lowering") must let the governor lower from the highest speed it admitted: a
    // request above what it admits for 200 s, then 20°; the command must reach the new
    // request within 60 s (demo ride of the cost table; hand calculation, common
    // practice: at the governor's 0.02 rad/s² the move itself takes about 15 s).
    let g = RideGeometry::new(3.4, 5.8, Suspension::Chain, Gravity::STANDARD).unwrap();
    let rig = rig(g, 45.0);
    let v20 = f64::from(
        g.speed_for_angle(Angle::from_deg(20.0))
            .unwrap()
            .rad_per_s(),
    );
    let v40 = f64::from(
        g.speed_for_angle(Angle::from_deg(40.0))
            .unwrap()
            .rad_per_s(),
    );
    let scenario = Scenario {
        requests: vec![(0.0, v40), (200.0, v20)],
        duration_s: 260.0,
        stop_at_s: None,
    };
    let run = run_loop(&rig, &scenario, true, 0.0).unwrap();
    assert_eq!(run.fault_ticks, 0);
    let high = run
        .profile
        .iter()
        .filter(|p| p.0 <= 200.0)
        .map(|p| p.1)
        .fold(0.0, f64::max);
    assert!(high > 0.9 * v40, "never got near the request: {high}");
    let done = run
        .profile
        .iter()
        .find(|p| p.0 >= 200.0 && (p.1 - v20).abs() <= 1e-3 * v20)
        .map(|p| p.0 - 200.0);
    assert!(
        done.is_some_and(|d| d < 60.0),
        "lowering from {high} rad/s: {done:?}"
    );
}
