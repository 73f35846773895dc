//! f64 reference for the seat dynamics: a second, independent formulation.
//!
//! The simulator (`crate::sim`) works in the frame turning with the top, with
//! the link direction and its angular velocity as state and centrifugal,
//! Coriolis and Euler terms as forces. This reference works in the ground
//! (inertial) frame instead, with no fictitious forces at all:
//!
//! * state: seat position `X` and velocity `V` (ground frame, pivot plane at
//!   z = 0) and the top's turning angle β (β' = ω);
//! * the pivot moves on the circle `P = r0 (cos β, sin β, 0)`;
//! * the link is a constraint `C = (|X − P|² − L²)/2 = 0` held by a Lagrange
//!   multiplier, `Ẍ = g − μ (X − P)`; a rod adds `C₂ = (X − P)·t̂ = 0` (the
//!   seat stays in the turning radial plane, t̂ the tangential unit vector)
//!   with a second multiplier along t̂;
//! * the multipliers make `C̈ = −2k Ċ − k² C` (Baumgarte stabilisation,
//!   k = [`BAUMGARTE_RATE_PER_S`]), and the state is projected back onto the
//!   constraints at every restart;
//! * integration with the 8th-order Dormand–Prince method (DOP853), restarted
//!   at every profile breakpoint and every requested sample time, so no
//!   interpolation is involved.
//!
//! Only continuous profiles (no speed steps) and no damping: it exists to
//! check the simulator's equations, not to replace it.

use differential_equations::methods::ExplicitRungeKutta;
use differential_equations::ode::{solve_ode, OrdinaryNumericalMethod, ODE};
use differential_equations::solout::DefaultSolout;

use super::steady::Ride;
use crate::sim::{SpeedProfile, Tolerance};

/// Baumgarte stabilisation rate, 1/s (critically damped constraint error).
pub const BAUMGARTE_RATE_PER_S: f64 = 2.0;

/// State: position (3), velocity (3), turning angle of the top.
type Y = [f64; 7];

fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/// The ground-frame equations on one interval of constant commanded
/// acceleration.
struct GroundFrame {
    ride: Ride,
    t0: f64,
    speed0: f64,
    accel: f64,
}

impl GroundFrame {
    fn speed(&self, t: f64) -> f64 {
        self.speed0 + self.accel * (t - self.t0)
    }
}

impl ODE<f64, Y> for GroundFrame {
    fn diff(&self, t: f64, y: &Y, dydt: &mut Y) {
        let (r0, g) = (self.ride.hub_offset_m, self.ride.gravity_mps2);
        let l = self.ride.length_m;
        let w = self.speed(t);
        let a = self.accel;
        let beta = y[6];
        let (sb, cb) = beta.sin_cos();
        let radial = [cb, sb, 0.0];
        let tangent = [-sb, cb, 0.0];
        let p = [r0 * cb, r0 * sb, 0.0];
        let vp = [-r0 * w * sb, r0 * w * cb, 0.0];
        let ap = [
            r0 * (-w * w * cb - a * sb),
            r0 * (-w * w * sb + a * cb),
            0.0,
        ];
        let d = [y[0] - p[0], y[1] - p[1], y[2] - p[2]];
        let dd = [y[3] - vp[0], y[4] - vp[1], y[5] - vp[2]];
        let gvec = [0.0, 0.0, -g];
        let free = [gvec[0] - ap[0], gvec[1] - ap[1], gvec[2] - ap[2]];
        let k = BAUMGARTE_RATE_PER_S;
        let c1 = 0.5 * (dot(d, d) - l * l);
        let c1_dot = dot(d, dd);
        let b1 = dot(dd, dd) + dot(d, free) + 2.0 * k * c1_dot + k * k * c1;
        let (mu, nu) = if self.ride.chain {
            (b1 / dot(d, d), 0.0)
        } else {
            // d/dt t̂ = −ω r̂, d²/dt² t̂ = −α r̂ − ω² t̂.
            let c2 = dot(d, tangent);
            let c2_dot = dot(dd, tangent) - w * dot(d, radial);
            let b2 =
                dot(free, tangent) - 2.0 * w * dot(dd, radial) - a * dot(d, radial) - w * w * c2
                    + 2.0 * k * c2_dot
                    + k * k * c2;
            // [|d|² s; s 1] [μ; ν] = [b1; b2], s = d·t̂.
            let s = c2;
            let det = dot(d, d) - s * s;
            ((b1 - s * b2) / det, (dot(d, d) * b2 - s * b1) / det)
        };
        *dydt = [
            y[3],
            y[4],
            y[5],
            gvec[0] - mu * d[0] - nu * tangent[0],
            gvec[1] - mu * d[1] - nu * tangent[1],
            gvec[2] - mu * d[2] - nu * tangent[2],
            w,
        ];
    }
}

/// Projects a ground-frame state onto the link constraints.
fn project(ride: &Ride, y: &Y, w: f64) -> Y {
    let r0 = ride.hub_offset_m;
    let (sb, cb) = y[6].sin_cos();
    let radial = [cb, sb, 0.0];
    let tangent = [-sb, cb, 0.0];
    let p = [r0 * cb, r0 * sb, 0.0];
    let vp = [-r0 * w * sb, r0 * w * cb, 0.0];
    let mut d = [y[0] - p[0], y[1] - p[1], y[2] - p[2]];
    if !ride.chain {
        let s = dot(d, tangent);
        d = [d[0] - s * tangent[0], d[1] - s * tangent[1], d[2]];
    }
    let scale = ride.length_m / dot(d, d).sqrt();
    d = [d[0] * scale, d[1] * scale, d[2] * scale];
    let mut dd = [y[3] - vp[0], y[4] - vp[1], y[5] - vp[2]];
    let along = dot(dd, d) / dot(d, d);
    dd = [
        dd[0] - along * d[0],
        dd[1] - along * d[1],
        dd[2] - along * d[2],
    ];
    if !ride.chain {
        let off = dot(dd, tangent) - w * dot(d, radial);
        dd = [dd[0] - off * tangent[0], dd[1] - off * tangent[1], dd[2]];
    }
    [
        p[0] + d[0],
        p[1] + d[1],
        p[2] + d[2],
        vp[0] + dd[0],
        vp[1] + dd[1],
        vp[2] + dd[2],
        y[6],
    ]
}

/// Link direction in the turning frame (radial, tangential, up).
fn turning_direction(ride: &Ride, y: &Y) -> [f64; 3] {
    let r0 = ride.hub_offset_m;
    let (sb, cb) = y[6].sin_cos();
    let d = [y[0] - r0 * cb, y[1] - r0 * sb, y[2]];
    let n = dot(d, d).sqrt();
    [
        (d[0] * cb + d[1] * sb) / n,
        (-d[0] * sb + d[1] * cb) / n,
        d[2] / n,
    ]
}

/// Simulates in the ground frame and returns the link direction in the
/// turning frame at each of `sample_times` (increasing, within
/// `[profile.start_s(), end_s]`).
///
/// The seat starts with link direction `direction` (turning frame, unit) and
/// velocity `relative_velocity_mps` relative to the top (turning frame),
/// with the top at angle 0 turning at the profile's first speed. After the
/// profile the last speed holds until `end_s`.
///
/// # Errors
/// A message if the profile has a speed step or the solver fails.
pub fn simulate_ground_frame(
    ride: &Ride,
    profile: &SpeedProfile,
    direction: [f64; 3],
    relative_velocity_mps: [f64; 3],
    end_s: f64,
    sample_times: &[f64],
    tolerance: Tolerance,
) -> Result<Vec<[f64; 3]>, String> {
    if profile.stats().steps > 0 {
        return Err("the ground-frame reference takes continuous profiles only".into());
    }
    let t_start = profile.start_s();
    let w0 = profile.first_speed_rad_s();
    let (r0, l) = (ride.hub_offset_m, ride.length_m);
    let x = [r0 + l * direction[0], l * direction[1], l * direction[2]];
    // Ground velocity = relative velocity + ω ẑ × x (top at β = 0).
    let v = [
        relative_velocity_mps[0] - w0 * x[1],
        relative_velocity_mps[1] + w0 * x[0],
        relative_velocity_mps[2],
    ];
    let mut y: Y = project(ride, &[x[0], x[1], x[2], v[0], v[1], v[2], 0.0], w0);
    let mut stops: Vec<f64> = profile
        .breakpoints()
        .chain(sample_times.iter().copied())
        .chain(core::iter::once(end_s))
        .filter(|&t| t > t_start && t <= end_s)
        .collect();
    stops.sort_by(f64::total_cmp);
    stops.dedup();
    let mut out = Vec::with_capacity(sample_times.len());
    let mut samples = sample_times.iter().copied().peekable();
    let mut t = t_start;
    while samples.peek().is_some_and(|&s| s <= t) {
        samples.next();
        out.push(turning_direction(ride, &y));
    }
    for stop in stops {
        let (speed0, accel) = profile.command_at(t);
        let system = GroundFrame {
            ride: *ride,
            t0: t,
            speed0,
            accel,
        };
        let mut method = ExplicitRungeKutta::dop853()
            .rtol(tolerance.relative)
            .atol(tolerance.absolute)
            .max_steps(10_000_000);
        let mut solout = DefaultSolout::new();
        solve_ode(&mut method, &system, t, stop, &y, &mut solout)
            .map_err(|e| format!("ground-frame solver failed: {e:?}"))?;
        let end = *OrdinaryNumericalMethod::<f64, Y>::y(&method);
        y = project(ride, &end, system.speed(stop));
        t = stop;
        while samples.peek().is_some_and(|&s| s <= t) {
            samples.next();
            out.push(turning_direction(ride, &y));
        }
    }
    Ok(out)
}
