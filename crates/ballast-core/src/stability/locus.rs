//! The boundary locus of a multistep method and its crossings with rays.
//!
//! The boundary of the region lies on `{z : pi(e^{i phi}, z) = 0}` (HW II,
//! V.1): between two consecutive crossings of a ray with the locus the
//! root condition does not change, so testing it once per stretch
//! (Schur–Cohn) finds the first crossing where the ray leaves the region.

use std::f64::consts::{FRAC_PI_2, PI};

use num_complex::Complex64;

use super::multistep::CharPoly;
use super::region::{DTHETA, RAYS};

/// Crossings closer to 0 than this are not resolved (the status of the
/// stretch before the first resolved crossing decides, conservatively).
const T_MIN: f64 = 1e-9;

/// Samples the boundary locus: 4096 points evenly in `phi` plus points
/// `+-pi 2^-m` (`m = 12..48`) near `phi = 0`, where the locus leaves the
/// origin; with several branches, each sample is matched to the branch
/// whose previous point is nearest.
pub(super) fn sample_locus(p: &CharPoly) -> Vec<Vec<(f64, Complex64)>> {
    let mut phis: Vec<f64> = (0..4096)
        .map(|i| -PI + 2.0 * PI * i as f64 / 4096.0)
        .collect();
    for m in 12..=48 {
        let x = PI * 0.5f64.powi(m);
        phis.push(x);
        phis.push(-x);
    }
    phis.sort_by(f64::total_cmp);
    phis.dedup();
    let mut branches: Vec<Vec<(f64, Complex64)>> = Vec::new();
    for &phi in &phis {
        let (mut zs, count) = p.locus_at(phi);
        if branches.is_empty() {
            branches = zs[..count].iter().map(|&z| vec![(phi, z)]).collect();
            continue;
        }
        if count == 2 {
            let (a, b) = (branches[0].last().unwrap().1, branches[1].last().unwrap().1);
            let d = |x: Complex64, y: Complex64| {
                let v = (x - y).norm();
                if v.is_finite() {
                    v
                } else {
                    f64::MAX
                }
            };
            if d(zs[0], b) + d(zs[1], a) < d(zs[0], a) + d(zs[1], b) {
                zs.swap(0, 1);
            }
        }
        for (branch, &z) in branches.iter_mut().zip(&zs[..count]) {
            branch.push((phi, z));
        }
    }
    // Close the curves: phi = pi is phi = -pi; each branch continues into
    // the branch whose first point is nearest its last.
    let firsts: Vec<Complex64> = branches.iter().map(|b| b[0].1).collect();
    for branch in &mut branches {
        let last = branch[branch.len() - 1].1;
        let next = firsts
            .iter()
            .min_by(|x, y| (**x - last).norm().total_cmp(&(**y - last).norm()))
            .copied();
        if let Some(z) = next {
            branch.push((PI, z));
        }
    }
    branches
}

pub(super) fn finite(z: Complex64) -> bool {
    z.re.is_finite() && z.im.is_finite()
}

/// Indices of tabulated rays whose angle lies within the arc swept by the
/// segment `a -> b` as seen from the origin.
pub(super) fn rays_crossed(a: Complex64, b: Complex64) -> std::ops::Range<usize> {
    if !finite(a) || !finite(b) || a.norm_sqr() == 0.0 || b.norm_sqr() == 0.0 {
        return 0..0;
    }
    let aa = a.arg().rem_euclid(2.0 * PI);
    let delta = (b.arg() - a.arg() + PI).rem_euclid(2.0 * PI) - PI;
    if delta.abs() > PI - 1e-6 {
        return 0..0; // passes (nearly) through the origin: only tiny crossings
    }
    let (lo, hi) = if delta >= 0.0 {
        (aa, aa + delta)
    } else {
        (aa + delta, aa)
    };
    let to_rays = |lo: f64, hi: f64| {
        let j0 = ((lo - FRAC_PI_2) / DTHETA - 1e-9).ceil().max(0.0);
        let j1 = ((hi - FRAC_PI_2) / DTHETA + 1e-9)
            .floor()
            .min((RAYS - 1) as f64);
        if j1 >= j0 {
            j0 as usize..j1 as usize + 1
        } else {
            0..0
        }
    };
    let r = to_rays(lo, hi);
    if !r.is_empty() {
        return r;
    }
    to_rays(lo - 2.0 * PI, hi - 2.0 * PI)
}

/// Where the locus between samples `(pa, za)` and `(pb, zb)` crosses the
/// ray `t u, t > T_MIN`: refined in `phi` by the Illinois method on
/// `Im(conj(u) z(phi))`.
pub(super) fn crossing(
    p: &CharPoly,
    (pa, za): (f64, Complex64),
    (pb, zb): (f64, Complex64),
    u: Complex64,
) -> Option<f64> {
    if !finite(za) || !finite(zb) {
        return None;
    }
    let side = |z: Complex64| (u.conj() * z).im;
    let along = |z: Complex64| (u.conj() * z).re;
    let (fa, fb) = (side(za), side(zb));
    if (fa > 0.0 && fb > 0.0) || (fa < 0.0 && fb < 0.0) || (fa == 0.0 && fb == 0.0) {
        return None;
    }
    // The branch point nearest the chord.
    let z_at = |phi: f64| {
        let guess = za + (zb - za) * ((phi - pa) / (pb - pa));
        let (zs, count) = p.locus_at(phi);
        zs[..count]
            .iter()
            .copied()
            .filter(|&z| finite(z))
            .min_by(|x, y| (x - guess).norm_sqr().total_cmp(&(y - guess).norm_sqr()))
            .unwrap_or(guess)
    };
    let (mut a, mut b, mut fa, mut fb) = (pa, pb, fa, fb);
    let mut z = if fa == 0.0 { za } else { zb };
    if fa != 0.0 && fb != 0.0 {
        let mut last = 0i8;
        for _ in 0..60 {
            let m = (a * fb - b * fa) / (fb - fa);
            let m = if m > a.min(b) && m < a.max(b) {
                m
            } else {
                0.5 * (a + b)
            };
            z = z_at(m);
            let fm = side(z);
            if fm == 0.0 || (b - a).abs() <= 1e-15 * (1.0 + m.abs()) {
                break;
            }
            if (fm > 0.0) == (fa > 0.0) {
                a = m;
                fa = fm;
                if last == -1 {
                    fb *= 0.5;
                }
                last = -1;
            } else {
                b = m;
                fb = fm;
                if last == 1 {
                    fa *= 0.5;
                }
                last = 1;
            }
        }
    }
    let t = along(z);
    (t > T_MIN && t.is_finite()).then_some(t)
}

/// Given the crossings `ts` of a ray with the locus, the first crossing at
/// which the root condition starts to fail (0 when it fails right from the
/// origin; infinite when the whole ray is inside).
pub(super) fn first_unstable(p: &CharPoly, u: Complex64, mut ts: Vec<f64>) -> f64 {
    ts.sort_by(f64::total_cmp);
    ts.dedup_by(|b, a| (*b - *a).abs() <= 1e-10 * a.abs());
    let n = ts.len();
    for i in 0..=n {
        let r = match (i, n) {
            (_, 0) => 1.0,
            (0, _) => 0.5 * ts[0],
            (i, n) if i == n => 2.0 * ts[n - 1] + 1.0,
            (i, _) => 0.5 * (ts[i - 1] + ts[i]),
        };
        if !p.within_slack(u * r) {
            return if i == 0 { 0.0 } else { ts[i - 1] };
        }
    }
    f64::INFINITY
}
