//! The result of a run: stored states, dense output, counters and the switch log.

use ballast_core::Method;
use ballast_switch::SwitchRecord;

use crate::error::Error;

/// Work and decision counters of a run. Plain numbers.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Stats {
    /// Right-hand-side evaluations, all purposes included.
    pub rhs_evals: usize,
    /// Jacobian evaluations (analytic or finite-difference).
    pub jacobian_evals: usize,
    /// Right-hand-side evaluations spent on finite-difference Jacobians.
    pub jacobian_rhs_evals: usize,
    /// LU factorisations.
    pub factorizations: usize,
    /// Linear solves with a factorised matrix.
    pub linear_solves: usize,
    /// Newton iterations.
    pub newton_iters: usize,
    /// Newton convergence failures.
    pub newton_failures: usize,
    /// Accepted steps.
    pub accepted: usize,
    /// Steps rejected by the error test.
    pub rejected: usize,
    /// Attempts that failed before an error estimate (NaN, Newton, singular matrix).
    pub failed_attempts: usize,
    /// Accepted explicit steps whose size the stability cap set.
    pub stability_limited: usize,
    /// Switches between schemes.
    pub switches: usize,
    /// Full spectral-radius estimates.
    pub spectral_estimates: usize,
    /// Operator products (right-hand-side calls or Jacobian products) spent on them.
    pub spectral_products: usize,
}

/// Dense output of every accepted step: one polynomial per step in
/// `theta = (t - t_start) / h`, stored as monomial coefficients.
#[derive(Clone, Debug, Default)]
pub(crate) struct DenseRecord {
    t_start: Vec<f64>,
    t_end: Vec<f64>,
    offset: Vec<usize>,
    degree: Vec<usize>,
    coeffs: Vec<f64>,
}

impl DenseRecord {
    /// Appends room for one step of `degree` and returns it to be filled.
    pub(crate) fn push(&mut self, t_start: f64, t_end: f64, degree: usize, n: usize) -> &mut [f64] {
        let off = self.coeffs.len();
        self.t_start.push(t_start);
        self.t_end.push(t_end);
        self.offset.push(off);
        self.degree.push(degree);
        self.coeffs.resize(off + (degree + 1) * n, 0.0);
        &mut self.coeffs[off..]
    }

    fn eval(&self, t: f64, forward: bool, n: usize, out: &mut [f64]) -> bool {
        if self.t_end.is_empty() {
            return false;
        }
        // First step whose end is at or beyond t (in the direction of integration).
        let k = if forward {
            self.t_end.partition_point(|&e| e < t)
        } else {
            self.t_end.partition_point(|&e| e > t)
        }
        .min(self.t_end.len() - 1);
        let (t0, t1) = (self.t_start[k], self.t_end[k]);
        let theta = if t1 != t0 { (t - t0) / (t1 - t0) } else { 0.0 };
        let deg = self.degree[k];
        let c = &self.coeffs[self.offset[k]..self.offset[k] + (deg + 1) * n];
        for m in 0..n {
            let mut v = c[deg * n + m];
            for j in (0..deg).rev() {
                v = v * theta + c[j * n + m];
            }
            out[m] = v;
        }
        true
    }
}

/// The result of [`integrate`](crate::integrate).
#[derive(Clone, Debug)]
pub struct Solution {
    pub(crate) n: usize,
    pub(crate) method: Method,
    pub(crate) output_mode: &'static str,
    pub(crate) t0: f64,
    pub(crate) t: Vec<f64>,
    pub(crate) y: Vec<f64>,
    pub(crate) dense: Option<DenseRecord>,
    pub(crate) t_final: f64,
    pub(crate) y_final: Vec<f64>,
    pub(crate) stats: Stats,
    pub(crate) switches: Vec<SwitchRecord>,
    pub(crate) events: Vec<crate::events::EventRecord>,
}

impl Solution {
    /// Time reached (the end of the span unless the run stopped early).
    pub fn t_final(&self) -> f64 {
        self.t_final
    }

    /// State at [`t_final`](Solution::t_final).
    pub fn y_final(&self) -> &[f64] {
        &self.y_final
    }

    /// Dimension of the state.
    pub fn dim(&self) -> usize {
        self.n
    }

    /// The method the run was asked to use.
    pub fn method(&self) -> Method {
        self.method
    }

    /// Start of the span.
    pub fn t_start(&self) -> f64 {
        self.t0
    }

    /// Stored times (every step, the requested times, or only the final
    /// time, depending on the output mode).
    pub fn times(&self) -> &[f64] {
        &self.t
    }

    /// Number of stored states.
    pub fn len(&self) -> usize {
        self.t.len()
    }

    /// Whether no state is stored.
    pub fn is_empty(&self) -> bool {
        self.t.is_empty()
    }

    /// The stored state number `i` (same index as [`times`](Solution::times)).
    pub fn state(&self, i: usize) -> Option<&[f64]> {
        self.y.get(i * self.n..(i + 1) * self.n)
    }

    /// Iterates over stored `(t, y)` pairs.
    pub fn iter(&self) -> impl Iterator<Item = (f64, &[f64])> + '_ {
        self.t
            .iter()
            .enumerate()
            .map(move |(i, &t)| (t, &self.y[i * self.n..(i + 1) * self.n]))
    }

    /// Work and decision counters.
    pub fn stats(&self) -> &Stats {
        &self.stats
    }

    /// Every switch between schemes, in order.
    pub fn switches(&self) -> &[SwitchRecord] {
        &self.switches
    }

    /// Every event found, in time order.
    pub fn events(&self) -> &[crate::events::EventRecord] {
        &self.events
    }

    /// The state at any `t` in the integrated span, from dense output.
    pub fn eval(&self, t: f64) -> Result<Vec<f64>, Error> {
        let mut out = vec![0.0; self.n];
        self.eval_into(t, &mut out)?;
        Ok(out)
    }

    /// Like [`eval`](Solution::eval), writing into `out` (length `dim()`,
    /// else [`Error::OutputLength`]).
    pub fn eval_into(&self, t: f64, out: &mut [f64]) -> Result<(), Error> {
        let forward = self.t_final >= self.t0;
        let (lo, hi) = if forward {
            (self.t0, self.t_final)
        } else {
            (self.t_final, self.t0)
        };
        if out.len() != self.n {
            return Err(Error::OutputLength {
                expected: self.n,
                got: out.len(),
            });
        }
        if !(t >= lo && t <= hi) {
            return Err(Error::EvalOutsideSpan {
                t,
                t0: self.t0,
                t1: self.t_final,
            });
        }
        if let Some(d) = &self.dense {
            if d.eval(t, forward, self.n, out) {
                return Ok(());
            }
        }
        if let Some(i) = self.t.iter().position(|&s| s == t) {
            out.copy_from_slice(&self.y[i * self.n..(i + 1) * self.n]);
            return Ok(());
        }
        if t == self.t_final {
            out.copy_from_slice(&self.y_final);
            return Ok(());
        }
        Err(Error::NoDenseOutput {
            t,
            mode: self.output_mode,
        })
    }
}
