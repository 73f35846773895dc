//! The swing governor: a reference governor between the interlock's speed
//! clamp and its ramp that admits, each estimator step, the largest change of
//! the ramp's target toward the request for which the swing certificate holds
//! on every length of the tolerance band.
//!
//! The certificate for a candidate target w′ follows the ramp's own plan: the
//! braking of the present acceleration at the jerk limit (to
//! v_ext = v + a|a|/(2j)), then the move from v_ext to w′, then constant speed
//! for ever. Along it √S grows at most by the envelope's growth integral;
//! the seat stays inside the certified cone while √S stays below the room
//! √T_cap(ω) (docs/dynamic_protection.md). At constant speed after the move
//! the Jacobi integral is conserved, so S and the room stay put.

use crate::error::{check_range, ParamError};
use crate::geometry::RideGeometry;
use crate::request_governor::{GovernorDecision, GovernorInput, GovernorStatus, RequestGovernor};
use crate::seat_model::SeatModel;
use crate::units::Angle;

use super::band::BandEnvelope;
use super::envelope::SwingEnvelope;
use super::estimator::{EstimatorFault, SwingEstimator, LENGTH_MODELS, MAX_ADVANCE_S};
use crate::math::{larger, least, smaller};

/// Parameters of the swing governor.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GovernorParams {
    /// Certified largest angle of the link from vertical, degrees, in (0, 85].
    pub certified_angle_deg: f32,
    /// Shortest effective length of the tolerance band, m (≤ the nominal).
    pub length_min_m: f32,
    /// Longest effective length of the tolerance band, m (≥ the nominal).
    pub length_max_m: f32,
    /// Bound on |measured − true| shaft speed plus the drive's following
    /// error, rad/s, in [0, 1].
    pub speed_uncertainty_rad_s: f32,
    /// The ramp's jerk limit, rad/s³ (for the braking of the acceleration),
    /// in (0, 100].
    pub jerk_rad_s3: f32,
    /// Estimator and decision period, s, in [0.001, 0.05].
    pub estimator_period_s: f32,
    /// Standstill time after which the swing counts as died out, s, in [0, 3600].
    pub rest_hold_s: f32,
    /// Margin on √S kept free, 1/s, in [0, 1] (covers integration and
    /// rounding error; docs/dynamic_protection.md).
    pub margin_per_s: f32,
    /// Largest disagreement with a seat-angle sensor, degrees, in (0, 45].
    pub sensor_tolerance_deg: f32,
    /// Largest rate of change of the admitted target, rad/s², in (0, 10]:
    /// the explicit rate of the reference governor. Well below the ramp's
    /// acceleration limit, so that the governor's own moves leave little
    /// residual swing (an undamped estimate never forgets it).
    pub target_rate_rad_s2: f32,
}

impl GovernorParams {
    /// Defaults for `geometry` at `certified_angle_deg` and ramp jerk
    /// `jerk_rad_s3`: length band ±2 %, speed uncertainty 0.005 rad/s, 100 Hz,
    /// 120 s rest hold, margin 0.01/s, sensor tolerance 5°, target rate
    /// 0.02 rad/s². Demo values: the
    /// ride's own figures come from its certification and commissioning.
    #[must_use]
    pub fn demo(geometry: &RideGeometry, certified_angle_deg: f32, jerk_rad_s3: f32) -> Self {
        Self {
            certified_angle_deg,
            length_min_m: 0.98 * geometry.length_m(),
            length_max_m: 1.02 * geometry.length_m(),
            speed_uncertainty_rad_s: 0.005,
            jerk_rad_s3,
            estimator_period_s: 0.01,
            rest_hold_s: 120.0,
            margin_per_s: 0.01,
            sensor_tolerance_deg: 5.0,
            target_rate_rad_s2: 0.02,
        }
    }
}

/// What the last decision found (for logs and displays).
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Certificate {
    /// Slack of the admitted target: room left minus the grown √S, 1/s,
    /// smallest over the three lengths (≥ the margin when certified).
    pub slack_per_s: f32,
    /// Whether the admitted target is certified.
    pub certified: bool,
    /// Largest swing energy bound √S over the lengths, 1/s.
    pub swing_per_s: f32,
}

/// The swing governor (see the module documentation).
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SwingGovernor {
    /// The three lengths' envelopes folded (least room, largest growth per cell):
    /// what the per-tick certificate reads.
    band: BandEnvelope,
    /// Largest ½ G over the lengths and cells, 1/s per rad/s.
    steepest: f32,
    estimator: SwingEstimator,
    params: GovernorParams,
    sensor_tolerance_rad: f32,
    /// The target admitted at the last decision, rad/s.
    admitted: f32,
    last: Certificate,
}

impl SwingGovernor {
    /// A governor for `geometry` (its length is the nominal one).
    ///
    /// Builds the three envelopes (bounded work, see [`SwingEnvelope::new`]).
    ///
    /// # Errors
    /// [`ParamError`] naming the refused parameter.
    // Not inlined: the governor is large, and an inlined constructor keeps
    // several copies of it in the caller's frame (too much for a 16 KiB M0).
    #[inline(never)]
    pub fn new(geometry: &RideGeometry, params: &GovernorParams) -> Result<Self, ParamError> {
        check_range("certified_angle_deg", params.certified_angle_deg, 0.0, 85.0)?;
        let l = geometry.length_m();
        let l_min = check_range("length_min_m", params.length_min_m, 0.0, l)?;
        check_range("length_max_m", params.length_max_m, l, 100.0)?;
        if l_min <= 0.0 {
            return Err(ParamError::NotPositive("length_min_m"));
        }
        check_range(
            "speed_uncertainty_rad_s",
            params.speed_uncertainty_rad_s,
            0.0,
            1.0,
        )?;
        let jerk = check_range("jerk_rad_s3", params.jerk_rad_s3, 0.0, 100.0)?;
        if jerk <= 0.0 {
            return Err(ParamError::NotPositive("jerk_rad_s3"));
        }
        check_range("estimator_period_s", params.estimator_period_s, 0.001, 0.05)?;
        check_range("rest_hold_s", params.rest_hold_s, 0.0, 3600.0)?;
        check_range("margin_per_s", params.margin_per_s, 0.0, 1.0)?;
        let tol = check_range(
            "sensor_tolerance_deg",
            params.sensor_tolerance_deg,
            0.0,
            45.0,
        )?;
        if tol <= 0.0 {
            return Err(ParamError::NotPositive("sensor_tolerance_deg"));
        }
        let rate = check_range("target_rate_rad_s2", params.target_rate_rad_s2, 0.0, 10.0)?;
        if rate <= 0.0 {
            return Err(ParamError::NotPositive("target_rate_rad_s2"));
        }
        let mut band = BandEnvelope::empty();
        let models = fill_band(&mut band, geometry, params)?;
        let steepest = band.steepest_growth();
        Ok(Self {
            estimator: SwingEstimator::new(models, params.estimator_period_s, params.rest_hold_s),
            band,
            steepest,
            params: *params,
            sensor_tolerance_rad: tol.to_radians(),
            admitted: 0.0,
            last: Certificate {
                slack_per_s: 0.0,
                certified: false,
                swing_per_s: 0.0,
            },
        })
    }

    /// Declares the seats at rest (see [`SwingEstimator::confirm_rest`]).
    pub fn confirm_rest(&mut self, measured_rad_s: f32) -> bool {
        let ok = self.estimator.confirm_rest(measured_rad_s);
        if ok {
            self.admitted = 0.0;
        }
        ok
    }

    /// Corrects the estimate from a seat-angle sensor (radial, tangential,
    /// rad); call before [`RequestGovernor::govern`] on ticks with a reading.
    ///
    /// # Errors
    /// [`EstimatorFault`]; the next decision then reports a fault.
    pub fn correct(&mut self, radial_rad: f32, tangential_rad: f32) -> Result<f32, EstimatorFault> {
        self.estimator
            .correct(radial_rad, tangential_rad, self.sensor_tolerance_rad)
    }

    /// The estimator.
    #[must_use]
    pub const fn estimator(&self) -> &SwingEstimator {
        &self.estimator
    }

    /// The envelopes of the shortest, nominal and longest length of
    /// `params`' band for `geometry`, on one grid up to the lowest of their
    /// top speeds: what [`new`](Self::new) folds into the band's envelope
    /// (not kept by the governor).
    ///
    /// # Errors
    /// [`ParamError`] naming the refused parameter.
    #[inline(never)]
    pub fn length_envelopes(
        geometry: &RideGeometry,
        params: &GovernorParams,
    ) -> Result<[SwingEnvelope; LENGTH_MODELS], ParamError> {
        let (short, long, certified, grid_top) = band_grid(geometry, params)?;
        Ok([
            SwingEnvelope::with_grid_top(&short, certified, grid_top)?,
            SwingEnvelope::with_grid_top(geometry, certified, grid_top)?,
            SwingEnvelope::with_grid_top(&long, certified, grid_top)?,
        ])
    }

    /// The band's folded envelope (what the certificate reads).
    #[must_use]
    pub const fn band(&self) -> &BandEnvelope {
        &self.band
    }

    /// What the last decision found.
    #[must_use]
    pub const fn certificate(&self) -> Certificate {
        self.last
    }

    /// The highest speed any length of the band can be certified at, rad/s
    /// (the smallest of the top speeds).
    #[must_use]
    pub fn top_rad_s(&self) -> f32 {
        self.band.top_rad_s()
    }

    /// Slack of a controlled stop to zero from the commanded state (`v`,
    /// `a`) at the ramp's jerk, by the same bound (a negative value says the
    /// bound cannot vouch for a stop from here; docs/dynamic_protection.md
    /// explains why it rarely can from high speed, and how stops are checked
    /// instead). Not part of the per-tick decision.
    #[must_use]
    pub fn stop_slack(&self, v: f32, a: f32) -> f32 {
        self.slack(self.estimator.speed_rad_s(), v, a, 0.0)
    }

    /// Slack of the path from the commanded state (`v`, `a`) through the
    /// braking point to `target`, smallest over the lengths, 1/s.
    #[must_use]
    pub fn slack(&self, measured: f32, v: f32, a: f32, target: f32) -> f32 {
        let v_ext = v + a * libm::fabsf(a) / (2.0 * self.params.jerk_rad_s3);
        self.finish(&self.prefix(measured, v, v_ext), v_ext, target)
    }

    /// What every candidate target shares: the growth of √S and the smallest
    /// slack from the present state through the braking of the acceleration
    /// to `v_ext`, on the band's envelope, each length's room paired with its
    /// own present swing bound.
    fn prefix(&self, measured: f32, v: f32, v_ext: f32) -> Prefix {
        let band = &self.band;
        let u = self.params.speed_uncertainty_rad_s;
        let m = libm::fabsf(measured);
        let va = libm::fabsf(v);
        let models = self.estimator.link_models();
        let states = self.estimator.link_states();
        let jacobi = [
            models[0].jacobi(&states[0], m),
            models[1].jacobi(&states[1], m),
            models[2].jacobi(&states[2], m),
        ];
        let swings = band.swings(&jacobi, m);
        // The measured and the commanded speed may differ, and the true speed
        // from both: count the gap and the uncertainty once, as travel already
        // made. The room is read u higher throughout.
        let g_v = band.growth_to(va);
        let gap = libm::fabsf(band.growth_to(m) - g_v);
        let spread = band.growth_to(va + u) - g_v;
        let mut grown = gap + spread;
        let slack = band.room_less(va + u, &swings) - grown;
        let slack = least(slack, piece(band, &swings, &mut grown, v, v_ext, u));
        let [a, b, c] = swings;
        Prefix {
            grown,
            slack,
            growth_ext: band.growth_to(libm::fabsf(v_ext)),
            swings,
            swing: if a.is_nan() || b.is_nan() || c.is_nan() {
                f32::NAN
            } else {
                larger(a, larger(b, c))
            },
        }
    }

    /// Slack of the path of `prefix` continued from `v_ext` to `target`, 1/s
    /// (−∞ when not a number).
    fn finish(&self, prefix: &Prefix, v_ext: f32, target: f32) -> f32 {
        let band = &self.band;
        let u = self.params.speed_uncertainty_rad_s;
        let same_direction = !((v_ext > 0.0 && target < 0.0) || (v_ext < 0.0 && target > 0.0));
        let (m1, m2) = (libm::fabsf(v_ext), libm::fabsf(target));
        let last = if same_direction && m2 >= m1 {
            // Up: √S grows, the room shrinks; the end is the binding point.
            band.room_less(m2 + u, &prefix.swings)
                - (prefix.grown + band.growth_to(m2) - prefix.growth_ext)
        } else {
            let mut r = prefix.grown;
            piece(band, &prefix.swings, &mut r, v_ext, target, u)
        };
        let slack = least(prefix.slack, last);
        if slack.is_nan() {
            f32::NEG_INFINITY
        } else {
            slack
        }
    }

    fn decide(&mut self, input: &GovernorInput, measured: f32) -> GovernorDecision {
        let v = input.commanded.speed.rad_per_s();
        let a = input.commanded.acceleration_rad_s2;
        let request = input.clamped_request_rad_s;
        let margin = self.params.margin_per_s;
        let v_ext = v + a * libm::fabsf(a) / (2.0 * self.params.jerk_rad_s3);
        // The present state and the braking of the acceleration, once; each
        // candidate target below adds only its own last piece.
        let prefix = self.prefix(measured, v, v_ext);
        let swing = prefix.swing;
        let record = |admitted: f32, slack: f32, certified: bool, last: &mut Certificate| {
            *last = Certificate {
                slack_per_s: slack,
                certified,
                swing_per_s: swing,
            };
            admitted
        };
        if !request.is_finite() {
            let held = self.admitted;
            let s = self.finish(&prefix, v_ext, held);
            let admitted = record(held, s, s >= margin, &mut self.last);
            return GovernorDecision {
                admitted_rad_s: admitted,
                status: GovernorStatus::Restricting,
            };
        }
        // Explicit rate of the admitted target: at most `target_rate` times
        // the decision period per decision, toward the request.
        let held = self.admitted;
        let reach = self.params.target_rate_rad_s2 * self.params.estimator_period_s;
        // Comparisons rather than clamp: no assertion on the bounds, so no panic path.
        let trial = held + smaller(larger(request - held, -reach), reach);
        let s_trial = self.finish(&prefix, v_ext, trial);
        // A move away from standstill must leave enough slack for the first
        // step back down to be certified too (the bound charges a step down
        // at most ½G per rad/s, and the room grows back as the speed falls),
        // so that lowering is never blocked by the governor's own ascent.
        let lowering = libm::fabsf(trial) < libm::fabsf(held);
        let reserve = if lowering {
            0.0
        } else {
            2.0 * reach * self.steepest
        };
        if s_trial >= margin + reserve {
            self.admitted = record(trial, s_trial, true, &mut self.last);
            if trial == request {
                return GovernorDecision {
                    admitted_rad_s: request,
                    status: GovernorStatus::Free,
                };
            }
        } else {
            let s_held = self.finish(&prefix, v_ext, held);
            if s_held >= margin {
                self.admitted = record(held, s_held, true, &mut self.last);
            } else {
                // Nothing certified (after a disturbance the bound did not
                // cover): the manoeuvre with the least examined growth is
                // braking the acceleration and holding the speed reached.
                let s_ext = self.finish(&prefix, v_ext, v_ext);
                self.admitted = record(v_ext, s_ext, false, &mut self.last);
            }
        }
        GovernorDecision {
            admitted_rad_s: self.admitted,
            status: GovernorStatus::Restricting,
        }
    }
}

/// The shortest and longest geometry of the band, the certified angle and
/// the top of the common grid (the lowest of the three top speeds).
fn band_grid(
    geometry: &RideGeometry,
    params: &GovernorParams,
) -> Result<(RideGeometry, RideGeometry, Angle, f32), ParamError> {
    let deg = check_range("certified_angle_deg", params.certified_angle_deg, 0.0, 85.0)?;
    let l = geometry.length_m();
    let l_min = check_range("length_min_m", params.length_min_m, 0.0, l)?;
    let l_max = check_range("length_max_m", params.length_max_m, l, 100.0)?;
    if l_min <= 0.0 {
        return Err(ParamError::NotPositive("length_min_m"));
    }
    let certified = Angle::from_deg(deg);
    let short = geometry.with_length(l_min)?;
    let long = geometry.with_length(l_max)?;
    let top = |g: &RideGeometry| {
        g.speed_for_angle(certified)
            .map(crate::units::AngularSpeed::rad_per_s)
            .map_err(|_| ParamError::OutOfRange("certified_angle_deg"))
    };
    let grid_top = smaller(top(&short)?, smaller(top(geometry)?, top(&long)?));
    Ok((short, long, certified, grid_top))
}

/// One length's envelope on the common grid (its own frame: the M0's stack).
#[inline(never)]
fn envelope_on(
    geometry: &RideGeometry,
    certified: Angle,
    grid_top: f32,
) -> Result<SwingEnvelope, ParamError> {
    SwingEnvelope::with_grid_top(geometry, certified, grid_top)
}

/// Folds the three lengths' envelopes into `band` (in place, one envelope at
/// a time: the M0's stack) and returns the lengths' models.
#[inline(never)]
fn fill_band(
    band: &mut BandEnvelope,
    geometry: &RideGeometry,
    params: &GovernorParams,
) -> Result<[SeatModel; LENGTH_MODELS], ParamError> {
    let (short, long, certified, grid_top) = band_grid(geometry, params)?;
    let mut models = [SeatModel::new(geometry, 0.0)?; LENGTH_MODELS];
    for (slot, g) in [(0, &short), (1, geometry), (2, &long)] {
        let e = envelope_on(g, certified, grid_top)?;
        if let Some(m) = models.get_mut(slot) {
            *m = *e.model();
        }
        band.fold(slot, &e);
    }
    band.finish(params.speed_uncertainty_rad_s);
    Ok(models)
}

/// The part of a certificate every candidate target shares.
struct Prefix {
    /// Growth of √S up to the braking point (without the present swing), 1/s.
    grown: f32,
    /// Smallest slack up to the braking point, 1/s.
    slack: f32,
    /// growth_to(|v_ext|).
    growth_ext: f32,
    /// Present swing bound √S of each length, 1/s.
    swings: [f32; LENGTH_MODELS],
    /// The largest of them, 1/s.
    swing: f32,
}

/// One piece of the path from signed speed `from` to `to`: adds its growth to
/// `r` and returns the smallest slack along it.
fn piece(
    band: &BandEnvelope,
    swings: &[f32; LENGTH_MODELS],
    r: &mut f32,
    from: f32,
    to: f32,
    u: f32,
) -> f32 {
    // Split at zero when the direction of rotation changes.
    if (from > 0.0 && to < 0.0) || (from < 0.0 && to > 0.0) {
        let first = magnitude_piece(band, swings, r, libm::fabsf(from), 0.0, u);
        let second = magnitude_piece(band, swings, r, 0.0, libm::fabsf(to), u);
        return least(first, second);
    }
    magnitude_piece(band, swings, r, libm::fabsf(from), libm::fabsf(to), u)
}

fn magnitude_piece(
    band: &BandEnvelope,
    swings: &[f32; LENGTH_MODELS],
    r: &mut f32,
    m1: f32,
    m2: f32,
    u: f32,
) -> f32 {
    if m2 >= m1 {
        // Up: √S grows, the room shrinks; the end is the binding point.
        *r += band.growth_to(m2) - band.growth_to(m1);
        band.room_less(m2 + u, swings) - *r
    } else {
        // Down: the room grows back as the speed falls, √S may grow too;
        // checked cell by cell (whole cells from the band's table).
        let slack = band.down_slack_paired(swings, *r, m2, m1);
        *r += band.growth_to(m1) - band.growth_to(m2);
        slack
    }
}

impl RequestGovernor for SwingGovernor {
    fn govern(&mut self, input: &GovernorInput) -> GovernorDecision {
        let Some(measured) = input.measured_rad_s else {
            return fault(input);
        };
        let dt = smaller(input.dt_s, MAX_ADVANCE_S);
        let stepped = match self.estimator.advance(measured, dt) {
            Ok(stepped) => stepped,
            Err(EstimatorFault::RestNotConfirmed | EstimatorFault::NotFinite)
                if libm::fabsf(measured) <= super::estimator::REST_SPEED_RAD_S
                    && !self.estimator.is_confirmed() =>
            {
                // Standing still, swing unknown: nothing may start.
                self.admitted = 0.0;
                return GovernorDecision {
                    admitted_rad_s: 0.0,
                    status: GovernorStatus::Restricting,
                };
            }
            Err(_) => return fault(input),
        };
        if !self.estimator.is_confirmed() {
            self.admitted = 0.0;
            return GovernorDecision {
                admitted_rad_s: 0.0,
                status: GovernorStatus::Restricting,
            };
        }
        if input.stopping {
            self.admitted = 0.0;
            return GovernorDecision {
                admitted_rad_s: 0.0,
                status: GovernorStatus::Free,
            };
        }
        if stepped {
            return self.decide(input, measured);
        }
        let status = if self.admitted == input.clamped_request_rad_s {
            GovernorStatus::Free
        } else {
            GovernorStatus::Restricting
        };
        GovernorDecision {
            admitted_rad_s: self.admitted,
            status,
        }
    }
}

/// The verdict when the governor cannot vouch for the seats: the interlock
/// trips on it; the target named is the braking of the acceleration.
fn fault(input: &GovernorInput) -> GovernorDecision {
    GovernorDecision {
        admitted_rad_s: input.commanded.speed.rad_per_s(),
        status: GovernorStatus::Fault,
    }
}
