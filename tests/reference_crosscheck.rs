//! The f32 target code against the independent f64 reference, over the whole
//! geometry space: r0 0–15 m, L 1–20 m, φ 0.5°–85°, both suspension kinds.
//!
//! Tolerances scale with the conditioning of each problem. The angle for a
//! given speed has condition number κ = (ω/φ)·dφ/dω, which is large near
//! r0 = 0 and at small angles (κ ≈ 2/φ² on the axis); an f32 solver can at best
//! give a relative angle error of a few ε·(1 + κ), ε = 2⁻²³.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use proptest::prelude::*;
use swingdrive::reference::steady::Ride;
use swingdrive::{Angle, AngularSpeed, Gravity, RideGeometry, Suspension, SwingModes};

const EPS: f64 = f32::EPSILON as f64;

fn pair(r0: f32, l: f32, chain: bool) -> (RideGeometry, Ride) {
    let suspension = if chain {
        Suspension::Chain
    } else {
        Suspension::Rod
    };
    let geometry = RideGeometry::new(r0, l, suspension, Gravity::STANDARD).unwrap();
    let reference = Ride {
        hub_offset_m: f64::from(r0),
        length_m: f64::from(l),
        gravity_mps2: f64::from(Gravity::STANDARD.mps2()),
        chain,
    };
    (geometry, reference)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(3000))]

    /// Closed-form speed: the f32 result is within 8 ε relative of the f64
    /// value at the same (f32-rounded) angle. The formula is a handful of
    /// well-conditioned operations (libm's f32 sin, cos, sqrt are within 1 ulp).
    #[test]
    fn speed_for_angle(r0 in 0.0_f32..15.0, l in 1.0_f32..20.0, deg in 0.5_f32..85.0, chain: bool) {
        let (g, r) = pair(r0, l, chain);
        let angle = Angle::from_deg(deg);
        let w32 = f64::from(g.speed_for_angle(angle).unwrap().rad_per_s());
        let w64 = r.speed_for_angle(f64::from(angle.rad()));
        prop_assert!(((w32 - w64) / w64).abs() <= 8.0 * EPS, "{w32} vs {w64}");
    }

    /// Angle from speed: |Δφ| ≤ 16 ε (φ + ω |dφ/dω|), i.e. 16 ε (1 + κ) relative.
    #[test]
    fn angle_for_speed(r0 in 0.0_f32..15.0, l in 1.0_f32..20.0, deg in 0.5_f32..85.0, chain: bool) {
        let (g, r) = pair(r0, l, chain);
        let w = r.speed_for_angle(deg.to_radians().into()) as f32;
        let s32 = g.steady_state_at_speed(AngularSpeed::from_rad_per_s(w)).unwrap();
        let phi64 = r.angle_for_speed(f64::from(w));
        let scale = phi64 + f64::from(w) * r.sensitivity(phi64).abs();
        let err = (f64::from(s32.angle.rad()) - phi64).abs();
        prop_assert!(err <= 16.0 * EPS * scale, "err {err:e}, allowed {:e}", 16.0 * EPS * scale);
        // The closed-form sensitivity against the reference's finite difference.
        let sens64 = r.sensitivity(phi64);
        let rel = (f64::from(s32.sensitivity.rad_per_rad_s()) - sens64).abs() / sens64;
        prop_assert!(rel <= 1e-3 + 64.0 * EPS * (1.0 + f64::from(w) * sens64 / phi64), "sensitivity rel {rel:e}");
    }

    /// Swing modes: the hand-derived f32 formulas against the reference's
    /// numerical Hessian and Coriolis coefficient at the same angle. Both
    /// frequencies within 2e-5 of the fast (or only) mode: f32 rounding of
    /// the stiffnesses and of the angle they are evaluated at (~10 ε ≈ 1e-6)
    /// plus the reference's five-point stencils (≲ 1e-8 relative).
    #[test]
    fn swing_modes(r0 in 0.0_f32..15.0, l in 1.0_f32..20.0, deg in 0.5_f32..85.0, chain: bool) {
        let (g, r) = pair(r0, l, chain);
        let state = g.steady_state_at_angle(Angle::from_deg(deg)).unwrap();
        let (low, high) = r.swing_modes(f64::from(state.angle.rad()));
        match (g.swing_modes(&state), high) {
            (SwingModes::Rod { radial }, None) => {
                let err = (f64::from(radial.angular_frequency_rad_s()) - low).abs();
                prop_assert!(err <= 2e-5 * low, "rod {err:e}");
            }
            (SwingModes::Chain { slow, fast }, Some(high)) => {
                let e_fast = (f64::from(fast.angular_frequency_rad_s()) - high).abs();
                let e_slow = (f64::from(slow.angular_frequency_rad_s()) - low).abs();
                prop_assert!(e_fast <= 2e-5 * high, "fast {e_fast:e}");
                prop_assert!(e_slow <= 2e-5 * high, "slow {e_slow:e}");
            }
            (m, h) => prop_assert!(false, "kinds differ: {m:?} {h:?}"),
        }
    }
}
