//! Steady-state physics and swing modes checked against sources outside the project.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::{Angle, AngularSpeed, Gravity, ParamError, RideGeometry, Suspension, SwingModes};

fn ride(r0: f32, l: f32, suspension: Suspension, g: Gravity) -> RideGeometry {
    RideGeometry::new(r0, l, suspension, g).unwrap()
}

fn assert_rel(actual: f32, expected: f32, rel: f32, what: &str) {
    let err = ((actual - expected) / expected).abs();
    assert!(
        err <= rel,
        "{what}: {actual} vs {expected} (relative error {err:e} > {rel:e})"
    );
}

#[test]
fn conical_pendulum_on_the_axis() {
    // Conical pendulum, r0 = 0: ω = √(g / (L cos φ)) — standard textbook result
    // (e.g. Halliday, Resnick & Walker, Fundamentals of Physics, ch. 6).
    let g = 9.806_65_f32;
    for l in [1.0_f32, 4.5, 12.0] {
        let r = ride(0.0, l, Suspension::Chain, Gravity::STANDARD);
        for deg in [1.0_f32, 15.0, 30.0, 45.0, 60.0, 80.0] {
            let expected = (g / (l * deg.to_radians().cos())).sqrt();
            let w = r.speed_for_angle(Angle::from_deg(deg)).unwrap();
            assert_rel(w.rad_per_s(), expected, 4e-7, "conical speed");
            // And back: the closed-form inverse used for r0 = 0.
            let back = r.angle_for_speed(w).unwrap();
            assert!(
                (back.deg() - deg).abs() < 5e-4 / deg.to_radians(),
                "{l} {deg}: {}",
                back.deg()
            );
        }
        // Below √(g/L) the seats hang straight down (bifurcation of the conical pendulum).
        let slow = AngularSpeed::from_rad_per_s(0.99 * (g / l).sqrt());
        assert_eq!(r.angle_for_speed(slow).unwrap(), Angle::ZERO);
        assert_eq!(
            r.steady_state_at_speed(slow)
                .unwrap()
                .sensitivity
                .rad_per_rad_s(),
            0.0
        );
    }
}

#[test]
fn hand_calculation_offset_ride_30_degrees() {
    // Hand calculation, common practice (no published source): r0 = 3.00 m, L = 5.00 m,
    // φ = 30.0°, g = 9.80 m/s² → ω = 1.01426 rad/s, rotation period 6.1948 s, load factor 1.1547.
    let r = ride(3.0, 5.0, Suspension::Chain, Gravity::new(9.80).unwrap());
    let s = r.steady_state_at_angle(Angle::from_deg(30.0)).unwrap();
    assert_rel(s.speed.rad_per_s(), 1.014_26, 5e-6, "speed");
    assert_rel(s.speed.period_s(), 6.194_8, 1e-5, "period");
    assert_rel(s.load_factor, 1.154_7, 1e-5, "load factor");
    assert_rel(s.seat_radius_m, 5.5, 1e-6, "seat radius");
    assert_rel(
        s.tension_per_mass_mps2,
        9.80 * 1.154_700_5,
        1e-6,
        "tension per mass",
    );
    let back = r.angle_for_speed(s.speed).unwrap();
    assert!((back.deg() - 30.0).abs() < 1e-4);
    // The same point from its load factor 1/cos 30° = 1.1547005 (closed form, no acos).
    let by_load = r.speed_for_load_factor(1.154_700_5).unwrap();
    assert_rel(by_load.rad_per_s(), 1.014_26, 5e-6, "speed for load factor");
    // n = 1: the seats hang straight; with r0 > 0 that is only at standstill.
    assert_eq!(r.speed_for_load_factor(1.0).unwrap().rad_per_s(), 0.0);
    for bad in [f32::NAN, f32::INFINITY, 0.99, -2.0] {
        let err = r.speed_for_load_factor(bad).unwrap_err();
        assert!(format!("{err}").contains("load_factor"), "{bad}: {err}");
    }
}

#[test]
fn hand_calculation_offset_ride_45_degrees_in_drive_units() {
    // Hand calculation, common practice: r0 = 1.5 m, L = 8 m, φ = 45°, g = 9.80665 m/s²
    // → ω = 1.17058 rad/s = 11.178 rpm = 67.07 °/s.
    let r = ride(1.5, 8.0, Suspension::Rod, Gravity::STANDARD);
    let w = r.speed_for_angle(Angle::from_deg(45.0)).unwrap();
    assert_rel(w.rad_per_s(), 1.170_58, 5e-6, "rad/s");
    assert_rel(w.rpm(), 11.178, 5e-5, "rpm");
    assert_rel(w.deg_per_s(), 67.07, 1e-4, "deg/s");
}

#[test]
fn sensitivity_matches_a_finite_difference() {
    // Hand calculation, common practice: dφ/dω ≈ (φ(ω + h) − φ(ω − h)) / 2h.
    let r = ride(3.6, 6.2, Suspension::Chain, Gravity::STANDARD);
    let mut previous_load_slope = 0.0;
    for deg in [20.0_f32, 35.0, 50.0, 65.0] {
        let s = r.steady_state_at_angle(Angle::from_deg(deg)).unwrap();
        let h = 1e-3_f32;
        let up = r
            .steady_state_at_speed(AngularSpeed::from_rad_per_s(s.speed.rad_per_s() + h))
            .unwrap();
        let down = r
            .steady_state_at_speed(AngularSpeed::from_rad_per_s(s.speed.rad_per_s() - h))
            .unwrap();
        let fd = (up.angle.rad() - down.angle.rad()) / (2.0 * h);
        assert_rel(s.sensitivity.rad_per_rad_s(), fd, 2e-3, "sensitivity");
        // dφ/dω itself peaks at mid angles (≈ 35° here), but what the rider feels, the load
        // factor 1/cos φ, climbs ever faster per rpm towards the top.
        let load_slope = (up.load_factor - down.load_factor) / (2.0 * h);
        assert!(
            load_slope > previous_load_slope,
            "{deg}°: {load_slope} <= {previous_load_slope}"
        );
        previous_load_slope = load_slope;
    }
}

#[test]
fn rod_on_the_axis_swings_at_omega_sin_phi() {
    // Hinged rod, r0 = 0: in-plane small oscillation Ω = ω sin φ
    // (J. R. Taylor, Classical Mechanics, 2005, Example 7.7).
    let r = ride(0.0, 6.0, Suspension::Rod, Gravity::STANDARD);
    for deg in [10.0_f32, 30.0, 50.0, 70.0] {
        let s = r.steady_state_at_angle(Angle::from_deg(deg)).unwrap();
        let SwingModes::Rod { radial } = r.swing_modes(&s) else {
            panic!("rod")
        };
        assert_rel(
            radial.angular_frequency_rad_s(),
            s.speed.rad_per_s() * deg.to_radians().sin(),
            2e-6,
            "rod",
        );
    }
}

#[test]
fn chain_on_the_axis_matches_the_spherical_pendulum() {
    // Free spherical pendulum about conical motion: Ω = ω √(1 + 3 cos² φ)
    // (classical result; Encyclopaedia Britannica, 11th ed., 1911, "Mechanics").
    // The other mode is the neutral turning of the cone about the axis: Ω = 0.
    let r = ride(0.0, 6.0, Suspension::Chain, Gravity::STANDARD);
    for deg in [10.0_f32, 30.0, 50.0, 70.0] {
        let s = r.steady_state_at_angle(Angle::from_deg(deg)).unwrap();
        let SwingModes::Chain { slow, fast } = r.swing_modes(&s) else {
            panic!("chain")
        };
        let c = deg.to_radians().cos();
        assert_rel(
            fast.angular_frequency_rad_s(),
            s.speed.rad_per_s() * (1.0 + 3.0 * c * c).sqrt(),
            2e-6,
            "fast",
        );
        assert_eq!(slow.angular_frequency_rad_s(), 0.0);
    }
}

#[test]
fn offset_modes_tend_to_the_axis_results() {
    // Continuity check (hand calculation, common practice): as r0 → 0 the general modes
    // approach the classical r0 = 0 ones above.
    let deg = 40.0_f32;
    let axis = ride(0.0, 6.0, Suspension::Chain, Gravity::STANDARD);
    let s0 = axis.steady_state_at_angle(Angle::from_deg(deg)).unwrap();
    let SwingModes::Chain { fast: fast0, .. } = axis.swing_modes(&s0) else {
        panic!()
    };
    let near = ride(1e-4, 6.0, Suspension::Chain, Gravity::STANDARD);
    let s = near.steady_state_at_angle(Angle::from_deg(deg)).unwrap();
    let SwingModes::Chain { slow, fast } = near.swing_modes(&s) else {
        panic!()
    };
    assert_rel(
        fast.angular_frequency_rad_s(),
        fast0.angular_frequency_rad_s(),
        1e-4,
        "fast",
    );
    assert!(slow.angular_frequency_rad_s() < 0.01 * fast.angular_frequency_rad_s());
}

#[test]
fn no_panic_and_named_errors_on_bad_input() {
    let r = ride(2.0, 5.0, Suspension::Chain, Gravity::STANDARD);
    for bad in [f32::NAN, f32::INFINITY, f32::NEG_INFINITY] {
        assert_eq!(
            r.speed_for_angle(Angle::from_rad(bad)),
            Err(ParamError::NonFinite("angle"))
        );
        assert_eq!(
            r.angle_for_speed(AngularSpeed::from_rad_per_s(bad)),
            Err(ParamError::NonFinite("speed"))
        );
        assert_eq!(r.angle_from_rise(bad), Err(ParamError::NonFinite("rise_m")));
    }
    assert_eq!(
        r.speed_for_angle(Angle::from_deg(-5.0)),
        Err(ParamError::Negative("angle"))
    );
    assert_eq!(
        r.speed_for_angle(Angle::from_deg(120.0)),
        Err(ParamError::OutOfRange("angle"))
    );
    // Zero is a valid speed and a valid angle.
    assert_eq!(r.angle_for_speed(AngularSpeed::ZERO).unwrap(), Angle::ZERO);
    assert_eq!(r.speed_for_angle(Angle::ZERO).unwrap(), AngularSpeed::ZERO);
}
