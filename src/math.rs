//! f32 kernels for the target: square root and sine/cosine.
//!
//! Two of `libm`'s routines are slow where this crate runs. `sqrtf` is a
//! software routine on Arm (`core` has no stable float square root), although
//! the Cortex-M4F has a one-instruction `vsqrt.f32`; and `sinf`/`cosf` evaluate
//! their kernels in f64, which a single-precision FPU must emulate in software
//! (about a thousand instructions per call). Here the square root uses the
//! hardware instruction where there is one, and sine/cosine use the classic
//! single-precision Cephes kernels, all in f32.

/// Square root, correctly rounded (IEEE 754), so bit-identical on every core.
#[inline]
pub fn sqrt(x: f32) -> f32 {
    #[cfg(all(target_arch = "arm", target_abi = "eabihf"))]
    {
        hardware::sqrt(x)
    }
    #[cfg(not(all(target_arch = "arm", target_abi = "eabihf")))]
    {
        libm::sqrtf(x)
    }
}

/// The one place with `unsafe`: the FPU's square-root instruction.
#[cfg(all(target_arch = "arm", target_abi = "eabihf"))]
#[allow(unsafe_code)]
mod hardware {
    /// `vsqrt.f32`: IEEE 754 correctly rounded, like `libm::sqrtf`.
    #[inline]
    pub(super) fn sqrt(x: f32) -> f32 {
        let mut bits = x.to_bits();
        // SAFETY: moves a value between a core register and s15, takes its
        // square root on the FPU (present on every eabihf target) and moves it
        // back. No memory is touched; s15 is declared clobbered; `vsqrt` cannot
        // trap (invalid operands give NaN with the default FPSCR).
        unsafe {
            core::arch::asm!(
                "vmov s15, {0}",
                "vsqrt.f32 s15, s15",
                "vmov {0}, s15",
                inout(reg) bits,
                out("s15") _,
                options(pure, nomem, nostack),
            );
        }
        f32::from_bits(bits)
    }
}

/// The smaller of `x` and `y` by one comparison (`f32::min` is a call to
/// `fminf` on Armv7-M, which has no IEEE minNum instruction). A NaN `y`
/// gives `x`, as `f32::min` does; a NaN `x` gives `y` only when `y` is not
/// larger (callers keep `x` finite or check the result).
#[inline(always)]
#[must_use]
pub fn smaller(x: f32, y: f32) -> f32 {
    if y < x {
        y
    } else {
        x
    }
}

/// The smaller of `x` and `y`, NaN when either is NaN (for slack minima:
/// a NaN anywhere must reach the final check, not be skipped as `f32::min`
/// and [`smaller`] skip it).
#[inline(always)]
#[must_use]
pub fn least(x: f32, y: f32) -> f32 {
    if x < y {
        x
    } else if y <= x {
        y
    } else {
        f32::NAN
    }
}

/// The larger of `x` and `y` by one comparison (see [`smaller`]).
#[inline(always)]
#[must_use]
pub fn larger(x: f32, y: f32) -> f32 {
    if y > x {
        y
    } else {
        x
    }
}

/// 4/π, to find the octant.
const FOUR_OVER_PI: f32 = 1.273_239_5;
/// π/4 split in three parts for Cody–Waite reduction (Cephes `sinf.c`).
const PI_4_A: f32 = 0.785_156_25;
const PI_4_B: f32 = 2.418_756_5e-4;
const PI_4_C: f32 = 3.774_895e-8;
/// Beyond this magnitude the three-part reduction loses accuracy. No angle
/// of this crate comes near it (link angles stay within ±π/2); larger
/// arguments give NaN rather than pulling `libm`'s large-argument reduction
/// (its double-precision kernels, about 2 KB of flash) into every image.
pub const REDUCTION_LIMIT: f32 = 8192.0;

/// Sine and cosine of `x` (radians) in f32 arithmetic only.
///
/// Cephes single-precision kernels (S. L. Moshier, Cephes Math Library,
/// `sinf.c`/`cosf.c`): Cody–Waite reduction to [−π/4, π/4] and minimax
/// polynomials. Error ≤ 2 ulp plus 6e-8 absolute for |x| ≤ 8192 (tested
/// against f64 in `tests`). Larger or non-finite `x` gives (NaN, NaN): a
/// defined reaction that every caller's finiteness check catches.
#[inline]
pub fn sin_cos(x: f32) -> (f32, f32) {
    let ax = libm::fabsf(x);
    if ax.is_nan() || ax > REDUCTION_LIMIT {
        return (f32::NAN, f32::NAN);
    }
    // Octant, rounded up to even so that the remainder lies in [−π/4, π/4].
    // ax ≤ 8192 keeps j ≤ 10431, exact in u32 and f32.
    #[allow(clippy::cast_possible_truncation, clippy::cast_sign_loss)]
    let mut j = (ax * FOUR_OVER_PI) as u32;
    if j & 1 == 1 {
        j += 1;
    }
    #[allow(clippy::cast_precision_loss)]
    let y = j as f32;
    let r = ((ax - y * PI_4_A) - y * PI_4_B) - y * PI_4_C;
    let z = r * r;
    let s = ((-1.951_529_6e-4 * z + 8.332_161e-3) * z - 1.666_665_5e-1) * z * r + r;
    let c = ((2.443_315_7e-5 * z - 1.388_731_6e-3) * z + 4.166_664_6e-2) * z * z - 0.5 * z + 1.0;
    let (sin_abs, cos) = match (j >> 1) & 3 {
        0 => (s, c),
        1 => (c, -s),
        2 => (-s, -c),
        _ => (-c, s),
    };
    (if x < 0.0 { -sin_abs } else { sin_abs }, cos)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ulp(x: f64) -> f64 {
        let f = (x as f32).abs();
        f64::from(f32::from_bits(f.to_bits() + 1) - f)
    }

    #[test]
    fn sin_cos_against_f64() {
        // Reference: the host's f64 sin/cos (correctly rounded to well below f32 precision).
        let mut worst = 0.0_f64;
        let n = 400_000;
        for i in 0..=n {
            let x = -40.0 + 80.0 * f64::from(i) / f64::from(n);
            let xf = x as f32;
            let (s, c) = sin_cos(xf);
            let xd = f64::from(xf);
            for (got, want) in [(s, xd.sin()), (c, xd.cos())] {
                let err = (f64::from(got) - want).abs();
                let allowed = 2.0 * ulp(want) + 6e-8;
                worst = worst.max(err / allowed);
                assert!(err <= allowed, "x = {xf}: {got} vs {want}");
            }
        }
        assert!(worst > 0.0);
    }

    #[test]
    fn sin_cos_edges() {
        assert_eq!(sin_cos(0.0), (0.0, 1.0));
        let (s, c) = sin_cos(f32::NAN);
        assert!(s.is_nan() && c.is_nan());
        // Largest argument still reduced, and the first one refused.
        let (s, c) = sin_cos(REDUCTION_LIMIT);
        let (ws, wc) = (
            f64::from(REDUCTION_LIMIT).sin(),
            f64::from(REDUCTION_LIMIT).cos(),
        );
        assert!((f64::from(s) - ws).abs() <= 2.0 * ulp(ws) + 6e-8);
        assert!((f64::from(c) - wc).abs() <= 2.0 * ulp(wc) + 6e-8);
        let above = f32::from_bits(REDUCTION_LIMIT.to_bits() + 1);
        for x in [above, -above, 1.0e6, f32::INFINITY, f32::NEG_INFINITY] {
            let (s, c) = sin_cos(x);
            assert!(s.is_nan() && c.is_nan(), "x = {x}");
        }
    }

    #[test]
    fn sqrt_is_correctly_rounded() {
        for x in [0.0_f32, 1.0, 2.0, 1e-30, 3.4e38, 0.5, 9.806_65] {
            assert_eq!(sqrt(x), (f64::from(x).sqrt()) as f32);
        }
        assert!(sqrt(-1.0).is_nan());
    }
}
