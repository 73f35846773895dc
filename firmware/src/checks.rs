//! The check runner: each case computes a value on the target and compares it
//! with the f64 reference (within the stated tolerance) and with the host's
//! f32 bits (informational: identical IEEE arithmetic should agree exactly).

use swingdrive::{Angle, AngularSpeed, Gravity, RideGeometry, Suspension, SwingModes};

/// One check vector.
pub struct Case {
    /// Hub offset, m.
    pub hub_offset_m: f32,
    /// Effective length, m.
    pub length_m: f32,
    /// Chains (`true`) or hinged rods.
    pub chain: bool,
    /// The input (an angle in rad or a speed in rad/s).
    pub input: f32,
    /// The f64 reference's answer.
    pub expected: f64,
    /// Largest accepted |target − reference|.
    pub tolerance: f64,
    /// The host's f32 answer, as bits.
    pub host_bits: u32,
}

/// Tally of a run.
#[derive(Default)]
pub struct Tally {
    /// Cases within tolerance.
    pub passed: u32,
    /// Cases outside tolerance (or refused).
    pub failed: u32,
    /// Numeric cases compared with the host's f32 result.
    pub compared: u32,
    /// Cases whose f32 result equals the host's bit for bit.
    pub bit_identical: u32,
}

impl Tally {
    /// Records one result; prints failures.
    pub fn record(&mut self, name: &str, index: usize, case: &Case, got: Option<f32>) {
        self.compared += 1;
        match got {
            Some(value) if (f64::from(value) - case.expected).abs() <= case.tolerance => {
                self.passed += 1;
                if value.to_bits() == case.host_bits {
                    self.bit_identical += 1;
                }
            }
            _ => {
                self.failed += 1;
                crate::say(format_args!(
                    "FAIL {name}[{index}]: got {got:?}, expected {} ± {}",
                    case.expected, case.tolerance
                ));
            }
        }
    }

    /// Records a numeric check decided by the caller (several outputs or a
    /// tolerance of its own); prints failures.
    /// `bit_identical`: whether the f32 result equals the host's bit for bit,
    /// `None` when there is no host f32 result to compare with.
    pub fn numeric(&mut self, name: &str, index: usize, ok: bool, bit_identical: Option<bool>) {
        if bit_identical.is_some() {
            self.compared += 1;
        }
        if ok {
            self.passed += 1;
            if bit_identical == Some(true) {
                self.bit_identical += 1;
            }
        } else {
            self.failed += 1;
            crate::say(format_args!("FAIL {name}[{index}]"));
        }
    }

    /// Counts a scenario check that has no numeric reference.
    pub fn check(&mut self, name: &str, ok: bool) {
        if ok {
            self.passed += 1;
        } else {
            self.failed += 1;
            crate::say(format_args!("FAIL {name}"));
        }
    }
}

fn geometry(case: &Case) -> Option<RideGeometry> {
    let suspension = if case.chain {
        Suspension::Chain
    } else {
        Suspension::Rod
    };
    RideGeometry::new(
        case.hub_offset_m,
        case.length_m,
        suspension,
        Gravity::STANDARD,
    )
    .ok()
}

/// Runs the steady-state and swing-mode vectors.
pub fn steady_state(tally: &mut Tally) {
    for (i, case) in crate::vectors::SPEED_FOR_ANGLE.iter().enumerate() {
        let got = geometry(case).and_then(|g| g.speed_for_angle(Angle::from_rad(case.input)).ok());
        tally.record("speed_for_angle", i, case, got.map(AngularSpeed::rad_per_s));
    }
    for (i, case) in crate::vectors::ANGLE_FOR_SPEED.iter().enumerate() {
        let got = geometry(case).and_then(|g| {
            g.angle_for_speed(AngularSpeed::from_rad_per_s(case.input))
                .ok()
        });
        tally.record("angle_for_speed", i, case, got.map(Angle::rad));
    }
    for (i, case) in crate::vectors::SWING_MODE.iter().enumerate() {
        let got = geometry(case).and_then(|g| {
            let state = g.steady_state_at_angle(Angle::from_rad(case.input)).ok()?;
            Some(match g.swing_modes(&state) {
                SwingModes::Rod { radial } => radial.angular_frequency_rad_s(),
                SwingModes::Chain { fast, .. } => fast.angular_frequency_rad_s(),
            })
        });
        tally.record("swing_mode", i, case, got);
    }
}

/// The f32 kernels on the target: the square root (hardware `vsqrt.f32` on the
/// M4F) must equal libm's correctly rounded `sqrtf` bit for bit; sine and
/// cosine (≤ 2 ulp + 6e-8 from the exact value) must stay within 3 ulp + 6e-8
/// of libm's `sincosf` (≤ 1 ulp).
pub fn kernels(tally: &mut Tally) {
    let mut sqrt_ok = true;
    let mut trig_ok = true;
    let mut bits: u32 = 0x3a00_0000; // from about 5e-4 upwards through the ride's ranges
    for _ in 0..4000 {
        let x = f32::from_bits(bits);
        sqrt_ok &= swingdrive::math::sqrt(x).to_bits() == libm::sqrtf(x).to_bits();
        let y = x * 1e-2; // 5e-6 … 60 rad
        let (s, c) = swingdrive::math::sin_cos(y);
        let (ls, lc) = libm::sincosf(y);
        trig_ok &= close(s, ls) && close(c, lc);
        bits += 0x0000_9000;
    }
    for x in [0.0_f32, 1.0, 2.0, 9.806_65, f32::MAX, f32::MIN_POSITIVE] {
        sqrt_ok &= swingdrive::math::sqrt(x).to_bits() == libm::sqrtf(x).to_bits();
    }
    sqrt_ok &= swingdrive::math::sqrt(-1.0).is_nan();
    tally.check("sqrt bit-identical to libm::sqrtf", sqrt_ok);
    tally.check("sin_cos within 3 ulp + 6e-8 of libm::sincosf", trig_ok);
}

fn close(a: f32, b: f32) -> bool {
    let ulp = f32::from_bits(libm::fabsf(b).to_bits() + 1) - libm::fabsf(b);
    libm::fabsf(a - b) <= 3.0 * ulp + 6e-8
}
