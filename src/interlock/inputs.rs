//! What the interlock reads and writes each tick.

use crate::ramp::Setpoint;

/// One reading of a sensor with the sequence number of its sample.
///
/// The sensor driver increments `sequence` (wrapping) for every new sample;
/// an unchanged sequence means no fresh sample this tick, so a driver that
/// has stopped delivering is seen as stale even if its last value stays put.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Sample {
    /// The value: shaft speed in rad/s, or swing angle from vertical in rad.
    pub value: f32,
    /// Sequence number of the sample (wrapping).
    pub sequence: u8,
}

impl Sample {
    /// A reading with its sequence number.
    #[must_use]
    pub const fn new(value: f32, sequence: u8) -> Self {
        Self { value, sequence }
    }

    /// For a sensor that is not fitted (ignored by the interlock).
    pub const ABSENT: Self = Self {
        value: 0.0,
        sequence: 0,
    };
}

/// The interlock's inputs for one tick.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct TickInputs {
    /// Speed asked for by the ride program or the operator, rad/s (any
    /// value: it is clamped, and a non-finite one is refused and recorded).
    pub request_rad_s: f32,
    /// Measured shaft speed, rad/s.
    pub speed: Sample,
    /// Second, independent speed channel, rad/s (ignored unless fitted).
    pub second_speed: Sample,
    /// Measured swing angle from vertical, rad (ignored unless fitted).
    pub angle: Sample,
    /// Run-enable input (the emergency-stop chain): `true` = may run.
    pub run_enable: bool,
    /// Reset input level; a trip clears on its rising edge only.
    pub reset: bool,
}

/// What the interlock commands after one tick.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct TickOutput {
    /// The ramp's setpoint: the speed reference for the drive.
    pub command: Setpoint,
    /// Run permit (drive torque enable): `false` = torque off, the ride coasts.
    pub run_permit: bool,
    /// Holding brake: `true` = applied.
    pub brake: bool,
    /// The state after this tick.
    pub state: super::InterlockState,
}
