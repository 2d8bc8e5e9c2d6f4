//! Keeping the states the output mode asks for: every step with dense
//! output, the states at requested times, or only the final state.

use crate::options::{Options, Output};
use crate::solution::{DenseRecord, Solution};

/// Keeps the states the output mode asks for.
pub(crate) struct OutputKeeper {
    mode: Output,
    n: usize,
    t: Vec<f64>,
    y: Vec<f64>,
    dense: Option<DenseRecord>,
    /// Requested times in the direction of integration, and the next one due.
    at: Vec<f64>,
    next_at: usize,
    buf: Vec<f64>,
}

impl OutputKeeper {
    pub(crate) fn new(opts: &Options, n: usize, t0: f64, t1: f64, y0: &[f64]) -> Self {
        let mut k = Self {
            mode: opts.output.clone(),
            n,
            t: Vec::new(),
            y: Vec::new(),
            dense: None,
            at: Vec::new(),
            next_at: 0,
            buf: vec![0.0; n],
        };
        match &opts.output {
            Output::Steps => {
                k.t.push(t0);
                k.y.extend_from_slice(y0);
                k.dense = Some(DenseRecord::default());
            }
            Output::At(times) => {
                k.at = times.clone();
                // Validation guarantees the times lie in the span; order them
                // along the direction of integration.
                k.at.sort_by(|a, b| a.total_cmp(b));
                if t1 < t0 {
                    k.at.reverse();
                }
                while k.next_at < k.at.len() && k.at[k.next_at] == t0 {
                    k.t.push(t0);
                    k.y.extend_from_slice(y0);
                    k.next_at += 1;
                }
            }
            Output::Final => {}
        }
        k
    }

    pub(crate) fn mode_name(&self) -> &'static str {
        match self.mode {
            Output::Steps => "steps",
            Output::At(_) => "at requested times",
            Output::Final => "final state only",
        }
    }

    /// Keeps what the output mode asks for after an accepted step
    /// (nothing for the final state only; checked inline, so that mode
    /// costs no call per step).
    #[inline]
    pub(crate) fn record(
        &mut self,
        t_prev: f64,
        t: f64,
        y: &[f64],
        scheme: &dyn ballast_core::SchemeState,
    ) {
        if !matches!(self.mode, Output::Final) {
            self.record_kept(t_prev, t, y, scheme);
        }
    }

    fn record_kept(
        &mut self,
        t_prev: f64,
        t: f64,
        y: &[f64],
        scheme: &dyn ballast_core::SchemeState,
    ) {
        match self.mode {
            Output::Steps => {
                self.t.push(t);
                self.y.extend_from_slice(y);
                if let Some(d) = self.dense.as_mut() {
                    let deg = scheme.dense_degree();
                    let slot = d.push(t_prev, scheme.t(), deg, self.n);
                    scheme.dense_coefficients(slot);
                }
            }
            Output::At(_) => {
                let forward = t >= t_prev;
                while self.next_at < self.at.len() {
                    let ta = self.at[self.next_at];
                    let due = if forward { ta <= t } else { ta >= t };
                    if !due {
                        break;
                    }
                    if ta == t {
                        self.buf.copy_from_slice(y);
                    } else {
                        scheme.interpolate(ta, &mut self.buf);
                    }
                    self.t.push(ta);
                    self.y.extend_from_slice(&self.buf);
                    self.next_at += 1;
                }
            }
            Output::Final => {}
        }
    }

    pub(crate) fn finish(&mut self, sol: &mut Solution) {
        sol.t = std::mem::take(&mut self.t);
        sol.y = std::mem::take(&mut self.y);
        sol.dense = self.dense.take();
        if matches!(self.mode, Output::Final) {
            sol.t.push(sol.t_final);
            sol.y.extend_from_slice(&sol.y_final);
        }
    }
}
