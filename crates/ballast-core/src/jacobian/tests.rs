//! Finite-difference Jacobians equal the analytic ones to the accuracy of a
//! forward difference, `O(sqrt(eps))` relative (common practice).

use super::*;
use crate::system::{SparsityPattern, WithJacobian, WithStructure};
use proptest::prelude::*;

/// A nonlinear tridiagonal field: `f_i = -a_i y_i^3 + y_{i-1} y_{i+1} + sin(t) y_i`.
fn tri(a: &[f64], t: f64, y: &[f64], d: &mut [f64]) {
    let n = y.len();
    for i in 0..n {
        let l = if i > 0 { y[i - 1] } else { 0.0 };
        let r = if i + 1 < n { y[i + 1] } else { 0.0 };
        d[i] = -a[i] * y[i].powi(3) + l * r + t.sin() * y[i];
    }
}

fn tri_jac(a: &[f64], t: f64, y: &[f64], jac: &mut Jacobian) {
    let n = y.len();
    for i in 0..n {
        let l = if i > 0 { y[i - 1] } else { 0.0 };
        let r = if i + 1 < n { y[i + 1] } else { 0.0 };
        jac.set(i, i, -3.0 * a[i] * y[i] * y[i] + t.sin());
        if i > 0 {
            jac.set(i, i - 1, r);
        }
        if i + 1 < n {
            jac.set(i, i + 1, l);
        }
    }
}

fn tri_pattern(n: usize) -> SparsityPattern {
    let e: Vec<(usize, usize)> = (0..n)
        .flat_map(|i| (i.saturating_sub(1)..(i + 2).min(n)).map(move |j| (i, j)))
        .collect();
    SparsityPattern::new(n, &e).unwrap()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(32))]

    #[test]
    fn grouped_differences_match_the_analytic_jacobian(
        y in prop::collection::vec(-2.0f64..2.0, 2..30),
        t in 0.0f64..3.0,
    ) {
        let n = y.len();
        let a: Vec<f64> = (0..n).map(|i| 1.0 + i as f64 * 0.1).collect();
        let mut exact = Jacobian::dense(n);
        tri_jac(&a, t, &y, &mut exact);
        let mut f0 = vec![0.0; n];
        tri(&a, t, &y, &mut f0);
        let structures = [
            (Structure::Dense, n),
            (Structure::Banded { lower: 1, upper: 1 }, 3.min(n)),
            (Structure::Sparse(tri_pattern(n)), 3.min(n)),
        ];
        for (s, calls) in structures {
            let sys = WithStructure::new(|t: f64, y: &[f64], d: &mut [f64]| tri(&a, t, y, d), s.clone());
            let mut p = Problem::new(sys, n);
            let mut ev = JacobianEval::new(n, &s, JacobianSource::Auto).unwrap();
            let mut jac = Jacobian::for_structure(n, &s);
            ev.evaluate(&mut p, t, 0.0, &y, &f0, &mut jac).unwrap();
            prop_assert_eq!(ev.uses_analytic(), Some(false));
            prop_assert_eq!(p.counters.jacobian_rhs_evals, calls);
            prop_assert_eq!(p.counters.rhs_evals, calls);
            let f_max = f0.iter().fold(1.0f64, |m, v| m.max(v.abs()));
            for i in 0..n {
                for j in 0..n {
                    let e = exact.get(i, j);
                    // Forward-difference error with increment d_j: truncation
                    // |f''| d_j / 2 plus rounding ~ eps |f| / d_j (common practice).
                    let d = f64::EPSILON.sqrt() * y[j].abs().max(FD_FLOOR);
                    let truncation = (6.0 * a[i] * (y[i].abs() + d) + 2.0) * d;
                    let rounding = 8.0 * f64::EPSILON * f_max / d;
                    let bound = 1e-6 * (1.0 + e.abs()) + truncation + rounding;
                    prop_assert!((jac.get(i, j) - e).abs() < bound, "({},{}) {} vs {}", i, j, jac.get(i, j), e);
                }
            }
        }
    }
}

#[test]
fn analytic_jacobian_is_used_when_given() {
    let n = 4;
    let a = vec![1.0; n];
    let sys = WithJacobian::new(
        |t: f64, y: &[f64], d: &mut [f64]| tri(&[1.0; 4], t, y, d),
        |t: f64, y: &[f64], j: &mut Jacobian| tri_jac(&[1.0; 4], t, y, j),
    );
    let mut p = Problem::new(sys, n);
    let y = [0.5, -1.0, 2.0, 1.5];
    let mut f0 = [0.0; 4];
    tri(&a, 0.3, &y, &mut f0);
    let mut ev = JacobianEval::new(n, &Structure::Dense, JacobianSource::Auto).unwrap();
    let mut jac = Jacobian::dense(n);
    ev.evaluate(&mut p, 0.3, 0.0, &y, &f0, &mut jac).unwrap();
    assert_eq!(ev.uses_analytic(), Some(true));
    assert_eq!(p.counters.rhs_evals, 0);
    assert_eq!(p.counters.jacobian_evals, 1);
    let mut want = Jacobian::dense(n);
    tri_jac(&a, 0.3, &y, &mut want);
    assert_eq!(jac, want);
}

#[test]
fn demanded_analytic_jacobian_that_is_missing_is_an_error() {
    let mut p = Problem::new(|_t: f64, y: &[f64], d: &mut [f64]| d[0] = -y[0], 1);
    let mut ev = JacobianEval::new(1, &Structure::Dense, JacobianSource::Analytic).unwrap();
    let mut jac = Jacobian::dense(1);
    assert_eq!(
        ev.evaluate(&mut p, 0.0, 0.0, &[1.0], &[-1.0], &mut jac),
        Err(StepFailure::NewtonFailed)
    );
    assert_eq!(ev.issue(), Some(JacobianIssue::Missing));
}

#[test]
fn time_derivative_of_a_forced_decay() {
    // f = -y + cos t: f_t = -sin t (closed form).
    let mut p = Problem::new(|t: f64, y: &[f64], d: &mut [f64]| d[0] = -y[0] + t.cos(), 1);
    let (t, y) = (0.7f64, [0.2]);
    let f0 = [-0.2 + t.cos()];
    let mut ft = [0.0];
    time_derivative(&mut p, t, &y, &f0, &mut ft);
    assert!((ft[0] + t.sin()).abs() < 1e-7);
}
