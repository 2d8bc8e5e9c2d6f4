//! One step on the linear test equation `y' = lambda y`, real and complex
//! `lambda` (complex as the real 2D system `(u, v)' = (a u - b v, b u + a v)`
//! for `lambda = a + i b`). An explicit Runge–Kutta step multiplies `y_0`
//! by its stability polynomial `R(h lambda)` (Hairer and Wanner II, IV.2).

use super::problems::plain_norm;
use super::{dop853_rows, METHODS, TABLEAUX};
use crate::build::build;
use crate::explicit::dp853_tableau as dop;
use crate::method::Method;
use crate::options::SchemeOptions;
use crate::problem::Problem;
use crate::system::Structure;
use num_complex::Complex64;

const H: f64 = 0.4;

/// Values of `lambda` for the tests: real, and complex in both half-planes.
fn lambdas() -> [Complex64; 7] {
    [
        Complex64::new(-1.0, 0.0),
        Complex64::new(-3.0, 0.0),
        Complex64::new(0.5, 0.0),
        Complex64::new(-1.0, 2.0),
        Complex64::new(-0.2, 1.0),
        Complex64::new(0.3, -1.5),
        Complex64::new(0.0, 3.0),
    ]
}

/// One step of size `H` of `method` from `y_0 = 1` on `y' = lambda y`, as a complex number.
fn one_step(method: Method, lambda: Complex64) -> Complex64 {
    let (a, b) = (lambda.re, lambda.im);
    let rhs = move |_t: f64, y: &[f64], dy: &mut [f64]| {
        dy[0] = a * y[0] - b * y[1];
        dy[1] = b * y[0] + a * y[1];
    };
    let mut p = Problem::new(rhs, 2);
    let mut s = build(method, 2, &Structure::Dense, &SchemeOptions::default()).unwrap();
    s.start(&mut p, 0.0, &[1.0, 0.0]).unwrap();
    s.attempt(&mut p, H, &plain_norm(2)).unwrap();
    s.accept(&mut p);
    Complex64::new(s.y()[0], s.y()[1])
}

/// `sum_{k=0..=p} z^k / k!`.
fn truncated_exp(z: Complex64, p: usize) -> Complex64 {
    let (mut term, mut sum) = (Complex64::new(1.0, 0.0), Complex64::new(1.0, 0.0));
    for k in 1..=p {
        term *= z / k as f64;
        sum += term;
    }
    sum
}

/// `R(z) = 1 + sum_{k>=1} z^k b^T A^{k-1} 1` of a strictly lower-triangular tableau.
fn stability_polynomial(a: &[&[f64]], b: &[f64], z: Complex64) -> Complex64 {
    let s = a.len();
    let mut v = vec![1.0; s];
    let (mut zk, mut r) = (Complex64::new(1.0, 0.0), Complex64::new(1.0, 0.0));
    for _ in 0..s {
        zk *= z;
        r += zk * b.iter().zip(&v).map(|(x, y)| x * y).sum::<f64>();
        v = (0..s)
            .map(|i| a[i].iter().zip(&v).map(|(x, y)| x * y).sum())
            .collect();
    }
    r
}

#[test]
fn low_order_methods_multiply_by_the_truncated_exponential() {
    // For s = p <= 4 stages the stability polynomial is the exponential
    // series truncated after z^p (closed form; Hairer and Wanner II, IV.2):
    // 1 + z, 1 + z + z^2/2, 1 + z + z^2/2 + z^3/6 + z^4/24.
    for (method, p) in [
        (Method::ForwardEuler, 1),
        (Method::Heun, 2),
        (Method::Rk4, 4),
    ] {
        for lambda in lambdas() {
            let want = truncated_exp(H * lambda, p);
            let got = one_step(method, lambda);
            assert!(
                (got - want).norm() < 1e-14 * want.norm().max(1.0),
                "{method:?}, lambda {lambda}"
            );
        }
    }
}

#[test]
fn dormand_prince_54_has_its_published_stability_polynomial() {
    // R(z) = 1 + z + z^2/2 + z^3/6 + z^4/24 + z^5/120 + z^6/600, from memory
    // of Hairer and Wanner II, IV.2 (the stability function of Dormand–Prince 5(4)).
    for lambda in lambdas() {
        let z = H * lambda;
        let want = truncated_exp(z, 5) + z.powi(6) / 600.0;
        let got = one_step(Method::DormandPrince54, lambda);
        assert!(
            (got - want).norm() < 1e-14 * want.norm().max(1.0),
            "lambda {lambda}"
        );
    }
}

#[test]
fn every_step_equals_the_stability_polynomial_of_its_tableau() {
    // R(z) = 1 + z b^T (I - zA)^{-1} 1 (Hairer and Wanner II, IV.2), a
    // polynomial for explicit tableaux.
    for (method, _) in METHODS {
        let (a, b): (&[&[f64]], &[f64]) = match TABLEAUX.iter().find(|t| t.method == method) {
            Some(t) => (t.a, t.b),
            None => (dop853_rows(), &dop::B),
        };
        for lambda in lambdas() {
            let z = H * lambda;
            let want = stability_polynomial(a, b, z);
            let got = one_step(method, lambda);
            assert!(
                (got - want).norm() < 1e-13 * want.norm().max(1.0),
                "{method:?}, lambda {lambda}"
            );
        }
    }
}

#[test]
fn stability_polynomials_agree_with_the_exponential_up_to_the_order() {
    // R(z) = sum_k gamma_k z^k with gamma_k = b^T A^(k-1) 1 equals e^z up
    // to z^p and differs at z^(p+1) (Hairer and Wanner II, IV.2).
    for (method, p) in METHODS {
        let (a, b): (&[&[f64]], &[f64]) = match TABLEAUX.iter().find(|t| t.method == method) {
            Some(t) => (t.a, t.b),
            None => (dop853_rows(), &dop::B),
        };
        let s = a.len();
        let mut v = vec![1.0; s];
        let mut factorial = 1.0;
        for k in 1..=p + 1 {
            factorial *= k as f64;
            let gamma: f64 = b.iter().zip(&v).map(|(x, y)| x * y).sum();
            let gap = (gamma * factorial - 1.0).abs();
            if k <= p {
                assert!(
                    gap < 1e-12,
                    "{method:?}: z^{k} coefficient off by {gap:e} (relative)"
                );
            } else {
                assert!(gap > 1e-6, "{method:?}: z^{k} coefficient matches e^z too");
            }
            v = (0..s)
                .map(|i| a[i].iter().zip(&v).map(|(x, y)| x * y).sum())
                .collect();
        }
    }
}
