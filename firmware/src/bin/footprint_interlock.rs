//! Footprint of ramp + interlock (f32): a parameter set checked at start-up
//! (with the speed-ceiling solve), the interlock with its ramp, and a tick
//! loop on inputs the optimiser cannot see. No formatting, no printing.
#![no_std]
#![no_main]

use core::hint::black_box;
use cortex_m_rt::entry;
use swingdrive::{Interlock, SafetyParams, Sample, TickInputs};
use swingdrive_firmware::exit;
use swingdrive_firmware::interlock_scenario::scenario_config;

#[entry]
fn main() -> ! {
    let Ok(params) = SafetyParams::new(scenario_config(black_box(false))) else {
        exit(2)
    };
    let mut il: Interlock = Interlock::new(params);
    let mut on = false;
    for k in 0..black_box(1000_u32) {
        let out = il.tick(
            &TickInputs {
                request_rad_s: black_box(0.8),
                speed: Sample::new(black_box(0.1), k as u8),
                second_speed: Sample::new(black_box(0.1), k as u8),
                angle: Sample::new(black_box(0.2), k as u8),
                run_enable: black_box(true),
                reset: black_box(false),
            },
            black_box(1.0e-3),
        );
        on ^= out.run_permit;
    }
    exit(u32::from(black_box(on)))
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo<'_>) -> ! {
    exit(101)
}
