//! Hand-over of `(t, y, h)` between schemes, restart after a
//! discontinuity, and dense output from the history.

use super::driver::{drive, drive_on};
use ballast_core::multistep::{Adams, Bdf};
use ballast_core::{
    build, Atol, ErrorNorm, ImplicitOptions, Method, Problem, Scheme, SchemeState, Structure,
};
use ballast_models::Kepler;

/// y' = -y + u(t) with a unit step u at t = 1; closed form
/// y = e^{-t} (t < 1), 1 + (e^{-1} - 1) e^{-(t-1)} (t >= 1).
fn switched(t: f64, y: &[f64], d: &mut [f64]) {
    d[0] = -y[0] + if t >= 1.0 { 1.0 } else { 0.0 };
}

fn switched_exact(t: f64) -> f64 {
    if t < 1.0 {
        (-t).exp()
    } else {
        1.0 + ((-1.0f64).exp() - 1.0) * (-(t - 1.0)).exp()
    }
}

fn restart_across_the_jump(s: &mut dyn Scheme<fn(f64, &[f64], &mut [f64])>, rtol: f64) {
    let mut p = Problem::new(switched as fn(f64, &[f64], &mut [f64]), 1);
    let norm = ErrorNorm::new(rtol, Atol::Scalar(rtol), 1);
    drive(s, &mut p, (0.0, 1.0), &[1.0], &norm, |_| {}).unwrap();
    assert_eq!(s.t(), 1.0);
    let y1 = s.y().to_vec();
    s.start(&mut p, 1.0, &y1).unwrap();
    assert_eq!(s.order(), 1, "a restart begins at order 1");
    let out = drive_on(s, &mut p, 3.0, &norm, None, |_| {}).unwrap();
    let err = (out.y[0] - switched_exact(3.0)).abs();
    // Within 100 tolerances of the closed form (a short, well-conditioned run).
    assert!(err < 100.0 * rtol, "{}: {err}", s.method());
}

#[test]
fn restart_after_a_discontinuity_keeps_the_accuracy() {
    for rtol in [1e-5, 1e-8] {
        restart_across_the_jump(&mut Adams::new(1), rtol);
        let mut b = Bdf::new(1, &Structure::Dense, &ImplicitOptions::default()).unwrap();
        restart_across_the_jump(&mut b, rtol);
    }
}

#[test]
fn hand_over_between_one_step_and_multistep_schemes() {
    // Kepler e = 0.5 (closed form through Kepler's equation, HNW I, II.0
    // and ballast-models): Dormand–Prince 5(4) to t = 5, Adams to 10,
    // BDF to 15, Adams to 20; each takes (t, y, h) from the previous one.
    let k = Kepler::new(0.5);
    let rtol = 1e-8;
    let norm = ErrorNorm::new(rtol, Atol::Scalar(rtol), 4);
    let mut p = Problem::new(k.clone(), 4);
    let mut dp = build::<Kepler>(
        Method::DormandPrince54,
        4,
        &Structure::Dense,
        &Default::default(),
    )
    .unwrap();
    let mut adams = Adams::new(4);
    let mut bdf = Bdf::new(4, &Structure::Dense, &ImplicitOptions::default()).unwrap();
    // The last full step (not one shortened to land on a leg's end).
    let last_h = std::cell::Cell::new(0.0f64);
    let track = |s: &dyn SchemeState| last_h.set(last_h.get().max(s.t() - s.t_prev()));
    drive(
        dp.as_mut(),
        &mut p,
        (0.0, 5.0),
        &k.initial_value(),
        &norm,
        track,
    )
    .unwrap();
    let legs: [(&mut dyn Scheme<Kepler>, f64); 3] = [
        (&mut adams, 10.0),
        (&mut bdf, 15.0),
        (&mut Adams::new(4), 20.0),
    ];
    let (mut t, mut y) = (dp.t(), dp.y().to_vec());
    for (s, t1) in legs {
        s.start(&mut p, t, &y).unwrap();
        let h0 = last_h.replace(0.0);
        drive_on(s, &mut p, t1, &norm, Some(h0), track).unwrap();
        (t, y) = (s.t(), s.y().to_vec());
        let exact = k.exact(t);
        let err = y
            .iter()
            .zip(&exact)
            .map(|(a, b)| (a - b).abs())
            .fold(0.0, f64::max);
        // Global error of an eccentric orbit over a few periods: within
        // 1e4 tolerances (the phase error grows linearly with time).
        assert!(err < 1e4 * rtol, "{} at t = {t}: {err}", s.method());
    }
}

#[test]
fn dense_output_is_as_accurate_as_the_steps() {
    // Kepler e = 0.5, closed form: the dense output at every step's
    // midpoint is within 10 times the largest error at the step ends.
    let k = Kepler::new(0.5);
    for rtol in [1e-6, 1e-9] {
        let norm = ErrorNorm::new(rtol, Atol::Scalar(rtol), 4);
        let mut bdf = Bdf::new(4, &Structure::Dense, &ImplicitOptions::default()).unwrap();
        let schemes: [&mut dyn Scheme<Kepler>; 2] = [&mut Adams::new(4), &mut bdf];
        for s in schemes {
            let mut p = Problem::new(k.clone(), 4);
            let (mut at_ends, mut at_mid) = (0.0f64, 0.0f64);
            let mut out = [0.0; 4];
            let max_err = |y: &[f64], t: f64| {
                y.iter()
                    .zip(k.exact(t))
                    .map(|(a, b)| (a - b).abs())
                    .fold(0.0, f64::max)
            };
            drive(s, &mut p, (0.0, 10.0), &k.initial_value(), &norm, |s| {
                at_ends = at_ends.max(max_err(s.y(), s.t()));
                let tm = 0.5 * (s.t() + s.t_prev());
                s.interpolate(tm, &mut out);
                at_mid = at_mid.max(max_err(&out, tm));
            })
            .unwrap();
            assert!(
                at_mid <= 10.0 * at_ends,
                "rtol {rtol}: {at_mid} vs {at_ends}"
            );
        }
    }
}

#[test]
fn a_nordsieck_history_passes_between_adams_and_bdf() {
    // Kepler e = 0.5 (closed form): Adams to t = 5, then BDF from Adams'
    // history (truncated to order 5 at most) without a restart at order
    // 1, then Adams again from BDF's history.
    let k = Kepler::new(0.5);
    let rtol = 1e-8;
    let norm = ErrorNorm::new(rtol, Atol::Scalar(rtol), 4);
    let mut p = Problem::new(k.clone(), 4);
    let mut adams = Adams::new(4);
    let mut bdf = Bdf::new(4, &Structure::Dense, &ImplicitOptions::default()).unwrap();
    drive(
        &mut adams,
        &mut p,
        (0.0, 5.0),
        &k.initial_value(),
        &norm,
        |_| {},
    )
    .unwrap();
    let (q, h, cols) = adams.history();
    let qb = q.min(5);
    bdf.start_with_history(&mut p, adams.t(), qb, h, &cols[..4 * (qb + 1)])
        .unwrap();
    assert_eq!(bdf.order(), qb, "no restart at order 1");
    drive_on(&mut bdf, &mut p, 10.0, &norm, Some(h), |_| {}).unwrap();
    let (q, h, cols) = bdf.history();
    let cols = cols.to_vec();
    adams
        .start_with_history(&mut p, bdf.t(), q, h, &cols)
        .unwrap();
    drive_on(&mut adams, &mut p, 15.0, &norm, Some(h), |_| {}).unwrap();
    let exact = k.exact(15.0);
    let err = adams
        .y()
        .iter()
        .zip(&exact)
        .map(|(a, b)| (a - b).abs())
        .fold(0.0, f64::max);
    assert!(err < 1e4 * rtol, "{err}");
    // Bad input is refused with a clear error, not a panic.
    assert!(bdf.start_with_history(&mut p, 0.0, 9, h, &cols).is_err());
    assert!(bdf
        .start_with_history(&mut p, 0.0, 2, h, &cols[..4])
        .is_err());
}
