//! The public contract of DESIGN.md, as written there, compiled and run.

use ballast::{integrate, Complex64, Method, Options};

#[test]
fn design_contract_snippet() -> Result<(), ballast::Error> {
    // y' = -50 (y - cos t): stiff-ish, smooth
    let sol = integrate(
        |t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -50.0 * (y[0] - t.cos()),
        (0.0, 2.0),
        &[0.0],
        &Options::default().rtol(1e-6).atol(1e-9),
    )?;
    let t_end: f64 = sol.t_final();
    let y_end: &[f64] = sol.y_final();
    let y_mid: Vec<f64> = sol.eval(1.0)?;
    let s = sol.stats();
    let _counters: [usize; 6] = [
        s.rhs_evals,
        s.jacobian_evals,
        s.factorizations,
        s.accepted,
        s.rejected,
        s.switches,
    ];
    for sw in sol.switches() {
        let _ = (sw.t, sw.from, sw.to);
    }
    // Closed form: y = (2500 cos t + 50 sin t - 2500 e^{-50 t}) / 2501.
    let exact = |t: f64| (2500.0 * t.cos() + 50.0 * t.sin() - 2500.0 * (-50.0 * t).exp()) / 2501.0;
    assert_eq!(t_end, 2.0);
    assert!((y_end[0] - exact(2.0)).abs() < 1e-5);
    assert!((y_mid[0] - exact(1.0)).abs() < 1e-5);

    let _opts = Options::default()
        .rtol(1e-8)
        .atol(1e-12)
        .method(Method::RadauIIA5);
    let fixed = Options::default().method(Method::Rk4).fixed_step(0.01);
    let rk4 = integrate(
        |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0],
        (0.0, 1.0),
        &[1.0],
        &fixed,
    )?;
    assert!((rk4.y_final()[0] - (-1.0f64).exp()).abs() < 1e-9);

    // Failure keeps what was computed.
    let err = integrate(
        |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = y[0] * y[0],
        (0.0, 2.0),
        &[1.0],
        &Options::default().method(Method::DormandPrince54),
    )
    .unwrap_err();
    let partial = err
        .partial()
        .expect("a run failure carries the partial solution");
    // Closed form y = 1/(1 - t) blows up at t = 1 (the numerical solution,
    // lagging the exact one, may pass t = 1 by a hair before the step fails).
    assert!(partial.t_final() > 0.99 && partial.t_final() < 1.001);

    // Stability: largest h with h*lambda inside the region; None = no limit.
    let h: Option<f64> =
        ballast::stability::critical_step(Method::ForwardEuler, Complex64::new(-4.0, 0.0));
    assert!((h.unwrap() - 0.5).abs() < 1e-12);

    // Stiffness: dominant eigenvalue of a linear operator given as v -> J v.
    let n = 3;
    let est = ballast::stiffness::spectral_radius(
        n,
        |v: &[f64], out: &mut [f64]| {
            out[0] = -v[0];
            out[1] = -10.0 * v[1];
            out[2] = -100.0 * v[2];
        },
        &ballast::stiffness::PowerOptions::default(),
    );
    let (_r, _l, _c, _p): (f64, Complex64, bool, usize) =
        (est.radius, est.eigenvalue, est.converged, est.products);
    assert!((est.radius - 100.0).abs() < 5.0);
    Ok(())
}

/// `Options::jacobian_refresh_rate`: a looser rate buys fewer Jacobians on
/// HIRES (Bari test set; reference of `ballast-models`, mpmath, 15 digits)
/// with finite-difference Jacobians, and the run stays as accurate
/// (measured: 115 Jacobians, error 1.5e-7 at the default 1e-3; 42 and
/// 7.9e-8 at 0.1).
#[test]
fn looser_jacobian_refresh_rate_means_fewer_jacobians() {
    use ballast::JacobianSource;
    let case = ballast_models::get("hires").unwrap();
    let run = |rate: f64| {
        let opts = Options::default()
            .method(Method::RadauIIA5)
            .rtol(1e-6)
            .atol(1e-10)
            .jacobian(JacobianSource::FiniteDifference)
            .jacobian_refresh_rate(rate);
        let sol = integrate(case.system.clone(), case.span, &case.y0, &opts).unwrap();
        let err = case.reference.relative_error(sol.y_final());
        (sol.stats().jacobian_evals, err)
    };
    let (j_tight, e_tight) = run(1e-3);
    let (j_loose, e_loose) = run(0.1);
    assert!(
        2 * j_loose <= j_tight,
        "Jacobians: {j_loose} at rate 0.1 vs {j_tight} at 1e-3"
    );
    assert!(
        e_tight < 1e-4 && e_loose < 1e-4,
        "errors {e_tight:e}, {e_loose:e}"
    );
}
