//! On-target checks: the same vectors as the host tests, computed on the
//! emulated core and compared with the f64 reference. Ends with the line
//! `N passed, N failed` and exits 0 only when nothing failed.
#![no_std]
#![no_main]

use cortex_m_rt::entry;
use swingdrive_firmware::checks::{self, Tally};
use swingdrive_firmware::ramp_checks;
use swingdrive_firmware::{exit, say};

#[entry]
fn main() -> ! {
    let mut tally = Tally::default();
    checks::kernels(&mut tally);
    checks::steady_state(&mut tally);
    ramp_checks::ramp(&mut tally);
    #[cfg(feature = "fixed")]
    ramp_checks::fixed_ramp(&mut tally);
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

/// Sizes of the state structs a firmware keeps, in bytes.
fn sizes() {
    use core::mem::size_of;
    say(format_args!(
        "size_of SpeedRamp = {}",
        size_of::<swingdrive::SpeedRamp>()
    ));
    say(format_args!(
        "size_of Plan = {}",
        size_of::<swingdrive::Plan>()
    ));
    say(format_args!(
        "size_of RampLimits = {}",
        size_of::<swingdrive::RampLimits>()
    ));
    say(format_args!(
        "size_of Setpoint = {}",
        size_of::<swingdrive::Setpoint>()
    ));
    #[cfg(feature = "fixed")]
    {
        use swingdrive::fixed_point as fp;
        say(format_args!(
            "size_of FixedRamp = {}",
            size_of::<fp::FixedRamp>()
        ));
        say(format_args!(
            "size_of FixedRampPlayer = {}",
            size_of::<fp::FixedRampPlayer>()
        ));
        say(format_args!(
            "size_of FixedSetpoint = {}",
            size_of::<fp::FixedSetpoint>()
        ));
        say(format_args!(
            "size_of FixedCeiling = {}",
            size_of::<fp::FixedCeiling>()
        ));
    }
}

#[panic_handler]
fn panic(info: &core::panic::PanicInfo<'_>) -> ! {
    say(format_args!("panic: {info}"));
    exit(101)
}
