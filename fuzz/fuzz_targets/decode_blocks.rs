//! The byte decoders of the parameter block and the event block: any input is
//! refused or decodes to a value that encodes back to the very same bytes.
//! A second pass closes the input with a correct CRC, so that the checks
//! behind the CRC (version, values, flags, event kinds) are reached too.
#![no_main]

use libfuzzer_sys::fuzz_target;
use swingdrive::interlock::EventLog;
use swingdrive::SafetyParams;

const CAP: usize = 6;

fn with_crc(data: &[u8], len: usize) -> Vec<u8> {
    let crc = crc32(&data[..len - 4]);
    let mut b = data[..len].to_vec();
    b[len - 4..].copy_from_slice(&crc.to_le_bytes());
    b
}

/// CRC-32/ISO-HDLC, bit by bit (independent of the crate's table-driven one).
fn crc32(data: &[u8]) -> u32 {
    let mut crc = 0xFFFF_FFFFu32;
    for &byte in data {
        crc ^= u32::from(byte);
        for _ in 0..8 {
            crc = if crc & 1 != 0 {
                (crc >> 1) ^ 0xEDB8_8320
            } else {
                crc >> 1
            };
        }
    }
    !crc
}

fn params(bytes: &[u8]) {
    if let Ok(p) = SafetyParams::from_bytes(bytes) {
        assert_eq!(
            &p.to_bytes()[..],
            bytes,
            "parameter block does not round-trip"
        );
        assert_eq!(p.stamp(), crc32(&bytes[..bytes.len() - 4]));
        let c = p.ceiling().ceiling_rad_s();
        assert!(c.is_finite() && c > 0.0);
    }
}

fn events(bytes: &[u8]) {
    if let Ok(log) = EventLog::<CAP>::read_from(bytes) {
        let mut out = vec![0u8; EventLog::<CAP>::BYTES];
        log.write_to(&mut out).unwrap();
        assert_eq!(out, bytes, "event block does not round-trip");
    }
}

fuzz_target!(|data: &[u8]| {
    params(data);
    events(data);
    if data.len() >= SafetyParams::BYTES {
        let mut b = with_crc(data, SafetyParams::BYTES);
        // Keep the version and length fields right most of the time.
        if data[0] & 0x80 == 0 {
            b[0..4].copy_from_slice(&[1, 0, SafetyParams::BYTES as u8, 0]);
            b = with_crc(&b, SafetyParams::BYTES);
        }
        params(&b);
    }
    if data.len() >= EventLog::<CAP>::BYTES {
        let mut b = with_crc(data, EventLog::<CAP>::BYTES);
        if data[0] & 0x80 == 0 {
            let len = EventLog::<CAP>::BYTES as u16;
            b[0..2].copy_from_slice(&1u16.to_le_bytes());
            b[2..4].copy_from_slice(&len.to_le_bytes());
            b = with_crc(&b, EventLog::<CAP>::BYTES);
        }
        events(&b);
    }
});
