//! `f64` reference for the speed ramp, written independently of
//! [`crate::ramp`] and used only to check it.
//!
//! Structure, chosen to differ from the target code:
//!
//! * Durations of the monotone part come straight from the rest-to-rest formulas
//!   of Biagiotti & Melchiorri, *Trajectory Planning for Automatic Machines and
//!   Robots* (2008), §3.4: `T = 2·sqrt(Δv/j)` when the acceleration limit is not
//!   reached, `T = Δv/a + a/j` when it is. A nonzero initial (or final)
//!   acceleration `α` is handled by extending the profile backwards (forwards)
//!   to a virtual state with zero acceleration, `α²/2j` further away in speed
//!   and `α/j` earlier (later) in time, and cutting that part off again.
//! * A move through zero speed with different limits on the two sides is split
//!   at the crossing; the acceleration at the crossing is found by a numerical
//!   minimisation of the total time (dense grid, then golden section), not by
//!   the case analysis of the target code.
//! * The trajectory is evaluated by integrating the phases from the start state.
//!
//! Not modelled: the forward-only "raised jerk" stop of the target code (a start
//! state that cannot stop before zero speed at the jerk limit).

/// Limits, rad/s² and rad/s³ (all > 0, not checked: this is test code).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Limits {
    /// Limit while the speed's magnitude rises.
    pub accel: f64,
    /// Limit while the speed's magnitude falls.
    pub decel: f64,
    /// Jerk limit.
    pub jerk: f64,
}

/// A constant-jerk phase.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Phase {
    /// Jerk, rad/s³.
    pub jerk: f64,
    /// Duration, s.
    pub duration: f64,
}

/// A planned profile: start state and phases.
#[derive(Debug, Clone, PartialEq)]
pub struct Profile {
    /// Start speed, rad/s.
    pub v0: f64,
    /// Start acceleration, rad/s².
    pub a0: f64,
    /// Target speed after the reverse policy, rad/s.
    pub target: f64,
    /// Phases in order; zero-length phases are left out.
    pub phases: Vec<Phase>,
}

impl Profile {
    /// Total duration, s.
    #[must_use]
    pub fn duration(&self) -> f64 {
        self.phases.iter().map(|p| p.duration).sum()
    }

    /// Speed and acceleration `t` seconds after the start, integrated phase by
    /// phase (held at the final state after the end).
    #[must_use]
    pub fn state_at(&self, t: f64) -> (f64, f64) {
        let (mut v, mut a) = (self.v0, self.a0);
        let mut left = t.max(0.0);
        for p in &self.phases {
            let dt = left.min(p.duration);
            (v, a) = integrate(v, a, p.jerk, dt);
            left -= dt;
            if left <= 0.0 {
                break;
            }
        }
        (v, a)
    }
}

fn integrate(v: f64, a: f64, j: f64, t: f64) -> (f64, f64) {
    (v + a * t + 0.5 * j * t * t, a + j * t)
}

/// Rest-to-rest duration of a speed change `dv >= 0` with acceleration limit `a`
/// and jerk limit `j`: Biagiotti & Melchiorri (2008), §3.4.
#[must_use]
pub fn rest_to_rest_duration(dv: f64, a: f64, j: f64) -> f64 {
    if dv * j >= a * a {
        dv / a + a / j
    } else {
        2.0 * (dv / j).sqrt()
    }
}

/// Rest-to-rest phases (jerk +j, hold, jerk -j) for a rise `dv >= 0`, and the
/// peak acceleration.
fn rest_to_rest_phases(dv: f64, a: f64, j: f64) -> (Vec<Phase>, f64) {
    let (tj, ta, peak) = if dv * j >= a * a {
        (a / j, dv / a - a / j, a)
    } else {
        let tj = (dv / j).sqrt();
        (tj, 0.0, j * tj)
    };
    let phases = vec![
        Phase {
            jerk: j,
            duration: tj,
        },
        Phase {
            jerk: 0.0,
            duration: ta,
        },
        Phase {
            jerk: -j,
            duration: tj,
        },
    ];
    (phases, peak)
}

/// Removes `front` seconds from the start and `back` seconds from the end.
fn trim(phases: Vec<Phase>, front: f64, back: f64) -> Vec<Phase> {
    let mut out = Vec::new();
    let total: f64 = phases.iter().map(|p| p.duration).sum();
    let (from, to) = (front, total - back);
    let mut t = 0.0_f64;
    for p in phases {
        let (s, e) = (t.max(from), (t + p.duration).min(to));
        if e > s {
            out.push(Phase {
                jerk: p.jerk,
                duration: e - s,
            });
        }
        t += p.duration;
    }
    out
}

/// Rising move from (`w0`, `al0 >= 0`) to (`w1`, `al1 >= 0`) under limit `lim`,
/// by the virtual-state extension. `None` unless the extended rest-to-rest
/// profile's peak covers both end accelerations (the move is then monotone in
/// acceleration sign and time-optimal).
fn rising(w0: f64, al0: f64, w1: f64, al1: f64, lim: f64, j: f64) -> Option<(Vec<Phase>, f64)> {
    let dv = (w1 + al1 * al1 / (2.0 * j)) - (w0 - al0 * al0 / (2.0 * j));
    if dv < 0.0 {
        return None;
    }
    let (phases, peak) = rest_to_rest_phases(dv, lim, j);
    if peak + 1e-12 * lim < al0.max(al1) {
        return None;
    }
    let t = rest_to_rest_duration(dv, lim, j) - al0 / j - al1 / j;
    Some((trim(phases, al0 / j, al1 / j), t))
}

/// The limit that applies to acceleration `a` at speed `v`.
fn bound(l: &Limits, v: f64, a: f64) -> f64 {
    if v * a < 0.0 {
        l.decel
    } else {
        l.accel
    }
}

/// Plans the time-optimal move from (`v0`, `a0`) to `target` with zero final
/// acceleration. With `reverse_allowed == false` a negative target becomes 0.
#[must_use]
pub fn plan(l: &Limits, reverse_allowed: bool, v0: f64, a0: f64, target: f64) -> Profile {
    let vt = if reverse_allowed {
        target
    } else {
        target.max(0.0)
    };
    let j = l.jerk;
    let mut phases = Vec::new();
    let (mut v, mut a) = (v0, a0);

    // Acceleration pointing away, or forcing the target to be passed.
    let v_stop = v + a * a.abs() / (2.0 * j);
    if a != 0.0 && (vt - v_stop) * a <= 0.0 {
        phases.push(Phase {
            jerk: -a.signum() * j,
            duration: a.abs() / j,
        });
        (v, a) = (v_stop, 0.0);
    }
    // Acceleration outside the limit that applies: brake it back (the limit
    // may change once if the speed crosses zero meanwhile).
    for _ in 0..3 {
        let b = bound(l, v, a);
        if a.abs() <= b {
            break;
        }
        let jerk = -a.signum() * j;
        let duration = (a.abs() - b) / j;
        phases.push(Phase { jerk, duration });
        (v, a) = integrate(v, a, jerk, duration);
        a = a.signum() * b;
    }

    if v != vt {
        let s = (vt - v).signum();
        let (w0, al0, wt) = (s * v, (s * a).max(0.0), s * vt);
        let mut moved = if w0 >= 0.0 || wt <= 0.0 || l.accel == l.decel {
            let lim = if w0 >= 0.0 { l.accel } else { l.decel };
            rising(w0, al0, wt, 0.0, lim, j).map(|(p, _)| p)
        } else {
            through_zero(l, w0, al0, wt)
        };
        if moved.is_none() {
            // Forced excess at the crossing: brake to the smaller limit, then
            // move under it.
            let m = l.accel.min(l.decel);
            let mut pre = Vec::new();
            let (mut w, mut al) = (w0, al0);
            if al > m {
                pre.push(Phase {
                    jerk: -j,
                    duration: (al - m) / j,
                });
                (w, al) = integrate(w, al, -j, (al - m) / j);
            }
            moved = rising(w, al, wt, 0.0, m, j).map(|(p, _)| {
                pre.extend(p);
                pre
            });
        }
        for p in moved.unwrap_or_default() {
            phases.push(Phase {
                jerk: s * p.jerk,
                duration: p.duration,
            });
        }
    }
    phases.retain(|p| p.duration > 0.0);
    Profile {
        v0,
        a0,
        target: vt,
        phases,
    }
}

/// Rising move from `w0 < 0` to `wt > 0`: decel limit before zero, accel limit
/// after. Minimises the total time over the acceleration at the crossing.
fn through_zero(l: &Limits, w0: f64, al0: f64, wt: f64) -> Option<Vec<Phase>> {
    let j = l.jerk;
    let total = |alc: f64| -> Option<f64> {
        let (_, t1) = rising(w0, al0, 0.0, alc, l.decel, j)?;
        let (_, t2) = rising(0.0, alc, wt, 0.0, l.accel, j)?;
        Some(t1 + t2)
    };
    // Feasible crossing accelerations: not above either limit, not above what a
    // full-jerk rise reaches, not so high that the rest overshoots, and not so
    // low that the start acceleration cannot come down to it in time.
    let hi = l
        .accel
        .min(l.decel)
        .min((al0 * al0 - 2.0 * j * w0).sqrt())
        .min((2.0 * j * wt).sqrt());
    let lo = (al0 * al0 + 2.0 * j * w0).max(0.0).sqrt();
    if lo > hi {
        return None;
    }
    const GRID: usize = 1000;
    let at = |k: usize| lo + (hi - lo) * k as f64 / GRID as f64;
    let mut best = (f64::INFINITY, lo);
    for k in 0..=GRID {
        let x = at(k);
        if let Some(t) = total(x) {
            if t < best.0 {
                best = (t, x);
            }
        }
    }
    if !best.0.is_finite() {
        return None;
    }
    // Golden-section refinement in the neighbouring grid cells.
    let step = (hi - lo) / GRID as f64;
    let (mut a, mut b) = ((best.1 - step).max(lo), (best.1 + step).min(hi));
    let g = (5.0_f64.sqrt() - 1.0) / 2.0;
    let f = |x: f64| total(x).unwrap_or(f64::INFINITY);
    for _ in 0..80 {
        let (c, d) = (b - g * (b - a), a + g * (b - a));
        if f(c) <= f(d) {
            b = d;
        } else {
            a = c;
        }
    }
    let mid = 0.5 * (a + b);
    let alc = [mid, best.1, lo, hi]
        .into_iter()
        .min_by(|x, y| f(*x).total_cmp(&f(*y)))
        .unwrap_or(best.1);
    let (mut p1, _) = rising(w0, al0, 0.0, alc, l.decel, j)?;
    let (p2, _) = rising(0.0, alc, wt, 0.0, l.accel, j)?;
    p1.extend(p2);
    Some(p1)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn textbook_durations() {
        // Biagiotti & Melchiorri (2008) §3.4.
        let l = Limits {
            accel: 1.0,
            decel: 1.0,
            jerk: 2.0,
        };
        assert!((plan(&l, true, 0.0, 0.0, 4.0).duration() - 4.5).abs() < 1e-12);
        assert!((plan(&l, true, 0.0, 0.0, 0.125).duration() - 0.5).abs() < 1e-12);
        let p = plan(&l, true, 0.0, 0.0, 4.0);
        let (v, a) = p.state_at(p.duration());
        assert!((v - 4.0).abs() < 1e-12 && a.abs() < 1e-12);
    }
}
