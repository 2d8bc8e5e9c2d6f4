//! The switching controller against problems with known answers
//! (issue 8): references from `ballast-models`, each with its source.

use ballast::stability::method_region;
use ballast::{integrate, Complex64, Method, Options, Output, Solution, SwitchPair};
use ballast_models::{get, Flame, LinearSpectrum, StiffnessRamp};

use crate::common::scaled_error;

fn default_opts(rtol: f64, atol: f64) -> Options {
    Options::default().rtol(rtol).atol(atol)
}

/// Which method was active at time `t`, from the switch log.
fn active_at(sol: &Solution, first: Method, t: f64) -> Method {
    let mut m = first;
    for sw in sol.switches() {
        if sw.t <= t {
            m = sw.to;
        }
    }
    m
}

/// The largest `|R(h lambda_i)|` of `method`'s stability function over
/// the accepted steps of `sol` that start at a time `counts` selects and
/// every eigenvalue of `model`: the step's growth factor on each mode of
/// a linear system. Returns it with the start of the step where it was
/// reached and the number of steps counted.
fn worst_growth(
    sol: &Solution,
    method: Method,
    model: &LinearSpectrum,
    counts: impl Fn(f64) -> bool,
) -> (f64, f64, usize) {
    let r = method_region(method).unwrap().function();
    let eig: Vec<Complex64> = model
        .eigenvalues()
        .into_iter()
        .map(|(re, im)| Complex64::new(re, im))
        .collect();
    let (mut worst, mut at, mut steps) = (0.0f64, f64::NAN, 0);
    for w in sol.times().windows(2).filter(|w| counts(w[0])) {
        steps += 1;
        for &l in &eig {
            let g = r.eval(l * (w[1] - w[0])).unwrap().norm();
            if g > worst {
                (worst, at) = (g, w[0]);
            }
        }
    }
    (worst, at, steps)
}

/// Flame propagation, delta = 1e-4 (O'Malley 1991; closed form through
/// Lambert W, `Flame::exact`): the run starts explicit, switches to the
/// implicit scheme shortly after ignition (t ~ 1/delta), and matches the
/// closed form.
#[test]
fn flame_switches_after_ignition() {
    let flame = Flame::new(1e-4);
    let span = flame.span();
    let y0 = flame.initial_value();
    let sol = integrate(flame.clone(), span, &y0, &default_opts(1e-6, 1e-9)).unwrap();
    let first = sol
        .switches()
        .first()
        .expect("a switch to the implicit scheme");
    assert_eq!(first.from, Method::DormandPrince54);
    assert_eq!(first.to, Method::RadauIIA5);
    // Ignition is at t ~ 1/delta = 1e4; the switch comes after it, early in
    // the stiff phase.
    assert!(
        first.t > 0.95e4 && first.t < 1.3e4,
        "switch at t = {}",
        first.t
    );
    for &t in &[5e3, 9.9e3, 1.01e4, 1.5e4, 2e4] {
        let y = sol.eval(t).unwrap();
        let exact = flame.exact(t);
        // Closed form; global error a modest multiple of the tolerance.
        assert!(
            scaled_error(&y, &exact, 1e-6, 1e-9) < 100.0,
            "t = {t}: {} vs {}",
            y[0],
            exact[0]
        );
    }
    // At the front itself the problem is ill-conditioned: the ignition
    // time t_ign ~ 1/y moves by dt = dy / y^2 = 1e4 * (relative error of y
    // in the slow phase), i.e. ~1e-2 for rtol = 1e-6, and the front moves
    // at y' <= 4/27, so the error allowed there is 4/27 * 1e-2.
    let y = sol.eval(1e4).unwrap()[0];
    assert!((y - flame.exact(1e4)[0]).abs() < 1.5e-3);
}

/// Non-stiff problems (Arenstorf orbit, HNW I II.0; Pleiades, HNW I II.10):
/// no switch, and the work stays within 5% of Dormand–Prince 5(4) alone.
#[test]
fn nonstiff_problems_do_not_switch() {
    for name in ["arenstorf", "pleiades"] {
        let case = get(name).unwrap();
        let opts = default_opts(1e-7, 1e-9).output(Output::Final);
        let auto = integrate(case.system.clone(), case.span, &case.y0, &opts).unwrap();
        let dp = integrate(
            case.system.clone(),
            case.span,
            &case.y0,
            &opts.clone().method(Method::DormandPrince54),
        )
        .unwrap();
        assert!(auto.switches().is_empty(), "{name}: {:?}", auto.switches());
        let (wa, wd) = (auto.stats().rhs_evals as f64, dp.stats().rhs_evals as f64);
        assert!(
            wa <= 1.05 * wd,
            "{name}: switching {wa} vs DP5(4) {wd} f calls"
        );
        // Both against the published reference (source in the model registry).
        let tol = 1e-7f64.max(10f64.powf(-case.reference.digits));
        assert!(scaled_error(auto.y_final(), &case.reference.y, tol, 1e-6) < 2000.0);
    }
}

/// Stiff kinetics (Robertson to 1e11; HIRES — Bari test set, references in
/// `ballast-models`): the run switches to the implicit scheme early and is
/// as accurate as the implicit scheme alone.
#[test]
fn stiff_kinetics_switch_early() {
    for (name, early) in [("robertson-long", 1e-1), ("hires", 50.0)] {
        let case = get(name).unwrap();
        let opts = default_opts(1e-6, 1e-10).output(Output::Final);
        let auto = integrate(case.system.clone(), case.span, &case.y0, &opts).unwrap();
        let radau = integrate(
            case.system.clone(),
            case.span,
            &case.y0,
            &opts.clone().method(Method::RadauIIA5),
        )
        .unwrap();
        let first = auto.switches().first().expect("switches to implicit");
        assert_eq!(first.to, Method::RadauIIA5);
        assert!(first.t < early, "{name}: first switch at t = {}", first.t);
        let ea = scaled_error(auto.y_final(), &case.reference.y, 1e-6, 1e-10);
        let er = scaled_error(radau.y_final(), &case.reference.y, 1e-6, 1e-10);
        assert!(
            ea < 10.0 * er.max(1.0),
            "{name}: switching error {ea}, Radau {er}"
        );
    }
}

/// Van der Pol with mu = 1000 (HNW II IV.1; reference in `ballast-models`):
/// accurate against the reference; the switch log shows the explicit and
/// implicit phases of the relaxation oscillation.
#[test]
fn van_der_pol_mu_1000() {
    let case = get("vanderpol-mu1000").unwrap();
    let opts = default_opts(1e-6, 1e-8).output(Output::Final);
    let sol = integrate(case.system.clone(), case.span, &case.y0, &opts).unwrap();
    assert!(!sol.switches().is_empty());
    // The position component is O(2); a loose relative check of the
    // reference (the fast transitions amplify local errors).
    let err = (sol.y_final()[0] - case.reference.y[0]).abs();
    assert!(
        err < 1e-3,
        "y1 error {err:e}; switches {}",
        sol.switches().len()
    );
}

/// A linear system with known eigenvalues (`LinearSpectrum`, exact solution
/// through its eigen-decomposition): every accepted explicit step keeps
/// `|R(h lambda_i)| <= 1` for all true eigenvalues, checked after the run
/// from the recorded steps; and the end state matches the closed form.
#[test]
fn explicit_steps_stay_inside_the_region_for_true_eigenvalues() {
    for (real, pairs) in [
        (vec![-1.0, -30.0, -2000.0], vec![]),
        (vec![-1.0, -5.0], vec![(-300.0, 400.0)]),
    ] {
        let model = LinearSpectrum::new(&real, &pairs);
        let y0 = model.initial_value();
        for method in [Method::DormandPrince54, Method::default()] {
            let sol = integrate(
                model.clone(),
                (0.0, 3.0),
                &y0,
                &default_opts(1e-6, 1e-9).method(method),
            )
            .unwrap();
            let exact = model.exact(3.0);
            assert!(scaled_error(sol.y_final(), &exact, 1e-6, 1e-9) < 100.0);
            let first = match method {
                Method::Switching(_) => Method::DormandPrince54,
                m => m,
            };
            let explicit = |t: f64| active_at(&sol, first, t) == Method::DormandPrince54;
            let (g, t, steps) = worst_growth(&sol, Method::DormandPrince54, &model, explicit);
            assert!(steps > 0);
            assert!(g <= 1.0 + 1e-9, "{method}: t = {t}, |R(h lambda)| = {g}");
        }
    }
}

/// A stiffness ramp, lambda(t) = -1e6^(t/10) (`StiffnessRamp`, closed form
/// y = cos t): while explicit, the step follows the stability limit
/// `r(pi)/|lambda(t)|` of Dormand–Prince 5(4) (never above it); the switch
/// comes once that limit makes the explicit scheme the more expensive one.
#[test]
fn stiffness_ramp_cap_follows_the_limit() {
    let ramp = StiffnessRamp::default();
    let y0 = ramp.initial_value();
    let opts = default_opts(1e-6, 1e-9);
    let dp = integrate(
        ramp.clone(),
        (0.0, 7.0),
        &y0,
        &opts.clone().method(Method::DormandPrince54),
    )
    .unwrap();
    let real_reach = method_region(Method::DormandPrince54)
        .unwrap()
        .summary()
        .real_interval
        .unwrap();
    let (mut late, mut near) = (0, 0);
    for w in dp.times().windows(2) {
        let h = w[1] - w[0];
        // The eigenvalue grows within the step: use its value at the end.
        let limit = real_reach / ramp.lambda(w[1]).abs();
        assert!(
            h <= 1.02 * limit,
            "t = {}: h = {h:e} above the limit {limit:e}",
            w[0]
        );
        if w[0] > 5.0 {
            late += 1;
            if h > 0.5 * limit {
                near += 1;
            }
        }
    }
    // Late in the run (|lambda| > 1000) the step follows the limit.
    assert!(
        near * 10 > late * 9,
        "{near} of {late} late steps near the limit"
    );
    assert!((dp.y_final()[0] - 7f64.cos()).abs() < 1e-5);

    let auto = integrate(ramp.clone(), (0.0, 10.0), &y0, &opts).unwrap();
    let sw = auto.switches().first().expect("switches to implicit");
    // Explicit cost per unit time at the switch: about 6 f calls per step of
    // r/|lambda|; it must exceed what the implicit phase then spends per
    // unit time (measured from a Radau run over the rest of the span).
    let explicit_rate = 6.0 * ramp.lambda(sw.t).abs() / real_reach;
    let rest = integrate(
        ramp.clone(),
        (sw.t, 10.0),
        &[ramp.exact(sw.t)[0]],
        &opts.clone().method(Method::RadauIIA5),
    )
    .unwrap();
    let implicit_rate = rest.stats().rhs_evals as f64 / (10.0 - sw.t);
    assert!(
        explicit_rate > 0.5 * implicit_rate,
        "switched at t = {} where explicit costs {explicit_rate:.1}/unit, implicit {implicit_rate:.1}/unit",
        sw.t
    );
    assert!((auto.y_final()[0] - 10f64.cos()).abs() < 1e-5);
    let _ = SwitchPair::AdamsBdf;
}

/// Radau IIA 5 on the stiffness ramp (`StiffnessRamp`, closed form
/// y = cos t): the Jacobian, frozen for the step, drifts from the true one
/// across it as lambda(t) grows, so the Newton iteration slows as the step
/// grows. The scheme limits the next step's growth by the contraction rate
/// it measured, and after a failed iteration still predicts the stages from
/// the last step's collocation polynomial: no attempt fails (before both,
/// 19 of 135 attempts failed at rtol 1e-6 and 41 of 311 at 1e-8), and the
/// end value matches the closed form. Taking the analytic Jacobian at the
/// step's end instead of its start cut the right-hand-side calls from 1088
/// to 731 (1e-6) and from 2592 to 2120 (1e-8).
#[test]
fn radau_newton_keeps_converging_on_the_ramp() {
    let ramp = StiffnessRamp::default();
    for rtol in [1e-6, 1e-8] {
        let opts = default_opts(rtol, 1e-3 * rtol).method(Method::RadauIIA5);
        let sol = integrate(ramp.clone(), (0.0, 10.0), &ramp.initial_value(), &opts).unwrap();
        let st = sol.stats();
        assert_eq!(
            st.failed_attempts, 0,
            "rtol {rtol:e}: {} failed attempts, {} accepted",
            st.failed_attempts, st.accepted
        );
        let err = (sol.y_final()[0] - 10f64.cos()).abs();
        assert!(err < 10.0 * rtol, "rtol {rtol:e}: error {err:e}");
        let budget = if rtol > 1e-7 { 800 } else { 2300 };
        assert!(
            st.rhs_evals <= budget,
            "rtol {rtol:e}: {} calls, budget {budget}",
            st.rhs_evals
        );
    }
}

/// Two Prothero-Robinson equations with time-dependent stiffness (the
/// construction of Prothero and Robinson, 1974; closed form `y = (cos t,
/// sin 2t)` from `y(0) = (1, 0)`): `lambda_1(t) = -1000 (1 + 0.9 sin 5t)`
/// rises and falls tenfold, `lambda_2(t) = -(1 + 1e4 (t / 10)^2)` grows
/// 10^4-fold. Radau IIA 5 takes its analytic Jacobian at each step's end;
/// the run meets its tolerance, and the calls stay within budgets measured
/// with that choice plus about 10 % (1057-1250 and 2891 calls at rtol
/// 1e-4-1e-6 and 1e-8; with the Jacobian of the step's start 1395, 1643 and
/// 3770).
#[derive(Clone)]
struct VaryingStiffness;

impl ballast::System for VaryingStiffness {
    fn rhs(&mut self, t: f64, y: &[f64], dy: &mut [f64]) {
        let (l1, l2) = Self::lambdas(t);
        dy[0] = l1 * (y[0] - t.cos()) - t.sin();
        dy[1] = l2 * (y[1] - (2.0 * t).sin()) + 2.0 * (2.0 * t).cos();
    }
    fn jacobian(&mut self, t: f64, _y: &[f64], jac: &mut ballast::Jacobian) -> bool {
        let (l1, l2) = Self::lambdas(t);
        jac.set(0, 0, l1);
        jac.set(1, 1, l2);
        true
    }
}

impl VaryingStiffness {
    fn lambdas(t: f64) -> (f64, f64) {
        (
            -1000.0 * (1.0 + 0.9 * (5.0 * t).sin()),
            -(1.0 + 1e4 * (t / 10.0).powi(2)),
        )
    }
}

#[test]
fn radau_follows_a_time_dependent_jacobian() {
    for (rtol, budget) in [(1e-4, 1300), (1e-6, 1400), (1e-8, 3200)] {
        let opts = default_opts(rtol, 1e-3 * rtol)
            .method(Method::RadauIIA5)
            .output(Output::Final);
        let sol = integrate(VaryingStiffness, (0.0, 10.0), &[1.0, 0.0], &opts).unwrap();
        let y = sol.y_final();
        let err = (y[0] - 10f64.cos()).abs().max((y[1] - 20f64.sin()).abs());
        assert!(err < rtol, "rtol {rtol:e}: error {err:e}");
        let calls = sol.stats().rhs_evals;
        assert!(
            calls <= budget,
            "rtol {rtol:e}: {calls} calls, budget {budget}"
        );
    }
}

/// 150 copies of a Prothero-Robinson equation,
/// `y_i' = -1000 (y_i - cos t) - sin t` (closed form `y_i = cos t` from `y_i(0) = 1`; the construction of
/// Prothero and Robinson, 1974): the smooth solution lets the accuracy step
/// grow beyond the stability limit `3.3 / 1000`, so Dormand-Prince 5(4) is
/// held near the cap from its first steps, and with a dense Jacobian of
/// this size the implicit scheme is predicted far dearer per unit time (the
/// prior's dense LU; a tiny first step keeps the start explicit), so only
/// the forced trial after a long held run switches. Over `[0, 1]` that
/// trial comes (at t = 0.029, after 15 held steps of about 0.0023); over
/// `[0, 0.045]` less than the 12 such steps a trial needs before it can be
/// judged remains then, and none starts.
#[test]
fn no_trial_starts_without_room_to_judge_it() {
    const N: usize = 150;
    let f = |t: f64, y: &[f64], dy: &mut [f64]| {
        for (d, &v) in dy.iter_mut().zip(y) {
            *d = -1000.0 * (v - t.cos()) - t.sin();
        }
    };
    let y0 = [1.0; N];
    let opts = default_opts(1e-6, 1e-9)
        .first_step(1e-6)
        .output(Output::Final);
    let long = integrate(f, (0.0, 1.0), &y0, &opts).unwrap();
    assert!(
        !long.switches().is_empty(),
        "a long held run ends in a trial"
    );
    assert!((long.y_final()[0] - 1f64.cos()).abs() < 1e-5);
    let short = integrate(f, (0.0, 0.045), &y0, &opts).unwrap();
    assert!(
        short.switches().is_empty(),
        "switched with no room left: {:?}",
        short.switches()
    );
    assert!((short.y_final()[0] - 0.045f64.cos()).abs() < 1e-5);
}

/// Prothero–Robinson with lambda = -1e6 (Prothero and Robinson 1974;
/// closed form `y = sin t`) is stiff from the first step: the pair opens on
/// Radau IIA 5, recorded as a switch at `t0`, and the explicit scheme is
/// never built. The run is then Radau IIA 5's own run, step for step and
/// bit for bit, plus the products of the first spectral estimate: the
/// slope at `t0` is evaluated once and handed to the scheme that opens.
#[test]
fn a_run_stiff_from_the_start_opens_on_the_implicit_scheme() {
    let pr = ballast_models::ProtheroRobinson::default();
    let opts = default_opts(1e-6, 1e-9).output(Output::Final);
    let pair = integrate(pr.clone(), (0.0, 10.0), &pr.initial_value(), &opts).unwrap();
    let alone = integrate(
        pr.clone(),
        (0.0, 10.0),
        &pr.initial_value(),
        &opts.clone().method(Method::RadauIIA5),
    )
    .unwrap();
    let sw = pair.switches();
    assert_eq!(sw.len(), 1, "{sw:?}");
    assert_eq!((sw[0].t, sw[0].to), (0.0, Method::RadauIIA5));
    let (p, a) = (pair.stats(), alone.stats());
    assert_eq!(p.accepted, a.accepted);
    assert_eq!(
        p.rhs_evals,
        a.rhs_evals + p.spectral_products,
        "{p:?}\n{a:?}"
    );
    assert_eq!(pair.y_final(), alone.y_final());
    assert!((pair.y_final()[0] - pr.exact(10.0)[0]).abs() < 1e-5);
}

/// The prior for an implicit step that has not run yet counts the LU of the
/// Jacobian's own structure. The Brusselator by the method of lines with
/// N = 500 (Hairer and Wanner II, IV.1; 1000 equations, two diagonals on
/// each side, spectral radius about 2e4 at t0) is stiff from the start: as
/// a band (an LU of about 16 thousand flops) the pair opens on Radau IIA 5
/// at t0; declared dense (an LU of 1000 x 1000, about 7e8 flops, some
/// hundred times an explicit step held at the limit) it opens explicit and,
/// over a span shorter than the held run that forces a trial, stays there.
#[test]
fn the_implicit_prior_counts_the_structure_of_the_lu() {
    let case = get("brusselator-500").unwrap();
    let span = (0.0, 0.002);
    let opts = default_opts(1e-6, 1e-9).output(Output::Final);
    let banded = integrate(case.system.clone(), span, &case.y0, &opts).unwrap();
    let sw = banded.switches();
    assert_eq!(sw.len(), 1, "{sw:?}");
    assert_eq!((sw[0].t, sw[0].to), (0.0, Method::RadauIIA5));
    let dense_opts = opts.jacobian_structure(ballast::Structure::Dense);
    let dense = integrate(case.system.clone(), span, &case.y0, &dense_opts).unwrap();
    assert!(dense.switches().is_empty(), "{:?}", dense.switches());
    assert!(dense.stats().stability_limited > 0);
    // Both runs agree with each other to the tolerance.
    let diff = banded
        .y_final()
        .iter()
        .zip(dense.y_final())
        .map(|(a, b)| (a - b).abs() / b.abs().max(1e-3))
        .fold(0.0, f64::max);
    assert!(diff < 1e-4, "{diff}");
}

/// Asking for an analytic Jacobian from a system without one is refused
/// at the door with a clear error.
#[test]
fn analytic_jacobian_requested_but_missing() {
    let err = integrate(
        |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0],
        (0.0, 1.0),
        &[1.0],
        &Options::default()
            .method(Method::RadauIIA5)
            .jacobian(ballast::JacobianSource::Analytic),
    )
    .unwrap_err();
    assert!(err.to_string().contains("analytic Jacobian"), "{err}");
}

/// The checks of [`explicit_steps_stay_inside_the_region_for_true_eigenvalues`]
/// as a law over random spectra: a linear system with known eigenvalues
/// (`LinearSpectrum`, orthogonally similar to its block-diagonal form) run
/// by a forced explicit method keeps `|R(h lambda_i)| <= 1` at every
/// accepted step for every true eigenvalue (`R` the method's stability
/// function; the region is where `|R| <= 1`, Hairer and Wanner II, IV.2).
/// Spectra: up to four real eigenvalues between -1e4 and -0.1, or one
/// complex pair of modulus up to 1e4 at an angle of 95 to 180 degrees from
/// the positive real axis (nearer the imaginary axis the cap stands aside
/// by design, see the README): the spectra whose dominant eigenvalue's ray
/// bounds them all. A mix of both can break the law (the next test).
mod stability_law {
    use super::*;
    use proptest::prelude::*;

    const EXPLICIT: [Method; 4] = [
        Method::BogackiShampine32,
        Method::DormandPrince54,
        Method::Tsitouras54,
        Method::DormandPrince853,
    ];

    fn spectrum() -> impl Strategy<Value = (Vec<f64>, Vec<(f64, f64)>)> {
        prop_oneof![
            prop::collection::vec(-1.0f64..4.0, 1..5)
                .prop_map(|u| (u.iter().map(|u| -(10f64.powf(*u))).collect(), vec![])),
            (-1.0f64..4.0, 95.0f64..180.0).prop_map(|(u, deg)| {
                let (m, a) = (10f64.powf(u), deg.to_radians());
                (vec![], vec![(m * a.cos(), m * a.sin())])
            }),
        ]
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(64))]

        #[test]
        fn forced_explicit_steps_stay_inside_the_region(
            (real, pairs) in spectrum(),
            pick in 0usize..4,
            log_rtol in -9.0f64..-3.0,
        ) {
            let method = EXPLICIT[pick];
            let model = LinearSpectrum::new(&real, &pairs);
            let y0 = model.initial_value();
            let rtol = 10f64.powf(log_rtol);
            let sol = integrate(
                model.clone(),
                (0.0, 1.0),
                &y0,
                &default_opts(rtol, 1e-3 * rtol).method(method),
            )
            .unwrap();
            let (g, t, _) = worst_growth(&sol, method, &model, |_| true);
            prop_assert!(g <= 1.0 + 1e-9, "{}: t = {}, |R(h lambda)| = {}", method, t, g);
        }
    }
}

/// The limit of the law above, found by it when spectra mixed a real
/// eigenvalue and a complex pair: the cap follows the dominant
/// eigenvalue's ray, so a second eigenvalue of nearly the same modulus at
/// an angle where the region reaches less (here a weakly damped
/// oscillation, -65 ± 7421i, beside a decay at -8039) can lie outside the
/// region. The error estimate then holds the growth of that mode: per step
/// `|R(h lambda)|` stays within 2 % of 1, and the end state (closed form
/// through the eigen-decomposition, `LinearSpectrum::exact`) stays within
/// 100 atol. Measured: Bogacki–Shampine 3(2) 1.0105 at most, a quarter of
/// its steps outside, end error 1.6 atol; Dormand–Prince 5(4) 1.00004, 13
/// atol. The README lists this under its known limitations.
#[test]
fn a_second_mode_at_another_angle_is_held_by_the_error_estimate() {
    let model = LinearSpectrum::new(
        &[-8039.292323665985],
        &[(-64.76179708949252, 7420.966908433146)],
    );
    let y0 = model.initial_value();
    let exact = model.exact(1.0);
    for method in [Method::BogackiShampine32, Method::DormandPrince54] {
        let (rtol, atol) = (1e-3, 1e-6);
        let sol = integrate(
            model.clone(),
            (0.0, 1.0),
            &y0,
            &default_opts(rtol, atol).method(method),
        )
        .unwrap();
        let (worst, _, _) = worst_growth(&sol, method, &model, |_| true);
        assert!(worst <= 1.02, "{method}: |R(h lambda)| up to {worst}");
        let err = scaled_error(sol.y_final(), &exact, rtol, atol);
        assert!(err <= 100.0, "{method}: end error {err} atol");
    }
}
