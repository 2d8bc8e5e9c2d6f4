//! State and bookkeeping shared by the Adams and BDF schemes: time, the
//! Nordsieck history, the corrections, error estimates per order, order
//! changes and dense output. The schemes add only their corrector.

use super::coefficients::{Coefficients, Family};
use super::nordsieck::Nordsieck;
use super::order::{Decision, Estimates, OrderSelector};
use super::HistoryError;
use crate::norm::ErrorNorm;
use crate::scheme::{Attempt, NextStep};

/// The common part of a Nordsieck multistep scheme.
#[derive(Clone, Debug)]
pub(crate) struct Engine {
    pub n: usize,
    pub coef: Coefficients,
    pub hist: Nordsieck,
    pub sel: OrderSelector,
    pub t: f64,
    pub t_prev: f64,
    /// Size of the last accepted step (0 before any).
    pub h_last: f64,
    /// Size of the step in progress.
    pub h: f64,
    /// `f(t, y)` at the current state.
    pub dydt: Vec<f64>,
    /// The correction vector `v` of the step in progress.
    pub corr: Vec<f64>,
    /// The correction of the last accepted step, scaled to the current step.
    corr_prev: Vec<f64>,
    prev_valid: bool,
    scratch: Vec<f64>,
    /// History set at start, not yet scaled to a real step.
    fresh: bool,
    next_order: usize,
    on_ok: Decision,
    on_fail: Option<Decision>,
}

impl Engine {
    /// An engine for `family`, dimension `n`, orders up to `max_order`.
    pub fn new(family: Family, n: usize, max_order: usize, min_gain: f64) -> Self {
        let keep = Decision {
            order: 1,
            factor: 1.0,
        };
        Self {
            n,
            coef: Coefficients::new(family),
            hist: Nordsieck::new(n, max_order),
            sel: OrderSelector::new(max_order, None, min_gain),
            t: 0.0,
            t_prev: 0.0,
            h_last: 0.0,
            h: 0.0,
            dydt: vec![0.0; n],
            corr: vec![0.0; n],
            corr_prev: vec![0.0; n],
            prev_valid: false,
            scratch: vec![0.0; n],
            fresh: true,
            next_order: 1,
            on_ok: keep,
            on_fail: None,
        }
    }

    /// The order the next step uses.
    pub fn order(&self) -> usize {
        self.next_order
    }

    /// Restarts from `(t, y)` at order 1 with `dydt = f(t, y)`, copied
    /// from `slope` when given, else evaluated; a non-finite slope is
    /// [`StepFailure::NonFinite`](crate::scheme::StepFailure::NonFinite).
    pub fn start_with<S: crate::system::System>(
        &mut self,
        p: &mut crate::problem::Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), crate::scheme::StepFailure> {
        match slope {
            Some(known) => self.dydt.copy_from_slice(known),
            None => p.rhs(t, y, &mut self.dydt),
        }
        if !self.dydt.iter().all(|v| v.is_finite()) {
            return Err(crate::scheme::StepFailure::NonFinite);
        }
        self.start(t, y);
        Ok(())
    }

    /// Restarts from `(t, y)` with `dydt` already holding `f(t, y)`: order 1.
    pub fn start(&mut self, t: f64, y: &[f64]) {
        self.t = t;
        self.t_prev = t;
        self.h_last = 0.0;
        // Scaled to a unit step until the first attempt gives the real one.
        self.hist.set_first_order(y, &self.dydt, 1.0);
        self.fresh = true;
        self.prev_valid = false;
        self.next_order = 1;
        self.sel.restart(1);
        self.on_fail = None;
    }

    /// Checks an order-`q` history of `cols` scaled to `h` (before `f` is
    /// evaluated at its first column).
    pub fn check_history(&self, q: usize, h: f64, cols: &[f64]) -> Result<(), HistoryError> {
        let max = self.sel.max_order();
        if q == 0 || q > max {
            return Err(HistoryError::Order { order: q, max });
        }
        let need = (q + 1) * self.n;
        if cols.len() < need || h == 0.0 || !h.is_finite() {
            return Err(HistoryError::Shape {
                need,
                got: cols.len(),
            });
        }
        if !cols[..need].iter().all(|v| v.is_finite()) {
            return Err(HistoryError::NonFinite);
        }
        Ok(())
    }

    /// The accepted history: `(order, step it is scaled to, columns)`.
    pub fn history(&self) -> (usize, f64, &[f64]) {
        let q = self.hist.order();
        (q, self.hist.step(), &self.hist.cols()[..(q + 1) * self.n])
    }

    /// Restarts from an order-`q` history `cols` scaled to the step `h`
    /// (for instance exact scaled derivatives `h^j y^{(j)}(t) / j!`).
    pub fn start_with_history(&mut self, t: f64, q: usize, h: f64, cols: &[f64]) {
        self.t = t;
        self.t_prev = t;
        self.h_last = 0.0;
        self.hist.set(q, h, cols);
        self.fresh = false;
        self.prev_valid = false;
        self.next_order = q;
        self.sel.restart(q);
        self.on_fail = None;
    }

    /// Applies a pending order change, scales the history to the step `h`
    /// and predicts. Returns the order of the step.
    pub fn prepare(&mut self, h: f64) -> usize {
        self.on_fail = None;
        while self.hist.order() > self.next_order {
            let q = self.hist.order();
            self.hist.lower_order(self.coef.m(q));
            self.prev_valid = false;
        }
        if self.hist.order() < self.next_order {
            let q = self.hist.order();
            let scale = self.coef.raise_scale(q);
            self.hist
                .raise_order(self.coef.m(q + 1), scale, &self.corr_prev);
            self.prev_valid = false;
        }
        let q = self.hist.order();
        let r = self.hist.rescale(h);
        if self.fresh {
            self.fresh = false;
        } else {
            self.sel.outside_change(r, q);
            let s = r.powi(q as i32 + 1);
            self.corr_prev.iter_mut().for_each(|v| *v *= s);
        }
        self.h = h;
        self.hist.predict();
        q
    }

    /// Error estimates and decisions once the trial array is corrected and
    /// `corr` holds the step's correction.
    pub fn finish(&mut self, norm: &ErrorNorm) -> Attempt {
        let q = self.hist.order();
        let n = self.n;
        let (y0, y1) = (self.hist.col(0), self.hist.trial(0));
        let current = self.coef.current_error_factor(q) * norm.rms(&self.corr, y0, y1);
        let lower =
            (q > 1).then(|| self.coef.lower_error_factor(q) * norm.rms(self.hist.trial(q), y0, y1));
        let higher = if self.prev_valid && q < self.sel.max_order() {
            for i in 0..n {
                self.scratch[i] = self.corr[i] - self.corr_prev[i];
            }
            let (y0, y1) = (self.hist.col(0), self.hist.trial(0));
            Some(self.coef.higher_error_factor(q) * norm.rms(&self.scratch, y0, y1))
        } else {
            None
        };
        let e = Estimates {
            lower,
            current,
            higher,
        };
        self.on_ok = self.sel.on_success(q, &e);
        let on_fail = self.sel.on_failure(q, &e);
        self.on_fail = Some(on_fail);
        let factor = if current <= 1.0 {
            self.on_ok.factor
        } else {
            on_fail.factor
        };
        Attempt {
            error: current,
            next: NextStep::Factor(factor),
        }
    }

    /// Commits the trial: time advances, corrections shift, the decision
    /// taken at the attempt becomes pending.
    pub fn accept(&mut self) {
        let q = self.hist.order();
        self.t_prev = self.t;
        self.t += self.h;
        self.h_last = self.h;
        self.hist.commit();
        std::mem::swap(&mut self.corr, &mut self.corr_prev);
        self.prev_valid = true;
        self.sel.accepted(q, &self.on_ok);
        self.next_order = self.on_ok.order;
        self.on_fail = None;
    }

    /// Forgets the trial; the decision for a failed step becomes pending.
    pub fn reject(&mut self) {
        let order = match self.on_fail.take() {
            Some(d) => d.order,
            None => self.hist.order(),
        };
        self.sel.rejected(order);
        self.next_order = order;
    }

    /// The correction of the last accepted step.
    pub fn last_correction(&self) -> &[f64] {
        &self.corr_prev
    }

    /// Puts `dydt` into the slope history after an accepted step without
    /// moving `y` (Adams: `z_j += l_j (h f - z_1)` for `j >= 1`).
    pub fn update_slope(&mut self) {
        let q = self.hist.order();
        let h = self.h_last;
        for (s, (d, z1)) in self
            .scratch
            .iter_mut()
            .zip(self.dydt.iter().zip(self.hist.col(1)))
        {
            *s = h * d - z1;
        }
        self.hist.correct(self.coef.l(q), &self.scratch, 1);
    }

    /// Dense output at `t` from the history polynomial.
    pub fn interpolate(&self, t: f64, out: &mut [f64]) {
        if self.h_last == 0.0 {
            out.copy_from_slice(self.hist.col(0));
            return;
        }
        self.hist.eval((t - self.t) / self.hist.step(), out);
    }

    /// Dense output as monomial coefficients in `theta = (t - t_prev) / h`.
    pub fn dense_coefficients(&self, coeffs: &mut [f64]) {
        if self.h_last == 0.0 {
            let n = self.n;
            coeffs[..n].copy_from_slice(self.hist.col(0));
            coeffs[n..(self.hist.order() + 1) * n].fill(0.0);
            return;
        }
        self.hist
            .theta_coefficients(self.h_last / self.hist.step(), coeffs);
    }
}
