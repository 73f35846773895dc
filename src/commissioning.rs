//! Commissioning and test-bench helpers: angles from what can be measured, and
//! the effective length identified from measurements.
//!
//! The centre of mass of seat plus rider cannot be measured directly, and every
//! other number in this crate depends on it; these helpers turn a measured
//! steady angle or a measured swing period into an effective length.

use core::f32::consts::PI;

use crate::error::{check_positive, check_range, ParamError};
use crate::geometry::RideGeometry;
use crate::gravity::Gravity;
use crate::steady::checked_angle;
use crate::units::{Angle, AngularSpeed};

/// Largest swing amplitude accepted for a period measurement, degrees: the
/// amplitude correction series is used well inside its accurate range.
pub const MAX_PERIOD_AMPLITUDE_DEG: f32 = 30.0;

/// Largest tension-to-weight ratio accepted (a load factor of 10 is far beyond
/// any ride and suggests a wrong unit).
pub const MAX_TENSION_RATIO: f32 = 10.0;

impl RideGeometry {
    /// Swing angle from the measured rise of the seat above where it hangs at
    /// rest: cos φ = 1 − rise / L.
    ///
    /// # Errors
    /// [`ParamError`] naming `rise_m` when not finite, negative or not below L.
    pub fn angle_from_rise(&self, rise_m: f32) -> Result<Angle, ParamError> {
        let l = self.length_m();
        let rise = check_range("rise_m", rise_m, 0.0, l)?;
        if rise >= l {
            return Err(ParamError::OutOfRange("rise_m"));
        }
        Ok(Angle::from_rad(libm::acosf(1.0 - rise / l)))
    }
}

/// Swing angle from a measured link tension divided by the weight of seat plus
/// rider (the load factor): cos φ = 1 / ratio. Independent of the geometry.
///
/// # Errors
/// [`ParamError`] naming `tension_ratio` when not finite or outside [1, 10].
pub fn angle_from_tension_ratio(tension_ratio: f32) -> Result<Angle, ParamError> {
    let k = check_range("tension_ratio", tension_ratio, 1.0, MAX_TENSION_RATIO)?;
    Ok(Angle::from_rad(libm::acosf(1.0 / k)))
}

/// Effective length from a steady angle measured at a known shaft speed:
/// L = (g tan φ / ω² − r0) / sin φ.
///
/// The identification is well conditioned only at clearly non-zero angles
/// (the error in L grows like 1/sin φ); measure at the working angle.
///
/// # Errors
/// [`ParamError`] naming `hub_offset_m`, `measured_angle` (not in (0°, 90°)) or
/// `speed` (not finite or zero); `length_m` when the pair implies a length
/// outside (0, [`RideGeometry::MAX_LENGTH_M`]] — the angle is then too small
/// for that speed and offset.
pub fn length_from_steady_angle(
    hub_offset_m: f32,
    measured_angle: Angle,
    speed: AngularSpeed,
    gravity: Gravity,
) -> Result<f32, ParamError> {
    let r0 = check_range(
        "hub_offset_m",
        hub_offset_m,
        0.0,
        RideGeometry::MAX_HUB_OFFSET_M,
    )?;
    let phi = checked_angle("measured_angle", measured_angle)?;
    if phi == 0.0 {
        return Err(ParamError::OutOfRange("measured_angle"));
    }
    let w = check_positive(
        "speed",
        libm::fabsf(speed.rad_per_s()),
        crate::steady::MAX_SHAFT_SPEED_RAD_S,
    )?;
    let (s, c) = crate::math::sin_cos(phi);
    let length = (gravity.mps2() * s / (c * w * w) - r0) / s;
    check_positive("length_m", length, RideGeometry::MAX_LENGTH_M)
}

/// Effective length from the measured period of a small free swing at rest,
/// with the amplitude at which it was measured.
///
/// Point-mass pendulum: T = 2π √(L/g) · (1 + θ²/16 + 11θ⁴/3072), the standard
/// series for the finite-amplitude period (e.g. Nelson & Olsson, Am. J. Phys.
/// 54, 112 (1986)). For a real seat this gives the *equivalent simple-pendulum
/// length*, which is what governs the swing dynamics.
///
/// # Errors
/// [`ParamError`] naming `period_s` (not finite, not positive, or implying a
/// length above the maximum) or `amplitude` (outside [0°, 30°]).
pub fn length_from_swing_period(
    period_s: f32,
    amplitude: Angle,
    gravity: Gravity,
) -> Result<f32, ParamError> {
    let period = check_positive("period_s", period_s, 60.0)?;
    let theta = check_range(
        "amplitude",
        amplitude.rad(),
        0.0,
        MAX_PERIOD_AMPLITUDE_DEG.to_radians(),
    )?;
    let t2 = theta * theta;
    let factor = 1.0 + t2 / 16.0 + 11.0 * t2 * t2 / 3072.0;
    let small_swing_period = period / factor;
    let length =
        gravity.mps2() * (small_swing_period / (2.0 * PI)) * (small_swing_period / (2.0 * PI));
    check_positive("period_s", length, RideGeometry::MAX_LENGTH_M)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::Suspension;

    #[test]
    fn rise_and_tension_give_the_steady_angle() {
        let ride = RideGeometry::new(3.0, 5.0, Suspension::Chain, Gravity::STANDARD).unwrap();
        let state = ride.steady_state_at_angle(Angle::from_deg(37.0)).unwrap();
        let from_rise = ride.angle_from_rise(state.rise_m).unwrap();
        assert!((from_rise.deg() - 37.0).abs() < 1e-3);
        let from_tension = angle_from_tension_ratio(state.load_factor).unwrap();
        assert!((from_tension.deg() - 37.0).abs() < 1e-3);
    }

    #[test]
    fn length_identified_from_angle_and_period() {
        let ride = RideGeometry::new(3.0, 5.0, Suspension::Chain, Gravity::STANDARD).unwrap();
        let state = ride.steady_state_at_angle(Angle::from_deg(40.0)).unwrap();
        let l = length_from_steady_angle(3.0, state.angle, state.speed, Gravity::STANDARD).unwrap();
        assert!((l - 5.0).abs() < 1e-4, "{l}");
        // Hand calculation, common practice: a seconds pendulum (T = 2 s) is g/π² ≈ 0.9936 m long.
        let l = length_from_swing_period(2.0, Angle::ZERO, Gravity::STANDARD).unwrap();
        assert!((l - 0.993_621).abs() < 1e-5, "{l}");
        // Exact large-amplitude period at 30°: T/T0 = 2K(sin 15°)/π = 1.017408 (complete elliptic
        // integral, standard result; Nelson & Olsson 1986); the series used is within 5e-6 of it.
        let l30 =
            length_from_swing_period(2.0 * 1.017_408, Angle::from_deg(30.0), Gravity::STANDARD)
                .unwrap();
        assert!((l30 - 0.993_621).abs() < 2e-4, "{l30}");
    }

    #[test]
    fn bad_measurements_are_refused_by_name() {
        let ride = RideGeometry::new(3.0, 5.0, Suspension::Chain, Gravity::STANDARD).unwrap();
        assert_eq!(
            ride.angle_from_rise(5.0),
            Err(ParamError::OutOfRange("rise_m"))
        );
        assert_eq!(
            ride.angle_from_rise(-0.1),
            Err(ParamError::Negative("rise_m"))
        );
        assert_eq!(
            angle_from_tension_ratio(0.9),
            Err(ParamError::OutOfRange("tension_ratio"))
        );
        assert_eq!(
            angle_from_tension_ratio(f32::NAN),
            Err(ParamError::NonFinite("tension_ratio"))
        );
        let g = Gravity::STANDARD;
        let w = AngularSpeed::from_rad_per_s(1.0);
        assert_eq!(
            length_from_steady_angle(3.0, Angle::ZERO, w, g),
            Err(ParamError::OutOfRange("measured_angle"))
        );
        assert_eq!(
            length_from_steady_angle(3.0, Angle::from_deg(30.0), AngularSpeed::ZERO, g),
            Err(ParamError::NotPositive("speed"))
        );
        // 5° at 1 rad/s with a 3 m offset would need a negative length.
        assert_eq!(
            length_from_steady_angle(3.0, Angle::from_deg(5.0), w, g),
            Err(ParamError::NotPositive("length_m"))
        );
        assert_eq!(
            length_from_swing_period(0.0, Angle::ZERO, g),
            Err(ParamError::NotPositive("period_s"))
        );
        assert_eq!(
            length_from_swing_period(2.0, Angle::from_deg(45.0), g),
            Err(ParamError::OutOfRange("amplitude"))
        );
    }
}
