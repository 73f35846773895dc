//! The envelope of the whole length band: the three lengths' envelopes on one
//! grid, folded into the least room and the largest growth per cell, so that
//! the per-tick certificate walks one path instead of three.
//!
//! Soundness (docs/dynamic_protection.md, Step 5): for every length ℓ of the
//! band, √S_ℓ ≤ max_ℓ √S_ℓ, ½G_ℓ ≤ max_ℓ ½G_ℓ and √T_cap,ℓ ≥ min_ℓ √T_cap,ℓ,
//! so a path the folded tables certify is certified for each length. The room
//! at a speed is the least over the lengths of each length's tangent bound
//! (as [`SwingEnvelope::room`]), never below the cell's floor: the least room
//! at the cell's upper end (T_cap falls with the speed, dT_cap/dω =
//! −ω (c² − ρs²) ≤ 0, as ρs = a + sin θs ≤ c below the top).

use crate::math::{larger, least, smaller};

use super::envelope::{SwingEnvelope, CELLS};
use super::estimator::LENGTH_MODELS;

/// Value at `i`, or `fallback` (never taken: the indices are in range by
/// construction; the fallback keeps the code free of panics).
fn at<const N: usize>(table: &[f32; N], i: usize, fallback: f32) -> f32 {
    table.get(i).copied().unwrap_or(fallback)
}

/// (V_eq, dV_eq/dω) of each length at one grid speed.
type Row = [(f32, f32); LENGTH_MODELS];

/// The folded envelope of the length band (see the module documentation).
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BandEnvelope {
    /// Top of the common grid (the lowest top of the lengths), rad/s.
    top_rad_s: f32,
    /// N / top² (see [`SwingEnvelope`]'s grid).
    cell_scale: f32,
    /// Grid speeds g_i = top·√(i/N), rad/s.
    speeds: [f32; CELLS + 1],
    /// Per grid speed, per length, (V_eq, dV_eq/dω) there: the chords of V_eq
    /// bound it from below, its tangents from above. Stored by grid speed so
    /// that one cell's values of all lengths lie together (fewer address
    /// computations per look-up on the target).
    tangents: [[(f32, f32); LENGTH_MODELS]; CELLS + 1],
    /// Per length, (b cos φc, ½ c²): E_adm(ω) = −b cos φc − ½ c² ω².
    cone: [(f32, f32); LENGTH_MODELS],
    /// Per cell, the least room over the lengths at the cell's upper end, 1/s
    /// (a floor under [`room`](Self::room) within the cell).
    room: [f32; CELLS],
    /// Per cell, the largest ½ G over the lengths, 1/s per rad/s.
    growth: [f32; CELLS],
    /// ∫₀^{g_i} ½ G dω with the folded cell bounds.
    cumulative: [f32; CELLS + 1],
    /// Speed uncertainty the down terms are made for, rad/s.
    u: f32,
    /// Per cell i: room(g_{i+1} + u) + growth_to(g_i) (a down move's term).
    down: [f32; CELLS],
}

impl BandEnvelope {
    /// Folds `envelopes` (built on one grid by
    /// [`SwingEnvelope::with_grid_top`] with the same top) for the speed
    /// uncertainty `u` (rad/s).
    #[must_use]
    pub fn new(envelopes: &[SwingEnvelope; LENGTH_MODELS], u: f32) -> Self {
        let mut band = Self::empty();
        for (slot, e) in envelopes.iter().enumerate() {
            band.fold(slot, e);
        }
        band.finish(u);
        band
    }

    /// All zeros: fold the lengths in with [`fold`](Self::fold) (slot 0
    /// first), then call [`finish`](Self::finish). Filled in place, one
    /// envelope at a time, to keep the construction's stack small (a 16 KiB
    /// Cortex-M0).
    pub(crate) const fn empty() -> Self {
        Self {
            top_rad_s: 0.0,
            cell_scale: 0.0,
            speeds: [0.0; CELLS + 1],
            tangents: [[(0.0, 0.0); LENGTH_MODELS]; CELLS + 1],
            cone: [(0.0, 0.0); LENGTH_MODELS],
            room: [0.0; CELLS],
            growth: [0.0; CELLS],
            cumulative: [0.0; CELLS + 1],
            u: 0.0,
            down: [0.0; CELLS],
        }
    }

    /// Folds length `slot` in: its V_eq and tangents, the least room and the
    /// largest growth per cell (slot 0 sets the grid; every envelope must be on
    /// the same grid).
    pub(crate) fn fold(&mut self, slot: usize, envelope: &SwingEnvelope) {
        if slot == 0 {
            self.speeds = *envelope.grid();
            self.top_rad_s = at(&self.speeds, CELLS, 0.0);
            #[allow(clippy::cast_precision_loss)]
            let scale = CELLS as f32 / (self.top_rad_s * self.top_rad_s);
            self.cell_scale = scale;
            self.room = *envelope.room_cells();
            self.growth = *envelope.growth_cells();
        }
        if let Some(c) = self.cone.get_mut(slot) {
            *c = envelope.cone();
        }
        for ((row, &v), &d) in self
            .tangents
            .iter_mut()
            .zip(envelope.v_eq_grid().iter())
            .zip(envelope.v_eq_slope_grid().iter())
        {
            if let Some(t) = row.get_mut(slot) {
                *t = (v, d);
            }
        }
        for ((r, g), (&er, &eg)) in self.room.iter_mut().zip(self.growth.iter_mut()).zip(
            envelope
                .room_cells()
                .iter()
                .zip(envelope.growth_cells().iter()),
        ) {
            *r = smaller(*r, er);
            // A NaN growth must not be skipped: it makes every bound fail.
            *g = if eg > *g || eg.is_nan() { eg } else { *g };
        }
    }

    /// The growth integral and the down-move terms for the speed uncertainty
    /// `u` (rad/s), after the last [`fold`](Self::fold).
    pub(crate) fn finish(&mut self, u: f32) {
        let mut sum = 0.0_f32;
        for (i, cu) in self.cumulative.iter_mut().enumerate() {
            *cu = sum;
            sum += at(&self.growth, i, 0.0)
                * (at(&self.speeds, i + 1, 0.0) - at(&self.speeds, i, 0.0));
        }
        self.u = u;
        let mut down = [0.0_f32; CELLS];
        for (i, d) in down.iter_mut().enumerate() {
            *d = self.room(at(&self.speeds, i + 1, 0.0) + u)
                + self.growth_to(at(&self.speeds, i, 0.0));
        }
        self.down = down;
    }

    /// Top of the common grid, rad/s.
    #[must_use]
    pub const fn top_rad_s(&self) -> f32 {
        self.top_rad_s
    }

    /// The speed uncertainty the down terms were made for, rad/s.
    #[must_use]
    pub const fn speed_uncertainty_rad_s(&self) -> f32 {
        self.u
    }

    /// The (V_eq, dV_eq/dω) of the lengths at grid speeds `i` and `i + 1`
    /// (zeros past the end, never taken: the cells are in range by
    /// construction; the fallback keeps the code free of panics).
    fn rows(&self, i: usize) -> (&Row, &Row) {
        const ZERO: Row = [(0.0, 0.0); LENGTH_MODELS];
        (
            self.tangents.get(i).unwrap_or(&ZERO),
            self.tangents.get(i + 1).unwrap_or(&ZERO),
        )
    }

    /// Cell of speed magnitude `w` (`None` at or above the top or not finite):
    /// ⌊ω² N / top²⌋ corrected by one comparison each way.
    fn cell(&self, w: f32) -> Option<usize> {
        if !(w >= 0.0 && w < self.top_rad_s) {
            return None;
        }
        #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
        let mut i = ((w * w * self.cell_scale) as usize).min(CELLS - 1);
        if w < at(&self.speeds, i, 0.0) {
            i = i.saturating_sub(1);
        } else if i + 1 < CELLS && w >= at(&self.speeds, i + 1, 0.0) {
            i += 1;
        }
        Some(i)
    }

    /// The bounds √S of the three lengths, from each length's Jacobi
    /// integral `jacobi` at speed `w` (either sign): √max(0, E_ℓ − chord_ℓ(|w|)),
    /// with one cell look-up. NaN where an input is.
    #[must_use]
    pub fn swings(&self, jacobi: &[f32; LENGTH_MODELS], w: f32) -> [f32; LENGTH_MODELS] {
        let w = libm::fabsf(w);
        let cell = self.cell(w);
        let (i, t) = match cell {
            Some(i) => {
                let (g0, g1) = (at(&self.speeds, i, 0.0), at(&self.speeds, i + 1, 0.0));
                (i, (w - g0) / (g1 - g0))
            }
            // At or above the top (or NaN): the chord's value at the top.
            None => (CELLS - 1, if w.is_nan() { w } else { 1.0 }),
        };
        let (r0, r1) = self.rows(i);
        let mut out = [0.0_f32; LENGTH_MODELS];
        for ((o, (&(v0, _), &(v1, _))), &e) in out
            .iter_mut()
            .zip(r0.iter().zip(r1.iter()))
            .zip(jacobi.iter())
        {
            let d = e - (v0 + (v1 - v0) * t);
            // NaN stays NaN (the certificate then fails).
            *o = crate::math::sqrt(if d > 0.0 || d.is_nan() { d } else { 0.0 });
        }
        out
    }

    /// The largest of [`swings`](Self::swings), NaN when one is.
    #[must_use]
    pub fn swing(&self, jacobi: &[f32; LENGTH_MODELS], w: f32) -> f32 {
        let [a, b, c] = self.swings(jacobi, w);
        if a.is_nan() || b.is_nan() || c.is_nan() {
            f32::NAN
        } else {
            larger(a, larger(b, c))
        }
    }

    /// min over the lengths of (room_ℓ(w) − `swings`_ℓ), 1/s: each length's
    /// tangent bound of its room paired with its own swing bound (tighter than
    /// the least room minus the largest swing). −`swings` at or above the top.
    #[must_use]
    pub fn room_less(&self, w: f32, swings: &[f32; LENGTH_MODELS]) -> f32 {
        let Some(i) = self.cell(w) else {
            let [a, b, c] = *swings;
            return least(-a, least(-b, -c));
        };
        let (d0, d1) = (
            w - at(&self.speeds, i, 0.0),
            w - at(&self.speeds, i + 1, 0.0),
        );
        let (r0, r1) = self.rows(i);
        let mut slack = f32::INFINITY;
        for ((&(v0, s0), &(v1, s1)), (&(c0, c1), &s)) in r0
            .iter()
            .zip(r1.iter())
            .zip(self.cone.iter().zip(swings.iter()))
        {
            let t0 = v0 + s0 * d0;
            let t1 = v1 + s1 * d1;
            let e_adm = -c0 - c1 * w * w;
            let room = crate::math::sqrt(larger(e_adm - smaller(t0, t1), 0.0));
            slack = least(slack, room - s);
        }
        slack
    }

    /// The least room over the lengths at speed magnitude `w`, a lower bound
    /// of every length's √T_cap(w) (0 at or above the top), 1/s: per length
    /// E_adm in closed form minus the lower of the two tangents of V_eq at the
    /// cell's ends (V_eq is concave, so each tangent lies above it), the least
    /// of the three, never below the cell's floor; one square root.
    #[must_use]
    pub fn room(&self, w: f32) -> f32 {
        let Some(i) = self.cell(w) else {
            return 0.0;
        };
        let (d0, d1) = (
            w - at(&self.speeds, i, 0.0),
            w - at(&self.speeds, i + 1, 0.0),
        );
        let (r0, r1) = self.rows(i);
        let mut t_cap = f32::INFINITY;
        for ((&(v0, s0), &(v1, s1)), &(c0, c1)) in r0.iter().zip(r1.iter()).zip(self.cone.iter()) {
            let t0 = v0 + s0 * d0;
            let t1 = v1 + s1 * d1;
            // Same operations, in the same order, as SwingEnvelope::room.
            let e_adm = -c0 - c1 * w * w;
            t_cap = smaller(t_cap, e_adm - smaller(t0, t1));
        }
        larger(
            crate::math::sqrt(larger(t_cap, 0.0)),
            at(&self.room, i, 0.0),
        )
    }

    /// ∫₀^w ½ G dω with the folded cell bounds (extended linearly above the top).
    #[must_use]
    pub fn growth_to(&self, w: f32) -> f32 {
        match self.cell(w) {
            Some(i) => {
                at(&self.cumulative, i, 0.0)
                    + at(&self.growth, i, 0.0) * (w - at(&self.speeds, i, 0.0))
            }
            None => {
                at(&self.cumulative, CELLS, 0.0)
                    + at(&self.growth, CELLS - 1, 0.0) * larger(w - self.top_rad_s, 0.0)
            }
        }
    }

    /// Largest ½ G over the cells, 1/s per rad/s.
    #[must_use]
    pub fn steepest_growth(&self) -> f32 {
        self.growth.iter().copied().fold(0.0, larger)
    }

    /// Smallest slack along a move down from speed magnitude `hi` to `lo`
    /// when √S has reached `start` at `hi` (as [`SwingEnvelope::down_slack`]):
    /// the end cells directly, the whole cells between by a scan of their
    /// precomputed terms (at most [`CELLS`] comparisons).
    #[must_use]
    pub fn down_slack(&self, start: f32, lo: f32, hi: f32) -> f32 {
        let u = self.u;
        let top_g = self.growth_to(hi);
        let first = self.cell(lo).unwrap_or(CELLS);
        let last = self.cell(hi).unwrap_or(CELLS);
        // The piece starts at or above the top: no room there.
        let mut slack = if last == CELLS { -start } else { f32::INFINITY };
        let end_cell = |i: usize| {
            let low = larger(at(&self.speeds, i, 0.0), lo);
            let high = smaller(at(&self.speeds, i + 1, 0.0), hi);
            self.room(high + u) - (start + top_g - self.growth_to(low))
        };
        if first < CELLS {
            slack = least(slack, end_cell(first));
        }
        if last < CELLS && last > first {
            slack = least(slack, end_cell(last));
        }
        let mut m = f32::INFINITY;
        for &t in self.down.get(first + 1..last).unwrap_or(&[]) {
            m = least(m, t);
        }
        least(slack, m - start - top_g)
    }

    /// As [`down_slack`](Self::down_slack) with the present swing bounds of
    /// the lengths kept apart: `start` is the growth so far (without the
    /// present swing), the end cells pair each length's room with its own
    /// swing ([`room_less`](Self::room_less)), the whole cells between take the
    /// folded terms less the largest swing (a lower bound of the same).
    #[must_use]
    pub fn down_slack_paired(
        &self,
        swings: &[f32; LENGTH_MODELS],
        start: f32,
        lo: f32,
        hi: f32,
    ) -> f32 {
        let u = self.u;
        let [a, b, c] = *swings;
        let largest = larger(a, larger(b, c));
        let top_g = self.growth_to(hi);
        let first = self.cell(lo).unwrap_or(CELLS);
        let last = self.cell(hi).unwrap_or(CELLS);
        let mut slack = if last == CELLS {
            -(start + largest)
        } else {
            f32::INFINITY
        };
        let end_cell = |i: usize| {
            let low = larger(at(&self.speeds, i, 0.0), lo);
            let high = smaller(at(&self.speeds, i + 1, 0.0), hi);
            self.room_less(high + u, swings) - (start + top_g - self.growth_to(low))
        };
        if first < CELLS {
            slack = least(slack, end_cell(first));
        }
        if last < CELLS && last > first {
            slack = least(slack, end_cell(last));
        }
        let mut m = f32::INFINITY;
        for &t in self.down.get(first + 1..last).unwrap_or(&[]) {
            m = least(m, t);
        }
        least(slack, m - largest - start - top_g)
    }

    /// The same as [`down_slack`](Self::down_slack), cell by cell (the
    /// reference the tests compare the table with).
    #[must_use]
    pub fn down_slack_by_cells(&self, start: f32, lo: f32, hi: f32) -> f32 {
        let top_g = self.growth_to(hi);
        let first = self.cell(lo).unwrap_or(CELLS);
        let last = self.cell(hi).unwrap_or(CELLS);
        let mut slack = if last == CELLS { -start } else { f32::INFINITY };
        let mut i = first;
        while i <= last && i < CELLS {
            let low = larger(at(&self.speeds, i, 0.0), lo);
            let high = smaller(at(&self.speeds, i + 1, 0.0), hi);
            let grown = start + top_g - self.growth_to(low);
            slack = least(slack, self.room(high + self.u) - grown);
            i += 1;
        }
        slack
    }
}
