//! Unit tests of the multistep schemes on closed-form problems (the
//! convergence orders are measured in `tests/multistep/convergence.rs`).

use super::coefficients::{factorial, Coefficients, Family};
use super::{Adams, Bdf};
use crate::norm::{Atol, ErrorNorm};
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::{Scheme, SchemeState};
use crate::system::Structure;

/// Nordsieck columns `h^j y^{(j)}(t) / j!` of `y = t^m` (one component).
fn power_history(m: usize, t: f64, h: f64, q: usize) -> Vec<f64> {
    (0..=q)
        .map(|j| {
            if j > m {
                0.0
            } else {
                let falling: f64 = (0..j).map(|i| (m - i) as f64).product();
                h.powi(j as i32) * falling * t.powi((m - j) as i32) / factorial(j)
            }
        })
        .collect()
}

#[test]
fn adams_local_error_on_a_polynomial_is_the_error_constant() {
    // y' = (q+1) t^q, y = t^{q+1}: after q steps the slope history is the
    // exact interpolant, and each increment errs by exactly
    // C_q h^{q+1} (q+1)! with C_q = -gamma*_q (closed form; constants
    // from the recursion of HNW I, III.1).
    for q in 1..=12 {
        let m = q + 1;
        let rhs = move |t: f64, _y: &[f64], dy: &mut [f64]| dy[0] = m as f64 * t.powi(q as i32);
        let mut p = Problem::new(rhs, 1);
        let (t0, h) = (0.5, 0.05);
        let mut a = Adams::new(1).with_fixed_order(q);
        a.start_with_history(&mut p, t0, q, h, &power_history(m, t0, h, q))
            .unwrap();
        let norm = ErrorNorm::new(1.0, Atol::Scalar(1.0), 1);
        let want =
            Coefficients::new(Family::Adams).error_constant(q) * h.powi(m as i32) * factorial(m);
        for step in 0..(q + 3) {
            let (t, y) = (a.t(), a.y()[0]);
            let at = a.attempt(&mut p, h, &norm).unwrap();
            a.accept(&mut p);
            let exact = (t + h).powi(m as i32) - t.powi(m as i32);
            let err = a.y()[0] - y - exact;
            if step >= q {
                assert!(
                    (err - want).abs() <= 1e-6 * want.abs() + 1e-13,
                    "q={q}: {err} vs {want}"
                );
                // The estimate is |C_q| ||v|| with v = h^{q+1} y^{(q+1)} here.
                let est = at.error * (1.0 + y.abs().max(a.y()[0].abs()));
                assert!(
                    (est - want.abs()).abs() <= 1e-6 * want.abs() + 1e-13,
                    "q={q}"
                );
            }
        }
    }
}

#[test]
fn dense_output_reproduces_the_step_end_points() {
    let rhs = |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0];
    let mut p = Problem::new(rhs, 1);
    let mut a = Adams::new(1);
    let norm = ErrorNorm::new(1e-8, Atol::Scalar(1e-10), 1);
    a.start(&mut p, 0.0, &[1.0]).unwrap();
    let mut prev = 1.0;
    for _ in 0..30 {
        a.attempt(&mut p, 0.01, &norm).unwrap();
        a.accept(&mut p);
        let mut out = [0.0];
        a.interpolate(a.t(), &mut out);
        assert_eq!(out[0], a.y()[0]);
        a.interpolate(a.t_prev(), &mut out);
        // The final evaluation moves the slope history only, which moves
        // p(t_prev) by O(h^{q+2}) <= O(h^3) (y''' of e^{-t} is at most 1).
        assert!(
            (out[0] - prev).abs() < 10.0 * 0.01f64.powi(3),
            "{} {prev}",
            out[0]
        );
        let mut c = vec![0.0; a.dense_degree() + 1];
        a.dense_coefficients(&mut c);
        let mid: f64 = c.iter().rev().fold(0.0, |s, &ck| s * 0.5 + ck);
        a.interpolate(a.t_prev() + 0.005, &mut out);
        assert!((mid - out[0]).abs() < 1e-14);
        prev = a.y()[0];
    }
}

/// Nordsieck columns (in `x = (t - t0) / h`) of the degree-`q` polynomial
/// interpolating `y = t^{q+1}` at `t0 - j h`, `j = 0..=q`:
/// `t^{q+1} - h^{q+1} prod_{j=0}^{q} (x + j)`.
fn interpolant_history(q: usize, t0: f64, h: f64) -> Vec<f64> {
    let m = q + 1;
    let mut prod = vec![0.0; m + 1];
    prod[0] = 1.0;
    for j in 0..=q {
        for k in (0..=j).rev() {
            prod[k + 1] += prod[k];
            prod[k] *= j as f64;
        }
    }
    let taylor = power_history(m, t0, h, m);
    (0..=q)
        .map(|j| taylor[j] - h.powi(m as i32) * prod[j])
        .collect()
}

#[test]
fn bdf_local_error_on_a_polynomial_is_the_error_constant() {
    // y' = (q+1) t^q, y = t^{q+1}, history interpolating the exact values:
    // one step errs by C_q h^{q+1} (q+1)!, C_q = 1/((q+1) l_1) (closed
    // form; BDF error constant beta_0/(q+1), HNW I, III.2, from memory).
    for q in 1..=5 {
        let m = q + 1;
        let rhs = move |t: f64, _y: &[f64], dy: &mut [f64]| dy[0] = m as f64 * t.powi(q as i32);
        let mut p = Problem::new(rhs, 1);
        let (t0, h) = (0.5, 0.05);
        let mut b = Bdf::new(1, &Structure::Dense, &ImplicitOptions::default())
            .unwrap()
            .with_fixed_order(q);
        b.start_with_history(&mut p, t0, q, h, &interpolant_history(q, t0, h))
            .unwrap();
        let norm = ErrorNorm::new(1e-12, Atol::Scalar(1e-12), 1);
        let at = b.attempt(&mut p, h, &norm).unwrap();
        b.accept(&mut p);
        let want =
            Coefficients::new(Family::Bdf).error_constant(q) * h.powi(m as i32) * factorial(m);
        let err = b.y()[0] - (t0 + h).powi(m as i32);
        assert!(
            (err - want).abs() <= 1e-9 * want.abs() + 1e-15,
            "q={q}: {err} vs {want}"
        );
        let w = 1e-12 + 1e-12 * t0.powi(m as i32).max(b.y()[0].abs());
        assert!(
            (at.error * w - want.abs()).abs() <= 1e-6 * want.abs(),
            "q={q}"
        );
    }
}
