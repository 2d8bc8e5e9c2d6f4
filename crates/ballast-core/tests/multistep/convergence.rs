//! At a fixed order and a fixed step, the observed convergence order
//! `log(err(h1) / err(h2)) / log(h1 / h2)` equals the order.
//!
//! Start-up by exact values: the Nordsieck history is set from the exact
//! scaled derivatives `h^j y^{(j)}(t0) / j!` of the closed form, so no
//! start-up error of lower order spoils the measurement. The step pairs
//! are where the error is asymptotic and above rounding (chosen by a scan
//! of step sizes; high Adams orders are asymptotic only for `h` near their
//! small stability intervals, see the stability tests).

use ballast_core::multistep::coefficients::factorial;
use ballast_core::multistep::{Adams, Bdf};
use ballast_core::{Atol, ErrorNorm, ImplicitOptions, Problem, Scheme, SchemeState, Structure};
use std::f64::consts::FRAC_PI_2;

/// `h^j / j! d^j/dt^j sin(t)` at `t = 0`, `j = 0..=q`.
fn sine_history(q: usize, h: f64) -> Vec<f64> {
    (0..=q)
        .map(|j| h.powi(j as i32) / factorial(j) * (j as f64 * FRAC_PI_2).sin())
        .collect()
}

fn observed(errs: [f64; 2], hs: [f64; 2]) -> f64 {
    (errs[0] / errs[1]).ln() / (hs[0] / hs[1]).ln()
}

#[test]
fn adams_orders_1_to_12_converge_at_their_order() {
    // y' = cos t, y(0) = 0, y = sin t (closed form) on [0, 2.5]: the
    // Adams–Moulton corrector of every order as a quadrature.
    for q in 1..=12 {
        let hs = if q <= 6 { [0.05, 0.025] } else { [0.15, 0.125] };
        let mut errs = [0.0; 2];
        for (k, &h) in hs.iter().enumerate() {
            let mut p = Problem::new(|t: f64, _y: &[f64], d: &mut [f64]| d[0] = t.cos(), 1);
            let mut a = Adams::new(1).with_fixed_order(q);
            a.start_with_history(&mut p, 0.0, q, h, &sine_history(q, h))
                .unwrap();
            let norm = ErrorNorm::new(1e-6, Atol::Scalar(1e-6), 1);
            for _ in 0..(2.5 / h).round() as usize {
                a.attempt(&mut p, h, &norm).unwrap();
                a.accept(&mut p);
                assert_eq!(a.order(), q);
            }
            errs[k] = (a.y()[0] - a.t().sin()).abs();
        }
        let o = observed(errs, hs);
        assert!(
            (o - q as f64).abs() < 0.25,
            "Adams order {q}: observed {o} ({errs:?})"
        );
    }
}

#[test]
fn adams_pece_converges_at_its_order_on_a_rotation() {
    // y1' = -y2, y2' = y1, y = (cos t, sin t) (closed form) on [0, 2]: the
    // full PECE step, predictor and both evaluations, orders 1 to 8.
    for q in 1..=8 {
        let hs = [0.1, 0.05];
        let mut errs = [0.0; 2];
        for (k, &h) in hs.iter().enumerate() {
            let rot = |_t: f64, y: &[f64], d: &mut [f64]| {
                d[0] = -y[1];
                d[1] = y[0];
            };
            let mut p = Problem::new(rot, 2);
            let s = sine_history(q, h);
            let mut cols = vec![0.0; 2 * (q + 1)];
            for j in 0..=q {
                // cos^{(j)}(0) = sin^{(j+1)}(0), scaled to h^j / j!.
                cols[2 * j] = h.powi(j as i32) / factorial(j) * ((j + 1) as f64 * FRAC_PI_2).sin();
                cols[2 * j + 1] = s[j];
            }
            let mut a = Adams::new(2).with_fixed_order(q);
            a.start_with_history(&mut p, 0.0, q, h, &cols).unwrap();
            let norm = ErrorNorm::new(1e-6, Atol::Scalar(1e-6), 2);
            for _ in 0..(2.0 / h).round() as usize {
                a.attempt(&mut p, h, &norm).unwrap();
                a.accept(&mut p);
            }
            let t = a.t();
            errs[k] = (a.y()[0] - t.cos()).hypot(a.y()[1] - t.sin());
        }
        let o = observed(errs, hs);
        assert!(
            (o - q as f64).abs() < 0.35,
            "Adams PECE order {q}: observed {o}"
        );
    }
}

#[test]
fn bdf_orders_1_to_5_converge_at_their_order() {
    // Prothero–Robinson y' = -10 (y - sin t) + cos t, y = sin t (Prothero
    // and Robinson 1974; closed form) on [0, 2].
    for q in 1..=5 {
        let hs = [0.04, 0.02];
        let mut errs = [0.0; 2];
        for (k, &h) in hs.iter().enumerate() {
            let pr = |t: f64, y: &[f64], d: &mut [f64]| d[0] = -10.0 * (y[0] - t.sin()) + t.cos();
            let mut p = Problem::new(pr, 1);
            let mut b = Bdf::new(1, &Structure::Dense, &ImplicitOptions::default())
                .unwrap()
                .with_fixed_order(q);
            b.start_with_history(&mut p, 0.0, q, h, &sine_history(q, h))
                .unwrap();
            let norm = ErrorNorm::new(1e-10, Atol::Scalar(1e-10), 1);
            for _ in 0..(2.0 / h).round() as usize {
                b.attempt(&mut p, h, &norm).unwrap();
                b.accept(&mut p);
                assert_eq!(b.order(), q);
            }
            errs[k] = (b.y()[0] - b.t().sin()).abs();
        }
        let o = observed(errs, hs);
        assert!(
            (o - q as f64).abs() < 0.3,
            "BDF order {q}: observed {o} ({errs:?})"
        );
    }
}
