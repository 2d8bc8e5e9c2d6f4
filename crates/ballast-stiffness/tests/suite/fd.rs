//! Finite-difference Jacobian-vector products against analytic ones, and
//! the matrix-free estimate on a nonlinear right-hand side.

use ballast_stiffness::{fd_jvp, spectral_radius, PowerOptions, SpectralEstimator};
use nalgebra::DMatrix;

use crate::common::*;

/// `f(y) = A y + c * (y.^2) + sin(y)`: smooth, with the analytic Jacobian
/// `A + diag(2 c y + cos y)`.
struct Smooth {
    a: DMatrix<f64>,
    c: f64,
}

impl Smooth {
    fn f(&self, y: &[f64], out: &mut [f64]) {
        let n = y.len();
        let ay = &self.a * nalgebra::DVector::from_column_slice(y);
        for i in 0..n {
            out[i] = ay[i] + self.c * y[i] * y[i] + y[i].sin();
        }
    }
    fn jacobian(&self, y: &[f64]) -> DMatrix<f64> {
        let mut j = self.a.clone();
        for i in 0..y.len() {
            j[(i, i)] += 2.0 * self.c * y[i] + y[i].cos();
        }
        j
    }
}

#[test]
fn fd_products_agree_with_the_analytic_jacobian_to_sqrt_eps() {
    // The one-sided difference has error ~ sqrt(eps) (||f''|| (1 + ||y||) + ||f|| / (1 + ||y||))
    // relative to ||J|| ||v||; ask for 100 sqrt(eps) = 1.5e-6.
    let sqrt_eps = f64::EPSILON.sqrt();
    let mut worst = 0.0f64;
    for (k, n) in [1usize, 2, 5, 20, 100].into_iter().enumerate() {
        let mut rng = Rng::new(40 + k as u64);
        let a = DMatrix::from_fn(n, n, |_, _| 10.0 * rng.normal());
        let sys = Smooth { a, c: 0.5 };
        let y: Vec<f64> = (0..n).map(|_| rng.normal()).collect();
        let mut fy = vec![0.0; n];
        sys.f(&y, &mut fy);
        let j = sys.jacobian(&y);
        let jn = norm2(&j);
        let (mut yp, mut fp, mut out) = (vec![0.0; n], vec![0.0; n], vec![0.0; n]);
        let mut f = |y: &[f64], o: &mut [f64]| sys.f(y, o);
        for _ in 0..5 {
            let v: Vec<f64> = (0..n).map(|_| rng.normal()).collect();
            fd_jvp(&mut f, &y, &fy, &v, &mut yp, &mut fp, &mut out).unwrap();
            let exact = &j * nalgebra::DVector::from_column_slice(&v);
            let err = (nalgebra::DVector::from_column_slice(&out) - &exact).norm();
            let rel = err / (jn * nalgebra::DVector::from_column_slice(&v).norm());
            worst = worst.max(rel);
            assert!(rel < 100.0 * sqrt_eps, "n={n}: {rel:e}");
        }
    }
    eprintln!("fd products, smooth random f, n = 1..100: max error / (||J|| ||v||) = {worst:.1e} (sqrt eps = {sqrt_eps:.1e})");
}

#[test]
fn matrix_free_estimate_matches_the_analytic_one() {
    let n = 50;
    let mut rng = Rng::new(8);
    // A stiff linear part with a spread spectrum plus the smooth nonlinearity.
    let spec: Vec<Eig> = (0..n)
        .map(|_| Eig::Real(-(10f64.powf(4.0 * rng.uniform()))))
        .collect();
    let a = similar(
        &basis(n, Basis::Perturbed(0.2), &mut rng),
        &block_diagonal(&spec),
    );
    let sys = Smooth { a, c: 0.5 };
    let y: Vec<f64> = (0..n).map(|_| rng.normal()).collect();
    let mut fy = vec![0.0; n];
    sys.f(&y, &mut fy);
    let j = sys.jacobian(&y);
    let rho = reference_radius(&j);
    let opts = PowerOptions::default();
    let analytic = spectral_radius(n, product(&j), &opts);
    let mut est = SpectralEstimator::new(n);
    let fd = est
        .estimate_fd(|y: &[f64], o: &mut [f64]| sys.f(y, o), &y, &fy, &opts)
        .unwrap();
    assert_eq!(est.fd_mut().evals(), fd.products);
    for e in [analytic, fd] {
        assert!((e.radius - rho).abs() < 0.05 * rho, "{e:?} vs {rho}");
    }
    assert!((analytic.radius - fd.radius).abs() < 1e-4 * rho);
    assert!(est
        .estimate_fd(|_: &[f64], _: &mut [f64]| {}, &y[1..], &fy, &opts)
        .is_err());
}
