//! The ramp's limits, checked once, and whether the ride may run in reverse.

use crate::error::ParamError;

/// Acceleration, deceleration and jerk limits of the speed ramp, checked once.
///
/// "Acceleration" raises the speed's magnitude and "deceleration" lowers it, in
/// either direction of rotation: running in reverse, a positive rate of change of
/// speed is a deceleration. Which limit applies therefore depends on the signs of
/// both speed and acceleration (see [`RampLimits::bound_for`]).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RampLimits {
    accel: f32,
    decel: f32,
    jerk: f32,
    // Reciprocals, computed once so that planning multiplies instead of divides.
    inv_accel: f32,
    inv_decel: f32,
    inv_jerk: f32,
}

impl RampLimits {
    /// Smallest accepted acceleration or deceleration limit, rad/s².
    pub const MIN_ACCELERATION_RAD_S2: f32 = 1.0e-3;
    /// Largest accepted acceleration or deceleration limit, rad/s².
    pub const MAX_ACCELERATION_RAD_S2: f32 = 1.0e3;
    /// Smallest accepted jerk limit, rad/s³.
    pub const MIN_JERK_RAD_S3: f32 = 1.0e-3;
    /// Largest accepted jerk limit, rad/s³.
    pub const MAX_JERK_RAD_S3: f32 = 1.0e5;

    /// Checks and builds a limit set.
    ///
    /// * `max_acceleration_rad_s2`: largest rate at which the speed's magnitude
    ///   may rise, rad/s², in
    ///   \[[`MIN_ACCELERATION_RAD_S2`](Self::MIN_ACCELERATION_RAD_S2),
    ///   [`MAX_ACCELERATION_RAD_S2`](Self::MAX_ACCELERATION_RAD_S2)\].
    /// * `max_deceleration_rad_s2`: largest rate at which the speed's magnitude
    ///   may fall, rad/s², same range.
    /// * `max_jerk_rad_s3`: largest rate of change of acceleration, rad/s³, in
    ///   \[[`MIN_JERK_RAD_S3`](Self::MIN_JERK_RAD_S3),
    ///   [`MAX_JERK_RAD_S3`](Self::MAX_JERK_RAD_S3)\].
    ///
    /// The ranges keep every plan's durations and speeds finite in `f32`.
    ///
    /// # Errors
    /// [`ParamError`] naming `max_acceleration`, `max_deceleration` or `max_jerk`:
    /// `NonFinite`, `NotPositive` (zero or negative) or `OutOfRange`.
    ///
    /// ```
    /// use swingdrive::{ParamError, RampLimits};
    /// let limits = RampLimits::new(0.2, 0.3, 0.5)?;
    /// assert_eq!(limits.max_deceleration_rad_s2(), 0.3);
    /// assert_eq!(
    ///     RampLimits::new(0.2, f32::NAN, 0.5),
    ///     Err(ParamError::NonFinite("max_deceleration"))
    /// );
    /// # Ok::<(), ParamError>(())
    /// ```
    pub fn new(
        max_acceleration_rad_s2: f32,
        max_deceleration_rad_s2: f32,
        max_jerk_rad_s3: f32,
    ) -> Result<Self, ParamError> {
        let accel = check(
            "max_acceleration",
            max_acceleration_rad_s2,
            Self::MIN_ACCELERATION_RAD_S2,
            Self::MAX_ACCELERATION_RAD_S2,
        )?;
        let decel = check(
            "max_deceleration",
            max_deceleration_rad_s2,
            Self::MIN_ACCELERATION_RAD_S2,
            Self::MAX_ACCELERATION_RAD_S2,
        )?;
        let jerk = check(
            "max_jerk",
            max_jerk_rad_s3,
            Self::MIN_JERK_RAD_S3,
            Self::MAX_JERK_RAD_S3,
        )?;
        Ok(Self {
            accel,
            decel,
            jerk,
            inv_accel: 1.0 / accel,
            inv_decel: 1.0 / decel,
            inv_jerk: 1.0 / jerk,
        })
    }

    /// Largest rate at which the speed's magnitude may rise, rad/s².
    #[must_use]
    pub const fn max_acceleration_rad_s2(&self) -> f32 {
        self.accel
    }

    /// Largest rate at which the speed's magnitude may fall, rad/s².
    #[must_use]
    pub const fn max_deceleration_rad_s2(&self) -> f32 {
        self.decel
    }

    /// Largest rate of change of acceleration, rad/s³.
    #[must_use]
    pub const fn max_jerk_rad_s3(&self) -> f32 {
        self.jerk
    }

    /// `1 / max_acceleration`, `1 / max_deceleration`, `1 / max_jerk`.
    pub(crate) const fn reciprocals(&self) -> (f32, f32, f32) {
        (self.inv_accel, self.inv_decel, self.inv_jerk)
    }

    /// The magnitude limit that applies to `acceleration_rad_s2` at `speed_rad_s`.
    ///
    /// The acceleration limit when the two have the same sign (the magnitude of
    /// the speed rises) or when the speed is zero (any acceleration moves it away
    /// from zero); the deceleration limit when they have opposite signs.
    #[must_use]
    pub fn bound_for(&self, speed_rad_s: f32, acceleration_rad_s2: f32) -> f32 {
        let falling = (speed_rad_s > 0.0 && acceleration_rad_s2 < 0.0)
            || (speed_rad_s < 0.0 && acceleration_rad_s2 > 0.0);
        if falling {
            self.decel
        } else {
            self.accel
        }
    }
}

/// Finite, strictly positive and inside `[min, max]`.
fn check(name: &'static str, value: f32, min: f32, max: f32) -> Result<f32, ParamError> {
    if !value.is_finite() {
        Err(ParamError::NonFinite(name))
    } else if value <= 0.0 {
        Err(ParamError::NotPositive(name))
    } else if value < min || value > max {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(value)
    }
}

/// Whether the ramp may command reverse rotation (negative speeds).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Reverse {
    /// Speeds stay `>= 0`. A negative target is clamped to zero and the clamp is
    /// reported by [`SpeedRamp::set_target`](crate::ramp::SpeedRamp::set_target).
    Forbidden,
    /// Any speed in ±[`MAX_SPEED_RAD_S`](crate::ramp::MAX_SPEED_RAD_S); the ramp
    /// may pass through zero speed.
    Allowed,
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn limits_are_refused_by_name() {
        assert_eq!(
            RampLimits::new(0.0, 1.0, 1.0),
            Err(ParamError::NotPositive("max_acceleration"))
        );
        assert_eq!(
            RampLimits::new(1.0, -1.0, 1.0),
            Err(ParamError::NotPositive("max_deceleration"))
        );
        assert_eq!(
            RampLimits::new(1.0, 1.0, f32::INFINITY),
            Err(ParamError::NonFinite("max_jerk"))
        );
        assert_eq!(
            RampLimits::new(1.0, 1.0, 1.0e6),
            Err(ParamError::OutOfRange("max_jerk"))
        );
        assert_eq!(
            RampLimits::new(1.0e-4, 1.0, 1.0),
            Err(ParamError::OutOfRange("max_acceleration"))
        );
    }

    #[test]
    fn bound_follows_the_speed_magnitude() {
        let l = RampLimits::new(1.0, 2.0, 3.0).unwrap();
        assert_eq!(l.bound_for(5.0, 0.5), 1.0);
        assert_eq!(l.bound_for(5.0, -0.5), 2.0);
        assert_eq!(l.bound_for(-5.0, -0.5), 1.0);
        assert_eq!(l.bound_for(-5.0, 0.5), 2.0);
        assert_eq!(l.bound_for(0.0, -0.5), 1.0);
        assert_eq!(l.bound_for(0.0, 0.5), 1.0);
    }
}
