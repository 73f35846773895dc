//! Small swings of a seat about its steady angle: the swing modes.
//!
//! Linearised in the frame that turns with the top (derivation in
//! docs/physics.md). With δ the radial swing about the steady angle φ and ψ the
//! tangential swing, per unit mass and divided by L²:
//!
//! ```text
//! δ'' − 2ω cos φ · ψ' + k_r δ = 0        k_t = ω² r0 / (L sin φ)
//! ψ'' + 2ω cos φ · δ' + k_t ψ = 0        k_r = k_t + ω² sin² φ
//! ```
//!
//! (at φ = 0 both stiffnesses are g/L − ω²). A hinged rod keeps ψ = 0 and has
//! the one mode Ω² = k_r. A chain has two coupled modes, the roots of
//! `Ω⁴ − (k_r + k_t + 4ω²cos²φ) Ω² + k_r k_t = 0`. For r0 = 0 they reduce to
//! Ω = ω sin φ (rod) and Ω = ω √(1 + 3 cos²φ) (chain), the classical results.
//!
//! Frequencies are as seen from the turning top (a rider's view).

use crate::geometry::{RideGeometry, Suspension};
use crate::steady::SteadyState;

/// One swing mode: an angular frequency in rad/s in the turning frame.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SwingMode {
    angular_frequency_rad_s: f32,
}

impl SwingMode {
    /// Angular frequency, rad/s (0 for a neutral direction, such as a conical
    /// pendulum turning its cone about the axis).
    #[must_use]
    pub const fn angular_frequency_rad_s(self) -> f32 {
        self.angular_frequency_rad_s
    }

    /// Period, s (infinite for a zero frequency).
    #[must_use]
    pub fn period_s(self) -> f32 {
        2.0 * core::f32::consts::PI / self.angular_frequency_rad_s
    }
}

/// The swing modes of one seat at one steady operating point.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SwingModes {
    /// Rod hinged in the radial plane: radial swing only.
    Rod {
        /// The radial mode.
        radial: SwingMode,
    },
    /// Chains: two modes mixing radial and tangential swing.
    Chain {
        /// The lower-frequency mode (mostly tangential at high speed).
        slow: SwingMode,
        /// The higher-frequency mode.
        fast: SwingMode,
    },
}

impl SwingModes {
    /// The mode with the longest period: the one a speed change must be
    /// slow against to leave the seats still.
    #[must_use]
    pub fn slowest(self) -> SwingMode {
        match self {
            Self::Rod { radial } => radial,
            Self::Chain { slow, .. } => slow,
        }
    }
}

impl RideGeometry {
    /// The swing modes about a steady operating point of this ride.
    ///
    /// `state` should come from this geometry's
    /// [`steady_state_at_angle`](RideGeometry::steady_state_at_angle) or
    /// [`steady_state_at_speed`](RideGeometry::steady_state_at_speed).
    ///
    /// ```
    /// use swingdrive::{Angle, Gravity, RideGeometry, Suspension, SwingModes};
    /// // r0 = 0: a hinged rod swings at ω sin φ (Taylor, Classical Mechanics, 2005, Ex. 7.7).
    /// let ride = RideGeometry::new(0.0, 5.0, Suspension::Rod, Gravity::STANDARD)?;
    /// let state = ride.steady_state_at_angle(Angle::from_deg(40.0))?;
    /// let SwingModes::Rod { radial } = ride.swing_modes(&state) else { unreachable!() };
    /// let expected = state.speed.rad_per_s() * 40f32.to_radians().sin();
    /// assert!((radial.angular_frequency_rad_s() - expected).abs() < 1e-5);
    /// # Ok::<(), swingdrive::ParamError>(())
    /// ```
    #[must_use]
    pub fn swing_modes(&self, state: &SteadyState) -> SwingModes {
        let (s, c) = crate::math::sin_cos(state.angle.rad());
        let w = state.speed.rad_per_s();
        let w2 = w * w;
        let l = self.length_m();
        // Stiffnesses with the equilibrium condition substituted, which avoids
        // the cancellation of g/(L cos φ) − ω² near r0 = 0.
        let (k_radial, k_tangential) = if s > 0.0 {
            let kt = w2 * self.hub_offset_m() / (l * s);
            (kt + w2 * s * s, kt)
        } else {
            let k = (self.gravity().mps2() / l - w2).max(0.0);
            (k, k)
        };
        match self.suspension() {
            Suspension::Rod => SwingModes::Rod {
                radial: mode(k_radial),
            },
            Suspension::Chain => {
                let b = k_radial + k_tangential + 4.0 * w2 * c * c;
                let product = k_radial * k_tangential;
                let root = crate::math::sqrt((b * b - 4.0 * product).max(0.0));
                let fast = 0.5 * (b + root);
                // Vieta for the small root: no cancellation.
                let slow = if fast > 0.0 { product / fast } else { 0.0 };
                SwingModes::Chain {
                    slow: mode(slow),
                    fast: mode(fast),
                }
            }
        }
    }
}

fn mode(omega_squared: f32) -> SwingMode {
    SwingMode {
        angular_frequency_rad_s: crate::math::sqrt(omega_squared.max(0.0)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::{Angle, AngularSpeed, Gravity};

    #[test]
    fn seats_at_rest_swing_as_simple_pendulums() {
        // Hand calculation, common practice: at rest Ω = √(g/L) in both directions.
        for suspension in [Suspension::Chain, Suspension::Rod] {
            let ride = RideGeometry::new(2.5, 4.0, suspension, Gravity::STANDARD).unwrap();
            let state = ride.steady_state_at_speed(AngularSpeed::ZERO).unwrap();
            let expected = (9.806_65_f32 / 4.0).sqrt();
            match ride.swing_modes(&state) {
                SwingModes::Rod { radial } => {
                    assert!((radial.angular_frequency_rad_s() - expected).abs() < 1e-6)
                }
                SwingModes::Chain { slow, fast } => {
                    assert!((slow.angular_frequency_rad_s() - expected).abs() < 1e-3);
                    assert!((fast.angular_frequency_rad_s() - expected).abs() < 1e-3);
                }
            }
        }
    }

    #[test]
    fn hanging_seat_on_the_axis_seen_from_the_turning_frame() {
        // Hand calculation, common practice: a spherical pendulum hanging on the axis
        // (r0 = 0, below √(g/L)) swings at √(g/L) ± ω when seen from a frame turning at ω.
        let ride = RideGeometry::new(0.0, 5.0, Suspension::Chain, Gravity::STANDARD).unwrap();
        let w = 0.8_f32;
        let state = ride
            .steady_state_at_speed(AngularSpeed::from_rad_per_s(w))
            .unwrap();
        assert_eq!(state.angle, Angle::ZERO);
        let w0 = (9.806_65_f32 / 5.0).sqrt();
        let SwingModes::Chain { slow, fast } = ride.swing_modes(&state) else {
            panic!("chain expected")
        };
        assert!((fast.angular_frequency_rad_s() - (w0 + w)).abs() < 1e-4);
        assert!((slow.angular_frequency_rad_s() - (w0 - w)).abs() < 1e-4);
    }
}
