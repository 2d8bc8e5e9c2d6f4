//! Implicit schemes against published problems and closed forms.
//!
//! One test binary; the step loop is the test-only driver in
//! `common/driver.rs` (the library's controller lives in `ballast-switch`).
#[path = "common/driver.rs"]
mod driver;

use ballast_core::{
    build, ImplicitOptions, JacobianSource, Method, Problem, SchemeOptions, SparsityPattern,
    Structure, System,
};
use ballast_models::{Brusselator, Model, ProtheroRobinson};
use driver::{mixed_error, run};

const L_STABLE: [Method; 4] = [
    Method::BackwardEuler,
    Method::TrBdf2,
    Method::Esdirk43,
    Method::RadauIIA5,
];

fn opts(jacobian: JacobianSource, structure: Option<Structure>) -> SchemeOptions {
    SchemeOptions {
        implicit: ImplicitOptions {
            jacobian,
            structure,
            ..Default::default()
        },
        ..Default::default()
    }
}

/// Prothero and Robinson (Math. Comp. 28 (1974)): `y' = lambda (y - sin t)
/// + cos t`, exact `y = sin t` from `y(0) = 0`; `lambda = -1e6`.
#[test]
fn prothero_robinson_l_stable_schemes_step_far_beyond_the_stiff_scale() {
    let pr = ProtheroRobinson::new(-1e6);
    for m in L_STABLE {
        let mut p = Problem::new(pr.clone(), 1);
        let mut s = build::<ProtheroRobinson>(m, 1, &pr.structure(), &Default::default()).unwrap();
        let (rtol, atol) = (1e-6, 1e-6);
        let (y, st) = run(s.as_mut(), &mut p, 0.0, 10.0, &[0.0], rtol, atol).unwrap();
        let err = (y[0] - 10f64.sin()).abs();
        // Closed form; the global error stays within a few hundred local
        // tolerances over the run (common practice for the error per step).
        assert!(err < 300.0 * (atol + rtol), "{m}: error {err:e}");
        // Average step 10 / steps, against 1/|lambda| = 1e-6.
        let mean_step = 10.0 / st.accepted as f64;
        assert!(mean_step > 1e3 * 1e-6, "{m}: mean step {mean_step:e}");
    }
}

/// Fixed steps `h = 0.1` (`h lambda = -1e5`) from `y(0) = 1`, off the smooth
/// solution: the deviation `e_n = y_n - sin t_n` is multiplied by `R(h lambda)`
/// each step. L-stable schemes (`R(-inf) = 0`) remove it at once; the
/// trapezoidal rule has `R(-inf) = -1` (Hairer and Wanner II, IV.3) and keeps
/// it, alternating in sign, undamped.
#[test]
fn trapezoid_keeps_the_stiff_transient_oscillating_l_stable_schemes_damp_it() {
    let pr = ProtheroRobinson::new(-1e6);
    let norm = ballast_core::ErrorNorm::new(1e-8, ballast_core::Atol::Scalar(1e-8), 1);
    let deviations = |m: Method| -> Vec<f64> {
        let mut p = Problem::new(pr.clone(), 1);
        let mut s = build::<ProtheroRobinson>(m, 1, &pr.structure(), &Default::default()).unwrap();
        s.start(&mut p, 0.0, &[1.0]).unwrap();
        (1..=20)
            .map(|k| {
                s.attempt(&mut p, 0.1, &norm).unwrap();
                s.accept(&mut p);
                s.y()[0] - (0.1 * k as f64).sin()
            })
            .collect()
    };
    let e = deviations(Method::Trapezoid);
    for k in 1..e.len() {
        assert!(
            e[k] * e[k - 1] < 0.0,
            "trapezoid: no sign change at step {k}: {e:?}"
        );
        assert!(e[k].abs() > 0.99, "trapezoid: damped at step {k}: {e:?}");
    }
    for m in L_STABLE {
        let e = deviations(m);
        assert!(e[1..].iter().all(|d| d.abs() < 1e-4), "{m}: {e:?}");
    }
}

/// The Brusselator (HNW II, IV.1) with `N = 100`: the banded and sparse
/// paths must give the dense path's answer (to the tolerance) with
/// `bandwidth + 1 = 5` right-hand-side calls per finite-difference Jacobian
/// instead of `2N = 200`.
#[test]
fn banded_and_sparse_paths_match_dense_with_far_fewer_calls() {
    let b = Brusselator::new(100);
    let n = b.dim();
    let band: Vec<(usize, usize)> = (0..n)
        .flat_map(|j| (j.saturating_sub(2)..(j + 3).min(n)).map(move |i| (i, j)))
        .collect();
    let structures = [
        Structure::Dense,
        Structure::Banded { lower: 2, upper: 2 },
        Structure::Sparse(SparsityPattern::new(n, &band).unwrap()),
    ];
    let (rtol, atol) = (1e-6, 1e-6);
    let mut results = Vec::new();
    for s in structures {
        let o = opts(JacobianSource::FiniteDifference, Some(s.clone()));
        let mut p = Problem::new(b.clone(), n);
        let mut sch = build::<Brusselator>(Method::RadauIIA5, n, &b.structure(), &o).unwrap();
        let (y, st) = run(
            sch.as_mut(),
            &mut p,
            0.0,
            10.0,
            &b.initial_value(),
            rtol,
            atol,
        )
        .unwrap();
        let per_jac = st.work.jacobian_rhs_evals as f64 / st.work.jacobian_evals as f64;
        results.push((y, per_jac));
    }
    assert_eq!(results[0].1, n as f64);
    assert_eq!(results[1].1, 5.0);
    assert_eq!(results[2].1, 5.0);
    for (y, _) in &results[1..] {
        let d = y
            .iter()
            .zip(&results[0].0)
            .map(|(a, r)| (a - r).abs() / (r.abs() + 1.0))
            .fold(0.0, f64::max);
        assert!(d < 100.0 * rtol, "banded/sparse vs dense: {d:e}");
    }
}

/// Significant correct digits at the end of a registry case's span, for
/// each tolerance: `-log10 max_i |y_i - r_i| / max(|r_i|, floor)` with
/// `floor = atol / rtol` (components below it are held to `atol`), against
/// the case's reference solution (the Bari test set and HNW II problems,
/// references from `tools/reference/` as recorded in `ballast-models`).
fn digits_per_tolerance(case: &str, method: Method, atol_per_rtol: f64) -> Vec<f64> {
    let c = ballast_models::get(case).unwrap();
    let n = c.dim();
    let structure = c.system.structure();
    [1e-6, 1e-8, 1e-10]
        .iter()
        .map(|&rtol| {
            let atol = rtol * atol_per_rtol;
            let mut p: Problem<Model> = Problem::new(c.system.clone(), n);
            let mut s = build::<Model>(method, n, &structure, &Default::default()).unwrap();
            let (y, st) = run(s.as_mut(), &mut p, c.span.0, c.span.1, &c.y0, rtol, atol)
                .unwrap_or_else(|e| panic!("{case} {method} rtol {rtol:e}: {e}"));
            let floor = c.reference.floor.max(atol_per_rtol);
            let d = -mixed_error(&y, &c.reference.y, floor).log10();
            eprintln!(
                "{case:16} {:12} rtol {rtol:.0e}: {d:5.2} digits, {} steps ({} rejected, {} failed), {} f, {} J, {} LU",
                method.name(), st.accepted, st.rejected, st.failed,
                st.work.rhs_evals, st.work.jacobian_evals, st.work.factorizations
            );
            d
        })
        .collect()
}

/// The achieved accuracy follows the tolerance: at least `-log10(rtol) - 2`
/// digits (the global error of a tolerance-controlled run exceeds the local
/// tolerance by the error accumulated over the run; common practice), and
/// at least a quarter digit more at each tighter tolerance. (Not a fixed
/// gain over the whole range: a method may beat the tolerance at `1e-6` and
/// meet the case's own floor near `1e-10`; on Robertson to `1e11` every
/// scheme stops near 9.7 digits, and Rosenbrock 3(2) already has 7.75 at
/// `1e-6`.)
fn check_follows_tolerance(case: &str, atol_per_rtol: f64) {
    check_methods_follow_tolerance(
        case,
        atol_per_rtol,
        &[
            Method::RadauIIA5,
            Method::Esdirk43,
            Method::Rosenbrock32,
            Method::Ros3p,
        ],
    );
}

fn check_methods_follow_tolerance(case: &str, atol_per_rtol: f64, methods: &[Method]) {
    for &m in methods {
        let d = digits_per_tolerance(case, m, atol_per_rtol);
        for (k, rtol) in [1e-6f64, 1e-8, 1e-10].iter().enumerate() {
            assert!(
                d[k] >= -rtol.log10() - 2.0,
                "{case} {m} rtol {rtol:e}: {:.2} digits",
                d[k]
            );
        }
        assert!(
            d[1] >= d[0] + 0.25 && d[2] >= d[1] + 0.25,
            "{case} {m}: digits {d:?} do not follow the tolerance"
        );
    }
}

#[test]
fn robertson_to_1e11_follows_the_tolerance() {
    check_follows_tolerance("robertson-long", 1e-8);
}

#[test]
fn hires_follows_the_tolerance() {
    check_follows_tolerance("hires", 1e-4);
}

#[test]
fn van_der_pol_follows_the_tolerance() {
    check_follows_tolerance("vanderpol", 1.0);
}

#[test]
fn oregonator_follows_the_tolerance() {
    // ROS3P is left out here: every second-order embedding of ROS3P
    // differs from its solution by c (k1 - k2) (its order conditions fix
    // bhat_3 = b_3 = 1/3), and alpha21 + gamma21 = 0 makes k2 = k1 on
    // linear problems, so the estimate sees almost nothing on the
    // Oregonator's near-linear stretches and the run loses all digits at
    // rtol 1e-6. A known limitation, listed in the README; the four-stage
    // Rosenbrock 3(2) has no such blind spot.
    check_methods_follow_tolerance(
        "oregonator",
        1.0,
        &[Method::RadauIIA5, Method::Esdirk43, Method::Rosenbrock32],
    );
}

#[test]
fn brusselator_500_follows_the_tolerance() {
    check_follows_tolerance("brusselator-500", 1.0);
}
