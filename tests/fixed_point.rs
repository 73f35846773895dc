//! The fixed-point tick path (feature `fixed`) against the exact polynomial of
//! the `f32` plan it plays and against the independent f64 reference ramp, and
//! the interlock's fixed-point clamp and comparisons against exact arithmetic.
#![cfg(all(feature = "fixed", feature = "std"))]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use fixed::types::I16F16;
use proptest::prelude::*;
use swingdrive::fixed_point::{
    following_error_exceeds, FixedCeiling, FixedRamp, FixedRampPlayer, FixedSpeedLimit,
};
use swingdrive::ramp::QUANTA_PER_SECOND;
use swingdrive::reference::ramp as reference;
use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse};

const EPS: f64 = f32::EPSILON as f64;
/// One step of I16F16.
const LSB: f64 = 1.0 / 65_536.0;
/// Hand calculation, common practice (docs/fixed_point.md): rounding the output
/// to nearest is at most half a step, 2⁻¹⁷; the internal terms (2⁻³² + 2⁻³³ +
/// A·2^(sh−37) + t·A·2⁻²⁸, t ≤ half a segment, A its largest |acceleration|)
/// stay below 2⁻²² for the plans drawn here: t·A ≤ 20 rad/s (jerk phases:
/// A ≤ 4.5 rad/s², A/j ≤ 9 s; holds: t·A ≤ the speed range of 12 rad/s), and
/// 20·2⁻²⁸ < 2⁻²³.
const PLAYER_BOUND: f64 = LSB / 2.0 + LSB / 64.0;

fn q_to_s(q: u64) -> f64 {
    q as f64 / f64::from(QUANTA_PER_SECOND)
}

/// The `f32` plan's polynomial evaluated exactly (f64) the way the player does:
/// from the nearer anchor, limited to the segment's range.
fn exact_plan_speed(plan: &Plan, mut q: u64) -> f64 {
    for s in plan.segments() {
        let d = s.duration_quanta();
        if q < d {
            let j = f64::from(s.jerk_rad_s3());
            let v = if q <= d / 2 {
                let t = q_to_s(q);
                f64::from(s.start_speed_rad_s())
                    + t * (f64::from(s.start_acceleration_rad_s2()) + 0.5 * j * t)
            } else {
                let tau = q_to_s(d - q);
                f64::from(s.end_speed_rad_s())
                    - tau * (f64::from(s.end_acceleration_rad_s2()) - 0.5 * j * tau)
            };
            let (a, b) = (
                f64::from(s.start_speed_rad_s()),
                f64::from(s.end_speed_rad_s()),
            );
            return v.clamp(a.min(b), a.max(b));
        }
        q -= d;
    }
    f64::from(plan.target().rad_per_s())
}

fn speed(x: I16F16) -> f64 {
    x.to_num::<f64>()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// Every tick of a whole plan (also from a start acceleration outside the
    /// limits, also through zero speed) is within the player's bound of the
    /// plan's exact polynomial, and the last one lands exactly.
    #[test]
    fn player_tracks_the_plan_it_plays(
        up in 0.2_f32..3.0, down in 0.2_f32..3.0, jerk in 0.5_f32..20.0,
        v0 in -6.0_f32..6.0, a_frac in -1.5_f32..1.5, vt in -6.0_f32..6.0,
        tick in prop::sample::select(vec![1.0e-3_f32, 2.5e-4, 4.0e-3]),
    ) {
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let a0 = a_frac * limits.bound_for(v0, a_frac);
        let plan = Plan::new(&limits, Reverse::Allowed, AngularSpeed::from_rad_per_s(v0), a0,
            AngularSpeed::from_rad_per_s(vt)).unwrap();
        let mut player = FixedRampPlayer::new(tick).unwrap();
        player.load(&plan);
        let n = plan.duration_quanta() / player.tick_quanta() + 2;
        let mut worst = 0.0_f64;
        let mut last = player.setpoint();
        for k in 1..=n {
            last = player.step();
            let exact = exact_plan_speed(&plan, k * player.tick_quanta());
            worst = worst.max((speed(last.speed) - exact).abs());
        }
        prop_assert!(worst <= PLAYER_BOUND, "worst {worst:e} > {PLAYER_BOUND:e}");
        prop_assert!(last.target_reached());
        prop_assert_eq!(last.speed, nearest(f64::from(vt)));
        prop_assert_eq!(last.acceleration, I16F16::ZERO);
    }

    /// Full ramps with a target change on the way, fixed point against the f64
    /// reference: within the `f32` plan's bound (32 f32 epsilons of the speed
    /// range with a re-plan, as for the f32 tick runs in
    /// tests/target_ramp_vectors.rs) plus 2⁻¹⁶ rad/s.
    #[test]
    fn fixed_ramp_tracks_the_f64_reference(
        up in 0.2_f32..2.0, down in 0.2_f32..2.0, jerk in 0.5_f32..8.0,
        first in -4.0_f32..4.0, second in -4.0_f32..4.0, change in 100_u32..3000,
        reverse in any::<bool>(),
    ) {
        let limits = RampLimits::new(up, down, jerk).unwrap();
        let policy = if reverse { Reverse::Allowed } else { Reverse::Forbidden };
        let dt = 1.0e-3_f32;
        let mut ramp = FixedRamp::new(limits, policy, dt).unwrap();
        let _ = ramp.set_target(AngularSpeed::from_rad_per_s(first)).unwrap();
        let rl = reference::Limits { accel: up.into(), decel: down.into(), jerk: jerk.into() };
        let p1 = reference::plan(&rl, reverse, 0.0, 0.0, first.into());
        let (v1, a1) = p1.state_at(f64::from(change) * f64::from(dt));
        let p2 = reference::plan(&rl, reverse, v1, a1, ramp_target(second, reverse));
        let total = change + (p2.duration() / f64::from(dt)) as u32 + 2;
        let mut range = f64::from(first.abs().max(second.abs()));
        let mut worst = 0.0_f64;
        let mut last = ramp.setpoint();
        for k in 1..=total {
            last = ramp.step();
            let theirs = if k <= change {
                p1.state_at(f64::from(k) * f64::from(dt)).0
            } else {
                p2.state_at(f64::from(k - change) * f64::from(dt)).0
            };
            range = range.max(theirs.abs());
            worst = worst.max((speed(last.speed) - theirs).abs());
            if k == change {
                let _ = ramp.set_target(AngularSpeed::from_rad_per_s(second)).unwrap();
            }
        }
        let bound = 32.0 * EPS * range + LSB;
        prop_assert!(worst <= bound, "worst {worst:e} > {bound:e}");
        prop_assert!(last.target_reached());
        prop_assert_eq!(last.speed, nearest(ramp_target(second, reverse)));
    }

    /// The limit is rounded down: never above the `f32` value, less than one
    /// step below it.
    #[test]
    fn limits_round_down(x in 0.0_f32..32_767.0) {
        let l = FixedSpeedLimit::new("limit", x).unwrap();
        let got = speed(l.rad_s());
        prop_assert!(got <= f64::from(x));
        prop_assert!(f64::from(x) - got < LSB);
    }

    /// The clamp never lets a request past the `f32` ceiling, in either direction.
    #[test]
    fn clamp_never_exceeds_the_ceiling(c in 0.0_f32..100.0, bits in any::<i32>(), reverse in any::<bool>()) {
        let policy = if reverse { Reverse::Allowed } else { Reverse::Forbidden };
        let clamp = FixedCeiling::new(c, policy).unwrap();
        let request = I16F16::from_bits(bits);
        let (out, changed) = clamp.clamp(request);
        prop_assert!(speed(out) <= f64::from(c));
        let floor = if reverse { -f64::from(c) } else { 0.0 };
        prop_assert!(speed(out) >= floor);
        prop_assert_eq!(changed, out != request);
    }

    /// The comparisons equal exact arithmetic on the represented values, over
    /// the whole I16F16 range (no wrap-around at the ends).
    #[test]
    fn comparisons_are_exact(m in any::<i32>(), c in any::<i32>(), t in 0.0_f32..32_767.0) {
        let (m, c) = (I16F16::from_bits(m), I16F16::from_bits(c));
        let tol = FixedSpeedLimit::new("tolerance", t).unwrap();
        let exact = (speed(m) - speed(c)).abs() > speed(tol.rad_s());
        prop_assert_eq!(following_error_exceeds(m, c, tol), exact);
        prop_assert_eq!(tol.exceeded_by(m), speed(m).abs() > speed(tol.rad_s()));
    }
}

/// `x` rounded to the nearest I16F16, ties up (the player's output rounding).
fn nearest(x: f64) -> I16F16 {
    I16F16::from_bits((x * 65_536.0 + 0.5).floor() as i32)
}

fn ramp_target(t: f32, reverse: bool) -> f64 {
    if reverse || t >= 0.0 {
        f64::from(t)
    } else {
        0.0
    }
}

#[test]
fn two_minutes_at_one_kilohertz_do_not_drift() {
    // Demo data: 0 → 6 rad/s at 0.05 rad/s², 0.02 rad/s³ (one plan of 122.5 s).
    let limits = RampLimits::new(0.05, 0.05, 0.02).unwrap();
    let plan = Plan::new(
        &limits,
        Reverse::Forbidden,
        AngularSpeed::ZERO,
        0.0,
        AngularSpeed::from_rad_per_s(6.0),
    )
    .unwrap();
    let mut player = FixedRampPlayer::new(1.0e-3).unwrap();
    player.load(&plan);
    let mut worst = 0.0_f64;
    for k in 1..=125_000_u64 {
        let s = player.step();
        let exact = exact_plan_speed(&plan, k * player.tick_quanta());
        worst = worst.max((speed(s.speed) - exact).abs());
    }
    assert!(worst <= PLAYER_BOUND, "worst {worst:e}");
    assert_eq!(player.setpoint().speed, nearest(6.0));
}

#[test]
fn bad_parameters_are_named() {
    use swingdrive::ParamError;
    assert_eq!(
        FixedRampPlayer::new(f32::NAN),
        Err(ParamError::NonFinite("tick_s"))
    );
    assert_eq!(
        FixedRampPlayer::new(0.0),
        Err(ParamError::NotPositive("tick_s"))
    );
    assert_eq!(
        FixedRampPlayer::new(2.0),
        Err(ParamError::OutOfRange("tick_s"))
    );
    assert_eq!(
        FixedSpeedLimit::new("overspeed_rad_s", -1.0),
        Err(ParamError::Negative("overspeed_rad_s"))
    );
    assert_eq!(
        FixedSpeedLimit::new("overspeed_rad_s", 1e6),
        Err(ParamError::OutOfRange("overspeed_rad_s"))
    );
    assert_eq!(
        FixedCeiling::new(f32::INFINITY, Reverse::Allowed),
        Err(ParamError::NonFinite("ceiling_rad_s"))
    );
    let limits = RampLimits::new(1.0, 1.0, 1.0).unwrap();
    let mut ramp = FixedRamp::new(limits, Reverse::Forbidden, 1e-3).unwrap();
    assert_eq!(
        ramp.set_target(AngularSpeed::from_rad_per_s(f32::NAN)),
        Err(ParamError::NonFinite("target"))
    );
    // Hand calculation: 0.1 rad/s·2¹⁶ = 6553.6, rounded down to 6553 steps.
    assert_eq!(
        FixedSpeedLimit::new("x", 0.1).unwrap().rad_s().to_bits(),
        6553
    );
}

/// Demo data: an invented ride's safety parameters.
fn demo_params() -> swingdrive::SafetyParams {
    swingdrive::SafetyParams::new(swingdrive::SafetyConfig {
        certified_angle_deg: 40.0,
        max_load_factor: None,
        mechanical_max_rad_s: 1.6,
        hub_offset_max_m: 3.6,
        length_max_m: 6.2,
        gravity_min_mps2: 9.79,
        speed_margin_rad_s: 0.02,
        max_acceleration_rad_s2: 0.8,
        max_deceleration_rad_s2: 1.0,
        max_jerk_rad_s3: 4.0,
        overspeed_tolerance_rad_s: 0.05,
        following_tolerance_rad_s: 0.06,
        channel_tolerance_rad_s: 0.04,
        sensor_max_rad_s: 10.0,
        standstill_rad_s: 0.01,
        tick_s: 0.001,
        overrun_tick_s: 0.002,
        stop_time_margin_s: 1.0,
        brake_delay_s: 5.0,
        debounce_ticks: 3,
        stale_ticks: 5,
        standstill_ticks: 20,
        reverse: Reverse::Allowed,
        second_channel: true,
        angle_sensor: false,
    })
    .unwrap()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    /// On the same measurement (an I16F16 value, exactly an f32 below 256 rad/s),
    /// every fixed-point finding that trips is raised whenever the interlock's
    /// f32 comparison (its expressions, src/interlock/mod.rs) raises it, and
    /// "still" is never claimed where the f32 comparison denies it.
    #[test]
    fn monitor_trips_no_later_than_the_f32_interlock(
        m in -(200_i32 << 16)..(200 << 16),
        d in -(1_i32 << 16)..(1 << 16),
        e in -(1_i32 << 14)..(1 << 14),
    ) {
        use swingdrive::fixed_point::FixedMonitor;
        let params = demo_params();
        let c = params.config();
        let mon = FixedMonitor::from_params(&params).unwrap();
        let (meas, cmd, second) = (I16F16::from_bits(m), I16F16::from_bits(m.saturating_add(d)), I16F16::from_bits(m.saturating_add(e)));
        let (mf, cf, sf) = (meas.to_num::<f32>(), cmd.to_num::<f32>(), second.to_num::<f32>());
        let f = mon.check(meas, Some(second), cmd);
        let overspeed = params.ceiling().ceiling_rad_s() + c.overspeed_tolerance_rad_s;
        if mf.abs() > overspeed { prop_assert!(f.overspeed); }
        if (mf - cf).abs() > c.following_tolerance_rad_s { prop_assert!(f.following_error); }
        if mf.abs() > cf.abs() + c.following_tolerance_rad_s { prop_assert!(f.stop_ahead); }
        if mf.abs() + c.following_tolerance_rad_s < cf.abs() { prop_assert!(f.stop_behind); }
        if (mf - sf).abs() > c.channel_tolerance_rad_s { prop_assert!(f.channels_disagree); }
        if f.still { prop_assert!(mf.abs() <= c.standstill_rad_s && sf.abs() <= c.standstill_rad_s); }
        // The clamp admits nothing beyond the f32 ceiling.
        let (clamped, _) = mon.ceiling().clamp(meas);
        prop_assert!(clamped.to_num::<f32>().abs() <= params.ceiling().ceiling_rad_s());
    }
}
