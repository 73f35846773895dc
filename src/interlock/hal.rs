//! The interlock's hardware inputs and outputs over embedded-hal 1.0
//! (feature `hal`).
//!
//! * **Run permit** (`OutputPin`): a *heartbeat*, toggled on every tick that
//!   gives the permit and held low otherwise. It drives an external watchdog
//!   relay that drops when the toggling stops, so a hung processor (stuck high
//!   or low) removes the permit as a dead one does; energised = permitted.
//! * **Brake** (`OutputPin`): high = brake *released* (a spring-applied brake
//!   held off by its coil), so a lost output applies the brake.
//! * **Speed reference** (`SetDutyCycle`): duty in integer arithmetic,
//!   clamped, for example a 0–10 V reference through an RC filter.
//! * **Reset** and **run-enable** (`InputPin`): high = pressed / may run.
//!
//! A pin error is a fault, never ignored: it trips the interlock with the
//! permit removed at once ([`TripCause::PinFault`](super::TripCause::PinFault))
//! and is returned to the caller.

use embedded_hal::digital::{InputPin, OutputPin, PinState};
use embedded_hal::pwm::SetDutyCycle;

use super::{Interlock, Sample, TickInputs, TickOutput};
use crate::error::{check_positive, ParamError};
use crate::request_governor::RequestGovernor;
use crate::steady::MAX_SHAFT_SPEED_RAD_S;

/// How a speed maps onto the duty cycle.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum ReferenceMode {
    /// 0 % = standstill, 100 % = full scale forward; a reverse speed gives 0 %.
    Unipolar,
    /// 0 % = full scale reverse, 50 % = standstill, 100 % = full scale forward.
    Bipolar,
}

/// Scaling of the speed reference, checked once.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SpeedReference {
    full_scale_rad_s: f32,
    /// 65 536 / full scale: speed to a Q16 fraction without a division.
    q16_per_rad_s: f32,
    mode: ReferenceMode,
}

/// One in Q16.
const Q16_ONE: i32 = 1 << 16;

impl SpeedReference {
    /// * `full_scale_rad_s`: shaft speed at 100 % duty, rad/s, in (0, 100].
    ///
    /// # Errors
    /// [`ParamError`] naming `full_scale_rad_s`.
    pub fn new(full_scale_rad_s: f32, mode: ReferenceMode) -> Result<Self, ParamError> {
        let f = check_positive("full_scale_rad_s", full_scale_rad_s, MAX_SHAFT_SPEED_RAD_S)?;
        Ok(Self {
            full_scale_rad_s: f,
            q16_per_rad_s: 65_536.0 / f,
            mode,
        })
    }

    /// Shaft speed at 100 % duty, rad/s.
    #[must_use]
    pub const fn full_scale_rad_s(&self) -> f32 {
        self.full_scale_rad_s
    }

    /// The duty for `speed_rad_s` out of `max_duty`, rounded to nearest and
    /// clamped to [0, `max_duty`] (a NaN gives standstill).
    #[must_use]
    pub fn duty(&self, speed_rad_s: f32, max_duty: u16) -> u16 {
        // `as` saturates and maps NaN to 0; the clamp keeps it within ±1.
        let q = ((speed_rad_s * self.q16_per_rad_s) as i32).clamp(-Q16_ONE, Q16_ONE);
        let unsigned = match self.mode {
            ReferenceMode::Unipolar => q.max(0),
            ReferenceMode::Bipolar => (q + Q16_ONE) >> 1,
        };
        // In [0, 65 536]: the product fits a u64 with room to spare.
        let unsigned = u64::from(unsigned.unsigned_abs());
        let duty = (unsigned * u64::from(max_duty) + (1 << 15)) >> 16;
        u16::try_from(duty).unwrap_or(max_duty).min(max_duty)
    }
}

/// Which pin failed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum PinFault {
    /// The run-permit heartbeat output.
    RunPermit,
    /// The brake output.
    Brake,
    /// The speed-reference duty cycle.
    SpeedReference,
    /// The reset input.
    Reset,
    /// The run-enable input.
    RunEnable,
}

/// The interlock's pins.
#[derive(Debug)]
pub struct HalIo<P, B, D, R, E> {
    permit: P,
    brake_release: B,
    reference: D,
    reset: R,
    run_enable: E,
    scale: SpeedReference,
    heartbeat: bool,
}

/// Logs the scaling and the heartbeat level (pins have no log form of their own).
#[cfg(feature = "defmt")]
impl<P, B, D, R, E> defmt::Format for HalIo<P, B, D, R, E> {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(
            f,
            "HalIo {{ scale: {}, heartbeat: {=bool} }}",
            self.scale,
            self.heartbeat
        );
    }
}

impl<P, B, D, R, E> HalIo<P, B, D, R, E>
where
    P: OutputPin,
    B: OutputPin,
    D: SetDutyCycle,
    R: InputPin,
    E: InputPin,
{
    /// Takes the pins (see the module documentation for their meaning).
    pub const fn new(
        permit: P,
        brake_release: B,
        reference: D,
        reset: R,
        run_enable: E,
        scale: SpeedReference,
    ) -> Self {
        Self {
            permit,
            brake_release,
            reference,
            reset,
            run_enable,
            scale,
            heartbeat: false,
        }
    }

    /// Gives the pins back.
    pub fn release(self) -> (P, B, D, R, E) {
        (
            self.permit,
            self.brake_release,
            self.reference,
            self.reset,
            self.run_enable,
        )
    }

    /// Reads run-enable and reset; the first failing pin is reported.
    fn read(&mut self) -> Result<(bool, bool), PinFault> {
        let run_enable = self.run_enable.is_high().map_err(|_| PinFault::RunEnable)?;
        let reset = self.reset.is_high().map_err(|_| PinFault::Reset)?;
        Ok((run_enable, reset))
    }

    /// Drives the outputs for one tick's result; every output is written
    /// even when an earlier one failed, and the first failure is reported.
    fn write(&mut self, out: &TickOutput) -> Result<(), PinFault> {
        self.heartbeat = out.run_permit && !self.heartbeat;
        let permit = self
            .permit
            .set_state(PinState::from(self.heartbeat))
            .map_err(|_| PinFault::RunPermit);
        let brake = self
            .brake_release
            .set_state(PinState::from(!out.brake))
            .map_err(|_| PinFault::Brake);
        let max = self.reference.max_duty_cycle();
        let duty = self.scale.duty(out.command.speed.rad_per_s(), max);
        let reference = self
            .reference
            .set_duty_cycle(duty)
            .map_err(|_| PinFault::SpeedReference);
        permit.and(brake).and(reference)
    }

    /// Best effort after a fault: permit low (the heartbeat stops either way).
    fn drop_permit(&mut self) {
        self.heartbeat = false;
        // Its own error cannot be handled further: the stopped heartbeat
        // drops the external relay.
        let _ = self.permit.set_low();
    }
}

impl<const N: usize> Interlock<N> {
    /// One control tick with the inputs and outputs on pins: reads
    /// run-enable and reset, runs [`Interlock::tick_with`], writes the
    /// heartbeat permit, the brake and the speed reference.
    ///
    /// A failing input counts as run-enable dropped and reset released; any
    /// pin error trips with the permit removed at once.
    ///
    /// # Errors
    /// [`PinFault`] naming the first pin that failed; the returned fault is
    /// already latched in the interlock.
    #[allow(clippy::too_many_arguments)]
    pub fn tick_hal<G, P, B, D, R, E>(
        &mut self,
        io: &mut HalIo<P, B, D, R, E>,
        request_rad_s: f32,
        speed: Sample,
        second_speed: Sample,
        angle: Sample,
        dt_s: f32,
        governor: &mut G,
    ) -> Result<TickOutput, PinFault>
    where
        G: RequestGovernor,
        P: OutputPin,
        B: OutputPin,
        D: SetDutyCycle,
        R: InputPin,
        E: InputPin,
    {
        let read = io.read();
        let (run_enable, reset) = read.unwrap_or((false, false));
        let inputs = TickInputs {
            request_rad_s,
            speed,
            second_speed,
            angle,
            run_enable,
            reset,
        };
        let mut out = self.tick_with(&inputs, dt_s, governor);
        if read.is_err() {
            self.pin_fault();
            out.run_permit = false;
            out.state = self.state();
        }
        let written = io.write(&out);
        if written.is_err() {
            self.pin_fault();
            io.drop_permit();
            out.run_permit = false;
            out.state = self.state();
        }
        read.and(written).map(|()| out)
    }
}
