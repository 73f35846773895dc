//! The interlock's states and the causes of a trip.

/// Where the interlock's state machine stands.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum InterlockState {
    /// Standing still, run permit off, nothing latched: waits for run-enable
    /// and a trusted speed sensor.
    Ready,
    /// Run permit on; the request is followed as asked (inside the ceiling).
    Running,
    /// Run permit on; the request is held back: clamped to the ceiling, to
    /// zero (reverse forbidden), or restricted by the request governor.
    Limiting,
    /// A trip is being handled by a controlled stop down the certified
    /// deceleration ramp with power kept on, the measured speed monitored
    /// against it (stop category 1, SS1 speed-monitored).
    Stopping,
    /// As [`InterlockState::Stopping`], but the speed cannot be trusted: the
    /// run permit is removed when the stop ramp's time (plus margin) is up
    /// (time-delayed SS1).
    StoppingTimed,
    /// Run permit off, a trip latched: clears only on a reset edge at
    /// confirmed standstill with the cause gone.
    Tripped,
    /// Run permit off for good: the parameter set failed its integrity check.
    /// No reset clears it; a new interlock must be built.
    Faulted,
}

impl InterlockState {
    /// `true` in [`InterlockState::Running`] and [`InterlockState::Limiting`],
    /// where the ramp follows the (clamped, governed) request.
    #[must_use]
    pub const fn follows_requests(self) -> bool {
        matches!(self, Self::Running | Self::Limiting)
    }

    /// `true` where the run permit is given.
    #[must_use]
    pub const fn permits_running(self) -> bool {
        matches!(
            self,
            Self::Running | Self::Limiting | Self::Stopping | Self::StoppingTimed
        )
    }
}

/// Why the interlock tripped (or faulted).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[repr(u8)]
#[non_exhaustive]
pub enum TripCause {
    /// Measured speed above ceiling + overspeed tolerance.
    Overspeed = 1,
    /// |measured − commanded| beyond the following tolerance while running.
    FollowingError = 2,
    /// During a stop the measured speed stayed above the stop ramp: the run
    /// permit is removed at once (stop category 0).
    NotFollowingStop = 3,
    /// Speed sensor stale: no fresh, finite, in-range sample for the stale time.
    SpeedSensorStale = 4,
    /// The two speed channels disagree.
    ChannelDisagreement = 5,
    /// During a stop the measured speed fell below the stop ramp by more than
    /// the tolerance: the sensor is implausible.
    SpeedImplausible = 6,
    /// Measured swing angle above the certified angle.
    SwingAngle = 7,
    /// Swing-angle sensor stale.
    AngleSensorStale = 8,
    /// Run-enable (emergency stop chain) dropped while moving.
    RunEnableDropped = 9,
    /// The request governor reported a fault or admitted a non-finite speed.
    GovernorFault = 10,
    /// A tick came late (or with a period that is not a positive finite
    /// number): the controller itself is faulty; permit removed at once.
    TickOverrun = 11,
    /// The ramp refused a target the interlock had already checked.
    RampRefused = 12,
    /// The parameter set in memory no longer matches its CRC stamp.
    ParameterIntegrity = 13,
    /// A hardware input or output pin reported an error (feature `hal`):
    /// the permit is removed at once.
    PinFault = 14,
}

impl TripCause {
    /// Every cause, in code order.
    pub const ALL: [Self; 14] = [
        Self::Overspeed,
        Self::FollowingError,
        Self::NotFollowingStop,
        Self::SpeedSensorStale,
        Self::ChannelDisagreement,
        Self::SpeedImplausible,
        Self::SwingAngle,
        Self::AngleSensorStale,
        Self::RunEnableDropped,
        Self::GovernorFault,
        Self::TickOverrun,
        Self::RampRefused,
        Self::ParameterIntegrity,
        Self::PinFault,
    ];

    /// The cause's code in the event block.
    #[must_use]
    pub const fn code(self) -> u8 {
        self as u8
    }

    /// The cause for a code, if any.
    #[must_use]
    pub fn from_code(code: u8) -> Option<Self> {
        Self::ALL.iter().copied().find(|c| c.code() == code)
    }

    /// Bit of this cause in a set of causes.
    pub(crate) const fn bit(self) -> u16 {
        1 << (self as u8)
    }
}
