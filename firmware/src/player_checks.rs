//! Profile-table player on the target: a swing-free table designed on the
//! host for the demo ride (`swingdrive design examples/demo_chain_ride.toml
//! --to-deg 40 --table firmware/tables/demo_chain_up.bin`, stamp 0: no
//! parameter set) embedded with `include_bytes!`, checked, and played tick by
//! tick.

use swingdrive::player::{ProfilePlayer, ProfileTable, TableError, TABLE_HEADER_LEN};

use crate::checks::Tally;

/// The designed table (demo data).
static TABLE: &[u8] = include_bytes!("../tables/demo_chain_up.bin");

/// Largest table this check copies to corrupt it, bytes.
const COPY: usize = 4096;

fn sample(index: usize) -> Option<f32> {
    let at = TABLE_HEADER_LEN + 4 * index;
    let b = TABLE.get(at..at + 4)?;
    Some(f32::from_le_bytes([b[0], b[1], b[2], b[3]]))
}

/// Runs the player checks.
pub fn player(tally: &mut Tally) {
    let Ok(table) = ProfileTable::parse(TABLE, 0) else {
        tally.check("player: designed table parses", false);
        return;
    };
    tally.check("player: designed table parses", true);
    tally.check(
        "player: another stamp is refused",
        matches!(
            ProfileTable::parse(TABLE, 1),
            Err(TableError::StampMismatch { .. })
        ),
    );
    if TABLE.len() <= COPY {
        let mut copy = [0_u8; COPY];
        let copy = &mut copy[..TABLE.len()];
        copy.copy_from_slice(TABLE);
        copy[TABLE_HEADER_LEN + 40] ^= 0x10;
        tally.check(
            "player: a flipped bit is refused",
            ProfileTable::parse(copy, 0) == Err(TableError::BadCrc),
        );
    } else {
        tally.check("player: table fits the copy buffer", false);
    }
    // 1 ms ticks: every 50th tick lands on a 50 ms sample, where the output
    // must equal the stored sample bit for bit.
    let mut player = ProfilePlayer::new(table);
    let ticks = table.duration_us() / 1000 + 100;
    let mut equal = true;
    // The design never asks for more than the end speed (no overshoot of the
    // target angle); the speed may dip on the way (the shaping brakes briefly).
    let end = sample(table.count() as usize - 1).unwrap_or(0.0);
    let mut within = true;
    for tick in 1..=ticks {
        let Ok(out) = player.step(0.001) else {
            equal = false;
            break;
        };
        if tick % 50 == 0 {
            let index = (tick / 50).min(u64::from(table.count() - 1)) as usize;
            equal &= sample(index).is_some_and(|s| s.to_bits() == out.request_rad_s.to_bits());
        }
        within &= out.request_rad_s <= end && out.request_rad_s >= 0.0;
    }
    tally.check("player: output equals the table at every sample", equal);
    tally.check("player: request between rest and the end speed", within);
    tally.check("player: finished at the end", player.output().finished);
}
