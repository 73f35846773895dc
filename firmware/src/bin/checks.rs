//! On-target checks: the same vectors as the host tests, computed on the
//! emulated core and compared with the f64 reference. Ends with the line
//! `N passed, N failed` and exits 0 only when nothing failed.
#![no_std]
#![no_main]

use cortex_m_rt::entry;
use swingdrive_firmware::checks::{self, Tally};
use swingdrive_firmware::{exit, say};
use swingdrive_firmware::{player_checks, ramp_checks};

#[entry]
fn main() -> ! {
    let mut tally = Tally::default();
    checks::kernels(&mut tally);
    checks::steady_state(&mut tally);
    ramp_checks::ramp(&mut tally);
    player_checks::player(&mut tally);
    say(format_args!(
        "{} of {} numeric results bit-identical to the host's f32",
        tally.bit_identical, tally.compared
    ));
    say(format_args!(
        "{} passed, {} failed",
        tally.passed, tally.failed
    ));
    exit(u32::from(tally.failed > 0))
}

#[panic_handler]
fn panic(info: &core::panic::PanicInfo<'_>) -> ! {
    say(format_args!("panic: {info}"));
    exit(101)
}
