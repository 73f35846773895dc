//! Footprint of the fixed-point tick path: a parameter set checked at
//! start-up, the interlock's clamp and comparisons in fixed point
//! (`FixedMonitor`), a fixed-point ramp (planning in f32) and a tick loop.
//! No formatting, no printing. Built only with the `fixed` feature.
#![no_std]
#![no_main]

use core::hint::black_box;
use cortex_m_rt::entry;
use swingdrive::fixed_point::{FixedMonitor, FixedRamp, Speed};
use swingdrive::{AngularSpeed, SafetyParams};
use swingdrive_firmware::exit;
use swingdrive_firmware::interlock_scenario::scenario_config;

#[entry]
fn main() -> ! {
    let Ok(params) = SafetyParams::new(scenario_config(black_box(false))) else {
        exit(2)
    };
    let (Ok(monitor), Ok(mut ramp)) = (
        FixedMonitor::from_params(&params),
        FixedRamp::new(params.ramp_limits(), params.config().reverse, 1.0e-3),
    ) else {
        exit(2)
    };
    let mut trips = 0_u32;
    for _ in 0..black_box(1000_u32) {
        let (request, _) = monitor.ceiling().clamp(Speed::from_bits(black_box(52_000)));
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(request.to_num::<f32>()));
        let s = ramp.step();
        let m = Speed::from_bits(black_box(s.speed.to_bits()));
        let f = monitor.check(m, Some(m), s.speed);
        trips += u32::from(f.overspeed || f.following_error || f.channels_disagree);
    }
    exit(black_box(trips))
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo<'_>) -> ! {
    exit(101)
}
