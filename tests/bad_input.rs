//! Any f32 bit pattern — NaN, ±∞, negative, subnormal, huge — fed to the
//! public API gives a value or a named error, never a panic, and never a
//! non-finite result from a function that accepted its input.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use proptest::prelude::*;
use swingdrive::commissioning::{
    angle_from_tension_ratio, length_from_steady_angle, length_from_swing_period,
};
use swingdrive::{
    Angle, AngularSpeed, DriveScale, GearRatio, Gravity, RideGeometry, SeatModel, SeatState,
    Suspension,
};

fn any_f32() -> impl Strategy<Value = f32> {
    prop_oneof![
        any::<u32>().prop_map(f32::from_bits),
        Just(f32::NAN),
        Just(f32::INFINITY),
        Just(f32::NEG_INFINITY),
        Just(0.0_f32),
        Just(-0.0_f32),
        -100.0_f32..100.0,
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn geometry_and_steady_state(r0 in any_f32(), l in any_f32(), g in any_f32(), x in any_f32(), chain: bool) {
        let suspension = if chain { Suspension::Chain } else { Suspension::Rod };
        let gravity = Gravity::new(g).unwrap_or(Gravity::STANDARD);
        if let Ok(ride) = RideGeometry::new(r0, l, suspension, gravity) {
            if let Ok(w) = ride.speed_for_angle(Angle::from_rad(x)) {
                prop_assert!(w.rad_per_s().is_finite() && w.rad_per_s() >= 0.0);
            }
            if let Ok(s) = ride.steady_state_at_speed(AngularSpeed::from_rad_per_s(x)) {
                prop_assert!(s.angle.rad().is_finite() && s.angle.rad() >= 0.0 && s.angle.rad() < core::f32::consts::FRAC_PI_2);
                prop_assert!(s.load_factor.is_finite() && s.load_factor >= 1.0);
                let modes = ride.swing_modes(&s);
                prop_assert!(!modes.slowest().angular_frequency_rad_s().is_nan());
            }
            if let Ok(a) = ride.angle_from_rise(x) {
                prop_assert!(a.rad().is_finite());
            }
            if let Ok(model) = SeatModel::new(&ride, x) {
                let state = SeatState { radial_rad: x, radial_rate: g, tangential_rad: r0, tangential_rate: l };
                if let Some(next) = model.step(&state, x, g, 0.01) {
                    prop_assert!(next.radial_rad.is_finite());
                }
            }
        }
    }

    #[test]
    fn units_gravity_and_commissioning(a in any_f32(), b in any_f32(), c in any_f32()) {
        if let Ok(g) = Gravity::wgs84(a, b) {
            prop_assert!(g.mps2() > 9.7 && g.mps2() < 9.9);
        }
        if let Ok(gear) = GearRatio::new(a) {
            if let Ok(scale) = DriveScale::new(gear, AngularSpeed::from_rad_per_s(b)) {
                let r = scale.reference(AngularSpeed::from_rad_per_s(c));
                prop_assert!((0.0..=1.0).contains(&r.fraction));
                prop_assert!(scale.shaft_speed(c).rad_per_s().is_finite());
            }
        }
        if let Ok(angle) = angle_from_tension_ratio(a) {
            prop_assert!(angle.rad().is_finite());
        }
        if let Ok(l) = length_from_steady_angle(a, Angle::from_rad(b), AngularSpeed::from_rad_per_s(c), Gravity::STANDARD) {
            prop_assert!(l.is_finite() && l > 0.0);
        }
        if let Ok(l) = length_from_swing_period(a, Angle::from_rad(b), Gravity::STANDARD) {
            prop_assert!(l.is_finite() && l > 0.0);
        }
    }
}
