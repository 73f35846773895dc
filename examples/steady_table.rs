//! Steady-state table for the demo ride: target swing angle → shaft-speed
//! setpoint in the units a drive understands, rider load factor, how touchy
//! the operating point is, and the seats' swing-mode periods.
//!
//! The demo ride is invented (demo data, not a real ride): 16 chain seats on
//! a top with a 3.8 m hub offset, 6.4 m effective length, driven through a
//! 1:120 gearbox by a motor whose drive reference is 1500 rpm at full scale.
#![allow(
    clippy::unwrap_used,
    clippy::expect_used,
    clippy::panic,
    clippy::indexing_slicing
)]

use swingdrive::{
    Angle, AngularSpeed, DriveScale, GearRatio, Gravity, ParamError, RideGeometry, Suspension,
    SwingModes,
};

/// Demo data: an invented ride.
const HUB_OFFSET_M: f32 = 3.8;
/// Demo data: pivot to centre of mass of seat plus rider.
const LENGTH_M: f32 = 6.4;
/// Demo data: motor turns per shaft turn.
const GEAR_RATIO: f32 = 120.0;
/// Demo data: motor speed at drive reference 100 %.
const FULL_SCALE_MOTOR_RPM: f32 = 1500.0;
/// Demo data: site latitude and height for local gravity.
const SITE_LATITUDE_DEG: f32 = 48.2;
const SITE_HEIGHT_M: f32 = 310.0;

fn main() -> Result<(), ParamError> {
    let gravity = Gravity::wgs84(SITE_LATITUDE_DEG, SITE_HEIGHT_M)?;
    let ride = RideGeometry::new(HUB_OFFSET_M, LENGTH_M, Suspension::Chain, gravity)?;
    let gear = GearRatio::new(GEAR_RATIO)?;
    let drive = DriveScale::new(gear, AngularSpeed::from_rpm(FULL_SCALE_MOTOR_RPM))?;

    println!("Demo ride (invented): chain seats, hub offset {HUB_OFFSET_M} m, effective length {LENGTH_M} m");
    println!("Local gravity (WGS 84 at {SITE_LATITUDE_DEG}° N, {SITE_HEIGHT_M} m): {gravity}");
    println!("Drive: gear 1:{GEAR_RATIO}, full-scale reference = {FULL_SCALE_MOTOR_RPM} motor rpm");
    println!();
    println!(
        "{:>6} {:>8} {:>7} {:>7} {:>9} {:>7} {:>6} {:>8} {:>8} {:>8}",
        "angle", "speed", "shaft", "shaft", "motor", "ref", "load", "sens.", "slow", "fast"
    );
    println!(
        "{:>6} {:>8} {:>7} {:>7} {:>9} {:>7} {:>6} {:>8} {:>8} {:>8}",
        "°", "rad/s", "rpm", "°/s", "rpm", "%", "n", "°/rpm", "mode s", "mode s"
    );
    for deg in (0..=60).step_by(5) {
        let state = ride.steady_state_at_angle(Angle::from_deg(deg as f32))?;
        let motor = gear.motor_speed(state.speed);
        let reference = drive.reference(state.speed);
        let (slow, fast) = match ride.swing_modes(&state) {
            SwingModes::Chain { slow, fast } => (slow.period_s(), fast.period_s()),
            SwingModes::Rod { radial } => (radial.period_s(), f32::NAN),
        };
        println!(
            "{:>6.1} {:>8.4} {:>7.3} {:>7.2} {:>9.1} {:>6.1}{} {:>6.3} {:>8.3} {:>8.2} {:>8.2}",
            state.angle.deg(),
            state.speed.rad_per_s(),
            state.speed.rpm(),
            state.speed.deg_per_s(),
            motor.rpm(),
            100.0 * reference.fraction,
            if reference.saturated { "!" } else { " " },
            state.load_factor,
            state.sensitivity.deg_per_rpm(),
            slow,
            fast,
        );
    }
    println!();
    println!(
        "sens. = change of swing angle per rpm of shaft speed; slow/fast = swing-mode periods"
    );
    println!("seen from the turning top; '!' = beyond the drive reference's full scale.");
    Ok(())
}
