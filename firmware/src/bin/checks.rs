//! On-target checks: the same vectors as the host tests, computed on the
//! emulated core and compared with the f64 reference. Ends with the line
//! `N passed, N failed` and exits 0 only when nothing failed.
#![no_std]
#![no_main]

use cortex_m_rt::entry;
use swingdrive_firmware::checks::{self, Tally};
use swingdrive_firmware::{exit, say};
use swingdrive_firmware::{interlock_checks, player_checks, ramp_checks};

#[entry]
fn main() -> ! {
    let mut tally = Tally::default();
    checks::kernels(&mut tally);
    checks::steady_state(&mut tally);
    ramp_checks::ramp(&mut tally);
    #[cfg(feature = "fixed")]
    ramp_checks::fixed_ramp(&mut tally);
    player_checks::player(&mut tally);
    interlock_checks::interlock(&mut tally);
    sizes();
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

/// Prints `size_of T = N` for each type (bytes).
macro_rules! sizes_of {
    ($($t:ty),* $(,)?) => {
        $(say(format_args!("size_of {} = {}", stringify!($t), core::mem::size_of::<$t>()));)*
    };
}

/// Sizes of the state structs a firmware keeps, in bytes.
fn sizes() {
    use swingdrive::{Interlock, Plan, RampLimits, SafetyParams, Setpoint, SpeedRamp};
    sizes_of!(
        SpeedRamp,
        Plan,
        RampLimits,
        Setpoint,
        Interlock,
        SafetyParams
    );
    #[cfg(feature = "fixed")]
    {
        use swingdrive::fixed_point::{
            FixedCeiling, FixedMonitor, FixedRamp, FixedRampPlayer, FixedSetpoint,
        };
        sizes_of!(
            FixedRamp,
            FixedRampPlayer,
            FixedSetpoint,
            FixedCeiling,
            FixedMonitor
        );
    }
}

#[panic_handler]
fn panic(info: &core::panic::PanicInfo<'_>) -> ! {
    say(format_args!("panic: {info}"));
    exit(101)
}
