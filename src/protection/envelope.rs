//! The swing envelope of one seat length: how much swing energy the
//! certified cone holds at each shaft speed, and how fast a speed change can
//! at most pump swing energy in. Built once, at construction; the per-tick
//! certificate only reads it.
//!
//! Quantities per unit mass and per L² (1/s²), as in [`SeatModel::jacobi`],
//! with a = r0/L, b = g/L, φc the certified angle and c = a + sin φc:
//!
//! * effective potential V(q, ω) = −b cos φ − ½ ω² ρ², ρ the seat's distance
//!   from the shaft axis over L;
//! * Jacobi integral E = T + V (T the kinetic energy in the turning frame),
//!   conserved at constant speed;
//! * on the cone φ = φc the potential is smallest straight outward:
//!   E_adm(ω) = −b cos φc − ½ ω² c². A seat with E < E_adm(ω) cannot be on the
//!   cone, so (by continuity) it stays inside;
//! * inside the cone the potential is smallest at the steady state:
//!   V_eq(ω) = −b cos θs − ½ ω² (a + sin θs)²;
//! * swing energy S = E − V_eq(ω) ≥ 0 and room T_cap(ω) = E_adm(ω) − V_eq(ω):
//!   the seat stays inside the cone while S < T_cap;
//! * while the speed changes, dS/dt = −α ω (ρ² − ρs²) − α h_rel with
//!   |ρ² − ρs²| ≤ K(ω) √S and |h_rel| ≤ c √(2S), so
//!   d√S/dt ≤ ½ |α| G(ω), G = |ω| K + c √2 (chains; rods have h_rel = 0).
//!
//! The derivation is in docs/dynamic_protection.md.

use crate::error::ParamError;
use crate::geometry::{RideGeometry, Suspension};
use crate::math::{larger, smaller};
use crate::seat_model::{SeatModel, SeatState};
use crate::units::Angle;

/// Cells of the speed grid: cell i spans the speeds whose squares lie
/// between i/N and (i+1)/N of the top speed's square (uniform in ω², so a
/// speed's cell is found by one multiplication, and the cells are narrowest
/// near the top, where the steady angle is most sensitive to the speed).
pub const CELLS: usize = 32;

/// Sample intervals over the cone for the bound K (polar × azimuthal).
pub const K_POLAR: usize = 16;
/// See [`K_POLAR`].
pub const K_AZIMUTH: usize = 8;
/// K is sampled at every `K_STRIDE`-th grid speed; a cell takes the larger of
/// the two samples around it.
pub const K_STRIDE: usize = 2;

/// Factor on the sampled K: the sup is taken over a finite sample, so the
/// value between samples is covered by this allowance (checked against a
/// ten times finer sample in the tests).
pub const K_ALLOWANCE: f32 = 1.25;

/// The precomputed envelope of one seat length.
#[derive(Debug, Clone, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SwingEnvelope {
    model: SeatModel,
    /// Speed at which the steady angle is the certified angle, rad/s.
    top_rad_s: f32,
    /// Grid speeds g_i = top·√(i/N), g_0 = 0 < g_1 < … < g_N = top.
    speeds: [f32; CELLS + 1],
    /// N / top²: the cell of ω is ⌊ω² · this⌋ (corrected by one comparison
    /// with the grid for rounding).
    cell_scale: f32,
    /// V_eq at the grid speeds g_0 … g_N.
    v_eq: [f32; CELLS + 1],
    /// dV_eq/dω = −ω ρs² at the grid speeds (envelope theorem).
    v_eq_slope: [f32; CELLS + 1],
    /// b cos φc and ½ c²: E_adm(ω) = −b cos φc − ½ c² ω².
    cone: (f32, f32),
    /// Lower bound of √T_cap over cell i (its value at the cell's upper end).
    room: [f32; CELLS],
    /// Upper bound of ½ G over cell i.
    growth: [f32; CELLS],
    /// ∫₀^{g_i} ½ G dω with the cell bounds (non-decreasing).
    cumulative: [f32; CELLS + 1],
}

/// Value at `i`, or `fallback` (never taken: every index below is in range by
/// construction; the fallback keeps the code free of panics).
fn at<const N: usize>(table: &[f32; N], i: usize, fallback: f32) -> f32 {
    table.get(i).copied().unwrap_or(fallback)
}

impl SwingEnvelope {
    /// The envelope of `geometry` (its length is the model's length) for the
    /// certified angle `certified`.
    ///
    /// Work is bounded: N steady solves (angle for speed) and
    /// (N/K_STRIDE + 1)·(K_POLAR + 1)·(K_AZIMUTH + 1) potential evaluations.
    ///
    /// # Errors
    /// [`ParamError`] naming `certified_angle_deg` when the angle is not in
    /// (0°, 85°].
    pub fn new(geometry: &RideGeometry, certified: Angle) -> Result<Self, ParamError> {
        Self::build(geometry, certified, None)
    }

    /// The envelope of `geometry` on a grid that ends at `grid_top` (rad/s),
    /// at most the speed whose steady angle is the certified angle (so that
    /// several lengths share one grid: the lowest top of them). Speeds at or
    /// above `grid_top` get no room.
    ///
    /// # Errors
    /// As [`new`](Self::new); `certified_angle_deg` also when `grid_top` is
    /// not in (0, top].
    pub fn with_grid_top(
        geometry: &RideGeometry,
        certified: Angle,
        grid_top: f32,
    ) -> Result<Self, ParamError> {
        Self::build(geometry, certified, Some(grid_top))
    }

    fn build(
        geometry: &RideGeometry,
        certified: Angle,
        grid_top: Option<f32>,
    ) -> Result<Self, ParamError> {
        let phi_c = certified.rad();
        if !phi_c.is_finite() {
            return Err(ParamError::NonFinite("certified_angle_deg"));
        }
        if phi_c <= 0.0 || phi_c > 85.0_f32.to_radians() {
            return Err(ParamError::OutOfRange("certified_angle_deg"));
        }
        let model = SeatModel::new(geometry, 0.0)?;
        let l = geometry.length_m();
        let a = geometry.hub_offset_m() / l;
        let b = geometry.gravity().mps2() / l;
        let (s_c, c_c) = crate::math::sin_cos(phi_c);
        let c = a + s_c;
        let chain = geometry.suspension() == Suspension::Chain;

        let mut speeds = [0.0_f32; CELLS + 1];
        let mut v_eq = [0.0_f32; CELLS + 1];
        let mut v_eq_slope = [0.0_f32; CELLS + 1];
        let mut k_at = [0.0_f32; CELLS + 1];
        let mut t_cap = [0.0_f32; CELLS + 1];
        let top_rad_s = geometry
            .speed_for_angle(certified)
            .map_err(|_| ParamError::OutOfRange("certified_angle_deg"))?
            .rad_per_s();
        if !(top_rad_s > 0.0 && top_rad_s.is_finite()) {
            return Err(ParamError::OutOfRange("certified_angle_deg"));
        }
        let own_top = top_rad_s;
        let top_rad_s = match grid_top {
            Some(t) if t > 0.0 && t <= own_top => t,
            Some(_) => return Err(ParamError::OutOfRange("certified_angle_deg")),
            None => own_top,
        };
        let mut i = 0;
        while i <= CELLS {
            #[allow(clippy::cast_precision_loss)]
            let w = if i == CELLS {
                top_rad_s
            } else {
                top_rad_s * crate::math::sqrt(i as f32 / CELLS as f32)
            };
            // The steady angle at the grid speed (a solve; exact at the top).
            let theta = if i == CELLS && top_rad_s == own_top {
                phi_c
            } else {
                geometry
                    .angle_for_speed(crate::units::AngularSpeed::from_rad_per_s(w))
                    .map_err(|_| ParamError::OutOfRange("certified_angle_deg"))?
                    .rad()
            };
            let (st, ct) = crate::math::sin_cos(theta);
            let rho_s2 = (a + st) * (a + st);
            let v = -b * ct - 0.5 * w * w * rho_s2;
            if let (Some(g), Some(ve), Some(d), Some(t)) = (
                speeds.get_mut(i),
                v_eq.get_mut(i),
                v_eq_slope.get_mut(i),
                t_cap.get_mut(i),
            ) {
                *g = w;
                *ve = v;
                *d = -w * rho_s2;
                *t = (-b * c_c - 0.5 * w * w * c * c - v).max(0.0);
            }
            if i % K_STRIDE == 0 || i == CELLS {
                if let Some(k) = k_at.get_mut(i) {
                    *k = sampled_k_with(a, b, w, phi_c, v, rho_s2, chain, K_POLAR, K_AZIMUTH);
                }
            }
            i += 1;
        }
        let mut room = [0.0_f32; CELLS];
        let mut growth = [0.0_f32; CELLS];
        let mut cumulative = [0.0_f32; CELLS + 1];
        let mut sum = 0.0_f32;
        for i in 0..CELLS {
            let lower = at(&speeds, i, 0.0);
            let upper = at(&speeds, i + 1, 0.0);
            let below = i - i % K_STRIDE;
            let above = (below + K_STRIDE).min(CELLS);
            let k = K_ALLOWANCE * at(&k_at, below, 0.0).max(at(&k_at, above, 0.0));
            let h_rel = if chain {
                c * core::f32::consts::SQRT_2
            } else {
                0.0
            };
            let half_g = 0.5 * (upper * k + h_rel);
            if let Some(r) = room.get_mut(i) {
                *r = crate::math::sqrt(at(&t_cap, i + 1, 0.0));
            }
            if let Some(g) = growth.get_mut(i) {
                *g = half_g;
            }
            if let Some(cu) = cumulative.get_mut(i) {
                *cu = sum;
            }
            sum += half_g * (upper - lower);
        }
        if let Some(cu) = cumulative.get_mut(CELLS) {
            *cu = sum;
        }
        Ok(Self {
            model,
            top_rad_s,
            speeds,
            cell_scale: CELLS as f32 / (top_rad_s * top_rad_s),
            v_eq,
            v_eq_slope,
            cone: (b * c_c, 0.5 * c * c),
            room,
            growth,
            cumulative,
        })
    }

    /// The grid speeds g_0 … g_N, rad/s.
    pub(crate) const fn grid(&self) -> &[f32; CELLS + 1] {
        &self.speeds
    }

    /// V_eq at the grid speeds, 1/s².
    pub(crate) const fn v_eq_grid(&self) -> &[f32; CELLS + 1] {
        &self.v_eq
    }

    /// dV_eq/dω at the grid speeds, 1/s.
    pub(crate) const fn v_eq_slope_grid(&self) -> &[f32; CELLS + 1] {
        &self.v_eq_slope
    }

    /// b cos φc and ½ c²: E_adm(ω) = −b cos φc − ½ c² ω².
    pub(crate) const fn cone(&self) -> (f32, f32) {
        self.cone
    }

    /// Per cell, √T_cap at its upper end (the least room over the cell), 1/s.
    pub(crate) const fn room_cells(&self) -> &[f32; CELLS] {
        &self.room
    }

    /// Per cell, the bound on ½ G, 1/s per rad/s.
    pub(crate) const fn growth_cells(&self) -> &[f32; CELLS] {
        &self.growth
    }

    /// The seat model of this length (undamped).
    #[must_use]
    pub const fn model(&self) -> &SeatModel {
        &self.model
    }

    /// The top of the grid, rad/s: the speed whose steady angle is the
    /// certified angle, or the lower `grid_top` of
    /// [`with_grid_top`](Self::with_grid_top).
    #[must_use]
    pub const fn top_rad_s(&self) -> f32 {
        self.top_rad_s
    }

    /// Cell holding speed magnitude `w` (`None` at or above the top speed,
    /// or not finite): ⌊ω² N / top²⌋, then one comparison with the grid each
    /// way, so that g_i ≤ w < g_{i+1} holds whatever the rounding.
    fn cell(&self, w: f32) -> Option<usize> {
        if !(w >= 0.0 && w < self.top_rad_s) {
            return None;
        }
        // `as` saturates; w < top keeps the product below N up to rounding.
        #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
        let mut i = ((w * w * self.cell_scale) as usize).min(CELLS - 1);
        if w < at(&self.speeds, i, 0.0) {
            i = i.saturating_sub(1);
        } else if i + 1 < CELLS && w >= at(&self.speeds, i + 1, 0.0) {
            i += 1;
        }
        Some(i)
    }

    /// A lower bound of V_eq at speed magnitude `w`: the chord between grid
    /// points, which lies below V_eq because V_eq is concave in ω (the
    /// minimum over q of V(q, ω), each concave in ω), so that E − chord is an
    /// upper bound of the swing energy.
    fn v_eq_chord(&self, w: f32) -> f32 {
        match self.cell(w) {
            Some(i) => {
                let (g0, g1) = (at(&self.speeds, i, 0.0), at(&self.speeds, i + 1, 0.0));
                let (v0, v1) = (at(&self.v_eq, i, 0.0), at(&self.v_eq, i + 1, 0.0));
                v0 + (v1 - v0) * (w - g0) / (g1 - g0)
            }
            None => at(&self.v_eq, CELLS, 0.0),
        }
    }

    /// Upper bound of the swing energy S = E − V_eq(ω) of `state` at speed
    /// `w` (rad/s, either sign), 1/s². Not finite when an input is not.
    #[must_use]
    pub fn swing_energy(&self, state: &SeatState, w: f32) -> f32 {
        let w = libm::fabsf(w);
        self.swing_energy_from_jacobi(self.model.jacobi(state, w), w)
    }

    /// As [`swing_energy`](Self::swing_energy), from the Jacobi integral
    /// `jacobi` of the state at speed `w` (the estimator's vector form
    /// computes it without trigonometry).
    #[must_use]
    pub fn swing_energy_from_jacobi(&self, jacobi: f32, w: f32) -> f32 {
        let s = jacobi - self.v_eq_chord(libm::fabsf(w));
        // NaN stays NaN (the caller's certificate then fails).
        if s > 0.0 || s.is_nan() {
            s
        } else {
            0.0
        }
    }

    /// Lower bound of √T_cap at speed magnitude `w` (0 at or above the top):
    /// E_adm in closed form minus an upper bound of V_eq, the lower of the
    /// two tangents at the cell's ends (V_eq is concave, so every tangent
    /// lies above it).
    #[must_use]
    pub fn room(&self, w: f32) -> f32 {
        let Some(i) = self.cell(w) else {
            return 0.0;
        };
        let (g0, g1) = (at(&self.speeds, i, 0.0), at(&self.speeds, i + 1, 0.0));
        let t0 = at(&self.v_eq, i, 0.0) + at(&self.v_eq_slope, i, 0.0) * (w - g0);
        let t1 = at(&self.v_eq, i + 1, 0.0) + at(&self.v_eq_slope, i + 1, 0.0) * (w - g1);
        let e_adm = -self.cone.0 - self.cone.1 * w * w;
        let t_cap = e_adm - smaller(t0, t1);
        // Never below the cell's guaranteed value.
        larger(
            crate::math::sqrt(larger(t_cap, 0.0)),
            at(&self.room, i, 0.0),
        )
    }

    /// ∫₀^w ½ G dω with the cell bounds: the most √S can grow while the speed
    /// magnitude travels from 0 to `w` (extended linearly above the top).
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

    /// Smallest slack along a move down from speed magnitude `hi` to `lo`
    /// (`lo` ≤ `hi`), when √S has reached `start` at `hi`: at each ω on the
    /// way √S ≤ start + growth_to(hi) − growth_to(ω) must stay below the room
    /// at ω + `u`. Checked cell by cell with the cell's bounds (the growth
    /// counted from the cell's lower end, the room read at its upper end);
    /// bounded by [`CELLS`] iterations.
    #[must_use]
    pub fn down_slack(&self, start: f32, lo: f32, hi: f32, u: f32) -> f32 {
        let top_g = self.growth_to(hi);
        let first = self.cell(lo).unwrap_or(CELLS);
        let last = self.cell(hi).unwrap_or(CELLS);
        let mut slack = f32::INFINITY;
        if last == CELLS {
            // The piece starts at or above the top: no room there.
            slack = -start;
        }
        let mut i = first;
        while i <= last && i < CELLS {
            let low = larger(at(&self.speeds, i, 0.0), lo);
            let high = smaller(at(&self.speeds, i + 1, 0.0), hi);
            let grown = start + top_g - self.growth_to(low);
            slack = smaller(slack, self.room(high + u) - grown);
            i += 1;
        }
        slack
    }

    /// Largest ½ G over the cells, 1/s per rad/s.
    #[must_use]
    pub fn steepest_growth(&self) -> f32 {
        self.growth.iter().copied().fold(0.0, f32::max)
    }

    /// The sampled bound K at grid point `i` (for tests and docs).
    #[must_use]
    pub fn growth_per_rad_s(&self, i: usize) -> Option<f32> {
        self.growth.get(i).copied()
    }

    /// Grid speed `i` (0 ≤ i ≤ N), rad/s.
    #[must_use]
    pub fn grid_speed(&self, i: usize) -> f32 {
        at(&self.speeds, i.min(CELLS), 0.0)
    }
}

/// Most azimuth intervals [`sampled_k_with`] takes (its table of cos β lives on
/// the stack of the envelope's construction: kept small for a 16 KiB Cortex-M0).
pub const MAX_AZIMUTH: usize = 128;

/// Largest |ρ² − ρs²| / √(V − V_eq) over a sample of the cone φ ≤ φc
/// (outward half; the potential is symmetric in the azimuth), at speed `w`,
/// on `polar` × `azimuth` intervals (rods: the radial plane only). `v_eq` and
/// `rho_s2` are the potential and ρ² of the steady state at `w`.
#[allow(clippy::too_many_arguments)]
#[must_use]
pub fn sampled_k_with(
    a: f32,
    b: f32,
    w: f32,
    phi_c: f32,
    v_eq: f32,
    rho_s2: f32,
    chain: bool,
    polar: usize,
    azimuth: usize,
) -> f32 {
    let mut k = 0.0_f32;
    let azimuths = if chain {
        azimuth.clamp(1, MAX_AZIMUTH)
    } else {
        1
    };
    // cos β for every azimuth, computed once (no trigonometry in the inner loop).
    let mut cos_beta = [0.0_f32; MAX_AZIMUTH + 1];
    for (m, cb) in cos_beta.iter_mut().enumerate().take(azimuths + 1) {
        #[allow(clippy::cast_precision_loss)]
        let beta = core::f32::consts::PI * m as f32 / azimuths as f32;
        *cb = crate::math::sin_cos(beta).1;
    }
    let polar = polar.max(1);
    let mut p = 0;
    while p <= polar {
        #[allow(clippy::cast_precision_loss)]
        let phi = phi_c * p as f32 / polar as f32;
        let (sp, cp) = crate::math::sin_cos(phi);
        for &cb in cos_beta.iter().take(azimuths + 1) {
            let rho2 = a * a + 2.0 * a * sp * cb + sp * sp;
            let v = -b * cp - 0.5 * w * w * rho2;
            let dv = v - v_eq;
            if dv > 1.0e-5 {
                k = k.max(libm::fabsf(rho2 - rho_s2) / crate::math::sqrt(dv));
            }
        }
        p += 1;
    }
    k
}
