//! The event record: a fixed-capacity ring of the last events, with a count
//! of those that no longer fit, kept as a CRC-protected byte block across
//! power loss (storage is the integrator's: flash or FRAM).

use heapless::Deque;

use super::params::{check_block, BlockError, Reader, CRC32};
use super::state::TripCause;
use crate::error::ParamError;

/// What happened.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum EventKind {
    /// A trip cause was seen (the first one latches the trip; later ones
    /// while tripped are recorded once each until the reset).
    Trip(TripCause),
    /// The run permit was removed at once (stop category 0).
    PermitRemovedAtOnce,
    /// The run permit was removed at confirmed standstill after a controlled stop.
    PermitRemovedAtStandstill,
    /// The run permit was removed when the time-monitored stop's time was up.
    PermitRemovedTimeUp,
    /// A speed-monitored stop went over to the time-monitored stop.
    StopTimed,
    /// A reset edge cleared the latched trip.
    ResetAccepted,
    /// A reset edge came while moving, not at confirmed standstill, with a
    /// cause still present, or while faulted; the trip stays latched.
    /// Recorded once per latched trip.
    ResetRefused,
    /// A non-finite request was refused; the previous target was kept.
    RequestRefused,
    /// The interlock faulted for good.
    Faulted(TripCause),
}

impl EventKind {
    fn codes(self) -> (u8, u8) {
        match self {
            Self::Trip(c) => (1, c.code()),
            Self::PermitRemovedAtOnce => (2, 0),
            Self::PermitRemovedAtStandstill => (3, 0),
            Self::PermitRemovedTimeUp => (4, 0),
            Self::StopTimed => (5, 0),
            Self::ResetAccepted => (6, 0),
            Self::ResetRefused => (7, 0),
            Self::RequestRefused => (8, 0),
            Self::Faulted(c) => (9, c.code()),
        }
    }

    fn from_codes(kind: u8, detail: u8) -> Option<Self> {
        let plain = |k| if detail == 0 { Some(k) } else { None };
        match kind {
            1 => TripCause::from_code(detail).map(Self::Trip),
            2 => plain(Self::PermitRemovedAtOnce),
            3 => plain(Self::PermitRemovedAtStandstill),
            4 => plain(Self::PermitRemovedTimeUp),
            5 => plain(Self::StopTimed),
            6 => plain(Self::ResetAccepted),
            7 => plain(Self::ResetRefused),
            8 => plain(Self::RequestRefused),
            9 => TripCause::from_code(detail).map(Self::Faulted),
            _ => None,
        }
    }
}

/// One recorded event.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Event {
    /// Tick number at which it happened (counted from the interlock's start).
    pub tick: u32,
    /// What happened.
    pub kind: EventKind,
    /// Measured shaft speed at the time, rad/s (the last valid sample; NaN
    /// for a refused request's value, see `requested`).
    pub measured_rad_s: f32,
    /// Commanded speed, or for [`EventKind::RequestRefused`] the refused
    /// request, rad/s.
    pub value_rad_s: f32,
}

/// Bytes per event in the block.
const EVENT_BYTES: usize = 16;
/// Header: version, length, overflow count, event count, reserved.
const HEADER_BYTES: usize = 12;

/// The ring of the last `N` events and the count of older ones pushed out.
#[derive(Debug, Clone, PartialEq)]
pub struct EventLog<const N: usize> {
    events: Deque<Event, N>,
    overflowed: u32,
}

/// Logs the count, the overflow count and the latest event (a whole ring
/// would flood the log).
#[cfg(feature = "defmt")]
impl<const N: usize> defmt::Format for EventLog<N> {
    fn format(&self, f: defmt::Formatter<'_>) {
        defmt::write!(
            f,
            "EventLog {{ held: {=usize}, overflowed: {=u32}, last: {} }}",
            self.events.len(),
            self.overflowed,
            self.events.back()
        );
    }
}

impl<const N: usize> Default for EventLog<N> {
    fn default() -> Self {
        Self::new()
    }
}

impl<const N: usize> EventLog<N> {
    /// Format version of the byte block.
    pub const FORMAT_VERSION: u16 = 1;
    /// Length of the byte block for capacity `N`, bytes.
    pub const BYTES: usize = HEADER_BYTES + EVENT_BYTES * N + 4;

    /// An empty record.
    #[must_use]
    pub const fn new() -> Self {
        Self {
            events: Deque::new(),
            overflowed: 0,
        }
    }

    /// Appends an event; when full, the oldest is pushed out and counted.
    pub fn push(&mut self, event: Event) {
        if N == 0 {
            self.overflowed = self.overflowed.saturating_add(1);
            return;
        }
        if self.events.is_full() {
            let _oldest = self.events.pop_front();
            self.overflowed = self.overflowed.saturating_add(1);
        }
        // Cannot fail after the pop; if it did, the event is counted.
        if self.events.push_back(event).is_err() {
            self.overflowed = self.overflowed.saturating_add(1);
        }
    }

    /// The events held, oldest first.
    pub fn iter(&self) -> impl Iterator<Item = &Event> {
        self.events.iter()
    }

    /// Number of events held.
    #[must_use]
    pub fn len(&self) -> usize {
        self.events.len()
    }

    /// `true` when no event is held.
    #[must_use]
    pub fn is_empty(&self) -> bool {
        self.events.is_empty()
    }

    /// The most recent event.
    #[must_use]
    pub fn last(&self) -> Option<&Event> {
        self.events.back()
    }

    /// Events pushed out of the ring since it was started (saturating).
    #[must_use]
    pub const fn overflowed(&self) -> u32 {
        self.overflowed
    }

    /// Writes the byte block (layout in `docs/interlock.md`) into `out`,
    /// which must be exactly [`EventLog::BYTES`] long.
    ///
    /// # Errors
    /// [`BlockError::Length`] when `out` has another length, or the block
    /// would not fit its 16-bit length field (capacity above 4094).
    pub fn write_to(&self, out: &mut [u8]) -> Result<(), BlockError> {
        let len = u16::try_from(Self::BYTES).map_err(|_| BlockError::Length {
            expected: Self::BYTES,
            found: out.len(),
        })?;
        if out.len() != Self::BYTES {
            return Err(BlockError::Length {
                expected: Self::BYTES,
                found: out.len(),
            });
        }
        out.fill(0);
        let mut at = 0;
        let mut put = |bytes: &[u8]| {
            if let Some(dst) = out.get_mut(at..at + bytes.len()) {
                dst.copy_from_slice(bytes);
            }
            at += bytes.len();
        };
        put(&Self::FORMAT_VERSION.to_le_bytes());
        put(&len.to_le_bytes());
        put(&self.overflowed.to_le_bytes());
        // len() <= N <= 4094 here.
        put(&(self.events.len() as u16).to_le_bytes());
        put(&[0, 0]);
        for e in &self.events {
            let (kind, detail) = e.kind.codes();
            put(&e.tick.to_le_bytes());
            put(&[kind, detail, 0, 0]);
            put(&e.measured_rad_s.to_bits().to_le_bytes());
            put(&e.value_rad_s.to_bits().to_le_bytes());
        }
        let body = Self::BYTES - 4;
        let crc = CRC32.checksum(out.get(..body).unwrap_or(&[]));
        if let Some(dst) = out.get_mut(body..) {
            dst.copy_from_slice(&crc.to_le_bytes());
        }
        Ok(())
    }

    /// Restores a record from its byte block.
    ///
    /// # Errors
    /// [`BlockError::Length`], [`BlockError::Crc`], [`BlockError::Version`],
    /// or [`BlockError::Param`] naming `event_count`, `event_kind` or
    /// `event_reserved` for an intact block with impossible contents
    /// (unused slots must be zero).
    pub fn read_from(bytes: &[u8]) -> Result<Self, BlockError> {
        check_block(bytes, Self::BYTES, Self::FORMAT_VERSION)?;
        let mut r = Reader::new(bytes);
        let _version_and_length = r.u32();
        let overflowed = r.u32();
        let count = usize::from(r.u16());
        if count > N {
            return Err(ParamError::OutOfRange("event_count").into());
        }
        if r.u16() != 0 {
            return Err(ParamError::OutOfRange("event_reserved").into());
        }
        let mut events = Deque::new();
        let mut slot = 0;
        while slot < N {
            let tick = r.u32();
            let kind = r.u8();
            let detail = r.u8();
            let reserved = r.u16();
            let measured_rad_s = f32::from_bits(r.u32());
            let value_rad_s = f32::from_bits(r.u32());
            if slot < count {
                if reserved != 0 {
                    return Err(ParamError::OutOfRange("event_reserved").into());
                }
                let kind = EventKind::from_codes(kind, detail)
                    .ok_or(BlockError::Param(ParamError::OutOfRange("event_kind")))?;
                let event = Event {
                    tick,
                    kind,
                    measured_rad_s,
                    value_rad_s,
                };
                if events.push_back(event).is_err() {
                    return Err(ParamError::OutOfRange("event_count").into());
                }
            } else if tick != 0
                || kind != 0
                || detail != 0
                || reserved != 0
                || measured_rad_s.to_bits() != 0
                || value_rad_s.to_bits() != 0
            {
                return Err(ParamError::OutOfRange("event_reserved").into());
            }
            slot += 1;
        }
        Ok(Self { events, overflowed })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ev(tick: u32) -> Event {
        Event {
            tick,
            kind: EventKind::Trip(TripCause::Overspeed),
            measured_rad_s: 1.5,
            value_rad_s: f32::NAN,
        }
    }

    #[test]
    fn a_full_ring_counts_what_it_pushes_out() {
        let mut log = EventLog::<3>::new();
        for t in 0..5 {
            log.push(ev(t));
        }
        assert_eq!(log.len(), 3);
        assert_eq!(log.overflowed(), 2);
        let ticks: heapless::Vec<u32, 3> = log.iter().map(|e| e.tick).collect();
        assert_eq!(ticks.as_slice(), &[2, 3, 4]);
    }

    #[test]
    fn the_block_round_trips_and_refuses_damage() {
        let mut log = EventLog::<4>::new();
        log.push(ev(7));
        log.push(Event {
            tick: 9,
            kind: EventKind::ResetRefused,
            measured_rad_s: 0.0,
            value_rad_s: -0.0,
        });
        let mut b = [0u8; EventLog::<4>::BYTES];
        log.write_to(&mut b).unwrap();
        let back = EventLog::<4>::read_from(&b).unwrap();
        assert_eq!(back.len(), 2);
        assert_eq!(back.last().unwrap().tick, 9);
        assert!(back.iter().next().unwrap().value_rad_s.is_nan());
        let mut bad = b;
        bad[20] ^= 0x10;
        assert_eq!(EventLog::<4>::read_from(&bad).unwrap_err(), BlockError::Crc);
        assert!(matches!(
            EventLog::<3>::read_from(&b),
            Err(BlockError::Length { .. })
        ));
        let mut short = [0u8; 3];
        assert!(log.write_to(&mut short).is_err());
    }
}
