//! Playback of a profile table: a designed speed change (for example a
//! swing-free one from the host's `design` module) stepped through tick by
//! tick on the target.
//!
//! # Table format, version 1 (all integers and floats little-endian)
//!
//! | offset | size | field |
//! |---:|---:|---|
//! | 0 | 4 | magic `b"SWPT"` |
//! | 4 | 2 | format version, `u16` = [`TABLE_VERSION`] |
//! | 6 | 2 | reserved, `u16` = 0 |
//! | 8 | 4 | stamp, `u32`: CRC-32/ISO-HDLC of the parameter set's bytes the table was designed for |
//! | 12 | 4 | sample period, `u32`, microseconds, in [[`MIN_PERIOD_US`], [`MAX_PERIOD_US`]] |
//! | 16 | 4 | sample count `n`, `u32`, in [2, [`MAX_TABLE_SAMPLES`]] |
//! | 20 | 4 n | shaft speeds, `f32`, rad/s, finite, \|ω\| ≤ [`crate::ramp::MAX_SPEED_RAD_S`]; sample `k` at `k ·` period |
//! | 20 + 4 n | 4 | CRC-32/ISO-HDLC (`crc` crate's `CRC_32_ISO_HDLC`) of bytes `0 .. 20 + 4 n`, `u32` |
//!
//! Between samples the speed is linear; after the last sample it holds. The
//! whole table is [`table_len`]`(n)` bytes. A firmware embeds it with
//! `include_bytes!` and checks it once with [`ProfileTable::parse`], giving the
//! stamp of the parameter set it runs with; a table made for another
//! parameter set, a corrupted one, or one of another version is refused.
//!
//! # Per tick
//! [`ProfilePlayer::step`] does constant work (one division, two reads, no
//! loop), never panics, and keeps time in integer microseconds so that
//! nothing drifts. Its output is a *request*: the firmware hands it to the
//! interlock, whose clamp and ramp apply as to any other request.

use crate::error::ParamError;
use crate::ramp::MAX_SPEED_RAD_S;

/// First four bytes of every table.
pub const TABLE_MAGIC: [u8; 4] = *b"SWPT";
/// Format version written and accepted.
pub const TABLE_VERSION: u16 = 1;
/// Bytes before the first sample.
pub const TABLE_HEADER_LEN: usize = 20;
/// Bytes after the last sample (the CRC).
pub const TABLE_TRAILER_LEN: usize = 4;
/// Shortest accepted sample period, µs.
pub const MIN_PERIOD_US: u32 = 1_000;
/// Longest accepted sample period, µs.
pub const MAX_PERIOD_US: u32 = 1_000_000;
/// Most samples in a table (at 0.05 s, about 14.5 hours).
pub const MAX_TABLE_SAMPLES: u32 = 1 << 20;
/// Longest accepted tick, s.
pub const MAX_TICK_S: f32 = 1.0;

/// The CRC of tables and stamps: CRC-32/ISO-HDLC (the CRC of zip and
/// Ethernet; check value 0xCBF43926 for `"123456789"`).
pub const TABLE_CRC: crc::Crc<u32> = crc::Crc::<u32>::new(&crc::CRC_32_ISO_HDLC);

/// The stamp of a parameter set: CRC-32/ISO-HDLC of its bytes.
#[must_use]
pub fn stamp_of(parameter_bytes: &[u8]) -> u32 {
    TABLE_CRC.checksum(parameter_bytes)
}

/// Length in bytes of a table with `samples` samples.
#[must_use]
pub const fn table_len(samples: usize) -> usize {
    TABLE_HEADER_LEN + 4 * samples + TABLE_TRAILER_LEN
}

/// Why a table was refused.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum TableError {
    /// Shorter than a header, two samples and a CRC.
    TooShort,
    /// The first four bytes are not [`TABLE_MAGIC`].
    BadMagic,
    /// A format version this code does not read.
    UnsupportedVersion(u16),
    /// Reserved bytes are not zero.
    Reserved,
    /// The length does not match the sample count.
    LengthMismatch,
    /// The CRC does not match the contents: the table is corrupted.
    BadCrc,
    /// The table was made for another parameter set.
    StampMismatch {
        /// The stamp of the parameter set in force.
        expected: u32,
        /// The stamp in the table.
        found: u32,
    },
    /// The sample period is outside its range.
    BadPeriod,
    /// The sample count is outside its range.
    BadCount,
    /// A speed sample is not finite or out of range (its index).
    BadSpeed(u32),
}

impl core::fmt::Display for TableError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match *self {
            Self::TooShort => write!(f, "profile table too short"),
            Self::BadMagic => write!(f, "not a profile table (magic)"),
            Self::UnsupportedVersion(v) => write!(f, "profile table version {v} not supported"),
            Self::Reserved => write!(f, "profile table reserved field not zero"),
            Self::LengthMismatch => {
                write!(f, "profile table length does not match its sample count")
            }
            Self::BadCrc => write!(f, "profile table CRC mismatch (corrupted)"),
            Self::StampMismatch { expected, found } => write!(
                f,
                "profile table made for parameter set {found:#010x}, not {expected:#010x}"
            ),
            Self::BadPeriod => write!(f, "profile table sample period out of range"),
            Self::BadCount => write!(f, "profile table sample count out of range"),
            Self::BadSpeed(i) => write!(
                f,
                "profile table speed sample {i} not finite or out of range"
            ),
        }
    }
}

impl core::error::Error for TableError {}

fn read_u16(bytes: &[u8], at: usize) -> Option<u16> {
    let b = bytes.get(at..at + 2)?;
    Some(u16::from_le_bytes([*b.first()?, *b.get(1)?]))
}

fn read_u32(bytes: &[u8], at: usize) -> Option<u32> {
    let b = bytes.get(at..at + 4)?;
    Some(u32::from_le_bytes([
        *b.first()?,
        *b.get(1)?,
        *b.get(2)?,
        *b.get(3)?,
    ]))
}

fn read_f32(bytes: &[u8], at: usize) -> Option<f32> {
    read_u32(bytes, at).map(f32::from_bits)
}

/// A checked profile table, borrowed from its bytes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ProfileTable<'a> {
    bytes: &'a [u8],
    stamp: u32,
    period_us: u32,
    count: u32,
}

impl<'a> ProfileTable<'a> {
    /// Checks `bytes` as a version-1 table made for the parameter set whose
    /// stamp is `expected_stamp`. Reads every sample once (at most
    /// [`MAX_TABLE_SAMPLES`]).
    ///
    /// # Errors
    /// [`TableError`] naming the first fault found, in the order: length,
    /// magic, version, reserved, count and length, CRC, stamp, period, samples.
    pub fn parse(bytes: &'a [u8], expected_stamp: u32) -> Result<Self, TableError> {
        if bytes.len() < table_len(2) {
            return Err(TableError::TooShort);
        }
        if bytes.get(..4) != Some(&TABLE_MAGIC[..]) {
            return Err(TableError::BadMagic);
        }
        let version = read_u16(bytes, 4).ok_or(TableError::TooShort)?;
        if version != TABLE_VERSION {
            return Err(TableError::UnsupportedVersion(version));
        }
        if read_u16(bytes, 6) != Some(0) {
            return Err(TableError::Reserved);
        }
        let count = read_u32(bytes, 16).ok_or(TableError::TooShort)?;
        if !(2..=MAX_TABLE_SAMPLES).contains(&count) {
            return Err(TableError::BadCount);
        }
        let body = table_len(count as usize) - TABLE_TRAILER_LEN;
        if bytes.len() != table_len(count as usize) {
            return Err(TableError::LengthMismatch);
        }
        let crc = read_u32(bytes, body).ok_or(TableError::LengthMismatch)?;
        let contents = bytes.get(..body).ok_or(TableError::LengthMismatch)?;
        if TABLE_CRC.checksum(contents) != crc {
            return Err(TableError::BadCrc);
        }
        let stamp = read_u32(bytes, 8).ok_or(TableError::TooShort)?;
        if stamp != expected_stamp {
            return Err(TableError::StampMismatch {
                expected: expected_stamp,
                found: stamp,
            });
        }
        let period_us = read_u32(bytes, 12).ok_or(TableError::TooShort)?;
        if !(MIN_PERIOD_US..=MAX_PERIOD_US).contains(&period_us) {
            return Err(TableError::BadPeriod);
        }
        let table = Self {
            bytes,
            stamp,
            period_us,
            count,
        };
        // At most MAX_TABLE_SAMPLES iterations.
        for i in 0..count {
            match table.raw_speed(i) {
                Some(w) if w.is_finite() && w.abs() <= MAX_SPEED_RAD_S => {}
                _ => return Err(TableError::BadSpeed(i)),
            }
        }
        Ok(table)
    }

    fn raw_speed(&self, index: u32) -> Option<f32> {
        read_f32(self.bytes, TABLE_HEADER_LEN + 4 * index as usize)
    }

    /// Sample `index`, rad/s (the last sample beyond the end).
    #[must_use]
    pub fn speed(&self, index: u32) -> f32 {
        self.raw_speed(index.min(self.count - 1)).unwrap_or(0.0)
    }

    /// The stamp of the parameter set the table was made for.
    #[must_use]
    pub const fn stamp(&self) -> u32 {
        self.stamp
    }

    /// Sample period, µs.
    #[must_use]
    pub const fn period_us(&self) -> u32 {
        self.period_us
    }

    /// Number of samples.
    #[must_use]
    pub const fn count(&self) -> u32 {
        self.count
    }

    /// Duration from the first to the last sample, µs.
    #[must_use]
    pub const fn duration_us(&self) -> u64 {
        (self.count as u64 - 1) * self.period_us as u64
    }

    /// Speed (rad/s) and slope (rad/s²) `elapsed_us` after the first sample:
    /// linear between samples, the last sample held after the end.
    #[must_use]
    pub fn at(&self, elapsed_us: u64) -> (f32, f32) {
        let period = u64::from(self.period_us);
        let index = elapsed_us / period;
        if index + 1 >= u64::from(self.count) {
            return (self.speed(self.count - 1), 0.0);
        }
        // index < count − 1 ≤ 2^20, so the casts are exact.
        #[allow(clippy::cast_possible_truncation, clippy::cast_precision_loss)]
        let (i, frac) = (
            index as u32,
            (elapsed_us - index * period) as f32 / self.period_us as f32,
        );
        let a = self.speed(i);
        let b = self.speed(i + 1);
        #[allow(clippy::cast_precision_loss)]
        let slope = (b - a) * 1.0e6 / self.period_us as f32;
        (a + (b - a) * frac, slope)
    }
}

/// One tick of playback.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct PlayerOutput {
    /// Requested shaft speed, rad/s: hand it to the interlock.
    pub request_rad_s: f32,
    /// Slope of the table at this point, rad/s² (0 after the end).
    pub slope_rad_s2: f32,
    /// Time since the start of playback, µs (it stops counting at the end).
    pub elapsed_us: u64,
    /// `true` once the last sample is reached (the request then holds).
    pub finished: bool,
}

/// Steps through a checked table, tick by tick.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ProfilePlayer<'a> {
    table: ProfileTable<'a>,
    elapsed_us: u64,
}

impl<'a> ProfilePlayer<'a> {
    /// A player at the first sample of `table`.
    #[must_use]
    pub const fn new(table: ProfileTable<'a>) -> Self {
        Self {
            table,
            elapsed_us: 0,
        }
    }

    /// The table played.
    #[must_use]
    pub const fn table(&self) -> &ProfileTable<'a> {
        &self.table
    }

    /// The output at the current time, without advancing.
    #[must_use]
    pub fn output(&self) -> PlayerOutput {
        let (request_rad_s, slope_rad_s2) = self.table.at(self.elapsed_us);
        PlayerOutput {
            request_rad_s,
            slope_rad_s2,
            elapsed_us: self.elapsed_us,
            finished: self.elapsed_us >= self.table.duration_us(),
        }
    }

    /// Advances by `dt_s` (rounded to the microsecond) and returns the output
    /// at the new time.
    ///
    /// # Errors
    /// [`ParamError`] naming `dt_s` when it is not finite or not in
    /// (0, [`MAX_TICK_S`]]; the player does not advance then.
    pub fn step(&mut self, dt_s: f32) -> Result<PlayerOutput, ParamError> {
        if !dt_s.is_finite() {
            return Err(ParamError::NonFinite("dt_s"));
        }
        if dt_s <= 0.0 {
            return Err(ParamError::NotPositive("dt_s"));
        }
        if dt_s > MAX_TICK_S {
            return Err(ParamError::OutOfRange("dt_s"));
        }
        // dt_s ≤ 1 s, so the product is at most 1e6 and the cast exact.
        #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
        let dt_us = libm::roundf(dt_s * 1.0e6) as u64;
        // Stop counting once past the end: the output holds there anyway.
        self.elapsed_us = self
            .elapsed_us
            .saturating_add(dt_us)
            .min(self.table.duration_us());
        Ok(self.output())
    }

    /// Back to the first sample.
    pub fn restart(&mut self) {
        self.elapsed_us = 0;
    }
}
