//! The seat model of the estimator in vector form: the link's direction as a
//! unit vector and its rate, integrated without trigonometry.
//!
//! The same dynamics as [`SeatModel`] (docs/physics.md), written for the
//! unit vector n from the pivot to the seat (in units of L) in the turning
//! frame (x outward, y in the direction of rotation, z up), so that
//! n = (sin θ cos ψ, sin ψ, −cos θ cos ψ). With the seat at p = (a, 0, 0) + n
//! (a = r0/L, b = g/L), the force per unit mass and length in the turning
//! frame is
//!
//! ```text
//! f = (ω² p_x + 2ω ṅ_y + α p_y,  ω² p_y − 2ω ṅ_x − α p_x,  −b)
//! ```
//!
//! (centrifugal, Coriolis, Euler, gravity), and the link's tension keeps
//! |n| = 1: n̈ = f − (f·n + |ṅ|²) n. A hinged rod keeps n_y = ṅ_y = 0 (the
//! hinge carries the force along y), which leaves θ̈ = ω²(a + sin θ) cos θ
//! − b sin θ, the rod equation of [`SeatModel`]. Linear damping acts on the
//! link's velocity (−c ṅ; the angle form damps θ̇ and ψ̇, the same for small
//! tangential swing), applied by splitting after each undamped step (first
//! order in c·dt). The estimator integrates the undamped model.
//!
//! Why this form: a step of the angle form evaluates two sine/cosine pairs
//! per Runge–Kutta stage (eight per step), this one none; the Jacobi integral
//! is a polynomial in (n, ṅ) too. The integration is the same classical RK4 at
//! the estimator's step; after each step n is put back on the unit sphere and
//! ṅ into its tangent plane (a projection that removes the method's drift off
//! the constraint, not a correction of the motion). It is checked against the
//! f64 simulator in `tests/protection.rs` and against the angle form below.

use crate::seat_model::{SeatModel, SeatState};

/// State of one seat: link direction and its rate, in the turning frame.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LinkState {
    /// Unit vector from the pivot to the seat (x outward, y along the
    /// rotation, z up).
    pub n: [f32; 3],
    /// dn/dt, 1/s (perpendicular to `n`).
    pub v: [f32; 3],
}

impl LinkState {
    /// Hanging still, straight down.
    pub const REST: Self = Self {
        n: [0.0, 0.0, -1.0],
        v: [0.0; 3],
    };

    /// The state of `s` (angles and their rates).
    #[must_use]
    pub fn from_angles(s: &SeatState) -> Self {
        let (st, ct) = crate::math::sin_cos(s.radial_rad);
        let (sp, cp) = crate::math::sin_cos(s.tangential_rad);
        let (td, pd) = (s.radial_rate, s.tangential_rate);
        Self {
            n: [st * cp, sp, -ct * cp],
            // ∂n/∂θ = (cos θ cos ψ, 0, sin θ cos ψ), ∂n/∂ψ = (−sin θ sin ψ, cos ψ, cos θ sin ψ).
            v: [
                td * ct * cp - pd * st * sp,
                pd * cp,
                td * st * cp + pd * ct * sp,
            ],
        }
    }

    /// Angles and rates of this state (θ = atan2(n_x, −n_z), ψ = asin n_y).
    /// Off the tick path: it takes inverse trigonometric functions.
    #[must_use]
    pub fn to_angles(&self) -> SeatState {
        let [x, y, z] = self.n;
        let [vx, vy, vz] = self.v;
        let horizontal2 = x * x + z * z;
        let cp = crate::math::sqrt(horizontal2);
        let (radial_rate, tangential_rate) = if cp > 1.0e-6 {
            ((x * vz - z * vx) / horizontal2, vy / cp)
        } else {
            (0.0, 0.0)
        };
        SeatState {
            radial_rad: libm::atan2f(x, -z),
            radial_rate,
            tangential_rad: libm::asinf(unit(y)),
            tangential_rate,
        }
    }

    /// Angle between the link and the vertical, rad: cos = −n_z.
    #[must_use]
    pub fn angle_from_vertical(&self) -> f32 {
        libm::acosf(unit(-self.n[2]))
    }

    /// `false` when a component is not finite (the sum of finite numbers
    /// this size cannot overflow).
    fn is_finite(&self) -> bool {
        (self.n[0] + self.n[1] + self.n[2] + self.v[0] + self.v[1] + self.v[2]).is_finite()
    }
}

/// The seat dynamics in vector form, constants prepared once.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LinkModel {
    /// r0 / L.
    a: f32,
    /// g / L, 1/s².
    b: f32,
    /// Linear damping rate, 1/s.
    c: f32,
    chain: bool,
}

impl LinkModel {
    /// The vector form of `model` (same geometry and damping).
    #[must_use]
    pub const fn of(model: &SeatModel) -> Self {
        Self {
            a: model.offset_ratio(),
            b: model.gravity_ratio(),
            c: model.damping_per_s(),
            chain: model.is_chain(),
        }
    }

    /// n̈ for direction `n`, rate `v`, shaft speed `w` and acceleration `alpha`.
    #[inline(always)]
    fn accel(&self, n: &[f32; 3], v: &[f32; 3], w: f32, alpha: f32) -> [f32; 3] {
        let px = self.a + n[0];
        let w2 = w * w;
        let two_w = w + w;
        let fx = w2 * px + two_w * v[1] + alpha * n[1];
        let fy = if self.chain {
            w2 * n[1] - two_w * v[0] - alpha * px
        } else {
            0.0
        };
        let fz = -self.b;
        let lam = fx * n[0] + fy * n[1] + fz * n[2] + dot(v, v);
        [fx - lam * n[0], fy - lam * n[1], fz - lam * n[2]]
    }

    /// One RK4 step of length `dt` (s) with the shaft speed going linearly
    /// from `w` with constant acceleration `alpha`, followed by the projection
    /// back onto the constraint. `None` when the result is not finite (the
    /// caller checks `dt` and the inputs).
    #[must_use]
    pub fn step(&self, s: &LinkState, w: f32, alpha: f32, dt: f32) -> Option<LinkState> {
        let half = 0.5 * dt;
        let w_mid = w + alpha * half;
        let w_end = w + alpha * dt;
        let (n, v) = (&s.n, &s.v);
        let a1 = self.accel(n, v, w, alpha);
        let n2 = add(n, v, half);
        let v2 = add(v, &a1, half);
        let a2 = self.accel(&n2, &v2, w_mid, alpha);
        let n3 = add(n, &v2, half);
        let v3 = add(v, &a2, half);
        let a3 = self.accel(&n3, &v3, w_mid, alpha);
        let n4 = add(n, &v3, dt);
        let v4 = add(v, &a3, dt);
        let a4 = self.accel(&n4, &v4, w_end, alpha);
        let sixth = dt / 6.0;
        let n = combine(n, v, &v2, &v3, &v4, sixth);
        let v = combine(v, &a1, &a2, &a3, &a4, sixth);
        // Back onto the sphere, and the rate into its tangent plane.
        let inv = 1.0 / crate::math::sqrt(dot(&n, &n));
        let n = [n[0] * inv, n[1] * inv, n[2] * inv];
        let v = add(&v, &n, -dot(&v, &n));
        // Damping (none in the governor's models) by splitting: the rate
        // decays by 1/(1 + c·dt) after the undamped step (first order in c·dt).
        let v = if self.c > 0.0 {
            let k = 1.0 / (1.0 + self.c * dt);
            [v[0] * k, v[1] * k, v[2] * k]
        } else {
            v
        };
        let next = LinkState { n, v };
        next.is_finite().then_some(next)
    }

    /// Jacobi integral per unit mass, divided by L² (1/s²), as
    /// [`SeatModel::jacobi`]: ½|ṅ|² + b n_z − ½ω²((a + n_x)² + n_y²).
    #[must_use]
    pub fn jacobi(&self, s: &LinkState, w: f32) -> f32 {
        let [x, y, z] = s.n;
        let [vx, vy, vz] = s.v;
        let px = self.a + x;
        0.5 * (vx * vx + vy * vy + vz * vz) + self.b * z - 0.5 * w * w * (px * px + y * y)
    }
}

/// `x` limited to [−1, 1] by comparisons (no `clamp` on the tick path).
#[inline(always)]
fn unit(x: f32) -> f32 {
    crate::math::larger(crate::math::smaller(x, 1.0), -1.0)
}

/// x + h/6·(k1 + 2 k2 + 2 k3 + k4) with `sixth` = h/6.
#[inline(always)]
fn combine(
    x: &[f32; 3],
    k1: &[f32; 3],
    k2: &[f32; 3],
    k3: &[f32; 3],
    k4: &[f32; 3],
    sixth: f32,
) -> [f32; 3] {
    let one = |x: f32, k1: f32, k2: f32, k3: f32, k4: f32| x + sixth * (k1 + 2.0 * (k2 + k3) + k4);
    [
        one(x[0], k1[0], k2[0], k3[0], k4[0]),
        one(x[1], k1[1], k2[1], k3[1], k4[1]),
        one(x[2], k1[2], k2[2], k3[2], k4[2]),
    ]
}

#[inline(always)]
fn dot(x: &[f32; 3], y: &[f32; 3]) -> f32 {
    x[0] * y[0] + x[1] * y[1] + x[2] * y[2]
}

#[inline(always)]
fn add(x: &[f32; 3], y: &[f32; 3], h: f32) -> [f32; 3] {
    [x[0] + h * y[0], x[1] + h * y[1], x[2] + h * y[2]]
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{Gravity, RideGeometry, Suspension};

    fn models(suspension: Suspension) -> (SeatModel, LinkModel) {
        let g = RideGeometry::new(4.0, 6.5, suspension, Gravity::STANDARD).unwrap();
        let m = SeatModel::new(&g, 0.0).unwrap();
        (m, LinkModel::of(&m))
    }

    #[test]
    fn vector_form_has_the_rates_of_the_angle_form() {
        // Hand calculation, common practice: n̈ = ∂n/∂θ θ̈ + ∂n/∂ψ ψ̈ + (terms in the
        // rates squared); compared here through one tiny step of each form, which must
        // agree to first order in the step (1e-4 s: differences ~1e-7 of the rates).
        for suspension in [Suspension::Chain, Suspension::Rod] {
            let (m, l) = models(suspension);
            let chain = suspension == Suspension::Chain;
            let s = SeatState {
                radial_rad: 0.7,
                radial_rate: 0.2,
                tangential_rad: if chain { -0.3 } else { 0.0 },
                tangential_rate: if chain { 0.15 } else { 0.0 },
            };
            let dt = 1.0e-4;
            let angle = m.step(&s, 1.05, 0.08, dt).unwrap();
            let vector = l
                .step(&LinkState::from_angles(&s), 1.05, 0.08, dt)
                .unwrap()
                .to_angles();
            for (x, y) in [
                (angle.radial_rad, vector.radial_rad),
                (angle.radial_rate, vector.radial_rate),
                (angle.tangential_rad, vector.tangential_rad),
                (angle.tangential_rate, vector.tangential_rate),
            ] {
                assert!(
                    (x - y).abs() < 2.0e-6,
                    "{suspension:?}: {angle:?} vs {vector:?}"
                );
            }
        }
    }

    #[test]
    fn vector_form_follows_the_angle_form_over_a_minute() {
        // Both RK4 at 10 ms from the same swung-out start, 0.1 rad/s² up then constant:
        // the two forms of the same equations stay within 2e-4 rad (f32 rounding over
        // 6,000 steps; hand calculation, common practice).
        for suspension in [Suspension::Chain, Suspension::Rod] {
            let (m, l) = models(suspension);
            let chain = suspension == Suspension::Chain;
            let mut s = SeatState {
                radial_rad: 0.3,
                radial_rate: -0.1,
                tangential_rad: if chain { 0.2 } else { 0.0 },
                tangential_rate: 0.0,
            };
            let mut x = LinkState::from_angles(&s);
            let mut w = 0.2_f32;
            for k in 0..6000 {
                let alpha = if k < 800 { 0.1 } else { 0.0 };
                s = m.step(&s, w, alpha, 0.01).unwrap();
                x = l.step(&x, w, alpha, 0.01).unwrap();
                w += alpha * 0.01;
            }
            let y = x.to_angles();
            assert!((s.radial_rad - y.radial_rad).abs() < 2.0e-4, "{s:?} {y:?}");
            assert!(
                (s.tangential_rad - y.tangential_rad).abs() < 2.0e-4,
                "{s:?} {y:?}"
            );
            assert!((m.jacobi(&s, w) - l.jacobi(&x, w)).abs() < 1.0e-4);
        }
    }

    #[test]
    fn angles_round_trip_and_the_jacobi_integrals_agree() {
        let (m, l) = models(Suspension::Chain);
        let s = SeatState {
            radial_rad: 0.8,
            radial_rate: -0.3,
            tangential_rad: 0.25,
            tangential_rate: 0.4,
        };
        let x = LinkState::from_angles(&s);
        let back = x.to_angles();
        assert!((back.radial_rad - s.radial_rad).abs() < 1e-6);
        assert!((back.radial_rate - s.radial_rate).abs() < 1e-6);
        assert!((back.tangential_rad - s.tangential_rad).abs() < 1e-6);
        assert!((back.tangential_rate - s.tangential_rate).abs() < 1e-6);
        assert!((m.jacobi(&s, 1.1) - l.jacobi(&x, 1.1)).abs() < 1e-6);
        assert!((x.angle_from_vertical() - s.angle_from_vertical()).abs() < 1e-6);
        assert!(l.step(&x, f32::NAN, 0.0, 0.01).is_none());
    }
}
