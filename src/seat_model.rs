//! The seat's swing dynamics in f32, for integration on the controller.
//!
//! A point mass on a rigid link of length L from a pivot at radius r0 on a top
//! turning at ω(t) with acceleration α(t). Coordinates in the turning frame:
//! θ, the radial swing (in the plane through the shaft axis, positive outward),
//! and ψ, the tangential swing (positive in the direction of rotation):
//!
//! ```text
//! x = r0 + L sin θ cos ψ,   y = L sin ψ,   z = −L cos θ cos ψ
//! ```
//!
//! From the Lagrangian ½|ṙ|² + ω (x ẏ − y ẋ) + ½ ω² (x² + y²) − g z
//! (docs/physics.md), with a = r0/L and b = g/L:
//!
//! ```text
//! cos ψ · θ̈ = 2 sin ψ · ψ̇ θ̇ + α sin ψ cos θ + 2ω cos θ cos ψ · ψ̇
//!             + ω² (a + sin θ cos ψ) cos θ − b sin θ
//! ψ̈ = −α (a cos ψ + sin θ) − 2ω cos θ cos² ψ · θ̇ − θ̇² sin ψ cos ψ
//!     + ω² sin ψ (cos ψ − (a + sin θ cos ψ) sin θ) − b cos θ sin ψ
//! ```
//!
//! A hinged rod keeps ψ = 0 (the hinge carries the Euler force), leaving
//! θ̈ = ω² (a + sin θ) cos θ − b sin θ. Optional linear damping adds
//! −c·θ̇ and −c·ψ̇. The coordinates are singular only at ψ = ±90° (the link
//! horizontal and tangential), far outside what a seat can reach.
//!
//! Integration is the classical fixed-step Runge–Kutta method (RK4): a control
//! tick is a fixed step, the target has no room for an adaptive solver, and
//! the host simulator (an adaptive f64 solver) checks it.

use crate::error::{check_range, ParamError};
use crate::geometry::{RideGeometry, Suspension};
use crate::math::sin_cos;

/// Swing state of one seat in the turning frame.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SeatState {
    /// Radial swing θ from vertical, rad (positive outward).
    pub radial_rad: f32,
    /// dθ/dt, rad/s.
    pub radial_rate: f32,
    /// Tangential swing ψ, rad (positive in the direction of rotation; 0 for rods).
    pub tangential_rad: f32,
    /// dψ/dt, rad/s.
    pub tangential_rate: f32,
}

impl SeatState {
    /// Hanging still, straight down.
    pub const REST: Self = Self {
        radial_rad: 0.0,
        radial_rate: 0.0,
        tangential_rad: 0.0,
        tangential_rate: 0.0,
    };

    /// Angle between the link and the vertical, rad: cos = cos θ cos ψ.
    #[must_use]
    pub fn angle_from_vertical(&self) -> f32 {
        let (_, ct) = sin_cos(self.radial_rad);
        let (_, cp) = sin_cos(self.tangential_rad);
        libm::acosf((ct * cp).clamp(-1.0, 1.0))
    }

    fn is_finite(&self) -> bool {
        self.radial_rad.is_finite()
            && self.radial_rate.is_finite()
            && self.tangential_rad.is_finite()
            && self.tangential_rate.is_finite()
    }

    fn add_scaled(&self, rate: &Self, h: f32) -> Self {
        Self {
            radial_rad: self.radial_rad + h * rate.radial_rad,
            radial_rate: self.radial_rate + h * rate.radial_rate,
            tangential_rad: self.tangential_rad + h * rate.tangential_rad,
            tangential_rate: self.tangential_rate + h * rate.tangential_rate,
        }
    }
}

/// The seat dynamics of one ride, with constants prepared once.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SeatModel {
    /// r0 / L.
    offset_ratio: f32,
    /// g / L, 1/s².
    gravity_ratio: f32,
    /// Linear damping rate, 1/s.
    damping_per_s: f32,
    chain: bool,
}

/// Largest accepted damping rate, 1/s (a swing that dies in a fraction of a
/// second is not a seat).
pub const MAX_DAMPING_PER_S: f32 = 10.0;

/// Largest accepted integration step, s: RK4 stays accurate to well below
/// f32 rounding for swing periods of a second or more up to about 0.05 s.
pub const MAX_STEP_S: f32 = 0.05;

impl SeatModel {
    /// The model for `geometry`, with linear damping `damping_per_s` (0 for
    /// none: the worst case for swing amplitude).
    ///
    /// # Errors
    /// [`ParamError`] naming `damping_per_s` when not finite or outside [0, 10].
    pub fn new(geometry: &RideGeometry, damping_per_s: f32) -> Result<Self, ParamError> {
        let damping_per_s = check_range("damping_per_s", damping_per_s, 0.0, MAX_DAMPING_PER_S)?;
        Ok(Self {
            offset_ratio: geometry.hub_offset_m() / geometry.length_m(),
            gravity_ratio: geometry.gravity().mps2() / geometry.length_m(),
            damping_per_s,
            chain: geometry.suspension() == Suspension::Chain,
        })
    }

    /// r0 / L.
    pub(crate) const fn offset_ratio(&self) -> f32 {
        self.offset_ratio
    }

    /// g / L, 1/s².
    pub(crate) const fn gravity_ratio(&self) -> f32 {
        self.gravity_ratio
    }

    /// Linear damping rate, 1/s.
    pub(crate) const fn damping_per_s(&self) -> f32 {
        self.damping_per_s
    }

    /// `true` for chains (two swing directions), `false` for hinged rods.
    pub(crate) const fn is_chain(&self) -> bool {
        self.chain
    }

    /// Time derivative of `state` at shaft speed `w` (rad/s) and acceleration
    /// `alpha` (rad/s²).
    #[must_use]
    pub fn rate(&self, state: &SeatState, w: f32, alpha: f32) -> SeatState {
        let (st, ct) = sin_cos(state.radial_rad);
        let a = self.offset_ratio;
        let b = self.gravity_ratio;
        let c = self.damping_per_s;
        let td = state.radial_rate;
        if !self.chain {
            return SeatState {
                radial_rad: td,
                radial_rate: w * w * (a + st) * ct - b * st - c * td,
                tangential_rad: 0.0,
                tangential_rate: 0.0,
            };
        }
        let (sp, cp) = sin_cos(state.tangential_rad);
        let pd = state.tangential_rate;
        let radius = a + st * cp;
        let radial_accel =
            (2.0 * sp * pd * td + alpha * sp * ct + 2.0 * w * ct * cp * pd + w * w * radius * ct
                - b * st)
                / cp
                - c * td;
        let tangential_accel =
            -alpha * (a * cp + st) - 2.0 * w * ct * cp * cp * td - td * td * sp * cp
                + w * w * sp * (cp - radius * st)
                - b * ct * sp
                - c * pd;
        SeatState {
            radial_rad: td,
            radial_rate: radial_accel,
            tangential_rad: pd,
            tangential_rate: tangential_accel,
        }
    }

    /// One RK4 step of length `dt` (s) with the shaft speed going linearly
    /// from `w` with constant acceleration `alpha` over the step.
    ///
    /// Returns `None` (and leaves the caller's state as it was) when `dt` is
    /// not in (0, [`MAX_STEP_S`]], an input is not finite, or the result is
    /// not finite: the caller decides the safe reaction.
    #[must_use]
    pub fn step(&self, state: &SeatState, w: f32, alpha: f32, dt: f32) -> Option<SeatState> {
        let inputs_ok =
            dt > 0.0 && dt <= MAX_STEP_S && w.is_finite() && alpha.is_finite() && state.is_finite();
        if !inputs_ok {
            return None;
        }
        let half = 0.5 * dt;
        let w_mid = w + alpha * half;
        let k1 = self.rate(state, w, alpha);
        let k2 = self.rate(&state.add_scaled(&k1, half), w_mid, alpha);
        let k3 = self.rate(&state.add_scaled(&k2, half), w_mid, alpha);
        let k4 = self.rate(&state.add_scaled(&k3, dt), w + alpha * dt, alpha);
        let sixth = dt / 6.0;
        let next = SeatState {
            radial_rad: state.radial_rad
                + sixth
                    * (k1.radial_rad + 2.0 * k2.radial_rad + 2.0 * k3.radial_rad + k4.radial_rad),
            radial_rate: state.radial_rate
                + sixth
                    * (k1.radial_rate
                        + 2.0 * k2.radial_rate
                        + 2.0 * k3.radial_rate
                        + k4.radial_rate),
            tangential_rad: state.tangential_rad
                + sixth
                    * (k1.tangential_rad
                        + 2.0 * k2.tangential_rad
                        + 2.0 * k3.tangential_rad
                        + k4.tangential_rad),
            tangential_rate: state.tangential_rate
                + sixth
                    * (k1.tangential_rate
                        + 2.0 * k2.tangential_rate
                        + 2.0 * k3.tangential_rate
                        + k4.tangential_rate),
        };
        next.is_finite().then_some(next)
    }

    /// Jacobi integral per unit mass, divided by L² (1/s²): kinetic energy in
    /// the turning frame plus gravity minus the centrifugal potential.
    /// Conserved at constant speed without damping; its rate while the speed
    /// changes is −α times the seat's angular momentum about the shaft axis.
    #[must_use]
    pub fn jacobi(&self, state: &SeatState, w: f32) -> f32 {
        let (st, ct) = sin_cos(state.radial_rad);
        let (sp, cp) = sin_cos(state.tangential_rad);
        let radius = self.offset_ratio + st * cp;
        let kinetic = 0.5
            * (state.radial_rate * state.radial_rate * cp * cp
                + state.tangential_rate * state.tangential_rate);
        kinetic - self.gravity_ratio * ct * cp - 0.5 * w * w * (radius * radius + sp * sp)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{Angle, AngularSpeed, Gravity, SwingModes};

    fn model(r0: f32, l: f32, suspension: Suspension) -> (RideGeometry, SeatModel) {
        let g = RideGeometry::new(r0, l, suspension, Gravity::STANDARD).unwrap();
        (g, SeatModel::new(&g, 0.0).unwrap())
    }

    #[test]
    fn steady_angle_is_an_equilibrium() {
        // The steady state of docs/physics.md must be a fixed point of the dynamics.
        for suspension in [Suspension::Chain, Suspension::Rod] {
            let (g, m) = model(3.6, 6.2, suspension);
            let s = g.steady_state_at_angle(Angle::from_deg(42.0)).unwrap();
            let state = SeatState {
                radial_rad: s.angle.rad(),
                ..SeatState::REST
            };
            let rate = m.rate(&state, s.speed.rad_per_s(), 0.0);
            assert!(
                rate.radial_rate.abs() < 1e-5 && rate.tangential_rate.abs() < 1e-5,
                "{rate:?}"
            );
        }
    }

    /// Counts upward zero crossings of dθ/dt to measure the swing period (the
    /// rate oscillates about zero even when a neutral mode shifts θ's mean).
    fn measured_period(m: &SeatModel, start: SeatState, w: f32, dt: f32, seconds: f32) -> f32 {
        let mut s = start;
        let mut crossings = [0.0_f32; 2];
        let mut n = 0;
        let mut t = 0.0;
        let mut previous = s.radial_rate;
        while t < seconds {
            s = m.step(&s, w, 0.0, dt).unwrap();
            t += dt;
            let now = s.radial_rate;
            if previous < 0.0 && now >= 0.0 {
                let tc = t - dt * now / (now - previous);
                if n == 0 {
                    crossings[0] = tc;
                }
                crossings[1] = tc;
                n += 1;
            }
            previous = now;
        }
        (crossings[1] - crossings[0]) / (n - 1) as f32
    }

    #[test]
    fn rod_swings_at_the_analytic_mode_frequency() {
        // Small swing about the steady angle: period 2π/Ω with Ω from `swing_modes`
        // (which itself matches Taylor 2005, Ex. 7.7 for r0 = 0).
        let (g, m) = model(3.6, 6.2, Suspension::Rod);
        let s = g
            .steady_state_at_speed(AngularSpeed::from_rad_per_s(1.1))
            .unwrap();
        let SwingModes::Rod { radial } = g.swing_modes(&s) else {
            panic!()
        };
        let start = SeatState {
            radial_rad: s.angle.rad() + 1e-3,
            ..SeatState::REST
        };
        let period = measured_period(&m, start, 1.1, 0.01, 120.0);
        assert!(
            (period - radial.period_s()).abs() < 2e-3 * radial.period_s(),
            "{period} vs {}",
            radial.period_s()
        );
    }

    #[test]
    fn chain_on_the_axis_swings_at_the_spherical_pendulum_frequency() {
        // r0 = 0: Ω = ω √(1 + 3 cos² φ) (classical result; Encyclopaedia Britannica, 11th ed.,
        // 1911, "Mechanics"); the other mode is neutral, so θ alone shows the fast one.
        let (g, m) = model(0.0, 6.2, Suspension::Chain);
        let s = g.steady_state_at_angle(Angle::from_deg(40.0)).unwrap();
        let w = s.speed.rad_per_s();
        let c = 40.0_f32.to_radians().cos();
        let expected = core::f32::consts::TAU / (w * (1.0 + 3.0 * c * c).sqrt());
        let start = SeatState {
            radial_rad: s.angle.rad() + 1e-3,
            ..SeatState::REST
        };
        let period = measured_period(&m, start, w, 0.01, 60.0);
        assert!(
            (period - expected).abs() < 2e-3 * expected,
            "{period} vs {expected}"
        );
    }

    #[test]
    fn jacobi_integral_is_conserved_at_constant_speed() {
        // Hand calculation, common practice: at constant ω the Jacobi integral is a constant of motion.
        let (_, m) = model(3.6, 6.2, Suspension::Chain);
        let mut s = SeatState {
            radial_rad: 0.9,
            radial_rate: -0.2,
            tangential_rad: 0.3,
            tangential_rate: 0.1,
        };
        let e0 = m.jacobi(&s, 1.2);
        for _ in 0..6000 {
            s = m.step(&s, 1.2, 0.0, 0.01).unwrap();
        }
        let drift = (m.jacobi(&s, 1.2) - e0).abs();
        assert!(drift < 1e-4 * e0.abs(), "drift {drift}");
    }

    #[test]
    fn energy_rate_is_minus_alpha_times_angular_momentum() {
        // dE/dt = −α h with h = (x ẏ − y ẋ + ω ρ²)/L² (derived in docs/physics.md); checked by
        // a forward difference over one 1 ms step (difference error ~1e-4 of the rate).
        let (_, m) = model(3.6, 6.2, Suspension::Chain);
        let s = SeatState {
            radial_rad: 0.6,
            radial_rate: 0.1,
            tangential_rad: -0.2,
            tangential_rate: 0.05,
        };
        let (w, alpha, dt) = (1.0_f32, 0.1_f32, 1e-3_f32);
        let after = m.step(&s, w, alpha, dt).unwrap();
        let e1 = m.jacobi(&after, w + alpha * dt);
        let e0 = m.jacobi(&s, w);
        let (st, ct) = (0.6_f32.sin(), 0.6_f32.cos());
        let (sp, cp) = ((-0.2_f32).sin(), (-0.2_f32).cos());
        let a = 3.6 / 6.2;
        let h = (a * cp + st) * 0.05 - sp * cp * ct * 0.1 + w * ((a + st * cp).powi(2) + sp * sp);
        let rate = (e1 - e0) / dt;
        assert!((rate + alpha * h).abs() < 2e-3, "{rate} vs {}", -alpha * h);
    }

    #[test]
    fn bad_steps_are_refused() {
        let (_, m) = model(3.6, 6.2, Suspension::Chain);
        let s = SeatState::REST;
        assert!(m.step(&s, 1.0, 0.0, 0.0).is_none());
        assert!(m.step(&s, 1.0, 0.0, 1.0).is_none());
        assert!(m.step(&s, f32::NAN, 0.0, 0.01).is_none());
        assert!(m.step(&s, 1.0, f32::INFINITY, 0.01).is_none());
        let bad = SeatState {
            radial_rad: f32::NAN,
            ..SeatState::REST
        };
        assert!(m.step(&bad, 1.0, 0.0, 0.01).is_none());
        let g = RideGeometry::new(3.6, 6.2, Suspension::Chain, Gravity::STANDARD).unwrap();
        assert_eq!(
            SeatModel::new(&g, -1.0),
            Err(ParamError::Negative("damping_per_s"))
        );
    }
}
