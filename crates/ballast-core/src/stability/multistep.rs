//! Linear multistep methods on the test equation: Adams and BDF
//! coefficients generated from their definitions, the characteristic
//! polynomial (also of the PECE predictor–corrector mode), the root
//! condition and the boundary locus.
//!
//! A `k`-step method `sum_j alpha_j y_{n+j} = h sum_j beta_j f_{n+j}` has
//! `rho(zeta) = sum_j alpha_j zeta^j` and `sigma(zeta) = sum_j beta_j zeta^j`
//! (Hairer, Norsett and Wanner I, III.2); on `y' = lambda y` with
//! `z = h lambda` its solutions are combinations of `zeta^n` over the roots
//! of `rho(zeta) - z sigma(zeta)` (HW II, V.1).

use num_complex::Complex64;

use super::poly::{self, Rat};

/// The largest `k` for which coefficients are generated (Adams orders and
/// BDF steps); the exact rational arithmetic stays far from overflow.
pub const MAX_STEPS: usize = 12;

/// A linear multistep method: `rho` and `sigma` in ascending powers of
/// `zeta`, `rho` monic.
#[derive(Clone, Debug, PartialEq)]
pub struct Lmm {
    /// `rho(zeta)`, ascending powers, leading coefficient 1.
    pub rho: Vec<f64>,
    /// `sigma(zeta)`, ascending powers, same length as `rho`.
    pub sigma: Vec<f64>,
    /// Classical order.
    pub order: usize,
}

/// `int_0^1 l_j(s) ds` for the Lagrange basis `l_j` on integer `nodes`,
/// exactly (the Adams weights, HNW I, III.1, eq. (1.5) and (1.8)).
fn lagrange_integrals(nodes: &[i128]) -> Vec<Rat> {
    (0..nodes.len())
        .map(|j| {
            // Numerator prod_{m != j} (s - s_m), integer coefficients.
            let mut num: Vec<i128> = vec![1];
            let mut den: i128 = 1;
            for (m, &sm) in nodes.iter().enumerate() {
                if m == j {
                    continue;
                }
                let mut next = vec![0i128; num.len() + 1];
                for (i, &c) in num.iter().enumerate() {
                    next[i + 1] += c;
                    next[i] -= sm * c;
                }
                num = next;
                den *= nodes[j] - sm;
            }
            let integral = num.iter().enumerate().fold(Rat::int(0), |acc, (i, &c)| {
                acc.add(Rat::new(c, i as i128 + 1))
            });
            integral.div(Rat::int(den))
        })
        .collect()
}

fn to_f64(v: &[Rat]) -> Vec<f64> {
    v.iter().map(|r| r.to_f64()).collect()
}

impl Lmm {
    /// The `k`-step Adams–Bashforth method of order `k`:
    /// `y_{n+1} = y_n + h sum_{j<k} beta_j f_{n-j}`, `beta_j` the integral
    /// over `[t_n, t_{n+1}]` of the Lagrange basis on `t_n, ..., t_{n-k+1}`.
    /// `None` unless `1 <= k <= MAX_STEPS`.
    pub fn adams_bashforth(k: usize) -> Option<Lmm> {
        if !(1..=MAX_STEPS).contains(&k) {
            return None;
        }
        let nodes: Vec<i128> = (0..k as i128).map(|j| -j).collect();
        let beta = lagrange_integrals(&nodes);
        let mut rho = vec![Rat::int(0); k + 1];
        rho[k] = Rat::int(1);
        rho[k - 1] = Rat::int(-1);
        let mut sigma = vec![Rat::int(0); k + 1];
        for (j, b) in beta.into_iter().enumerate() {
            sigma[k - 1 - j] = b; // f_{n-j} <-> zeta^(k-1-j)
        }
        Some(Lmm {
            rho: to_f64(&rho),
            sigma: to_f64(&sigma),
            order: k,
        })
    }

    /// The Adams–Moulton method of order `k` (`max(k-1, 1)` steps):
    /// `y_{n+1} = y_n + h sum_{j<k} beta_j f_{n+1-j}` with the Lagrange basis
    /// on `t_{n+1}, ..., t_{n+2-k}`. Order 1 is backward Euler, order 2 the
    /// trapezoidal rule. `None` unless `1 <= k <= MAX_STEPS`.
    pub fn adams_moulton(k: usize) -> Option<Lmm> {
        if !(1..=MAX_STEPS).contains(&k) {
            return None;
        }
        let q = (k - 1).max(1);
        let nodes: Vec<i128> = (0..k as i128).map(|j| 1 - j).collect();
        let beta = lagrange_integrals(&nodes);
        let mut rho = vec![Rat::int(0); q + 1];
        rho[q] = Rat::int(1);
        rho[q - 1] = Rat::int(-1);
        let mut sigma = vec![Rat::int(0); q + 1];
        for (j, b) in beta.into_iter().enumerate() {
            sigma[q - j] = b; // f_{n+1-j} <-> zeta^(q-j)
        }
        Some(Lmm {
            rho: to_f64(&rho),
            sigma: to_f64(&sigma),
            order: k,
        })
    }

    /// The `k`-step backward differentiation formula
    /// `sum_{j=1}^k (1/j) nabla^j y_{n+1} = h f_{n+1}` (HNW I, III.1,
    /// eq. (1.22')), normalised to a monic `rho`. `None` unless `1 <= k <= 6`
    /// (BDF is not zero-stable beyond 6 steps).
    pub fn bdf(k: usize) -> Option<Lmm> {
        if !(1..=6).contains(&k) {
            return None;
        }
        // nabla^j y_{n+1} = sum_i (-1)^i C(j, i) y_{n+1-i}; y_{n+1-i} <-> zeta^(k-i).
        let mut rho = vec![Rat::int(0); k + 1];
        for j in 1..=k {
            let mut binom: i128 = 1; // C(j, i)
            for i in 0..=j {
                let sign = if i % 2 == 0 { 1 } else { -1 };
                rho[k - i] = rho[k - i].add(Rat::new(sign * binom, j as i128));
                binom = binom * (j as i128 - i as i128) / (i as i128 + 1);
            }
        }
        let lead = rho[k];
        let rho: Vec<Rat> = rho.iter().map(|r| r.div(lead)).collect();
        let mut sigma = vec![Rat::int(0); k + 1];
        sigma[k] = Rat::int(1).div(lead);
        Some(Lmm {
            rho: to_f64(&rho),
            sigma: to_f64(&sigma),
            order: k,
        })
    }

    /// Multiplies `rho` and `sigma` by `zeta^(degree - current)` (adds
    /// steps with zero weights, which adds roots at 0 only).
    fn padded(&self, degree: usize) -> (Vec<f64>, Vec<f64>) {
        let shift = degree + 1 - self.rho.len();
        let pad = |c: &[f64]| {
            let mut v = vec![0.0; shift];
            v.extend_from_slice(c);
            v
        };
        (pad(&self.rho), pad(&self.sigma))
    }
}

/// The characteristic polynomial `pi(zeta, z) = sum_m z^m P_m(zeta)`,
/// of degree 1 (linear multistep methods) or 2 (PECE) in `z`.
#[derive(Clone, Debug, PartialEq)]
pub struct CharPoly {
    /// `P_m` in ascending powers of `zeta`, all of the same length.
    z_coeffs: Vec<Vec<f64>>,
}

impl CharPoly {
    /// `pi(zeta, z) = sum_m z^m P_m(zeta)` from `P_0, P_1` and optionally
    /// `P_2` (ascending powers of `zeta`, padded to a common length).
    /// `None` for other degrees in `z`, an empty or zero `P_0`.
    pub fn new(z_coeffs: &[Vec<f64>]) -> Option<CharPoly> {
        if !(2..=3).contains(&z_coeffs.len()) || z_coeffs[0].iter().all(|&x| x == 0.0) {
            return None;
        }
        let n = z_coeffs.iter().map(Vec::len).max()?;
        let z_coeffs = z_coeffs
            .iter()
            .map(|p| {
                let mut p = p.clone();
                p.resize(n, 0.0);
                p
            })
            .collect();
        Some(CharPoly { z_coeffs })
    }

    /// `P_m`, the coefficient of `z^m` (ascending powers of `zeta`).
    pub fn z_coeffs(&self) -> &[Vec<f64>] {
        &self.z_coeffs
    }

    /// `rho(zeta) - z sigma(zeta)` of a linear multistep method.
    pub fn lmm(m: &Lmm) -> CharPoly {
        CharPoly {
            z_coeffs: vec![m.rho.clone(), m.sigma.iter().map(|x| -x).collect()],
        }
    }

    /// The PECE mode (predict, evaluate, correct, evaluate) of an explicit
    /// predictor `(rho*, sigma*)` and an implicit corrector `(rho, sigma)`,
    /// both brought to `K` steps with monic `rho`. On `y' = lambda y`:
    ///
    /// ```text
    /// P:  p_{n+K}  = -sum_{j<K} alpha*_j y_{n+j} + z sum_{j<K} beta*_j y_{n+j}
    /// C:  y_{n+K}  = -sum_{j<K} alpha_j y_{n+j}  + z beta_K p_{n+K} + z sum_{j<K} beta_j y_{n+j}
    /// ```
    ///
    /// (the evaluations make `f = lambda y` of the corrected values).
    /// Substituting P into C and collecting `y_{n+j} <-> zeta^j` gives
    ///
    /// ```text
    /// pi(zeta, z) = rho(zeta) - z sigma(zeta) + z beta_K (rho*(zeta) - z sigma*(zeta)),
    /// ```
    ///
    /// since the `z beta_K zeta^K` of `sigma` cancels against the `zeta^K`
    /// of `rho*`. A unit test runs the PECE recursion itself on
    /// `y' = lambda y` and checks its growth against the roots of this
    /// polynomial.
    pub fn pece(predictor: &Lmm, corrector: &Lmm) -> CharPoly {
        let k = predictor.rho.len().max(corrector.rho.len()) - 1;
        let (rp, sp) = predictor.padded(k);
        let (rc, sc) = corrector.padded(k);
        let beta_k = sc[k];
        let p1 = (0..=k).map(|j| -sc[j] + beta_k * rp[j]).collect();
        let p2 = (0..=k).map(|j| -beta_k * sp[j]).collect();
        CharPoly {
            z_coeffs: vec![rc, p1, p2],
        }
    }

    /// Degree in `zeta` (the number of steps).
    pub fn degree(&self) -> usize {
        self.z_coeffs[0].len() - 1
    }

    /// The polynomial in `zeta` at a given `z`, written into `out`
    /// (length `degree() + 1`).
    pub(crate) fn at(&self, z: Complex64, out: &mut [Complex64]) {
        for (j, o) in out.iter_mut().enumerate() {
            let mut acc = Complex64::new(0.0, 0.0);
            for pm in self.z_coeffs.iter().rev() {
                acc = acc * z + pm[j];
            }
            *o = acc;
        }
    }

    fn at_vec(&self, z: Complex64) -> Vec<Complex64> {
        let mut c = vec![Complex64::new(0.0, 0.0); self.degree() + 1];
        self.at(z, &mut c);
        c
    }

    /// Largest `|zeta|` over the roots of `pi(zeta, z)`.
    pub fn spectral_radius(&self, z: Complex64) -> f64 {
        let c = self.at_vec(z);
        let r = poly::roots(&c);
        if r.len() < self.degree() {
            return f64::INFINITY; // the leading coefficient vanished: a root at infinity
        }
        r.iter().fold(0.0, |m, x| m.max(x.norm()))
    }

    /// The root condition at `z`: every root has `|zeta| <= 1` and those on
    /// the unit circle are simple (HW II, V.1, Definition 1.1). Tolerances:
    /// `1e-10` on the modulus, `1e-6` for roots counted as equal.
    pub fn root_condition(&self, z: Complex64) -> bool {
        let c = self.at_vec(z);
        let r = poly::roots(&c);
        if r.len() < self.degree() {
            return false;
        }
        for (i, a) in r.iter().enumerate() {
            let m = a.norm();
            if m > 1.0 + 1e-10 || !m.is_finite() {
                return false;
            }
            if m > 1.0 - 1e-10 && r.iter().skip(i + 1).any(|b| (a - b).norm() < 1e-6) {
                return false;
            }
        }
        true
    }

    /// Whether every root of `pi(zeta, z)` has `|zeta| < 1 + 1e-13` (the
    /// slack that absorbs round-off where the boundary touches a ray), by
    /// Schur–Cohn on `pi((1 + 1e-13) zeta, z)`; allocates nothing.
    pub(crate) fn within_slack(&self, z: Complex64) -> bool {
        self.within_radius(z, 1.0 + super::region::BOUNDARY_SLACK)
    }

    /// Whether every root of `pi(zeta, z)` has `|zeta| < radius`.
    pub(crate) fn within_radius(&self, z: Complex64, radius: f64) -> bool {
        let n = self.degree() + 1;
        if n > poly::MAX_SCHUR_DEGREE + 1 {
            return self.spectral_radius(z) < radius;
        }
        let mut c = [Complex64::new(0.0, 0.0); poly::MAX_SCHUR_DEGREE + 1];
        self.at(z, &mut c[..n]);
        let mut scale = 1.0;
        for cj in c[..n].iter_mut() {
            *cj *= scale;
            scale *= radius;
        }
        poly::all_roots_inside(&c[..n])
    }

    /// The largest `|zeta|` as `|z| -> infinity`: the roots of the top
    /// `P_M`; infinite when `P_M` has lower degree than `pi` (explicit
    /// methods and PECE modes).
    pub fn at_infinity(&self) -> f64 {
        let top = &self.z_coeffs[self.z_coeffs.len() - 1];
        let c: Vec<Complex64> = top.iter().map(|&x| Complex64::new(x, 0.0)).collect();
        let r = poly::roots(&c);
        if r.len() < self.degree() {
            return f64::INFINITY;
        }
        r.iter().fold(0.0, |m, x| m.max(x.norm()))
    }

    /// The boundary locus at `zeta = e^{i phi}`: the `z` with
    /// `pi(e^{i phi}, z) = 0` — one for a linear multistep method
    /// (`rho/sigma`), two for PECE. Returns the roots and their count;
    /// non-finite entries mark a root at infinity.
    pub(crate) fn locus_at(&self, phi: f64) -> ([Complex64; 2], usize) {
        let zeta = Complex64::from_polar(1.0, phi);
        let c0 = poly::eval_real(&self.z_coeffs[0], zeta);
        let c1 = poly::eval_real(&self.z_coeffs[1], zeta);
        let inf = Complex64::new(f64::INFINITY, 0.0);
        if self.z_coeffs.len() == 2 {
            return ([-c0 / c1, inf], 1);
        }
        let a = poly::eval_real(&self.z_coeffs[2], zeta);
        if a.norm_sqr() == 0.0 {
            return ([-c0 / c1, inf], 2);
        }
        // Stable quadratic formula: q = -(b + sign sqrt(b^2 - 4ac))/2.
        let d = (c1 * c1 - a * c0 * 4.0).sqrt();
        let s = if (c1.conj() * d).re >= 0.0 { d } else { -d };
        let q = -(c1 + s) * 0.5;
        if q.norm_sqr() == 0.0 {
            return ([Complex64::new(0.0, 0.0); 2], 2);
        }
        ([q / a, c0 / q], 2)
    }
}
