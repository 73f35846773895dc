//! The speed interlock: clamps every request to a certified speed ceiling,
//! lets a [`RequestGovernor`] decide how much of it the ramp may follow,
//! ramps with the certified limits, watches the measured speed (and swing
//! angle) against what was commanded, and stops the ride in a defined way on
//! any fault, latching until a reset edge at confirmed standstill.
//!
//! ```text
//! request ─▶ clamp to ceiling ─▶ governor ─▶ clamp again ─▶ ramp ─▶ speed reference
//!                                                              │
//! speed, 2nd channel, angle, run-enable, reset ─▶ monitor ◀────┘ ─▶ run permit, brake
//! ```
//!
//! Per tick ([`Interlock::tick`]): no heap, no panic, no division, no
//! transcendental function; the ramp re-plans only when its target changes.
//! States, reactions and response times are in `docs/interlock.md`.
//!
//! This is a component of a drive controller, not a certified safety
//! function: the ride's safety functions, their architecture and their
//! validation remain the integrator's, under EN 13814, ASTM F2291,
//! ISO 17842, EN ISO 13849-1 / IEC 62061 / IEC 61508 and the ride's
//! certification.

mod ceiling;
mod events;
#[cfg(feature = "hal")]
mod hal;
mod inputs;
mod params;
mod sensor;
mod state;

pub use ceiling::{CeilingSource, SpeedCeiling, ROUND_DOWN_ULPS};
pub use events::{Event, EventKind, EventLog};
#[cfg(feature = "hal")]
pub use hal::{HalIo, PinFault, ReferenceMode, SpeedReference};
pub use inputs::{Sample, TickInputs, TickOutput};
pub use params::{BlockError, SafetyConfig, SafetyParams};
pub use state::{InterlockState, TripCause};

use crate::ramp::{Reverse, Setpoint, SpeedRamp};
use crate::request_governor::{
    GovernorDecision, GovernorInput, GovernorStatus, PassThrough, RequestGovernor,
};
use crate::units::AngularSpeed;
use sensor::{count, SensorTrack};

/// Event capacity used when none is named.
pub const DEFAULT_EVENT_CAPACITY: usize = 16;

/// Largest accepted swing-angle sample magnitude, rad (90°: a seat cannot
/// swing past horizontal on its link while turning).
const MAX_ANGLE_SAMPLE_RAD: f32 = core::f32::consts::FRAC_PI_2;

/// Bit in `Interlock::seen` for a refused reset (cause bits are 1..=14).
const RESET_REFUSED_BIT: u16 = 1 << 15;

// Bits of one tick's conditions (see `Interlock::monitor`).
const C_OVERRUN: u32 = 0;
const C_SPEED_STALE: u32 = 1;
const C_ANGLE_STALE: u32 = 2;
const C_RUN_ENABLE_OFF: u32 = 3;
const C_OVERSPEED: u32 = 4;
const C_FOLLOWING: u32 = 5;
const C_DISAGREE: u32 = 6;
const C_AHEAD: u32 = 7;
const C_BEHIND: u32 = 8;
const C_ANGLE_OVER: u32 = 9;

/// A governor verdict the interlock can follow: no fault, a finite target.
fn governor_ok(decision: &GovernorDecision) -> bool {
    decision.status != GovernorStatus::Fault && decision.admitted_rad_s.is_finite()
}

/// What the states outside running need from the tick.
struct Progress {
    dt_s: f32,
    dt_ok: bool,
    measured: f32,
    commanded: f32,
    standstill: bool,
    reset_edge: bool,
    may_start: bool,
    cause_gone: bool,
}

/// The speed interlock, with a record of its last `N` events.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Interlock<const N: usize = DEFAULT_EVENT_CAPACITY> {
    params: SafetyParams,
    ramp: SpeedRamp,
    state: InterlockState,
    /// Output of the last ramp step.
    command: Setpoint,
    /// Clamped request kept when a non-finite one is refused, rad/s.
    request_rad_s: f32,
    /// First cause of the latched trip.
    cause: Option<TripCause>,
    /// Causes recorded since the last reset (one event each).
    seen: u16,
    primary: SensorTrack,
    secondary: SensorTrack,
    angle: SensorTrack,
    overspeed_ticks: u16,
    following_ticks: u16,
    stop_ahead_ticks: u16,
    stop_behind_ticks: u16,
    channel_ticks: u16,
    angle_ticks: u16,
    standstill_ticks: u16,
    /// Time spent in the time-monitored stop, and its allowance, s.
    timed_elapsed_s: f32,
    timed_allowance_s: f32,
    /// Time since the run permit was last removed, s (saturates at the brake delay).
    permit_off_s: f32,
    reset_before: bool,
    /// A run of non-finite requests is under way (recorded at its start).
    refusing: bool,
    /// A debounce counter is running: `monitor` must run even on a quiet tick.
    pending: bool,
    tick: u32,
    // Derived once.
    lower_rad_s: f32,
    overspeed_rad_s: f32,
    /// Bit pattern of `overrun_tick_s` (see the tick-period check).
    overrun_bits: u32,
    certified_angle_rad: f32,
    events: EventLog<N>,
}

impl<const N: usize> Interlock<N> {
    /// An interlock at standstill, [`InterlockState::Ready`], with the ramp
    /// built from the certified limits.
    #[must_use]
    pub fn new(params: SafetyParams) -> Self {
        let c = *params.config();
        let ceiling = params.ceiling().ceiling_rad_s();
        Self {
            ramp: SpeedRamp::new(params.ramp_limits(), c.reverse),
            state: InterlockState::Ready,
            command: Setpoint::at_target(AngularSpeed::from_rad_per_s(0.0)),
            request_rad_s: 0.0,
            cause: None,
            seen: 0,
            primary: SensorTrack::new(),
            secondary: SensorTrack::new(),
            angle: SensorTrack::new(),
            overspeed_ticks: 0,
            following_ticks: 0,
            stop_ahead_ticks: 0,
            stop_behind_ticks: 0,
            channel_ticks: 0,
            angle_ticks: 0,
            standstill_ticks: 0,
            timed_elapsed_s: 0.0,
            timed_allowance_s: 0.0,
            permit_off_s: 0.0,
            reset_before: false,
            refusing: false,
            pending: false,
            tick: 0,
            lower_rad_s: match c.reverse {
                Reverse::Allowed => -ceiling,
                Reverse::Forbidden => 0.0,
            },
            overspeed_rad_s: ceiling + c.overspeed_tolerance_rad_s,
            overrun_bits: c.overrun_tick_s.to_bits(),
            certified_angle_rad: c.certified_angle_deg * (core::f32::consts::PI / 180.0),
            events: EventLog::new(),
            params,
        }
    }

    /// Builds an interlock from a parameter block; refuses to run on any
    /// mismatch.
    ///
    /// # Errors
    /// [`BlockError`] from [`SafetyParams::from_bytes`].
    pub fn from_bytes(bytes: &[u8]) -> Result<Self, BlockError> {
        SafetyParams::from_bytes(bytes).map(Self::new)
    }

    /// One control tick with no request governor (the request, clamped to the
    /// ceiling, goes to the ramp as it is).
    ///
    /// * `dt_s`: time since the previous tick, s. Not in
    ///   (0, `overrun_tick_s`] is a [`TripCause::TickOverrun`].
    #[inline]
    pub fn tick(&mut self, inputs: &TickInputs, dt_s: f32) -> TickOutput {
        self.tick_with(inputs, dt_s, &mut PassThrough)
    }

    /// One control tick with `governor` between the clamp and the ramp. The
    /// governor's admitted target is clamped again; a
    /// [`GovernorStatus::Fault`] or a non-finite admitted target trips.
    pub fn tick_with<G: RequestGovernor>(
        &mut self,
        inputs: &TickInputs,
        dt_s: f32,
        governor: &mut G,
    ) -> TickOutput {
        // The healthy path below only gathers this tick's conditions; the
        // debounce counters, trips and events live in `monitor`, entered
        // when a condition is present or a counter is still running.
        let c = &self.params.config;
        self.tick = self.tick.wrapping_add(1);
        // (0, overrun] as one unsigned comparison of the bit patterns: +0,
        // negatives (sign bit), NaN and ∞ all fall outside.
        let dt_ok = dt_s.to_bits().wrapping_sub(1) < self.overrun_bits;
        let reset_edge = inputs.reset && !self.reset_before;
        self.reset_before = inputs.reset;

        // Sensors: freshness, plausibility, agreement.
        self.primary.update(inputs.speed, c.sensor_max_rad_s);
        let primary_ok = self.primary.trusted(c.stale_ticks);
        let measured = self.primary.value();
        let mut speed_ok = primary_ok;
        let mut conditions = 0u16;
        if c.second_channel {
            self.secondary
                .update(inputs.second_speed, c.sensor_max_rad_s);
            let second = self.secondary.value();
            let secondary_ok = self.secondary.trusted(c.stale_ticks);
            let disagree =
                primary_ok && secondary_ok && (measured - second).abs() > c.channel_tolerance_rad_s;
            self.channel_ticks = count(self.channel_ticks, disagree);
            conditions |= u16::from(disagree) << C_DISAGREE;
            speed_ok = primary_ok && secondary_ok;
        }
        let trusted = speed_ok && self.channel_ticks < c.debounce_ticks;
        conditions |= u16::from(!dt_ok) << C_OVERRUN;
        conditions |= u16::from(!speed_ok) << C_SPEED_STALE;
        conditions |= u16::from(trusted && measured.abs() > self.overspeed_rad_s) << C_OVERSPEED;

        let mut angle_ok = true;
        if c.angle_sensor {
            self.angle.update(inputs.angle, MAX_ANGLE_SAMPLE_RAD);
            angle_ok = self.angle.trusted(c.stale_ticks);
            let over = angle_ok && self.angle.value().abs() > self.certified_angle_rad;
            conditions |= u16::from(!angle_ok) << C_ANGLE_STALE;
            conditions |= u16::from(over) << C_ANGLE_OVER;
        }

        let commanded = self.command.speed.rad_per_s();
        let at_zero = commanded == 0.0 && self.command.target_reached();
        // Standstill counts only while the command has been run down to zero,
        // with a trusted sensor (and second channel) reading still.
        if at_zero {
            let still = measured.abs() <= c.standstill_rad_s
                && (!c.second_channel || self.secondary.value().abs() <= c.standstill_rad_s);
            self.standstill_ticks = count(self.standstill_ticks, trusted && still);
        } else {
            self.standstill_ticks = 0;
        }
        let standstill = self.standstill_ticks >= c.standstill_ticks;

        let tolerance = c.following_tolerance_rad_s;
        match self.state {
            InterlockState::Running | InterlockState::Limiting => {
                let following = trusted && (measured - commanded).abs() > tolerance;
                conditions |= u16::from(following) << C_FOLLOWING;
                conditions |= u16::from(!inputs.run_enable) << C_RUN_ENABLE_OFF;
            }
            InterlockState::Stopping | InterlockState::StoppingTimed if trusted => {
                let ahead = measured.abs() > commanded.abs() + tolerance;
                let behind = measured.abs() + tolerance < commanded.abs();
                conditions |= u16::from(ahead) << C_AHEAD;
                conditions |= u16::from(behind) << C_BEHIND;
            }
            _ => {}
        }
        if conditions != 0 || self.pending {
            self.monitor(conditions, measured, at_zero && standstill);
        }

        // The request: refused if not finite, clamped, then governed.
        let request = inputs.request_rad_s;
        if request.is_finite() {
            self.request_rad_s = request;
            self.refusing = false;
        } else if !self.refusing {
            self.refuse(request, measured);
        }
        let ceiling = self.params.ceiling.ceiling_rad_s();
        let clamped = within(self.request_rad_s, self.lower_rad_s, ceiling);
        let moving = self.state.follows_requests();
        // The governor is promised a checked tick period; after an overrun
        // (already tripped above) it is not asked.
        let decision = if dt_ok {
            governor.govern(&GovernorInput {
                clamped_request_rad_s: clamped,
                commanded: self.command,
                measured_rad_s: if trusted { Some(measured) } else { None },
                dt_s,
                stopping: !moving,
            })
        } else {
            GovernorDecision {
                admitted_rad_s: 0.0,
                status: GovernorStatus::Free,
            }
        };
        let target = if moving
            && decision.admitted_rad_s.to_bits() == clamped.to_bits()
            && decision.status != GovernorStatus::Fault
        {
            // The request admitted as clamped (no governor, or a free one).
            self.state = if clamped.to_bits() != self.request_rad_s.to_bits()
                || decision.status == GovernorStatus::Restricting
            {
                InterlockState::Limiting
            } else {
                InterlockState::Running
            };
            // Adding zero turns −0 into +0, so a zero target compares equal.
            clamped + 0.0
        } else {
            self.governed_target(&decision, clamped, moving, measured)
        };
        // An unchanged target costs one comparison, not a call; a ramp that
        // has reached an unchanged target has nothing to step.
        let retarget = target.to_bits() != self.ramp.target().rad_per_s().to_bits();
        if retarget {
            self.retarget(target, measured);
        }
        if dt_ok && (retarget || !self.command.target_reached()) {
            if let Ok(sp) = self.ramp.step(dt_s) {
                self.command = sp;
            }
        }

        match self.state {
            InterlockState::Running | InterlockState::Limiting => {}
            _ => self.progress(&Progress {
                dt_s,
                dt_ok,
                measured,
                commanded,
                standstill,
                reset_edge,
                may_start: inputs.run_enable
                    && trusted
                    && angle_ok
                    && dt_ok
                    && governor_ok(&decision),
                cause_gone: dt_ok
                    && trusted
                    && angle_ok
                    && conditions & (1 << C_OVERSPEED | 1 << C_ANGLE_OVER) == 0
                    && inputs.run_enable
                    && governor_ok(&decision),
            }),
        }

        let run_permit = self.state.permits_running();
        let brake = if run_permit {
            self.permit_off_s = 0.0;
            false
        } else {
            let delay = self.params.config.brake_delay_s;
            if dt_ok && self.permit_off_s < delay {
                self.permit_off_s += dt_s;
            }
            standstill || self.permit_off_s >= delay
        };
        TickOutput {
            command: self.command,
            run_permit,
            brake,
            state: self.state,
        }
    }

    /// Debounces this tick's conditions, trips on those that hold, and keeps
    /// `pending` while any counter runs.
    #[cold]
    #[inline(never)]
    fn monitor(&mut self, conditions: u16, measured: f32, at_rest: bool) {
        let has = |bit: u32| conditions & (1 << bit) != 0;
        self.overspeed_ticks = count(self.overspeed_ticks, has(C_OVERSPEED));
        self.following_ticks = count(self.following_ticks, has(C_FOLLOWING));
        self.stop_ahead_ticks = count(self.stop_ahead_ticks, has(C_AHEAD));
        self.stop_behind_ticks = count(self.stop_behind_ticks, has(C_BEHIND));
        self.angle_ticks = count(self.angle_ticks, has(C_ANGLE_OVER));
        self.pending = (self.overspeed_ticks
            | self.following_ticks
            | self.stop_ahead_ticks
            | self.stop_behind_ticks
            | self.angle_ticks)
            != 0;

        // Causes present this tick, in order of severity.
        let debounce = self.params.config.debounce_ticks;
        if has(C_OVERRUN) {
            self.trip(TripCause::TickOverrun, measured);
        }
        if self.stop_ahead_ticks >= debounce {
            self.trip(TripCause::NotFollowingStop, measured);
        }
        if has(C_SPEED_STALE) {
            self.trip(TripCause::SpeedSensorStale, measured);
        }
        if self.channel_ticks >= debounce {
            self.trip(TripCause::ChannelDisagreement, measured);
        }
        if self.stop_behind_ticks >= debounce {
            self.trip(TripCause::SpeedImplausible, measured);
        }
        if self.overspeed_ticks >= debounce {
            self.trip(TripCause::Overspeed, measured);
        }
        if self.following_ticks >= debounce {
            self.trip(TripCause::FollowingError, measured);
        }
        if self.angle_ticks >= debounce {
            self.trip(TripCause::SwingAngle, measured);
        }
        if has(C_ANGLE_STALE) {
            self.trip(TripCause::AngleSensorStale, measured);
        }
        if has(C_RUN_ENABLE_OFF) && self.state.follows_requests() {
            if at_rest {
                // The normal end of a ride: switched off at rest.
                self.remove_permit(InterlockState::Ready);
            } else {
                self.trip(TripCause::RunEnableDropped, measured);
            }
        }
    }

    /// The ramp's target when the governor changed the request, faulted, or
    /// the interlock is not following requests: trips on a governor fault,
    /// clamps the admitted target again, sets Running or Limiting.
    #[inline(never)]
    fn governed_target(
        &mut self,
        decision: &GovernorDecision,
        clamped: f32,
        moving: bool,
        measured: f32,
    ) -> f32 {
        if moving && !governor_ok(decision) {
            self.trip(TripCause::GovernorFault, measured);
        }
        if !self.state.follows_requests() {
            return 0.0;
        }
        let ceiling = self.params.ceiling.ceiling_rad_s();
        let target = within(decision.admitted_rad_s, self.lower_rad_s, ceiling);
        self.state = if clamped.to_bits() != self.request_rad_s.to_bits()
            || decision.status == GovernorStatus::Restricting
            || target.to_bits() != clamped.to_bits()
        {
            InterlockState::Limiting
        } else {
            InterlockState::Running
        };
        target + 0.0
    }

    /// Records the first of a run of non-finite requests.
    #[cold]
    #[inline(never)]
    fn refuse(&mut self, request: f32, measured: f32) {
        self.refusing = true;
        self.record(EventKind::RequestRefused, measured, request);
    }

    /// Gives the ramp a new target.
    #[inline(never)]
    fn retarget(&mut self, target: f32, measured: f32) {
        if self
            .ramp
            .set_target(AngularSpeed::from_rad_per_s(target))
            .is_err()
        {
            self.trip(TripCause::RampRefused, measured);
            // Zero is always accepted.
            let _ = self.ramp.set_target(AngularSpeed::from_rad_per_s(0.0));
        }
    }

    /// The states outside running: stop progress, start, reset.
    #[inline(never)]
    fn progress(&mut self, p: &Progress) {
        let now_zero = self.command.speed.rad_per_s() == 0.0 && self.command.target_reached();
        match self.state {
            InterlockState::Stopping => {
                self.timed_elapsed_s += p.dt_s;
                if now_zero && p.standstill {
                    self.record(EventKind::PermitRemovedAtStandstill, p.measured, 0.0);
                    self.remove_permit(InterlockState::Tripped);
                } else if self.timed_elapsed_s >= self.timed_allowance_s {
                    // The ramp's time and the margin are up and the ride is
                    // not confirmed still: it did not follow the stop.
                    self.trip(TripCause::NotFollowingStop, p.measured);
                }
            }
            InterlockState::StoppingTimed => {
                if p.dt_ok {
                    self.timed_elapsed_s += p.dt_s;
                }
                if now_zero && self.timed_elapsed_s >= self.timed_allowance_s {
                    self.record(EventKind::PermitRemovedTimeUp, p.measured, 0.0);
                    self.remove_permit(InterlockState::Tripped);
                }
            }
            InterlockState::Ready if p.may_start => {
                self.state = InterlockState::Running;
            }
            InterlockState::Tripped | InterlockState::Faulted if p.reset_edge => {
                let cause_gone = self.state == InterlockState::Tripped && p.cause_gone;
                if cause_gone && now_zero && p.standstill {
                    self.record(EventKind::ResetAccepted, p.measured, 0.0);
                    self.state = InterlockState::Ready;
                    self.cause = None;
                    self.seen = 0;
                } else if self.seen & RESET_REFUSED_BIT == 0 {
                    // Once per latch, so that pressing on cannot push the
                    // trip's own events out of the record.
                    self.seen |= RESET_REFUSED_BIT;
                    self.record(EventKind::ResetRefused, p.measured, p.commanded);
                }
            }
            _ => {}
        }
    }

    /// Handles one trip cause present this tick: records it once per latch and
    /// moves the state machine (a cause never lowers the reaction already
    /// under way).
    #[cold]
    #[inline(never)]
    fn trip(&mut self, cause: TripCause, measured: f32) {
        if self.state == InterlockState::Ready
            && matches!(
                cause,
                TripCause::SpeedSensorStale | TripCause::AngleSensorStale
            )
        {
            // Standing still with the permit off: a sensor that has not
            // started (or has stopped) only keeps the ride from starting.
            return;
        }
        if self.seen & cause.bit() == 0 {
            self.seen |= cause.bit();
            let commanded = self.command.speed.rad_per_s();
            self.record(EventKind::Trip(cause), measured, commanded);
        }
        if matches!(
            self.state,
            InterlockState::Faulted | InterlockState::Tripped
        ) {
            return;
        }
        if self.cause.is_none() {
            self.cause = Some(cause);
        }
        let immediate = matches!(
            cause,
            TripCause::TickOverrun | TripCause::NotFollowingStop | TripCause::PinFault
        );
        let untrusted = matches!(
            cause,
            TripCause::SpeedSensorStale
                | TripCause::ChannelDisagreement
                | TripCause::SpeedImplausible
        );
        if immediate || self.state == InterlockState::Ready {
            if self.state != InterlockState::Ready {
                self.record(EventKind::PermitRemovedAtOnce, measured, 0.0);
            }
            self.remove_permit(InterlockState::Tripped);
        } else if untrusted && self.state != InterlockState::StoppingTimed {
            if self.state == InterlockState::Stopping {
                self.record(EventKind::StopTimed, measured, 0.0);
            }
            self.start_stop_clock();
            self.state = InterlockState::StoppingTimed;
        } else if matches!(
            self.state,
            InterlockState::Running | InterlockState::Limiting
        ) {
            self.start_stop_clock();
            self.state = InterlockState::Stopping;
        }
    }

    /// Starts the clock of a stop: the ramp's time to bring the present
    /// command to zero, plus the margin.
    #[cold]
    #[inline(never)]
    fn start_stop_clock(&mut self) {
        self.timed_elapsed_s = 0.0;
        self.timed_allowance_s = self.ramp_stop_time_s() + self.params.config().stop_time_margin_s;
    }

    /// A hardware pin failed: trips with the permit removed at once.
    #[cfg_attr(not(feature = "hal"), allow(dead_code))]
    pub(crate) fn pin_fault(&mut self) {
        let measured = self.primary.value();
        self.trip(TripCause::PinFault, measured);
    }

    /// Time the ramp needs to bring the present command to zero, s.
    fn ramp_stop_time_s(&self) -> f32 {
        // `predict` is not needed: re-plan towards zero on a copy.
        let mut ramp = self.ramp.clone();
        if ramp.set_target(AngularSpeed::from_rad_per_s(0.0)).is_ok() {
            ramp.remaining_s()
        } else {
            0.0
        }
    }

    fn remove_permit(&mut self, next: InterlockState) {
        if self.state.permits_running() {
            self.permit_off_s = 0.0;
        }
        self.state = next;
    }

    #[cold]
    #[inline(never)]
    fn record(&mut self, kind: EventKind, measured: f32, value: f32) {
        self.events.push(Event {
            tick: self.tick,
            kind,
            measured_rad_s: measured,
            value_rad_s: value,
        });
    }

    /// Rechecks the parameter set held in memory against its CRC stamp (call
    /// it from a background task; it costs one CRC over the 88-byte block).
    /// On a mismatch the interlock faults for good: permit off at once,
    /// no reset clears it.
    ///
    /// Returns `true` when the set is intact.
    pub fn verify_parameters(&mut self) -> bool {
        if self.params.intact() {
            return true;
        }
        if self.state != InterlockState::Faulted {
            let measured = self.primary.value();
            self.record(
                EventKind::Faulted(TripCause::ParameterIntegrity),
                measured,
                self.command.speed.rad_per_s(),
            );
            if self.state.permits_running() {
                self.record(EventKind::PermitRemovedAtOnce, measured, 0.0);
            }
            self.cause = Some(TripCause::ParameterIntegrity);
            self.remove_permit(InterlockState::Faulted);
        }
        false
    }

    /// The state after the last tick.
    #[must_use]
    pub const fn state(&self) -> InterlockState {
        self.state
    }

    /// The first cause of the latched trip or fault, if any.
    #[must_use]
    pub const fn cause(&self) -> Option<TripCause> {
        self.cause
    }

    /// The parameter set in force.
    #[must_use]
    pub const fn params(&self) -> &SafetyParams {
        &self.params
    }

    /// The speed ceiling, rad/s.
    #[must_use]
    pub const fn ceiling_rad_s(&self) -> f32 {
        self.params.ceiling().ceiling_rad_s()
    }

    /// The last commanded setpoint.
    #[must_use]
    pub const fn command(&self) -> Setpoint {
        self.command
    }

    /// Time until the ramp reaches its current target, s (0 once there).
    #[must_use]
    pub fn ramp_remaining_s(&self) -> f32 {
        self.ramp.remaining_s()
    }

    /// The event record.
    #[must_use]
    pub const fn events(&self) -> &EventLog<N> {
        &self.events
    }

    /// Ticks since the interlock was built (wrapping).
    #[must_use]
    pub const fn ticks(&self) -> u32 {
        self.tick
    }
}

/// `x` limited to `[lo, hi]` in plain comparisons: `f32::clamp` asserts
/// `lo <= hi`, a panic path the no-panic link check (firmware/src/bin/nopanic.rs)
/// finds reachable because the optimiser cannot see that the ceiling is
/// positive. The upper bound wins if the two ever crossed; NaN gives `lo`.
#[inline]
fn within(x: f32, lo: f32, hi: f32) -> f32 {
    if x > hi {
        hi
    } else if x >= lo {
        x
    } else if lo <= hi {
        lo
    } else {
        hi
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::interlock::params::tests::demo;

    fn inputs(seq: u8, reset: bool) -> TickInputs {
        TickInputs {
            request_rad_s: 0.0,
            speed: Sample::new(0.0, seq),
            second_speed: Sample::new(0.0, seq),
            angle: Sample::ABSENT,
            run_enable: true,
            reset,
        }
    }

    #[test]
    fn a_parameter_set_changed_in_memory_faults_for_good() {
        let mut il = Interlock::<8>::new(SafetyParams::new(demo()).unwrap());
        let o = il.tick(&inputs(1, false), 0.001);
        assert_eq!(o.state, InterlockState::Running);
        assert!(il.verify_parameters());
        // A RAM fault raises the certified angle behind the CRC's back.
        il.params.values_in_memory().certified_angle_deg = 60.0;
        assert!(!il.verify_parameters());
        assert_eq!(il.state(), InterlockState::Faulted);
        assert_eq!(il.cause(), Some(TripCause::ParameterIntegrity));
        // Response: the same call; permit off on the next tick's output too.
        let mut seq = 2;
        for k in 0..2_000u32 {
            let reset = k % 2 == 1;
            let o = il.tick(&inputs(seq, reset), 0.001);
            seq = seq.wrapping_add(1);
            assert_eq!(o.state, InterlockState::Faulted);
            assert!(!o.run_permit);
        }
        assert!(il
            .events()
            .iter()
            .any(|e| e.kind == EventKind::Faulted(TripCause::ParameterIntegrity)));
        assert!(il
            .events()
            .iter()
            .any(|e| e.kind == EventKind::ResetRefused));
    }
}
