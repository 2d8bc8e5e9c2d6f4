//! Stability functions: `R(z)` of Runge–Kutta and Rosenbrock methods, and
//! the characteristic polynomial of multistep methods.

use num_complex::Complex64;

use super::multistep::CharPoly;
use super::poly;
use crate::explicit::Tableau;
use crate::implicit::tableau::{ImplicitTableau, RosenbrockTableau};

/// Largest stage count [`StabilityFunction::eval`] solves without allocating.
const MAX_STACK_STAGES: usize = 16;

/// What a method does to the test equation `y' = lambda y`, `z = h lambda`.
#[derive(Clone, Debug)]
pub enum StabilityFunction {
    /// A Runge–Kutta method (explicit, diagonally or fully implicit):
    /// `R(z) = 1 + z b^T (I - zA)^{-1} 1` (Hairer and Wanner II, IV.3,
    /// eq. (3.2)).
    RungeKutta {
        /// Number of stages `s`.
        stages: usize,
        /// The full `s x s` matrix `A`, row-major.
        a: Vec<f64>,
        /// Weights `b`.
        b: Vec<f64>,
    },
    /// A Rosenbrock method. On `y' = lambda y` the stages solve
    /// `k = z y 1 + z B k` with `B = (alpha_ij + gamma_ij)` (diagonal
    /// `gamma`), so `R(z) = 1 + z b^T (I - zB)^{-1} 1` (Hairer and Wanner II,
    /// IV.7, eq. (7.15)).
    Rosenbrock {
        /// Number of stages `s`.
        stages: usize,
        /// `B = alpha + Gamma`, lower triangular, row-major `s x s`.
        beta: Vec<f64>,
        /// Weights `b`.
        b: Vec<f64>,
    },
    /// A multistep method (or a predictor–corrector mode of one): `z` is
    /// in the region when every root `zeta` of the characteristic
    /// polynomial `pi(zeta, z)` has `|zeta| <= 1`, those on the circle simple.
    Multistep(CharPoly),
}

impl StabilityFunction {
    /// From an explicit Runge–Kutta tableau (its `a` rows are read as the
    /// strictly lower triangle of `A`).
    pub fn from_explicit(t: &Tableau) -> Self {
        Self::from_explicit_rows(t.a, t.b)
    }

    /// From the rows of a strictly lower-triangular `A` (row `i` has at
    /// most `i` entries; missing entries are 0) and the weights `b`; rows
    /// beyond `b.len()` (e.g. dense-output stages) are ignored.
    pub fn from_explicit_rows(rows: &[&[f64]], b: &[f64]) -> Self {
        let s = b.len();
        let mut a = vec![0.0; s * s];
        for (i, row) in rows.iter().take(s).enumerate() {
            for (j, &x) in row.iter().take(i).enumerate() {
                a[i * s + j] = x;
            }
        }
        StabilityFunction::RungeKutta {
            stages: s,
            a,
            b: b.to_vec(),
        }
    }

    /// From an implicit Runge–Kutta tableau (full `A`).
    pub fn from_implicit(t: &ImplicitTableau) -> Self {
        let s = t.stages();
        let a = t.a.iter().flat_map(|row| row.iter().copied()).collect();
        StabilityFunction::RungeKutta {
            stages: s,
            a,
            b: t.b.to_vec(),
        }
    }

    /// From Rosenbrock coefficients `(alpha_ij, gamma_ij, gamma, b)`.
    pub fn from_rosenbrock(t: &RosenbrockTableau) -> Self {
        let s = t.stages();
        let mut beta = vec![0.0; s * s];
        for i in 0..s {
            for j in 0..i {
                beta[i * s + j] = t.alpha[i][j] + t.gamma_ij[i][j];
            }
            beta[i * s + i] = t.gamma;
        }
        StabilityFunction::Rosenbrock {
            stages: s,
            beta,
            b: t.b.to_vec(),
        }
    }

    /// `(s, A, b)` of the one-step forms (`B` for Rosenbrock).
    fn one_step(&self) -> Option<(usize, &[f64], &[f64])> {
        match self {
            StabilityFunction::RungeKutta { stages, a, b } => Some((*stages, a, b)),
            StabilityFunction::Rosenbrock { stages, beta, b } => Some((*stages, beta, b)),
            StabilityFunction::Multistep(_) => None,
        }
    }

    /// `R(z)` for one-step methods, by solving `(I - zA) x = 1` in complex
    /// arithmetic (Gaussian elimination with partial pivoting); infinite
    /// at a pole. `None` for multistep methods, which have no single `R`.
    pub fn eval(&self, z: Complex64) -> Option<Complex64> {
        let (s, a, b) = self.one_step()?;
        let mut stack = [Complex64::new(0.0, 0.0); MAX_STACK_STAGES * (MAX_STACK_STAGES + 1)];
        let mut heap;
        let m: &mut [Complex64] = if s <= MAX_STACK_STAGES {
            &mut stack[..s * (s + 1)]
        } else {
            heap = vec![Complex64::new(0.0, 0.0); s * (s + 1)];
            &mut heap
        };
        let w = s + 1;
        for i in 0..s {
            for j in 0..s {
                let delta = if i == j { 1.0 } else { 0.0 };
                m[i * w + j] = Complex64::new(delta, 0.0) - z * a[i * s + j];
            }
            m[i * w + s] = Complex64::new(1.0, 0.0);
        }
        for k in 0..s {
            let p = (k..s)
                .max_by(|&i, &j| m[i * w + k].norm().total_cmp(&m[j * w + k].norm()))
                .unwrap_or(k);
            if m[p * w + k].norm() == 0.0 {
                return Some(Complex64::new(f64::INFINITY, 0.0));
            }
            if p != k {
                for j in 0..w {
                    m.swap(k * w + j, p * w + j);
                }
            }
            for i in k + 1..s {
                let f = m[i * w + k] / m[k * w + k];
                if f.norm() != 0.0 {
                    for j in k..w {
                        let mkj = m[k * w + j];
                        m[i * w + j] -= f * mkj;
                    }
                }
            }
        }
        for k in (0..s).rev() {
            let mut sum = m[k * w + s];
            for j in k + 1..s {
                sum -= m[k * w + j] * m[j * w + s];
            }
            m[k * w + s] = sum / m[k * w + k];
        }
        let bx: Complex64 = (0..s).map(|i| m[i * w + s] * b[i]).sum();
        Some(Complex64::new(1.0, 0.0) + z * bx)
    }

    /// Whether `z` is in the (closed) stability region: `|R(z)| <= 1` for
    /// one-step methods, the root condition for multistep methods. A
    /// relative slack of `1e-13` absorbs round-off on the boundary.
    pub fn is_stable(&self, z: Complex64) -> bool {
        match self {
            StabilityFunction::Multistep(p) => p.root_condition(z),
            _ => self.growth(z) <= 1.0 + super::region::BOUNDARY_SLACK,
        }
    }

    /// The amplification of one step: `|R(z)|` for one-step methods, the
    /// largest `|zeta|` among the roots of `pi(zeta, z)` for multistep ones.
    pub fn growth(&self, z: Complex64) -> f64 {
        match self {
            StabilityFunction::Multistep(p) => p.spectral_radius(z),
            _ => self.eval(z).map_or(f64::INFINITY, |r| r.norm()),
        }
    }

    /// `R = P/Q` as two real polynomials (ascending powers) for one-step
    /// methods: `Q(z) = det(I - zA)` and `P = Q R` (degree `<= s`).
    pub fn rational(&self) -> Option<Rational> {
        let (s, a, b) = self.one_step()?;
        // Q(z) = det(I - zA): the product of (1 - z a_ii) when A is lower
        // triangular, else the Faddeev–LeVerrier characteristic polynomial
        // det(x I - A) = sum_k c_k x^(s-k), which gives det(I - zA) = sum_k c_k z^k.
        let lower = (0..s).all(|i| (i + 1..s).all(|j| a[i * s + j] == 0.0));
        let q = if lower {
            let mut q = vec![1.0];
            for i in 0..s {
                let d = a[i * s + i];
                let mut next = vec![0.0; q.len() + 1];
                for (k, &qk) in q.iter().enumerate() {
                    next[k] += qk;
                    next[k + 1] -= d * qk;
                }
                q = next;
            }
            q
        } else {
            faddeev_leverrier(s, a)
        };
        // Taylor coefficients of R: r_0 = 1, r_k = b^T A^(k-1) 1.
        let mut r = vec![1.0; s + 1];
        let mut v = vec![1.0; s];
        for rk in r.iter_mut().skip(1) {
            *rk = (0..s).map(|i| b[i] * v[i]).sum();
            v = (0..s)
                .map(|i| (0..s).map(|j| a[i * s + j] * v[j]).sum())
                .collect();
        }
        // P = Q R truncated at degree s (exact: P has degree <= s).
        let p = (0..=s)
            .map(|k| {
                (0..=k)
                    .map(|j| q.get(j).copied().unwrap_or(0.0) * r[k - j])
                    .sum()
            })
            .collect();
        Some(Rational { p, q })
    }
}

/// Coefficients `c_0 = 1, c_1, ..., c_s` of `det(x I - A) = sum_k c_k x^(s-k)`.
fn faddeev_leverrier(s: usize, a: &[f64]) -> Vec<f64> {
    let mut c = vec![1.0; s + 1];
    let mut m = vec![0.0; s * s]; // M_0 = 0
    for k in 1..=s {
        // M_k = A M_{k-1} + c_{k-1} I; c_k = -tr(A M_k)/k.
        let mut next = vec![0.0; s * s];
        for i in 0..s {
            for j in 0..s {
                next[i * s + j] = (0..s).map(|l| a[i * s + l] * m[l * s + j]).sum::<f64>();
            }
            next[i * s + i] += c[k - 1];
        }
        m = next;
        let tr: f64 = (0..s)
            .map(|i| (0..s).map(|l| a[i * s + l] * m[l * s + i]).sum::<f64>())
            .sum();
        c[k] = -tr / k as f64;
    }
    c
}

/// A one-step stability function as a quotient of real polynomials.
#[derive(Clone, Debug)]
pub struct Rational {
    /// Numerator coefficients, ascending powers of `z`.
    pub p: Vec<f64>,
    /// Denominator coefficients, ascending powers of `z`.
    pub q: Vec<f64>,
}

impl Rational {
    /// `|R(z)| = |P(z)| / |Q(z)|` (infinite at a pole).
    pub fn modulus(&self, z: Complex64) -> f64 {
        let num = poly::eval_real(&self.p, z).norm_sqr();
        let den = poly::eval_real(&self.q, z).norm_sqr();
        if den == 0.0 {
            f64::INFINITY
        } else {
            (num / den).sqrt()
        }
    }

    /// Whether `Q` is constant (an explicit method: `R` is a polynomial).
    pub fn is_polynomial(&self) -> bool {
        self.q.iter().skip(1).all(|&x| x == 0.0)
    }

    /// `|R(infinity)|`: the limit of `|R(z)|` as `|z| -> infinity`
    /// (`infinity` when `deg P > deg Q`).
    pub fn at_infinity(&self) -> f64 {
        // Coefficients below 1e-12 of the largest are round-off of exact
        // zeros (e.g. the top coefficients of P for stiffly accurate methods).
        let deg = |c: &[f64]| {
            let big = c.iter().fold(0.0f64, |m, x| m.max(x.abs()));
            c.iter().rposition(|&x| x.abs() > 1e-12 * big).unwrap_or(0)
        };
        let (dp, dq) = (deg(&self.p), deg(&self.q));
        if dp > dq {
            f64::INFINITY
        } else if dp < dq {
            0.0
        } else {
            (self.p[dp] / self.q[dq]).abs()
        }
    }
}
