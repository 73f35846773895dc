//! Scenario tests of the speed interlock: one per fault, each checking the
//! reaction and its response time in ticks (docs/interlock.md, "Response
//! times"). The ride and its drive are demo data: an invented ride whose drive
//! follows the command exactly unless a scenario says otherwise.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::interlock::{EventKind, Sample, DEFAULT_EVENT_CAPACITY};

#[path = "common/demo_rides.rs"]
mod demo_rides;
use swingdrive::{
    GovernorDecision, GovernorInput, GovernorStatus, Interlock, InterlockState, RequestGovernor,
    SafetyConfig, SafetyParams, TickInputs, TickOutput, TripCause,
};

/// Demo data (invented ride): see `demo_rides::forty_degree_ride`.
fn config() -> SafetyConfig {
    demo_rides::forty_degree_ride()
}

const DT: f32 = 0.01;

/// Rounding of two f32 speeds near 1 rad/s: 4 ulps (hand calculation, common practice).
const ROUNDING: f32 = 4.0 * f32::EPSILON;

/// The interlock with a drive model around it.
struct Rig {
    il: Interlock,
    seq: u8,
    /// What the sensors read this tick (the drive follows the command by default).
    measured: f32,
    second: Option<f32>,
    angle: f32,
    run_enable: bool,
    reset: bool,
    request: f32,
    out: TickOutput,
}

impl Rig {
    fn new(c: SafetyConfig) -> Self {
        let il = Interlock::<DEFAULT_EVENT_CAPACITY>::new(SafetyParams::new(c).unwrap());
        let out = TickOutput {
            command: il.command(),
            run_permit: false,
            brake: false,
            state: il.state(),
        };
        Self {
            il,
            seq: 0,
            measured: 0.0,
            second: None,
            angle: 0.0,
            run_enable: true,
            reset: false,
            request: 0.0,
            out,
        }
    }

    fn inputs(&mut self) -> TickInputs {
        self.seq = self.seq.wrapping_add(1);
        TickInputs {
            request_rad_s: self.request,
            speed: Sample::new(self.measured, self.seq),
            second_speed: Sample::new(self.second.unwrap_or(self.measured), self.seq),
            angle: Sample::new(self.angle, self.seq),
            run_enable: self.run_enable,
            reset: self.reset,
        }
    }

    /// One tick; the sensors then read the new command (ideal drive).
    fn tick(&mut self) -> TickOutput {
        let i = self.inputs();
        self.out = self.il.tick(&i, DT);
        self.measured = self.out.command.speed.rad_per_s();
        self.out
    }

    /// One tick with the given inputs left as they are (the scenario drives
    /// the sensors itself).
    fn tick_raw(&mut self, i: &TickInputs) -> TickOutput {
        self.out = self.il.tick(i, DT);
        self.out
    }

    /// Runs until `done` or `limit` ticks; returns the ticks taken.
    fn run_until(&mut self, limit: u32, mut done: impl FnMut(&TickOutput) -> bool) -> u32 {
        for n in 1..=limit {
            let o = self.tick();
            if done(&o) {
                return n;
            }
        }
        panic!("not reached within {limit} ticks: {:?}", self.out);
    }

    /// Started and running steadily at `speed`.
    fn running_at(c: SafetyConfig, speed: f32) -> Self {
        let mut r = Self::new(c);
        r.request = speed;
        r.run_until(5_000, |o| {
            o.command.target_reached() && o.command.speed.rad_per_s() > 0.0
        });
        assert!(r.out.run_permit);
        r
    }

    fn cmd(&self) -> f32 {
        self.out.command.speed.rad_per_s()
    }

    fn has_event(&self, kind: EventKind) -> bool {
        self.il.events().iter().any(|e| e.kind == kind)
    }
}

#[test]
fn a_request_above_the_ceiling_is_limited_and_ramped() {
    let mut r = Rig::new(config());
    let ceiling = r.il.ceiling_rad_s();
    r.request = 10.0;
    let mut before = 0.0_f32;
    let mut saw_limiting = false;
    for _ in 0..2_000 {
        let o = r.tick();
        let v = o.command.speed.rad_per_s();
        assert!(v <= ceiling);
        // Acceleration limit 0.5 rad/s² × 10 ms = 0.005 rad/s per tick (hand calculation, common practice).
        assert!(
            (v - before).abs() <= 0.5 * DT + ROUNDING,
            "{before} -> {v} in {:?}",
            o
        );
        before = v;
        saw_limiting |= o.state == InterlockState::Limiting;
    }
    assert!(saw_limiting);
    assert_eq!(r.cmd(), ceiling);
    assert!(o_permit(&r));
    // A normal end: request zero, then run-enable off at standstill gives Ready.
    r.request = 0.0;
    r.run_until(3_000, |o| {
        o.command.target_reached() && o.command.speed.rad_per_s() == 0.0
    });
    r.run_until(100, |o| o.state == InterlockState::Running && !o.brake);
    for _ in 0..config().standstill_ticks {
        r.tick();
    }
    r.run_enable = false;
    let o = r.tick();
    assert_eq!(o.state, InterlockState::Ready);
    assert!(!o.run_permit);
    assert!(
        o.brake,
        "standstill confirmed: brake applies with the permit off"
    );
}

fn o_permit(r: &Rig) -> bool {
    r.out.run_permit
}

#[test]
fn overspeed_trips_after_the_debounce_and_stops_on_the_ramp() {
    let c = config();
    let mut r = Rig::running_at(c, 10.0);
    let ceiling = r.il.ceiling_rad_s();
    // Runaway: the drive runs 0.07 rad/s fast, inside the following tolerance
    // (0.08) but above ceiling + overspeed tolerance (0.05).
    for n in 1..=c.debounce_ticks {
        let mut i = r.inputs();
        i.speed.value = ceiling + 0.07;
        i.second_speed.value = ceiling + 0.07;
        let o = r.tick_raw(&i);
        if n < c.debounce_ticks {
            assert_eq!(o.state, InterlockState::Limiting, "tick {n}");
        } else {
            assert_eq!(
                o.state,
                InterlockState::Stopping,
                "response = debounce_ticks"
            );
        }
    }
    assert_eq!(r.il.cause(), Some(TripCause::Overspeed));
    assert!(
        r.out.run_permit,
        "stop category 1: power kept on while stopping"
    );
    // The drive follows the stop ramp: permit removed at confirmed standstill.
    let mut last = r.cmd();
    r.run_until(5_000, |o| {
        // Deceleration limit 0.6 rad/s² (hand calculation, common practice).
        assert!(last - o.command.speed.rad_per_s() <= 0.6 * DT + ROUNDING);
        last = o.command.speed.rad_per_s();
        !o.run_permit
    });
    assert_eq!(r.out.state, InterlockState::Tripped);
    assert!(r.has_event(EventKind::PermitRemovedAtStandstill));
    assert!(r.out.brake);
}

#[test]
fn a_runaway_drive_that_keeps_rising_loses_its_permit_at_once() {
    let c = config();
    let mut r = Rig::running_at(c, 0.5);
    let mut speed = 0.5_f32;
    let mut tripped_at = None;
    let mut cat0_at = None;
    for n in 1..=200u32 {
        speed += 0.0045; // the drive accelerates on its own
        let mut i = r.inputs();
        i.speed.value = speed;
        i.second_speed.value = speed;
        let o = r.tick_raw(&i);
        if tripped_at.is_none() && o.state == InterlockState::Stopping {
            tripped_at = Some(n);
        }
        if !o.run_permit {
            cat0_at = Some(n);
            break;
        }
    }
    // Following error exceeds 0.08 from tick 18 (18 × 0.0045 = 0.081; hand
    // calculation, common practice); the 5th tick of the debounce is tick 22.
    assert_eq!(tripped_at, Some(22));
    assert_eq!(r.il.cause(), Some(TripCause::FollowingError));
    assert!(r.has_event(EventKind::Trip(TripCause::NotFollowingStop)));
    assert!(r.has_event(EventKind::PermitRemovedAtOnce));
    // The measured speed is already beyond the stop ramp when the stop begins,
    // so stop category 0 follows after one more debounce.
    assert_eq!(cat0_at, Some(22 + u32::from(c.debounce_ticks)));
    assert_eq!(r.out.state, InterlockState::Tripped);
    assert!(
        !r.out.brake,
        "not at standstill: the ride coasts, brake off"
    );
}

#[test]
fn a_drive_too_slow_to_follow_the_stop_ramp_loses_its_permit() {
    let c = config();
    let mut r = Rig::running_at(c, 0.8);
    r.run_enable = false;
    let o = r.tick();
    assert_eq!(
        o.state,
        InterlockState::Stopping,
        "run-enable: response 1 tick"
    );
    assert_eq!(r.il.cause(), Some(TripCause::RunEnableDropped));
    r.run_enable = true;
    // The drive decelerates at a third of the ramp's rate.
    let mut speed = 0.8_f32;
    let mut n = 0u32;
    while r.out.run_permit {
        n += 1;
        assert!(n < 2_000);
        speed -= 0.2 * DT;
        let mut i = r.inputs();
        i.speed.value = speed;
        i.second_speed.value = speed;
        r.tick_raw(&i);
    }
    assert_eq!(r.out.state, InterlockState::Tripped);
    assert!(r.has_event(EventKind::Trip(TripCause::NotFollowingStop)));
    assert!(r.has_event(EventKind::PermitRemovedAtOnce));
    // Removed within the debounce after the gap first exceeded the tolerance.
    assert!(speed > r.cmd() + c.following_tolerance_rad_s);
}

#[test]
fn a_single_encoder_spike_is_filtered_and_a_long_one_trips() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    // Shorter than the debounce: no trip; one sample beyond the sensor range
    // is not a sample at all.
    for value in [3.0, 3.0, 3.0, 3.0, 1.0e9] {
        let mut i = r.inputs();
        i.speed.value = value;
        let o = r.tick_raw(&i);
        assert_eq!(o.state, InterlockState::Running);
        r.tick();
    }
    for n in 1..=c.debounce_ticks {
        let mut i = r.inputs();
        i.speed.value = 3.0;
        i.second_speed.value = 3.0;
        let o = r.tick_raw(&i);
        assert_eq!(o.state == InterlockState::Stopping, n == c.debounce_ticks);
    }
    assert_eq!(r.il.cause(), Some(TripCause::Overspeed));
}

#[test]
fn stale_samples_start_a_time_monitored_stop() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    let frozen = r.inputs();
    let mut reaction = 0;
    for n in 1..=100u16 {
        // The sensor stops delivering: same sequence number every tick.
        let o = r.tick_raw(&frozen);
        if o.state == InterlockState::StoppingTimed {
            reaction = n;
            break;
        }
    }
    // Tick 1 brings the last fresh sample; from tick 2 (the onset) none
    // comes, and the reaction is on the stale_ticks-th tick without one.
    assert_eq!(reaction, 1 + c.stale_ticks);
    assert_eq!(r.il.cause(), Some(TripCause::SpeedSensorStale));
    // Permit kept until the ramp's own time plus the margin is up, then removed.
    // Time to stop from 0.6 rad/s: 0.6/0.6 + 0.6/2 = 1.3 s (hand calculation,
    // common practice: trapezoidal deceleration with jerk ramps), + 1.0 s margin.
    let mut ticks = 0u32;
    while r.out.run_permit {
        ticks += 1;
        assert!(ticks < 1_000);
        r.tick_raw(&frozen);
    }
    let expected = (1.3 + 1.0) / DT;
    assert!(
        (ticks as f32 - expected).abs() <= 2.0,
        "{ticks} ticks, expected {expected}"
    );
    assert!(r.has_event(EventKind::PermitRemovedTimeUp));
    assert_eq!(r.cmd(), 0.0);
}

#[test]
fn nan_samples_are_not_samples() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    let mut reaction = 0;
    for n in 1..=100u16 {
        let mut i = r.inputs();
        i.speed.value = f32::NAN;
        let o = r.tick_raw(&i);
        if o.state != InterlockState::Running {
            reaction = n;
            break;
        }
    }
    assert_eq!(reaction, c.stale_ticks);
    assert_eq!(r.out.state, InterlockState::StoppingTimed);
}

#[test]
fn an_encoder_frozen_at_its_value_shows_as_a_following_error() {
    let c = config();
    let mut r = Rig::running_at(c, 0.3);
    r.request = 0.9;
    let mut n = 0;
    while r.out.state != InterlockState::Stopping {
        n += 1;
        assert!(n < 500);
        let mut i = r.inputs();
        i.speed.value = 0.3; // new samples, frozen value
        i.second_speed.value = r.cmd();
        r.tick_raw(&i);
        if r.out.state == InterlockState::StoppingTimed {
            break;
        }
    }
    // With a second channel the frozen channel disagrees first.
    assert_eq!(r.il.cause(), Some(TripCause::ChannelDisagreement));

    let mut c1 = config();
    c1.second_channel = false;
    let mut r = Rig::running_at(c1, 0.3);
    r.request = 0.9;
    let mut n = 0;
    while r.out.state == InterlockState::Running || r.out.state == InterlockState::Limiting {
        n += 1;
        assert!(n < 500);
        let mut i = r.inputs();
        i.speed.value = 0.3;
        r.tick_raw(&i);
    }
    assert_eq!(r.il.cause(), Some(TripCause::FollowingError));
    assert_eq!(r.out.state, InterlockState::Stopping);
}

#[test]
fn channel_disagreement_trips_after_the_debounce() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    for n in 1..=c.debounce_ticks {
        r.second = Some(r.cmd() + 0.05);
        let o = r.tick();
        assert_eq!(
            o.state == InterlockState::StoppingTimed,
            n == c.debounce_ticks
        );
    }
    assert_eq!(r.il.cause(), Some(TripCause::ChannelDisagreement));
}

#[test]
fn a_sensor_frozen_at_zero_cannot_fake_standstill() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    r.run_enable = false;
    r.tick();
    r.run_enable = true;
    assert_eq!(r.out.state, InterlockState::Stopping);
    // Both channels now read zero while the ride is still turning.
    let mut n = 0u32;
    while r.out.run_permit {
        n += 1;
        assert!(n < 1_000);
        let mut i = r.inputs();
        i.speed.value = 0.0;
        i.second_speed.value = 0.0;
        r.tick_raw(&i);
        assert!(
            r.out.run_permit || r.cmd() == 0.0,
            "permit removed before the ramp reached zero"
        );
    }
    assert!(r.has_event(EventKind::Trip(TripCause::SpeedImplausible)));
    assert!(r.has_event(EventKind::StopTimed));
    assert!(r.has_event(EventKind::PermitRemovedTimeUp));
    // The whole stop ramp ran: ≥ 1.3 s (hand calculation, as above).
    assert!(n as f32 * DT >= 1.3);
}

#[test]
fn reset_held_down_does_not_clear_a_trip() {
    let c = config();
    let mut r = Rig::running_at(c, 0.4);
    r.run_enable = false;
    r.tick();
    r.run_enable = true;
    r.reset = true; // held from the start of the stop
    r.run_until(3_000, |o| o.state == InterlockState::Tripped);
    for _ in 0..200 {
        assert_eq!(r.tick().state, InterlockState::Tripped);
    }
    r.reset = false;
    assert_eq!(r.tick().state, InterlockState::Tripped);
    r.reset = true;
    let o = r.tick();
    assert_eq!(o.state, InterlockState::Ready, "rising edge at standstill");
    assert!(r.has_event(EventKind::ResetAccepted));
    assert_eq!(r.il.cause(), None);
}

#[test]
fn reset_while_moving_is_refused() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    // A cat-0 trip leaves the ride coasting.
    let i = r.inputs();
    r.out = r.il.tick(&i, 0.05);
    assert_eq!(
        r.out.state,
        InterlockState::Tripped,
        "overrun: response 1 tick"
    );
    assert!(!r.out.run_permit);
    assert_eq!(r.il.cause(), Some(TripCause::TickOverrun));
    // The ride still turns at 0.5 rad/s.
    for _ in 0..50 {
        let mut i = r.inputs();
        i.speed.value = 0.5;
        i.second_speed.value = 0.5;
        i.reset = true;
        r.tick_raw(&i);
        let mut i = r.inputs();
        i.speed.value = 0.5;
        i.second_speed.value = 0.5;
        i.reset = false;
        r.tick_raw(&i);
    }
    assert_eq!(r.out.state, InterlockState::Tripped);
    assert!(r.has_event(EventKind::ResetRefused));
    assert!(!r.out.brake);
}

#[test]
fn swing_angle_above_the_certified_angle_trips() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    r.angle = 41.0_f32.to_radians();
    for n in 1..=c.debounce_ticks {
        let o = r.tick();
        assert_eq!(o.state == InterlockState::Stopping, n == c.debounce_ticks);
    }
    assert_eq!(r.il.cause(), Some(TripCause::SwingAngle));
}

struct Faulty(GovernorStatus, f32);

impl RequestGovernor for Faulty {
    fn govern(&mut self, input: &GovernorInput) -> GovernorDecision {
        GovernorDecision {
            admitted_rad_s: if input.stopping { 0.0 } else { self.1 },
            status: self.0,
        }
    }
}

#[test]
fn the_governor_is_clamped_and_its_fault_trips() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    let ceiling = r.il.ceiling_rad_s();
    // A governor admitting more than the ceiling is clamped again.
    let mut g = Faulty(GovernorStatus::Free, 50.0);
    for _ in 0..1_000 {
        let i = r.inputs();
        let o = r.il.tick_with(&i, DT, &mut g);
        r.measured = o.command.speed.rad_per_s();
        assert!(o.command.speed.rad_per_s() <= ceiling);
        r.out = o;
    }
    assert_eq!(r.cmd(), ceiling);
    let mut g = Faulty(GovernorStatus::Fault, 0.1);
    let i = r.inputs();
    let o = r.il.tick_with(&i, DT, &mut g);
    assert_eq!(
        o.state,
        InterlockState::Stopping,
        "governor fault: response 1 tick"
    );
    assert_eq!(r.il.cause(), Some(TripCause::GovernorFault));
    let mut g = Faulty(GovernorStatus::Free, f32::NAN);
    let mut r = Rig::running_at(c, 0.6);
    let i = r.inputs();
    assert_eq!(
        r.il.tick_with(&i, DT, &mut g).state,
        InterlockState::Stopping
    );
}

#[test]
fn corrupted_parameter_bytes_refuse_to_build() {
    let p = SafetyParams::new(config()).unwrap();
    let mut b = p.to_bytes();
    assert!(Interlock::<4>::from_bytes(&b).is_ok());
    b[17] ^= 0x04;
    assert!(Interlock::<4>::from_bytes(&b).is_err());
}

#[test]
fn a_refused_request_keeps_the_previous_one_and_is_recorded_once() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    for bad in [f32::NAN, f32::INFINITY, f32::NAN] {
        r.request = bad;
        let o = r.tick();
        assert_eq!(o.command.speed.rad_per_s(), 0.6);
    }
    let refused =
        r.il.events()
            .iter()
            .filter(|e| e.kind == EventKind::RequestRefused)
            .count();
    assert_eq!(refused, 1);
}

#[test]
fn a_stale_angle_sensor_stops_the_ride() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    let mut reaction = 0;
    let last = r.seq;
    for n in 1..=100u16 {
        let mut i = r.inputs();
        i.angle.sequence = last; // the angle sensor stops delivering
        let o = r.tick_raw(&i);
        r.measured = o.command.speed.rad_per_s();
        if o.state != InterlockState::Running {
            reaction = n;
            break;
        }
    }
    assert_eq!(reaction, c.stale_ticks);
    assert_eq!(r.out.state, InterlockState::Stopping);
    assert_eq!(r.il.cause(), Some(TripCause::AngleSensorStale));
}

#[test]
fn a_ride_still_creeping_when_the_stop_time_is_up_loses_its_permit() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    r.run_enable = false;
    r.tick();
    r.run_enable = true;
    // The drive follows the ramp down but creeps on at 0.05 rad/s, inside the
    // following tolerance (0.08) and above standstill (0.01).
    let mut ticks = 1u32;
    while r.out.run_permit {
        ticks += 1;
        assert!(ticks < 1_000);
        let creep = r.cmd().max(0.05);
        let mut i = r.inputs();
        i.speed.value = creep;
        i.second_speed.value = creep;
        r.tick_raw(&i);
    }
    // Ramp time from 0.6 rad/s 1.3 s + margin 1.0 s (hand calculation, common practice).
    let expected = (1.3 + 1.0) / DT;
    assert!(
        (ticks as f32 - expected).abs() <= 2.0,
        "{ticks} vs {expected}"
    );
    assert!(r.has_event(EventKind::Trip(TripCause::NotFollowingStop)));
    assert!(r.has_event(EventKind::PermitRemovedAtOnce));
}

#[test]
fn the_brake_applies_after_the_brake_delay_when_standstill_cannot_be_confirmed() {
    let c = config();
    let mut r = Rig::running_at(c, 0.6);
    // A category-0 trip: the ride coasts, the sensor keeps reading 0.5 rad/s.
    let i = r.inputs();
    r.out = r.il.tick(&i, 0.05);
    assert!(!r.out.run_permit);
    let mut ticks = 0u32;
    while !r.out.brake {
        ticks += 1;
        assert!(ticks < 5_000);
        let mut i = r.inputs();
        i.speed.value = 0.5;
        i.second_speed.value = 0.5;
        r.tick_raw(&i);
    }
    // brake_delay_s 20 s at 10 ms ticks: 2000 ticks (hand calculation, common practice).
    let expected = c.brake_delay_s / DT;
    assert!(
        (ticks as f32 - expected).abs() <= 2.0,
        "{ticks} vs {expected}"
    );
}
