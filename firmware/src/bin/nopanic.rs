//! No-panic proof at link time.
//!
//! Calls every per-tick and planning entry point of the library on inputs the
//! optimiser cannot see through (`black_box`). The panic handler calls a
//! function that does not exist, so if any panic path survives optimisation
//! and is reachable, the link fails with an error naming it. Only a release
//! build proves anything (debug builds keep panic paths the optimiser would
//! remove). A build that links is the proof; running it only shows it starts.
#![no_std]
#![no_main]

use core::hint::black_box;
use cortex_m_rt::entry;
use swingdrive::{
    commissioning, Angle, AngularSpeed, DriveScale, GearRatio, Gravity, Plan, RampLimits,
    ReseedReason, Reverse, RideGeometry, SpeedRamp, Suspension,
};
use swingdrive_firmware::{exit, say};

/// Exercises the steady-state physics: every public function of the
/// geometry, units and commissioning modules that firmware would call.
#[inline(never)] // one frame at a time: the M0 has 16 KiB of RAM
fn steady_state() -> f32 {
    let mut acc = 0.0;
    let suspension = if black_box(true) {
        Suspension::Chain
    } else {
        Suspension::Rod
    };
    let gravity = Gravity::wgs84(black_box(48.0), black_box(300.0)).unwrap_or(Gravity::STANDARD);
    if let Ok(ride) = RideGeometry::new(black_box(3.6), black_box(6.2), suspension, gravity) {
        if let Ok(state) = ride.steady_state_at_speed(AngularSpeed::from_rad_per_s(black_box(1.1)))
        {
            acc += state.angle.rad() + state.sensitivity.deg_per_rpm();
            acc += ride.swing_modes(&state).slowest().period_s();
        }
        if let Ok(state) = ride.steady_state_at_angle(Angle::from_rad(black_box(0.7))) {
            acc += state.speed.rpm();
        }
        acc += ride.angle_from_rise(black_box(1.0)).map_or(0.0, Angle::rad);
    }
    acc += commissioning::angle_from_tension_ratio(black_box(1.2)).map_or(0.0, Angle::rad);
    acc += commissioning::length_from_steady_angle(
        black_box(3.6),
        Angle::from_rad(black_box(0.7)),
        AngularSpeed::from_rad_per_s(black_box(1.0)),
        gravity,
    )
    .unwrap_or(0.0);
    acc += commissioning::length_from_swing_period(black_box(5.0), Angle::ZERO, gravity)
        .unwrap_or(0.0);
    if let Ok(gear) = GearRatio::new(black_box(120.0)) {
        if let Ok(scale) = DriveScale::new(gear, AngularSpeed::from_rpm(black_box(1500.0))) {
            acc += scale
                .reference(AngularSpeed::from_rad_per_s(black_box(1.0)))
                .fraction;
            acc += scale.shaft_speed(black_box(0.5)).rad_per_s();
        }
    }
    acc
}

/// Exercises the speed ramp: every per-tick and planning entry point
/// (limits, targets, steps, re-seed, queries, sampling, plans).
#[inline(never)] // one frame at a time: the M0 has 16 KiB of RAM
fn ramp() -> f32 {
    let mut acc = 0.0;
    let reverse = if black_box(true) {
        Reverse::Allowed
    } else {
        Reverse::Forbidden
    };
    let Ok(limits) = RampLimits::new(black_box(0.5), black_box(0.8), black_box(1.0)) else {
        return acc;
    };
    let mut ramp = SpeedRamp::new(limits, reverse);
    let _ = ramp.set_target(AngularSpeed::from_rad_per_s(black_box(3.0)));
    for _ in 0..black_box(100) {
        acc += ramp
            .step(black_box(1.0e-3))
            .map_or(0.0, |s| s.speed.rad_per_s());
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(black_box(-2.0)));
    }
    acc += ramp
        .reseed(
            AngularSpeed::from_rad_per_s(black_box(0.1)),
            ReseedReason::CoastingTakeover,
        )
        .map_or(0.0, |s| s.acceleration_rad_s2);
    if let Ok(steeper) = RampLimits::new(black_box(1.0), black_box(2.0), black_box(4.0)) {
        ramp.set_limits(steeper);
    }
    acc += ramp.remaining_s();
    acc += ramp
        .predict(black_box(0.5))
        .map_or(0.0, |s| s.speed.rad_per_s());
    acc += ramp
        .sample::<8>(black_box(0.25))
        .map_or(0.0, |s| s.points.len() as f32);
    acc += ramp.setpoint().jerk_rad_s3;
    if let Ok(mut plan) = Plan::new(
        &limits,
        reverse,
        AngularSpeed::from_rad_per_s(black_box(1.0)),
        black_box(0.2),
        AngularSpeed::from_rad_per_s(black_box(-1.0)),
    ) {
        acc += plan.duration_s();
        acc += plan
            .state_at(black_box(0.3))
            .map_or(0.0, |s| s.speed.rad_per_s());
        let _ = plan.replan(
            &limits,
            reverse,
            AngularSpeed::from_rad_per_s(black_box(2.0)),
            black_box(-0.1),
            AngularSpeed::from_rad_per_s(black_box(0.0)),
        );
        acc += plan.segments().iter().map(|s| s.duration_s()).sum::<f32>();
    }
    acc
}

/// Exercises the swing governor's construction and per-tick path (estimator
/// step, sensor correction, decision).
#[inline(never)] // one frame at a time: the M0 has 16 KiB of RAM
fn swing_governor() -> f32 {
    use swingdrive::{GovernorInput, GovernorParams, RequestGovernor, Setpoint, SwingGovernor};
    let suspension = if black_box(true) {
        Suspension::Chain
    } else {
        Suspension::Rod
    };
    let Ok(ride) = RideGeometry::new(
        black_box(4.0),
        black_box(6.5),
        suspension,
        Gravity::STANDARD,
    ) else {
        return 0.0;
    };
    let params = GovernorParams::demo(&ride, black_box(50.0), black_box(0.05));
    let Ok(mut governor) = SwingGovernor::new(&ride, &params) else {
        return 0.0;
    };
    let _ = governor.confirm_rest(black_box(0.0));
    let _ = governor.correct(black_box(0.01), black_box(0.0));
    let decision = governor.govern(&GovernorInput {
        clamped_request_rad_s: black_box(1.0),
        commanded: Setpoint::at_target(AngularSpeed::from_rad_per_s(black_box(0.2))),
        measured_rad_s: black_box(Some(0.2)),
        dt_s: black_box(0.01),
        stopping: black_box(false),
    });
    decision.admitted_rad_s + governor.certificate().slack_per_s
}

/// Exercises the fixed-point tick path: ramp, player, clamp and comparisons.
#[cfg(feature = "fixed")]
#[inline(never)] // one frame at a time: the M0 has 16 KiB of RAM
fn fixed_point() -> f32 {
    use swingdrive::fixed_point::{
        following_error_exceeds, FixedCeiling, FixedRamp, FixedSpeedLimit, Speed,
    };
    let mut acc = 0.0;
    let Ok(limits) = RampLimits::new(black_box(0.5), black_box(0.8), black_box(1.0)) else {
        return acc;
    };
    let Ok(mut ramp) = FixedRamp::new(limits, Reverse::Allowed, black_box(1.0e-3)) else {
        return acc;
    };
    let Ok(ceiling) = FixedCeiling::new(black_box(4.0), Reverse::Allowed) else {
        return acc;
    };
    let Ok(over) = FixedSpeedLimit::new("overspeed_rad_s", black_box(4.2)) else {
        return acc;
    };
    let Ok(follow) = FixedSpeedLimit::new("following_tolerance_rad_s", black_box(0.3)) else {
        return acc;
    };
    let (request, _) = ceiling.clamp(Speed::from_bits(black_box(400_000)));
    let _ = ramp.set_target(AngularSpeed::from_rad_per_s(request.to_num::<f32>()));
    for _ in 0..black_box(100) {
        let s = ramp.step();
        let measured = Speed::from_bits(black_box(s.speed.to_bits() + 3));
        if over.exceeded_by(measured) || following_error_exceeds(measured, s.speed, follow) {
            acc += 1.0;
        }
        acc += s.acceleration.to_num::<f32>();
    }
    if let Ok(params) = swingdrive::SafetyParams::new(
        swingdrive_firmware::interlock_scenario::scenario_config(black_box(false)),
    ) {
        if let Ok(monitor) = swingdrive::fixed_point::FixedMonitor::from_params(&params) {
            let s = ramp.step();
            let f = monitor.check(s.speed, Some(s.speed), s.speed);
            acc += f32::from(u8::from(f.overspeed || f.still));
            acc += monitor.ceiling().clamp(s.speed).0.to_num::<f32>();
        }
    }
    acc + ramp.setpoint().speed.to_num::<f32>()
}

#[cfg(not(feature = "fixed"))]
#[inline(never)] // one frame at a time: the M0 has 16 KiB of RAM
fn fixed_point() -> f32 {
    0.0
}

/// Exercises the interlock: parameter check, construction, ticks through
/// faults, parameter verification.
fn interlock() -> f32 {
    use swingdrive::{Interlock, SafetyParams, Sample, TickInputs};
    use swingdrive_firmware::interlock_scenario::scenario_config;
    let mut acc = 0.0;
    let Ok(params) = SafetyParams::new(scenario_config(black_box(true))) else {
        return acc;
    };
    let mut il: Interlock = Interlock::new(params);
    for k in 0..black_box(200_u32) {
        let out = il.tick(
            &TickInputs {
                request_rad_s: black_box(1.0),
                speed: Sample::new(black_box(0.5), k as u8),
                second_speed: Sample::new(black_box(0.5), k as u8),
                angle: Sample::new(black_box(0.2), k as u8),
                run_enable: black_box(true),
                reset: black_box(false),
            },
            black_box(1.0e-3),
        );
        acc += out.command.speed.rad_per_s();
    }
    acc += f32::from(u8::from(il.verify_parameters()));
    acc + il.ramp_remaining_s()
}

#[entry]
fn main() -> ! {
    let total = black_box(steady_state())
        + black_box(ramp())
        + black_box(swing_governor())
        + black_box(fixed_point())
        + black_box(interlock());
    say(format_args!("no-panic image runs: {}", total.is_finite()));
    exit(0)
}

#[panic_handler]
fn panic(_: &core::panic::PanicInfo<'_>) -> ! {
    extern "Rust" {
        // Never defined: referencing it makes any reachable panic a link error.
        #[link_name = "\n\nerror: a panic path is reachable from the swingdrive entry points called in nopanic.rs\n\n"]
        fn panic_path_is_reachable() -> !;
    }
    // SAFETY: never executed in an image that links; the symbol does not exist.
    unsafe { panic_path_is_reachable() }
}
