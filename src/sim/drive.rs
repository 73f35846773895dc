//! A simple model of a real shaft drive, for what-if scenarios.
//!
//! With no drive model the shaft follows the commanded profile exactly. A
//! real drive does not:
//!
//! * its speed loop lags: `dω/dt = (ω_cmd − ω) / T_lag` (first order);
//! * its torque is limited: `|dω/dt| ≤ a_max`;
//! * when the run permit drops the drive lets go and the top coasts down
//!   against friction: `dω/dt = −sign(ω) (a_c + b |ω|)` until it stops
//!   (Coulomb friction `a_c` and viscous friction `b`, both per unit inertia).

use crate::error::ParamError;

use super::check_f64;

/// Largest accepted speed-loop lag, s.
pub const MAX_LAG_S: f64 = 60.0;
/// Largest accepted acceleration limit or friction deceleration, rad/s².
pub const MAX_ACCEL_RAD_S2: f64 = 100.0;
/// Largest accepted viscous friction rate, 1/s.
pub const MAX_VISCOUS_PER_S: f64 = 10.0;

/// Drive parameters, validated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DriveModel {
    lag_s: f64,
    accel_limit_rad_s2: f64,
    coast_friction_rad_s2: f64,
    coast_viscous_per_s: f64,
}

impl DriveModel {
    /// * `lag_s`: time constant of the speed loop, s, in (0, 60].
    /// * `accel_limit_rad_s2`: largest |dω/dt| the drive's torque can give,
    ///   rad/s², in (0, 100].
    /// * `coast_friction_rad_s2`: Coulomb friction deceleration while
    ///   coasting, rad/s², in [0, 100].
    /// * `coast_viscous_per_s`: viscous friction rate while coasting, 1/s, in [0, 10].
    ///
    /// # Errors
    /// [`ParamError`] naming the parameter as above.
    pub fn new(
        lag_s: f64,
        accel_limit_rad_s2: f64,
        coast_friction_rad_s2: f64,
        coast_viscous_per_s: f64,
    ) -> Result<Self, ParamError> {
        Ok(Self {
            lag_s: check_f64("lag_s", lag_s, 0.0, MAX_LAG_S, false)?,
            accel_limit_rad_s2: check_f64(
                "accel_limit_rad_s2",
                accel_limit_rad_s2,
                0.0,
                MAX_ACCEL_RAD_S2,
                false,
            )?,
            coast_friction_rad_s2: check_f64(
                "coast_friction_rad_s2",
                coast_friction_rad_s2,
                0.0,
                MAX_ACCEL_RAD_S2,
                true,
            )?,
            coast_viscous_per_s: check_f64(
                "coast_viscous_per_s",
                coast_viscous_per_s,
                0.0,
                MAX_VISCOUS_PER_S,
                true,
            )?,
        })
    }

    /// Speed-loop time constant, s.
    #[must_use]
    pub const fn lag_s(&self) -> f64 {
        self.lag_s
    }

    /// Acceleration (torque) limit, rad/s².
    #[must_use]
    pub const fn accel_limit_rad_s2(&self) -> f64 {
        self.accel_limit_rad_s2
    }

    /// Coulomb friction deceleration while coasting, rad/s².
    #[must_use]
    pub const fn coast_friction_rad_s2(&self) -> f64 {
        self.coast_friction_rad_s2
    }

    /// Viscous friction rate while coasting, 1/s.
    #[must_use]
    pub const fn coast_viscous_per_s(&self) -> f64 {
        self.coast_viscous_per_s
    }

    /// Shaft acceleration while the drive follows `command_rad_s` from
    /// `speed_rad_s`: the lagged demand, clamped to the torque limit.
    #[must_use]
    pub fn following_accel(&self, command_rad_s: f64, speed_rad_s: f64) -> f64 {
        ((command_rad_s - speed_rad_s) / self.lag_s)
            .clamp(-self.accel_limit_rad_s2, self.accel_limit_rad_s2)
    }

    /// Time from the permit drop at `speed_rad_s` until the top stops, s;
    /// `None` without friction (it never stops).
    #[must_use]
    pub fn coast_stop_time_s(&self, speed_rad_s: f64) -> Option<f64> {
        let w = speed_rad_s.abs();
        let (a, b) = (self.coast_friction_rad_s2, self.coast_viscous_per_s);
        if w == 0.0 {
            Some(0.0)
        } else if b > 0.0 {
            // ω(t) = (ω0 + a/b) e^(−bt) − a/b reaches 0 at t = ln(1 + b ω0 / a) / b;
            // without Coulomb friction (a = 0) only asymptotically.
            (a > 0.0).then(|| (b * w / a).ln_1p() / b)
        } else if a > 0.0 {
            Some(w / a)
        } else {
            None
        }
    }

    /// Shaft speed and acceleration `elapsed_s` after the permit dropped at
    /// `speed_rad_s` (closed form of the coast-down equation).
    #[must_use]
    pub fn coast(&self, speed_rad_s: f64, elapsed_s: f64) -> (f64, f64) {
        let sign = speed_rad_s.signum();
        let w0 = speed_rad_s.abs();
        let (a, b) = (self.coast_friction_rad_s2, self.coast_viscous_per_s);
        let t = elapsed_s.max(0.0);
        if self
            .coast_stop_time_s(speed_rad_s)
            .is_some_and(|stop| t >= stop)
        {
            return (0.0, 0.0);
        }
        let w = if b > 0.0 {
            (w0 + a / b) * (-b * t).exp() - a / b
        } else {
            w0 - a * t
        };
        let w = w.max(0.0);
        (sign * w, -sign * (a + b * w))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coast_down_closed_form() {
        // Hand calculation, common practice: pure Coulomb friction stops a
        // shaft at 1.2 rad/s with 0.04 rad/s² in 30 s, linearly.
        let d = DriveModel::new(0.5, 0.2, 0.04, 0.0).unwrap();
        assert_eq!(d.coast_stop_time_s(1.2), Some(30.0));
        let (w, a) = d.coast(1.2, 10.0);
        assert!((w - 0.8).abs() < 1e-12 && (a + 0.04).abs() < 1e-15);
        assert_eq!(d.coast(1.2, 31.0), (0.0, 0.0));
        // With viscous friction the stop time is ln(1 + b ω0 / a) / b.
        let d = DriveModel::new(0.5, 0.2, 0.04, 0.05).unwrap();
        let stop = d.coast_stop_time_s(1.2).unwrap();
        assert!((stop - (1.0 + 0.05 * 1.2 / 0.04_f64).ln() / 0.05).abs() < 1e-12);
        assert!(d.coast(1.2, stop - 1e-9).0.abs() < 1e-9);
        // Reverse rotation coasts towards zero from below.
        let (w, a) = d.coast(-1.2, 1.0);
        assert!(w < 0.0 && a > 0.0);
        assert_eq!(
            DriveModel::new(0.5, 0.2, 0.0, 0.0)
                .unwrap()
                .coast_stop_time_s(1.0),
            None
        );
    }

    #[test]
    fn following_is_lagged_and_limited() {
        let d = DriveModel::new(2.0, 0.1, 0.0, 0.0).unwrap();
        assert!((d.following_accel(1.1, 1.0) - 0.05).abs() < 1e-12);
        assert_eq!(d.following_accel(3.0, 1.0), 0.1);
        assert_eq!(d.following_accel(-3.0, 1.0), -0.1);
    }

    #[test]
    fn bad_drive_parameters_are_refused_by_name() {
        assert_eq!(
            DriveModel::new(0.0, 0.1, 0.0, 0.0),
            Err(ParamError::NotPositive("lag_s"))
        );
        assert_eq!(
            DriveModel::new(1.0, f64::INFINITY, 0.0, 0.0),
            Err(ParamError::NonFinite("accel_limit_rad_s2"))
        );
        assert_eq!(
            DriveModel::new(1.0, 0.1, -0.01, 0.0),
            Err(ParamError::Negative("coast_friction_rad_s2"))
        );
        assert_eq!(
            DriveModel::new(1.0, 0.1, 0.0, 11.0),
            Err(ParamError::OutOfRange("coast_viscous_per_s"))
        );
    }
}
