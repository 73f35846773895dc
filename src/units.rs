//! Units that cannot be mixed up: shaft speed, angles, gearing and the drive's
//! speed reference.
//!
//! Speeds are stored in rad/s and angles in radians (`f32`); every other unit is
//! an explicit conversion. Fields are private so a value in rpm can never be
//! passed where rad/s is meant.

use core::f32::consts::PI;
use core::fmt;

use crate::error::{check_positive, ParamError};

/// Seconds per minute, for rpm conversions.
const SECONDS_PER_MINUTE: f32 = 60.0;
/// One revolution in radians.
const TURN_RAD: f32 = 2.0 * PI;
/// Degrees per radian.
const DEG_PER_RAD: f32 = 180.0 / PI;

/// An angular speed (shaft speed, motor speed or angular frequency), stored in rad/s.
///
/// Negative values mean reverse rotation.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd, Default)]
pub struct AngularSpeed {
    rad_per_s: f32,
}

impl AngularSpeed {
    /// Standstill.
    pub const ZERO: Self = Self { rad_per_s: 0.0 };

    /// From rad/s.
    #[must_use]
    pub const fn from_rad_per_s(rad_per_s: f32) -> Self {
        Self { rad_per_s }
    }

    /// From revolutions per minute.
    #[must_use]
    pub fn from_rpm(rpm: f32) -> Self {
        Self {
            rad_per_s: rpm * TURN_RAD / SECONDS_PER_MINUTE,
        }
    }

    /// From degrees per second.
    #[must_use]
    pub fn from_deg_per_s(deg_per_s: f32) -> Self {
        Self {
            rad_per_s: deg_per_s / DEG_PER_RAD,
        }
    }

    /// In rad/s.
    #[must_use]
    pub const fn rad_per_s(self) -> f32 {
        self.rad_per_s
    }

    /// In revolutions per minute.
    #[must_use]
    pub fn rpm(self) -> f32 {
        self.rad_per_s * SECONDS_PER_MINUTE / TURN_RAD
    }

    /// In degrees per second.
    #[must_use]
    pub fn deg_per_s(self) -> f32 {
        self.rad_per_s * DEG_PER_RAD
    }

    /// Time for one revolution in seconds; infinite at standstill.
    #[must_use]
    pub fn period_s(self) -> f32 {
        TURN_RAD / libm::fabsf(self.rad_per_s)
    }

    /// The magnitude (same speed, forward direction).
    #[must_use]
    pub fn abs(self) -> Self {
        Self {
            rad_per_s: libm::fabsf(self.rad_per_s),
        }
    }

    /// `true` unless NaN or infinite.
    #[must_use]
    pub fn is_finite(self) -> bool {
        self.rad_per_s.is_finite()
    }
}

impl fmt::Display for AngularSpeed {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} rad/s", self.rad_per_s)
    }
}

#[cfg(feature = "defmt")]
impl defmt::Format for AngularSpeed {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(f, "{=f32} rad/s", self.rad_per_s);
    }
}

/// A plane angle, stored in radians.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd, Default)]
pub struct Angle {
    rad: f32,
}

impl Angle {
    /// Zero angle (a seat hanging straight down).
    pub const ZERO: Self = Self { rad: 0.0 };

    /// From radians.
    #[must_use]
    pub const fn from_rad(rad: f32) -> Self {
        Self { rad }
    }

    /// From degrees.
    #[must_use]
    pub fn from_deg(deg: f32) -> Self {
        Self {
            rad: deg / DEG_PER_RAD,
        }
    }

    /// In radians.
    #[must_use]
    pub const fn rad(self) -> f32 {
        self.rad
    }

    /// In degrees.
    #[must_use]
    pub fn deg(self) -> f32 {
        self.rad * DEG_PER_RAD
    }
}

impl fmt::Display for Angle {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}°", self.deg())
    }
}

#[cfg(feature = "defmt")]
impl defmt::Format for Angle {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(f, "{=f32} deg", self.deg());
    }
}

/// Gear ratio between motor and shaft: motor speed = ratio × shaft speed.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GearRatio {
    motor_per_shaft: f32,
}

impl GearRatio {
    /// Direct drive (motor on the shaft).
    pub const DIRECT: Self = Self {
        motor_per_shaft: 1.0,
    };

    /// Largest accepted ratio; beyond it a typo is more likely than a gearbox.
    pub const MAX: f32 = 10_000.0;

    /// Smallest accepted ratio (the shaft 1,000 times faster than the motor);
    /// it keeps shaft speeds computed from motor speeds finite (a subnormal
    /// ratio would turn them into infinity).
    pub const MIN: f32 = 1.0e-3;

    /// A ratio in [[`GearRatio::MIN`], [`GearRatio::MAX`]] motor turns per
    /// shaft turn.
    ///
    /// # Errors
    /// [`ParamError`] naming `gear_ratio` when not finite, not positive, or
    /// outside that range.
    pub fn new(motor_per_shaft: f32) -> Result<Self, ParamError> {
        let r = check_positive("gear_ratio", motor_per_shaft, Self::MAX)?;
        if r < Self::MIN {
            return Err(ParamError::OutOfRange("gear_ratio"));
        }
        Ok(Self { motor_per_shaft: r })
    }

    /// Motor turns per shaft turn.
    #[must_use]
    pub const fn motor_per_shaft(self) -> f32 {
        self.motor_per_shaft
    }

    /// Motor speed for a shaft speed.
    #[must_use]
    pub fn motor_speed(self, shaft: AngularSpeed) -> AngularSpeed {
        AngularSpeed::from_rad_per_s(shaft.rad_per_s() * self.motor_per_shaft)
    }

    /// Shaft speed for a motor speed.
    #[must_use]
    pub fn shaft_speed(self, motor: AngularSpeed) -> AngularSpeed {
        AngularSpeed::from_rad_per_s(motor.rad_per_s() / self.motor_per_shaft)
    }
}

/// Scaling of the drive's speed reference: a fraction in 0..1 of a configured
/// full-scale *motor* speed (an analog 0–10 V input or a fieldbus word).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DriveScale {
    gear: GearRatio,
    full_scale_motor_rad_s: f32,
}

/// A speed reference fraction, and whether it had to be saturated to fit 0..1.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DriveReference {
    /// Fraction of full scale, always in [0, 1].
    pub fraction: f32,
    /// `true` when the requested speed was outside [0, full scale] (or NaN) and
    /// the fraction was limited; the caller decides whether that is a fault.
    pub saturated: bool,
}

impl DriveScale {
    /// Largest accepted full-scale motor speed, rad/s (about 95,000 rpm).
    pub const MAX_FULL_SCALE_RAD_S: f32 = 10_000.0;

    /// A scale with `full_scale_motor` at reference fraction 1.
    ///
    /// # Errors
    /// [`ParamError`] naming `full_scale_motor_speed` when not finite, not
    /// positive or above [`DriveScale::MAX_FULL_SCALE_RAD_S`].
    pub fn new(gear: GearRatio, full_scale_motor: AngularSpeed) -> Result<Self, ParamError> {
        let full_scale_motor_rad_s = check_positive(
            "full_scale_motor_speed",
            full_scale_motor.rad_per_s(),
            Self::MAX_FULL_SCALE_RAD_S,
        )?;
        Ok(Self {
            gear,
            full_scale_motor_rad_s,
        })
    }

    /// The gear ratio in use.
    #[must_use]
    pub const fn gear(self) -> GearRatio {
        self.gear
    }

    /// The shaft speed that corresponds to reference fraction 1.
    #[must_use]
    pub fn full_scale_shaft_speed(self) -> AngularSpeed {
        self.gear
            .shaft_speed(AngularSpeed::from_rad_per_s(self.full_scale_motor_rad_s))
    }

    /// Reference fraction for a shaft speed (forward only; a reverse speed
    /// saturates at 0 and is flagged). NaN gives fraction 0, flagged.
    #[must_use]
    pub fn reference(self, shaft: AngularSpeed) -> DriveReference {
        let raw = self.gear.motor_speed(shaft).rad_per_s() / self.full_scale_motor_rad_s;
        if raw.is_nan() || raw < 0.0 {
            DriveReference {
                fraction: 0.0,
                saturated: true,
            }
        } else if raw > 1.0 {
            DriveReference {
                fraction: 1.0,
                saturated: true,
            }
        } else {
            DriveReference {
                fraction: raw,
                saturated: false,
            }
        }
    }

    /// Shaft speed for a reference fraction, clamped to [0, 1] (NaN gives zero).
    #[must_use]
    pub fn shaft_speed(self, fraction: f32) -> AngularSpeed {
        let f = if fraction.is_nan() {
            0.0
        } else {
            fraction.clamp(0.0, 1.0)
        };
        self.gear.shaft_speed(AngularSpeed::from_rad_per_s(
            f * self.full_scale_motor_rad_s,
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn close(a: f32, b: f32, rel: f32) -> bool {
        (a - b).abs() <= rel * b.abs().max(1e-6)
    }

    #[test]
    fn rpm_and_degrees_round_trip() {
        // Hand calculation, common practice: 60 rpm = 1 rev/s = 2π rad/s = 360 °/s.
        let s = AngularSpeed::from_rpm(60.0);
        assert!(close(s.rad_per_s(), TURN_RAD, 1e-6));
        assert!(close(s.deg_per_s(), 360.0, 1e-6));
        assert!(close(s.period_s(), 1.0, 1e-6));
        assert!(close(AngularSpeed::from_deg_per_s(360.0).rpm(), 60.0, 1e-6));
        assert!(close(Angle::from_deg(180.0).rad(), PI, 1e-6));
        assert!(close(Angle::from_rad(PI / 2.0).deg(), 90.0, 1e-6));
        assert!(AngularSpeed::ZERO.period_s().is_infinite());
    }

    #[test]
    fn gear_and_drive_reference() {
        // Hand calculation, common practice: 10 rpm shaft through 1:150 is 1500 rpm motor,
        // which is half of a 3000 rpm full scale.
        let gear = GearRatio::new(150.0).unwrap();
        let scale = DriveScale::new(gear, AngularSpeed::from_rpm(3000.0)).unwrap();
        let shaft = AngularSpeed::from_rpm(10.0);
        assert!(close(gear.motor_speed(shaft).rpm(), 1500.0, 1e-5));
        let r = scale.reference(shaft);
        assert!(close(r.fraction, 0.5, 1e-5) && !r.saturated);
        assert!(close(scale.shaft_speed(0.5).rpm(), 10.0, 1e-5));
        assert!(close(scale.full_scale_shaft_speed().rpm(), 20.0, 1e-5));
        assert_eq!(
            scale.reference(AngularSpeed::from_rpm(25.0)),
            DriveReference {
                fraction: 1.0,
                saturated: true
            }
        );
        assert_eq!(
            scale.reference(AngularSpeed::from_rpm(-1.0)),
            DriveReference {
                fraction: 0.0,
                saturated: true
            }
        );
        assert_eq!(
            scale.reference(AngularSpeed::from_rad_per_s(f32::NAN)),
            DriveReference {
                fraction: 0.0,
                saturated: true
            }
        );
        assert_eq!(scale.shaft_speed(f32::NAN), AngularSpeed::ZERO);
        assert!(close(scale.shaft_speed(7.0).rpm(), 20.0, 1e-5));
    }

    #[test]
    fn bad_scaling_is_refused_by_name() {
        assert_eq!(
            GearRatio::new(0.0),
            Err(ParamError::NotPositive("gear_ratio"))
        );
        assert_eq!(
            GearRatio::new(f32::NAN),
            Err(ParamError::NonFinite("gear_ratio"))
        );
        assert_eq!(
            DriveScale::new(GearRatio::DIRECT, AngularSpeed::from_rad_per_s(-3.0)),
            Err(ParamError::NotPositive("full_scale_motor_speed"))
        );
    }
}
