//! Steady-state swing: the angle at which a seat settles at constant shaft
//! speed, and the quantities that follow from it.
//!
//! In steady rotation at shaft speed ω the link settles at angle φ from
//! vertical where the resultant of gravity and the centripetal demand lies
//! along the link:
//!
//! ```text
//! tan φ = ω² (r0 + L sin φ) / g   ⇔   ω² = g sin φ / (cos φ (r0 + L sin φ))
//! ```
//!
//! The angle does not depend on the rider's mass. ω²(φ) is strictly increasing
//! on (0, 90°) (its derivative has the sign of `r0 + L sin³φ`, see
//! docs/physics.md), so each speed has exactly one angle; with r0 = 0 every
//! speed up to √(g/L) leaves the seats hanging straight down (the bifurcation of
//! the conical pendulum).

use crate::error::{check_range, ParamError};
use crate::geometry::RideGeometry;
use crate::units::{Angle, AngularSpeed};

/// Largest shaft speed accepted by [`RideGeometry::steady_state_at_speed`], rad/s
/// (about 950 rpm: far above any ride, low enough that ω² never overflows).
pub const MAX_SHAFT_SPEED_RAD_S: f32 = 100.0;

/// Newton iterations the angle solver tries before it falls back to bisection.
const NEWTON_ITERATIONS: u32 = 8;

/// Largest number of iterations the angle solver can take: 8 Newton steps,
/// then at most 31 bisections (see [`RideGeometry::steady_state_at_speed`]).
pub const ANGLE_SOLVER_MAX_ITERATIONS: u32 = NEWTON_ITERATIONS + 31;

/// Everything about one steady operating point.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub struct SteadyState {
    /// Swing angle from vertical.
    pub angle: Angle,
    /// Shaft speed (magnitude; the angle is the same in reverse).
    pub speed: AngularSpeed,
    /// Distance of the seat's centre of mass from the shaft axis, m.
    pub seat_radius_m: f32,
    /// Height of the seat's centre of mass below its pivot, m.
    pub drop_below_pivot_m: f32,
    /// How far the seat has risen from where it hangs at rest, m.
    pub rise_m: f32,
    /// Load factor felt by the rider, 1/cos φ (1 at rest).
    pub load_factor: f32,
    /// Link tension per unit mass of seat plus rider, m/s² (= g/cos φ).
    pub tension_per_mass_mps2: f32,
    /// Local sensitivity dφ/dω of the angle to the speed.
    pub sensitivity: Sensitivity,
}

/// Local slope dφ/dω of the steady angle against shaft speed.
///
/// Large values mean a touchy operating point: a small speed error moves the
/// seats a lot. Infinite exactly at the r0 = 0 bifurcation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sensitivity {
    rad_per_rad_s: f32,
}

impl Sensitivity {
    /// In radians of swing per rad/s of shaft speed.
    #[must_use]
    pub const fn rad_per_rad_s(self) -> f32 {
        self.rad_per_rad_s
    }

    /// In degrees of swing per rpm of shaft speed (the practitioner's unit).
    ///
    /// 1 rpm = 2π/60 rad/s and 1 rad = 180/π °, so the factor is exactly 6.
    #[must_use]
    pub fn deg_per_rpm(self) -> f32 {
        self.rad_per_rad_s * 6.0
    }
}

#[cfg(feature = "defmt")]
impl defmt::Format for Sensitivity {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(f, "{=f32} deg/rpm", self.deg_per_rpm());
    }
}

/// Upper end (exclusive) of the angle range, rad: the f32 just below π/2.
const MAX_ANGLE_RAD: f32 = core::f32::consts::FRAC_PI_2;

impl RideGeometry {
    /// Shaft speed at which the seats settle at `angle`, in closed form.
    ///
    /// `angle` must be finite and in [0°, 90°); 90° would need infinite speed.
    /// With r0 = 0 an angle of 0 is kept by every speed up to √(g/L); the
    /// result is that upper end, the speed above which the seats start to rise.
    ///
    /// # Errors
    /// [`ParamError`] naming `angle`.
    ///
    /// ```
    /// use swingdrive::{Angle, Gravity, RideGeometry, Suspension};
    /// // Hand calculation, common practice: r0 = 3 m, L = 5 m, φ = 30°, g = 9.80 m/s² → ω = 1.01426 rad/s.
    /// let ride = RideGeometry::new(3.0, 5.0, Suspension::Chain, Gravity::new(9.80)?)?;
    /// let speed = ride.speed_for_angle(Angle::from_deg(30.0))?;
    /// assert!((speed.rad_per_s() - 1.01426).abs() < 1e-5);
    /// # Ok::<(), swingdrive::ParamError>(())
    /// ```
    pub fn speed_for_angle(&self, angle: Angle) -> Result<AngularSpeed, ParamError> {
        let phi = checked_angle("angle", angle)?;
        Ok(AngularSpeed::from_rad_per_s(crate::math::sqrt(
            self.speed_squared_at(phi),
        )))
    }

    /// Shaft speed at which the steady load factor (link tension over the
    /// seat's weight, n = 1/cos φ) is `load_factor`; n = 1 gives the speed
    /// below which the seats hang straight (see [`RideGeometry::speed_for_angle`]).
    ///
    /// Closed form from cos φ = 1/n and sin φ = √((1 − cos φ)(1 + cos φ)): no
    /// inverse cosine, so that a parameter check on the target needs no
    /// `libm::acosf`.
    ///
    /// # Errors
    /// [`ParamError`] naming `load_factor` when not finite or below 1.
    pub fn speed_for_load_factor(&self, load_factor: f32) -> Result<AngularSpeed, ParamError> {
        let n = check_range("load_factor", load_factor, 1.0, f32::MAX)?;
        let cos = 1.0 / n;
        let sin = crate::math::sqrt((1.0 - cos) * (1.0 + cos));
        Ok(AngularSpeed::from_rad_per_s(crate::math::sqrt(
            self.speed_squared_from(sin, cos),
        )))
    }

    /// The full steady state at `angle` (see [`RideGeometry::speed_for_angle`]).
    ///
    /// # Errors
    /// [`ParamError`] naming `angle`.
    pub fn steady_state_at_angle(&self, angle: Angle) -> Result<SteadyState, ParamError> {
        let phi = checked_angle("angle", angle)?;
        let w2 = self.speed_squared_at(phi);
        Ok(self.state(phi, w2))
    }

    /// The steady state at shaft speed `speed` (its magnitude: reverse rotation
    /// gives the same angle).
    ///
    /// For r0 = 0 the closed form cos φ = g/(ω²L) is used (0 below √(g/L)).
    /// Otherwise the angle is the one root of
    /// `F(φ) = ω²(r0 + L sin φ) cos φ − g sin φ` inside the bracket
    /// `[atan(ω²r0/g), atan(ω²(r0+L)/g)]` (the seat radius lies between r0 and
    /// r0 + L), tightened by one fixed-point step from each end. Up to 8
    /// Newton steps, each narrowing the bracket (a step that would leave it is
    /// replaced by a bisection); if they have not converged, bisection in the ordering of f32 bit patterns finishes the
    /// job. The bracket lies in [0, π/2) and so holds fewer than 2³⁰ floats;
    /// each bisection halves that count, so at most 30 (+1) are needed and the
    /// worst case is [`ANGLE_SOLVER_MAX_ITERATIONS`] = 39 iterations. Typical
    /// solves take 2–5 Newton steps; near the r0 → 0 bifurcation, where the
    /// root is nearly double and Newton slows, bisection takes over.
    ///
    /// # Errors
    /// [`ParamError`] naming `speed` when not finite or above
    /// [`MAX_SHAFT_SPEED_RAD_S`].
    pub fn steady_state_at_speed(&self, speed: AngularSpeed) -> Result<SteadyState, ParamError> {
        let w = check_range(
            "speed",
            libm::fabsf(speed.rad_per_s()),
            0.0,
            MAX_SHAFT_SPEED_RAD_S,
        )?;
        let w2 = w * w;
        Ok(self.state(self.solve_angle(w2).0, w2))
    }

    /// Swing angle at shaft speed `speed` (see [`RideGeometry::steady_state_at_speed`]).
    ///
    /// # Errors
    /// [`ParamError`] naming `speed`.
    pub fn angle_for_speed(&self, speed: AngularSpeed) -> Result<Angle, ParamError> {
        self.steady_state_at_speed(speed).map(|s| s.angle)
    }

    /// ω² at angle φ (φ checked to lie in [0, π/2)).
    fn speed_squared_at(&self, phi: f32) -> f32 {
        let (s, c) = crate::math::sin_cos(phi);
        self.speed_squared_from(s, c)
    }

    /// ω² at the angle with sine `s` and cosine `c` (s ≥ 0, c > 0).
    fn speed_squared_from(&self, s: f32, c: f32) -> f32 {
        let g = self.gravity().mps2();
        let r0 = self.hub_offset_m();
        let l = self.length_m();
        if s > 0.0 {
            // Written with r0/s so that r0 = 0 needs no special case.
            g / (c * (r0 / s + l))
        } else if r0 > 0.0 {
            0.0
        } else {
            g / l
        }
    }

    /// Angle (rad) for ω², and the number of solver iterations used.
    pub(crate) fn solve_angle(&self, w2: f32) -> (f32, u32) {
        let g = self.gravity().mps2();
        let r0 = self.hub_offset_m();
        let l = self.length_m();
        if r0 == 0.0 {
            let x = g / (w2 * l);
            return (if x >= 1.0 { 0.0 } else { libm::acosf(x) }, 0);
        }
        if w2 == 0.0 {
            return (0.0, 0);
        }
        let residual = |phi: f32| {
            let (s, c) = crate::math::sin_cos(phi);
            (w2 * (r0 + l * s) * c - g * s, s, c)
        };
        // The residual is a difference of two terms of size g sin φ; below a
        // few ulps of that it is rounding noise and further steps only jitter.
        let noise = |s: f32| 4.0 * f32::EPSILON * g * s;
        // φ ↦ atan(ω²(r0 + L sin φ)/g) is increasing and has the root as its
        // fixed point, so one step from a bound gives a tighter bound.
        let step = |phi: f32| libm::atanf(w2 * (r0 + l * crate::math::sin_cos(phi).0) / g);
        let mut lo = step(0.0);
        let mut hi = step(core::f32::consts::FRAC_PI_2).max(lo);
        lo = step(lo).min(hi);
        hi = step(hi).max(lo);
        let mut x = 0.5 * (lo + hi);
        let mut iterations = 0;
        // Phase 1: Newton steps kept inside the bracket.
        while iterations < NEWTON_ITERATIONS {
            iterations += 1;
            let (f, s, c) = residual(x);
            if libm::fabsf(f) <= noise(s) {
                return (x, iterations);
            }
            if f > 0.0 {
                lo = x;
            } else {
                hi = x;
            }
            let df = w2 * (l * c * c - (r0 + l * s) * s) - g * c;
            let newton = x - f / df;
            if !(newton > lo && newton < hi) {
                // Outside the bracket (or NaN from df = 0): bisect instead.
                x = float_midpoint(lo, hi);
                continue;
            }
            if libm::fabsf(newton - x) <= 2.0 * f32::EPSILON * x {
                return (newton, iterations);
            }
            x = newton;
        }
        // Phase 2: bisection in float order; the bracket holds fewer than 2³⁰
        // floats, so this ends within 30 iterations.
        while iterations < ANGLE_SOLVER_MAX_ITERATIONS && float_span(lo, hi) > 1 {
            iterations += 1;
            let mid = float_midpoint(lo, hi);
            if residual(mid).0 > 0.0 {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        (float_midpoint(lo, hi), iterations)
    }

    fn state(&self, phi: f32, w2: f32) -> SteadyState {
        let (s, c) = crate::math::sin_cos(phi);
        let g = self.gravity().mps2();
        let r0 = self.hub_offset_m();
        let l = self.length_m();
        let w = crate::math::sqrt(w2);
        // dφ/dω = 2ω (r0 + L s)² c² / (g (r0 + L s³)), from differentiating
        // ω² = g tan φ / (r0 + L sin φ) (docs/physics.md).
        let denominator = g * (r0 + l * s * s * s);
        let sensitivity = if denominator > 0.0 {
            2.0 * w * (r0 + l * s) * (r0 + l * s) * c * c / denominator
        } else if w2 * l < g {
            0.0 // r0 = 0, hanging below the bifurcation speed
        } else {
            f32::INFINITY
        };
        SteadyState {
            angle: Angle::from_rad(phi),
            speed: AngularSpeed::from_rad_per_s(w),
            seat_radius_m: r0 + l * s,
            drop_below_pivot_m: l * c,
            rise_m: l * (1.0 - c),
            load_factor: 1.0 / c,
            tension_per_mass_mps2: g / c,
            sensitivity: Sensitivity {
                rad_per_rad_s: sensitivity,
            },
        }
    }
}

/// Checks an angle argument: finite, in [0, π/2); returns radians.
pub(crate) fn checked_angle(name: &'static str, angle: Angle) -> Result<f32, ParamError> {
    let phi = check_range(name, angle.rad(), 0.0, MAX_ANGLE_RAD)?;
    if phi >= MAX_ANGLE_RAD {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(phi)
    }
}

/// Number of f32 values between two non-negative floats `lo <= hi`.
fn float_span(lo: f32, hi: f32) -> u32 {
    hi.to_bits().saturating_sub(lo.to_bits())
}

/// The float halfway between two non-negative floats in bit-pattern order:
/// each bisection halves the number of floats left in the bracket.
fn float_midpoint(lo: f32, hi: f32) -> f32 {
    let (a, b) = (lo.to_bits(), hi.to_bits());
    f32::from_bits(a + (b.saturating_sub(a)) / 2)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{Gravity, Suspension};

    fn ride(r0: f32, l: f32) -> RideGeometry {
        RideGeometry::new(r0, l, Suspension::Chain, Gravity::STANDARD).unwrap()
    }

    #[test]
    fn round_trip_and_iteration_bound() {
        for r0 in [0.001_f32, 0.5, 3.0, 15.0] {
            for l in [1.0_f32, 5.0, 20.0] {
                for deg in [0.5_f32, 10.0, 30.0, 60.0, 85.0] {
                    let ride = ride(r0, l);
                    let w = ride.speed_for_angle(Angle::from_deg(deg)).unwrap();
                    let (phi, it) = ride.solve_angle(w.rad_per_s() * w.rad_per_s());
                    assert!(it <= ANGLE_SOLVER_MAX_ITERATIONS);
                    if r0 >= 0.5 {
                        assert!(
                            it <= NEWTON_ITERATIONS,
                            "r0 {r0} L {l} {deg}°: {it} iterations"
                        );
                    }
                    let back = Angle::from_rad(phi).deg();
                    assert!(
                        (back - deg).abs() < 2e-3 * deg.max(1.0),
                        "{r0} {l} {deg} -> {back}"
                    );
                }
            }
        }
    }

    #[test]
    fn bad_angles_and_speeds_are_refused_by_name() {
        let r = ride(2.0, 5.0);
        assert_eq!(
            r.speed_for_angle(Angle::from_deg(90.0)),
            Err(ParamError::OutOfRange("angle"))
        );
        assert_eq!(
            r.speed_for_angle(Angle::from_rad(MAX_ANGLE_RAD)),
            Err(ParamError::OutOfRange("angle"))
        );
        assert_eq!(
            r.speed_for_angle(Angle::from_deg(-1.0)),
            Err(ParamError::Negative("angle"))
        );
        assert_eq!(
            r.speed_for_angle(Angle::from_rad(f32::NAN)),
            Err(ParamError::NonFinite("angle"))
        );
        assert_eq!(
            r.angle_for_speed(AngularSpeed::from_rad_per_s(f32::NAN)),
            Err(ParamError::NonFinite("speed"))
        );
        assert_eq!(
            r.angle_for_speed(AngularSpeed::from_rad_per_s(f32::INFINITY)),
            Err(ParamError::NonFinite("speed"))
        );
        assert_eq!(
            r.angle_for_speed(AngularSpeed::from_rad_per_s(1e3)),
            Err(ParamError::OutOfRange("speed"))
        );
        assert!(r
            .speed_for_angle(Angle::from_deg(89.999))
            .unwrap()
            .is_finite());
    }

    #[test]
    fn reverse_rotation_gives_the_same_angle() {
        let r = ride(2.0, 5.0);
        let fwd = r.angle_for_speed(AngularSpeed::from_rpm(9.0)).unwrap();
        let rev = r.angle_for_speed(AngularSpeed::from_rpm(-9.0)).unwrap();
        assert_eq!(fwd, rev);
    }

    #[test]
    fn bisection_helpers_halve_the_float_count() {
        let (lo, hi) = (0.0_f32, 1.5_f32);
        let m = float_midpoint(lo, hi);
        assert!(m > lo && m < hi);
        let full = float_span(lo, hi);
        assert!(float_span(lo, m) <= full / 2 + 1 && float_span(m, hi) <= full / 2 + 1);
        assert!(full < 1 << 30);
    }
}
