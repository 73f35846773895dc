//! f64 reference for the steady state and the swing modes.
//!
//! Differences from the f32 code, on purpose:
//! * the angle for a speed is found by plain bisection of
//!   `g tan φ − ω² (r0 + L sin φ)` (the f32 code uses safeguarded Newton on a
//!   different residual);
//! * the swing modes are computed from the point mass's position in the turning
//!   frame by numerical differentiation of the effective potential and of the
//!   Coriolis term (the f32 code uses the hand-derived stiffnesses), so the
//!   derivation itself is checked.

/// A ride in f64: hub offset, effective length, gravity, chain or rod.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Ride {
    /// Hub offset r0, m.
    pub hub_offset_m: f64,
    /// Effective length L, m.
    pub length_m: f64,
    /// Gravity, m/s².
    pub gravity_mps2: f64,
    /// `true` for chains (two swing directions), `false` for hinged rods.
    pub chain: bool,
}

/// Iterations of the reference bisection: enough to reach adjacent f64 values
/// on [0, π/2].
const BISECTION_ITERATIONS: u32 = 200;

/// Step of the first-derivative stencil, rad: truncation ~h⁴ ≈ 1e-12,
/// rounding ~ε₆₄/h ≈ 2e-13 (relative).
const FIRST_STEP: f64 = 1e-3;

/// Step of the second-derivative stencil, rad: truncation ~h⁴ ≈ 1e-8,
/// rounding ~ε₆₄·|U|/h² ≈ 2e-12·|U| (a smaller step would drown small
/// stiffnesses in the rounding of U).
const SECOND_STEP: f64 = 1e-2;

/// Five-point central first derivative of `f` at 0.
fn first_derivative(f: impl Fn(f64) -> f64, h: f64) -> f64 {
    (f(-2.0 * h) - 8.0 * f(-h) + 8.0 * f(h) - f(2.0 * h)) / (12.0 * h)
}

/// Five-point central second derivative of `f` at 0.
fn second_derivative(f: impl Fn(f64) -> f64, h: f64) -> f64 {
    (-f(-2.0 * h) + 16.0 * f(-h) - 30.0 * f(0.0) + 16.0 * f(h) - f(2.0 * h)) / (12.0 * h * h)
}

impl Ride {
    /// ω (rad/s) for a steady angle φ (rad) in [0, π/2): √(g tan φ / (r0 + L sin φ)).
    #[must_use]
    pub fn speed_for_angle(&self, phi: f64) -> f64 {
        if phi == 0.0 {
            return if self.hub_offset_m > 0.0 {
                0.0
            } else {
                (self.gravity_mps2 / self.length_m).sqrt()
            };
        }
        (self.gravity_mps2 * phi.tan() / (self.hub_offset_m + self.length_m * phi.sin())).sqrt()
    }

    /// Steady angle φ (rad) for a shaft speed ω (rad/s), by bisection.
    #[must_use]
    pub fn angle_for_speed(&self, w: f64) -> f64 {
        let (r0, l, g) = (self.hub_offset_m, self.length_m, self.gravity_mps2);
        let w2 = w * w;
        if r0 == 0.0 {
            let x = g / (w2 * l);
            return if x >= 1.0 { 0.0 } else { x.acos() };
        }
        let residual = |phi: f64| g * phi.tan() - w2 * (r0 + l * phi.sin());
        let (mut lo, mut hi) = (0.0_f64, std::f64::consts::FRAC_PI_2);
        for _ in 0..BISECTION_ITERATIONS {
            let mid = 0.5 * (lo + hi);
            if mid <= lo || mid >= hi {
                break;
            }
            if residual(mid) < 0.0 {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        0.5 * (lo + hi)
    }

    /// dφ/dω at angle φ, by central difference of [`Ride::angle_for_speed`]
    /// (independent of the f32 closed form).
    #[must_use]
    pub fn sensitivity(&self, phi: f64) -> f64 {
        let w = self.speed_for_angle(phi);
        let h = 1e-6 * w.max(1e-3);
        (self.angle_for_speed(w + h) - self.angle_for_speed(w - h)) / (2.0 * h)
    }

    /// Position of the seat in the turning frame for radial angle θ and
    /// tangential angle ψ: (x radial, y tangential, z up), pivot at (r0, 0, 0).
    fn position(&self, theta: f64, psi: f64) -> [f64; 3] {
        let l = self.length_m;
        [
            self.hub_offset_m + l * theta.sin() * psi.cos(),
            l * psi.sin(),
            -l * theta.cos() * psi.cos(),
        ]
    }

    /// Effective potential per unit mass in the turning frame: g z − ½ ω² (x² + y²).
    fn potential(&self, w: f64, q: [f64; 2]) -> f64 {
        let [x, y, z] = self.position(q[0], q[1]);
        self.gravity_mps2 * z - 0.5 * w * w * (x * x + y * y)
    }

    /// Coriolis one-form A(q) with ω (x ẏ − y ẋ) = A(q)·q̇, by differentiating
    /// the position numerically.
    fn coriolis_form(&self, w: f64, q: [f64; 2]) -> [f64; 2] {
        let [x, y, _] = self.position(q[0], q[1]);
        let mut a = [0.0; 2];
        for (i, ai) in a.iter_mut().enumerate() {
            let along = |t: f64| {
                let mut qt = q;
                qt[i] += t;
                self.position(qt[0], qt[1])
            };
            let dx = first_derivative(|t| along(t)[0], FIRST_STEP);
            let dy = first_derivative(|t| along(t)[1], FIRST_STEP);
            *ai = w * (x * dy - y * dx);
        }
        a
    }

    /// Swing-mode angular frequencies (rad/s, turning frame) about the steady
    /// angle φ: one for a rod, two (slow, fast) for a chain.
    ///
    /// Stiffness K = Hessian of the effective potential, gyroscopic coefficient
    /// γ = ∂A_ψ/∂θ − ∂A_θ/∂ψ, mass matrix L² I; the frequencies solve
    /// det(K − Ω² L² I + iΩ γ J) = 0.
    #[must_use]
    pub fn swing_modes(&self, phi: f64) -> (f64, Option<f64>) {
        let w = self.speed_for_angle(phi);
        let u = |dq0: f64, dq1: f64| self.potential(w, [phi + dq0, dq1]);
        let h = SECOND_STEP;
        let k11 = second_derivative(|t| u(t, 0.0), h);
        let k22 = second_derivative(|t| u(0.0, t), h);
        // Mixed derivative as the first derivative of a first derivative.
        let k12 = first_derivative(|t| first_derivative(|v| u(t, v), FIRST_STEP), FIRST_STEP);
        let m = self.length_m * self.length_m;
        if !self.chain {
            return ((k11 / m).max(0.0).sqrt(), None);
        }
        let a_psi = |t: f64| self.coriolis_form(w, [phi + t, 0.0])[1];
        let a_theta = |t: f64| self.coriolis_form(w, [phi, t])[0];
        let gamma = first_derivative(a_psi, FIRST_STEP) - first_derivative(a_theta, FIRST_STEP);
        // (k11 − Ω²m)(k22 − Ω²m) − k12² − Ω²γ² = 0, a quadratic in Ω².
        let a = m * m;
        let b = -(m * (k11 + k22) + gamma * gamma);
        let c = k11 * k22 - k12 * k12;
        let disc = (b * b - 4.0 * a * c).max(0.0).sqrt();
        let high = (-b + disc) / (2.0 * a);
        let low = if high > 0.0 { c / (a * high) } else { 0.0 };
        (low.max(0.0).sqrt(), Some(high.max(0.0).sqrt()))
    }
}
