//! A designed profile as a firmware table: the byte format of
//! [`crate::player`] (version 1), and a Rust source form for firmware crates.

use std::fmt::Write as _;

use crate::error::ParamError;
use crate::player::{
    table_len, MAX_PERIOD_US, MAX_TABLE_SAMPLES, MIN_PERIOD_US, TABLE_CRC, TABLE_MAGIC,
    TABLE_VERSION,
};

/// Encodes speed samples (rad/s, every `period_s`) as a version-1 table
/// stamped with `stamp`.
///
/// # Errors
/// [`ParamError`] naming `period_s` (not a whole number of microseconds in
/// range) or `samples` (fewer than 2, too many, or a speed not finite or out
/// of range).
pub fn encode(speeds_rad_s: &[f64], period_s: f64, stamp: u32) -> Result<Vec<u8>, ParamError> {
    if !period_s.is_finite() {
        return Err(ParamError::NonFinite("period_s"));
    }
    let period_us = (period_s * 1e6).round();
    if (period_us - period_s * 1e6).abs() > 1e-6
        || period_us < f64::from(MIN_PERIOD_US)
        || period_us > f64::from(MAX_PERIOD_US)
    {
        return Err(ParamError::OutOfRange("period_s"));
    }
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let period_us = period_us as u32;
    let count = u32::try_from(speeds_rad_s.len()).map_err(|_| ParamError::OutOfRange("samples"))?;
    if !(2..=MAX_TABLE_SAMPLES).contains(&count) {
        return Err(ParamError::OutOfRange("samples"));
    }
    let max = f64::from(crate::ramp::MAX_SPEED_RAD_S);
    let mut bytes = Vec::with_capacity(table_len(speeds_rad_s.len()));
    bytes.extend_from_slice(&TABLE_MAGIC);
    bytes.extend_from_slice(&TABLE_VERSION.to_le_bytes());
    bytes.extend_from_slice(&0_u16.to_le_bytes());
    bytes.extend_from_slice(&stamp.to_le_bytes());
    bytes.extend_from_slice(&period_us.to_le_bytes());
    bytes.extend_from_slice(&count.to_le_bytes());
    for &w in speeds_rad_s {
        if !w.is_finite() {
            return Err(ParamError::NonFinite("samples"));
        }
        #[allow(clippy::cast_possible_truncation)]
        let w32 = w as f32;
        if f64::from(w32.abs()) > max {
            return Err(ParamError::OutOfRange("samples"));
        }
        bytes.extend_from_slice(&w32.to_le_bytes());
    }
    let crc = TABLE_CRC.checksum(&bytes);
    bytes.extend_from_slice(&crc.to_le_bytes());
    Ok(bytes)
}

/// The table as Rust source: a `static` byte array a firmware crate can
/// `include!`, with the figures it was designed for in comments.
#[must_use]
pub fn to_rust_source(bytes: &[u8], name: &str, comment_lines: &[String]) -> String {
    let mut s = String::new();
    for line in comment_lines {
        let _ = writeln!(s, "// {line}");
    }
    let _ = writeln!(
        s,
        "/// Profile table, format version {TABLE_VERSION} (see `swingdrive::player`)."
    );
    let _ = writeln!(s, "pub static {name}: [u8; {}] = [", bytes.len());
    for chunk in bytes.chunks(16) {
        let row: Vec<String> = chunk.iter().map(|b| format!("0x{b:02x},")).collect();
        let _ = writeln!(s, "    {}", row.join(" "));
    }
    s.push_str("];\n");
    s
}
