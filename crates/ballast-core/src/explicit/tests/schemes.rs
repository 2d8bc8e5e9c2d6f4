//! Behaviour of the Dormand–Prince 8(5,3) and Tsitouras 5(4) schemes beyond
//! their coefficients: work per step, first-same-as-last, dense output
//! without the extra stages, the free stiffness estimate, rejection,
//! backward steps, non-finite values, and an adaptive run.

use super::problems::{distance, plain_norm, scheme, KEPLER_CIRCULAR};
use crate::control::PiController;
use crate::explicit::{tableau::TSITOURAS_54, Dp853, ExplicitRk};
use crate::method::Method;
use crate::norm::{Atol, ErrorNorm};
use crate::problem::Problem;
use crate::scheme::{Scheme, SchemeState, StepFailure};

fn linear(lambda: f64) -> impl FnMut(f64, &[f64], &mut [f64]) {
    move |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = lambda * y[0]
}

#[test]
fn dop853_work_per_step() {
    // 12 evaluations per step, the last one reused as the next first stage,
    // plus 3 for the dense output (Hairer, Norsett and Wanner I, II.10 and II.6).
    for (dense, per_step) in [(true, 15), (false, 12)] {
        let mut p = Problem::new(linear(-1.0), 1);
        let mut s = Dp853::new(1).with_dense_output(dense);
        s.start(&mut p, 0.0, &[1.0]).unwrap();
        assert_eq!(p.counters.rhs_evals, 1);
        for _ in 0..4 {
            s.attempt(&mut p, 0.1, &plain_norm(1)).unwrap();
            s.accept(&mut p);
        }
        assert_eq!(p.counters.rhs_evals, 1 + 4 * per_step, "dense = {dense}");
    }
}

#[test]
fn fsal_slope_is_the_derivative_at_the_new_state() {
    for method in [Method::DormandPrince853, Method::Tsitouras54] {
        let case = KEPLER_CIRCULAR;
        let (mut p, mut s) = scheme(method, &case);
        s.start(&mut p, 0.0, &(case.exact)(0.0)).unwrap();
        for _ in 0..3 {
            s.attempt(&mut p, 0.2, &plain_norm(4)).unwrap();
            s.accept(&mut p);
            let mut f = [0.0; 4];
            (case.rhs)(s.t(), s.y(), &mut f);
            assert_eq!(s.dydt().unwrap(), &f, "{method:?}");
        }
    }
}

#[test]
fn dop853_without_dense_stages_falls_back_to_hermite() {
    // Cubic Hermite interpolation of the end values and slopes has local
    // error O(h^4) (common practice; Hairer, Norsett and Wanner I, II.6).
    let case = KEPLER_CIRCULAR;
    let err = |h: f64| {
        let mut p = Problem::new(case.rhs, 4);
        let mut s = Dp853::new(4).with_dense_output(false);
        s.start(&mut p, 0.0, &(case.exact)(0.0)).unwrap();
        s.attempt(&mut p, h, &plain_norm(4)).unwrap();
        s.accept(&mut p);
        assert_eq!(s.dense_degree(), 3);
        let mut out = [0.0; 4];
        s.interpolate(0.5 * h, &mut out);
        distance(&out, &(case.exact)(0.5 * h))
    };
    let (e1, e2) = (err(0.1), err(0.05));
    let slope = (e1 / e2).log2();
    assert!((slope - 4.0).abs() < 0.2, "Hermite local slope {slope}");
}

#[test]
fn stage_estimate_is_exact_for_a_scalar_linear_problem() {
    // For y' = lambda y, k_i - k_j = lambda (Y_i - Y_j), so the stage
    // quotient is |lambda| exactly (Hairer and Wanner II, IV.2).
    let lambda = -37.0;
    let mut p = Problem::new(linear(lambda), 1);
    let mut d = Dp853::new(1);
    d.start(&mut p, 0.0, &[1.0]).unwrap();
    d.attempt(&mut p, 0.01, &plain_norm(1)).unwrap();
    let est = d.stage_spectral_estimate().unwrap();
    assert!(
        (est - lambda.abs()).abs() < 1e-9 * lambda.abs(),
        "Dormand–Prince 8(5,3): {est}"
    );
    let mut t = ExplicitRk::new(&TSITOURAS_54, 1);
    Scheme::start(&mut t, &mut p, 0.0, &[1.0]).unwrap();
    t.attempt(&mut p, 0.01, &plain_norm(1)).unwrap();
    let est = t.stage_spectral_estimate().unwrap();
    assert!(
        (est - lambda.abs()).abs() < 1e-9 * lambda.abs(),
        "Tsit5: {est}"
    );
}

#[test]
fn stage_estimate_lies_within_the_spectrum() {
    // For y' = J y with symmetric J, ||J d|| / ||d|| lies between the
    // smallest and the largest |eigenvalue| (Rayleigh; common practice).
    let rhs = |_t: f64, y: &[f64], dy: &mut [f64]| {
        dy[0] = -100.0 * y[0];
        dy[1] = -y[1];
    };
    let mut p = Problem::new(rhs, 2);
    let mut d = Dp853::new(2);
    d.start(&mut p, 0.0, &[1.0, 1.0]).unwrap();
    d.attempt(&mut p, 0.02, &plain_norm(2)).unwrap();
    let est = d.stage_spectral_estimate().unwrap();
    assert!((1.0..=100.0 + 1e-9).contains(&est), "{est}");
}

#[test]
fn rejection_leaves_the_state_alone() {
    let case = KEPLER_CIRCULAR;
    let y0 = (case.exact)(0.0);
    let norm = ErrorNorm::new(1e-10, Atol::Scalar(1e-10), 4);
    let (mut p, mut s) = scheme(Method::DormandPrince853, &case);
    s.start(&mut p, 0.0, &y0).unwrap();
    assert!(s.attempt(&mut p, 2.0, &norm).unwrap().error > 1.0);
    s.reject();
    s.attempt(&mut p, 0.1, &norm).unwrap();
    s.accept(&mut p);
    let (mut q, mut fresh) = scheme(Method::DormandPrince853, &case);
    fresh.start(&mut q, 0.0, &y0).unwrap();
    fresh.attempt(&mut q, 0.1, &norm).unwrap();
    fresh.accept(&mut q);
    assert_eq!(s.y(), fresh.y());
    assert_eq!(s.t(), fresh.t());
}

#[test]
fn steps_backwards_in_time() {
    // y' = -y from y(1) = e^{-1} back to t = 0: y(0) = 1 (closed form).
    for method in [Method::DormandPrince853, Method::Tsitouras54] {
        let mut p = Problem::new(linear(-1.0), 1);
        let mut s =
            crate::build::build(method, 1, &Default::default(), &Default::default()).unwrap();
        s.start(&mut p, 1.0, &[(-1.0f64).exp()]).unwrap();
        for _ in 0..10 {
            s.attempt(&mut p, -0.1, &plain_norm(1)).unwrap();
            s.accept(&mut p);
        }
        assert!(s.t().abs() < 1e-15);
        // Ten steps of h = 0.1 of a method of order >= 5: error well below 1e-9.
        assert!((s.y()[0] - 1.0).abs() < 1e-9, "{method:?}: {}", s.y()[0]);
        let mut mid = [0.0];
        s.interpolate(0.05, &mut mid);
        // Dense output of order >= 4 over a step of 0.1: O(h^5), well below 1e-7.
        let dense_error = (mid[0] - (-0.05f64).exp()).abs();
        assert!(dense_error < 1e-7, "{method:?}: dense {dense_error:e}");
    }
}

#[test]
fn non_finite_values_are_reported() {
    // f blows up to infinity beyond y = 2: a large step must fail cleanly.
    let rhs = |_t: f64, y: &[f64], dy: &mut [f64]| {
        dy[0] = if y[0] > 2.0 { f64::INFINITY } else { 1.0 };
    };
    for method in [Method::DormandPrince853, Method::Tsitouras54] {
        let mut p = Problem::new(rhs, 1);
        let mut s =
            crate::build::build(method, 1, &Default::default(), &Default::default()).unwrap();
        s.start(&mut p, 0.0, &[0.0]).unwrap();
        let norm = plain_norm(1);
        assert_eq!(s.attempt(&mut p, 5.0, &norm), Err(StepFailure::NonFinite));
        s.reject();
        assert!(s.attempt(&mut p, 0.5, &norm).is_ok(), "{method:?} recovers");
    }
}

#[test]
fn adaptive_run_meets_the_tolerance() {
    // One revolution of the circular Kepler orbit (closed form) with the PI
    // controller: the global error stays within a modest multiple of the
    // tolerance (common practice: tens of times rtol for a non-stiff orbit).
    let case = KEPLER_CIRCULAR;
    let t_end = 2.0 * std::f64::consts::PI;
    for method in [Method::DormandPrince853, Method::Tsitouras54] {
        for rtol in [1e-6, 1e-10] {
            let norm = ErrorNorm::new(rtol, Atol::Scalar(rtol), 4);
            let (mut p, mut s) = scheme(method, &case);
            s.start(&mut p, 0.0, &(case.exact)(0.0)).unwrap();
            let mut ctl = PiController::default();
            let (mut h, mut steps) = (0.01f64, 0);
            while s.t() < t_end && steps < 10_000 {
                h = h.min(t_end - s.t());
                let a = s.attempt(&mut p, h, &norm).unwrap();
                let ok = a.error <= 1.0;
                h *= ctl.factor(a.error, s.error_order(), ok);
                if ok {
                    s.accept(&mut p);
                    steps += 1;
                } else {
                    s.reject();
                }
            }
            let err = distance(s.y(), &(case.exact)(t_end));
            assert!(
                err < 50.0 * rtol,
                "{method:?}, rtol {rtol}: error {err:e} in {steps} steps"
            );
        }
    }
}
