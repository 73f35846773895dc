//! The on-board seat-swing estimator: the seat model integrated from the
//! measured shaft speed, once for each length of the tolerance band
//! (shortest, nominal, longest), open loop from a confirmed rest state, with
//! an optional correction from a seat-angle sensor.
//!
//! Each length is integrated in the vector form of the seat model
//! ([`LinkModel`]: the link's unit vector and its rate, RK4 without
//! trigonometry); [`SwingEstimator::states`] gives the angles.
//!
//! Between two estimator steps the shaft speed is taken to move linearly from
//! the previous measurement to the current one (constant acceleration over
//! the step): the acceleration used is the speed difference over the step, so
//! the integrated speed change equals the measured one and no numerical
//! differentiation noise accumulates.

use crate::seat_model::{SeatModel, SeatState, MAX_STEP_S};

use super::link::{LinkModel, LinkState};

/// Number of lengths integrated: shortest, nominal and longest of the band.
pub const LENGTH_MODELS: usize = 3;

/// Index of the nominal length in the estimator's arrays.
pub const NOMINAL: usize = 1;

/// Speed magnitude below which the shaft counts as standing still, rad/s.
pub const REST_SPEED_RAD_S: f32 = 0.01;

/// Longest time one [`SwingEstimator::advance`] accepts, s (as the ramp's tick).
pub const MAX_ADVANCE_S: f32 = 1.0;

/// Largest sub-step of the integration, s (RK4 error far below f32 rounding
/// for swing periods above 1 s; docs/dynamic_protection.md).
pub const SUB_STEP_S: f32 = 0.02;

/// Bound on sub-steps per estimator step: (period + tick) / sub-step.
const MAX_SUB_STEPS: u32 = 128;

/// Observer gains per estimator step: the share of the angle disagreement
/// taken into the angle, and into the rate (per second of disagreement).
pub const OBSERVER_ANGLE_GAIN: f32 = 0.05;
/// See [`OBSERVER_ANGLE_GAIN`]; 1/s.
pub const OBSERVER_RATE_GAIN_PER_S: f32 = 0.5;

/// Why the estimator cannot vouch for its state.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum EstimatorFault {
    /// A speed or time was not finite or out of range, or the integration
    /// left the finite numbers.
    NotFinite,
    /// The shaft turns but no rest state has been confirmed since start-up
    /// or since the last fault: the swing is unknown.
    RestNotConfirmed,
    /// The seat-angle sensor disagrees with the nominal model by more than
    /// the tolerance.
    SensorDisagreement,
}

/// The estimator: three seat models integrated side by side.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SwingEstimator {
    models: [LinkModel; LENGTH_MODELS],
    states: [LinkState; LENGTH_MODELS],
    period_s: f32,
    rest_hold_s: f32,
    /// Measured speed at the last estimator step, rad/s.
    last_speed: f32,
    /// Time since the last estimator step, s.
    pending_s: f32,
    /// Time the shaft has stood still without interruption, s.
    still_s: f32,
    confirmed: bool,
    fault: Option<EstimatorFault>,
}

impl SwingEstimator {
    /// An estimator for the three `models` (shortest, nominal, longest),
    /// stepping every `period_s` (≤ [`SUB_STEP_S`] is not required: longer
    /// periods are integrated in sub-steps), which confirms rest after the
    /// shaft has stood still for `rest_hold_s`. It starts unconfirmed.
    #[must_use]
    pub const fn new(models: [SeatModel; LENGTH_MODELS], period_s: f32, rest_hold_s: f32) -> Self {
        Self {
            models: [
                LinkModel::of(&models[0]),
                LinkModel::of(&models[1]),
                LinkModel::of(&models[2]),
            ],
            states: [LinkState::REST; LENGTH_MODELS],
            period_s,
            rest_hold_s,
            last_speed: 0.0,
            pending_s: 0.0,
            still_s: 0.0,
            confirmed: false,
            fault: None,
        }
    }

    /// Declares the seats at rest now (an operator's or a sensor's
    /// confirmation); clears a latched fault. Refused (returns `false`) while
    /// the shaft turns faster than [`REST_SPEED_RAD_S`].
    pub fn confirm_rest(&mut self, measured_rad_s: f32) -> bool {
        if libm::fabsf(measured_rad_s) > REST_SPEED_RAD_S || measured_rad_s.is_nan() {
            return false;
        }
        self.states = [LinkState::REST; LENGTH_MODELS];
        self.last_speed = measured_rad_s;
        self.pending_s = 0.0;
        self.confirmed = true;
        self.fault = None;
        true
    }

    /// Feeds one tick: measured speed (rad/s) and time since the previous
    /// tick (s, in (0, [`MAX_ADVANCE_S`]]). Returns `Ok(true)` when an
    /// estimator step was taken this tick.
    ///
    /// # Errors
    /// The latched [`EstimatorFault`]; the state is then not trusted until a
    /// rest is confirmed again.
    pub fn advance(&mut self, measured_rad_s: f32, dt_s: f32) -> Result<bool, EstimatorFault> {
        if !(measured_rad_s.is_finite() && dt_s > 0.0 && dt_s <= MAX_ADVANCE_S) {
            return Err(self.latch(EstimatorFault::NotFinite));
        }
        if libm::fabsf(measured_rad_s) <= REST_SPEED_RAD_S {
            self.still_s = crate::math::smaller(self.still_s + dt_s, 1.0e6);
            if self.still_s >= self.rest_hold_s {
                // The swing has died out (commissioning assumption on
                // rest_hold_s): the model may restart from rest.
                self.confirm_rest(measured_rad_s);
            }
        } else {
            self.still_s = 0.0;
        }
        if let Some(f) = self.fault {
            return Err(f);
        }
        if !self.confirmed {
            if libm::fabsf(measured_rad_s) > REST_SPEED_RAD_S {
                return Err(self.latch(EstimatorFault::RestNotConfirmed));
            }
            self.last_speed = measured_rad_s;
            return Ok(false);
        }
        self.pending_s += dt_s;
        if self.pending_s < self.period_s {
            return Ok(false);
        }
        let span = self.pending_s;
        let alpha = (measured_rad_s - self.last_speed) / span;
        // One sub-step when the span fits (the 100 Hz case), else ⌈span / sub-step⌉.
        let (n, h) = if span <= SUB_STEP_S {
            (1, span)
        } else {
            #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
            let n = (libm::ceilf(span / SUB_STEP_S) as u32).clamp(1, MAX_SUB_STEPS);
            #[allow(clippy::cast_precision_loss)]
            let h = span / n as f32;
            (n, h)
        };
        if h > MAX_STEP_S {
            return Err(self.latch(EstimatorFault::NotFinite));
        }
        if !(h > 0.0 && alpha.is_finite()) {
            return Err(self.latch(EstimatorFault::NotFinite));
        }
        // Stepped in place: on a fault the states are no longer trusted (the
        // latch clears the confirmation; only a confirmed rest resets them).
        let mut finite = true;
        for (state, model) in self.states.iter_mut().zip(self.models.iter()) {
            let mut w = self.last_speed;
            let mut k = 0;
            while k < n && finite {
                match model.step(state, w, alpha, h) {
                    Some(s) => *state = s,
                    None => finite = false,
                }
                w += alpha * h;
                k += 1;
            }
        }
        if !finite {
            return Err(self.latch(EstimatorFault::NotFinite));
        }
        self.last_speed = measured_rad_s;
        self.pending_s = 0.0;
        Ok(true)
    }

    /// Corrects every model from a measured seat angle (radial and
    /// tangential, rad; tangential 0 for rods) and returns the nominal model's
    /// disagreement before the correction, rad. When it exceeds
    /// `tolerance_rad` the estimator latches [`EstimatorFault::SensorDisagreement`].
    ///
    /// # Errors
    /// The latched fault.
    pub fn correct(
        &mut self,
        radial_rad: f32,
        tangential_rad: f32,
        tolerance_rad: f32,
    ) -> Result<f32, EstimatorFault> {
        if !(radial_rad.is_finite() && tangential_rad.is_finite()) {
            return Err(self.latch(EstimatorFault::NotFinite));
        }
        if let Some(f) = self.fault {
            return Err(f);
        }
        let nominal = self
            .states
            .get(NOMINAL)
            .map(LinkState::to_angles)
            .unwrap_or_default();
        let disagreement = libm::fabsf(radial_rad - nominal.radial_rad)
            .max(libm::fabsf(tangential_rad - nominal.tangential_rad));
        if disagreement > tolerance_rad || disagreement.is_nan() {
            return Err(self.latch(EstimatorFault::SensorDisagreement));
        }
        for link in &mut self.states {
            let mut state = link.to_angles();
            let e_r = radial_rad - state.radial_rad;
            let e_t = tangential_rad - state.tangential_rad;
            state.radial_rad += OBSERVER_ANGLE_GAIN * e_r;
            state.radial_rate += OBSERVER_RATE_GAIN_PER_S * e_r;
            state.tangential_rad += OBSERVER_ANGLE_GAIN * e_t;
            state.tangential_rate += OBSERVER_RATE_GAIN_PER_S * e_t;
            *link = LinkState::from_angles(&state);
        }
        Ok(disagreement)
    }

    fn latch(&mut self, fault: EstimatorFault) -> EstimatorFault {
        self.fault = Some(fault);
        self.confirmed = false;
        fault
    }

    /// The swing states as angles (shortest, nominal, longest length).
    /// Converted from the vector form on each call (inverse trigonometry):
    /// for displays and tests, not for the tick.
    #[must_use]
    pub fn states(&self) -> [SeatState; LENGTH_MODELS] {
        [
            self.states[0].to_angles(),
            self.states[1].to_angles(),
            self.states[2].to_angles(),
        ]
    }

    /// The swing states in vector form (shortest, nominal, longest length).
    #[must_use]
    pub const fn link_states(&self) -> &[LinkState; LENGTH_MODELS] {
        &self.states
    }

    /// The models in vector form (shortest, nominal, longest length).
    #[must_use]
    pub const fn link_models(&self) -> &[LinkModel; LENGTH_MODELS] {
        &self.models
    }

    /// Measured speed at the last estimator step, rad/s.
    #[must_use]
    pub const fn speed_rad_s(&self) -> f32 {
        self.last_speed
    }

    /// `true` once a rest state has been confirmed and no fault latched.
    #[must_use]
    pub const fn is_confirmed(&self) -> bool {
        self.confirmed
    }

    /// The latched fault, if any.
    #[must_use]
    pub const fn fault(&self) -> Option<EstimatorFault> {
        self.fault
    }

    /// Largest angle from vertical over the three models, rad.
    #[must_use]
    pub fn largest_angle_rad(&self) -> f32 {
        self.states
            .iter()
            .map(LinkState::angle_from_vertical)
            .fold(0.0, f32::max)
    }
}
