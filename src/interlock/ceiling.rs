//! The speed ceiling: the highest shaft speed the interlock lets the ramp
//! command, from the certified angle, the load-factor limit and the
//! mechanical limit at the worst case of the geometry tolerance band.
//!
//! The steady speed for an angle, ω² = g sin φ / (cos φ (r0 + L sin φ)),
//! falls as r0 or L grow and rises with g; so the worst case (lowest speed
//! for the certified angle) is the largest hub offset, the longest effective
//! length and the lowest gravity of the band.

use crate::error::ParamError;
use crate::geometry::{RideGeometry, Suspension};
use crate::gravity::Gravity;
use crate::units::Angle;

use super::params::SafetyConfig;

/// f32 units in the last place taken off the ceiling, so that it lies below
/// the exact value whatever the rounding of the f32 evaluation (which the
/// tests hold within 8 ulps of the f64 reference).
pub const ROUND_DOWN_ULPS: u32 = 16;

/// Which limit sets the ceiling.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum CeilingSource {
    /// The certified swing angle.
    CertifiedAngle,
    /// The rider load-factor limit.
    LoadFactor,
    /// The mechanical maximum shaft speed.
    Mechanical,
}

/// The speed ceiling and the limits it came from, rad/s.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SpeedCeiling {
    angle_limit_rad_s: f32,
    load_factor_limit_rad_s: Option<f32>,
    mechanical_rad_s: f32,
    source: CeilingSource,
    ceiling_rad_s: f32,
}

/// The largest f32 at most `x - ulps` units in the last place (x > 0).
fn round_down(x: f32, ulps: u32) -> f32 {
    f32::from_bits(x.to_bits().saturating_sub(ulps))
}

impl SpeedCeiling {
    /// Computes the ceiling for a parameter set whose single values have
    /// already been range-checked (see `SafetyParams::new`).
    ///
    /// # Errors
    /// [`ParamError`] naming `speed_margin_rad_s` when the margin leaves no
    /// speed, or a geometry field when it is refused.
    pub(crate) fn at_worst_case(c: &SafetyConfig) -> Result<Self, ParamError> {
        let gravity = Gravity::new(c.gravity_min_mps2)
            .map_err(|_| ParamError::OutOfRange("gravity_min_mps2"))?;
        // Chain or rod does not change the steady angle.
        let worst = RideGeometry::new(
            c.hub_offset_max_m,
            c.length_max_m,
            Suspension::Chain,
            gravity,
        )?;
        let angle_limit_rad_s = worst
            .speed_for_angle(Angle::from_deg(c.certified_angle_deg))
            .map_err(|_| ParamError::OutOfRange("certified_angle_deg"))?
            .rad_per_s();
        let load_factor_limit_rad_s = match c.max_load_factor {
            // n = 1/cos φ; once, at construction.
            Some(n) => Some(
                worst
                    .speed_for_load_factor(n)
                    .map_err(|_| ParamError::OutOfRange("max_load_factor"))?
                    .rad_per_s(),
            ),
            None => None,
        };
        let mut lowest = (angle_limit_rad_s, CeilingSource::CertifiedAngle);
        if let Some(v) = load_factor_limit_rad_s {
            if v < lowest.0 {
                lowest = (v, CeilingSource::LoadFactor);
            }
        }
        if c.mechanical_max_rad_s < lowest.0 {
            lowest = (c.mechanical_max_rad_s, CeilingSource::Mechanical);
        }
        let below = lowest.0 - c.speed_margin_rad_s;
        if below.is_nan() || below <= 0.0 {
            return Err(ParamError::OutOfRange("speed_margin_rad_s"));
        }
        let ceiling_rad_s = round_down(below, ROUND_DOWN_ULPS);
        if ceiling_rad_s <= 0.0 {
            return Err(ParamError::OutOfRange("speed_margin_rad_s"));
        }
        Ok(Self {
            angle_limit_rad_s,
            load_factor_limit_rad_s,
            mechanical_rad_s: c.mechanical_max_rad_s,
            source: lowest.1,
            ceiling_rad_s,
        })
    }

    /// The ceiling: the lowest limit less the margin, rounded down, rad/s.
    #[must_use]
    pub const fn ceiling_rad_s(&self) -> f32 {
        self.ceiling_rad_s
    }

    /// Steady speed of the certified angle at worst-case geometry, rad/s.
    #[must_use]
    pub const fn angle_limit_rad_s(&self) -> f32 {
        self.angle_limit_rad_s
    }

    /// Steady speed of the load-factor limit at worst-case geometry, rad/s.
    #[must_use]
    pub const fn load_factor_limit_rad_s(&self) -> Option<f32> {
        self.load_factor_limit_rad_s
    }

    /// The mechanical maximum shaft speed, rad/s.
    #[must_use]
    pub const fn mechanical_rad_s(&self) -> f32 {
        self.mechanical_rad_s
    }

    /// Which limit is the lowest.
    #[must_use]
    pub const fn source(&self) -> CeilingSource {
        self.source
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::interlock::params::tests::demo;
    use crate::interlock::SafetyParams;

    #[test]
    fn the_lowest_limit_sets_the_ceiling() {
        let mut c = demo();
        c.max_load_factor = None;
        let p = SafetyParams::new(c).unwrap();
        let s = p.ceiling();
        assert_eq!(s.source(), CeilingSource::CertifiedAngle);
        assert!(s.ceiling_rad_s() < s.angle_limit_rad_s() - c.speed_margin_rad_s);
        // 1/cos 36.87° = 1.25: the load factor limit is below the 40° limit.
        c.max_load_factor = Some(1.25);
        let p = SafetyParams::new(c).unwrap();
        assert_eq!(p.ceiling().source(), CeilingSource::LoadFactor);
        c.mechanical_max_rad_s = 0.5;
        let p = SafetyParams::new(c).unwrap();
        assert_eq!(p.ceiling().source(), CeilingSource::Mechanical);
        assert_eq!(
            p.ceiling().ceiling_rad_s(),
            round_down(0.5 - 0.02, ROUND_DOWN_ULPS)
        );
    }

    #[test]
    fn a_margin_that_leaves_nothing_is_refused() {
        let mut c = demo();
        c.mechanical_max_rad_s = 0.5;
        c.speed_margin_rad_s = 0.5;
        assert_eq!(
            SafetyParams::new(c),
            Err(ParamError::OutOfRange("speed_margin_rad_s"))
        );
    }
}
