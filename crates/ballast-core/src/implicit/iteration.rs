//! The iteration-matrix cache shared by the implicit schemes: one Jacobian
//! kept across steps, and factorisations of `shift I - J` kept while the
//! step size changes little.
//!
//! Policy (Hairer and Wanner II, IV.8, "Some hints for the implementation"):
//! the Jacobian is evaluated at the first step, after a step whose Newton
//! iteration contracted slowly, and after a rejected or failed step when
//! the Jacobian in hand is from an earlier point; otherwise it is reused.
//! The factorisation is redone when the Jacobian changes or the step size
//! has moved outside the reuse band.

use crate::jacobian::JacobianEval;
use crate::linalg::LinearSolver;
use crate::matrix::Jacobian;
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::StepFailure;
use crate::system::{Structure, System};
use num_complex::Complex64;

/// A Jacobian with its evaluator and the factorisations built from it.
#[derive(Debug)]
pub struct IterationMatrix {
    /// The Jacobian in hand.
    pub jac: Jacobian,
    eval: JacobianEval,
    real: LinearSolver<f64>,
    complex: Option<LinearSolver<Complex64>>,
    /// A Jacobian has been evaluated.
    valid: bool,
    /// The Jacobian was evaluated at the current step's starting point.
    fresh: bool,
    /// Re-evaluate at the next opportunity.
    stale: bool,
    /// Step size the factorisations were built for (0: none).
    h_factored: f64,
    /// Threshold of [`ImplicitOptions::jacobian_refresh_rate`].
    refresh_rate: f64,
    /// Threshold of [`ImplicitOptions::refactor_threshold`].
    refactor_threshold: f64,
}

impl IterationMatrix {
    /// Work memory for dimension `n`; `structure` is the system's declared
    /// structure, overridden by `opts.structure`. `complex` adds a complex
    /// factorisation (Radau IIA).
    pub fn new(
        n: usize,
        structure: &Structure,
        opts: &ImplicitOptions,
        complex: bool,
    ) -> Result<Self, String> {
        let s = opts.structure.as_ref().unwrap_or(structure);
        Ok(Self {
            jac: Jacobian::for_structure(n, s),
            eval: JacobianEval::new(n, s, opts.jacobian)?,
            real: LinearSolver::new(n, s)?,
            complex: if complex {
                Some(LinearSolver::new(n, s)?)
            } else {
                None
            },
            valid: false,
            fresh: false,
            stale: true,
            h_factored: 0.0,
            refresh_rate: opts.jacobian_refresh_rate,
            refactor_threshold: opts.refactor_threshold,
        })
    }

    /// The Jacobian evaluator (for its counts and analytic/FD status).
    pub fn evaluator(&self) -> &JacobianEval {
        &self.eval
    }

    /// Whether the Jacobian in hand was evaluated at the current point.
    pub fn is_fresh(&self) -> bool {
        self.fresh
    }

    /// Evaluates the Jacobian at `(t, y)` now (`f0 = f(t, y)`), an
    /// analytic one at time `t + ahead` (see [`JacobianEval::evaluate`]).
    pub fn evaluate<S: System>(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        ahead: f64,
        y: &[f64],
        f0: &[f64],
    ) -> Result<(), StepFailure> {
        self.eval.evaluate(p, t, ahead, y, f0, &mut self.jac)?;
        self.valid = true;
        self.fresh = true;
        self.stale = false;
        self.h_factored = 0.0;
        Ok(())
    }

    /// Evaluates the Jacobian (as [`Self::evaluate`]) when none is in hand
    /// or a refresh was asked for and the one in hand is from an earlier
    /// point.
    pub fn ensure_jacobian<S: System>(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        ahead: f64,
        y: &[f64],
        f0: &[f64],
    ) -> Result<(), StepFailure> {
        if !self.valid || (self.stale && !self.fresh) {
            self.evaluate(p, t, ahead, y, f0)?;
        }
        Ok(())
    }

    /// Whether the factorisation for `h_factored` may serve a step `h`.
    fn reusable(&self, h: f64, fast: bool) -> bool {
        if self.h_factored == 0.0 {
            return false;
        }
        let q = h / self.h_factored;
        if fast {
            (1.0..1.0 + self.refactor_threshold).contains(&q)
        } else {
            (q - 1.0).abs() < self.refactor_threshold
        }
    }

    /// Factorises `shift(h) I - J` for a step `h` unless the factorisation
    /// in hand may be kept. `shift_real(h)` (and `shift_complex(h)` for
    /// Radau) give the shifts. `band_above_only` keeps only for
    /// `h / h_factored` in `[1, 1 + threshold)` (the Radau rule of Hairer
    /// and Wanner II, IV.8). Returns the step size the factorisation is for.
    pub fn factor<S: System>(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        band_above_only: bool,
        shift_real: impl Fn(f64) -> f64,
        shift_complex: impl Fn(f64) -> Complex64,
    ) -> Result<f64, StepFailure> {
        if self.reusable(h, band_above_only) {
            return Ok(self.h_factored);
        }
        self.h_factored = 0.0;
        match self.complex.as_mut() {
            Some(c) => {
                let (sr, sc) = (shift_real(h), shift_complex(h));
                self.real.factor_with_complex(sr, c, sc, &self.jac)?;
                p.counters.factorizations += 2;
            }
            None => {
                self.real.factor(shift_real(h), &self.jac)?;
                p.counters.factorizations += 1;
            }
        }
        self.h_factored = h;
        Ok(h)
    }

    /// Solves with the real factorisation, counting the solve.
    pub fn solve_real<S: System>(&mut self, p: &mut Problem<S>, b: &mut [f64]) {
        p.counters.linear_solves += 1;
        self.real.solve_in_place(b);
    }

    /// Solves with the real and the complex factorisation together (see
    /// [`LinearSolver::solve_with_complex`]), counting two solves; without
    /// a complex factorisation, only the real solve.
    pub fn solve_both<S: System>(
        &mut self,
        p: &mut Problem<S>,
        b: &mut [f64],
        c: &mut [Complex64],
    ) {
        match self.complex.as_mut() {
            Some(z) => {
                p.counters.linear_solves += 2;
                self.real.solve_with_complex(b, z, c);
            }
            None => self.solve_real(p, b),
        }
    }

    /// After an accepted step whose slowest Newton rate was `theta`: the
    /// Jacobian now belongs to an earlier point, and is refreshed at the
    /// next step when `theta` exceeded the refresh rate.
    pub fn after_accept(&mut self, theta: f64) {
        self.fresh = false;
        if theta > self.refresh_rate {
            self.stale = true;
        }
    }

    /// After a rejected step or a failed Newton iteration: refresh the
    /// Jacobian if it is from an earlier point, and refactor in any case.
    pub fn after_failure(&mut self) {
        if !self.fresh {
            self.stale = true;
        }
        self.h_factored = 0.0;
    }

    /// After a rejection for accuracy: the Jacobian is kept if fresh, the
    /// factorisation must follow the new step size.
    pub fn after_reject(&mut self) {
        if !self.fresh {
            self.stale = true;
        }
    }

    /// Drops the factorisation so the next [`factor`](Self::factor)
    /// refactors (Rosenbrock methods need the exact step size).
    pub fn drop_factorisation(&mut self) {
        self.h_factored = 0.0;
    }

    /// Forgets everything (restart at a new point).
    pub fn restart(&mut self) {
        self.valid = false;
        self.fresh = false;
        self.stale = true;
        self.h_factored = 0.0;
    }
}
