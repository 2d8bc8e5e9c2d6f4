//! The schemes against the stability regions of `ballast_core::stability`:
//! at a fixed order and step on `y' = lambda y`, Adams is stable just
//! inside the real stability interval of the PECE mode of its order and
//! unstable just outside; BDF is stable inside its A(alpha) sector. This
//! ties `order()` (which the controller uses to pick the region) to the
//! regions the stability module computes from the characteristic
//! polynomials.

use ballast_core::multistep::coefficients::factorial;
use ballast_core::multistep::{Adams, Bdf};
use ballast_core::stability::{adams_pece, bdf};
use ballast_core::{Atol, ErrorNorm, ImplicitOptions, Problem, Scheme, SchemeState, Structure};

/// `|y|` after `steps` steps of `y' = -y` with step `h` at order `q`,
/// started from the exact history of `e^{-t}`.
fn adams_decay(q: usize, h: f64, steps: usize) -> f64 {
    let mut p = Problem::new(|_t: f64, y: &[f64], d: &mut [f64]| d[0] = -y[0], 1);
    let cols: Vec<f64> = (0..=q)
        .map(|j| (-h).powi(j as i32) / factorial(j))
        .collect();
    let mut a = Adams::new(1).with_fixed_order(q);
    a.start_with_history(&mut p, 0.0, q, h, &cols).unwrap();
    let norm = ErrorNorm::new(1.0, Atol::Scalar(1.0), 1);
    for _ in 0..steps {
        if a.attempt(&mut p, h, &norm).is_err() {
            return f64::INFINITY;
        }
        a.accept(&mut p);
    }
    a.y()[0].abs()
}

#[test]
fn adams_is_stable_exactly_on_the_real_interval_of_its_order() {
    for q in 1..=12 {
        let s = adams_pece(q).unwrap().summary();
        let a = s.real_interval.expect("bounded for an explicit mode");
        // 0.9 a: every root inside the unit disc, the solution decays.
        let inside = adams_decay(q, 0.9 * a, 4000);
        assert!(inside < 1e-3, "order {q}, h = 0.9 * {a}: |y| = {inside}");
        // 1.1 a: a root outside, growth.
        let outside = adams_decay(q, 1.1 * a, 4000);
        assert!(outside > 1.0, "order {q}, h = 1.1 * {a}: |y| = {outside}");
    }
}

#[test]
fn bdf_is_stable_inside_the_a_alpha_sector_of_its_order() {
    // y' = A y with the eigenvalues r e^{+-i(pi - 0.9 alpha)}, far out
    // (h r = 50): inside the sector for every order.
    for q in 1..=5 {
        let alpha = bdf(q).unwrap().summary().a_alpha.unwrap().to_radians();
        let phi = std::f64::consts::PI - 0.9 * alpha;
        let (re, im) = (50.0 * phi.cos(), 50.0 * phi.sin());
        let f = move |_t: f64, y: &[f64], d: &mut [f64]| {
            d[0] = re * y[0] - im * y[1];
            d[1] = im * y[0] + re * y[1];
        };
        let mut p = Problem::new(f, 2);
        let mut b = Bdf::new(2, &Structure::Dense, &ImplicitOptions::default())
            .unwrap()
            .with_fixed_order(q);
        let mut cols = vec![0.0; 2 * (q + 1)];
        cols[0] = 1.0;
        b.start_with_history(&mut p, 0.0, q, 1.0, &cols).unwrap();
        let norm = ErrorNorm::new(1.0, Atol::Scalar(1.0), 2);
        for _ in 0..300 {
            b.attempt(&mut p, 1.0, &norm).unwrap();
            b.accept(&mut p);
        }
        let m = b.y()[0].hypot(b.y()[1]);
        assert!(m < 1e-6, "BDF{q}: |y| = {m}");
    }
}
