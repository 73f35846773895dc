//! The interlock's pins (feature `hal`) against embedded-hal-mock: heartbeat
//! permit, brake, integer duty of the speed reference, and pin errors as
//! faults. Ride values are demo data (an invented ride).
#![cfg(feature = "hal")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use embedded_hal_mock::eh1::digital::{Mock as PinMock, State, Transaction as Pin};
use embedded_hal_mock::eh1::pwm::{Mock as PwmMock, Transaction as Pwm};
use embedded_hal_mock::eh1::MockError;
use swingdrive::interlock::{HalIo, PinFault, ReferenceMode, Sample, SpeedReference};

#[path = "common/demo_rides.rs"]
mod demo_rides;
use swingdrive::{
    Interlock, InterlockState, PassThrough, SafetyConfig, SafetyParams, TickInputs, TripCause,
};

const DT: f32 = 0.01;
const MAX_DUTY: u16 = 1000;

/// Demo data (invented ride), one speed channel, no angle sensor.
fn interlock() -> Interlock<8> {
    Interlock::new(
        SafetyParams::new(SafetyConfig {
            tick_s: DT,
            second_channel: false,
            angle_sensor: false,
            ..demo_rides::forty_degree_ride()
        })
        .unwrap(),
    )
}

fn scale() -> SpeedReference {
    SpeedReference::new(2.0, ReferenceMode::Unipolar).unwrap()
}

fn level(high: bool) -> State {
    if high {
        State::High
    } else {
        State::Low
    }
}

fn io_error() -> MockError {
    MockError::Io(std::io::ErrorKind::NotConnected)
}

#[test]
fn duty_is_integer_scaled_and_clamped() {
    // Hand calculation, common practice: full scale 2 rad/s, 1000 counts.
    let uni = scale();
    assert_eq!(uni.duty(1.0, 1000), 500);
    assert_eq!(uni.duty(0.3, 1000), 150);
    assert_eq!(uni.duty(2.5, 1000), 1000);
    assert_eq!(uni.duty(-1.0, 1000), 0);
    assert_eq!(uni.duty(f32::NAN, 1000), 0);
    assert_eq!(uni.duty(f32::INFINITY, 1000), 1000);
    assert_eq!(uni.duty(2.0, u16::MAX), u16::MAX);
    let bi = SpeedReference::new(2.0, ReferenceMode::Bipolar).unwrap();
    assert_eq!(bi.duty(0.0, 1000), 500);
    assert_eq!(bi.duty(-2.0, 1000), 0);
    assert_eq!(bi.duty(1.0, 1000), 750);
    assert_eq!(bi.duty(f32::NAN, 1000), 500);
    assert_eq!(bi.duty(-9.0, 1000), 0);
    assert!(SpeedReference::new(0.0, ReferenceMode::Unipolar).is_err());
}

#[test]
fn healthy_ticks_toggle_the_heartbeat_and_drive_the_reference() {
    let ticks = 6u8;
    // Predict the outputs with a twin run without pins.
    let mut twin = interlock();
    let mut expected_permit = Vec::new();
    let mut expected_brake = Vec::new();
    let mut expected_pwm = Vec::new();
    let mut heartbeat = false;
    for k in 1..=ticks {
        let o = twin.tick_with(
            &TickInputs {
                request_rad_s: 1.0,
                speed: Sample::new(0.0, k),
                second_speed: Sample::ABSENT,
                angle: Sample::ABSENT,
                run_enable: true,
                reset: false,
            },
            DT,
            &mut PassThrough,
        );
        assert!(o.run_permit);
        heartbeat = !heartbeat;
        expected_permit.push(Pin::set(level(heartbeat)));
        expected_brake.push(Pin::set(level(!o.brake)));
        expected_pwm.push(Pwm::max_duty_cycle(MAX_DUTY));
        expected_pwm.push(Pwm::set_duty_cycle(
            scale().duty(o.command.speed.rad_per_s(), MAX_DUTY),
        ));
    }
    let inputs: Vec<Pin> = (0..ticks).map(|_| Pin::get(State::High)).collect();
    let resets: Vec<Pin> = (0..ticks).map(|_| Pin::get(State::Low)).collect();
    let mut io = HalIo::new(
        PinMock::new(&expected_permit),
        PinMock::new(&expected_brake),
        PwmMock::new(&expected_pwm),
        PinMock::new(&resets),
        PinMock::new(&inputs),
        scale(),
    );
    let mut il = interlock();
    for k in 1..=ticks {
        let o = il
            .tick_hal(
                &mut io,
                1.0,
                Sample::new(0.0, k),
                Sample::ABSENT,
                Sample::ABSENT,
                DT,
                &mut PassThrough,
            )
            .unwrap();
        assert!(o.run_permit);
    }
    let (mut p, mut b, mut d, mut r, mut e) = io.release();
    p.done();
    b.done();
    d.done();
    r.done();
    e.done();
}

#[test]
fn an_input_pin_error_trips_with_the_permit_removed() {
    let mut io = HalIo::new(
        PinMock::new(&[Pin::set(State::Low)]),
        PinMock::new(&[Pin::set(State::High)]),
        PwmMock::new(&[Pwm::max_duty_cycle(MAX_DUTY), Pwm::set_duty_cycle(0)]),
        PinMock::new(&[]),
        PinMock::new(&[Pin::get(State::High).with_error(io_error())]),
        scale(),
    );
    let mut il = interlock();
    let r = il.tick_hal(
        &mut io,
        1.0,
        Sample::new(0.0, 1),
        Sample::ABSENT,
        Sample::ABSENT,
        DT,
        &mut PassThrough,
    );
    // Response: the same tick.
    assert_eq!(r, Err(PinFault::RunEnable));
    assert_eq!(il.state(), InterlockState::Tripped);
    assert_eq!(il.cause(), Some(TripCause::PinFault));
    let (mut p, mut b, mut d, mut r, mut e) = io.release();
    p.done();
    b.done();
    d.done();
    r.done();
    e.done();
}

#[test]
fn an_output_pin_error_trips_and_drops_the_permit() {
    let mut io = HalIo::new(
        PinMock::new(&[
            Pin::set(State::High).with_error(io_error()),
            Pin::set(State::Low),
        ]),
        PinMock::new(&[Pin::set(State::High)]),
        PwmMock::new(&[Pwm::max_duty_cycle(MAX_DUTY), Pwm::set_duty_cycle(0)]),
        PinMock::new(&[Pin::get(State::Low)]),
        PinMock::new(&[Pin::get(State::High)]),
        scale(),
    );
    let mut il = interlock();
    let r = il.tick_hal(
        &mut io,
        1.0,
        Sample::new(0.0, 1),
        Sample::ABSENT,
        Sample::ABSENT,
        DT,
        &mut PassThrough,
    );
    assert_eq!(r, Err(PinFault::RunPermit));
    assert_eq!(il.state(), InterlockState::Tripped);
    assert_eq!(il.cause(), Some(TripCause::PinFault));
    let (mut p, mut b, mut d, mut r, mut e) = io.release();
    p.done();
    b.done();
    d.done();
    r.done();
    e.done();
}
