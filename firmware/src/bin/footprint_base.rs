//! Footprint baseline: the runtime, vector table and semihosting exit only.
//! measure.sh subtracts its size from the footprint images.
#![no_std]
#![no_main]

use cortex_m_rt::entry;
use swingdrive_firmware::exit;

#[entry]
fn main() -> ! {
    exit(core::hint::black_box(0))
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo<'_>) -> ! {
    exit(101)
}
