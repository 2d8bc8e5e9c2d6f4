//! The principal branch of the Lambert W function, and `W(e^x)`.
//!
//! R. M. Corless, G. H. Gonnet, D. E. G. Hare, D. J. Jeffrey and D. E.
//! Knuth, On the Lambert W function, Adv. Comput. Math. 5 (1996) 329–359:
//! `W(x) e^W(x) = x`; the branch-point series and the asymptotic starting
//! value below are theirs, the refinement is Halley's iteration (their
//! eq. (5.9)) or Newton's on `w + ln w = x`.

use std::f64::consts::E;

/// `1/e` split into a double and its rounding error, so that `x + 1/e` is
/// accurate near the branch point.
const INV_E_HI: f64 = 0.36787944117144233;
const INV_E_LO: f64 = -1.2428753672788363e-17;

/// The principal branch `W0(x)` of the Lambert W function: the solution
/// `w >= -1` of `w e^w = x`, for `x >= -1/e`.
///
/// Returns NaN below the branch point `-1/e` (and for NaN), `+inf` for
/// `+inf`. Accurate to a few ulps away from the branch point; within
/// `1e-3` of it, to about `1e-15` absolute (the function has a square-root
/// singularity there).
///
/// ```
/// use ballast_models::lambert_w0;
/// let w = lambert_w0(1.0); // the omega constant
/// assert!((w - 0.5671432904097838).abs() < 1e-15);
/// assert!((w * w.exp() - 1.0).abs() < 1e-15);
/// ```
pub fn lambert_w0(x: f64) -> f64 {
    if x.is_nan() {
        return f64::NAN;
    }
    if x == f64::INFINITY {
        return f64::INFINITY;
    }
    if x == 0.0 {
        return x;
    }
    let q = (x + INV_E_HI) + INV_E_LO; // x + 1/e
    if q < 0.0 {
        return if q > -4.0 * f64::EPSILON {
            -1.0
        } else {
            f64::NAN
        };
    }
    if x > E {
        // Large arguments: W(x) = omega(ln x), solved in log form.
        return wright_omega(x.ln());
    }
    let p = (2.0 * E * q).sqrt();
    if p < 1e-3 {
        // Branch-point series (Corless et al., eq. (4.22)).
        return -1.0 + p * (1.0 + p * (-1.0 / 3.0 + p * (11.0 / 72.0 + p * (-43.0 / 540.0))));
    }
    let mut w = if x < -0.25 {
        -1.0 + p * (1.0 + p * (-1.0 / 3.0 + p * (11.0 / 72.0)))
    } else {
        x.ln_1p() * (1.0 - x.ln_1p().ln_1p() / (2.0 + x.ln_1p()))
    };
    halley(x, &mut w);
    w
}

/// Halley's iteration for `w e^w = x` (Corless et al., eq. (5.9)).
fn halley(x: f64, w: &mut f64) {
    for _ in 0..20 {
        let ew = w.exp();
        let f = *w * ew - x;
        let w1 = *w + 1.0;
        let dw = f / (ew * w1 - (*w + 2.0) * f / (2.0 * w1));
        *w -= dw;
        if dw.abs() <= 2.0 * f64::EPSILON * w.abs() {
            break;
        }
    }
}

/// The Wright omega function on the real line, `omega(x) = W0(e^x)`: the
/// solution `w > 0` of `w + ln w = x`. Computed without forming `e^x`, so
/// it is finite and accurate for every finite `x` (e.g. `omega(1e4)`, where
/// `e^x` overflows); it underflows to 0 below about `x = -745`.
///
/// ```
/// use ballast_models::wright_omega;
/// let w = wright_omega(1e4);
/// assert!((w + w.ln() - 1e4).abs() < 1e-11);
/// assert_eq!(wright_omega(0.0), ballast_models::lambert_w0(1.0));
/// ```
pub fn wright_omega(x: f64) -> f64 {
    if x.is_nan() {
        return f64::NAN;
    }
    if x == f64::INFINITY {
        return f64::INFINITY;
    }
    if x <= 1.0 {
        // e^x <= e: no overflow, and for very negative x, W(z) = z - z^2 + ...
        let z = x.exp();
        if z < 1e-10 {
            return z * (1.0 - z);
        }
        return lambert_w0(z);
    }
    // Newton on g(w) = w + ln w - x, from the asymptotic expansion
    // w ~ x - ln x + ln x / x (Corless et al., eq. (4.19)).
    let l = x.ln();
    let mut w = if x > 3.0 {
        x - l + l / x
    } else {
        1.0 + (x - 1.0) / 2.0
    };
    for _ in 0..50 {
        let g = w + w.ln() - x;
        let dw = g / (1.0 + 1.0 / w);
        w -= dw;
        if dw.abs() <= 2.0 * f64::EPSILON * w {
            break;
        }
    }
    w
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::reference::{LAMBERT_W0, WRIGHT_OMEGA};

    fn rel(a: f64, b: f64) -> f64 {
        if a == b {
            0.0
        } else {
            (a - b).abs() / b.abs().max(f64::MIN_POSITIVE)
        }
    }

    #[test]
    fn lambert_w0_matches_mpmath() {
        // Values from mpmath's lambertw (tools/reference/models.py).
        for &(x, w) in LAMBERT_W0 {
            let got = lambert_w0(x);
            // The branch point is a square-root singularity: an ulp in x
            // moves W by about sqrt(ulp).
            let tol = if x < -0.36 { 1e-8 } else { 4e-16 };
            assert!(rel(got, w) <= tol, "W0({x:e}) = {got:e}, mpmath {w:e}");
            if x < -0.36 {
                assert!((got - w).abs() < 1e-8);
            } else {
                assert!(
                    (got * got.exp() - x).abs() <= 1e-15 * x.abs().max(1.0) * (1.0 + got.abs())
                );
            }
        }
    }

    #[test]
    fn wright_omega_matches_mpmath() {
        for &(x, w) in WRIGHT_OMEGA {
            let got = wright_omega(x);
            assert!(rel(got, w) <= 4e-16, "omega({x:e}) = {got:e}, mpmath {w:e}");
        }
    }

    #[test]
    fn edge_cases() {
        assert!(lambert_w0(-0.5).is_nan());
        assert!(lambert_w0(f64::NAN).is_nan());
        assert_eq!(lambert_w0(f64::INFINITY), f64::INFINITY);
        assert_eq!(lambert_w0(0.0), 0.0);
        assert_eq!(lambert_w0(-INV_E_HI), -1.0); // the f64 nearest -1/e is just below it
        let x = -0.367879441171;
        let w = lambert_w0(x);
        assert!(w > -1.0 && w < -0.999 && (w * w.exp() - x).abs() < 1e-16);
        assert_eq!(wright_omega(-800.0), 0.0);
        // Continuity where the methods change.
        for x in [E, -0.25, 1.0] {
            let (a, b) = (lambert_w0(x * (1.0 - 1e-15)), lambert_w0(x * (1.0 + 1e-15)));
            assert!((a - b).abs() < 1e-14);
        }
        for x in [1.0, 3.0] {
            let (a, b) = (wright_omega(x - 1e-14), wright_omega(x + 1e-14));
            assert!((a - b).abs() < 1e-13);
        }
    }
}
