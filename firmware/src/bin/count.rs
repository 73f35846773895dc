//! Instruction-count harness: each measured call sits between two marker
//! functions; tools/count_instructions.py counts the instructions QEMU executes
//! from the return of `measure_begin(id)` to the entry of `measure_end`.
//! The count includes loading the arguments and the call itself (a handful of
//! instructions), so it is an upper bound on the function's own cost.
#![no_std]
#![no_main]

use core::hint::black_box;
use cortex_m_rt::entry;
use swingdrive::{
    Angle, AngularSpeed, Gravity, Plan, RampLimits, ReseedReason, Reverse, RideGeometry, SpeedRamp,
    Suspension,
};
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
    ramp_counts();
    swing_governor();
    interlock_counts();
    #[cfg(feature = "fixed")]
    fixed_counts();
    exit(0)
}

/// A ramp (demo limits 0.5 rad/s² up, 1 rad/s² down, 1 rad/s³) stepped at
/// 1 ms toward `target` for `ticks` ticks.
fn ramp_at(target: f32, ticks: u32) -> SpeedRamp {
    let Ok(limits) = RampLimits::new(black_box(0.5), black_box(1.0), black_box(1.0)) else {
        exit(2)
    };
    let mut ramp = SpeedRamp::new(limits, Reverse::Allowed);
    let _ = ramp.set_target(AngularSpeed::from_rad_per_s(target));
    for _ in 0..ticks {
        let _ = ramp.step(1.0e-3);
    }
    ramp
}

/// Ramp step (target unchanged) and re-planning ticks, typical and worst.
#[inline(never)] // own stack frame: the microbit (Cortex-M0) has 16 KiB of RAM
fn ramp_counts() {
    let dt = black_box(1.0e-3_f32);
    // 0 → 8 rad/s: segments of 0.5 s (jerk), 15.5 s (hold), 0.5 s (jerk).
    let mut ramp = ramp_at(8.0, 200);
    // 10: ramp step, 1 ms, first half of a segment (typical)
    measure(10, || ramp.step(dt));
    let mut ramp = ramp_at(8.0, 400);
    // 11: ramp step, 1 ms, second half of a segment (evaluated from its end)
    measure(11, || ramp.step(dt));
    let mut ramp = ramp_at(8.0, 499);
    // 12: ramp step, 1 ms, crossing into the next segment
    measure(12, || ramp.step(dt));
    let mut ramp = ramp_at(0.25, 0);
    // 13: ramp step, 1 s tick across a whole two-segment plan to the target
    measure(13, || ramp.step(black_box(1.0)));
    // 14: ramp step at the target (plan complete)
    measure(14, || ramp.step(dt));
    let mut ramp = ramp_at(8.0, 300);
    // 15: re-plan tick: set_target (new target, 4 rad/s) + step
    measure(15, || {
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(black_box(4.0)));
        ramp.step(dt)
    });
    let mut ramp = ramp_at(8.0, 300);
    // 16: re-plan tick through zero speed (accelerating up, target -8 rad/s: brake, cross, 4 segments) + step
    measure(16, || {
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(black_box(-8.0)));
        ramp.step(dt)
    });
    // 17: set_target with the same target (no re-plan) + step
    measure(17, || {
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(black_box(-8.0)));
        ramp.step(dt)
    });
    let mut ramp = ramp_at(8.0, 300);
    // 18: reseed from a measured speed (drive fell behind) + step
    measure(18, || {
        let _ = ramp.reseed(
            AngularSpeed::from_rad_per_s(black_box(0.01)),
            ReseedReason::DriveFellBehind,
        );
        ramp.step(dt)
    });
    // Plan::replan from the states of the segment-capacity test (every
    // crossing profile after a ramp-to-zero prefix): the deepest planning paths.
    let states: [(f32, f32, f32, f32, f32); 6] = [
        (1.0, 0.5, 0.3, 0.4, -8.0),
        (0.5, 1.0, 0.3, 0.4, -8.0),
        (1.0, 0.5, 5.0, -0.6, -8.0),
        (0.5, 1.0, 5.0, -0.9, -8.0),
        (0.5, 1.0, 0.05, -0.9, -8.0),
        (0.5, 1.0, 5.0, -3.0, -8.0),
    ];
    let mut plan = Plan::new(
        &RampLimits::new(1.0, 1.0, 1.0).unwrap_or_else(|_| exit(2)),
        Reverse::Allowed,
        AngularSpeed::ZERO,
        0.0,
        AngularSpeed::ZERO,
    )
    .unwrap_or_else(|_| exit(2));
    for (up, down, v0, a0, vt) in states {
        let Ok(limits) = RampLimits::new(black_box(up), black_box(down), black_box(1.0)) else {
            exit(2)
        };
        // 19: Plan::replan, deepest paths (six states, one count each)
        measure(19, || {
            plan.replan(
                &limits,
                Reverse::Allowed,
                AngularSpeed::from_rad_per_s(black_box(v0)),
                black_box(a0),
                AngularSpeed::from_rad_per_s(black_box(vt)),
            )
        });
    }
}

/// Swing governor (src/protection): one 100 Hz tick in which the estimator
/// steps its three length models and the governor decides, on the study's
/// chain ride (r0 4 m, L 6.5 m ± 2 %, 50° certified), part-way up a ramp.
#[inline(never)] // own stack frame: the microbit (Cortex-M0) has 16 KiB of RAM
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
    // 5: swing governor, one full certificate evaluation (SwingGovernor::slack: swing bounds of 3 lengths + one path on the band envelope)
    measure(5, || {
        governor.slack(
            black_box(v),
            black_box(v),
            black_box(setpoint.acceleration_rad_s2),
            black_box(1.0),
        )
    });
    // Worst path of a decision: the admitted target far below the commanded
    // speed, which is near the top and accelerating, so that the trial and the
    // held target both fail and the fallback is evaluated too, each with a down
    // move across every cell. One unmeasured tick brings the measured speed there.
    let high = |w: f32| GovernorInput {
        clamped_request_rad_s: request,
        commanded: swingdrive::Setpoint {
            acceleration_rad_s2: black_box(0.1),
            ..swingdrive::Setpoint::at_target(AngularSpeed::from_rad_per_s(w))
        },
        measured_rad_s: Some(w),
        dt_s: black_box(0.01),
        stopping: false,
    };
    // (After 4 and 5, on the same governor: one copy fits the M0's stack.)
    let _ = governor.govern(&high(black_box(1.12)));
    let tick = high(black_box(1.121));
    // 6: swing governor tick, worst path: trial, held target and fallback evaluated, down moves across every cell
    measure(6, || governor.govern(black_box(&tick)));
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo<'_>) -> ! {
    exit(101)
}

/// Interlock ticks on the demo ride of the fault scenarios (both speed
/// channels and the angle sensor fitted), with an ideal drive.
#[inline(never)] // own stack frame: the microbit (Cortex-M0) has 16 KiB of RAM
fn interlock_counts() {
    use swingdrive::{Interlock, SafetyParams, Sample, TickInputs};
    use swingdrive_firmware::interlock_scenario::scenario_config;
    let Ok(params) = SafetyParams::new(scenario_config(black_box(false))) else {
        exit(2)
    };
    let mut il: Interlock = Interlock::new(params);
    let mut seq: u8 = 0;
    let mut measured = 0.0_f32;
    let mut inputs = |request: f32, v: f32| {
        seq = seq.wrapping_add(1);
        TickInputs {
            request_rad_s: black_box(request),
            speed: Sample::new(black_box(v), seq),
            second_speed: Sample::new(black_box(v), seq),
            angle: Sample::new(black_box(0.3), seq),
            run_enable: black_box(true),
            reset: black_box(false),
        }
    };
    let dt = black_box(1.0e-3_f32);
    for _ in 0..300 {
        let i = inputs(0.8, measured);
        measured = il.tick(&i, dt).command.speed.rad_per_s();
    }
    let i = inputs(0.8, measured);
    // 20: Interlock::tick, running, request unchanged (ramp step inside; typical)
    measure(20, || il.tick(&i, dt));
    let i = inputs(0.5, measured);
    // 21: Interlock::tick with a new request (clamp, re-plan, step)
    measure(21, || il.tick(&i, dt));
    for _ in 0..3 {
        let i = inputs(0.5, 5.0);
        let _ = il.tick(&i, dt);
    }
    let i = inputs(0.5, 5.0);
    // 22: Interlock::tick that trips (overspeed: event record, stop plan, step)
    measure(22, || il.tick(&i, dt));
    let i = inputs(0.5, 0.0);
    // 23: Interlock::tick during the controlled stop
    measure(23, || il.tick(&i, dt));

    // Reverse allowed: accelerating forward, the request flips to reverse.
    let Ok(params) = SafetyParams::new(scenario_config(black_box(true))) else {
        exit(2)
    };
    let mut il: Interlock = Interlock::new(params);
    let mut measured = 0.0_f32;
    for k in 0..400_u32 {
        let i = TickInputs {
            request_rad_s: 0.9,
            speed: Sample::new(measured, k as u8),
            second_speed: Sample::new(measured, k as u8),
            angle: Sample::new(0.3, k as u8),
            run_enable: true,
            reset: false,
        };
        measured = il.tick(&i, dt).command.speed.rad_per_s();
    }
    let i = TickInputs {
        request_rad_s: black_box(-0.9),
        speed: Sample::new(black_box(measured), 144),
        second_speed: Sample::new(black_box(measured), 144),
        angle: Sample::new(black_box(0.3), 144),
        run_enable: black_box(true),
        reset: black_box(false),
    };
    // 24: Interlock::tick with a reversing request while accelerating (re-plan through zero speed)
    measure(24, || il.tick(&i, dt));
}

/// The fixed-point tick: ramp step, ceiling clamp of the request and the
/// interlock's comparisons (overspeed, following error), typical and worst.
#[cfg(feature = "fixed")]
#[inline(never)] // own stack frame: the microbit (Cortex-M0) has 16 KiB of RAM
fn fixed_counts() {
    use swingdrive::fixed_point::{FixedMonitor, FixedRamp, Speed};
    let Ok(limits) = RampLimits::new(black_box(0.5), black_box(1.0), black_box(1.0)) else {
        exit(2)
    };
    let Ok(params) = swingdrive::SafetyParams::new(
        swingdrive_firmware::interlock_scenario::scenario_config(black_box(true)),
    ) else {
        exit(2)
    };
    let Ok(monitor) = FixedMonitor::from_params(&params) else {
        exit(2)
    };
    let ramp_at = |target: f32, ticks: u32| {
        let Ok(mut ramp) = FixedRamp::new(limits, Reverse::Allowed, 1.0e-3) else {
            exit(2)
        };
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(target));
        for _ in 0..ticks {
            let _ = ramp.step();
        }
        ramp
    };
    // One fixed-point tick with the target unchanged: clamp the request to
    // the interlock's ceiling, step, run the interlock's comparisons
    // (thresholds from its SafetyParams) on both speed channels.
    let tick = |ramp: &mut FixedRamp| {
        let (request, limited) = monitor
            .ceiling()
            .clamp(Speed::from_bits(black_box(8 << 16)));
        let s = ramp.step();
        let measured = Speed::from_bits(black_box(s.speed.to_bits() + 7));
        let second = Speed::from_bits(black_box(s.speed.to_bits() - 5));
        let findings = monitor.check(measured, Some(second), s.speed);
        (request, limited, s, findings)
    };
    let mut ramp = ramp_at(8.0, 200);
    // 30: fixed-point tick (ceiling clamp + ramp step + interlock comparisons), first half of a segment
    measure(30, || tick(&mut ramp));
    let mut ramp = ramp_at(8.0, 400);
    // 31: fixed-point tick, second half of a segment (evaluated from its end)
    measure(31, || tick(&mut ramp));
    let mut ramp = ramp_at(8.0, 8000);
    // 32: fixed-point tick, 7.5 s into a 15.5 s hold (longest time since an anchor)
    measure(32, || tick(&mut ramp));
    let mut ramp = ramp_at(8.0, 499);
    // 33: fixed-point tick crossing into the next segment
    measure(33, || tick(&mut ramp));
    let mut ramp = ramp_at(0.0, 0);
    // 34: fixed-point tick at the target (plan complete)
    measure(34, || tick(&mut ramp));
    let mut ramp = ramp_at(8.0, 300);
    // 35: fixed-point re-plan tick (new target through zero: f32 planning, soft-float on the M0) + tick
    measure(35, || {
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(black_box(-8.0)));
        tick(&mut ramp)
    });
}
