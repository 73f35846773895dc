//! The profile-table player: format checks, stamp check, playback equal to
//! the table. Tables are built here byte by byte from the documented format
//! (not with the crate's encoder), so the format itself is checked.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::player::{stamp_of, table_len, ProfilePlayer, ProfileTable, TableError};
use swingdrive::ParamError;

const CRC: crc::Crc<u32> = crc::Crc::<u32>::new(&crc::CRC_32_ISO_HDLC);

/// Demo data: a table of `speeds` every `period_us`, stamped `stamp`.
fn build(speeds: &[f32], period_us: u32, stamp: u32) -> Vec<u8> {
    let mut b = Vec::new();
    b.extend_from_slice(b"SWPT");
    b.extend_from_slice(&1_u16.to_le_bytes());
    b.extend_from_slice(&0_u16.to_le_bytes());
    b.extend_from_slice(&stamp.to_le_bytes());
    b.extend_from_slice(&period_us.to_le_bytes());
    b.extend_from_slice(&(speeds.len() as u32).to_le_bytes());
    for s in speeds {
        b.extend_from_slice(&s.to_le_bytes());
    }
    let crc = CRC.checksum(&b);
    b.extend_from_slice(&crc.to_le_bytes());
    b
}

fn demo_speeds() -> Vec<f32> {
    // Demo data: a smooth rise to 1.1 rad/s in 2 s at 20 ms.
    (0..=100)
        .map(|k| {
            let s = k as f32 / 100.0;
            1.1 * s * s * (3.0 - 2.0 * s)
        })
        .collect()
}

const STAMP: u32 = 0x1234_5678;

#[test]
fn crc_is_crc32_iso_hdlc() {
    // Check value of CRC-32/ISO-HDLC for "123456789": 0xCBF43926
    // (Greg Cook, "Catalogue of parametrised CRC algorithms", reveng, 2005–).
    assert_eq!(stamp_of(b"123456789"), 0xCBF4_3926);
}

#[test]
fn a_table_is_parsed_and_its_header_read() {
    let speeds = demo_speeds();
    let bytes = build(&speeds, 20_000, STAMP);
    // Hand calculation, common practice: 20-byte header, 4 bytes a sample, 4-byte CRC.
    assert_eq!(bytes.len(), table_len(speeds.len()));
    assert_eq!(bytes.len(), 20 + 4 * 101 + 4);
    let table = ProfileTable::parse(&bytes, STAMP).unwrap();
    assert_eq!(table.count(), 101);
    assert_eq!(table.period_us(), 20_000);
    assert_eq!(table.stamp(), STAMP);
    assert_eq!(table.duration_us(), 2_000_000);
}

#[test]
fn player_output_equals_the_table_at_samples_and_interpolates_between() {
    let speeds = demo_speeds();
    let bytes = build(&speeds, 20_000, STAMP);
    let table = ProfileTable::parse(&bytes, STAMP).unwrap();
    let mut player = ProfilePlayer::new(table);
    assert_eq!(player.output().request_rad_s, speeds[0]);
    // 1 ms ticks: every 20th tick lands on a sample, where the output is the sample bit for bit.
    let mut last = player.output();
    for tick in 1..=2_500_u32 {
        let out = player.step(0.001).unwrap();
        assert_eq!(out.elapsed_us, u64::from(tick.min(2_000)) * 1000);
        let k = (tick / 20) as usize;
        if tick % 20 == 0 && k < speeds.len() {
            assert_eq!(out.request_rad_s, speeds[k], "tick {tick}");
        } else if k + 1 < speeds.len() {
            // Between samples: on the segment (hand calculation: linear interpolation).
            let frac = (tick % 20) as f32 / 20.0;
            let expect = speeds[k] + (speeds[k + 1] - speeds[k]) * frac;
            assert!((out.request_rad_s - expect).abs() <= 1e-6, "tick {tick}");
            assert!(
                (out.slope_rad_s2 - (speeds[k + 1] - speeds[k]) / 0.02).abs() <= 1e-3,
                "tick {tick}"
            );
        }
        assert!(out.request_rad_s >= last.request_rad_s);
        assert_eq!(out.finished, tick >= 2_000);
        last = out;
    }
    // After the end the last sample holds exactly.
    assert_eq!(last.request_rad_s, *speeds.last().unwrap());
    assert_eq!(last.slope_rad_s2, 0.0);
    player.restart();
    assert_eq!(player.output().request_rad_s, speeds[0]);
}

#[test]
fn bad_ticks_are_refused_by_name_and_do_not_advance() {
    let bytes = build(&demo_speeds(), 20_000, STAMP);
    let mut player = ProfilePlayer::new(ProfileTable::parse(&bytes, STAMP).unwrap());
    assert_eq!(player.step(f32::NAN), Err(ParamError::NonFinite("dt_s")));
    assert_eq!(player.step(0.0), Err(ParamError::NotPositive("dt_s")));
    assert_eq!(player.step(-1.0), Err(ParamError::NotPositive("dt_s")));
    assert_eq!(player.step(1.5), Err(ParamError::OutOfRange("dt_s")));
    assert_eq!(player.output().elapsed_us, 0);
}

#[test]
fn a_table_for_another_parameter_set_is_refused() {
    let bytes = build(&demo_speeds(), 20_000, STAMP);
    assert_eq!(
        ProfileTable::parse(&bytes, STAMP ^ 1),
        Err(TableError::StampMismatch {
            expected: STAMP ^ 1,
            found: STAMP
        })
    );
}

#[test]
fn every_single_bit_flip_is_refused() {
    // CRC-32 detects every single-bit error (Peterson & Brown, Proc. IRE 49 (1961) 228–235).
    let bytes = build(&demo_speeds()[..20], 20_000, STAMP);
    for i in 0..bytes.len() {
        for bit in 0..8 {
            let mut b = bytes.clone();
            b[i] ^= 1 << bit;
            assert!(
                ProfileTable::parse(&b, STAMP).is_err(),
                "byte {i} bit {bit}"
            );
        }
    }
}

#[test]
fn structural_faults_are_named() {
    let speeds = demo_speeds();
    let good = build(&speeds, 20_000, STAMP);
    assert_eq!(
        ProfileTable::parse(&good[..10], STAMP),
        Err(TableError::TooShort)
    );
    let mut magic = good.clone();
    magic[0] = b'X';
    assert_eq!(
        ProfileTable::parse(&magic, STAMP),
        Err(TableError::BadMagic)
    );
    let mut version = good.clone();
    version[4] = 2;
    assert_eq!(
        ProfileTable::parse(&version, STAMP),
        Err(TableError::UnsupportedVersion(2))
    );
    assert_eq!(
        ProfileTable::parse(&good[..good.len() - 1], STAMP),
        Err(TableError::LengthMismatch)
    );
    let mut longer = good.clone();
    longer.push(0);
    assert_eq!(
        ProfileTable::parse(&longer, STAMP),
        Err(TableError::LengthMismatch)
    );
    // Internally consistent (CRC right) but with bad contents.
    assert_eq!(
        ProfileTable::parse(&build(&speeds, 500, STAMP), STAMP),
        Err(TableError::BadPeriod)
    );
    let mut nan = speeds.clone();
    nan[7] = f32::NAN;
    assert_eq!(
        ProfileTable::parse(&build(&nan, 20_000, STAMP), STAMP),
        Err(TableError::BadSpeed(7))
    );
    assert_eq!(
        ProfileTable::parse(&build(&[1.0], 20_000, STAMP), STAMP),
        Err(TableError::TooShort)
    );
    let mut huge = build(&speeds, 20_000, STAMP);
    huge[16..20].copy_from_slice(&u32::MAX.to_le_bytes());
    assert_eq!(ProfileTable::parse(&huge, STAMP), Err(TableError::BadCount));
}
