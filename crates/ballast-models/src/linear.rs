//! Linear constant-coefficient systems with a prescribed spectrum.

use ballast_core::{Jacobian, System};

/// `y' = A y` with `A = Q B Q`, where `B` is block diagonal with the real
/// eigenvalues `l_1, ..., l_r` on the diagonal followed by one block
/// `[[a, b], [-b, a]]` per complex pair `a ± i b`, and `Q = I - (2/n) 1 1^T`
/// is the Householder reflector of `v = (1, ..., 1)` (symmetric and
/// orthogonal, so `Q^{-1} = Q` and the spectrum of `A` is that of `B`).
/// A construction of this crate, for tests with known eigenvalues.
///
/// Exact solution ([`LinearSpectrum::exact`]):
/// `y(t) = Q exp(B t) Q y0`, with `exp` of a real eigenvalue `e^(l t)` and
/// of a block `e^(a t) [[cos bt, sin bt], [-sin bt, cos bt]]`.
///
/// When `n` is a power of two and the eigenvalues are small dyadic numbers
/// (the registry's cases: `n = 4`, eigenvalues in halves and integers),
/// every entry of `A` is exact in `f64`, so the closed form is the exact
/// solution of the system actually integrated.
///
/// ```
/// use ballast_models::LinearSpectrum;
/// let lin = LinearSpectrum::new(&[-1.0, -10.0], &[(-2.0, 30.0)]);
/// assert_eq!(lin.dim(), 4);
/// assert_eq!(lin.eigenvalues()[2], (-2.0, 30.0));
/// ```
#[derive(Clone, Debug, PartialEq)]
pub struct LinearSpectrum {
    real: Vec<f64>,
    pairs: Vec<(f64, f64)>,
    n: usize,
    /// `A`, row-major.
    a: Vec<f64>,
}

impl LinearSpectrum {
    /// The system with real eigenvalues `real` and complex pairs
    /// `a ± i b` for each `(a, b)` in `pairs` (dimension
    /// `real.len() + 2 pairs.len()`).
    ///
    /// # Panics
    /// If the dimension is zero.
    pub fn new(real: &[f64], pairs: &[(f64, f64)]) -> Self {
        let n = real.len() + 2 * pairs.len();
        assert!(n > 0, "LinearSpectrum: empty spectrum");
        let mut b = vec![0.0; n * n];
        for (i, &l) in real.iter().enumerate() {
            b[i * n + i] = l;
        }
        for (k, &(re, im)) in pairs.iter().enumerate() {
            let i = real.len() + 2 * k;
            b[i * n + i] = re;
            b[(i + 1) * n + i + 1] = re;
            b[i * n + i + 1] = im;
            b[(i + 1) * n + i] = -im;
        }
        // A = Q B Q, with Q B Q = B - w (1^T B) - (B 1) w^T + (1^T B 1) w w^T,
        // w = (2/n) 1; computed as two dense products for clarity.
        let q = |i: usize, j: usize| {
            if i == j {
                1.0 - 2.0 / n as f64
            } else {
                -2.0 / n as f64
            }
        };
        let mut qb = vec![0.0; n * n];
        for i in 0..n {
            for j in 0..n {
                qb[i * n + j] = (0..n).map(|k| q(i, k) * b[k * n + j]).sum();
            }
        }
        let mut a = vec![0.0; n * n];
        for i in 0..n {
            for j in 0..n {
                a[i * n + j] = (0..n).map(|k| qb[i * n + k] * q(k, j)).sum();
            }
        }
        Self {
            real: real.to_vec(),
            pairs: pairs.to_vec(),
            n,
            a,
        }
    }

    /// Dimension `n`.
    pub fn dim(&self) -> usize {
        self.n
    }

    /// The matrix `A`, row-major.
    pub fn matrix(&self) -> &[f64] {
        &self.a
    }

    /// The eigenvalues `(re, im)`: the real ones, then each pair as
    /// `(a, b)` and `(a, -b)`.
    pub fn eigenvalues(&self) -> Vec<(f64, f64)> {
        let mut ev: Vec<(f64, f64)> = self.real.iter().map(|&l| (l, 0.0)).collect();
        for &(a, b) in &self.pairs {
            ev.push((a, b));
            ev.push((a, -b));
        }
        ev
    }

    /// The spectral radius `max |lambda|`.
    pub fn spectral_radius(&self) -> f64 {
        self.eigenvalues()
            .iter()
            .map(|&(a, b)| a.hypot(b))
            .fold(0.0, f64::max)
    }

    /// The standard initial value `(1, 0, ..., 0)`.
    pub fn initial_value(&self) -> Vec<f64> {
        let mut y = vec![0.0; self.n];
        y[0] = 1.0;
        y
    }

    fn reflect(&self, x: &mut [f64]) {
        let s: f64 = x.iter().sum::<f64>() * 2.0 / self.n as f64;
        for v in x.iter_mut() {
            *v -= s;
        }
    }

    /// The exact solution `Q exp(B t) Q y0` at `t` from `y(0) = y0`.
    pub fn exact_from(&self, y0: &[f64], t: f64) -> Vec<f64> {
        let mut z = y0.to_vec();
        self.reflect(&mut z);
        for (i, &l) in self.real.iter().enumerate() {
            z[i] *= (l * t).exp();
        }
        for (k, &(re, im)) in self.pairs.iter().enumerate() {
            let i = self.real.len() + 2 * k;
            let g = (re * t).exp();
            let (s, c) = (im * t).sin_cos();
            let (z0, z1) = (z[i], z[i + 1]);
            z[i] = g * (c * z0 + s * z1);
            z[i + 1] = g * (-s * z0 + c * z1);
        }
        self.reflect(&mut z);
        z
    }

    /// The exact solution from the standard initial value.
    pub fn exact(&self, t: f64) -> Vec<f64> {
        self.exact_from(&self.initial_value(), t)
    }
}

impl System for LinearSpectrum {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        let n = self.n;
        for i in 0..n {
            dy[i] = self.a[i * n..(i + 1) * n]
                .iter()
                .zip(y)
                .map(|(a, y)| a * y)
                .sum();
        }
    }

    fn jacobian(&mut self, _t: f64, _y: &[f64], jac: &mut Jacobian) -> bool {
        let n = self.n;
        for i in 0..n {
            for j in 0..n {
                jac.set(i, j, self.a[i * n + j]);
            }
        }
        true
    }
}
