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
        let h = 1e-6;
        let mut a = [0.0; 2];
        for (i, ai) in a.iter_mut().enumerate() {
            let mut qp = q;
            let mut qm = q;
            qp[i] += h;
            qm[i] -= h;
            let pp = self.position(qp[0], qp[1]);
            let pm = self.position(qm[0], qm[1]);
            let dx = (pp[0] - pm[0]) / (2.0 * h);
            let dy = (pp[1] - pm[1]) / (2.0 * h);
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
        let q = [phi, 0.0];
        let h = 1e-4;
        let u = |dq0: f64, dq1: f64| self.potential(w, [q[0] + dq0, q[1] + dq1]);
        let k11 = (u(h, 0.0) - 2.0 * u(0.0, 0.0) + u(-h, 0.0)) / (h * h);
        let k22 = (u(0.0, h) - 2.0 * u(0.0, 0.0) + u(0.0, -h)) / (h * h);
        let k12 = (u(h, h) - u(h, -h) - u(-h, h) + u(-h, -h)) / (4.0 * h * h);
        let m = self.length_m * self.length_m;
        if !self.chain {
            return ((k11 / m).max(0.0).sqrt(), None);
        }
        let a_psi_plus = self.coriolis_form(w, [phi + h, 0.0])[1];
        let a_psi_minus = self.coriolis_form(w, [phi - h, 0.0])[1];
        let a_theta_plus = self.coriolis_form(w, [phi, h])[0];
        let a_theta_minus = self.coriolis_form(w, [phi, -h])[0];
        let gamma =
            (a_psi_plus - a_psi_minus) / (2.0 * h) - (a_theta_plus - a_theta_minus) / (2.0 * h);
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
