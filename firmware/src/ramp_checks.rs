//! Ramp checks on the target: plan samples and tick runs against the f64
//! reference ramp, within the tolerances stated in each vector (derived in
//! tests/target_ramp_vectors.rs).

use swingdrive::{AngularSpeed, Plan, RampLimits, Reverse, SpeedRamp};

use crate::checks::Tally;

/// A plan sampled at one time.
pub struct PlanSample {
    /// Acceleration limit, rad/s².
    pub up: f32,
    /// Deceleration limit, rad/s².
    pub down: f32,
    /// Jerk limit, rad/s³.
    pub jerk: f32,
    /// Reverse rotation allowed.
    pub reverse: bool,
    /// Start speed, rad/s.
    pub v0: f32,
    /// Start acceleration, rad/s².
    pub a0: f32,
    /// Target, rad/s.
    pub target: f32,
    /// Sampling time after the plan's start, s.
    pub t_s: f32,
    /// Reference speed, rad/s.
    pub speed: f64,
    /// Largest accepted speed deviation, rad/s.
    pub speed_tol: f64,
    /// Reference acceleration, rad/s².
    pub accel: f64,
    /// Largest accepted acceleration deviation, rad/s².
    pub accel_tol: f64,
    /// The host's f32 speed, as bits.
    pub host_speed_bits: u32,
    /// The host's f32 acceleration, as bits.
    pub host_accel_bits: u32,
}

/// A ramp stepped from rest with one target change on the way.
pub struct TickRun {
    /// Acceleration limit, rad/s².
    pub up: f32,
    /// Deceleration limit, rad/s².
    pub down: f32,
    /// Jerk limit, rad/s³.
    pub jerk: f32,
    /// Reverse rotation allowed.
    pub reverse: bool,
    /// First target, rad/s.
    pub first: f32,
    /// The target changes after this many ticks.
    pub change_after: u32,
    /// Second target, rad/s.
    pub second: f32,
    /// Ticks in all.
    pub ticks: u32,
    /// Reference speed after `ticks`, rad/s.
    pub speed: f64,
    /// Largest accepted deviation of the f32 ramp, rad/s.
    pub speed_tol: f64,
    /// Largest accepted deviation of the fixed-point player, rad/s.
    pub fixed_tol: f64,
    /// The host's f32 speed, as bits.
    pub host_speed_bits: u32,
}

impl TickRun {
    /// The limits and reverse policy of the run.
    pub fn limits(&self) -> Option<(RampLimits, Reverse)> {
        let limits = RampLimits::new(self.up, self.down, self.jerk).ok()?;
        Some((limits, reverse(self.reverse)))
    }
}

fn reverse(allowed: bool) -> Reverse {
    if allowed {
        Reverse::Allowed
    } else {
        Reverse::Forbidden
    }
}

fn within(got: f32, expected: f64, tol: f64) -> bool {
    libm::fabs(f64::from(got) - expected) <= tol
}

/// Runs the plan samples and the f32 tick runs.
pub fn ramp(tally: &mut Tally) {
    for (i, c) in crate::ramp_vectors::PLAN_SAMPLES.iter().enumerate() {
        let got = RampLimits::new(c.up, c.down, c.jerk).ok().and_then(|l| {
            let plan = Plan::new(
                &l,
                reverse(c.reverse),
                AngularSpeed::from_rad_per_s(c.v0),
                c.a0,
                AngularSpeed::from_rad_per_s(c.target),
            )
            .ok()?;
            plan.state_at(c.t_s).ok()
        });
        match got {
            Some(s) => {
                let (v, a) = (s.speed.rad_per_s(), s.acceleration_rad_s2);
                let ok = within(v, c.speed, c.speed_tol) && within(a, c.accel, c.accel_tol);
                tally.numeric(
                    "ramp plan sample",
                    i,
                    ok,
                    Some(v.to_bits() == c.host_speed_bits && a.to_bits() == c.host_accel_bits),
                );
                if !ok {
                    crate::say(format_args!(
                        "  got {v}, {a}; expected {} ± {}, {} ± {}",
                        c.speed, c.speed_tol, c.accel, c.accel_tol
                    ));
                }
            }
            None => tally.check("ramp plan sample refused", false),
        }
    }
    for (i, c) in crate::ramp_vectors::TICK_RUNS.iter().enumerate() {
        let got = c.limits().and_then(|(l, r)| run_f32(c, l, r));
        match got {
            Some(v) => {
                let ok = within(v, c.speed, c.speed_tol);
                tally.numeric(
                    "ramp tick run",
                    i,
                    ok,
                    Some(v.to_bits() == c.host_speed_bits),
                );
                if !ok {
                    crate::say(format_args!(
                        "  got {v}; expected {} ± {}",
                        c.speed, c.speed_tol
                    ));
                }
            }
            None => tally.check("ramp tick run refused", false),
        }
    }
}

fn run_f32(c: &TickRun, limits: RampLimits, reverse: Reverse) -> Option<f32> {
    let dt = crate::ramp_vectors::TICK_S;
    let mut ramp = SpeedRamp::new(limits, reverse);
    let _ = ramp
        .set_target(AngularSpeed::from_rad_per_s(c.first))
        .ok()?;
    let mut v = 0.0;
    for k in 1..=c.ticks {
        v = ramp.step(dt).ok()?.speed.rad_per_s();
        if k == c.change_after {
            let _ = ramp
                .set_target(AngularSpeed::from_rad_per_s(c.second))
                .ok()?;
        }
    }
    Some(v)
}

/// Runs the tick runs through the fixed-point ramp (plans in f32, ticks in
/// I16F16 output), within each vector's fixed-point tolerance.
#[cfg(feature = "fixed")]
pub fn fixed_ramp(tally: &mut Tally) {
    use swingdrive::fixed_point::FixedRamp;
    for (i, c) in crate::ramp_vectors::TICK_RUNS.iter().enumerate() {
        let got = c.limits().and_then(|(l, r)| {
            let mut ramp = FixedRamp::new(l, r, crate::ramp_vectors::TICK_S).ok()?;
            let _ = ramp
                .set_target(AngularSpeed::from_rad_per_s(c.first))
                .ok()?;
            let mut v = ramp.setpoint().speed;
            for k in 1..=c.ticks {
                v = ramp.step().speed;
                if k == c.change_after {
                    let _ = ramp
                        .set_target(AngularSpeed::from_rad_per_s(c.second))
                        .ok()?;
                }
            }
            Some(v)
        });
        match got {
            Some(v) => {
                // I16F16 to f64 is exact.
                let value = f64::from(v.to_bits()) / 65_536.0;
                let ok = libm::fabs(value - c.speed) <= c.fixed_tol;
                tally.numeric("fixed ramp tick run", i, ok, None);
                if !ok {
                    crate::say(format_args!(
                        "  got {value}; expected {} ± {}",
                        c.speed, c.fixed_tol
                    ));
                }
            }
            None => tally.check("fixed ramp tick run refused", false),
        }
    }
}
