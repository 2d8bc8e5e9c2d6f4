//! Observed orders, fitted over a range of fixed steps on smooth nonlinear
//! problems with closed-form solutions ([`super::problems`]): the global
//! error of every method, the local error of every dense output at
//! mid-step, and the local error estimate of every embedded pair.
//!
//! Windows of steps: the error has to stay well above round-off (above
//! `1e-13`) and inside the asymptotic range. The fifth-order pairs are tuned
//! for a small fifth-order error constant (Dormand and Prince 1980;
//! Tsitouras 2011), so on the Kepler orbit their `h^6` terms dominate down
//! to round-off; they are measured on the oscillator, where the `h^5`
//! regime starts near 100 steps. Dormand–Prince 8(5,3) reaches `1e-13`
//! within a few steps on the oscillator before it settles, and is measured
//! on the Kepler orbit.

use super::problems::{
    distance, fitted_slope, plain_norm, scheme, Case, KEPLER_CIRCULAR, OSCILLATOR,
};
use super::METHODS;
use crate::method::Method;

/// Smallest error a window may contain: far above round-off.
const FLOOR: f64 = 1e-13;

/// Global error at `case.t_end` after `steps` fixed steps from the exact initial value.
fn global_error(method: Method, case: &Case, steps: usize) -> f64 {
    let (mut p, mut s) = scheme(method, case);
    let norm = plain_norm(case.n);
    s.start(&mut p, 0.0, &(case.exact)(0.0)[..case.n]).unwrap();
    let h = case.t_end / steps as f64;
    for _ in 0..steps {
        s.attempt(&mut p, h, &norm).unwrap();
        s.accept(&mut p);
    }
    distance(s.y(), &(case.exact)(case.t_end))
}

/// One step of size `h` from the exact value at `T0`: the dense-output
/// error at `T0 + theta h` and the scheme's local error estimate.
fn one_step(method: Method, case: &Case, h: f64, theta: f64) -> (f64, f64) {
    const T0: f64 = 0.3;
    let (mut p, mut s) = scheme(method, case);
    s.start(&mut p, T0, &(case.exact)(T0)[..case.n]).unwrap();
    let estimate = s.attempt(&mut p, h, &plain_norm(case.n)).unwrap().error;
    s.accept(&mut p);
    let mut out = [0.0; 4];
    s.interpolate(T0 + theta * h, &mut out[..case.n]);
    let t = T0 + theta * h;
    (distance(&out[..case.n], &(case.exact)(t)), estimate)
}

/// Geometric step sizes `h0 / 1.5^k`, `k = 0..count`.
fn steps_from(h0: f64, count: i32) -> Vec<f64> {
    (0..count).map(|k| h0 / 1.5f64.powi(k)).collect()
}

/// Which problem and which window of step counts measure each method.
fn global_window(method: Method) -> (Case, &'static [usize]) {
    match method {
        Method::ForwardEuler => (KEPLER_CIRCULAR, &[1024, 2048, 4096, 8192]),
        Method::Heun | Method::BogackiShampine32 | Method::Rk4 => {
            (KEPLER_CIRCULAR, &[64, 128, 256, 512, 1024])
        }
        Method::DormandPrince54 | Method::Tsitouras54 => (OSCILLATOR, &[128, 192, 256, 384]),
        Method::DormandPrince853 => (KEPLER_CIRCULAR, &[4, 6, 8, 12, 16]),
        other => panic!("{other:?} is not an explicit Runge–Kutta method"),
    }
}

#[test]
fn observed_order_equals_published_order() {
    // Published orders: Hairer, Norsett and Wanner I, II.1 (Euler, Heun,
    // RK4), Bogacki and Shampine 1989, Dormand and Prince 1980, Tsitouras
    // 2011, Prince and Dormand 1981.
    for (method, order) in METHODS {
        let (case, window) = global_window(method);
        let h: Vec<f64> = window.iter().map(|&n| case.t_end / n as f64).collect();
        let err: Vec<f64> = window
            .iter()
            .map(|&n| global_error(method, &case, n))
            .collect();
        assert!(
            err.iter().all(|&e| e > FLOOR),
            "{method:?}: window reaches round-off: {err:?}"
        );
        let slope = fitted_slope(&h, &err);
        println!(
            "{method:?} on the {}: global order {slope:.3}, errors {:.1e} .. {:.1e}",
            case.name,
            err[0],
            err[err.len() - 1]
        );
        assert!(
            (slope - order as f64).abs() <= 0.2,
            "{method:?}: fitted order {slope:.3}, published {order}"
        );
    }
}

#[test]
fn dense_output_has_its_order() {
    // The continuous extension of order p* interpolates one step with a
    // local error O(h^(p*+1)) (Hairer, Norsett and Wanner I, II.6). Published
    // p*: 4 for Dormand–Prince 5(4) (II.6) and Tsitouras 5(4) (Tsitouras
    // 2011), 7 for Dormand–Prince 8(5,3) (II.6); cubic Hermite otherwise,
    // limited by the method's own order: min(p, 3).
    let dense_order = |m: Method| match m {
        Method::ForwardEuler => 1,
        Method::Heun => 2,
        Method::BogackiShampine32 | Method::Rk4 => 3,
        Method::DormandPrince54 | Method::Tsitouras54 => 4,
        _ => 7,
    };
    for (method, _) in METHODS {
        let (case, h) = match method {
            Method::DormandPrince853 => (KEPLER_CIRCULAR, steps_from(0.667, 5)),
            Method::DormandPrince54 | Method::Tsitouras54 => (OSCILLATOR, steps_from(0.088, 5)),
            _ => (KEPLER_CIRCULAR, steps_from(0.059, 5)),
        };
        for theta in [0.5, 0.3] {
            let err: Vec<f64> = h
                .iter()
                .map(|&h| one_step(method, &case, h, theta).0)
                .collect();
            assert!(err.iter().all(|&e| e > FLOOR), "{method:?}: {err:?}");
            let slope = fitted_slope(&h, &err) - 1.0;
            println!("{method:?} dense output at theta = {theta}: order {slope:.3}");
            let want = dense_order(method) as f64;
            assert!(
                (slope - want).abs() <= 0.2,
                "{method:?}: dense order {slope:.3}, expected {want}"
            );
        }
    }
}

#[test]
fn error_estimates_scale_with_their_order() {
    // An embedded estimate of order q is O(h^(q+1)) (Hairer, Norsett and
    // Wanner I, II.4); for Dormand–Prince 8(5,3) the combination
    // err5^2 / sqrt(err5^2 + 0.01 err3^2) behaves like h^8 (II.10).
    for (method, _) in METHODS {
        if method.needs_fixed_step() {
            continue;
        }
        let case = KEPLER_CIRCULAR;
        let h = match method {
            Method::DormandPrince853 => steps_from(0.667, 5),
            Method::DormandPrince54 | Method::Tsitouras54 => steps_from(0.198, 5),
            _ => steps_from(0.059, 5),
        };
        let (_, s) = scheme(method, &case);
        let q = s.error_order();
        let est: Vec<f64> = h
            .iter()
            .map(|&h| one_step(method, &case, h, 1.0).1)
            .collect();
        assert!(est.iter().all(|&e| e > FLOOR), "{method:?}: {est:?}");
        let slope = fitted_slope(&h, &est);
        println!(
            "{method:?} error estimate: slope {slope:.3} (q + 1 = {})",
            q + 1
        );
        assert!(
            (slope - (q + 1) as f64).abs() <= 0.2,
            "{method:?}: estimate slope {slope:.3}"
        );
    }
}

#[test]
fn dense_coefficients_agree_with_interpolation() {
    // Internal consistency: the monomial coefficients reproduce the
    // interpolant, which starts at y_n and ends at y_{n+1}.
    for (method, _) in METHODS {
        let case = KEPLER_CIRCULAR;
        let (mut p, mut s) = scheme(method, &case);
        let n = case.n;
        s.start(&mut p, 0.2, &(case.exact)(0.2)[..n]).unwrap();
        s.attempt(&mut p, 0.25, &plain_norm(n)).unwrap();
        s.accept(&mut p);
        let deg = s.dense_degree();
        let mut c = vec![0.0; (deg + 1) * n];
        s.dense_coefficients(&mut c);
        let mut out = vec![0.0; n];
        for theta in [0.0, 0.25, 0.6, 1.0] {
            s.interpolate(0.2 + theta * 0.25, &mut out);
            for m in 0..n {
                let v = (0..=deg)
                    .rev()
                    .fold(0.0, |acc, k| acc * theta + c[k * n + m]);
                // Round-off only: the Dormand–Prince 8(5,3) weight
                // polynomials have coefficients of order 1e3 that cancel.
                assert!(
                    (v - out[m]).abs() < 1e-12,
                    "{method:?} theta {theta}: {:e}",
                    v - out[m]
                );
            }
        }
        s.interpolate(0.45, &mut out);
        assert!(distance(&out, s.y()) < 1e-13, "{method:?}: end of step");
        s.interpolate(0.2, &mut out);
        assert!(
            distance(&out, &(case.exact)(0.2)) < 1e-15,
            "{method:?}: start of step"
        );
    }
}
