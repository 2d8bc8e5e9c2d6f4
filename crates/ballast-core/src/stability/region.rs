//! The stability region of one method: its reach along rays into the
//! left half-plane, its axis intervals, A-, L- and A(alpha)-stability.
//!
//! The reach `r(theta)` is the first crossing, going out from 0 along
//! `z = r e^{i theta}`, of the region's boundary: `h lambda` is inside for
//! every `0 <= r <= r(theta)` (the region may contain further points of the
//! ray beyond an unstable stretch, e.g. for BDF3–6 near the imaginary axis;
//! the reach is what a step-size cap can use).
//!
//! - One-step methods: `|R(r e^{i theta})| - 1` is scanned outward from 0
//!   with steps `5e-4 (1 + r)` (tabulated rays: `5e-3 (1 + r)`) up to a
//!   bound beyond which `|R| > 1` for sure, and the first crossing is
//!   bisected to round-off. `R = P/Q` is evaluated from its polynomial
//!   coefficients.
//! - Multistep methods: the boundary lies on the boundary locus
//!   `{z : pi(e^{i phi}, z) = 0}` (HW II, V.1). The locus is sampled
//!   (finely near `phi = 0`, where it passes through the origin), its
//!   crossings with the ray are refined in `phi` (Illinois), and the root
//!   condition (Schur–Cohn) is checked between consecutive crossings.
//!
//! A one-step method's rays are computed when first asked for (a step-size
//! cap interpolates between two of them): tabulating all 721 took about
//! 7 ms, which the first `integrate()` call of a process paid in full.
//! Multistep rays are tabulated together (the locus is shared).
//!
//! `|R| <= 1 + 1e-13` counts as stable: this absorbs round-off where the
//! boundary only touches a ray (e.g. the imaginary axis near 0 for RK4) and
//! moves crossings by far less than `1e-12` relative, except on rays within
//! about `1e-5` rad of such a tangency.

use std::f64::consts::{FRAC_PI_2, PI};
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::OnceLock;

use num_complex::Complex64;

use super::function::{Rational, StabilityFunction};
use super::locus::{crossing, first_unstable, rays_crossed, sample_locus};
use super::multistep::CharPoly;
use super::poly;

/// `|R(z)| <= 1 + BOUNDARY_SLACK` counts as stable.
pub(crate) const BOUNDARY_SLACK: f64 = 1e-13;

/// Number of tabulated rays, evenly spaced over `[pi/2, 3 pi/2]` (0.25 degrees).
pub const RAYS: usize = 721;
pub(super) const DTHETA: f64 = PI / (RAYS - 1) as f64;

/// The angle of tabulated ray `j`.
pub fn ray_angle(j: usize) -> f64 {
    FRAC_PI_2 + j as f64 * DTHETA
}

/// The unit direction of tabulated ray `j` (exact on the axes).
fn ray_direction(j: usize) -> Complex64 {
    match j {
        0 => Complex64::new(0.0, 1.0),
        j if 2 * j == RAYS - 1 => Complex64::new(-1.0, 0.0),
        j if j == RAYS - 1 => Complex64::new(0.0, -1.0),
        j => Complex64::from_polar(1.0, ray_angle(j)),
    }
}

/// What is known of a method's stability region, computed once.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct StabilitySummary {
    /// Classical order.
    pub order: usize,
    /// Whether the method is explicit.
    pub explicit: bool,
    /// Largest `a` with `[-a, 0]` inside the region (`None`: unbounded).
    pub real_interval: Option<f64>,
    /// Largest `b` with `[-ib, ib]` inside the region (`None`: unbounded).
    pub imag_interval: Option<f64>,
    /// The region contains the closed left half-plane.
    pub a_stable: bool,
    /// `|R(-infinity)|` for one-step methods; for multistep methods the
    /// largest root modulus as `|z| -> infinity` (0 for BDF: the roots of
    /// `sigma(zeta) = zeta^k`). Infinite for explicit methods.
    pub r_infinity: f64,
    /// A-stable and `r_infinity = 0`.
    pub l_stable: bool,
    /// Largest `alpha` (degrees) with the sector `|arg(-z)| <= alpha` inside
    /// the region; `Some(90.0)` when A-stable, `None` when the negative real
    /// axis is not entirely inside.
    pub a_alpha: Option<f64>,
}

enum Engine {
    OneStep {
        rat: Rational,
        a_stable: bool,
        /// `|R(z)| > 1` for `|z| >= bound` (explicit methods), else infinite.
        bound: f64,
    },
    Multistep {
        poly: CharPoly,
        /// Locus branches: `(phi, z)` samples.
        branches: Vec<Vec<(f64, Complex64)>>,
        a_stable: bool,
    },
}

/// The stability region of one method (or one order of a variable-order
/// method), with its reach tabulated on [`RAYS`] rays.
pub struct Region {
    name: String,
    function: StabilityFunction,
    engine: Engine,
    /// The reach along each tabulated ray, computed on first use.
    rays: Vec<OnceLock<f64>>,
    summary: StabilitySummary,
}

impl std::fmt::Debug for Region {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Region")
            .field("name", &self.name)
            .field("summary", &self.summary)
            .finish()
    }
}

fn opt(r: f64) -> Option<f64> {
    r.is_finite().then_some(r)
}

/// Regions built and rays computed so far in this process.
static ANALYSES: AtomicUsize = AtomicUsize::new(0);

/// How many regions have been built and rays computed in this process so
/// far (by any thread). A caller timing its own work compares two readings
/// to tell whether a one-time analysis (tens of microseconds for a ray,
/// more for a region) fell inside the interval.
pub fn analyses_done() -> usize {
    ANALYSES.load(Ordering::Relaxed)
}

impl Region {
    /// Analyses the region of `function` (a method of classical `order`).
    pub fn new(name: impl Into<String>, function: StabilityFunction, order: usize) -> Region {
        ANALYSES.fetch_add(1, Ordering::Relaxed);
        let (engine, explicit) = match &function {
            StabilityFunction::Multistep(p) => {
                let branches = sample_locus(p);
                let min_re = branches
                    .iter()
                    .flatten()
                    .filter(|(_, z)| z.re.is_finite() && z.im.is_finite())
                    .fold(f64::INFINITY, |m, (_, z)| m.min(z.re / z.norm().max(1.0)));
                let a_stable = min_re >= -1e-12 && p.within_slack(Complex64::new(-1.0, 0.0));
                let explicit = p.at_infinity().is_infinite();
                let poly = p.clone();
                (
                    Engine::Multistep {
                        poly,
                        branches,
                        a_stable,
                    },
                    explicit,
                )
            }
            _ => {
                let rat = function.rational().expect("one-step function");
                let explicit = rat.is_polynomial();
                let a_stable = one_step_a_stable(&rat);
                let bound = if explicit {
                    polynomial_bound(&rat.p)
                } else {
                    f64::INFINITY
                };
                (
                    Engine::OneStep {
                        rat,
                        a_stable,
                        bound,
                    },
                    explicit,
                )
            }
        };
        let mut region = Region {
            name: name.into(),
            function,
            engine,
            rays: (0..RAYS).map(|_| OnceLock::new()).collect(),
            summary: StabilitySummary {
                order,
                explicit,
                real_interval: None,
                imag_interval: None,
                a_stable: false,
                r_infinity: 0.0,
                l_stable: false,
                a_alpha: None,
            },
        };
        region.tabulate_locus();
        region.summary = region.summarise(order, explicit);
        region
    }

    /// The method's name as shown in tables.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// The stability function the region was computed from.
    pub fn function(&self) -> &StabilityFunction {
        &self.function
    }

    /// Intervals, A/L-stability and the A(alpha) angle.
    pub fn summary(&self) -> &StabilitySummary {
        &self.summary
    }

    /// The tabulated reaches: entry `j` is along [`ray_angle`]`(j)`
    /// (`f64::INFINITY` where the whole ray is inside). Computes every ray
    /// not yet computed.
    pub fn tabulated(&self) -> Vec<f64> {
        (0..RAYS).map(|j| self.ray(j)).collect()
    }

    /// The reach along tabulated ray `j`, computed on first use.
    fn ray(&self, j: usize) -> f64 {
        *self.rays[j].get_or_init(|| {
            ANALYSES.fetch_add(1, Ordering::Relaxed);
            self.reach_along(ray_direction(j), false)
        })
    }

    /// Whether `z` is in the region (fast test for plotting: `|R| <= 1` for
    /// one-step methods, all roots inside the unit circle for multistep
    /// methods, both up to the `1e-13` slack).
    pub fn contains(&self, z: Complex64) -> bool {
        match &self.engine {
            Engine::OneStep { rat, .. } => rat.modulus(z) <= 1.0 + BOUNDARY_SLACK,
            Engine::Multistep { poly, .. } => poly.within_slack(z),
        }
    }

    /// The reach along the ray of angle `theta` in `[pi/2, 3 pi/2]` (other
    /// angles are taken modulo `2 pi`), interpolated from the tabulated
    /// rays: linearly where the two neighbours agree within 2 %, else
    /// their minimum (conservative where the reach jumps). `None` when the
    /// ray is entirely inside, or for angles in the open right half-plane
    /// (not tabulated: use [`Region::reach_exact`]).
    pub fn reach(&self, theta: f64) -> Option<f64> {
        let t = theta.rem_euclid(2.0 * PI);
        if !(FRAC_PI_2..=3.0 * FRAC_PI_2).contains(&t) {
            return None;
        }
        let x = (t - FRAC_PI_2) / DTHETA;
        let j = (x.floor() as usize).min(RAYS - 2);
        let f = x - j as f64;
        let (r0, r1) = (self.ray(j), self.ray(j + 1));
        if f == 0.0 {
            return opt(r0);
        }
        let lo = r0.min(r1);
        if lo.is_finite() && r0.max(r1) <= 1.02 * lo {
            opt(r0 + f * (r1 - r0))
        } else {
            opt(lo)
        }
    }

    /// The reach along the direction `dir` (any non-zero complex number;
    /// only its argument matters), computed exactly rather than
    /// interpolated. `None` when the whole ray is inside.
    pub fn reach_exact(&self, dir: Complex64) -> Option<f64> {
        let n = dir.norm();
        if n == 0.0 || !n.is_finite() {
            return None;
        }
        opt(self.reach_along(dir / n, true))
    }

    /// The reach, except that a stretch `[0, r]` inside the region only
    /// within round-off (nowhere strictly inside by `1e-12`: the boundary
    /// touches the ray, as the imaginary axis for forward Euler) counts as
    /// reach 0. The check runs on every exact query and on tabulated rays
    /// with small reach (where it matters).
    fn reach_along(&self, u: Complex64, fine: bool) -> f64 {
        let r = self.raw_reach(u, fine);
        if r.is_finite() && r > 0.0 && (fine || r < 1e-2) {
            let n = if fine { 64 } else { 16 };
            if !(1..n).any(|k| self.strictly_inside(u * (r * k as f64 / n as f64))) {
                return 0.0;
            }
        }
        r
    }

    /// Whether `z` is inside by more than `1e-12` (`|R(z)| < 1 - 1e-12`,
    /// or all roots of `pi` within `|zeta| < 1 - 1e-12`).
    fn strictly_inside(&self, z: Complex64) -> bool {
        match &self.engine {
            Engine::OneStep { rat, .. } => rat.modulus(z) < 1.0 - 1e-12,
            Engine::Multistep { poly, .. } => poly.within_radius(z, 1.0 - 1e-12),
        }
    }

    fn raw_reach(&self, u: Complex64, fine: bool) -> f64 {
        match &self.engine {
            Engine::OneStep {
                rat,
                a_stable,
                bound,
            } => {
                if *a_stable && u.re <= 0.0 {
                    f64::INFINITY
                } else {
                    one_step_reach(rat, *bound, u, if fine { 5e-4 } else { 5e-3 })
                }
            }
            Engine::Multistep {
                poly,
                branches,
                a_stable,
            } => {
                if *a_stable && u.re <= 0.0 {
                    return f64::INFINITY;
                }
                let mut ts = Vec::new();
                for branch in branches {
                    for w in branch.windows(2) {
                        if let Some(t) = crossing(poly, w[0], w[1], u) {
                            ts.push(t);
                        }
                    }
                }
                first_unstable(poly, u, ts)
            }
        }
    }

    /// Fills every ray of a multistep region that is not A-stable at once:
    /// its boundary locus is shared by all rays. Other regions compute
    /// their rays one by one when asked ([`Self::ray`]).
    fn tabulate_locus(&self) {
        if let Engine::Multistep {
            poly,
            branches,
            a_stable: false,
        } = &self.engine
        {
            // Bucket locus segments by the rays they cross (each
            // segment spans less than pi in angle), then resolve per ray.
            let mut per_ray: Vec<Vec<f64>> = vec![Vec::new(); RAYS];
            for branch in branches {
                for w in branch.windows(2) {
                    for j in rays_crossed(w[0].1, w[1].1) {
                        if let Some(t) = crossing(poly, w[0], w[1], ray_direction(j)) {
                            per_ray[j].push(t);
                        }
                    }
                }
            }
            for (j, ts) in per_ray.into_iter().enumerate() {
                let r = first_unstable(poly, ray_direction(j), ts);
                // Freshly built: nothing has filled the ray yet.
                let _ = self.rays[j].set(r);
            }
        }
    }

    fn summarise(&self, order: usize, explicit: bool) -> StabilitySummary {
        let (a_stable, r_infinity) = match &self.engine {
            Engine::OneStep { rat, a_stable, .. } => (*a_stable, rat.at_infinity()),
            Engine::Multistep { poly, a_stable, .. } => (*a_stable, poly.at_infinity()),
        };
        let exact = |u: Complex64| opt(self.reach_along(u, true));
        let real_interval = exact(Complex64::new(-1.0, 0.0));
        let up = exact(Complex64::new(0.0, 1.0));
        let down = exact(Complex64::new(0.0, -1.0));
        let imag_interval = match (up, down) {
            (Some(a), Some(b)) => Some(a.min(b)),
            (a, b) => a.or(b),
        };
        let a_alpha = if a_stable {
            Some(90.0)
        } else if real_interval.is_none() {
            Some(self.sector_angle())
        } else {
            None
        };
        StabilitySummary {
            order,
            explicit,
            real_interval,
            imag_interval,
            a_stable,
            r_infinity,
            l_stable: a_stable && r_infinity < 1e-10,
            a_alpha,
        }
    }

    /// The A(alpha) angle in degrees when the negative real axis is inside:
    /// walk the tabulated rays away from `pi` while they are unbounded,
    /// then bisect the angle between the last unbounded and the first
    /// bounded ray with exact reaches. The smaller of the two sides.
    fn sector_angle(&self) -> f64 {
        let mid = (RAYS - 1) / 2;
        let side = |step: isize| {
            let mut j = mid as isize;
            while (0..RAYS as isize).contains(&(j + step))
                && self.ray((j + step) as usize).is_infinite()
            {
                j += step;
            }
            let last = j as usize;
            if !(0..RAYS as isize).contains(&(j + step)) {
                return 90.0;
            }
            let (mut inside, mut outside) = (ray_angle(last), ray_angle((j + step) as usize));
            for _ in 0..50 {
                let m = 0.5 * (inside + outside);
                if self
                    .reach_along(Complex64::from_polar(1.0, m), true)
                    .is_infinite()
                {
                    inside = m;
                } else {
                    outside = m;
                }
            }
            (inside - PI).abs().to_degrees()
        };
        side(1).min(side(-1))
    }
}

/// A-stability of `R = P/Q` (HW II, IV.3, Theorem 3.7): no poles in the
/// closed left half-plane and `|R(iy)| <= 1` on the imaginary axis, which is
/// sampled as `y = tan t` on 4000 points of `(0, pi/2)` plus `y -> infinity`
/// (`|R(-iy)| = |R(iy)|` for real coefficients).
fn one_step_a_stable(rat: &Rational) -> bool {
    if rat.is_polynomial() {
        return rat.p.iter().skip(1).all(|&x| x == 0.0);
    }
    let q: Vec<Complex64> = rat.q.iter().map(|&x| Complex64::new(x, 0.0)).collect();
    if poly::roots(&q).iter().any(|r| r.re <= 0.0) {
        return false;
    }
    if rat.at_infinity() > 1.0 + BOUNDARY_SLACK {
        return false;
    }
    (1..4000).all(|i| {
        let y = (i as f64 * FRAC_PI_2 / 4000.0).tan();
        rat.modulus(Complex64::new(0.0, y)) <= 1.0 + BOUNDARY_SLACK
    })
}

/// The radius beyond which the polynomial `p` has modulus above 1:
/// the positive root of `|p_d| r^d - sum_{k<d} |p_k| r^k = 2`.
fn polynomial_bound(p: &[f64]) -> f64 {
    let d = match p.iter().rposition(|&x| x != 0.0) {
        Some(d) if d > 0 => d,
        _ => return f64::INFINITY,
    };
    let h = |r: f64| {
        p[d].abs() * r.powi(d as i32)
            - (0..d).map(|k| p[k].abs() * r.powi(k as i32)).sum::<f64>()
            - 2.0
    };
    let mut hi = 1.0;
    while h(hi) <= 0.0 && hi < 1e12 {
        hi *= 2.0;
    }
    let mut lo = 0.0;
    for _ in 0..100 {
        let m = 0.5 * (lo + hi);
        if h(m) > 0.0 {
            hi = m;
        } else {
            lo = m;
        }
    }
    hi
}

/// Scans `|R(r u)|` outward with steps `c (1 + r)` and bisects the first
/// crossing; returns the last stable `r` (infinite when none before 1e12).
fn one_step_reach(rat: &Rational, bound: f64, u: Complex64, c: f64) -> f64 {
    // NaN (0/0 at a removable point) counts as unstable.
    let unstable = |r: f64| {
        let m = rat.modulus(u * r);
        m.is_nan() || m > 1.0 + BOUNDARY_SLACK
    };
    let limit = bound.min(1e12);
    let mut lo = 0.0;
    loop {
        let hi = (lo + c * (1.0 + lo)).min(limit);
        if unstable(hi) {
            let r = bisect(lo, hi, unstable);
            // Polish to the exact boundary |R| = 1 where it is crossed
            // (not merely touched): forward Euler's -2 comes out exactly.
            let a = r * (1.0 - 1e-9);
            if rat.modulus(u * a) <= 1.0 {
                return bisect(a, hi, |x| {
                    let m = rat.modulus(u * x);
                    m.is_nan() || m > 1.0
                });
            }
            return r;
        }
        if hi >= limit {
            return if bound.is_finite() { hi } else { f64::INFINITY };
        }
        lo = hi;
    }
}

/// Bisects `[lo, hi]` (`lo` stable, `hi` unstable) to round-off; returns the stable end.
fn bisect(mut lo: f64, mut hi: f64, unstable: impl Fn(f64) -> bool) -> f64 {
    for _ in 0..200 {
        let m = 0.5 * (lo + hi);
        if m <= lo || m >= hi {
            break;
        }
        if unstable(m) {
            hi = m;
        } else {
            lo = m;
        }
    }
    lo
}
