//! Freshness of a sensor and debounced conditions.

/// The last valid reading of a sensor and how long ago it came.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub(crate) struct SensorTrack {
    /// Last sequence number seen; starts outside the `u8` range so that the
    /// first sample is always fresh.
    last_sequence: u16,
    /// Ticks since the last fresh, valid sample (saturating).
    since_valid: u16,
    /// The last valid value.
    value: f32,
}

impl SensorTrack {
    pub(crate) const fn new() -> Self {
        Self {
            last_sequence: 0x100,
            since_valid: u16::MAX,
            value: 0.0,
        }
    }

    /// Takes this tick's reading: a new sequence number with a finite value of
    /// magnitude at most `max_abs` is a fresh sample; anything else ages the
    /// last one.
    #[inline]
    pub(crate) fn update(&mut self, sample: super::Sample, max_abs: f32) {
        let seq = u16::from(sample.sequence);
        if seq != self.last_sequence {
            self.last_sequence = seq;
            // False for NaN.
            if sample.value.abs() <= max_abs {
                self.value = sample.value;
                self.since_valid = 0;
                return;
            }
        }
        self.since_valid = self.since_valid.saturating_add(1);
    }

    /// `true` while the last valid sample is younger than `stale_ticks`.
    #[inline]
    pub(crate) const fn trusted(&self, stale_ticks: u16) -> bool {
        self.since_valid < stale_ticks
    }

    /// The last valid value.
    #[inline]
    pub(crate) const fn value(&self) -> f32 {
        self.value
    }
}

/// Consecutive ticks a condition has held (saturating), reset when it does not.
#[inline]
pub(crate) const fn count(counter: u16, condition: bool) -> u16 {
    if condition {
        counter.saturating_add(1)
    } else {
        0
    }
}
