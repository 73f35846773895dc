//! Host adversarial search (feature `std`): admissible request sequences
//! (every one goes through the ceiling clamp and the jerk-limited ramp, so
//! the shaft stays within the speed, acceleration and jerk limits) that try
//! to swing the seats past the certified angle, with and without the swing
//! governor; the truth is the f64 simulator.
//!
//! Three families: random sequences (random levels and holds, some with a
//! controlled stop mid-sequence), resonant pumping between 75 % and 100 % of
//! the ceiling at each swing-mode frequency and ±10 % of it, and a
//! random-restart hill climb over the sequence (levels and holds) maximising
//! the simulated peak. The hill climb is a plain bounded random search: the
//! peak is a non-smooth function of the sequence (it jumps between swing
//! cycles), where a derivative-free local search with restarts is the
//! customary tool; each restart is independent and the best is kept.

use crate::geometry::{RideGeometry, Suspension};
use crate::sim::SeatDynamics;
use crate::units::AngularSpeed;

use super::closed_loop::{run_loop, simulate_peak, Rig, Scenario};

/// How much searching to do.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SearchSize {
    /// Random sequences.
    pub random: usize,
    /// Hill-climb restarts.
    pub restarts: usize,
    /// Hill-climb steps per restart.
    pub steps: usize,
    /// Length of each sequence, s.
    pub duration_s: u32,
    /// Seed of the pseudo-random generator.
    pub seed: u64,
}

/// The worst case one family found.
#[derive(Debug, Clone, PartialEq)]
pub struct Worst {
    /// Peak angle, degrees.
    pub peak_deg: f64,
    /// Peak tangential (sideways) angle in that run, degrees.
    pub sideways_deg: f64,
    /// Which case.
    pub case: String,
}

impl Default for Worst {
    fn default() -> Self {
        Self {
            peak_deg: 0.0,
            sideways_deg: 0.0,
            case: String::new(),
        }
    }
}

/// Results for one ride.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct SearchReport {
    /// Worst peak without the governor.
    pub bare: Worst,
    /// Worst peak with the governor.
    pub governed: Worst,
    /// Governed runs whose simulated peak exceeded the certified angle.
    pub governed_exceedances: usize,
    /// Governed runs in which the governor reported a fault.
    pub governed_faults: usize,
    /// Runs simulated (each governed and bare).
    pub runs: usize,
}

/// A small xorshift generator (reproducible, no dependency).
#[derive(Debug, Clone)]
pub struct Rng(u64);

impl Rng {
    /// Seeded generator (a zero seed is replaced).
    #[must_use]
    pub fn new(seed: u64) -> Self {
        Self(if seed == 0 {
            0x9E37_79B9_7F4A_7C15
        } else {
            seed
        })
    }
    /// Uniform in [0, 1).
    pub fn unit(&mut self) -> f64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        #[allow(clippy::cast_precision_loss)]
        let x = (self.0 >> 11) as f64 / (1_u64 << 53) as f64;
        x
    }
}

/// A sequence as levels (fractions of the ceiling) and holds (s).
#[derive(Debug, Clone, PartialEq)]
struct Genome {
    pieces: Vec<(f64, f64)>,
    stop_at: Option<f64>,
}

impl Genome {
    fn random(rng: &mut Rng, duration: f64) -> Self {
        let mut pieces = Vec::new();
        let mut t = 0.0;
        while t < duration && pieces.len() < 64 {
            let level = if rng.unit() < 0.3 { 1.0 } else { rng.unit() };
            let hold = 0.5 + 19.5 * rng.unit() * rng.unit();
            pieces.push((level, hold));
            t += hold;
        }
        let stop_at = (rng.unit() < 0.3).then(|| duration * (0.3 + 0.6 * rng.unit()));
        Self { pieces, stop_at }
    }

    fn mutate(&self, rng: &mut Rng) -> Self {
        let mut g = self.clone();
        for p in &mut g.pieces {
            if rng.unit() < 0.3 {
                p.0 = (p.0 + 0.3 * (rng.unit() - 0.5)).clamp(0.0, 1.0);
            }
            if rng.unit() < 0.3 {
                p.1 = (p.1 * (0.7 + 0.6 * rng.unit())).clamp(0.3, 30.0);
            }
        }
        if rng.unit() < 0.1 {
            g.stop_at = match g.stop_at {
                Some(_) => None,
                None => Some(30.0 + 60.0 * rng.unit()),
            };
        }
        g
    }

    fn scenario(&self, ceiling: f64, duration: f64) -> Scenario {
        let mut requests = Vec::with_capacity(self.pieces.len());
        let mut t = 0.0;
        for &(level, hold) in &self.pieces {
            requests.push((t, level * ceiling));
            t += hold;
        }
        Scenario {
            requests,
            duration_s: duration,
            stop_at_s: self.stop_at,
        }
    }
}

/// Alternating 75 %/100 % requests every half of `period_s`, from a start at
/// the ceiling; stop after `stop_at`.
#[must_use]
pub fn pumping(ceiling: f64, period_s: f64, duration_s: f64, stop_at: Option<f64>) -> Scenario {
    let mut requests = vec![(0.0, ceiling)];
    let (mut t, mut high) = (40.0, false);
    while t < duration_s {
        requests.push((t, if high { 1.0 } else { 0.75 } * ceiling));
        high = !high;
        t += 0.5 * period_s;
    }
    Scenario {
        requests,
        duration_s,
        stop_at_s: stop_at,
    }
}

/// The swing-mode periods at 87.5 % of the ceiling (the middle of the
/// pumping band), s.
fn mode_periods(geometry: &RideGeometry, ceiling: f32) -> Vec<f64> {
    let Ok(s) = geometry.steady_state_at_speed(AngularSpeed::from_rad_per_s(0.875 * ceiling))
    else {
        return Vec::new();
    };
    match geometry.swing_modes(&s) {
        crate::SwingModes::Rod { radial } => vec![f64::from(radial.period_s())],
        crate::SwingModes::Chain { slow, fast } => {
            vec![f64::from(slow.period_s()), f64::from(fast.period_s())]
        }
    }
}

/// The truth seat at a length in the band (fraction 0 = shortest, 1 = longest).
fn truth_at(rig: &Rig, fraction: f64) -> SeatDynamics {
    let l = f64::from(rig.params.length_min_m)
        + fraction * f64::from(rig.params.length_max_m - rig.params.length_min_m);
    #[allow(clippy::cast_possible_truncation)]
    let g = rig.geometry.with_length(l as f32).unwrap_or(rig.geometry);
    SeatDynamics::from_geometry(&g)
}

/// Runs one scenario both ways and folds it into `report`; returns the bare
/// and governed peaks.
fn evaluate(
    rig: &Rig,
    scenario: &Scenario,
    fraction: f64,
    case: &str,
    report: &mut SearchReport,
) -> (f64, f64) {
    let truth = truth_at(rig, fraction);
    let certified = f64::from(rig.params.certified_angle_deg);
    let mut peaks = (0.0, 0.0);
    for governed in [false, true] {
        let Ok(run) = run_loop(rig, scenario, governed, 0.0) else {
            continue;
        };
        let Ok((peak, sideways)) = simulate_peak(&truth, &run.profile, 20.0) else {
            continue;
        };
        let worst = if governed {
            peaks.1 = peak;
            if peak > certified {
                report.governed_exceedances += 1;
            }
            if run.fault_ticks > 0 {
                report.governed_faults += 1;
            }
            &mut report.governed
        } else {
            peaks.0 = peak;
            &mut report.bare
        };
        if peak > worst.peak_deg {
            *worst = Worst {
                peak_deg: peak,
                sideways_deg: sideways,
                case: case.to_string(),
            };
        }
    }
    report.runs += 1;
    peaks
}

/// The whole search on one ride.
#[must_use]
pub fn search(rig: &Rig, size: &SearchSize) -> SearchReport {
    let mut report = SearchReport::default();
    let mut rng = Rng::new(size.seed);
    let duration = f64::from(size.duration_s);
    let ceiling = f64::from(rig.ceiling_rad_s);
    for i in 0..size.random {
        let genome = Genome::random(&mut rng, duration);
        let fraction = rng.unit();
        let _ = evaluate(
            rig,
            &genome.scenario(ceiling, duration),
            fraction,
            &format!("random #{i}"),
            &mut report,
        );
    }
    for (m, period) in mode_periods(&rig.geometry, rig.ceiling_rad_s)
        .into_iter()
        .enumerate()
    {
        for detune in [0.9, 1.0, 1.1] {
            for (stop, fraction) in [(None, 0.5), (Some(0.7 * duration), 1.0), (None, 0.0)] {
                let scenario = pumping(ceiling, period * detune, duration, stop);
                let _ = evaluate(
                    rig,
                    &scenario,
                    fraction,
                    &format!(
                        "pumping mode {m} x{detune}{}",
                        if stop.is_some() { " + stop" } else { "" }
                    ),
                    &mut report,
                );
            }
        }
    }
    for restart in 0..size.restarts {
        for governed_objective in [false, true] {
            let mut best = Genome::random(&mut rng, duration);
            let fraction = rng.unit();
            let case = format!(
                "hill climb #{restart} ({})",
                if governed_objective {
                    "governed"
                } else {
                    "bare"
                }
            );
            let score = |p: (f64, f64)| if governed_objective { p.1 } else { p.0 };
            let mut best_score = score(evaluate(
                rig,
                &best.scenario(ceiling, duration),
                fraction,
                &case,
                &mut report,
            ));
            for _ in 0..size.steps {
                let trial = best.mutate(&mut rng);
                let s = score(evaluate(
                    rig,
                    &trial.scenario(ceiling, duration),
                    fraction,
                    &case,
                    &mut report,
                ));
                if s > best_score {
                    best = trial;
                    best_score = s;
                }
            }
        }
    }
    report
}

/// The tested rides: (name, hub offset m, length m, suspension, certified °).
/// Demo data except the first, which is the dynamic-protection study's ride.
pub const RIDES: [(&str, f32, f32, Suspension, f32); 6] = [
    ("study ride, chain", 4.0, 6.5, Suspension::Chain, 50.0),
    ("study ride, rod", 4.0, 6.5, Suspension::Rod, 50.0),
    ("demo ride, chain", 3.4, 5.8, Suspension::Chain, 45.0),
    ("demo ride, rod", 3.4, 5.8, Suspension::Rod, 45.0),
    ("long chains, small hub", 2.0, 8.0, Suspension::Chain, 55.0),
    ("long rods, small hub", 2.0, 8.0, Suspension::Rod, 55.0),
];
