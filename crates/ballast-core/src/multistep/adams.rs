//! The variable-step, variable-order Adams predictor–corrector, orders 1 to 12.
//!
//! One step of order `q` from the Nordsieck history `z` (Hairer, Norsett
//! and Wanner I, III.6), in PECE mode:
//!
//! 1. **P**redict `z^(0) = P z` (the Pascal matrix: the history polynomial
//!    extrapolated, i.e. the Adams–Bashforth predictor);
//! 2. **E**valuate `f^(0) = f(t_{n+1}, y^(0))`;
//! 3. **C**orrect with the Adams–Moulton formula of order `q`:
//!    `v = h f^(0) - z^(0)_1`, `z = z^(0) + l v`;
//! 4. **E**valuate `f_{n+1} = f(t_{n+1}, y_{n+1})` on acceptance and put it
//!    into the slope history: `z_j += l_j (h f_{n+1} - z_1)` for `j >= 1`
//!    (keeps `y_{n+1}` and the older slopes).
//!
//! So an accepted step costs **two** `f` calls and a rejected one **one**.
//! The local error of order `q` is `|gamma*_q| ||v||`; the neighbouring
//! orders' errors come from `z_q` and from the difference of successive
//! corrections (see [`super::coefficients`] and [`super::order`]).
//!
//! The two evaluations at `t_{n+1}` also give a free stiffness indicator,
//! `||f_{n+1} - f^(0)|| / ||y_{n+1} - y^(0)||`, a lower bound of the
//! Jacobian's norm along the correction.
//!
//! ```
//! use ballast_core::{multistep::Adams, Atol, ErrorNorm, Problem, Scheme};
//! // y' = -y from y(0) = 1 to t = 1, steps chosen by the scheme's factor.
//! let mut p = Problem::new(|_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0], 1);
//! let norm = ErrorNorm::new(1e-8, Atol::Scalar(1e-10), 1);
//! let mut adams: Box<dyn Scheme<_>> = Box::new(Adams::new(1));
//! adams.start(&mut p, 0.0, &[1.0]).unwrap();
//! let mut h: f64 = 1e-4;
//! while adams.t() < 1.0 {
//!     let h_try = h.min(1.0 - adams.t());
//!     let a = adams.attempt(&mut p, h_try, &norm).unwrap();
//!     if a.error <= 1.0 { adams.accept(&mut p) } else { adams.reject() }
//!     h = h_try * a.factor().unwrap();
//! }
//! assert!((adams.y()[0] - (-1.0f64).exp()).abs() < 1e-7);
//! assert!(adams.order() > 3, "the order has climbed from 1");
//! ```

use super::coefficients::Family;
use super::engine::Engine;
use super::HistoryError;
use crate::method::Method;
use crate::norm::ErrorNorm;
use crate::problem::Problem;
use crate::scheme::{Attempt, Scheme, SchemeState, StepFailure};
use crate::system::System;

/// Variable-step, variable-order Adams PECE in Nordsieck form.
#[derive(Clone, Debug)]
pub struct Adams {
    e: Engine,
    /// `f` at the predicted state.
    f_pred: Vec<f64>,
    /// Free stiffness indicator of the last accepted step.
    stiffness: Option<f64>,
}

impl Adams {
    /// An Adams scheme for dimension `n`, orders 1 to 12.
    pub fn new(n: usize) -> Self {
        Self {
            e: Engine::new(Family::Adams, n, Family::Adams.max_order(), 1.2),
            f_pred: vec![0.0; n],
            stiffness: None,
        }
    }

    /// Caps the order at `q` (clamped to `1..=12`).
    pub fn with_max_order(mut self, q: usize) -> Self {
        self.e
            .sel
            .set_max_order(q.clamp(1, Family::Adams.max_order()));
        self
    }

    /// Pins the order at `q` (clamped to `1..=12`): no order selection.
    /// After [`Scheme::start`] the order climbs from 1 to `q`, one per step.
    pub fn with_fixed_order(mut self, q: usize) -> Self {
        let q = q.clamp(1, Family::Adams.max_order());
        self.e.sel.set_fixed(Some(q));
        self
    }

    /// Starts from an order-`q` Nordsieck history scaled to the step `h`:
    /// `cols[j*n..(j+1)*n] = h^j y^{(j)}(t) / j!` for `j = 0..=q` (a
    /// start-up by exact derivatives, or the history of another Nordsieck
    /// scheme, see [`Adams::history`]). One `f` call.
    pub fn start_with_history<S: System>(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        q: usize,
        h: f64,
        cols: &[f64],
    ) -> Result<(), HistoryError> {
        self.e.check_history(q, h, cols)?;
        let n = self.e.n;
        p.rhs(t, &cols[..n], &mut self.e.dydt);
        if !self.e.dydt.iter().all(|v| v.is_finite()) {
            return Err(HistoryError::NonFinite);
        }
        self.e.start_with_history(t, q, h, cols);
        // An Adams history holds the exact slope: h f(t, y) in column 1.
        for (z1, f) in self.e.hist.col_mut(1).iter_mut().zip(&self.e.dydt) {
            *z1 = h * f;
        }
        self.stiffness = None;
        Ok(())
    }

    /// The accepted Nordsieck history `(order, step it is scaled to,
    /// columns)`: what [`Adams::start_with_history`] takes, so a history
    /// can pass between Adams and BDF without a restart at order 1.
    pub fn history(&self) -> (usize, f64, &[f64]) {
        self.e.history()
    }
}

impl SchemeState for Adams {
    fn method(&self) -> Method {
        Method::Adams
    }

    fn order(&self) -> usize {
        self.e.order()
    }

    fn error_order(&self) -> usize {
        self.e.order()
    }

    fn is_implicit(&self) -> bool {
        false
    }

    fn t(&self) -> f64 {
        self.e.t
    }

    fn y(&self) -> &[f64] {
        self.e.hist.col(0)
    }

    fn dydt(&self) -> Option<&[f64]> {
        Some(&self.e.dydt)
    }

    fn t_prev(&self) -> f64 {
        self.e.t_prev
    }

    fn interpolate(&self, t: f64, out: &mut [f64]) {
        self.e.interpolate(t, out);
    }

    fn dense_degree(&self) -> usize {
        self.e.hist.order()
    }

    fn dense_coefficients(&self, coeffs: &mut [f64]) {
        self.e.dense_coefficients(coeffs);
    }

    fn stage_spectral_estimate(&self) -> Option<f64> {
        self.stiffness
    }
}

impl<S: System> Scheme<S> for Adams {
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure> {
        self.stiffness = None;
        self.e.start_with(p, t, y, slope)
    }

    fn attempt(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<Attempt, StepFailure> {
        let q = self.e.prepare(h);
        let e = &mut self.e;
        p.rhs(e.t + h, e.hist.trial(0), &mut self.f_pred);
        let p1 = e.hist.trial(1);
        for i in 0..e.n {
            e.corr[i] = h * self.f_pred[i] - p1[i];
        }
        if !e.corr.iter().all(|v| v.is_finite()) {
            return Err(StepFailure::NonFinite);
        }
        e.hist.correct_trial(e.coef.l(q), &e.corr, 0);
        Ok(e.finish(norm))
    }

    fn accept(&mut self, p: &mut Problem<S>) {
        let e = &mut self.e;
        let q = e.hist.order();
        e.accept();
        p.rhs(e.t, e.hist.col(0), &mut e.dydt);
        if !e.dydt.iter().all(|v| v.is_finite()) {
            // Keep the predicted slope; the next attempt will fail cleanly.
            let h = e.h_last;
            for (d, z1) in e.dydt.iter_mut().zip(e.hist.col(1)) {
                *d = z1 / h;
            }
            self.stiffness = None;
            return;
        }
        // Stiffness indicator: ||f_{n+1} - f^(0)|| / ||l_0 v||.
        let l0 = e.coef.l(q)[0];
        let (mut num, mut den) = (0.0, 0.0);
        for ((d, fp), v) in e.dydt.iter().zip(&self.f_pred).zip(e.last_correction()) {
            num += (d - fp) * (d - fp);
            den += (l0 * v) * (l0 * v);
        }
        self.stiffness = (den > 0.0).then(|| (num / den).sqrt());
        // The last E of PECE: f_{n+1} into the slope history.
        e.update_slope();
    }

    fn reject(&mut self) {
        self.e.reject();
    }
}
