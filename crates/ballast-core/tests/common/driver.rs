//! A minimal step loop for tests and benches only (the real controller is
//! `ballast-switch`): PI control on the scheme's error estimate, halving
//! after a failed step, clipping at the end point.

use ballast_core::control::{initial_step, PiController};
use ballast_core::{Atol, ErrorNorm, NextStep, Problem, Scheme, System, WorkCounters};

/// What a run cost.
#[derive(Clone, Copy, Debug, Default)]
pub struct RunStats {
    /// Accepted steps.
    pub accepted: usize,
    /// Steps rejected for accuracy.
    pub rejected: usize,
    /// Attempts that failed before an error estimate (Newton, singular, NaN).
    pub failed: usize,
    /// The problem's work counters.
    pub work: WorkCounters,
}

/// Integrates from `(t0, y0)` to `t1 > t0` and returns `y(t1)`.
pub fn run<S: System>(
    scheme: &mut dyn Scheme<S>,
    p: &mut Problem<S>,
    t0: f64,
    t1: f64,
    y0: &[f64],
    rtol: f64,
    atol: f64,
) -> Result<(Vec<f64>, RunStats), String> {
    let n = y0.len();
    let norm = ErrorNorm::new(rtol, Atol::Scalar(atol), n);
    let mut pi = PiController::default();
    let mut st = RunStats::default();
    scheme
        .start(p, t0, y0)
        .map_err(|e| format!("start: {e:?}"))?;
    let q = scheme.error_order();
    let f0 = scheme
        .dydt()
        .map(|d| d.to_vec())
        .unwrap_or_else(|| vec![0.0; n]);
    let (mut ys, mut fs) = (vec![0.0; n], vec![0.0; n]);
    let mut h = initial_step(&norm, t0, y0, &f0, q, 1.0, &mut ys, &mut fs, |t, y, d| {
        p.rhs(t, y, d)
    })
    .min(t1 - t0);
    let mut last_failed = false;
    while scheme.t() < t1 {
        let t = scheme.t();
        if h >= t1 - t || t + 1.0001 * h >= t1 {
            h = t1 - t;
        }
        if h <= 1e-14 * t.abs().max(1.0) || st.accepted + st.rejected + st.failed > 2_000_000 {
            return Err(format!(
                "step size underflow or too many steps at t = {t}, h = {h}"
            ));
        }
        match scheme.attempt(p, h, &norm) {
            Ok(a) if a.error <= 1.0 => {
                scheme.accept(p);
                st.accepted += 1;
                let mut f = pi.factor(a.error, q, true);
                if last_failed {
                    f = f.min(1.0);
                }
                if let NextStep::Factor(g) | NextStep::AtMost(g) = a.next {
                    f = f.min(g);
                }
                h *= f;
                last_failed = false;
            }
            Ok(a) => {
                scheme.reject();
                st.rejected += 1;
                h *= pi.factor(a.error, q, false);
            }
            Err(_) => {
                scheme.reject();
                st.failed += 1;
                h *= 0.5;
                last_failed = true;
            }
        }
    }
    st.work = p.counters;
    Ok((scheme.y().to_vec(), st))
}

#[allow(dead_code)] // used by the tests, not by the bench
/// The largest componentwise error relative to `|ref| + atol/rtol`-style
/// mixed scale: `max_i |y_i - r_i| / (|r_i| + floor)`.
pub fn mixed_error(y: &[f64], r: &[f64], floor: f64) -> f64 {
    y.iter()
        .zip(r)
        .map(|(a, b)| (a - b).abs() / (b.abs() + floor))
        .fold(0.0, f64::max)
}
