//! Gravitational acceleration: standard gravity, or local normal gravity from
//! latitude and height with the WGS 84 formula.
//!
//! Effective length and swing angle both depend on g; using local gravity
//! instead of standard changes a steady angle by up to about 0.15 % of g, which
//! matters only near the certified angle where the speed–angle curve is steep.

use core::fmt;

use crate::error::{check_range, ParamError};

/// Standard gravity, 9.80665 m/s² exactly (3rd CGPM, 1901).
pub const STANDARD_GRAVITY_MPS2: f32 = 9.806_65;

/// WGS 84 constants (NIMA TR8350.2, 3rd ed., 2000, tables 3.1–3.4), with
/// the published digits kept so they can be compared with the source.
#[allow(clippy::excessive_precision)]
mod wgs84 {
    /// Normal gravity at the equator, m/s².
    pub const GAMMA_EQUATOR: f32 = 9.780_325_335_9;
    /// Somigliana constant k.
    pub const K: f32 = 0.001_931_852_652_41;
    /// First eccentricity squared e².
    pub const E2: f32 = 0.006_694_379_990_13;
    /// Semi-major axis a, m.
    pub const A: f32 = 6_378_137.0;
    /// Flattening f.
    pub const F: f32 = 1.0 / 298.257_223_563;
    /// m = ω²a²b/GM.
    pub const M: f32 = 0.003_449_786_506_83;
}

/// Gravitational acceleration in m/s², validated to lie where it can on Earth.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Gravity {
    mps2: f32,
}

impl Gravity {
    /// Standard gravity (3rd CGPM, 1901).
    pub const STANDARD: Self = Self {
        mps2: STANDARD_GRAVITY_MPS2,
    };

    /// Lowest accepted value, m/s² (below the WGS 84 equator value at 10 km height).
    pub const MIN_MPS2: f32 = 9.7;
    /// Highest accepted value, m/s² (above the WGS 84 pole value).
    pub const MAX_MPS2: f32 = 9.9;
    /// Lowest accepted height for [`Gravity::wgs84`], m.
    pub const MIN_HEIGHT_M: f32 = -1_000.0;
    /// Highest accepted height for [`Gravity::wgs84`], m.
    pub const MAX_HEIGHT_M: f32 = 10_000.0;

    /// A measured or looked-up local value in [`Gravity::MIN_MPS2`, `Gravity::MAX_MPS2`].
    ///
    /// # Errors
    /// [`ParamError`] naming `gravity_mps2`.
    pub fn new(mps2: f32) -> Result<Self, ParamError> {
        check_range("gravity_mps2", mps2, Self::MIN_MPS2, Self::MAX_MPS2).map(|mps2| Self { mps2 })
    }

    /// WGS 84 normal gravity at geodetic latitude `latitude_deg` (−90..90) and
    /// ellipsoidal height `height_m` (−1 km..10 km): the Somigliana closed
    /// form with the second-order height correction (NIMA TR8350.2, eqs. 4-1
    /// and 4-3).
    ///
    /// # Errors
    /// [`ParamError`] naming `latitude_deg` or `height_m`.
    pub fn wgs84(latitude_deg: f32, height_m: f32) -> Result<Self, ParamError> {
        use wgs84::{A, E2, F, GAMMA_EQUATOR, K, M};
        let lat = check_range("latitude_deg", latitude_deg, -90.0, 90.0)?.to_radians();
        let h = check_range("height_m", height_m, Self::MIN_HEIGHT_M, Self::MAX_HEIGHT_M)?;
        let s2 = libm::sinf(lat) * libm::sinf(lat);
        let gamma = GAMMA_EQUATOR * (1.0 + K * s2) / crate::math::sqrt(1.0 - E2 * s2);
        let correction = 1.0 - (2.0 / A) * (1.0 + F + M - 2.0 * F * s2) * h + 3.0 * h * h / (A * A);
        Ok(Self {
            mps2: gamma * correction,
        })
    }

    /// In m/s².
    #[must_use]
    pub const fn mps2(self) -> f32 {
        self.mps2
    }
}

impl Default for Gravity {
    fn default() -> Self {
        Self::STANDARD
    }
}

impl fmt::Display for Gravity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} m/s²", self.mps2)
    }
}

#[cfg(feature = "defmt")]
impl defmt::Format for Gravity {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(f, "{=f32} m/s2", self.mps2);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f32, b: f32, abs: f32) -> bool {
        (a - b).abs() <= abs
    }

    #[test]
    fn standard_gravity_is_exact() {
        // 3rd CGPM (1901): 9.80665 m/s², exact by definition.
        assert_eq!(Gravity::STANDARD.mps2(), 9.806_65);
        assert_eq!(Gravity::default(), Gravity::STANDARD);
    }

    #[test]
    fn wgs84_normal_gravity_at_sea_level() {
        // NIMA TR8350.2 (2000), table 3.4: equator 9.7803253359, pole 9.8321849378 m/s².
        assert!(close(
            Gravity::wgs84(0.0, 0.0).unwrap().mps2(),
            9.780_325,
            2e-6
        ));
        assert!(close(
            Gravity::wgs84(90.0, 0.0).unwrap().mps2(),
            9.832_185,
            2e-6
        ));
        assert!(close(
            Gravity::wgs84(-90.0, 0.0).unwrap().mps2(),
            9.832_185,
            2e-6
        ));
        // 45° at sea level ≈ 9.806198 m/s² (same formula, evaluated in f64 by hand).
        assert!(close(
            Gravity::wgs84(45.0, 0.0).unwrap().mps2(),
            9.806_198,
            2e-6
        ));
    }

    #[test]
    fn wgs84_height_correction() {
        // Free-air gradient ≈ 3.086e-6 s⁻² (hand calculation, common practice: 2γ/a):
        // 1000 m up loses about 3.08 mm/s².
        let drop = Gravity::wgs84(45.0, 0.0).unwrap().mps2()
            - Gravity::wgs84(45.0, 1000.0).unwrap().mps2();
        assert!(close(drop, 3.08e-3, 3e-5), "drop {drop}");
    }

    #[test]
    fn bad_gravity_is_refused_by_name() {
        assert_eq!(
            Gravity::new(98.1),
            Err(ParamError::OutOfRange("gravity_mps2"))
        );
        assert_eq!(
            Gravity::new(f32::NAN),
            Err(ParamError::NonFinite("gravity_mps2"))
        );
        assert_eq!(
            Gravity::new(-9.8),
            Err(ParamError::Negative("gravity_mps2"))
        );
        assert_eq!(
            Gravity::wgs84(91.0, 0.0),
            Err(ParamError::OutOfRange("latitude_deg"))
        );
        assert_eq!(
            Gravity::wgs84(10.0, f32::INFINITY),
            Err(ParamError::NonFinite("height_m"))
        );
        assert_eq!(
            Gravity::wgs84(10.0, 20_000.0),
            Err(ParamError::OutOfRange("height_m"))
        );
    }
}
