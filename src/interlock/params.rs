//! The interlock's safety parameter set: checked once, integrity-protected by
//! a fixed byte layout closed with a CRC-32.
//!
//! There are no setters. New parameters mean a new interlock, built while the
//! ride stands still.

use core::fmt;

use crate::error::{check_positive, check_range, ParamError};
use crate::gravity::Gravity;
use crate::ramp::{RampLimits, Reverse, MAX_TICK_S};
use crate::steady::MAX_SHAFT_SPEED_RAD_S;

use super::ceiling::SpeedCeiling;

/// CRC-32/ISO-HDLC (the common "CRC-32": polynomial 0x04C11DB7, reflected,
/// initial value and final XOR 0xFFFFFFFF), shared by every interlock block.
/// Bit by bit, without the 1 KiB lookup table: the blocks are short (92 and
/// 16 bytes) and checked at start-up or in the background, where flash
/// counts for more than the few thousand instructions.
pub(crate) const CRC32: crc::Crc<u32, crc::NoTable> =
    crc::Crc::<u32, crc::NoTable>::new(&crc::CRC_32_ISO_HDLC);

/// The values of a safety parameter set, as written in the ride file's
/// `[interlock]` table (the field names are its keys).
///
/// Every field must be given: a safety value has no default. Check the set
/// with [`SafetyParams::new`].
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SafetyConfig {
    /// Certified maximum steady swing angle from vertical, °, in (0, 80].
    pub certified_angle_deg: f32,
    /// Certified maximum rider load factor (1/cos φ), in (1, 10], or `None`
    /// when the certificate sets no separate limit.
    pub max_load_factor: Option<f32>,
    /// Mechanical maximum shaft speed, rad/s, in (0, 100].
    pub mechanical_max_rad_s: f32,
    /// Largest hub offset of the geometry tolerance band, m, in [0, 100].
    pub hub_offset_max_m: f32,
    /// Longest effective length of the tolerance band (heaviest rider,
    /// stretched chains), m, in (0, 100].
    pub length_max_m: f32,
    /// Lowest local gravity of the tolerance band, m/s², in [9.7, 9.9].
    pub gravity_min_mps2: f32,
    /// Speed kept clear below the lowest limit, rad/s, in [0, 100]; the
    /// ceiling left over must be above zero.
    pub speed_margin_rad_s: f32,
    /// Certified acceleration limit, rad/s², in [0.001, 1000].
    pub max_acceleration_rad_s2: f32,
    /// Certified deceleration limit (the stop ramp), rad/s², in [0.001, 1000].
    pub max_deceleration_rad_s2: f32,
    /// Certified jerk limit, rad/s³, in [0.001, 100000].
    pub max_jerk_rad_s3: f32,
    /// Measured speed this far above the ceiling is overspeed, rad/s, in (0, 100].
    pub overspeed_tolerance_rad_s: f32,
    /// Largest accepted |measured − commanded| speed, rad/s, in (0, 100].
    pub following_tolerance_rad_s: f32,
    /// Largest accepted disagreement of the two speed channels, rad/s, in (0, 100].
    pub channel_tolerance_rad_s: f32,
    /// Physical range of the speed sensor, rad/s, in (0, 1000]; a sample of
    /// larger magnitude is implausible. Must exceed ceiling + overspeed tolerance.
    pub sensor_max_rad_s: f32,
    /// Measured speed magnitude at or below which the ride stands still,
    /// rad/s, in (0, 10], below the ceiling.
    pub standstill_rad_s: f32,
    /// Nominal tick period, s, in [0.00001, 0.1].
    pub tick_s: f32,
    /// Longest accepted tick period, s, in (tick_s, 1]: a later tick is an overrun.
    pub overrun_tick_s: f32,
    /// Time allowed beyond the stop ramp's planned time, s, in [0, 600]
    /// (time-monitored stop).
    pub stop_time_margin_s: f32,
    /// Time after the run permit was removed at which the brake applies even
    /// without a confirmed standstill (the ride's longest coast-down), s, in [0, 3600].
    pub brake_delay_s: f32,
    /// Consecutive ticks a monitored condition must hold before it trips, in [1, 10000].
    pub debounce_ticks: u16,
    /// Ticks without a fresh, valid sample after which a sensor is untrusted, in [1, 10000].
    pub stale_ticks: u16,
    /// Consecutive ticks at standstill that confirm it, in [1, 60000].
    pub standstill_ticks: u16,
    /// Whether the ride may turn backwards.
    pub reverse: Reverse,
    /// Whether a second, independent speed channel is fitted.
    pub second_channel: bool,
    /// Whether a swing-angle sensor is fitted.
    pub angle_sensor: bool,
}

/// A checked safety parameter set with its derived values: the speed ceiling,
/// the certified ramp limits and the CRC stamp of its byte block.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SafetyParams {
    pub(crate) config: SafetyConfig,
    pub(crate) ceiling: SpeedCeiling,
    limits: RampLimits,
    stamp: u32,
}

/// Why a parameter block was refused.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum BlockError {
    /// The block does not have the expected length.
    Length {
        /// Length expected, bytes.
        expected: usize,
        /// Length given, bytes.
        found: usize,
    },
    /// The CRC-32 does not match the contents.
    Crc,
    /// The format version (or the length field) is not one this code reads.
    Version(u16),
    /// The block is intact but holds a refused value.
    Param(ParamError),
}

impl fmt::Display for BlockError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Self::Length { expected, found } => {
                write!(f, "block has {found} bytes, expected {expected}")
            }
            Self::Crc => write!(f, "block CRC-32 does not match its contents"),
            Self::Version(v) => write!(f, "block format version {v} is not supported"),
            Self::Param(e) => write!(f, "block holds a refused value: {e}"),
        }
    }
}

impl core::error::Error for BlockError {}

impl From<ParamError> for BlockError {
    fn from(e: ParamError) -> Self {
        Self::Param(e)
    }
}

/// Flag bits of byte 86.
const FLAG_REVERSE: u8 = 1;
const FLAG_SECOND_CHANNEL: u8 = 2;
const FLAG_ANGLE_SENSOR: u8 = 4;
const FLAGS_KNOWN: u8 = FLAG_REVERSE | FLAG_SECOND_CHANNEL | FLAG_ANGLE_SENSOR;

/// Offset of the CRC-32 (the bytes before it are covered).
const CRC_OFFSET: usize = 88;

/// Little-endian writer over a fixed array; positions are constants, so the
/// `get_mut` never fails in practice and a failure would only leave zeros,
/// which the CRC then covers.
struct Writer<'a> {
    buf: &'a mut [u8],
    at: usize,
}

impl Writer<'_> {
    fn put(&mut self, bytes: &[u8]) {
        let end = self.at + bytes.len();
        if let Some(dst) = self.buf.get_mut(self.at..end) {
            dst.copy_from_slice(bytes);
        }
        self.at = end;
    }
    fn f32(&mut self, v: f32) {
        self.put(&v.to_bits().to_le_bytes());
    }
    fn u16(&mut self, v: u16) {
        self.put(&v.to_le_bytes());
    }
}

/// Little-endian reader; a short read yields zeros (the length was checked first).
pub(crate) struct Reader<'a> {
    buf: &'a [u8],
    at: usize,
}

impl<'a> Reader<'a> {
    pub(crate) const fn new(buf: &'a [u8]) -> Self {
        Self { buf, at: 0 }
    }
    pub(crate) fn take<const K: usize>(&mut self) -> [u8; K] {
        let mut out = [0u8; K];
        if let Some(src) = self.buf.get(self.at..self.at + K) {
            out.copy_from_slice(src);
        }
        self.at += K;
        out
    }
    pub(crate) fn f32(&mut self) -> f32 {
        f32::from_bits(u32::from_le_bytes(self.take()))
    }
    pub(crate) fn u16(&mut self) -> u16 {
        u16::from_le_bytes(self.take())
    }
    pub(crate) fn u32(&mut self) -> u32 {
        u32::from_le_bytes(self.take())
    }
    pub(crate) fn u8(&mut self) -> u8 {
        self.take::<1>()[0]
    }
}

/// Checks a block's length, its CRC-32 (the last four bytes, little-endian,
/// over everything before) and its version and length fields (the first four
/// bytes). Returns the CRC.
pub(crate) fn check_block(bytes: &[u8], expected: usize, version: u16) -> Result<u32, BlockError> {
    if bytes.len() != expected {
        return Err(BlockError::Length {
            expected,
            found: bytes.len(),
        });
    }
    let body_len = expected.saturating_sub(4);
    let (body, tail) = bytes.split_at(body_len);
    let stored = Reader::new(tail).u32();
    if CRC32.checksum(body) != stored {
        return Err(BlockError::Crc);
    }
    let mut r = Reader::new(body);
    let found_version = r.u16();
    let found_len = r.u16();
    if found_version != version || usize::from(found_len) != expected {
        return Err(BlockError::Version(found_version));
    }
    Ok(stored)
}

/// A finite value in `[min, max]`, zero and negatives refused as `NotPositive`.
fn check_positive_in(name: &'static str, v: f32, min: f32, max: f32) -> Result<f32, ParamError> {
    let v = check_positive(name, v, max)?;
    if v < min {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(v)
    }
}

/// A tick count in `[1, max]`.
fn check_ticks(name: &'static str, v: u16, max: u16) -> Result<u16, ParamError> {
    if v == 0 {
        Err(ParamError::NotPositive(name))
    } else if v > max {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(v)
    }
}

impl SafetyParams {
    /// Length of the byte block, bytes.
    pub const BYTES: usize = 92;
    /// Format version written into the block.
    pub const FORMAT_VERSION: u16 = 1;
    /// Largest certified angle accepted, °.
    pub const MAX_CERTIFIED_ANGLE_DEG: f32 = 80.0;
    /// Largest load factor accepted.
    pub const MAX_LOAD_FACTOR: f32 = 10.0;

    /// Checks every value (ranges as documented on [`SafetyConfig`]) and
    /// derives the ceiling and the ramp limits.
    ///
    /// # Errors
    /// [`ParamError`] naming the first refused field (its `[interlock]` key).
    pub fn new(c: SafetyConfig) -> Result<Self, ParamError> {
        check_positive(
            "certified_angle_deg",
            c.certified_angle_deg,
            Self::MAX_CERTIFIED_ANGLE_DEG,
        )?;
        if let Some(n) = c.max_load_factor {
            let n = check_range("max_load_factor", n, 0.0, Self::MAX_LOAD_FACTOR)?;
            if n <= 1.0 {
                return Err(ParamError::OutOfRange("max_load_factor"));
            }
        }
        check_positive(
            "mechanical_max_rad_s",
            c.mechanical_max_rad_s,
            MAX_SHAFT_SPEED_RAD_S,
        )?;
        check_range("hub_offset_max_m", c.hub_offset_max_m, 0.0, 100.0)?;
        check_positive("length_max_m", c.length_max_m, 100.0)?;
        check_range(
            "gravity_min_mps2",
            c.gravity_min_mps2,
            Gravity::MIN_MPS2,
            Gravity::MAX_MPS2,
        )?;
        check_range("speed_margin_rad_s", c.speed_margin_rad_s, 0.0, 100.0)?;
        let accel = check_positive_in(
            "max_acceleration_rad_s2",
            c.max_acceleration_rad_s2,
            RampLimits::MIN_ACCELERATION_RAD_S2,
            RampLimits::MAX_ACCELERATION_RAD_S2,
        )?;
        let decel = check_positive_in(
            "max_deceleration_rad_s2",
            c.max_deceleration_rad_s2,
            RampLimits::MIN_ACCELERATION_RAD_S2,
            RampLimits::MAX_ACCELERATION_RAD_S2,
        )?;
        let jerk = check_positive_in(
            "max_jerk_rad_s3",
            c.max_jerk_rad_s3,
            RampLimits::MIN_JERK_RAD_S3,
            RampLimits::MAX_JERK_RAD_S3,
        )?;
        check_positive(
            "overspeed_tolerance_rad_s",
            c.overspeed_tolerance_rad_s,
            100.0,
        )?;
        check_positive(
            "following_tolerance_rad_s",
            c.following_tolerance_rad_s,
            100.0,
        )?;
        check_positive("channel_tolerance_rad_s", c.channel_tolerance_rad_s, 100.0)?;
        check_positive("sensor_max_rad_s", c.sensor_max_rad_s, 1000.0)?;
        check_positive("standstill_rad_s", c.standstill_rad_s, 10.0)?;
        check_positive_in("tick_s", c.tick_s, 1.0e-5, 0.1)?;
        check_positive("overrun_tick_s", c.overrun_tick_s, MAX_TICK_S)?;
        if c.overrun_tick_s <= c.tick_s {
            return Err(ParamError::OutOfRange("overrun_tick_s"));
        }
        check_range("stop_time_margin_s", c.stop_time_margin_s, 0.0, 600.0)?;
        check_range("brake_delay_s", c.brake_delay_s, 0.0, 3600.0)?;
        check_ticks("debounce_ticks", c.debounce_ticks, 10_000)?;
        check_ticks("stale_ticks", c.stale_ticks, 10_000)?;
        check_ticks("standstill_ticks", c.standstill_ticks, 60_000)?;

        let ceiling = SpeedCeiling::at_worst_case(&c)?;
        let top = ceiling.ceiling_rad_s();
        if c.sensor_max_rad_s <= top + c.overspeed_tolerance_rad_s {
            return Err(ParamError::OutOfRange("sensor_max_rad_s"));
        }
        if c.standstill_rad_s >= top {
            return Err(ParamError::OutOfRange("standstill_rad_s"));
        }
        let limits = RampLimits::new(accel, decel, jerk)?;
        let mut p = Self {
            config: c,
            ceiling,
            limits,
            stamp: 0,
        };
        let bytes = p.encode();
        p.stamp = Reader::new(bytes.get(CRC_OFFSET..).unwrap_or(&[])).u32();
        Ok(p)
    }

    /// The checked values.
    #[must_use]
    pub const fn config(&self) -> &SafetyConfig {
        &self.config
    }

    /// The speed ceiling derived from the set.
    #[must_use]
    pub const fn ceiling(&self) -> &SpeedCeiling {
        &self.ceiling
    }

    /// The certified ramp limits.
    #[must_use]
    pub const fn ramp_limits(&self) -> RampLimits {
        self.limits
    }

    /// The CRC-32 of the byte block: identifies this exact parameter set
    /// (tables and logs made for it carry the same stamp).
    #[must_use]
    pub const fn stamp(&self) -> u32 {
        self.stamp
    }

    /// The byte block (layout in `docs/interlock.md`): little-endian, f32 as
    /// IEEE-754 bits, format version and length first, CRC-32/ISO-HDLC last.
    #[must_use]
    pub fn to_bytes(&self) -> [u8; Self::BYTES] {
        self.encode()
    }

    fn encode(&self) -> [u8; Self::BYTES] {
        let c = &self.config;
        let mut buf = [0u8; Self::BYTES];
        let mut w = Writer {
            buf: &mut buf,
            at: 0,
        };
        w.u16(Self::FORMAT_VERSION);
        // BYTES is 92: fits a u16.
        w.u16(Self::BYTES as u16);
        for v in [
            c.certified_angle_deg,
            c.max_load_factor.unwrap_or(0.0),
            c.mechanical_max_rad_s,
            c.hub_offset_max_m,
            c.length_max_m,
            c.gravity_min_mps2,
            c.speed_margin_rad_s,
            c.max_acceleration_rad_s2,
            c.max_deceleration_rad_s2,
            c.max_jerk_rad_s3,
            c.overspeed_tolerance_rad_s,
            c.following_tolerance_rad_s,
            c.channel_tolerance_rad_s,
            c.sensor_max_rad_s,
            c.standstill_rad_s,
            c.tick_s,
            c.overrun_tick_s,
            c.stop_time_margin_s,
            c.brake_delay_s,
        ] {
            w.f32(v);
        }
        w.u16(c.debounce_ticks);
        w.u16(c.stale_ticks);
        w.u16(c.standstill_ticks);
        let mut flags = 0u8;
        if c.reverse == Reverse::Allowed {
            flags |= FLAG_REVERSE;
        }
        if c.second_channel {
            flags |= FLAG_SECOND_CHANNEL;
        }
        if c.angle_sensor {
            flags |= FLAG_ANGLE_SENSOR;
        }
        w.put(&[flags, 0]);
        let crc = CRC32.checksum(buf.get(..CRC_OFFSET).unwrap_or(&[]));
        if let Some(dst) = buf.get_mut(CRC_OFFSET..) {
            dst.copy_from_slice(&crc.to_le_bytes());
        }
        buf
    }

    /// Reads and re-checks a byte block written by [`SafetyParams::to_bytes`].
    ///
    /// # Errors
    /// [`BlockError::Length`], [`BlockError::Crc`] and [`BlockError::Version`]
    /// in that order of checking; then [`BlockError::Param`] when a value (or
    /// an unknown flag or reserved bit) is refused.
    pub fn from_bytes(bytes: &[u8]) -> Result<Self, BlockError> {
        check_block(bytes, Self::BYTES, Self::FORMAT_VERSION)?;
        let mut r = Reader::new(bytes);
        let _version_and_length = r.u32();
        let certified_angle_deg = r.f32();
        let load = r.f32();
        let mut c = SafetyConfig {
            certified_angle_deg,
            max_load_factor: if load.to_bits() == 0 {
                None
            } else {
                Some(load)
            },
            mechanical_max_rad_s: r.f32(),
            hub_offset_max_m: r.f32(),
            length_max_m: r.f32(),
            gravity_min_mps2: r.f32(),
            speed_margin_rad_s: r.f32(),
            max_acceleration_rad_s2: r.f32(),
            max_deceleration_rad_s2: r.f32(),
            max_jerk_rad_s3: r.f32(),
            overspeed_tolerance_rad_s: r.f32(),
            following_tolerance_rad_s: r.f32(),
            channel_tolerance_rad_s: r.f32(),
            sensor_max_rad_s: r.f32(),
            standstill_rad_s: r.f32(),
            tick_s: r.f32(),
            overrun_tick_s: r.f32(),
            stop_time_margin_s: r.f32(),
            brake_delay_s: r.f32(),
            debounce_ticks: r.u16(),
            stale_ticks: r.u16(),
            standstill_ticks: r.u16(),
            reverse: Reverse::Forbidden,
            second_channel: false,
            angle_sensor: false,
        };
        let flags = r.u8();
        let reserved = r.u8();
        if flags & !FLAGS_KNOWN != 0 || reserved != 0 {
            return Err(BlockError::Param(ParamError::OutOfRange("flags")));
        }
        if flags & FLAG_REVERSE != 0 {
            c.reverse = Reverse::Allowed;
        }
        c.second_channel = flags & FLAG_SECOND_CHANNEL != 0;
        c.angle_sensor = flags & FLAG_ANGLE_SENSOR != 0;
        Ok(Self::new(c)?)
    }

    /// The values behind the stamp's back, to stand for a RAM fault in tests.
    #[cfg(test)]
    pub(crate) fn values_in_memory(&mut self) -> &mut SafetyConfig {
        &mut self.config
    }

    /// Recomputes the block's CRC from the values held in memory and compares
    /// it with the stamp taken when the set was checked: `false` means the
    /// values were changed in memory (a RAM fault) since.
    #[must_use]
    pub fn intact(&self) -> bool {
        let bytes = self.encode();
        Reader::new(bytes.get(CRC_OFFSET..).unwrap_or(&[])).u32() == self.stamp
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    /// Demo data (invented ride): r0 3.6 m, L 6.2 m, certified 40°.
    pub(crate) fn demo() -> SafetyConfig {
        SafetyConfig {
            certified_angle_deg: 40.0,
            max_load_factor: Some(1.25),
            mechanical_max_rad_s: 2.0,
            hub_offset_max_m: 3.6,
            length_max_m: 6.2,
            gravity_min_mps2: 9.78,
            speed_margin_rad_s: 0.02,
            max_acceleration_rad_s2: 0.1,
            max_deceleration_rad_s2: 0.12,
            max_jerk_rad_s3: 0.2,
            overspeed_tolerance_rad_s: 0.05,
            following_tolerance_rad_s: 0.08,
            channel_tolerance_rad_s: 0.04,
            sensor_max_rad_s: 5.0,
            standstill_rad_s: 0.01,
            tick_s: 0.001,
            overrun_tick_s: 0.002,
            stop_time_margin_s: 2.0,
            brake_delay_s: 30.0,
            debounce_ticks: 5,
            stale_ticks: 10,
            standstill_ticks: 50,
            reverse: Reverse::Forbidden,
            second_channel: true,
            angle_sensor: false,
        }
    }

    #[test]
    fn round_trip_keeps_every_value_and_the_stamp() {
        let p = SafetyParams::new(demo()).unwrap();
        let q = SafetyParams::from_bytes(&p.to_bytes()).unwrap();
        assert_eq!(p, q);
        assert!(q.intact());
        let mut c = demo();
        c.max_load_factor = None;
        c.reverse = Reverse::Allowed;
        c.angle_sensor = true;
        let p = SafetyParams::new(c).unwrap();
        assert_eq!(SafetyParams::from_bytes(&p.to_bytes()).unwrap(), p);
    }

    #[test]
    fn crc_is_the_common_crc32() {
        // CRC-32/ISO-HDLC check value of "123456789" is 0xCBF43926
        // (Williams, "A painless guide to CRC error detection algorithms", 1993).
        assert_eq!(CRC32.checksum(b"123456789"), 0xCBF4_3926);
        let p = SafetyParams::new(demo()).unwrap();
        let b = p.to_bytes();
        assert_eq!(CRC32.checksum(&b[..CRC_OFFSET]), p.stamp());
    }

    #[test]
    fn blocks_are_refused_by_cause() {
        let p = SafetyParams::new(demo()).unwrap();
        let b = p.to_bytes();
        assert_eq!(
            SafetyParams::from_bytes(&b[..91]),
            Err(BlockError::Length {
                expected: 92,
                found: 91
            })
        );
        let mut bad = b;
        bad[10] ^= 1;
        assert_eq!(SafetyParams::from_bytes(&bad), Err(BlockError::Crc));
        // A newer version with a valid CRC is refused by version.
        let mut v2 = b;
        v2[0] = 2;
        let crc = CRC32.checksum(&v2[..CRC_OFFSET]);
        v2[CRC_OFFSET..].copy_from_slice(&crc.to_le_bytes());
        assert_eq!(SafetyParams::from_bytes(&v2), Err(BlockError::Version(2)));
        // An intact block with a refused value is re-checked.
        let mut nan = b;
        nan[4..8].copy_from_slice(&f32::NAN.to_bits().to_le_bytes());
        let crc = CRC32.checksum(&nan[..CRC_OFFSET]);
        nan[CRC_OFFSET..].copy_from_slice(&crc.to_le_bytes());
        assert_eq!(
            SafetyParams::from_bytes(&nan),
            Err(BlockError::Param(ParamError::NonFinite(
                "certified_angle_deg"
            )))
        );
        let mut flags = b;
        flags[86] |= 0x80;
        let crc = CRC32.checksum(&flags[..CRC_OFFSET]);
        flags[CRC_OFFSET..].copy_from_slice(&crc.to_le_bytes());
        assert_eq!(
            SafetyParams::from_bytes(&flags),
            Err(BlockError::Param(ParamError::OutOfRange("flags")))
        );
    }

    type Change = fn(&mut SafetyConfig);

    #[test]
    fn values_are_refused_by_name() {
        let cases: [(Change, ParamError); 10] = [
            (
                |c| c.certified_angle_deg = 85.0,
                ParamError::OutOfRange("certified_angle_deg"),
            ),
            (
                |c| c.max_load_factor = Some(1.0),
                ParamError::OutOfRange("max_load_factor"),
            ),
            (
                |c| c.length_max_m = f32::INFINITY,
                ParamError::NonFinite("length_max_m"),
            ),
            (
                |c| c.gravity_min_mps2 = 9.5,
                ParamError::OutOfRange("gravity_min_mps2"),
            ),
            (
                |c| c.speed_margin_rad_s = 5.0,
                ParamError::OutOfRange("speed_margin_rad_s"),
            ),
            (
                |c| c.max_jerk_rad_s3 = -1.0,
                ParamError::NotPositive("max_jerk_rad_s3"),
            ),
            (
                |c| c.overrun_tick_s = 0.001,
                ParamError::OutOfRange("overrun_tick_s"),
            ),
            (
                |c| c.sensor_max_rad_s = 1.0,
                ParamError::OutOfRange("sensor_max_rad_s"),
            ),
            (
                |c| c.debounce_ticks = 0,
                ParamError::NotPositive("debounce_ticks"),
            ),
            (
                |c| c.stop_time_margin_s = f32::NAN,
                ParamError::NonFinite("stop_time_margin_s"),
            ),
        ];
        for (change, expected) in cases {
            let mut c = demo();
            change(&mut c);
            assert_eq!(SafetyParams::new(c), Err(expected));
        }
    }
}
