//! The shape of a designed speed change: the shaft acceleration as a uniform
//! cubic B-spline.
//!
//! The duration `T` is cut into `N` equal spans of `h = T / N`. On span `i`
//! (`t = (i + u) h`, `u ∈ [0, 1]`) the acceleration is
//!
//! ```text
//! α(t) = Σ_{j=0..3} P_{i+j} b_j(u)
//! b0 = (1 − u)³/6,  b1 = (3u³ − 6u² + 4)/6,  b2 = (−3u³ + 3u² + 3u + 1)/6,  b3 = u³/6
//! ```
//!
//! with control points `P_0 … P_{N+2}`. The first three and the last three are
//! zero, so acceleration and jerk start and end at zero; the `N − 3` others are
//! the design variables. Why this shape:
//!
//! * **Limits become linear constraints.** A B-spline lies in the convex hull
//!   of its control points, so `−d ≤ P_k ≤ a` bounds the acceleration
//!   everywhere, and the jerk, itself a quadratic B-spline with control points
//!   `(P_{k+1} − P_k)/h`, is bounded everywhere by `|P_{k+1} − P_k| ≤ j h`
//!   (de Boor, *A Practical Guide to Splines*, 1978: convex hull and
//!   derivative of a B-spline).
//! * **The end speed is one linear equation.** Every free basis function lies
//!   wholly inside `[0, T]` and integrates to `h`, so `ω(T) = ω(0) + h Σ P_k`.
//! * **The speed is linear in the variables** at any time, so bounds on the
//!   speed (no overshoot past the target, no reversal) are linear too.

/// Integral of the four basis functions over a whole span, in units of `h`.
const SPAN_WEIGHTS: [f64; 4] = [1.0 / 24.0, 11.0 / 24.0, 11.0 / 24.0, 1.0 / 24.0];

/// Values of the four basis functions at `u`.
fn basis(u: f64) -> [f64; 4] {
    let v = 1.0 - u;
    let u2 = u * u;
    let u3 = u2 * u;
    [
        v * v * v / 6.0,
        (3.0 * u3 - 6.0 * u2 + 4.0) / 6.0,
        (-3.0 * u3 + 3.0 * u2 + 3.0 * u + 1.0) / 6.0,
        u3 / 6.0,
    ]
}

/// Derivatives of the basis functions with respect to `u`.
fn basis_slope(u: f64) -> [f64; 4] {
    let v = 1.0 - u;
    [
        -0.5 * v * v,
        1.5 * u * u - 2.0 * u,
        -1.5 * u * u + u + 0.5,
        0.5 * u * u,
    ]
}

/// Integrals of the basis functions from 0 to `u`, in units of `h`.
fn basis_integral(u: f64) -> [f64; 4] {
    let v = 1.0 - u;
    let u2 = u * u;
    let u3 = u2 * u;
    let u4 = u3 * u;
    [
        (1.0 - v * v * v * v) / 24.0,
        (0.75 * u4 - 2.0 * u3 + 4.0 * u) / 6.0,
        (-0.75 * u4 + u3 + 1.5 * u2 + u) / 6.0,
        u4 / 24.0,
    ]
}

/// A speed change `ω(0) → ω(T)` shaped by its acceleration spline.
#[derive(Debug, Clone, PartialEq)]
pub struct AccelSpline {
    start_speed_rad_s: f64,
    duration_s: f64,
    /// All `N + 3` control points, rad/s², the three at each end zero.
    control: Vec<f64>,
    /// Speed at the start of each span, rad/s (`N + 1` values).
    knot_speed: Vec<f64>,
}

impl AccelSpline {
    /// Spans for `free` design variables.
    #[must_use]
    pub const fn spans_for(free: usize) -> usize {
        free + 3
    }

    /// A spline from its free control points (`free.len() ≥ 1`), rad/s².
    #[must_use]
    pub fn new(start_speed_rad_s: f64, duration_s: f64, free: &[f64]) -> Self {
        let mut control = vec![0.0; free.len() + 6];
        for (c, f) in control.iter_mut().skip(3).zip(free) {
            *c = *f;
        }
        let spans = Self::spans_for(free.len());
        let h = duration_s / spans as f64;
        let mut knot_speed = Vec::with_capacity(spans + 1);
        let mut w = start_speed_rad_s;
        knot_speed.push(w);
        for window in control.windows(4) {
            w += h * window
                .iter()
                .zip(SPAN_WEIGHTS)
                .map(|(p, s)| p * s)
                .sum::<f64>();
            knot_speed.push(w);
        }
        Self {
            start_speed_rad_s,
            duration_s,
            control,
            knot_speed,
        }
    }

    /// Number of spans `N`.
    #[must_use]
    pub fn spans(&self) -> usize {
        self.control.len() - 3
    }

    /// Span length `h`, s.
    #[must_use]
    pub fn span_s(&self) -> f64 {
        self.duration_s / self.spans() as f64
    }

    /// Duration `T`, s.
    #[must_use]
    pub const fn duration_s(&self) -> f64 {
        self.duration_s
    }

    /// Speed at the start, rad/s.
    #[must_use]
    pub const fn start_speed_rad_s(&self) -> f64 {
        self.start_speed_rad_s
    }

    /// Speed at the end, rad/s.
    #[must_use]
    pub fn end_speed_rad_s(&self) -> f64 {
        self.knot_speed
            .last()
            .copied()
            .unwrap_or(self.start_speed_rad_s)
    }

    /// The free control points, rad/s².
    #[must_use]
    pub fn free(&self) -> &[f64] {
        let n = self.control.len();
        self.control.get(3..n - 3).unwrap_or(&[])
    }

    /// Span index and position in it for time `t` (clamped to `[0, T]`).
    fn locate(&self, t: f64) -> (usize, f64) {
        let spans = self.spans();
        let x = (t / self.span_s()).clamp(0.0, spans as f64);
        #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
        let i = (x.floor() as usize).min(spans - 1);
        (i, x - i as f64)
    }

    fn window(&self, i: usize) -> [f64; 4] {
        let mut p = [0.0; 4];
        if let Some(w) = self.control.get(i..i + 4) {
            p.copy_from_slice(w);
        }
        p
    }

    /// Speed ω (rad/s), acceleration α (rad/s²) and jerk (rad/s³) at `t`
    /// (held at the end values outside `[0, T]`).
    #[must_use]
    pub fn state_at(&self, t: f64) -> (f64, f64, f64) {
        if t <= 0.0 {
            return (self.start_speed_rad_s, 0.0, 0.0);
        }
        if t >= self.duration_s {
            return (self.end_speed_rad_s(), 0.0, 0.0);
        }
        let (i, u) = self.locate(t);
        let p = self.window(i);
        let h = self.span_s();
        let dot = |b: [f64; 4]| p.iter().zip(b).map(|(p, b)| p * b).sum::<f64>();
        let w0 = self.knot_speed.get(i).copied().unwrap_or(0.0);
        (
            w0 + h * dot(basis_integral(u)),
            dot(basis(u)),
            dot(basis_slope(u)) / h,
        )
    }

    /// The speed at `t` as `ω(0) + Σ_k g_k x_k` over the free variables `x`:
    /// returns the coefficients `g_k` (rad/s per rad/s²).
    #[must_use]
    pub fn speed_gradient(&self, t: f64) -> Vec<f64> {
        let free = self.free().len();
        let h = self.span_s();
        let mut g = vec![0.0; free];
        let t = t.clamp(0.0, self.duration_s);
        let (i, u) = self.locate(t);
        // Free variable k is control point k + 3, at position k + 3 − s in
        // the window of span s, for spans k..=k+3.
        for (k, gk) in g.iter_mut().enumerate() {
            if i > k + 3 {
                *gk = h;
            } else if i >= k {
                let passed: f64 = (k..i)
                    .map(|s| SPAN_WEIGHTS.get(k + 3 - s).copied().unwrap_or(0.0))
                    .sum();
                let now = basis_integral(u).get(k + 3 - i).copied().unwrap_or(0.0);
                *gk = h * (passed + now);
            }
        }
        g
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn basis_is_a_partition_of_unity_and_integrals_match() {
        // Hand calculation, common practice: uniform cubic B-spline basis sums to 1,
        // each basis function's span integrals are 1/24, 11/24, 11/24, 1/24.
        for k in 0..=10 {
            let u = f64::from(k) / 10.0;
            assert!((basis(u).iter().sum::<f64>() - 1.0).abs() < 1e-15);
            assert!(basis_slope(u).iter().sum::<f64>().abs() < 1e-15);
        }
        for (a, b) in basis_integral(1.0).iter().zip(SPAN_WEIGHTS) {
            assert!((a - b).abs() < 1e-15);
        }
    }

    #[test]
    fn end_speed_is_start_plus_h_times_the_sum_and_gradients_agree() {
        let free = [0.05, 0.08, 0.1, 0.07, 0.02, -0.01];
        let s = AccelSpline::new(0.3, 9.0, &free);
        let h = s.span_s();
        // Hand calculation, common practice: each free basis function integrates to h.
        let expected = 0.3 + h * free.iter().sum::<f64>();
        assert!((s.end_speed_rad_s() - expected).abs() < 1e-14);
        let (w_end, a_end, j_end) = s.state_at(9.0 - 1e-12);
        assert!((w_end - expected).abs() < 1e-12 && a_end.abs() < 1e-12 && j_end.abs() < 1e-9);
        // The speed is linear in the free variables: ω(t) = ω0 + g(t)·x.
        for k in 0..=90 {
            let t = f64::from(k) * 0.1;
            let g = s.speed_gradient(t);
            let lin = 0.3 + g.iter().zip(free).map(|(g, x)| g * x).sum::<f64>();
            assert!((lin - s.state_at(t).0).abs() < 1e-13, "t = {t}");
        }
        // Jerk is the derivative of acceleration (central difference, step 1e-6 s).
        for t in [0.7, 2.2, 4.9, 8.1] {
            let d = (s.state_at(t + 1e-6).1 - s.state_at(t - 1e-6).1) / 2e-6;
            assert!((d - s.state_at(t).2).abs() < 1e-6);
        }
    }
}
