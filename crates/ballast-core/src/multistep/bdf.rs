//! The variable-step, variable-order BDF scheme, orders 1 to 5.
//!
//! One step of order `q` from the Nordsieck history (Hairer and Wanner II,
//! V.5; Nordsieck 1962):
//!
//! 1. predict `z^(0) = P z` (the history polynomial extrapolated: the
//!    predictor `y^(0)` interpolates the last `q + 1` values);
//! 2. solve `y_{n+1} = y^(0) + v` with `v - (h f(t_{n+1}, y_{n+1}) -
//!    z^(0)_1) / l_1 = 0` by simplified Newton with the iteration matrix
//!    `I - (h / l_1) J`, reusing Jacobians and factorisations;
//! 3. correct the whole history: `z = z^(0) + l v`.
//!
//! The local error of order `q` is `||v|| / ((q + 1) l_1 + 1)` (the BDF
//! error constant `1 / ((q + 1) l_1)` over the predictor–corrector
//! difference `(1 + C_q) h^{q+1} y^{(q+1)}`); orders `q - 1` and `q + 1`
//! are estimated from `z_q` and from successive corrections.
//!
//! The cost of a step: the Newton iterations (one `f` call and one linear
//! solve each, typically 1 to 3), a factorisation when `h / l_1` has moved
//! by more than 20 %, a Jacobian now and then.
//!
//! ```
//! use ballast_core::{multistep::Bdf, Atol, ErrorNorm, ImplicitOptions, Problem,
//!                    Scheme, SchemeState, Structure};
//! // y' = -1000 (y - cos t): stiff; fixed steps of 0.01 to t = 1.
//! let f = |t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -1000.0 * (y[0] - t.cos());
//! let mut p = Problem::new(f, 1);
//! let norm = ErrorNorm::new(1e-6, Atol::Scalar(1e-9), 1);
//! let mut bdf = Bdf::new(1, &Structure::Dense, &ImplicitOptions::default()).unwrap();
//! bdf.start(&mut p, 0.0, &[1.0]).unwrap();
//! for _ in 0..100 {
//!     bdf.attempt(&mut p, 0.01, &norm).unwrap();
//!     bdf.accept(&mut p);
//! }
//! // y ~ cos t + sin t / 1000 after the transient.
//! assert!((bdf.y()[0] - 1.0f64.cos()).abs() < 2e-3);
//! ```

use super::coefficients::Family;
use super::corrector::Corrector;
use super::engine::Engine;
use super::HistoryError;
use crate::build::BuildError;
use crate::method::Method;
use crate::norm::ErrorNorm;
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::{Attempt, Scheme, SchemeState, StepFailure};
use crate::system::{Structure, System};

/// Variable-step, variable-order BDF in Nordsieck form.
#[derive(Debug)]
pub struct Bdf {
    e: Engine,
    corrector: Corrector,
    /// `e.dydt` is exactly `f(t, y)` (right after a start), not the
    /// history slope.
    dydt_exact: bool,
}

impl Bdf {
    /// A BDF scheme for dimension `n` whose Jacobian has `structure`; the
    /// Jacobian evaluator, the linear solver and every work array are
    /// allocated here.
    pub fn new(
        n: usize,
        structure: &Structure,
        opts: &ImplicitOptions,
    ) -> Result<Self, BuildError> {
        Ok(Self {
            e: Engine::new(Family::Bdf, n, Family::Bdf.max_order(), 1.2),
            corrector: Corrector::new(n, structure, opts).map_err(BuildError::InvalidOptions)?,
            dydt_exact: false,
        })
    }

    /// Caps the order at `q` (clamped to `1..=5`).
    pub fn with_max_order(mut self, q: usize) -> Self {
        self.e
            .sel
            .set_max_order(q.clamp(1, Family::Bdf.max_order()));
        self
    }

    /// Pins the order at `q` (clamped to `1..=5`): no order selection.
    /// After [`Scheme::start`] the order climbs from 1 to `q`, one per step.
    pub fn with_fixed_order(mut self, q: usize) -> Self {
        let q = q.clamp(1, Family::Bdf.max_order());
        self.e.sel.set_fixed(Some(q));
        self
    }

    /// Starts from an order-`q` Nordsieck history scaled to the step `h`:
    /// `cols[j*n..(j+1)*n] = h^j y^{(j)}(t) / j!` for `j = 0..=q` (a
    /// start-up by exact derivatives, or the history of another Nordsieck
    /// scheme, see [`Bdf::history`]). One `f` call.
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
        self.corrector.reset();
        self.dydt_exact = true;
        Ok(())
    }

    /// The accepted Nordsieck history `(order, step it is scaled to,
    /// columns)`: what [`Bdf::start_with_history`] takes, so a history
    /// can pass between Adams and BDF without a restart at order 1.
    pub fn history(&self) -> (usize, f64, &[f64]) {
        self.e.history()
    }
}

impl SchemeState for Bdf {
    fn method(&self) -> Method {
        Method::Bdf
    }

    fn order(&self) -> usize {
        self.e.order()
    }

    fn error_order(&self) -> usize {
        self.e.order()
    }

    fn is_implicit(&self) -> bool {
        true
    }

    fn t(&self) -> f64 {
        self.e.t
    }

    fn y(&self) -> &[f64] {
        self.e.hist.col(0)
    }

    /// The history slope `z_1 / h`: `f(t, y)` up to the Newton tolerance
    /// (exactly `f(t, y)` right after a start).
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
}

impl<S: System> Scheme<S> for Bdf {
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure> {
        self.e.start_with(p, t, y, slope)?;
        self.corrector.reset();
        self.dydt_exact = true;
        Ok(())
    }

    fn attempt(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<Attempt, StepFailure> {
        let q = self.e.prepare(h);
        self.corrector
            .solve(p, &mut self.e, q, norm, self.dydt_exact)?;
        let e = &mut self.e;
        e.hist.correct_trial(e.coef.l(q), &e.corr, 0);
        if !e.hist.trial(0).iter().all(|v| v.is_finite()) {
            return Err(StepFailure::NonFinite);
        }
        Ok(e.finish(norm))
    }

    fn accept(&mut self, _p: &mut Problem<S>) {
        let e = &mut self.e;
        e.accept();
        let h = e.h_last;
        for (d, z1) in e.dydt.iter_mut().zip(e.hist.col(1)) {
            *d = z1 / h;
        }
        self.dydt_exact = false;
        self.corrector.accepted();
    }

    fn reject(&mut self) {
        self.e.reject();
    }
}
