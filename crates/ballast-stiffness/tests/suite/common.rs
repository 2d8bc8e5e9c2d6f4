//! Test matrices with prescribed spectra, built by similarity transforms,
//! and the reference spectral radius from a general-purpose eigen-solver.

use nalgebra::DMatrix;

/// A deterministic generator (splitmix64) for test data.
pub struct Rng(u64);

impl Rng {
    pub fn new(seed: u64) -> Self {
        Self(seed)
    }
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in `[0, 1)`.
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }
    /// Standard normal (Box–Muller).
    pub fn normal(&mut self) -> f64 {
        let u1 = 1.0 - self.uniform();
        let u2 = self.uniform();
        (-2.0 * u1.ln()).sqrt() * (std::f64::consts::TAU * u2).cos()
    }
}

/// One real eigenvalue or one conjugate pair `re ± i im`.
#[derive(Clone, Copy, Debug)]
pub enum Eig {
    Real(f64),
    Pair(f64, f64),
}

impl Eig {
    pub fn modulus(&self) -> f64 {
        match *self {
            Eig::Real(x) => x.abs(),
            Eig::Pair(a, b) => a.hypot(b),
        }
    }
    pub fn size(&self) -> usize {
        match self {
            Eig::Real(_) => 1,
            Eig::Pair(..) => 2,
        }
    }
}

/// The real block-diagonal matrix with the given spectrum: `[[a, b], [-b, a]]`
/// for a pair.
pub fn block_diagonal(spec: &[Eig]) -> DMatrix<f64> {
    let n: usize = spec.iter().map(Eig::size).sum();
    let mut d = DMatrix::zeros(n, n);
    let mut k = 0;
    for e in spec {
        match *e {
            Eig::Real(x) => {
                d[(k, k)] = x;
                k += 1;
            }
            Eig::Pair(a, b) => {
                d[(k, k)] = a;
                d[(k + 1, k + 1)] = a;
                d[(k, k + 1)] = b;
                d[(k + 1, k)] = -b;
                k += 2;
            }
        }
    }
    d
}

/// Which eigenvector basis to use.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Basis {
    /// Orthogonal `V` (the Q factor of a Gaussian matrix): `A` is normal
    /// up to its 2×2 blocks.
    Orthogonal,
    /// `V = I + s G / sqrt(n)` with Gaussian `G`: mildly non-normal
    /// (`||s G / sqrt(n)||_2 ≈ 2 s`).
    Perturbed(f64),
}

pub fn basis(n: usize, kind: Basis, rng: &mut Rng) -> DMatrix<f64> {
    let g = DMatrix::from_fn(n, n, |_, _| rng.normal());
    match kind {
        Basis::Orthogonal => g.qr().q(),
        Basis::Perturbed(s) => DMatrix::identity(n, n) + g * (s / (n as f64).sqrt()),
    }
}

/// `A = V D V^{-1}`.
pub fn similar(v: &DMatrix<f64>, d: &DMatrix<f64>) -> DMatrix<f64> {
    let vinv = v.clone().try_inverse().expect("basis is invertible");
    v * d * vinv
}

/// 2-norm condition number.
pub fn cond(v: &DMatrix<f64>) -> f64 {
    let s = v.clone().singular_values();
    s.max() / s.min()
}

/// Spectral radius by faer's eigenvalue decomposition (Hessenberg
/// reduction and the implicit double-shift / multishift QR algorithm, as
/// in LAPACK's `dgeev`): the reference. (nalgebra's `complex_eigenvalues`
/// was tried first: its unbalanced Schur iteration has no iteration cap
/// and did not return on one 200×200 matrix with a triple eigenvalue.)
pub fn reference_radius(a: &DMatrix<f64>) -> f64 {
    let m = faer::Mat::<f64>::from_fn(a.nrows(), a.ncols(), |i, j| a[(i, j)]);
    let eig = m.eigenvalues().expect("faer eigenvalues converge");
    eig.iter().map(|z| z.re.hypot(z.im)).fold(0.0, f64::max)
}

/// The same by nalgebra's real Schur decomposition, capped at `30 n`
/// iterations (`None` when the cap is hit): a second, independent opinion.
pub fn reference_radius_nalgebra(a: &DMatrix<f64>) -> Option<f64> {
    let n = a.nrows();
    let schur = nalgebra::Schur::try_new(a.clone(), f64::EPSILON, 30 * n.max(1))?;
    Some(
        schur
            .complex_eigenvalues()
            .iter()
            .map(|z| z.norm())
            .fold(0.0, f64::max),
    )
}

/// `||A||_2` by the SVD.
pub fn norm2(a: &DMatrix<f64>) -> f64 {
    a.clone().singular_values().max()
}

/// `out = A v` for a nalgebra matrix (column-major storage).
pub fn product(a: &DMatrix<f64>) -> impl FnMut(&[f64], &mut [f64]) + '_ {
    ballast_stiffness::dense_product(a.nrows(), a.as_slice())
}

/// Gershgorin bound of a nalgebra matrix.
pub fn gershgorin(a: &DMatrix<f64>) -> f64 {
    ballast_stiffness::gershgorin_bound(a.nrows(), a.as_slice()).unwrap()
}

/// Accuracy and cost of a family of estimates.
#[derive(Default, Debug)]
pub struct Tally {
    pub cases: usize,
    pub converged: usize,
    pub max_rel_err: f64,
    pub sum_products: usize,
    pub max_products: usize,
}

impl Tally {
    pub fn add(&mut self, rel_err: f64, products: usize, converged: bool) {
        self.cases += 1;
        self.converged += usize::from(converged);
        self.max_rel_err = self.max_rel_err.max(rel_err);
        self.sum_products += products;
        self.max_products = self.max_products.max(products);
    }
    pub fn mean_products(&self) -> f64 {
        self.sum_products as f64 / self.cases.max(1) as f64
    }
    pub fn line(&self, name: &str) -> String {
        format!(
            "{name:<44} cases {:>4}  converged {:>4}  max rel err {:.2e}  products mean {:>5.1} max {:>3}",
            self.cases,
            self.converged,
            self.max_rel_err,
            self.mean_products(),
            self.max_products
        )
    }
}
