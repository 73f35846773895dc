//! Equations of motion of one seat, in the frame turning with the top.
//!
//! Axes of the turning frame: `x` radially outward through the seat's pivot,
//! `y` tangential in the direction of rotation (positive shaft speed), `z` up.
//! The pivot sits at `(r0, 0, 0)`; the seat (a point mass at the centre of
//! mass of seat plus rider) at `x = P + L n`, where `n` is the unit vector
//! from pivot to seat.
//!
//! # Why a unit vector and not two angles
//! Any pair of angles on a sphere has two singular points (where one angle
//! stops being defined). Polar angle and azimuth put one of them at the
//! vertical — where every seat starts; radial and tangential angles put them
//! at the link lying horizontal along the tangent. Instead the state is the
//! link direction `n` (3 components) and the link's angular velocity `ω`
//! (3 components, rad/s, turning frame):
//!
//! ```text
//! ṅ = ω × n                      ω̇ = (n × f) / L   (chain)
//!                                ω̇ = ((n × f) / L)·ŷ ŷ   (rod: hinge axis ŷ)
//! ```
//!
//! `f` is the applied acceleration per unit mass (gravity, centrifugal,
//! Coriolis, Euler and damping terms). The second equation is the angular
//! momentum balance about the pivot, in which the link force has no moment.
//! Both `|n| = 1` and `n·ω = 0` are first integrals of these equations
//! (d|n|²/dt = 2 n·(ω×n) = 0 and d(n·ω)/dt = (ω×n)·ω + n·(n×f)/L = 0), so the
//! formulation is regular at every direction — hanging, horizontal, even above
//! the pivot — and the constraint only drifts by the integration error; the
//! integrator projects back onto it at every breakpoint. The swing angles
//! reported to people are computed from `n` afterwards.

use crate::error::ParamError;
use crate::geometry::{RideGeometry, Suspension};
use crate::gravity::Gravity;
use crate::reference::steady::Ride;

use super::check_f64;

/// A vector in the turning frame (radial, tangential, up).
pub type Vec3 = [f64; 3];

/// Largest accepted linear damping rate, 1/s.
pub const MAX_DAMPING_PER_S: f64 = 10.0;

/// One seat: ride geometry in f64, suspension and optional linear damping.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeatDynamics {
    hub_offset_m: f64,
    length_m: f64,
    gravity_mps2: f64,
    suspension: Suspension,
    damping_per_s: f64,
}

/// Shaft speed and acceleration at one instant.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct ShaftMotion {
    /// Shaft speed ω, rad/s (positive: the `y` axis points along the motion).
    pub speed_rad_s: f64,
    /// Shaft acceleration α = dω/dt, rad/s².
    pub accel_rad_s2: f64,
}

/// Position and velocity of the seat: link direction and link angular
/// velocity, both in the turning frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LinkState {
    direction: Vec3,
    angular_velocity: Vec3,
}

/// What the link (and, for rods, the hinge) does on the seat at one instant.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LinkForce {
    /// Pull of the link towards the pivot per unit mass, m/s² (negative:
    /// the link pushes, which a chain cannot).
    pub tension_per_mass_mps2: f64,
    /// Force per unit mass across the link, m/s² (the hinge reaction of a
    /// rod; zero for a chain).
    pub transverse_per_mass_mps2: f64,
    /// Load factor felt by the rider: the non-gravitational force per unit
    /// mass over g (1 at rest, 1/cos φ in steady rotation).
    pub load_factor: f64,
    /// Link tension over the weight of seat plus rider (≤ 0: slack chain).
    pub tension_ratio: f64,
}

/// The seat's response to an instantaneous step of the shaft speed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SpeedStepResponse {
    /// The state just after the step.
    pub state: LinkState,
    /// Impulse per unit mass passed along the link, m/s, positive when the
    /// link pulls; a negative value would need a chain to push (slack).
    pub tension_impulse_mps: f64,
    /// Impulse per unit mass passed across the link by a rod's hinge, m/s.
    pub transverse_impulse_mps: f64,
}

/// Derivatives of the state.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeatRate {
    /// dn/dt, 1/s.
    pub direction: Vec3,
    /// dω/dt, rad/s².
    pub angular_velocity: Vec3,
}

impl SeatDynamics {
    /// A seat on a ride with the given geometry (f64 throughout).
    ///
    /// * `hub_offset_m`: shaft axis to pivot, m, in [0, 100].
    /// * `length_m`: pivot to centre of mass, m, in (0, 100].
    /// * `gravity_mps2`: in [9.7, 9.9] m/s² (see [`Gravity`]).
    ///
    /// Damping starts at zero; see [`SeatDynamics::with_damping`].
    ///
    /// # Errors
    /// [`ParamError`] naming `hub_offset_m`, `length_m` or `gravity_mps2`.
    pub fn new(
        hub_offset_m: f64,
        length_m: f64,
        suspension: Suspension,
        gravity_mps2: f64,
    ) -> Result<Self, ParamError> {
        Ok(Self {
            hub_offset_m: check_f64(
                "hub_offset_m",
                hub_offset_m,
                0.0,
                f64::from(RideGeometry::MAX_HUB_OFFSET_M),
                true,
            )?,
            length_m: check_f64(
                "length_m",
                length_m,
                0.0,
                f64::from(RideGeometry::MAX_LENGTH_M),
                false,
            )?,
            gravity_mps2: check_f64(
                "gravity_mps2",
                gravity_mps2,
                f64::from(Gravity::MIN_MPS2),
                f64::from(Gravity::MAX_MPS2),
                false,
            )?,
            suspension,
            damping_per_s: 0.0,
        })
    }

    /// The same seat as a validated f32 [`RideGeometry`] (values widened exactly).
    #[must_use]
    pub fn from_geometry(geometry: &RideGeometry) -> Self {
        Self {
            hub_offset_m: f64::from(geometry.hub_offset_m()),
            length_m: f64::from(geometry.length_m()),
            gravity_mps2: f64::from(geometry.gravity().mps2()),
            suspension: geometry.suspension(),
            damping_per_s: 0.0,
        }
    }

    /// The same seat with linear damping: a force per unit mass of
    /// `−damping_per_s · v_rel` against the seat's velocity relative to the
    /// top. Small swings then decay as `exp(−damping_per_s · t / 2)`.
    /// `damping_per_s` in [0, [`MAX_DAMPING_PER_S`]] 1/s.
    ///
    /// # Errors
    /// [`ParamError`] naming `damping_per_s`.
    pub fn with_damping(self, damping_per_s: f64) -> Result<Self, ParamError> {
        Ok(Self {
            damping_per_s: check_f64("damping_per_s", damping_per_s, 0.0, MAX_DAMPING_PER_S, true)?,
            ..self
        })
    }

    /// Shaft axis to pivot, m.
    #[must_use]
    pub const fn hub_offset_m(&self) -> f64 {
        self.hub_offset_m
    }

    /// Pivot to centre of mass, m.
    #[must_use]
    pub const fn length_m(&self) -> f64 {
        self.length_m
    }

    /// Gravity, m/s².
    #[must_use]
    pub const fn gravity_mps2(&self) -> f64 {
        self.gravity_mps2
    }

    /// Chain or rod.
    #[must_use]
    pub const fn suspension(&self) -> Suspension {
        self.suspension
    }

    /// Linear damping rate, 1/s.
    #[must_use]
    pub const fn damping_per_s(&self) -> f64 {
        self.damping_per_s
    }

    /// The f64 steady-state reference for this geometry.
    #[must_use]
    pub fn steady_reference(&self) -> Ride {
        Ride {
            hub_offset_m: self.hub_offset_m,
            length_m: self.length_m,
            gravity_mps2: self.gravity_mps2,
            chain: self.suspension == Suspension::Chain,
        }
    }

    /// Steady swing angle (rad) at shaft speed `speed_rad_s` (either sign).
    #[must_use]
    pub fn steady_angle_rad(&self, speed_rad_s: f64) -> f64 {
        self.steady_reference().angle_for_speed(speed_rad_s.abs())
    }

    /// The seat at rest relative to the top in steady rotation at
    /// `speed_rad_s`: swung out radially by the steady angle.
    #[must_use]
    pub fn steady_state(&self, speed_rad_s: f64) -> LinkState {
        LinkState::swung_out(self.steady_angle_rad(speed_rad_s))
    }

    /// Position of the seat relative to the shaft axis at the pivot's
    /// height, m (turning frame).
    #[must_use]
    pub fn seat_position_m(&self, state: &LinkState) -> Vec3 {
        let [nx, ny, nz] = state.direction;
        let l = self.length_m;
        [self.hub_offset_m + l * nx, l * ny, l * nz]
    }

    /// Velocity of the seat relative to the top, m/s (turning frame).
    #[must_use]
    pub fn seat_velocity_mps(&self, state: &LinkState) -> Vec3 {
        scale(
            cross(state.angular_velocity, state.direction),
            self.length_m,
        )
    }

    /// Applied acceleration per unit mass on the seat in the turning frame,
    /// m/s²: gravity, centrifugal, Coriolis, Euler and damping terms; every
    /// force except the link's.
    #[must_use]
    pub fn applied_acceleration(&self, state: &LinkState, shaft: ShaftMotion) -> Vec3 {
        let [x, y, _] = self.seat_position_m(state);
        let [vx, vy, vz] = self.seat_velocity_mps(state);
        let w = shaft.speed_rad_s;
        let a = shaft.accel_rad_s2;
        let c = self.damping_per_s;
        // −Ω×(Ω×x) = ω²(x, y, 0); −2Ω×v = 2ω(v_y, −v_x, 0); −Ω̇×x = α(y, −x, 0).
        [
            w * w * x + 2.0 * w * vy + a * y - c * vx,
            w * w * y - 2.0 * w * vx - a * x - c * vy,
            -self.gravity_mps2 - c * vz,
        ]
    }

    /// Time derivatives of the state.
    #[must_use]
    pub fn rate(&self, state: &LinkState, shaft: ShaftMotion) -> SeatRate {
        let f = self.applied_acceleration(state, shaft);
        let n = state.direction;
        let torque = scale(cross(n, f), 1.0 / self.length_m);
        let angular_acceleration = match self.suspension {
            Suspension::Chain => torque,
            // The hinge takes every moment except the one about its own axis.
            Suspension::Rod => [0.0, torque[1], 0.0],
        };
        SeatRate {
            direction: cross(state.angular_velocity, n),
            angular_velocity: angular_acceleration,
        }
    }

    /// Force of the link (and hinge) on the seat.
    #[must_use]
    pub fn link_force(&self, state: &LinkState, shaft: ShaftMotion) -> LinkForce {
        let f = self.applied_acceleration(state, shaft);
        let rate = self.rate(state, shaft);
        let n = state.direction;
        // Acceleration relative to the top: L n̈ with n̈ = ω̇×n + ω×ṅ.
        let n_ddot = add(
            cross(rate.angular_velocity, n),
            cross(state.angular_velocity, rate.direction),
        );
        let reaction = sub(scale(n_ddot, self.length_m), f);
        let tension = -dot(reaction, n);
        let transverse = norm(add(reaction, scale(n, tension)));
        let g = self.gravity_mps2;
        LinkForce {
            tension_per_mass_mps2: tension,
            transverse_per_mass_mps2: transverse,
            load_factor: norm(reaction) / g,
            tension_ratio: tension / g,
        }
    }

    /// Jacobi integral per unit mass, J²/kg: the energy in a frame turning at
    /// the constant speed `speed_rad_s`, `½|v_rel|² + g z − ½ ω² (x² + y²)`.
    /// Conserved when the speed is constant and there is no damping.
    #[must_use]
    pub fn jacobi_integral(&self, state: &LinkState, speed_rad_s: f64) -> f64 {
        let [x, y, z] = self.seat_position_m(state);
        let v = self.seat_velocity_mps(state);
        0.5 * dot(v, v) + self.gravity_mps2 * z - 0.5 * speed_rad_s * speed_rad_s * (x * x + y * y)
    }

    /// Response to an instantaneous change of shaft speed by `delta_rad_s`.
    ///
    /// At the step the turning frame jumps, so seen from it the seat's
    /// velocity jumps by `−Δω ẑ × x` unless the link passes an impulse. A
    /// chain passes impulse only along itself: the component of the jump
    /// across the chain stays, the component along it is cancelled. A rod's
    /// hinge also passes the tangential part: only the component about the
    /// hinge axis stays. The seat's position does not change.
    #[must_use]
    pub fn speed_step(&self, state: &LinkState, delta_rad_s: f64) -> SpeedStepResponse {
        let [x, y, _] = self.seat_position_m(state);
        let free_jump = [delta_rad_s * y, -delta_rad_s * x, 0.0];
        let n = state.direction;
        let spin = scale(cross(n, free_jump), 1.0 / self.length_m);
        let spin = match self.suspension {
            Suspension::Chain => spin,
            Suspension::Rod => [0.0, spin[1], 0.0],
        };
        let after = LinkState {
            direction: n,
            angular_velocity: add(state.angular_velocity, spin),
        };
        // What the link passed: the actual velocity jump minus the free one.
        let jump = sub(
            self.seat_velocity_mps(&after),
            self.seat_velocity_mps(state),
        );
        let impulse = sub(jump, free_jump);
        let along = dot(impulse, n);
        SpeedStepResponse {
            state: after,
            tension_impulse_mps: -along,
            transverse_impulse_mps: norm(sub(impulse, scale(n, along))),
        }
    }
}

impl LinkState {
    /// Hanging straight down, at rest relative to the top.
    pub const HANGING: Self = Self {
        direction: [0.0, 0.0, -1.0],
        angular_velocity: [0.0, 0.0, 0.0],
    };

    /// At rest relative to the top, swung out radially by `angle_rad` from
    /// vertical (the steady direction for that angle).
    #[must_use]
    pub fn swung_out(angle_rad: f64) -> Self {
        let (s, c) = angle_rad.sin_cos();
        Self {
            direction: [s, 0.0, -c],
            angular_velocity: [0.0; 3],
        }
    }

    /// A state from a link direction (any non-zero length; it is normalised)
    /// and a link angular velocity in rad/s (its component along the link is
    /// removed). `None` when the direction is zero or a value is not finite.
    #[must_use]
    pub fn new(direction: Vec3, angular_velocity: Vec3) -> Option<Self> {
        let length = norm(direction);
        if !(length.is_finite() && length > 0.0 && angular_velocity.iter().all(|v| v.is_finite())) {
            return None;
        }
        let n = scale(direction, 1.0 / length);
        Some(Self {
            direction: n,
            angular_velocity: sub(angular_velocity, scale(n, dot(angular_velocity, n))),
        })
    }

    /// A state from raw components without any normalisation (for the
    /// integrator, which keeps the constraint to within its tolerance).
    pub(crate) const fn from_raw(direction: Vec3, angular_velocity: Vec3) -> Self {
        Self {
            direction,
            angular_velocity,
        }
    }

    /// Unit vector from pivot to seat, turning frame.
    #[must_use]
    pub const fn direction(&self) -> Vec3 {
        self.direction
    }

    /// Angular velocity of the link relative to the top, rad/s.
    #[must_use]
    pub const fn angular_velocity(&self) -> Vec3 {
        self.angular_velocity
    }

    /// Angle of the link from the downward vertical, rad, in [0, π].
    #[must_use]
    pub fn angle_from_vertical_rad(&self) -> f64 {
        let [x, y, z] = self.direction;
        x.hypot(y).atan2(-z)
    }

    /// Radial swing angle, rad: the angle from vertical of the link's
    /// projection onto the radial plane, positive outward.
    #[must_use]
    pub fn radial_angle_rad(&self) -> f64 {
        let [x, _, z] = self.direction;
        x.atan2(-z)
    }

    /// Tangential swing angle, rad: the angle of the link out of the radial
    /// plane, positive ahead of the pivot (in the direction of rotation for
    /// positive speed); seats trail (negative) while the top speeds up.
    #[must_use]
    pub fn tangential_angle_rad(&self) -> f64 {
        let [x, y, z] = self.direction;
        y.atan2(x.hypot(z))
    }

    /// Angle between the link and another direction (unit vector), rad, in
    /// [0, π]; accurate also for small angles.
    #[must_use]
    pub fn angle_to(&self, direction: Vec3) -> f64 {
        norm(cross(self.direction, direction)).atan2(dot(self.direction, direction))
    }

    /// The nearest state that satisfies the constraints exactly: unit
    /// direction, angular velocity across the link, and for a rod the link
    /// in the radial plane turning about the hinge axis.
    #[must_use]
    pub fn projected(&self, suspension: Suspension) -> Self {
        let [x, y, z] = self.direction;
        let raw = match suspension {
            Suspension::Chain => [x, y, z],
            Suspension::Rod => [x, 0.0, z],
        };
        let length = norm(raw);
        let n = if length > 0.0 {
            scale(raw, 1.0 / length)
        } else {
            Self::HANGING.direction
        };
        let w = self.angular_velocity;
        let angular_velocity = match suspension {
            Suspension::Chain => sub(w, scale(n, dot(w, n))),
            Suspension::Rod => [0.0, w[1], 0.0],
        };
        Self {
            direction: n,
            angular_velocity,
        }
    }

    /// How far the state is from the constraints: `max(| |n| − 1 |, |n·ω| )`
    /// (the second in rad/s).
    #[must_use]
    pub fn constraint_error(&self) -> f64 {
        (norm(self.direction) - 1.0)
            .abs()
            .max(dot(self.direction, self.angular_velocity).abs())
    }
}

/// Dot product.
#[must_use]
pub fn dot(a: Vec3, b: Vec3) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// Cross product.
#[must_use]
pub fn cross(a: Vec3, b: Vec3) -> Vec3 {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

fn add(a: Vec3, b: Vec3) -> Vec3 {
    [a[0] + b[0], a[1] + b[1], a[2] + b[2]]
}

fn sub(a: Vec3, b: Vec3) -> Vec3 {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

fn scale(a: Vec3, k: f64) -> Vec3 {
    [a[0] * k, a[1] * k, a[2] * k]
}

/// Euclidean length.
#[must_use]
pub fn norm(a: Vec3) -> f64 {
    dot(a, a).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn chain() -> SeatDynamics {
        SeatDynamics::new(3.0, 5.0, Suspension::Chain, 9.80665).unwrap()
    }

    #[test]
    fn steady_state_is_an_equilibrium_with_the_expected_tension() {
        // Hand calculation, common practice: at the steady angle the relative
        // acceleration vanishes and the tension is g / cos φ.
        for suspension in [Suspension::Chain, Suspension::Rod] {
            let seat = SeatDynamics::new(3.0, 5.0, suspension, 9.80665).unwrap();
            let w = 1.1;
            let state = seat.steady_state(w);
            let shaft = ShaftMotion {
                speed_rad_s: w,
                accel_rad_s2: 0.0,
            };
            let rate = seat.rate(&state, shaft);
            assert!(norm(rate.angular_velocity) < 1e-12, "{rate:?}");
            let phi = seat.steady_angle_rad(w);
            let link = seat.link_force(&state, shaft);
            assert!((link.tension_ratio - 1.0 / phi.cos()).abs() < 1e-12);
            assert!((link.load_factor - 1.0 / phi.cos()).abs() < 1e-12);
            assert!(link.transverse_per_mass_mps2 < 1e-12);
        }
    }

    #[test]
    fn a_step_passes_no_impulse_through_a_vertical_chain() {
        // Hand calculation, common practice: a chain can only pull along
        // itself, so with the chain vertical a speed step leaves the seat at
        // rest in the ground frame: relative velocity −Δω ẑ × x = (0, −Δω r0, 0).
        let seat = chain();
        let step = seat.speed_step(&LinkState::HANGING, 0.8);
        assert_eq!(step.tension_impulse_mps, 0.0);
        let v = seat.seat_velocity_mps(&step.state);
        assert!((v[1] + 0.8 * 3.0).abs() < 1e-12 && v[0].abs() < 1e-12 && v[2].abs() < 1e-12);
    }

    #[test]
    fn a_leading_chain_would_need_to_push_on_a_speed_up_step() {
        // Hand calculation, common practice: tension impulse = −Δω r0 n_y.
        let seat = chain();
        let ahead = LinkState::new([0.0, 0.3, -1.0], [0.0; 3]).unwrap();
        let step = seat.speed_step(&ahead, 0.5);
        let ny = ahead.direction()[1];
        assert!((step.tension_impulse_mps - (-0.5 * 3.0 * ny)).abs() < 1e-12);
        assert!(step.tension_impulse_mps < 0.0);
        assert!(seat.speed_step(&ahead, -0.5).tension_impulse_mps > 0.0);
    }

    #[test]
    fn a_rod_hinge_passes_the_whole_tangential_jump() {
        let seat = SeatDynamics::new(3.0, 5.0, Suspension::Rod, 9.80665).unwrap();
        let state = LinkState::new([0.5, 0.0, -1.0], [0.0, -0.2, 0.0]).unwrap();
        let step = seat.speed_step(&state, 0.7);
        assert_eq!(step.state, state);
        assert!(step.transverse_impulse_mps > 0.0);
        assert!(step.tension_impulse_mps.abs() < 1e-12);
    }

    #[test]
    fn angles_stay_defined_at_the_poles_of_angle_charts() {
        let up = LinkState::new([0.0, 0.0, 1.0], [0.0; 3]).unwrap();
        assert!((up.angle_from_vertical_rad() - core::f64::consts::PI).abs() < 1e-15);
        let tangent = LinkState::new([0.0, 1.0, 0.0], [0.3, 0.0, 0.0]).unwrap();
        assert!((tangent.tangential_angle_rad() - core::f64::consts::FRAC_PI_2).abs() < 1e-15);
        let rate = chain().rate(&tangent, ShaftMotion::default());
        assert!(rate.direction.iter().all(|v| v.is_finite()));
        assert!(LinkState::new([0.0; 3], [0.0; 3]).is_none());
        assert!(LinkState::new([1.0, 0.0, 0.0], [f64::NAN, 0.0, 0.0]).is_none());
    }

    #[test]
    fn bad_parameters_are_refused_by_name() {
        let c = Suspension::Chain;
        assert_eq!(
            SeatDynamics::new(-1.0, 5.0, c, 9.8),
            Err(ParamError::Negative("hub_offset_m"))
        );
        assert_eq!(
            SeatDynamics::new(1.0, 0.0, c, 9.8),
            Err(ParamError::NotPositive("length_m"))
        );
        assert_eq!(
            SeatDynamics::new(1.0, 5.0, c, f64::NAN),
            Err(ParamError::NonFinite("gravity_mps2"))
        );
        assert_eq!(
            SeatDynamics::new(1.0, 5.0, c, 1.6),
            Err(ParamError::OutOfRange("gravity_mps2"))
        );
        assert_eq!(
            chain().with_damping(-0.1),
            Err(ParamError::Negative("damping_per_s"))
        );
    }
}
