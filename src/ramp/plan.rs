//! The closed-form, time-optimal plan: a short fixed array of constant-jerk
//! segments, each evaluated from its own anchor.
//!
//! See `docs/ramp.md` for the derivation. In short, every plan is built from at
//! most three steps, each in closed form:
//!
//! 1. If the acceleration points away from the target, or toward it but so
//!    strongly that the speed must pass the target, bring it to zero at maximum
//!    jerk (one segment).
//! 2. If the acceleration is outside the limit that applies, brake it back to
//!    that limit at maximum jerk (at most two segments: a second one only if the
//!    speed crosses zero during the first and the other side's limit is smaller;
//!    a brake cannot follow step 1, whose single segment already ends at zero).
//! 3. A monotone move to the target: the three-phase profile of Biagiotti &
//!    Melchiorri (2008) §3.4 with a nonzero initial acceleration, or, when the
//!    speed crosses zero with different limits on the two sides, one of three
//!    crossing profiles (at most five segments).
//!
//! Steps 1 and 2 never both produce segments that step 3 then extends beyond
//! five, so [`MAX_SEGMENTS`] = 6 holds for every plan (a test enumerates the
//! cases).

use super::clock::{quanta_from_s, s_from_quanta};
use super::limits::{RampLimits, Reverse};
use super::setpoint::{RampPhase, Setpoint};
use crate::error::ParamError;
use crate::units::AngularSpeed;

/// Largest number of segments in a plan.
pub const MAX_SEGMENTS: usize = 6;

/// Largest accepted speed magnitude (state and target), rad/s (about 95,000 rpm,
/// the same bound as the drive scaling's full scale).
pub const MAX_SPEED_RAD_S: f32 = 10_000.0;

/// Largest accepted magnitude of an initial acceleration, rad/s²: ten times the
/// largest limit, so that a state from a steeper limit set can still be planned.
pub const MAX_INITIAL_ACCELERATION_RAD_S2: f32 = 10.0 * RampLimits::MAX_ACCELERATION_RAD_S2;

/// Relative jerk excess below which a raised floor-stop jerk counts as rounding.
const JERK_ROUNDING: f32 = 1.0e-4;

/// One constant-jerk piece of a plan.
///
/// Within the segment, at time `t` seconds after its start,
/// `speed = start_speed + start_acceleration·t + jerk·t²/2` and
/// `acceleration = start_acceleration + jerk·t`. The end values are stored too:
/// they are the next segment's anchor; in the second half of the segment the
/// same polynomial is evaluated from them (`τ` = time to the end:
/// `speed = end_speed − end_acceleration·τ + jerk·τ²/2`). Evaluation clamps
/// into `[start, end]` (the acceleration never changes sign inside a segment,
/// so the speed is monotone there), which rules out overshoot by rounding.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Segment {
    start_speed: f32,
    start_accel: f32,
    jerk: f32,
    end_speed: f32,
    end_accel: f32,
    duration_quanta: u64,
    /// The sign of `jerk` as a phase, kept so that a tick does not derive it
    /// (it fits in the struct's padding).
    phase: RampPhase,
}

impl Segment {
    const EMPTY: Self = Self {
        start_speed: 0.0,
        start_accel: 0.0,
        jerk: 0.0,
        end_speed: 0.0,
        end_accel: 0.0,
        duration_quanta: 0,
        phase: RampPhase::AccelerationConstant,
    };

    /// Speed at the segment's start (its anchor), rad/s.
    #[must_use]
    pub const fn start_speed_rad_s(&self) -> f32 {
        self.start_speed
    }

    /// Acceleration at the segment's start, rad/s².
    #[must_use]
    pub const fn start_acceleration_rad_s2(&self) -> f32 {
        self.start_accel
    }

    /// Constant jerk over the segment, rad/s³.
    #[must_use]
    pub const fn jerk_rad_s3(&self) -> f32 {
        self.jerk
    }

    /// Duration, s (rounded to `f32` from the exact [`Segment::duration_quanta`]).
    #[must_use]
    pub fn duration_s(&self) -> f32 {
        s_from_quanta(self.duration_quanta)
    }

    /// Duration in time quanta of 2⁻³⁶ s (see [`QUANTA_PER_SECOND`](crate::ramp::QUANTA_PER_SECOND)).
    #[must_use]
    pub const fn duration_quanta(&self) -> u64 {
        self.duration_quanta
    }

    /// Speed at the segment's end (the next anchor), rad/s.
    #[must_use]
    pub const fn end_speed_rad_s(&self) -> f32 {
        self.end_speed
    }

    /// Acceleration at the segment's end, rad/s².
    #[must_use]
    pub const fn end_acceleration_rad_s2(&self) -> f32 {
        self.end_accel
    }

    /// The phase this segment's jerk stands for.
    #[must_use]
    #[inline]
    pub const fn phase(&self) -> RampPhase {
        self.phase
    }

    /// The state `quanta` after the segment's start (clamped to the segment).
    #[must_use]
    #[inline]
    pub fn state_at(&self, quanta: u64) -> Setpoint {
        self.state_inside(quanta.min(self.duration_quanta))
    }

    /// [`Segment::state_at`] for `quanta` not past the segment's end.
    #[inline]
    fn state_inside(&self, quanta: u64) -> Setpoint {
        let (speed, accel) = self.evaluate(quanta);
        Setpoint {
            speed: AngularSpeed::from_rad_per_s(between_selected(
                speed,
                self.start_speed,
                self.end_speed,
            )),
            acceleration_rad_s2: between_selected(accel, self.start_accel, self.end_accel),
            jerk_rad_s3: self.jerk,
            phase: self.phase,
        }
    }

    /// Speed and acceleration `q` quanta into the segment (`q` not past its
    /// end), unclamped, from the nearer anchor: the start in the first half,
    /// the end in the second. From the end the approach to a target keeps its
    /// full relative precision (near a stop the speed is `j·τ²/2`, not a
    /// difference of larger numbers).
    #[inline]
    fn evaluate(&self, q: u64) -> (f32, f32) {
        if q <= self.duration_quanta / 2 {
            let t = s_from_quanta(q);
            (
                self.start_speed + t * (self.start_accel + 0.5 * self.jerk * t),
                self.start_accel + self.jerk * t,
            )
        } else {
            let tau = s_from_quanta(self.duration_quanta - q);
            (
                self.end_speed - tau * (self.end_accel - 0.5 * self.jerk * tau),
                self.end_accel - self.jerk * tau,
            )
        }
    }

    /// The state `quanta` after the segment's start as rounded value plus
    /// rounding error, so that a re-plan can anchor at it without losing the
    /// error (otherwise a re-plan on every tick would add one rounding per tick,
    /// like summing increments in `f32`). `lo` is the rounding error of the
    /// segment's own start anchor (nonzero only for a plan's first segment).
    fn anchor_at(&self, quanta: u64, lo: (f32, f32)) -> Anchor {
        let q = quanta.min(self.duration_quanta);
        let ((v, v_lo), (a, a_lo)) = if q <= self.duration_quanta / 2 {
            let t = s_from_quanta(q);
            let a0 = self.start_accel + lo.1;
            let v_inc = lo.0 + t * (a0 + 0.5 * self.jerk * t);
            let a_inc = lo.1 + self.jerk * t;
            (
                two_sum(self.start_speed, v_inc),
                two_sum(self.start_accel, a_inc),
            )
        } else {
            let tau = s_from_quanta(self.duration_quanta - q);
            (
                two_sum(
                    self.end_speed,
                    -(tau * (self.end_accel - 0.5 * self.jerk * tau)),
                ),
                two_sum(self.end_accel, -(self.jerk * tau)),
            )
        };
        let (v, v_lo) = clamp_anchor(v, v_lo, self.start_speed, self.end_speed);
        let (a, a_lo) = clamp_anchor(a, a_lo, self.start_accel, self.end_accel);
        Anchor { v, v_lo, a, a_lo }
    }
}

/// The phase a jerk stands for.
#[inline]
fn phase_of(jerk: f32) -> RampPhase {
    if jerk > 0.0 {
        RampPhase::AccelerationIncreasing
    } else if jerk < 0.0 {
        RampPhase::AccelerationDecreasing
    } else {
        RampPhase::AccelerationConstant
    }
}

/// A state as rounded `f32` values plus their rounding errors.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Anchor {
    pub(crate) v: f32,
    pub(crate) v_lo: f32,
    pub(crate) a: f32,
    pub(crate) a_lo: f32,
}

impl Anchor {
    /// An exactly known state.
    pub(crate) const fn exact(v: f32, a: f32) -> Self {
        Self {
            v,
            v_lo: 0.0,
            a,
            a_lo: 0.0,
        }
    }
}

/// `a + b` rounded, and its exact rounding error (Knuth's TwoSum; exact in
/// IEEE binary arithmetic with round-to-nearest, which Rust guarantees).
fn two_sum(a: f32, b: f32) -> (f32, f32) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

/// A value limited to the interval spanned by `p` and `q`; the error term is
/// dropped when the limit applies (the limit is then the exact value).
fn clamp_anchor(x: f32, lo: f32, p: f32, q: f32) -> (f32, f32) {
    let c = between(x, p, q);
    if c == x {
        (x, lo)
    } else {
        (c, 0.0)
    }
}

/// `x` limited to the closed interval spanned by `p` and `q` (in either order);
/// NaN gives the lower end, as `x.max(lo).min(hi)` would. Plain comparisons:
/// `f32::max`/`min` are library calls (`fmaxf`/`fminf`) on Arm's FPU, which has
/// no IEEE maxNum instruction before Armv8. Used in planning, where nested
/// branches are cheapest on both the host and the Cortex-M4F.
#[inline]
fn between(x: f32, p: f32, q: f32) -> f32 {
    let (lo, hi) = if p <= q { (p, q) } else { (q, p) };
    if x >= lo {
        if x <= hi {
            x
        } else {
            hi
        }
    } else {
        lo
    }
}

/// [`between`] written as four selects without nested branches, for the
/// per-tick evaluation: on the host they compile to conditional moves or
/// min/max instructions, about a fifth of a tick less than the branches.
#[inline]
fn between_selected(x: f32, p: f32, q: f32) -> f32 {
    let ordered = p <= q;
    let lo = if ordered { p } else { q };
    let hi = if ordered { q } else { p };
    let x = if x >= lo { x } else { lo };
    if x <= hi {
        x
    } else {
        hi
    }
}

/// `x.max(c)` for a finite `c` (NaN gives `c`), in plain comparisons.
#[inline]
fn at_least(x: f32, c: f32) -> f32 {
    if x > c {
        x
    } else {
        c
    }
}

/// `x.min(c)` for a finite `c` (NaN gives `c`), in plain comparisons.
#[inline]
fn at_most(x: f32, c: f32) -> f32 {
    if x < c {
        x
    } else {
        c
    }
}

/// A complete plan from a start state to a target, in closed form.
///
/// Equality compares the segments in use and the flags (storage beyond the
/// last segment is not part of the plan).
#[derive(Debug, Clone, Copy)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Plan {
    segments: [Segment; MAX_SEGMENTS],
    /// Rounding errors (speed, acceleration) of the first segment's start
    /// anchor when the plan starts from an evaluated state (re-plan), else 0.
    start_lo: (f32, f32),
    len: u8,
    target: f32,
    target_clamped: bool,
    overshoot: bool,
    braked: bool,
    jerk_raised: bool,
}

impl PartialEq for Plan {
    fn eq(&self, other: &Self) -> bool {
        self.segments() == other.segments()
            && self.start_lo == other.start_lo
            && self.target.to_bits() == other.target.to_bits()
            && self.target_clamped == other.target_clamped
            && self.overshoot == other.overshoot
            && self.braked == other.braked
            && self.jerk_raised == other.jerk_raised
    }
}

impl Plan {
    /// A plan that is already complete: standing at `target`.
    #[must_use]
    pub(crate) const fn at_rest(target: f32) -> Self {
        Self {
            segments: [Segment::EMPTY; MAX_SEGMENTS],
            start_lo: (0.0, 0.0),
            len: 0,
            target,
            target_clamped: false,
            overshoot: false,
            braked: false,
            jerk_raised: false,
        }
    }

    /// Plans, in closed form, the time-optimal jerk-limited move from `speed`
    /// with `acceleration_rad_s2` to `target` with zero final acceleration.
    ///
    /// * `speed`: start speed, |speed| ≤ [`MAX_SPEED_RAD_S`]; `>= 0` when reverse is forbidden.
    /// * `acceleration_rad_s2`: start acceleration, rad/s², |a| ≤
    ///   [`MAX_INITIAL_ACCELERATION_RAD_S2`]; may lie outside `limits` (it is
    ///   braked back first).
    /// * `target`: |target| ≤ [`MAX_SPEED_RAD_S`]; with [`Reverse::Forbidden`] a
    ///   negative target is clamped to zero, see [`Plan::target_clamped`].
    ///
    /// # Errors
    /// [`ParamError`] naming `speed`, `acceleration` or `target`.
    pub fn new(
        limits: &RampLimits,
        reverse: Reverse,
        speed: AngularSpeed,
        acceleration_rad_s2: f32,
        target: AngularSpeed,
    ) -> Result<Self, ParamError> {
        let (v0, a0, vt, clamped) = checked_start(reverse, speed, acceleration_rad_s2, target)?;
        let mut plan = Self::at_rest(vt);
        build(&mut plan, limits, reverse, Anchor::exact(v0, a0), vt);
        plan.target_clamped = clamped;
        Ok(plan)
    }

    /// As [`Plan::new`], but re-planning this plan in place (for a plan kept in
    /// static memory: no copy of the segment array).
    ///
    /// # Errors
    /// As [`Plan::new`]; the plan is then unchanged.
    pub fn replan(
        &mut self,
        limits: &RampLimits,
        reverse: Reverse,
        speed: AngularSpeed,
        acceleration_rad_s2: f32,
        target: AngularSpeed,
    ) -> Result<(), ParamError> {
        let (v0, a0, vt, clamped) = checked_start(reverse, speed, acceleration_rad_s2, target)?;
        build(self, limits, reverse, Anchor::exact(v0, a0), vt);
        self.target_clamped = clamped;
        Ok(())
    }

    /// The segments, in order (at most [`MAX_SEGMENTS`]).
    #[must_use]
    #[inline]
    pub fn segments(&self) -> &[Segment] {
        self.segments
            .get(..usize::from(self.len))
            .unwrap_or(&self.segments)
    }

    /// The speed the plan ends at, exactly.
    #[must_use]
    pub const fn target(&self) -> AngularSpeed {
        AngularSpeed::from_rad_per_s(self.target)
    }

    /// `true` if a negative target was clamped to zero (reverse forbidden).
    #[must_use]
    pub const fn target_clamped(&self) -> bool {
        self.target_clamped
    }

    /// `true` if the initial acceleration forces the speed past the target before
    /// it settles. The plan then takes the smallest possible excursion (the
    /// acceleration goes to zero at maximum jerk at once).
    #[must_use]
    pub const fn overshoots(&self) -> bool {
        self.overshoot
    }

    /// `true` if the initial acceleration was outside the limit that applies and
    /// had to be braked back at maximum jerk.
    #[must_use]
    pub const fn braked_initial_acceleration(&self) -> bool {
        self.braked
    }

    /// `true` if, with reverse forbidden, the start state could not reach zero
    /// acceleration before zero speed at the jerk limit, so the plan uses the
    /// smallest jerk that stops exactly at zero speed instead (possible only after
    /// a change to a lower jerk limit; see `docs/ramp.md`).
    #[must_use]
    pub const fn jerk_raised(&self) -> bool {
        self.jerk_raised
    }

    /// Total duration, s.
    #[must_use]
    pub fn duration_s(&self) -> f32 {
        s_from_quanta(self.duration_quanta())
    }

    /// Total duration in time quanta.
    #[must_use]
    pub fn duration_quanta(&self) -> u64 {
        self.segments()
            .iter()
            .fold(0_u64, |sum, s| sum.saturating_add(s.duration_quanta))
    }

    /// The planned state `after_s` seconds after the plan's start; the target
    /// (with zero acceleration) at and after the end.
    ///
    /// # Errors
    /// [`ParamError`] naming `after_s` when negative or not finite.
    pub fn state_at(&self, after_s: f32) -> Result<Setpoint, ParamError> {
        if !after_s.is_finite() {
            return Err(ParamError::NonFinite("after_s"));
        }
        if after_s < 0.0 {
            return Err(ParamError::Negative("after_s"));
        }
        Ok(self.state_after(0, quanta_from_s(after_s)))
    }

    /// The state `quanta` after the start of segment `index` (any value: runs
    /// on through later segments, at most [`MAX_SEGMENTS`] of them).
    pub(crate) fn state_after(&self, index: usize, quanta: u64) -> Setpoint {
        let (index, into) = self.advance(index, quanta);
        match self.segments().get(index) {
            Some(seg) => seg.state_at(into),
            None => Setpoint::at_target(self.target()),
        }
    }

    /// Like [`Plan::state_after`], with rounding errors kept (for re-planning).
    pub(crate) fn anchor_after(&self, index: usize, quanta: u64) -> Anchor {
        let (index, into) = self.advance(index, quanta);
        let lo = if index == 0 {
            self.start_lo
        } else {
            (0.0, 0.0)
        };
        match self.segments().get(index) {
            Some(seg) => seg.anchor_at(into, lo),
            None => Anchor::exact(self.target, 0.0),
        }
    }

    /// The state `quanta` into segment `index` if that is still inside it (the
    /// common tick: one segment lookup for the test and the evaluation).
    #[inline]
    pub(crate) fn within(&self, index: usize, quanta: u64) -> Option<Setpoint> {
        match self.segments().get(index) {
            Some(seg) if quanta < seg.duration_quanta => Some(seg.state_inside(quanta)),
            _ => None,
        }
    }

    /// Moves a position (segment `index`, `into` quanta within it) on by
    /// `quanta`; returns the new position. Past the end: `(len, 0)`.
    #[inline]
    pub(crate) fn advance(&self, mut index: usize, quanta: u64) -> (usize, u64) {
        // The common tick stays inside the current segment.
        if index < usize::from(self.len) {
            if let Some(seg) = self.segments.get(index) {
                if quanta < seg.duration_quanta {
                    return (index, quanta);
                }
            }
        }
        let mut into = quanta;
        // At most MAX_SEGMENTS iterations.
        while let Some(seg) = self.segments().get(index) {
            if into < seg.duration_quanta {
                return (index, into);
            }
            into -= seg.duration_quanta;
            index += 1;
        }
        (usize::from(self.len), 0)
    }

    /// Quanta from a position to the end of the plan.
    pub(crate) fn remaining_quanta(&self, index: usize, into: u64) -> u64 {
        self.segments()
            .iter()
            .skip(index)
            .fold(0_u64, |sum, s| sum.saturating_add(s.duration_quanta))
            .saturating_sub(into)
    }
}

/// Checks a start state and target for [`Plan::new`] and [`Plan::replan`]:
/// `(speed, acceleration, target after the reverse policy, clamped)`.
#[inline]
fn checked_start(
    reverse: Reverse,
    speed: AngularSpeed,
    acceleration_rad_s2: f32,
    target: AngularSpeed,
) -> Result<(f32, f32, f32, bool), ParamError> {
    let (v0, a0, vt) = (speed.rad_per_s(), acceleration_rad_s2, target.rad_per_s());
    // One comparison per value on the common path (each is false for NaN and
    // infinities too); which check failed is found off it.
    if v0.abs() <= MAX_SPEED_RAD_S
        && a0.abs() <= MAX_INITIAL_ACCELERATION_RAD_S2
        && vt.abs() <= MAX_SPEED_RAD_S
        && !(reverse == Reverse::Forbidden && v0 < 0.0)
    {
        let (vt, clamped) = admit_target(reverse, vt);
        return Ok((v0, a0, vt, clamped));
    }
    refused_start(reverse, speed, acceleration_rad_s2, target)
}

/// Why [`checked_start`] refused its inputs (the checks in order: speed,
/// reverse policy, acceleration, target).
#[cold]
fn refused_start(
    reverse: Reverse,
    speed: AngularSpeed,
    acceleration_rad_s2: f32,
    target: AngularSpeed,
) -> Result<(f32, f32, f32, bool), ParamError> {
    let v0 = check_speed("speed", speed.rad_per_s())?;
    if reverse == Reverse::Forbidden && v0 < 0.0 {
        return Err(ParamError::Negative("speed"));
    }
    let a0 = acceleration_rad_s2;
    if !a0.is_finite() {
        return Err(ParamError::NonFinite("acceleration"));
    }
    if a0.abs() > MAX_INITIAL_ACCELERATION_RAD_S2 {
        return Err(ParamError::OutOfRange("acceleration"));
    }
    let (vt, clamped) = admit_target(reverse, check_speed("target", target.rad_per_s())?);
    Ok((v0, a0, vt, clamped))
}

/// Finite and within ±[`MAX_SPEED_RAD_S`].
pub(crate) fn check_speed(name: &'static str, v: f32) -> Result<f32, ParamError> {
    if !v.is_finite() {
        Err(ParamError::NonFinite(name))
    } else if v.abs() > MAX_SPEED_RAD_S {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(v)
    }
}

/// Applies the reverse policy to a checked target: `(target, clamped)`.
pub(crate) fn admit_target(reverse: Reverse, vt: f32) -> (f32, bool) {
    if vt == 0.0 {
        // Also turns -0.0 into +0.0.
        (0.0, false)
    } else if reverse == Reverse::Forbidden && vt < 0.0 {
        (0.0, true)
    } else {
        (vt, false)
    }
}

/// Collects segments into a plan; anchors are carried from one segment to the
/// next.
struct Builder<'p> {
    plan: &'p mut Plan,
    v: f32,
    a: f32,
    overflow: bool,
}

impl<'p> Builder<'p> {
    /// Empties `plan` for a build toward `target` (the flags are set by the
    /// caller when the build is done; the segment storage is left as it is:
    /// only `len` segments are ever read).
    #[inline]
    fn new(plan: &'p mut Plan, start: Anchor, target: f32) -> Self {
        plan.len = 0;
        plan.target = target;
        // The start state's rounding errors belong to the first segment.
        plan.start_lo = (start.v_lo, start.a_lo);
        Self {
            plan,
            v: start.v,
            a: start.a,
            overflow: false,
        }
    }

    /// Appends a segment from the current anchor with `jerk` for `duration_s`
    /// ending at (`end_v`, `end_a`), which become the next anchor. Segments
    /// shorter than one time quantum are dropped (the anchor still moves on).
    #[inline]
    fn push(&mut self, jerk: f32, duration_s: f32, end_v: f32, end_a: f32) {
        // NaN, negative and infinite durations give 0 or saturate; none
        // arises from the closed forms, whose inputs are checked.
        let quanta = quanta_from_s(duration_s);
        if quanta == 0 {
            // An empty phase. If it moves the anchor before any segment was
            // stored, the start state's rounding errors no longer apply.
            if self.plan.len == 0 && (end_v != self.v || end_a != self.a) {
                self.plan.start_lo = (0.0, 0.0);
            }
        } else if let Some(slot) = self.plan.segments.get_mut(usize::from(self.plan.len)) {
            *slot = Segment {
                start_speed: self.v,
                start_accel: self.a,
                jerk,
                end_speed: end_v,
                end_accel: end_a,
                duration_quanta: quanta,
                phase: phase_of(jerk),
            };
            self.plan.len += 1;
        } else {
            self.overflow = true;
        }
        self.v = end_v;
        self.a = end_a;
    }

    /// [`Builder::push`] in mirrored coordinates `w = s·v` (`s` = ±1).
    #[inline]
    fn push_w(&mut self, s: f32, jerk_w: f32, duration_s: f32, end_w: f32, end_alpha: f32) {
        self.push(s * jerk_w, duration_s, s * end_w, s * end_alpha);
    }
}

/// Jerk limit and its reciprocals (planning multiplies instead of divides).
#[derive(Clone, Copy)]
struct Kin {
    j: f32,
    /// `1 / j`.
    ij: f32,
    /// `1 / (2 j)`.
    hij: f32,
}

/// An acceleration limit and its reciprocal.
#[derive(Clone, Copy)]
struct Lim {
    max: f32,
    inv: f32,
}

/// The three phases of a monotone rising move in mirrored coordinates
/// (Biagiotti & Melchiorri 2008, §3.4, with a nonzero initial acceleration).
struct ThreePhase {
    /// Ramp from the initial acceleration to `peak` at `+jerk`, s.
    t1: f32,
    /// Hold at `peak`, s.
    t2: f32,
    /// Ramp from `peak` to zero at `-jerk`, s.
    t3: f32,
    /// Largest acceleration of the move.
    peak: f32,
    /// `w` at the end of the first ramp.
    w1: f32,
    /// `w` at the start of the last ramp.
    w2: f32,
}

/// Rising move of `w` from (`w0`, `al0`) to `wt` with acceleration in
/// `[0, lim]`, `0 <= al0 <= lim`, and no overshoot (`w0 + al0²/2j <= wt`).
fn three_phase(w0: f32, al0: f32, wt: f32, lim: Lim, k: Kin) -> ThreePhase {
    let al0 = at_most(at_least(al0, 0.0), lim.max);
    let dw = at_least(wt - w0, 0.0);
    // Peak when the limit is not reached: the speed change splits into the
    // rise from al0 to h, (h² - al0²)/2j, and the fall from h to 0, h²/2j.
    let h = crate::math::sqrt(0.5 * al0 * al0 + k.j * dw);
    let (t1, t2, peak) = if h <= lim.max {
        (at_least((h - al0) * k.ij, 0.0), 0.0, h)
    } else {
        let hold = dw * lim.inv - lim.max * k.ij + al0 * al0 * k.hij * lim.inv;
        ((lim.max - al0) * k.ij, at_least(hold, 0.0), lim.max)
    };
    let w2 = between(wt - peak * peak * k.hij, w0, wt);
    let w1 = if t2 > 0.0 {
        between(w0 + (peak * peak - al0 * al0) * k.hij, w0, w2)
    } else {
        w2
    };
    ThreePhase {
        t1,
        t2,
        t3: peak * k.ij,
        peak,
        w1,
        w2,
    }
}

fn emit_three_phase(b: &mut Builder<'_>, s: f32, p: &ThreePhase, wt: f32, k: Kin) {
    b.push_w(s, k.j, p.t1, p.w1, p.peak);
    b.push_w(s, 0.0, p.t2, p.w2, p.peak);
    b.push_w(s, -k.j, p.t3, wt, 0.0);
}

/// Builds the plan into `plan`; inputs already checked (finite, in range,
/// policy applied).
pub(crate) fn build(
    plan: &mut Plan,
    limits: &RampLimits,
    reverse: Reverse,
    start: Anchor,
    vt: f32,
) {
    let (v0, a0) = (start.v, start.a);
    let (inv_up, inv_down, ij) = limits.reciprocals();
    let k = Kin {
        j: limits.max_jerk_rad_s3(),
        ij,
        hij: 0.5 * ij,
    };
    let j = k.j;
    let mut b = Builder::new(plan, start, vt);
    let mut jerk_raised = false;

    // Step 1: acceleration pointing away from the target, or toward it so
    // strongly that the target would be passed: bring it to zero at once.
    let mut overshoot = false;
    if a0 != 0.0 {
        let dir = a0.signum();
        let v_stop = v0 + a0 * a0.abs() * k.hij;
        if dir * (vt - v_stop) <= 0.0 {
            overshoot = dir * (vt - v0) >= 0.0 && vt != v_stop;
            if reverse == Reverse::Forbidden && v_stop < 0.0 {
                // Only reachable after a change to a lower jerk limit: stop
                // exactly at zero speed with the smallest sufficient jerk.
                if v0 > 0.0 {
                    let needed = a0 * a0 / (2.0 * v0);
                    let jj = at_least(needed, j);
                    jerk_raised = needed > j * (1.0 + JERK_ROUNDING);
                    b.push(jj, -a0 / jj, 0.0, 0.0);
                } else {
                    jerk_raised = true;
                    b.push(0.0, 0.0, 0.0, 0.0);
                }
            } else {
                b.push(-dir * j, a0.abs() * k.ij, v_stop, 0.0);
            }
        }
    }

    // Step 2: acceleration outside the limit that applies: brake it back.
    let mut braked = false;
    for _ in 0..2 {
        let (v, a) = (b.v, b.a);
        let bound = limits.bound_for(v, a);
        if a.abs() <= bound {
            break;
        }
        braked = true;
        let end_a = a.signum() * bound;
        let jerk = -a.signum() * j;
        let mut end_v = v + a.signum() * (a * a - end_a * end_a) * k.hij;
        if reverse == Reverse::Forbidden {
            end_v = at_least(end_v, 0.0);
        }
        b.push(jerk, (a.abs() - bound) * k.ij, end_v, end_a);
    }

    // Step 3: monotone move to the target, in mirrored coordinates w = s·v so
    // that w rises. While w < 0 the speed's magnitude falls (deceleration
    // limit); from w = 0 on it rises (acceleration limit).
    let (v, a) = (b.v, b.a);
    if v != vt {
        let s = if vt > v { 1.0 } else { -1.0 };
        let (w0, al0, wt) = (s * v, at_least(s * a, 0.0), s * vt);
        let up = Lim {
            max: limits.max_acceleration_rad_s2(),
            inv: inv_up,
        };
        let down = Lim {
            max: limits.max_deceleration_rad_s2(),
            inv: inv_down,
        };
        if w0 < 0.0 && wt > 0.0 && up.max != down.max {
            crossing(&mut b, s, w0, al0, wt, down, up, k);
        } else {
            // The speed's magnitude only rises (w0 >= 0), only falls (wt <= 0),
            // or it passes zero under equal limits, where the crossing profiles
            // all come down to this one (see `crossing`, case (a)).
            let lim = if w0 >= 0.0 { up } else { down };
            let p = three_phase(w0, al0, wt, lim, k);
            emit_three_phase(&mut b, s, &p, wt, k);
        }
    }

    if b.overflow {
        // Not reachable (see the module docs); kept total with a plan that is
        // never worse than the limits allow.
        conservative(b.plan, limits, start, vt);
    }
    plan.target_clamped = false;
    plan.overshoot = overshoot;
    plan.braked = braked;
    plan.jerk_raised = jerk_raised;
}

/// Rising move through `w = 0` from `w0 < 0` to `wt > 0`, with limit `pre`
/// while `w < 0` and `post` after; `0 <= al0 <= pre`. Chooses, in closed form,
/// the time-optimal one of the crossing profiles derived in `docs/ramp.md`.
#[allow(clippy::too_many_arguments)]
fn crossing(b: &mut Builder<'_>, s: f32, w0: f32, al0: f32, wt: f32, pre: Lim, post: Lim, k: Kin) {
    // Acceleration at the crossing if it kept rising at +j from the start
    // (computed only where a case needs it).
    let al_c = || crate::math::sqrt(al0 * al0 - 2.0 * k.j * w0);
    if post.max >= pre.max {
        // (a) The profile under the looser limit everywhere stays within `pre`
        // before the crossing.
        let loose = three_phase(w0, al0, wt, post, k);
        if loose.peak <= pre.max || al_c() <= pre.max {
            emit_three_phase(b, s, &loose, wt, k);
            return;
        }
        // (b) Under `pre` everywhere, the crossing falls in the final ramp.
        let tight = three_phase(w0, al0, wt, pre, k);
        if wt <= tight.peak * tight.peak * k.hij {
            emit_three_phase(b, s, &tight, wt, k);
            return;
        }
        // (c) Rise to `pre`, hold it until zero speed, then continue from
        // (0, pre) under `post`.
        let w_r = at_most(w0 + (pre.max * pre.max - al0 * al0) * k.hij, 0.0);
        b.push_w(s, k.j, (pre.max - al0) * k.ij, w_r, pre.max);
        b.push_w(s, 0.0, -w_r * pre.inv, 0.0, pre.max);
        let rest = three_phase(0.0, pre.max, wt, post, k);
        emit_three_phase(b, s, &rest, wt, k);
    } else {
        // (a') Under `pre` everywhere the acceleration after the crossing stays
        // within `post`.
        let loose = three_phase(w0, al0, wt, pre, k);
        if loose.peak <= post.max || wt <= post.max * post.max * k.hij {
            emit_three_phase(b, s, &loose, wt, k);
            return;
        }
        // (b') Under `post` everywhere, the crossing falls in the first ramp.
        if al0 <= post.max {
            let tight = three_phase(w0, al0, wt, post, k);
            if al_c() <= tight.peak {
                emit_three_phase(b, s, &tight, wt, k);
                return;
            }
        }
        // (c') Reach the crossing with acceleration exactly `post` (rise, hold
        // at `pre`, fall to `post`), hold `post`, fall to zero.
        let q = post.max;
        let dw = -w0;
        let h = crate::math::sqrt(0.5 * (al0 * al0 + q * q) + k.j * dw);
        if h < al0 || h < q {
            // The acceleration cannot come down to `post` before zero speed:
            // the excess is forced by the initial state.
            fallback(b, s, w0, al0, wt, post, k);
            return;
        }
        let (t1, t2, peak) = if h <= pre.max {
            ((h - al0) * k.ij, 0.0, h)
        } else {
            let hold = (al0 * al0 + q * q) * k.hij * pre.inv - pre.max * k.ij + dw * pre.inv;
            ((pre.max - al0) * k.ij, at_least(hold, 0.0), pre.max)
        };
        let w2 = between(-(peak * peak - q * q) * k.hij, w0, 0.0);
        let w1 = if t2 > 0.0 {
            between(w0 + (peak * peak - al0 * al0) * k.hij, w0, w2)
        } else {
            w2
        };
        b.push_w(s, k.j, t1, w1, peak);
        b.push_w(s, 0.0, t2, w2, peak);
        b.push_w(s, -k.j, (peak - q) * k.ij, 0.0, q);
        let w3 = at_least(wt - q * q * k.hij, 0.0);
        b.push_w(s, 0.0, w3 * post.inv, w3, q);
        b.push_w(s, -k.j, q * k.ij, wt, 0.0);
    }
}

/// Brake to `m` (the smaller limit) at maximum jerk if above it, then the
/// three-phase move under `m`.
fn fallback(b: &mut Builder<'_>, s: f32, w0: f32, al0: f32, wt: f32, m: Lim, k: Kin) {
    let mut w = w0;
    let mut al = al0;
    if al0 > m.max {
        w = at_most(w0 + (al0 * al0 - m.max * m.max) * k.hij, wt);
        b.push_w(s, -k.j, (al0 - m.max) * k.ij, w, m.max);
        al = m.max;
    }
    let p = three_phase(w, al, wt, m, k);
    emit_three_phase(b, s, &p, wt, k);
}

/// A plan that respects the smaller of the two limits throughout (used only if
/// the time-optimal construction ever needed more than [`MAX_SEGMENTS`]).
fn conservative(plan: &mut Plan, limits: &RampLimits, start: Anchor, vt: f32) {
    let (v0, a0) = (start.v, start.a);
    let (inv_up, inv_down, ij) = limits.reciprocals();
    let k = Kin {
        j: limits.max_jerk_rad_s3(),
        ij,
        hij: 0.5 * ij,
    };
    let m = if limits.max_acceleration_rad_s2() <= limits.max_deceleration_rad_s2() {
        Lim {
            max: limits.max_acceleration_rad_s2(),
            inv: inv_up,
        }
    } else {
        Lim {
            max: limits.max_deceleration_rad_s2(),
            inv: inv_down,
        }
    };
    let mut b = Builder::new(plan, start, vt);
    if a0 != 0.0 {
        let v_stop = v0 + a0 * a0.abs() * k.hij;
        b.push(-a0.signum() * k.j, a0.abs() * k.ij, v_stop, 0.0);
    }
    if b.v != vt {
        let s = if vt > b.v { 1.0 } else { -1.0 };
        let p = three_phase(s * b.v, 0.0, s * vt, m, k);
        emit_three_phase(&mut b, s, &p, s * vt, k);
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn limits(up: f32, down: f32, j: f32) -> RampLimits {
        RampLimits::new(up, down, j).unwrap()
    }

    #[test]
    fn rest_to_rest_matches_the_textbook_durations() {
        // Biagiotti & Melchiorri (2008) §3.4: T = dv/a + a/j when the
        // acceleration limit is reached; T = 2·sqrt(dv/j) when it is not.
        let l = limits(1.0, 1.0, 2.0);
        let mut p = Plan::at_rest(0.0);
        build(&mut p, &l, Reverse::Forbidden, Anchor::exact(0.0, 0.0), 4.0);
        assert!((p.duration_s() - (4.0 / 1.0 + 1.0 / 2.0)).abs() < 1e-5);
        assert_eq!(p.segments().len(), 3);
        build(
            &mut p,
            &l,
            Reverse::Forbidden,
            Anchor::exact(0.0, 0.0),
            0.125,
        );
        assert!((p.duration_s() - 2.0 * (0.125_f32 / 2.0).sqrt()).abs() < 1e-6);
        assert_eq!(p.segments().len(), 2);
    }

    #[test]
    fn segment_capacity_is_never_exceeded() {
        // Hand-picked states that exercise every branch with the most segments:
        // a ramp-to-zero prefix followed by each crossing profile.
        let cases = [
            (limits(1.0, 0.5, 1.0), 0.3, 0.4, -8.0),
            (limits(0.5, 1.0, 1.0), 0.3, 0.4, -8.0),
            (limits(1.0, 0.5, 1.0), 5.0, -0.6, -8.0),
            (limits(0.5, 1.0, 1.0), 5.0, -0.9, -8.0),
            (limits(0.5, 1.0, 1.0), 0.05, -0.9, -8.0),
            (limits(0.5, 1.0, 1.0), 5.0, -3.0, -8.0),
        ];
        for (l, v0, a0, vt) in cases {
            let mut p = Plan::at_rest(0.0);
            build(&mut p, &l, Reverse::Allowed, Anchor::exact(v0, a0), vt);
            assert!(p.segments().len() <= MAX_SEGMENTS);
            let end = p.state_after(0, u64::MAX);
            assert_eq!(end.speed.rad_per_s(), vt);
        }
    }
}
