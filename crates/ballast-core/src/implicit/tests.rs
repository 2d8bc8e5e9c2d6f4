//! Measured convergence orders (at the step ends and of the dense output)
//! of the implicit schemes on a smooth non-stiff problem with a
//! closed-form solution.

use super::*;
use crate::norm::{Atol, ErrorNorm};
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::Scheme;
use crate::system::{Structure, System};

/// Manufactured solution `y(t) = 2 + sin t` of the nonlinear,
/// non-autonomous `y' = -y^3 + y_e(t)^3 + y_e'(t)` (closed form by
/// construction).
fn manufactured(t: f64, y: &[f64], d: &mut [f64]) {
    let ye = 2.0 + t.sin();
    d[0] = -y[0].powi(3) + ye.powi(3) + t.cos();
    // A second, linear non-autonomous component: z' = -z + t, z(0) = 0,
    // z = t - 1 + e^{-t}.
    d[1] = -y[1] + t;
}

fn exact(t: f64) -> [f64; 2] {
    [2.0 + t.sin(), t - 1.0 + (-t).exp()]
}

type Rhs = fn(f64, &[f64], &mut [f64]);

fn scheme_for(m: crate::method::Method) -> Box<dyn Scheme<Rhs>> {
    // A tight Newton tolerance at large fixed steps needs more iterations
    // than the default cap; the order, not Newton's economy, is measured.
    let opts = crate::options::SchemeOptions {
        implicit: ImplicitOptions {
            max_newton_iters: 25,
            ..Default::default()
        },
        ..Default::default()
    };
    crate::build::build(m, 2, &Structure::Dense, &opts).unwrap()
}

/// Global error at `t = 1` with `steps` equal steps.
fn global_error(m: crate::method::Method, steps: usize) -> f64 {
    let f: Rhs = manufactured;
    let mut p = Problem::new(f, 2);
    let mut s = scheme_for(m);
    let norm = ErrorNorm::new(1e-12, Atol::Scalar(1e-12), 2);
    s.start(&mut p, 0.0, &exact(0.0)).unwrap();
    let h = 1.0 / steps as f64;
    for k in 0..steps {
        if let Err(e) = s.attempt(&mut p, h, &norm) {
            panic!("{m}: step {k} of {steps} failed: {e:?}");
        }
        s.accept(&mut p);
    }
    let e = exact(1.0);
    (s.y()[0] - e[0]).abs().max((s.y()[1] - e[1]).abs())
}

#[test]
fn measured_orders_equal_the_published_orders() {
    // Published orders: backward Euler 1, trapezoid 2, TR-BDF2 2 (Hosea and
    // Shampine 1996), ESDIRK 4(3) 4 (Kennedy and Carpenter 2016), Radau IIA
    // 5 (Hairer and Wanner II, IV.5), ROS3P 3 (Lang and Verwer 2001),
    // Rosenbrock 3(2) 3 (Sandu et al. 1997).
    use crate::method::Method::*;
    for (m, order, n) in [
        (BackwardEuler, 1.0, 64),
        (Trapezoid, 2.0, 32),
        (TrBdf2, 2.0, 32),
        (Esdirk43, 4.0, 16),
        (RadauIIA5, 5.0, 16),
        (Ros3p, 3.0, 32),
        (Rosenbrock32, 3.0, 32),
    ] {
        let (e1, e2) = (global_error(m, n), global_error(m, 2 * n));
        let rate = (e1 / e2).log2();
        assert!(
            (rate - order).abs() < 0.3,
            "{m}: measured order {rate:.2} (errors {e1:.3e}, {e2:.3e}), published {order}"
        );
    }
}

#[test]
fn iteration_matrix_is_reused_across_steps() {
    // With a constant step on a smooth problem the factorisation is kept.
    let f: Rhs = manufactured;
    let mut p = Problem::new(f, 2);
    let mut s = Dirk::new(
        &tableau::ESDIRK_43,
        2,
        &Structure::Dense,
        &ImplicitOptions {
            jacobian_refresh_rate: 1.0,
            ..Default::default()
        },
    )
    .unwrap();
    let norm = ErrorNorm::new(1e-6, Atol::Scalar(1e-9), 2);
    s.start(&mut p, 0.0, &exact(0.0)).unwrap();
    for _ in 0..10 {
        s.attempt(&mut p, 0.01, &norm).unwrap();
        s.accept(&mut p);
    }
    assert_eq!(p.counters.jacobian_evals, 1);
    assert_eq!(p.counters.factorizations, 1);
    assert!(p.counters.newton_iters >= 50);
    let _ = f.structure();
}

/// Largest error of the dense output at the midpoints of `steps` equal
/// steps over `[0, 1]` (against the closed form).
fn dense_error(m: crate::method::Method, steps: usize) -> f64 {
    let f: Rhs = manufactured;
    let mut p = Problem::new(f, 2);
    let mut s = scheme_for(m);
    let norm = ErrorNorm::new(1e-12, Atol::Scalar(1e-12), 2);
    s.start(&mut p, 0.0, &exact(0.0)).unwrap();
    let h = 1.0 / steps as f64;
    let mut worst = 0.0f64;
    let mut out = [0.0; 2];
    for k in 0..steps {
        s.attempt(&mut p, h, &norm).unwrap();
        s.accept(&mut p);
        let tm = (k as f64 + 0.5) * h;
        s.interpolate(tm, &mut out);
        let e = exact(tm);
        worst = worst.max((out[0] - e[0]).abs().max((out[1] - e[1]).abs()));
    }
    worst
}

#[test]
fn dense_output_converges_at_its_order() {
    // Inside a step the dense output of degree d adds an interpolation
    // error O(h^(d+1)) to the global error O(h^p): the measured rate is
    // min(p, d + 1) (common practice; Hairer, Norsett and Wanner I, II.6).
    // Measured: 1.00, 2.00, 2.00, 3.96, 4.06, 2.93, 2.94 (the Rosenbrock
    // methods reach their rate only from 128 steps on this problem).
    use crate::method::Method::*;
    for (m, n) in [
        (BackwardEuler, 64),
        (Trapezoid, 32),
        (TrBdf2, 32),
        (Esdirk43, 16),
        (RadauIIA5, 16),
        (Ros3p, 128),
        (Rosenbrock32, 128),
    ] {
        let s = scheme_for(m);
        let expected = (m.order().unwrap()).min(s.dense_degree() + 1) as f64;
        let (e1, e2) = (dense_error(m, n), dense_error(m, 2 * n));
        let rate = (e1 / e2).log2();
        assert!(
            rate > expected - 0.3,
            "{m}: dense output rate {rate:.2} (errors {e1:.3e}, {e2:.3e}), expected {expected}"
        );
    }
}

/// `y' = lambda(t) y` with `lambda(t) = -10 - 100 t`, its analytic
/// Jacobian recording the times it is asked at.
struct TimedLinear {
    asked: Vec<f64>,
}

impl System for TimedLinear {
    fn rhs(&mut self, t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = (-10.0 - 100.0 * t) * y[0];
    }
    fn jacobian(&mut self, t: f64, _y: &[f64], jac: &mut crate::matrix::Jacobian) -> bool {
        self.asked.push(t);
        jac.set(0, 0, -10.0 - 100.0 * t);
        true
    }
}

#[test]
fn radau_takes_an_analytic_jacobian_at_the_steps_end() {
    // The step's end is the time of the last stage, the new solution: on
    // this linear problem the iteration matrix is then exact for it, and
    // a Jacobian of the step's start leaves the iteration a contraction
    // rate of about h |lambda'| / |lambda| (common practice for simplified
    // Newton; Hairer and Wanner II, IV.8). A step from t = 0.5 with
    // h = 0.05 asks for the Jacobian at 0.55.
    let mut p = Problem::new(TimedLinear { asked: Vec::new() }, 1);
    let mut s = crate::build::build::<TimedLinear>(
        crate::method::Method::RadauIIA5,
        1,
        &Structure::Dense,
        &Default::default(),
    )
    .unwrap();
    let norm = ErrorNorm::new(1e-4, Atol::Scalar(1e-6), 1);
    s.start(&mut p, 0.5, &[1.0]).unwrap();
    s.attempt(&mut p, 0.05, &norm).unwrap();
    assert_eq!(p.system.asked, [0.55]);
}
