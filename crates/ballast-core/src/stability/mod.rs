//! Linear stability of every method: stability functions, regions, the
//! critical step.
//!
//! For `y' = lambda y` a one-step method gives `y_{n+1} = R(h lambda) y_n`
//! and is stable at `z = h lambda` when `|R(z)| <= 1`; a multistep method is
//! stable when every root of its characteristic polynomial
//! `pi(zeta, z)` (`rho(zeta) - z sigma(zeta)` for a linear multistep
//! method) has `|zeta| <= 1`, those on the unit circle simple (Hairer and
//! Wanner, *Solving ODEs II*, IV.2–IV.3 and V.1).
//!
//! Every `R` here is computed from the method's own coefficients: Runge–Kutta
//! as `1 + z b^T (I - zA)^{-1} 1`, Rosenbrock likewise with
//! `A = alpha + Gamma`; Adams and BDF coefficients are generated from their
//! definitions ([`Lmm`]). Each method's [`Region`] (reach along 721 rays,
//! axis intervals, A-, L- and A(alpha)-stability) is computed on first use
//! and cached for the life of the process.
//!
//! Variable-order methods have one region per order: [`RegionKey`] names
//! them (`AdamsPece(k)` for the Adams scheme at order `k`, `Bdf(k)`), so a
//! controller can ask for the region of the scheme's current order through
//! [`critical_step_for`].
//!
//! ```
//! use ballast_core::{stability, Method};
//! use num_complex::Complex64;
//! // Forward Euler on lambda = -4: h <= 2/|lambda|.
//! let h = stability::critical_step(Method::ForwardEuler, Complex64::new(-4.0, 0.0)).unwrap();
//! assert!((h - 0.5).abs() < 1e-12);
//! // Backward Euler is A-stable: no limit.
//! assert_eq!(stability::critical_step(Method::BackwardEuler, Complex64::new(-4.0, 0.0)), None);
//! // RK4's real stability interval is about 2.785.
//! let rk4 = stability::method_region(Method::Rk4).unwrap().summary();
//! assert!((rk4.real_interval.unwrap() - 2.785).abs() < 1e-3);
//! ```

mod function;
mod locus;
mod multistep;
mod poly;
mod region;
#[cfg(test)]
mod tests;
#[cfg(test)]
mod tests_laws;

use std::sync::OnceLock;

use num_complex::Complex64;

pub use function::{Rational, StabilityFunction};
pub use multistep::{CharPoly, Lmm, MAX_STEPS};
pub use region::{analyses_done, ray_angle, Region, StabilitySummary, RAYS};

use crate::explicit::tableau as ex;
use crate::implicit::tableau as im;
use crate::method::Method;

/// The highest Adams order with a region here.
pub const MAX_ADAMS_ORDER: usize = 12;
/// The highest BDF order with a region here (BDF is zero-unstable beyond 6).
pub const MAX_BDF_ORDER: usize = 6;
/// The highest order the variable-order BDF scheme uses ([`Method::Bdf`]).
pub const BDF_SCHEME_MAX_ORDER: usize = 5;

/// The one-step methods, in table order: [`Method::SINGLE`] without the
/// two multistep families at its end.
const ONE_STEP: &[Method] = Method::SINGLE.split_at(Method::SINGLE.len() - 2).0;

const N_KEYS: usize = ONE_STEP.len() + 3 * MAX_ADAMS_ORDER + MAX_BDF_ORDER;

/// Names one stability region: a one-step method, or one order of a
/// multistep family.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum RegionKey {
    /// A one-step method (Runge–Kutta or Rosenbrock). The variable-order
    /// [`Method::Adams`] and [`Method::Bdf`] have no single region: use the
    /// per-order keys.
    Method(Method),
    /// The `k`-step Adams–Bashforth method of order `k` (1..=12).
    AdamsBashforth(usize),
    /// The Adams–Moulton method of order `k` (1..=12), solved exactly.
    AdamsMoulton(usize),
    /// The PECE mode of Adams at order `k` (1..=12): Adams–Bashforth of
    /// order `k` predicts, Adams–Moulton of order `k` corrects — the
    /// [`Method::Adams`] scheme at order `k`.
    AdamsPece(usize),
    /// The `k`-step BDF (1..=6), solved exactly.
    Bdf(usize),
}

impl RegionKey {
    fn index(self) -> Option<usize> {
        let a = ONE_STEP.len();
        let in_range = |k: usize, max: usize| (1..=max).contains(&k);
        match self {
            RegionKey::Method(m) => ONE_STEP.iter().position(|&x| x == m),
            RegionKey::AdamsBashforth(k) if in_range(k, MAX_ADAMS_ORDER) => Some(a + k - 1),
            RegionKey::AdamsMoulton(k) if in_range(k, MAX_ADAMS_ORDER) => {
                Some(a + MAX_ADAMS_ORDER + k - 1)
            }
            RegionKey::AdamsPece(k) if in_range(k, MAX_ADAMS_ORDER) => {
                Some(a + 2 * MAX_ADAMS_ORDER + k - 1)
            }
            RegionKey::Bdf(k) if in_range(k, MAX_BDF_ORDER) => {
                Some(a + 3 * MAX_ADAMS_ORDER + k - 1)
            }
            _ => None,
        }
    }

    /// A short name for tables ("RK4", "AB3", "PECE4", "BDF2", ...).
    pub fn name(self) -> String {
        match self {
            RegionKey::Method(m) => m.name().to_string(),
            RegionKey::AdamsBashforth(k) => format!("Adams-Bashforth {k}"),
            RegionKey::AdamsMoulton(k) => format!("Adams-Moulton {k}"),
            RegionKey::AdamsPece(k) => format!("Adams PECE {k}"),
            RegionKey::Bdf(k) => format!("BDF{k}"),
        }
    }

    /// Every key with a region, in table order: the one-step methods, then
    /// Adams–Bashforth, Adams–Moulton and Adams PECE 1..=12, BDF 1..=6.
    pub fn all() -> Vec<RegionKey> {
        let mut v: Vec<RegionKey> = ONE_STEP.iter().map(|&m| RegionKey::Method(m)).collect();
        v.extend((1..=MAX_ADAMS_ORDER).map(RegionKey::AdamsBashforth));
        v.extend((1..=MAX_ADAMS_ORDER).map(RegionKey::AdamsMoulton));
        v.extend((1..=MAX_ADAMS_ORDER).map(RegionKey::AdamsPece));
        v.extend((1..=MAX_BDF_ORDER).map(RegionKey::Bdf));
        v
    }

    /// The stability function and classical order behind this key.
    pub fn function(self) -> Option<(StabilityFunction, usize)> {
        let lmm =
            |l: Option<Lmm>| l.map(|l| (StabilityFunction::Multistep(CharPoly::lmm(&l)), l.order));
        match self {
            RegionKey::Method(m) => one_step_function(m).map(|f| (f, m.order().unwrap_or(0))),
            RegionKey::AdamsBashforth(k) => lmm(Lmm::adams_bashforth(k)),
            RegionKey::AdamsMoulton(k) => lmm(Lmm::adams_moulton(k)),
            RegionKey::AdamsPece(k) => {
                let (p, c) = (Lmm::adams_bashforth(k)?, Lmm::adams_moulton(k)?);
                Some((StabilityFunction::Multistep(CharPoly::pece(&p, &c)), k))
            }
            RegionKey::Bdf(k) => lmm(Lmm::bdf(k)),
        }
    }
}

/// The stability function of a one-step method, read from its published
/// coefficients (`None` for multistep and switching methods).
pub fn one_step_function(method: Method) -> Option<StabilityFunction> {
    let explicit = |t: &ex::Tableau| Some(StabilityFunction::from_explicit(t));
    let implicit = |t: &im::ImplicitTableau| Some(StabilityFunction::from_implicit(t));
    match method {
        Method::ForwardEuler => explicit(&ex::FORWARD_EULER),
        Method::Heun => explicit(&ex::HEUN),
        Method::Rk4 => explicit(&ex::RK4),
        Method::BogackiShampine32 => explicit(&ex::BOGACKI_SHAMPINE_32),
        Method::DormandPrince54 => explicit(&ex::DORMAND_PRINCE_54),
        Method::Tsitouras54 => explicit(&ex::TSITOURAS_54),
        Method::DormandPrince853 => {
            use crate::explicit::dp853_tableau as d;
            Some(StabilityFunction::from_explicit_rows(
                &d::A[..d::STEP_STAGES],
                &d::B,
            ))
        }
        Method::BackwardEuler => implicit(&im::BACKWARD_EULER),
        Method::Trapezoid => implicit(&im::TRAPEZOID),
        Method::TrBdf2 => implicit(&im::TR_BDF2),
        Method::Esdirk43 => implicit(&im::ESDIRK_43),
        Method::RadauIIA5 => implicit(&im::RADAU_IIA_5),
        Method::Ros3p => Some(StabilityFunction::from_rosenbrock(&im::ROS3P)),
        Method::Rosenbrock32 => Some(StabilityFunction::from_rosenbrock(&im::ROSENBROCK_32)),
        _ => None,
    }
}

static CACHE: [OnceLock<Option<Region>>; N_KEYS] = [const { OnceLock::new() }; N_KEYS];

/// The region behind `key`, computed on first use and cached. `None` for
/// keys out of range, the variable-order and switching methods.
pub fn region(key: RegionKey) -> Option<&'static Region> {
    let i = key.index()?;
    CACHE[i]
        .get_or_init(|| {
            key.function()
                .map(|(f, order)| Region::new(key.name(), f, order))
        })
        .as_ref()
}

/// The region of a one-step method (`None` for Adams, BDF and switching).
pub fn method_region(method: Method) -> Option<&'static Region> {
    region(RegionKey::Method(method))
}

/// The region of the Adams–Bashforth method of order `k` (1..=12).
pub fn adams_bashforth(k: usize) -> Option<&'static Region> {
    region(RegionKey::AdamsBashforth(k))
}

/// The region of the Adams–Moulton method of order `k` (1..=12).
pub fn adams_moulton(k: usize) -> Option<&'static Region> {
    region(RegionKey::AdamsMoulton(k))
}

/// The region of the Adams PECE mode at order `k` (1..=12).
pub fn adams_pece(k: usize) -> Option<&'static Region> {
    region(RegionKey::AdamsPece(k))
}

/// The region of the `k`-step BDF (1..=6).
pub fn bdf(k: usize) -> Option<&'static Region> {
    region(RegionKey::Bdf(k))
}

/// The regions a method may use: its own, or one per order for the
/// variable-order schemes (Adams PECE 1..=12, BDF 1..=5).
pub fn regions_of(method: Method) -> Vec<RegionKey> {
    match method {
        Method::Adams => (1..=MAX_ADAMS_ORDER).map(RegionKey::AdamsPece).collect(),
        Method::Bdf => (1..=BDF_SCHEME_MAX_ORDER).map(RegionKey::Bdf).collect(),
        Method::Switching(_) => Vec::new(),
        m => vec![RegionKey::Method(m)],
    }
}

/// The largest `h` with `h lambda` inside the region of `key` along the
/// ray of `lambda`: `r(theta) / |lambda|`, the reach computed exactly for
/// that ray. `None` when there is no limit: `lambda = 0` or not a number,
/// the whole ray inside the region, or `Re(lambda) > 0` (a growing mode:
/// its growth is the solution's, and no step size makes it decay, so no
/// stability cap applies there; accuracy governs). `Some(0.0)` when no
/// positive step is stable (e.g. forward Euler on a purely imaginary
/// `lambda`).
pub fn critical_step_for(key: RegionKey, lambda: Complex64) -> Option<f64> {
    if lambda.re.is_nan() || lambda.im.is_nan() || lambda.re > 0.0 {
        return None;
    }
    let m = lambda.norm();
    if m == 0.0 {
        return None;
    }
    let dir = if m.is_finite() {
        lambda
    } else {
        Complex64::new(lambda.re.signum(), lambda.im.signum())
    };
    let r = region(key)?.reach_exact(dir)?;
    Some(if m.is_finite() { r / m } else { 0.0 })
}

/// `ballast::stability::critical_step`: the largest `h` with `h lambda` in
/// the method's stability region (see [`critical_step_for`] for `None`).
///
/// Variable-order methods take the most restrictive order they may use:
/// [`Method::Adams`] the minimum over Adams PECE orders 1..=12,
/// [`Method::Bdf`] over BDF orders 1..=5 (use [`critical_step_for_order`] for
/// the current order). [`Method::Switching`] has no limit (it switches to
/// its implicit scheme instead): `None`.
///
/// ```
/// use ballast_core::{stability::critical_step, Method};
/// use num_complex::Complex64;
/// let h = critical_step(Method::ForwardEuler, Complex64::new(-4.0, 0.0));
/// assert!((h.unwrap() - 0.5).abs() < 1e-12);
/// ```
pub fn critical_step(method: Method, lambda: Complex64) -> Option<f64> {
    regions_of(method)
        .into_iter()
        .filter_map(|k| critical_step_for(k, lambda))
        .reduce(f64::min)
}

/// The critical step of a method at a given order: Adams at order `order`
/// (PECE), BDF at order `order`; one-step methods ignore `order`.
pub fn critical_step_for_order(method: Method, order: usize, lambda: Complex64) -> Option<f64> {
    match method {
        Method::Adams => critical_step_for(RegionKey::AdamsPece(order), lambda),
        Method::Bdf => critical_step_for(RegionKey::Bdf(order), lambda),
        Method::Switching(_) => None,
        m => critical_step_for(RegionKey::Method(m), lambda),
    }
}

/// How far into its region a step goes: `|h lambda| / r(theta)` (below 1
/// inside, 1 on the boundary); 0 when there is no limit along that ray,
/// infinite when no positive step is stable.
pub fn stability_margin_for(key: RegionKey, h: f64, lambda: Complex64) -> f64 {
    match critical_step_for(key, lambda) {
        None => 0.0,
        Some(0.0) => f64::INFINITY,
        Some(hc) => h.abs() / hc,
    }
}

/// [`stability_margin_for`] with the method's own region (the most
/// restrictive order for variable-order methods, as in [`critical_step`]).
pub fn stability_margin(method: Method, h: f64, lambda: Complex64) -> f64 {
    match critical_step(method, lambda) {
        None => 0.0,
        Some(0.0) => f64::INFINITY,
        Some(hc) => h.abs() / hc,
    }
}
