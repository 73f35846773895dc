//! Check vectors for the on-target tests (firmware/), generated from the f64
//! reference and the host's f32 results.
//!
//! The firmware compares what the Cortex-M computes with the f64 reference
//! within the tolerances below (the same conditioning-scaled bounds as
//! tests/reference_crosscheck.rs), and with the host's f32 bits: IEEE-754
//! arithmetic plus the same software libm should give identical results on
//! every core, and the firmware counts that too.
//!
//! This test fails when firmware/src/vectors.rs is out of date; regenerate with
//! `UPDATE_TARGET_VECTORS=1 cargo test --features std --test target_vectors`.
#![cfg(feature = "std")]
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

#[path = "common/firmware_vectors.rs"]
mod firmware_vectors;

use std::fmt::Write as _;

use swingdrive::reference::steady::Ride;
use swingdrive::{Angle, AngularSpeed, Gravity, RideGeometry, Suspension, SwingModes};

const EPS: f64 = f32::EPSILON as f64;
const HUB_OFFSETS_M: [f32; 4] = [0.0, 0.5, 3.6, 12.0];
const LENGTHS_M: [f32; 3] = [1.5, 6.2, 18.0];
const ANGLES_DEG: [f32; 7] = [1.0, 10.0, 25.0, 40.0, 55.0, 70.0, 84.0];

fn generate() -> String {
    let mut speed = String::new();
    let mut angle = String::new();
    let mut modes = String::new();
    let mut index = 0_usize;
    for r0 in HUB_OFFSETS_M {
        for l in LENGTHS_M {
            for deg in ANGLES_DEG {
                index += 1;
                let chain = index.is_multiple_of(2);
                let suspension = if chain {
                    Suspension::Chain
                } else {
                    Suspension::Rod
                };
                let geometry = RideGeometry::new(r0, l, suspension, Gravity::STANDARD).unwrap();
                let reference = Ride {
                    hub_offset_m: f64::from(r0),
                    length_m: f64::from(l),
                    gravity_mps2: f64::from(Gravity::STANDARD.mps2()),
                    chain,
                };
                let a = Angle::from_deg(deg);
                // Speed for angle: 8 ε relative (closed form).
                let host = geometry.speed_for_angle(a).unwrap().rad_per_s();
                let exact = reference.speed_for_angle(f64::from(a.rad()));
                writeln!(
                    speed,
                    "    Case {{ hub_offset_m: {r0:?}, length_m: {l:?}, chain: {chain}, input: {:?}, expected: {exact:?}, tolerance: {:e}, host_bits: {:#010x} }},",
                    a.rad(),
                    8.0 * EPS * exact,
                    host.to_bits()
                )
                .unwrap();
                // Angle for speed: 16 ε (φ + ω |dφ/dω|).
                let w = exact as f32;
                let host = geometry
                    .angle_for_speed(AngularSpeed::from_rad_per_s(w))
                    .unwrap()
                    .rad();
                let phi = reference.angle_for_speed(f64::from(w));
                let scale = phi + f64::from(w) * reference.sensitivity(phi).abs();
                writeln!(
                    angle,
                    "    Case {{ hub_offset_m: {r0:?}, length_m: {l:?}, chain: {chain}, input: {w:?}, expected: {phi:?}, tolerance: {:e}, host_bits: {:#010x} }},",
                    16.0 * EPS * scale,
                    host.to_bits()
                )
                .unwrap();
                // Swing modes: the fast (or only) mode, within 2e-5 relative.
                let state = geometry.steady_state_at_angle(a).unwrap();
                let host = match geometry.swing_modes(&state) {
                    SwingModes::Rod { radial } => radial,
                    SwingModes::Chain { fast, .. } => fast,
                }
                .angular_frequency_rad_s();
                let (low, high) = reference.swing_modes(f64::from(a.rad()));
                let exact = high.unwrap_or(low);
                writeln!(
                    modes,
                    "    Case {{ hub_offset_m: {r0:?}, length_m: {l:?}, chain: {chain}, input: {:?}, expected: {exact:?}, tolerance: {:e}, host_bits: {:#010x} }},",
                    a.rad(),
                    2e-5 * exact,
                    host.to_bits()
                )
                .unwrap();
            }
        }
    }
    format!(
        "//! Check vectors generated from the f64 reference by the host test\n\
         //! tests/target_vectors.rs; do not edit by hand.\n\
         \n\
         use crate::checks::Case;\n\
         \n\
         /// `speed_for_angle`: input angle (rad) → shaft speed (rad/s).\n\
         pub const SPEED_FOR_ANGLE: &[Case] = &[\n{speed}];\n\
         \n\
         /// `angle_for_speed`: input speed (rad/s) → angle (rad).\n\
         pub const ANGLE_FOR_SPEED: &[Case] = &[\n{angle}];\n\
         \n\
         /// `swing_modes`: input angle (rad) → fast (chain) or only (rod) mode, rad/s.\n\
         pub const SWING_MODE: &[Case] = &[\n{modes}];\n"
    )
}

#[test]
fn firmware_vectors_are_current() {
    firmware_vectors::keep_current("vectors.rs", "target_vectors", &generate());
}
