//! Every 1- and 2-bit corruption of the parameter block and of the event
//! block is refused (exhaustively), and a random sample of 3-bit ones.
//!
//! CRC-32/ISO-HDLC has Hamming distance 4 for messages up to 91 607 bits
//! (Koopman, "32-bit cyclic redundancy codes for Internet applications",
//! DSN 2002; the figure quoted from memory), so every flip of up to three bits in these blocks of a few
//! hundred bits must be caught; the tests check that the decoders let none
//! through. Parameter values are demo data (an invented ride).
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::interlock::{Event, EventKind, EventLog};
use swingdrive::ramp::Reverse;
use swingdrive::{SafetyConfig, SafetyParams, TripCause};

fn params() -> SafetyParams {
    SafetyParams::new(SafetyConfig {
        certified_angle_deg: 38.0,
        max_load_factor: Some(1.3),
        mechanical_max_rad_s: 1.5,
        hub_offset_max_m: 4.1,
        length_max_m: 5.5,
        gravity_min_mps2: 9.79,
        speed_margin_rad_s: 0.03,
        max_acceleration_rad_s2: 0.08,
        max_deceleration_rad_s2: 0.1,
        max_jerk_rad_s3: 0.05,
        overspeed_tolerance_rad_s: 0.04,
        following_tolerance_rad_s: 0.06,
        channel_tolerance_rad_s: 0.03,
        sensor_max_rad_s: 4.0,
        standstill_rad_s: 0.005,
        tick_s: 0.002,
        overrun_tick_s: 0.004,
        stop_time_margin_s: 3.0,
        brake_delay_s: 60.0,
        debounce_ticks: 10,
        stale_ticks: 25,
        standstill_ticks: 500,
        reverse: Reverse::Allowed,
        second_channel: true,
        angle_sensor: true,
    })
    .unwrap()
}

fn event_block() -> [u8; EventLog::<4>::BYTES] {
    let mut log = EventLog::<4>::new();
    log.push(Event {
        tick: 1234,
        kind: EventKind::Trip(TripCause::Overspeed),
        measured_rad_s: 1.21,
        value_rad_s: 1.1,
    });
    log.push(Event {
        tick: 1240,
        kind: EventKind::PermitRemovedAtStandstill,
        measured_rad_s: 0.001,
        value_rad_s: 0.0,
    });
    let mut b = [0u8; EventLog::<4>::BYTES];
    log.write_to(&mut b).unwrap();
    b
}

fn flip(b: &mut [u8], bit: usize) {
    b[bit / 8] ^= 1 << (bit % 8);
}

/// Every single and double flip of `block` is refused by `decode`.
fn all_single_and_double(block: &[u8], decode: impl Fn(&[u8]) -> bool) -> usize {
    let bits = block.len() * 8;
    let mut b = block.to_vec();
    let mut tried = 0;
    for i in 0..bits {
        flip(&mut b, i);
        assert!(!decode(&b), "1-bit flip {i} accepted");
        tried += 1;
        for j in i + 1..bits {
            flip(&mut b, j);
            assert!(!decode(&b), "2-bit flip {i},{j} accepted");
            flip(&mut b, j);
            tried += 1;
        }
        flip(&mut b, i);
    }
    assert_eq!(b, block);
    tried
}

/// Random triple flips (a fixed-seed xorshift: reproducible).
fn sampled_triple(block: &[u8], samples: usize, decode: impl Fn(&[u8]) -> bool) {
    let bits = block.len() * 8;
    let mut state = 0x9E37_79B9_7F4A_7C15_u64;
    let mut next = || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state % bits as u64) as usize
    };
    let mut done = 0;
    while done < samples {
        let (i, j, k) = (next(), next(), next());
        if i == j || j == k || i == k {
            continue;
        }
        let mut b = block.to_vec();
        flip(&mut b, i);
        flip(&mut b, j);
        flip(&mut b, k);
        assert!(!decode(&b), "3-bit flip {i},{j},{k} accepted");
        done += 1;
    }
}

#[test]
fn parameter_block_flips_are_refused() {
    let block = params().to_bytes();
    let decode = |b: &[u8]| SafetyParams::from_bytes(b).is_ok();
    assert!(decode(&block));
    let n = all_single_and_double(&block, decode);
    // 736 bits: 736 + 736·735/2 = 271 216 patterns (hand calculation, common practice).
    assert_eq!(n, 271_216);
    sampled_triple(&block, 50_000, decode);
}

#[test]
fn event_block_flips_are_refused() {
    let block = event_block();
    let decode = |b: &[u8]| EventLog::<4>::read_from(b).is_ok();
    assert!(decode(&block));
    let n = all_single_and_double(&block, decode);
    // 80 bytes = 640 bits: 640 + 640·639/2 = 205 120 patterns (hand calculation, common practice).
    assert_eq!(n, 205_120);
    sampled_triple(&block, 50_000, decode);
}
