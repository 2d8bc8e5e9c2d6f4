//! Adaptive explicit runs through `integrate()`: closed forms, backwards
//! integration, output modes, and the law that global error follows the tolerance.

use ballast::{integrate, Method, Options, Output};
use proptest::prelude::*;

use crate::common::scaled_error;

/// y' = lambda y, y(0) = 1: closed form y = e^{lambda t}.
#[test]
fn exponential_decay_matches_closed_form() {
    for method in [Method::BogackiShampine32, Method::DormandPrince54] {
        let lambda = -1.5;
        let opts = Options::default().rtol(1e-8).atol(1e-12).method(method);
        let sol = integrate(
            move |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = lambda * y[0],
            (0.0, 3.0),
            &[1.0],
            &opts,
        )
        .unwrap();
        let exact = (lambda * 3.0f64).exp();
        assert_eq!(sol.t_final(), 3.0);
        // Closed form; global error within a modest multiple (50) of the tolerance.
        assert!(
            scaled_error(sol.y_final(), &[exact], 1e-8, 1e-12) < 50.0,
            "{method}: {} vs {exact}",
            sol.y_final()[0]
        );
        // Dense output against the closed form inside the span.
        for &t in &[0.1, 0.77, 1.5, 2.9] {
            let y = sol.eval(t).unwrap();
            assert!(scaled_error(&y, &[(lambda * t).exp()], 1e-8, 1e-12) < 50.0);
        }
    }
}

/// y' = lambda y with complex lambda = a + ib, written as a real 2x2
/// system: closed form e^{at}(cos bt, sin bt).
#[test]
fn complex_exponential_matches_closed_form() {
    let (a, b) = (-0.3, 4.0);
    let f = move |_t: f64, y: &[f64], dy: &mut [f64]| {
        dy[0] = a * y[0] - b * y[1];
        dy[1] = b * y[0] + a * y[1];
    };
    let opts = Options::default()
        .rtol(1e-9)
        .atol(1e-12)
        .method(Method::DormandPrince54);
    let sol = integrate(f, (0.0, 5.0), &[1.0, 0.0], &opts).unwrap();
    let r = (a * 5.0f64).exp();
    let exact = [r * (b * 5.0f64).cos(), r * (b * 5.0f64).sin()];
    assert!(scaled_error(sol.y_final(), &exact, 1e-9, 1e-12) < 100.0);
}

/// Integrating backwards from t = 2 to 0 recovers y(0) = 1 for y' = -y
/// (closed form y = e^{-t}).
#[test]
fn backwards_in_time() {
    let y2 = (-2.0f64).exp();
    let opts = Options::default()
        .rtol(1e-10)
        .atol(1e-14)
        .method(Method::DormandPrince54);
    let sol = integrate(
        |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0],
        (2.0, 0.0),
        &[y2],
        &opts,
    )
    .unwrap();
    assert_eq!(sol.t_final(), 0.0);
    assert!((sol.y_final()[0] - 1.0).abs() < 1e-8);
    let mid = sol.eval(1.0).unwrap()[0];
    assert!((mid - (-1.0f64).exp()).abs() < 1e-8);
}

/// The three output modes give the same end state; `At` keeps exactly the
/// requested times and `Final` keeps one state.
#[test]
fn output_modes_agree() {
    let f = |t: f64, y: &[f64], dy: &mut [f64]| dy[0] = t.cos() * y[0];
    let base = Options::default()
        .rtol(1e-9)
        .atol(1e-12)
        .method(Method::DormandPrince54);
    let steps = integrate(f, (0.0, 4.0), &[1.0], &base).unwrap();
    let times = vec![0.0, 0.5, 1.0, 2.5, 4.0];
    let at = integrate(
        f,
        (0.0, 4.0),
        &[1.0],
        &base.clone().output_at(times.clone()),
    )
    .unwrap();
    let fin = integrate(f, (0.0, 4.0), &[1.0], &base.clone().output(Output::Final)).unwrap();
    assert_eq!(at.times(), &times[..]);
    assert_eq!(fin.len(), 1);
    assert_eq!(steps.y_final(), fin.y_final());
    for (t, y) in at.iter() {
        // Closed form y = exp(sin t).
        assert!((y[0] - t.sin().exp()).abs() < 1e-7, "t = {t}");
    }
    assert!(steps.len() > 5);
}

/// A fixed-step method without a step is refused with a clear error.
#[test]
fn fixed_step_method_needs_a_step() {
    let err = integrate(
        |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0],
        (0.0, 1.0),
        &[1.0],
        &Options::default().method(Method::Rk4),
    )
    .unwrap_err();
    assert!(matches!(
        err,
        ballast::Error::FixedStepRequired(Method::Rk4)
    ));
    let ok = integrate(
        |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0],
        (0.0, 1.0),
        &[1.0],
        &Options::default().method(Method::Rk4).fixed_step(0.01),
    )
    .unwrap();
    // RK4 with h = 0.01: global error ~ 1e-10 (closed form e^{-1}).
    assert!((ok.y_final()[0] - (-1.0f64).exp()).abs() < 1e-9);
    assert_eq!(ok.stats().accepted, 100);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(48))]
    /// Law: for y' = lambda y (lambda < 0, closed form) the global error of an
    /// adaptive run stays within a modest multiple of the tolerance, and
    /// nothing panics.
    #[test]
    fn global_error_follows_tolerance(lambda in -50.0f64..-0.01, log_tol in -10.0f64..-3.0) {
        let tol = 10f64.powf(log_tol);
        let opts = Options::default().rtol(tol).atol(tol).method(Method::DormandPrince54);
        let sol = integrate(
            move |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = lambda * y[0],
            (0.0, 2.0), &[1.0], &opts).unwrap();
        let exact = (2.0 * lambda).exp();
        let err = (sol.y_final()[0] - exact).abs();
        // Local error per unit step is bounded by tol; over the run the
        // global error of a contractive problem stays a modest multiple.
        prop_assert!(err <= 20.0 * tol, "lambda {lambda}, tol {tol:e}, err {err:e}");
    }
}

/// A stiff scalar problem forced onto Dormand–Prince 5(4): y' = -1e4 (y - cos t).
/// The stability cap holds the step near the stability limit instead of
/// letting it oscillate through rejections, and the result matches the
/// closed form y = (1e8 cos t + 1e4 sin t - 1e8 e^{-1e4 t}) / (1e8 + 1).
#[test]
fn forced_explicit_method_is_capped_on_a_stiff_problem() {
    let k = 1e4;
    let opts = Options::default()
        .rtol(1e-6)
        .atol(1e-9)
        .method(Method::DormandPrince54);
    let sol = integrate(
        move |t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -k * (y[0] - t.cos()),
        (0.0, 1.0),
        &[0.0],
        &opts,
    )
    .unwrap();
    let exact = (k * k * 1f64.cos() + k * 1f64.sin()) / (k * k + 1.0);
    assert!((sol.y_final()[0] - exact).abs() < 1e-5);
    let s = sol.stats();
    assert!(s.stability_limited > 100, "{s:?}");
    assert!(s.spectral_estimates >= 1);
    // Rejections stay few: the cap, not trial and error, sets the step.
    assert!(s.rejected * 20 < s.accepted, "{s:?}");
}

/// The Arenstorf orbit (Hairer, Norsett and Wanner, Solving ODEs I, II.0)
/// is periodic with period T = 17.0652165601579625588917206249: after one
/// period the state returns to y0. Dormand–Prince 8(5,3) and 5(4) at a
/// requested tolerance return to within a modest multiple of it (the
/// orbit's close approaches to the moon amplify local errors, so the
/// allowance is larger than for a contractive problem).
#[test]
fn arenstorf_returns_after_one_period() {
    let case = ballast_models::get("arenstorf").unwrap();
    for (method, tol, allowance) in [
        (Method::DormandPrince853, 1e-10, 1e4),
        (Method::DormandPrince54, 1e-10, 1e4),
        (Method::DormandPrince54, 1e-7, 1e4),
    ] {
        let opts = Options::default()
            .rtol(tol)
            .atol(tol)
            .method(method)
            .output(Output::Final);
        let sol = integrate(case.system.clone(), case.span, &case.y0, &opts).unwrap();
        let err = sol
            .y_final()
            .iter()
            .zip(&case.y0)
            .map(|(a, b)| (a - b).abs())
            .fold(0.0, f64::max);
        eprintln!(
            "Arenstorf return error with {method} at tol {tol:e}: {err:.3e} ({} steps)",
            sol.stats().accepted
        );
        assert!(
            err < allowance * tol,
            "{method} at {tol:e}: return error {err:e}"
        );
    }
}
