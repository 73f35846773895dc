//! The speed ceiling at worst-case geometry against the f64 reference.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use proptest::prelude::*;
use swingdrive::interlock::{CeilingSource, ROUND_DOWN_ULPS};
use swingdrive::ramp::Reverse;
use swingdrive::reference::steady::Ride;
use swingdrive::{SafetyConfig, SafetyParams};

/// Demo data (invented ride); the geometry fields are replaced per case.
fn config(r0: f32, l: f32, g: f32, angle_deg: f32, load: Option<f32>) -> SafetyConfig {
    SafetyConfig {
        certified_angle_deg: angle_deg,
        max_load_factor: load,
        mechanical_max_rad_s: 100.0,
        hub_offset_max_m: r0,
        length_max_m: l,
        gravity_min_mps2: g,
        speed_margin_rad_s: 0.0,
        max_acceleration_rad_s2: 0.1,
        max_deceleration_rad_s2: 0.1,
        max_jerk_rad_s3: 0.1,
        overspeed_tolerance_rad_s: 0.05,
        following_tolerance_rad_s: 0.05,
        channel_tolerance_rad_s: 0.05,
        sensor_max_rad_s: 1000.0,
        standstill_rad_s: 1.0e-3,
        tick_s: 0.001,
        overrun_tick_s: 0.002,
        stop_time_margin_s: 1.0,
        brake_delay_s: 10.0,
        debounce_ticks: 3,
        stale_ticks: 3,
        standstill_ticks: 10,
        reverse: Reverse::Forbidden,
        second_channel: false,
        angle_sensor: false,
    }
}

fn reference(r0: f32, l: f32, g: f32) -> Ride {
    Ride {
        hub_offset_m: f64::from(r0),
        length_m: f64::from(l),
        gravity_mps2: f64::from(g),
        chain: true,
    }
}

proptest! {
    #[test]
    fn the_ceiling_lies_just_below_the_reference(
        r0 in 0.0f32..20.0,
        l in 0.5f32..20.0,
        g in 9.7f32..9.9,
        angle_deg in 5.0f32..75.0,
        load in proptest::option::of(1.05f32..3.0),
    ) {
        let p = SafetyParams::new(config(r0, l, g, angle_deg, load)).unwrap();
        let s = p.ceiling();
        let ride = reference(r0, l, g);
        let exact_angle = ride.speed_for_angle(f64::from(angle_deg).to_radians());
        // The f32 evaluation is within 8 ulps (the crate's rounding budget is
        // ROUND_DOWN_ULPS = 16; hand calculation, common practice).
        let rel = (f64::from(s.angle_limit_rad_s()) - exact_angle).abs() / exact_angle;
        prop_assert!(rel <= 8.0 * f64::from(f32::EPSILON), "angle limit off by {rel}");
        let mut exact = exact_angle;
        if let Some(n) = load {
            let phi_n = (1.0 / f64::from(n)).acos();
            let exact_load = ride.speed_for_angle(phi_n);
            let got = f64::from(s.load_factor_limit_rad_s().unwrap());
            prop_assert!((got - exact_load).abs() / exact_load <= 8.0 * f64::from(f32::EPSILON));
            exact = exact.min(exact_load);
        }
        let ceiling = f64::from(s.ceiling_rad_s());
        prop_assert!(ceiling < exact, "ceiling {ceiling} not below {exact}");
        prop_assert!((exact - ceiling) / exact <= f64::from(ROUND_DOWN_ULPS + 8) * f64::from(f32::EPSILON));
        // At the ceiling, no geometry inside the band swings past the
        // certified angle (corners and the middle of the band).
        for (fr, fl, gg) in [(1.0, 1.0, g), (0.5, 1.0, g), (1.0, 0.5, g), (0.0, 0.9, 9.9), (0.7, 0.7, 9.8)] {
            let inside = reference(r0 * fr, l * fl, gg.max(g));
            let phi = inside.angle_for_speed(ceiling);
            prop_assert!(phi <= f64::from(angle_deg).to_radians() + 1e-12);
        }
    }
}

#[test]
fn the_source_follows_the_lowest_limit() {
    // Demo data: r0 3 m, L 5 m, 30°; reference speed from the f64 closed form.
    let mut c = config(3.0, 5.0, 9.8, 30.0, None);
    let exact = reference(3.0, 5.0, 9.8).speed_for_angle(30f64.to_radians());
    let p = SafetyParams::new(c).unwrap();
    assert_eq!(p.ceiling().source(), CeilingSource::CertifiedAngle);
    assert!(f64::from(p.ceiling().ceiling_rad_s()) < exact);
    c.mechanical_max_rad_s = (exact * 0.9) as f32;
    let p = SafetyParams::new(c).unwrap();
    assert_eq!(p.ceiling().source(), CeilingSource::Mechanical);
}
