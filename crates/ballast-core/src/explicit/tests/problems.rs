//! Smooth nonlinear test problems with closed-form solutions, and a
//! fixed-step driver through the common [`Scheme`] interface.

use crate::build::build;
use crate::method::Method;
use crate::norm::{Atol, ErrorNorm};
use crate::options::SchemeOptions;
use crate::problem::Problem;
use crate::scheme::Scheme;
use crate::system::Structure;

/// The right-hand side type of the test problems.
pub type Rhs = fn(f64, &[f64], &mut [f64]);

/// A test problem with a closed-form solution on `[0, t_end]`.
pub struct Case {
    /// Short name for messages.
    pub name: &'static str,
    /// Dimension.
    pub n: usize,
    /// End of the interval for global errors.
    pub t_end: f64,
    /// `f(t, y)`.
    pub rhs: Rhs,
    /// The exact solution (first `n` entries).
    pub exact: fn(f64) -> [f64; 4],
}

fn oscillator(_t: f64, y: &[f64], dy: &mut [f64]) {
    let w = y[0] * y[0] + y[1] * y[1];
    dy[0] = -w * y[1];
    dy[1] = w * y[0];
}

fn kepler(_t: f64, y: &[f64], dy: &mut [f64]) {
    let r2 = y[0] * y[0] + y[1] * y[1];
    let r3 = r2 * r2.sqrt();
    dy[0] = y[2];
    dy[1] = y[3];
    dy[2] = -y[0] / r3;
    dy[3] = -y[1] / r3;
}

fn unit_circle(t: f64) -> [f64; 4] {
    [t.cos(), t.sin(), -t.sin(), t.cos()]
}

/// A nonlinear oscillator whose frequency is its squared amplitude:
/// `y1' = -r^2 y2`, `y2' = r^2 y1`, `r^2 = y1^2 + y2^2`. Since `r^2` is a
/// first integral, from `(1, 0)` the solution is `(cos t, sin t)` (closed form).
pub const OSCILLATOR: Case = Case {
    name: "amplitude-dependent oscillator",
    n: 2,
    t_end: 5.0,
    rhs: oscillator,
    exact: unit_circle,
};

/// The Kepler problem `q'' = -q / |q|^3` (Hairer, Norsett and Wanner I,
/// II.10) with eccentricity 0: from `q = (1, 0)`, `q' = (0, 1)` the orbit is
/// the unit circle, `q = (cos t, sin t)` (closed form).
pub const KEPLER_CIRCULAR: Case = Case {
    name: "circular Kepler orbit",
    n: 4,
    t_end: 3.0,
    rhs: kepler,
    exact: unit_circle,
};

/// A norm that leaves vectors unweighted: `atol = 1`, `rtol = 0`.
pub fn plain_norm(n: usize) -> ErrorNorm {
    ErrorNorm::new(0.0, Atol::Scalar(1.0), n)
}

/// The scheme for `method` on `case`, built by the factory.
pub fn scheme(method: Method, case: &Case) -> (Problem<Rhs>, Box<dyn Scheme<Rhs>>) {
    let p = Problem::new(case.rhs, case.n);
    let s = build::<Rhs>(method, case.n, &Structure::Dense, &SchemeOptions::default())
        .expect("every explicit Runge–Kutta method builds");
    (p, s)
}

/// Euclidean distance between `a` and the first `a.len()` entries of `b`.
pub fn distance(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y) * (x - y))
        .sum::<f64>()
        .sqrt()
}

/// Least-squares slope of `log(err)` against `log(h)`.
pub fn fitted_slope(h: &[f64], err: &[f64]) -> f64 {
    let x: Vec<f64> = h.iter().map(|v| v.ln()).collect();
    let y: Vec<f64> = err.iter().map(|v| v.ln()).collect();
    let n = x.len() as f64;
    let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
    let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = x.iter().map(|a| (a - mx) * (a - mx)).sum();
    sxy / sxx
}

#[test]
fn fitted_slope_recovers_a_power_law() {
    let h = [0.1, 0.05, 0.025];
    let e: Vec<f64> = h.iter().map(|v: &f64| 3.0 * v.powi(4)).collect();
    assert!((fitted_slope(&h, &e) - 4.0).abs() < 1e-12);
}

#[test]
fn exact_solutions_solve_their_equations() {
    // The closed forms above, checked by central differences.
    for case in [OSCILLATOR, KEPLER_CIRCULAR] {
        let (t, d) = (0.7, 1e-5);
        let y = (case.exact)(t);
        let (yp, ym) = ((case.exact)(t + d), (case.exact)(t - d));
        let mut f = [0.0; 4];
        (case.rhs)(t, &y[..case.n], &mut f[..case.n]);
        for i in 0..case.n {
            let fd = (yp[i] - ym[i]) / (2.0 * d);
            assert!((fd - f[i]).abs() < 1e-9, "{}: component {i}", case.name);
        }
    }
}
