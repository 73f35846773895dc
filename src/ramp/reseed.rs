//! Re-seeding the ramp from a measured speed: when it is allowed, and why not.

use core::fmt;

/// The situations in which the ramp may take a measured speed as its own.
///
/// The ramp normally plans from its own commanded state and never looks at the
/// measured speed; these are the exceptions, named so that every call site says
/// why it breaks that rule.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum ReseedReason {
    /// The drive was off (torque removed, for example after a stop category 0)
    /// and the ride is still coasting; the ramp takes over from the coasting speed.
    CoastingTakeover,
    /// The drive could not follow the setpoint (torque or current limit) and the
    /// ride is slower than commanded; continuing from the higher commanded
    /// speed would ask for a step the drive cannot make.
    DriveFellBehind,
}

/// Why a re-seed was refused. The ramp's state is unchanged.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum ReseedError {
    /// The measured speed (`measured_speed`) is NaN or infinite.
    NonFinite,
    /// The measured speed's magnitude is above the commanded one: a re-seed may
    /// only lower the speed's magnitude.
    Faster,
    /// The measured speed turns the other way than the commanded one.
    OppositeDirection,
}

impl fmt::Display for ReseedError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::NonFinite => f.write_str("measured_speed must be a finite number"),
            Self::Faster => f.write_str(
                "measured_speed is faster than the commanded speed; a re-seed may only lower it",
            ),
            Self::OppositeDirection => {
                f.write_str("measured_speed turns the other way than the commanded speed")
            }
        }
    }
}

impl core::error::Error for ReseedError {}
