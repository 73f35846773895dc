//! The seat-dynamics simulator checked against closed forms, classical
//! results, a conservation law and an independent formulation.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use core::f64::consts::TAU;

use swingdrive::reference::seat::simulate_ground_frame;
use swingdrive::sim::{
    simulate, LinkState, Observation, SeatDynamics, SimOptions, SpeedProfile, Tolerance,
};
use swingdrive::{AngularSpeed, Gravity, RideGeometry, Suspension, SwingModes};

const G: f64 = 9.806_65;

fn seat(r0: f64, l: f64, suspension: Suspension) -> SeatDynamics {
    SeatDynamics::new(r0, l, suspension, G).unwrap()
}

fn constant(speed: f64, until: f64) -> SpeedProfile {
    SpeedProfile::new(&[(0.0, speed), (until, speed)]).unwrap()
}

fn run(
    model: &SeatDynamics,
    profile: &SpeedProfile,
    start: LinkState,
    start_speed: f64,
    end_s: f64,
    options: &SimOptions,
) -> Vec<Observation> {
    let mut samples = Vec::new();
    simulate(
        model,
        profile,
        start,
        start_speed,
        end_s,
        options,
        &mut samples,
    )
    .unwrap();
    samples
}

fn with_step(sample_step_s: f64) -> SimOptions {
    SimOptions {
        sample_step_s,
        ..SimOptions::default()
    }
}

#[test]
fn damped_seats_settle_at_the_closed_form_steady_state() {
    // Closed form: tan φ = ω² (r0 + L sin φ) / g (docs/physics.md; conical
    // pendulum for r0 = 0, standard textbook result), solved by the f64
    // reference and by the f32 target code. The simulation does not use the
    // closed form: it starts hanging at standstill, ramps up over 20 s and
    // lets damping (1 1/s) remove the swing by 200 s. The seat starts nudged
    // out by 0.01 rad: on the axis (r0 = 0) the vertical stays an equilibrium
    // (unstable above √(g/L)), and a seat placed exactly on it never leaves.
    for suspension in [Suspension::Chain, Suspension::Rod] {
        for (r0, l, w) in [(3.4, 5.8, 1.15), (0.0, 4.0, 2.0), (6.0, 3.0, 0.9)] {
            let model = seat(r0, l, suspension).with_damping(1.0).unwrap();
            let profile = SpeedProfile::new(&[(0.0, 0.0), (20.0, w), (200.0, w)]).unwrap();
            let start = LinkState::swung_out(0.01);
            let samples = run(&model, &profile, start, 0.0, 200.0, &with_step(0.5));
            let last = samples.last().unwrap();
            let phi = last.state.angle_from_vertical_rad();
            let reference = model.steady_reference().angle_for_speed(w);
            assert!(
                (phi - reference).abs() < 1e-8,
                "{suspension:?} r0 {r0} L {l}: {phi} vs f64 reference {reference}"
            );
            #[allow(clippy::cast_possible_truncation)]
            let geometry =
                RideGeometry::new(r0 as f32, l as f32, suspension, Gravity::STANDARD).unwrap();
            #[allow(clippy::cast_possible_truncation)]
            let target = geometry
                .steady_state_at_speed(AngularSpeed::from_rad_per_s(w as f32))
                .unwrap();
            // f32 target code: about 7 significant digits.
            assert!(
                (phi - f64::from(target.angle.rad())).abs() < 2e-6,
                "{phi} vs f32 {}",
                target.angle.rad()
            );
            assert!((last.link.load_factor - f64::from(target.load_factor)).abs() < 1e-5);
            let [x, y, _] = model.seat_position_m(&last.state);
            assert!((x.hypot(y) - f64::from(target.seat_radius_m)).abs() < 1e-5);
            // With r0 > 0 the seat settles in the radial plane; on the axis
            // (r0 = 0) the cone's azimuth relative to the top is neutral.
            if r0 > 0.0 {
                assert!(last.state.tangential_angle_rad().abs() < 1e-8);
            }
        }
    }
}

#[test]
fn the_closed_form_steady_state_is_an_equilibrium() {
    // Hand calculation, common practice: started exactly in the closed-form
    // steady state, an undamped seat stays there; any error in the
    // centrifugal or gravity terms would make it swing.
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let model = seat(3.4, 5.8, suspension);
        let w = 1.15;
        let start = model.steady_state(w);
        let samples = run(&model, &constant(w, 60.0), start, w, 60.0, &with_step(0.1));
        let worst = samples
            .iter()
            .map(|o| o.state.angle_to(start.direction()))
            .fold(0.0, f64::max);
        assert!(worst < 5e-9, "{suspension:?}: drifted {worst} rad");
    }
}

/// Angular frequency (rad/s) of a single-mode signal from its upward zero
/// crossings (linear interpolation between samples).
fn frequency_from_zero_crossings(times: &[f64], x: &[f64]) -> f64 {
    let mut crossings = Vec::new();
    for k in 1..x.len() {
        if x[k - 1] < 0.0 && x[k] >= 0.0 {
            let f = x[k - 1] / (x[k - 1] - x[k]);
            crossings.push(times[k - 1] + f * (times[k] - times[k - 1]));
        }
    }
    assert!(crossings.len() >= 5, "too few crossings");
    let periods = (crossings.len() - 1) as f64;
    TAU * periods / (crossings.last().unwrap() - crossings[0])
}

/// Least-squares solution of `rhs ≈ Σ a_j · columns[j]` (normal equations,
/// Gaussian elimination with partial pivoting; a handful of unknowns).
fn least_squares(columns: &[Vec<f64>], rhs: &[f64]) -> Vec<f64> {
    let n = columns.len();
    let dot = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| x * y).sum::<f64>();
    let mut m: Vec<Vec<f64>> = (0..n)
        .map(|i| {
            let mut row: Vec<f64> = (0..n).map(|j| dot(&columns[i], &columns[j])).collect();
            row.push(dot(&columns[i], rhs));
            row
        })
        .collect();
    for col in 0..n {
        let pivot = (col..n)
            .max_by(|&a, &b| m[a][col].abs().total_cmp(&m[b][col].abs()))
            .unwrap();
        m.swap(col, pivot);
        let pivot_row = m[col].clone();
        for (row, values) in m.iter_mut().enumerate() {
            if row != col {
                let f = values[col] / pivot_row[col];
                for (v, p) in values.iter_mut().zip(&pivot_row).skip(col) {
                    *v -= f * p;
                }
            }
        }
    }
    (0..n).map(|i| m[i][n] / m[i][i]).collect()
}

/// The signal minus its mean.
fn centred(x: &[f64]) -> Vec<f64> {
    let mean = x.iter().sum::<f64>() / x.len() as f64;
    x.iter().map(|v| v - mean).collect()
}

/// The two angular frequencies (rad/s, low then high) of signals sampled
/// every `h` seconds that are sums of the same two undamped oscillations
/// about constant offsets: linear prediction (Prony's method, 1795). The
/// characteristic polynomial of such a signal is
/// (z² − 2c₁z + 1)(z² − 2c₂z + 1) with cᵢ = cos(Ωᵢh), so
/// x[k+4] + x[k] = P (x[k+3] + x[k+1]) − Q x[k+2] + C with P = 2(c₁+c₂),
/// Q = 2 + 4c₁c₂ and one constant C per signal (its offset); P, Q and the
/// C's are fitted by least squares over all the signals.
fn two_frequencies(h: f64, signals: &[&[f64]]) -> (f64, f64) {
    let mut columns = vec![Vec::new(); 2 + signals.len()];
    let mut rhs = Vec::new();
    for (s, x) in signals.iter().enumerate() {
        // Removing the mean first keeps the normal equations well conditioned.
        let x = centred(x);
        for k in 0..x.len() - 4 {
            columns[0].push(x[k + 3] + x[k + 1]);
            columns[1].push(-x[k + 2]);
            for (c, column) in columns.iter_mut().enumerate().skip(2) {
                column.push(if c - 2 == s { 1.0 } else { 0.0 });
            }
            rhs.push(x[k + 4] + x[k]);
        }
    }
    let a = least_squares(&columns, &rhs);
    let (sum, product) = (a[0] / 2.0, (a[1] - 2.0) / 4.0);
    let disc = (sum * sum - 4.0 * product).max(0.0).sqrt();
    let (c_hi, c_lo) = ((sum - disc) / 2.0, (sum + disc) / 2.0);
    (c_lo.min(1.0).acos() / h, c_hi.max(-1.0).acos() / h)
}

/// One frequency of a single oscillation about an unknown offset:
/// x[k+1] + x[k−1] = P x[k] + C with P = 2 cos(Ωh) (linear prediction with
/// a constant term).
fn one_frequency_with_offset(h: f64, x: &[f64]) -> f64 {
    let x = centred(x);
    let columns = vec![x[1..x.len() - 1].to_vec(), vec![1.0; x.len() - 2]];
    let rhs: Vec<f64> = (1..x.len() - 1).map(|k| x[k + 1] + x[k - 1]).collect();
    (least_squares(&columns, &rhs)[0] / 2.0).acos() / h
}

/// Small free swing about the steady state at angle `deg`: the seat starts
/// there with a small angular velocity and turns at constant speed.
/// A kick about the tangential axis: in-plane (radial) swing.
const RADIAL_KICK: [f64; 3] = [0.0, 1e-5, 0.0];
/// A kick with components in every direction: both chain modes.
const MIXED_KICK: [f64; 3] = [1e-5, 1.3e-5, 0.7e-5];

/// `kick` is the starting angular velocity of the link, rad/s.
fn small_swing(
    model: &SeatDynamics,
    deg: f64,
    kick: [f64; 3],
    periods_of: f64,
    h: f64,
) -> (f64, Vec<Observation>) {
    let phi = deg.to_radians();
    let w = model.steady_reference().speed_for_angle(phi);
    let start = LinkState::new(LinkState::swung_out(phi).direction(), kick).unwrap();
    let end = 25.0 * TAU / periods_of;
    let options = SimOptions {
        sample_step_s: h,
        tolerance: Tolerance {
            relative: 1e-11,
            absolute: 1e-13,
        },
        ..SimOptions::default()
    };
    (w, run(model, &constant(w, end), start, w, end, &options))
}

fn f32_modes(model: &SeatDynamics, w: f64) -> SwingModes {
    #[allow(clippy::cast_possible_truncation)]
    let geometry = RideGeometry::new(
        model.hub_offset_m() as f32,
        model.length_m() as f32,
        model.suspension(),
        Gravity::STANDARD,
    )
    .unwrap();
    #[allow(clippy::cast_possible_truncation)]
    let state = geometry
        .steady_state_at_speed(AngularSpeed::from_rad_per_s(w as f32))
        .unwrap();
    geometry.swing_modes(&state)
}

fn assert_rel(measured: f64, expected: f64, rel: f64, what: &str) {
    let err = (measured - expected).abs() / expected;
    assert!(
        err <= rel,
        "{what}: measured {measured}, expected {expected}, relative error {err:e}"
    );
}

#[test]
fn rod_swing_frequency_matches_the_linearisation() {
    // Radial mode of a hinged rod, Ω² = ω² r0 / (L sin φ) + ω² sin² φ
    // (src/modes.rs, derived in docs/physics.md), against the f32 target code
    // and the f64 reference (numerical Hessian of the effective potential).
    // Measured from zero crossings of the simulated radial angle.
    for (r0, l) in [(3.4, 5.8), (8.0, 2.5)] {
        let model = seat(r0, l, Suspension::Rod);
        for deg in [20.0_f64, 45.0, 65.0] {
            let reference = model.steady_reference().swing_modes(deg.to_radians()).0;
            let (w, samples) = small_swing(&model, deg, RADIAL_KICK, reference, 0.01);
            let times: Vec<f64> = samples.iter().map(|o| o.time_s).collect();
            let x: Vec<f64> = samples
                .iter()
                .map(|o| o.state.radial_angle_rad() - deg.to_radians())
                .collect();
            let measured = frequency_from_zero_crossings(&times, &x);
            let SwingModes::Rod { radial } = f32_modes(&model, w) else {
                panic!()
            };
            assert_rel(
                measured,
                f64::from(radial.angular_frequency_rad_s()),
                2e-6,
                "rod vs f32",
            );
            assert_rel(measured, reference, 5e-7, "rod vs f64 reference");
        }
    }
}

#[test]
fn rod_on_the_axis_swings_at_omega_sin_phi() {
    // r0 = 0: Ω = ω sin φ (J. R. Taylor, Classical Mechanics, 2005, Example 7.7).
    let model = seat(0.0, 5.0, Suspension::Rod);
    for deg in [30.0_f64, 50.0, 70.0] {
        let phi = deg.to_radians();
        let expected = model.steady_reference().speed_for_angle(phi) * phi.sin();
        let (_, samples) = small_swing(&model, deg, RADIAL_KICK, expected, 0.01);
        let times: Vec<f64> = samples.iter().map(|o| o.time_s).collect();
        let x: Vec<f64> = samples
            .iter()
            .map(|o| o.state.radial_angle_rad() - phi)
            .collect();
        assert_rel(
            frequency_from_zero_crossings(&times, &x),
            expected,
            1e-7,
            "Taylor 7.7",
        );
    }
}

#[test]
fn chain_swing_frequencies_match_the_linearisation() {
    // Two coupled modes, roots of Ω⁴ − (k_r + k_t + 4ω²cos²φ) Ω² + k_r k_t = 0
    // (src/modes.rs), against the f32 target code and the f64 reference.
    // Both measured at once from radial and tangential angles by linear
    // prediction.
    for (r0, l) in [(3.4, 5.8), (8.0, 2.5)] {
        let model = seat(r0, l, Suspension::Chain);
        for deg in [20.0_f64, 45.0, 65.0] {
            let phi = deg.to_radians();
            let (slow_ref, fast_ref) = model.steady_reference().swing_modes(phi);
            let fast_ref = fast_ref.unwrap();
            let h = 0.25;
            let (w, samples) = small_swing(&model, deg, MIXED_KICK, slow_ref, h);
            let radial: Vec<f64> = samples
                .iter()
                .map(|o| o.state.radial_angle_rad() - phi)
                .collect();
            let tangential: Vec<f64> = samples
                .iter()
                .map(|o| o.state.tangential_angle_rad())
                .collect();
            let (slow, fast) = two_frequencies(h, &[&radial, &tangential]);
            let c = phi.cos();
            let kt = w * w * r0 / (l * phi.sin());
            let kr = kt + w * w * phi.sin().powi(2);
            let b = kr + kt + 4.0 * w * w * c * c;
            let hi = 0.5 * (b + (b * b - 4.0 * kr * kt).sqrt());
            assert_rel(slow, (kr * kt / hi).sqrt(), 5e-7, "slow vs formula in f64");
            assert_rel(fast, hi.sqrt(), 5e-7, "fast vs formula in f64");
            let SwingModes::Chain {
                slow: s32,
                fast: f32_,
            } = f32_modes(&model, w)
            else {
                panic!()
            };
            assert_rel(
                slow,
                f64::from(s32.angular_frequency_rad_s()),
                2e-6,
                "slow vs f32",
            );
            assert_rel(
                fast,
                f64::from(f32_.angular_frequency_rad_s()),
                2e-6,
                "fast vs f32",
            );
            assert_rel(slow, slow_ref, 5e-7, "slow vs f64 reference");
            assert_rel(fast, fast_ref, 5e-7, "fast vs f64 reference");
        }
    }
}

#[test]
fn chain_on_the_axis_is_the_spherical_pendulum() {
    // r0 = 0, small oscillation of the angle from vertical about conical
    // motion: Ω = ω √(1 + 3 cos² φ) (classical spherical pendulum,
    // Encyclopaedia Britannica, 11th ed., 1911, "Mechanics"). The cone's
    // azimuth is neutral (Ω = 0), so the angle from vertical, which does not
    // see it, is fitted.
    let model = seat(0.0, 5.0, Suspension::Chain);
    for deg in [25.0_f64, 45.0, 70.0] {
        let phi = deg.to_radians();
        let w = model.steady_reference().speed_for_angle(phi);
        let expected = w * (1.0 + 3.0 * phi.cos().powi(2)).sqrt();
        let h = 0.1;
        let (_, samples) = small_swing(&model, deg, RADIAL_KICK, expected, h);
        let polar: Vec<f64> = samples
            .iter()
            .map(|o| o.state.angle_from_vertical_rad())
            .collect();
        assert_rel(
            one_frequency_with_offset(h, &polar),
            expected,
            1e-7,
            "spherical pendulum",
        );
    }
}

#[test]
fn jacobi_integral_is_conserved_at_constant_speed() {
    // At constant shaft speed and without damping the energy in the turning
    // frame, ½|v_rel|² + g z − ½ ω² (x² + y²), is conserved (Jacobi integral;
    // e.g. Goldstein, Classical Mechanics, 3rd ed., 2002, §8.2). Hard case:
    // a 1.15 rad/s step from rest, then five minutes of large, irregular
    // swinging. Drift bound with the default tolerances (rtol 1e-9):
    // 5e-7 · g L (measured: chain 1.8e-8, rod 9.8e-8).
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let model = seat(3.4, 5.8, suspension);
        let w = 1.15;
        let profile = SpeedProfile::new(&[(0.0, 0.0), (0.0, w), (300.0, w)]).unwrap();
        let samples = run(
            &model,
            &profile,
            LinkState::HANGING,
            0.0,
            300.0,
            &with_step(0.05),
        );
        let j0 = model.jacobi_integral(&samples[0].state, w);
        let drift = samples
            .iter()
            .map(|o| (model.jacobi_integral(&o.state, w) - j0).abs())
            .fold(0.0, f64::max);
        let scale = G * model.length_m();
        assert!(drift < 5e-7 * scale, "{suspension:?}: drift {drift:e} J/kg");
        // The motion really is large: the seat swings far past the steady angle.
        let peak = samples
            .iter()
            .map(|o| o.state.angle_from_vertical_rad())
            .fold(0.0, f64::max);
        assert!(peak.to_degrees() > 70.0);
    }
}

#[test]
fn ground_frame_formulation_agrees_over_a_ramp_and_hold() {
    // An independent formulation (swingdrive::reference::seat: ground frame,
    // Cartesian, Lagrange multipliers, DOP853) integrated separately. Run:
    // hanging at standstill, linear ramp to 1.15 rad/s in 30 s (α ≈ 0.038
    // rad/s², which drives tangential swing through the Euler force), hold
    // to 60 s. The simulator runs at its default tolerances; required
    // agreement 1e-6 rad at every 0.5 s sample (measured: chain 2.0e-9,
    // rod 3.2e-9 rad).
    for suspension in [Suspension::Chain, Suspension::Rod] {
        let model = seat(3.4, 5.8, suspension);
        let profile = SpeedProfile::new(&[(0.0, 0.0), (30.0, 1.15), (60.0, 1.15)]).unwrap();
        let samples = run(
            &model,
            &profile,
            LinkState::HANGING,
            0.0,
            60.0,
            &with_step(0.5),
        );
        let times: Vec<f64> = samples.iter().map(|o| o.time_s).collect();
        let reference = simulate_ground_frame(
            &model.steady_reference(),
            &profile,
            [0.0, 0.0, -1.0],
            [0.0; 3],
            60.0,
            &times,
            Tolerance {
                relative: 1e-12,
                absolute: 1e-14,
            },
        )
        .unwrap();
        assert_eq!(reference.len(), samples.len());
        let worst = samples
            .iter()
            .zip(&reference)
            .map(|(o, r)| o.state.angle_to(*r))
            .fold(0.0, f64::max);
        assert!(worst < 1e-6, "{suspension:?}: {worst:e} rad");
        let tangential = samples
            .iter()
            .map(|o| o.state.tangential_angle_rad().abs())
            .fold(0.0, f64::max);
        if suspension == Suspension::Chain {
            assert!(
                tangential > 1e-3,
                "the ramp should swing the chain tangentially"
            );
        }
    }
}
