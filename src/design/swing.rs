//! The seats' state at the end of a designed speed change, by fixed-step
//! classical Runge–Kutta (RK4) on the simulator's equations of motion.
//!
//! The optimiser needs thousands of runs with slightly different profiles.
//! A fixed step keeps the end state a smooth function of the design variables
//! (an adaptive step control would add step-size noise to finite
//! differences), and the acceleration spline is smooth inside each span, so a
//! span is integrated in equal steps of at most [`MAX_STEP_S`]. Every result is
//! checked afterwards by the adaptive simulator ([`fn@crate::sim::replay`]).

use crate::sim::dynamics::{LinkState, SeatDynamics, ShaftMotion, Vec3};

use super::shape::AccelSpline;

/// Longest RK4 step, s. The fastest swing mode of the rides in range has a
/// period of a few seconds; at 0.02 s the local error of RK4,
/// O((Ω Δt)⁵), stays below 1e-9 rad per step.
pub const MAX_STEP_S: f64 = 0.02;

/// One member of the tolerance band: a seat model and what "still" means
/// for it at the end speed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BandMember {
    /// The seat (length and damping of this member).
    pub seat: SeatDynamics,
    /// Steady direction of the link at the end speed.
    pub target_direction: Vec3,
    /// Angular frequency used to turn link rates into angles, rad/s (the
    /// slowest swing mode at the end speed).
    pub rate_scale_rad_s: f64,
    /// State at the start of the change.
    pub start: LinkState,
}

fn add_scaled(y: &[f64; 6], k: &[f64; 6], s: f64) -> [f64; 6] {
    let mut out = *y;
    for (o, d) in out.iter_mut().zip(k) {
        *o += s * d;
    }
    out
}

fn derivative(seat: &SeatDynamics, y: &[f64; 6], shaft: ShaftMotion) -> [f64; 6] {
    let [n0, n1, n2, w0, w1, w2] = *y;
    let state = LinkState::from_raw([n0, n1, n2], [w0, w1, w2]);
    let r = seat.rate(&state, shaft);
    let [a, b, c] = r.direction;
    let [d, e, f] = r.angular_velocity;
    [a, b, c, d, e, f]
}

/// Integrates `member` through `spline` from the start of span `first_span`
/// (state `from`) to the end. When `knots` is given, the state at the start of
/// every later span is stored in it (index = span).
pub fn run(
    member: &BandMember,
    spline: &AccelSpline,
    first_span: usize,
    from: LinkState,
    mut knots: Option<&mut Vec<LinkState>>,
) -> LinkState {
    let seat = &member.seat;
    let suspension = seat.suspension();
    let h = spline.span_s();
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let steps = (h / MAX_STEP_S).ceil().max(1.0) as usize;
    let dt = h / steps as f64;
    let mut state = from;
    for span in first_span..spline.spans() {
        if let Some(k) = knots.as_deref_mut() {
            if let Some(slot) = k.get_mut(span) {
                *slot = state;
            }
        }
        let t0 = span as f64 * h;
        let [n0, n1, n2] = state.direction();
        let [w0, w1, w2] = state.angular_velocity();
        let mut y = [n0, n1, n2, w0, w1, w2];
        for s in 0..steps {
            let t = t0 + s as f64 * dt;
            let shaft_at = |t: f64| {
                let (w, a, _) = spline.state_at(t);
                ShaftMotion {
                    speed_rad_s: w,
                    accel_rad_s2: a,
                }
            };
            let mid = shaft_at(t + 0.5 * dt);
            let k1 = derivative(seat, &y, shaft_at(t));
            let k2 = derivative(seat, &add_scaled(&y, &k1, 0.5 * dt), mid);
            let k3 = derivative(seat, &add_scaled(&y, &k2, 0.5 * dt), mid);
            let k4 = derivative(seat, &add_scaled(&y, &k3, dt), shaft_at(t + dt));
            for (i, yi) in y.iter_mut().enumerate() {
                let k = |v: &[f64; 6]| v.get(i).copied().unwrap_or(0.0);
                *yi += dt / 6.0 * (k(&k1) + 2.0 * k(&k2) + 2.0 * k(&k3) + k(&k4));
            }
        }
        let [a, b, c, d, e, f] = y;
        state = LinkState::from_raw([a, b, c], [d, e, f]).projected(suspension);
    }
    state
}

/// The residual of one end state, in degrees: the link's offset from its
/// steady direction (3 components) and its angular velocity over the slow
/// mode's angular frequency (3 components). All six are zero exactly when
/// the seat is at rest in its steady direction; their norm is about the
/// amplitude of the swing that remains.
#[must_use]
pub fn residual(member: &BandMember, end: &LinkState) -> [f64; 6] {
    let n = end.direction();
    let w = end.angular_velocity();
    let d = member.target_direction;
    let k = 180.0 / core::f64::consts::PI;
    let s = k / member.rate_scale_rad_s;
    [
        k * (n[0] - d[0]),
        k * (n[1] - d[1]),
        k * (n[2] - d[2]),
        s * w[0],
        s * w[1],
        s * w[2],
    ]
}
