//! Instruction-count harness: each measured call sits between two marker
//! functions; tools/count_instructions.py counts the instructions QEMU executes
//! from the return of `measure_begin(id)` to the entry of `measure_end`.
//! The count includes loading the arguments and the call itself (a handful of
//! instructions), so it is an upper bound on the function's own cost.
#![no_std]
#![no_main]

use core::hint::black_box;
use cortex_m_rt::entry;
use swingdrive::{Angle, AngularSpeed, Gravity, RideGeometry, Suspension};
use swingdrive_firmware::exit;

/// Marks the start of measurement `id` (read from r0 in the trace).
#[no_mangle]
#[inline(never)]
pub extern "C" fn measure_begin(id: u32) {
    black_box(id);
    cortex_m::asm::nop();
}

/// Marks the end of the current measurement.
#[no_mangle]
#[inline(never)]
pub extern "C" fn measure_end() {
    cortex_m::asm::nop();
    cortex_m::asm::nop();
}

/// Runs `f` between the markers; its result is kept alive with `black_box`.
#[inline(always)]
fn measure<T>(id: u32, f: impl FnOnce() -> T) {
    measure_begin(id);
    black_box(f());
    measure_end();
}

#[entry]
fn main() -> ! {
    let ride = RideGeometry::new(
        black_box(3.6),
        black_box(6.2),
        Suspension::Chain,
        Gravity::STANDARD,
    );
    if let Ok(ride) = ride {
        // 1: angle for speed, typical point (r0 3.6 m, L 6.2 m, 1.1 rad/s)
        measure(1, || {
            ride.angle_for_speed(AngularSpeed::from_rad_per_s(black_box(1.1)))
        });
        // 2: speed for angle (closed form)
        measure(2, || ride.speed_for_angle(Angle::from_rad(black_box(0.75))));
    }
    // 3: angle for speed, worst case (r0 → 0 at the bifurcation: bisection)
    if let Ok(near_axis) = RideGeometry::new(
        black_box(1e-4),
        black_box(6.2),
        Suspension::Chain,
        Gravity::STANDARD,
    ) {
        // √(g/L) for L = 6.2 m, just above the bifurcation.
        let w = 1.257_667_f32 * 1.000_01;
        measure(3, || {
            near_axis.angle_for_speed(AngularSpeed::from_rad_per_s(black_box(w)))
        });
    }
    swing_governor();
    exit(0)
}

/// Swing governor (src/protection): one 100 Hz tick in which the estimator
/// steps its three length models and the governor decides, on the study's
/// chain ride (r0 4 m, L 6.5 m ± 2 %, 50° certified), part-way up a ramp.
fn swing_governor() {
    use swingdrive::{
        GovernorInput, GovernorParams, RampLimits, RequestGovernor, Reverse, SpeedRamp,
        SwingGovernor,
    };
    let Ok(ride) = RideGeometry::new(
        black_box(4.0),
        black_box(6.5),
        Suspension::Chain,
        Gravity::STANDARD,
    ) else {
        return;
    };
    let Ok(mut governor) = SwingGovernor::new(&ride, &GovernorParams::demo(&ride, 50.0, 0.05))
    else {
        return;
    };
    let Ok(limits) = RampLimits::new(0.1, 0.1, 0.05) else {
        return;
    };
    let mut ramp = SpeedRamp::new(limits, Reverse::Forbidden);
    governor.confirm_rest(0.0);
    let mut setpoint = ramp.setpoint();
    let request = black_box(1.1_f32);
    let input = |setpoint: swingdrive::Setpoint| GovernorInput {
        clamped_request_rad_s: request,
        commanded: setpoint,
        measured_rad_s: Some(setpoint.speed.rad_per_s()),
        dt_s: black_box(0.01),
        stopping: false,
    };
    // A few ticks up the ramp under the governor, unmeasured (kept short:
    // every instruction of the run goes through the emulator's trace).
    for _ in 0..10 {
        let decision = governor.govern(&input(setpoint));
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(decision.admitted_rad_s));
        if let Ok(s) = ramp.step(0.01) {
            setpoint = s;
        }
    }
    let tick = input(setpoint);
    // 4: swing governor tick: estimator step (3 lengths, chain) + decision
    measure(4, || governor.govern(black_box(&tick)));
    let v = setpoint.speed.rad_per_s();
    // 5: swing governor, one certificate evaluation (3 lengths): a decision makes 1 to 3
    measure(5, || {
        governor.slack(
            black_box(v),
            black_box(v),
            black_box(setpoint.acceleration_rad_s2),
            black_box(1.0),
        )
    });
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo<'_>) -> ! {
    exit(101)
}
