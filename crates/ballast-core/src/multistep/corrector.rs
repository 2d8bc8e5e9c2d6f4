//! The BDF corrector: simplified Newton on the BDF equation in Nordsieck
//! form, with the shared iteration-matrix cache (Jacobians, linear
//! solvers) and Newton convergence control ([`crate::implicit::iteration`],
//! [`crate::newton`]).
//!
//! With the prediction `z^(0)` and `gamma = h / l_1`, the correction
//! `v = y_{n+1} - y^(0)` solves
//!
//! $$ G(v) = v - \big(h f(t_{n+1}, y^{(0)} + v) - z^{(0)}_1\big) / l_1 = 0 $$
//!
//! (`h p'(t_{n+1}) = h f` for the corrected polynomial). Each iteration
//! solves `(I - gamma~ J) dv = -G` with the factorised iteration matrix
//! of an earlier `gamma~` and Jacobian (Hairer and Wanner II, IV.8 and
//! V.5), kept in the shared [`IterationMatrix`] cache: it is keyed by
//! `gamma` (so an order change that moves `l_1` refactorises too) and
//! refactorised when `gamma / gamma~` leaves the band of
//! `ImplicitOptions::refactor_threshold`. Jacobian policy (common practice
//! for BDF, lazier than for Radau since a BDF step is cheap): re-evaluate
//! at the current state when a Newton iteration fails with an older
//! Jacobian, when the last contraction rate exceeded 0.3, or after 20
//! accepted steps.

use super::engine::Engine;
use crate::implicit::iteration::IterationMatrix;
use crate::newton::{NewtonControl, NewtonStatus};
use crate::norm::ErrorNorm;
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::StepFailure;
use crate::system::{Structure, System};
use num_complex::Complex64;

/// Re-evaluate the Jacobian after this many accepted steps.
const MAX_JACOBIAN_AGE: usize = 20;
/// Re-evaluate the Jacobian after a contraction rate above this.
const SLOW_RATE: f64 = 0.3;

/// Newton solver state for a BDF scheme; work arrays allocated once.
#[derive(Debug)]
pub(crate) struct Corrector {
    matrix: IterationMatrix,
    newton: NewtonControl,
    /// No usable Jacobian (start, restart) or one is due.
    need_jacobian: bool,
    age: usize,
    y: Vec<f64>,
    f: Vec<f64>,
    delta: Vec<f64>,
}

impl Corrector {
    /// A corrector for dimension `n` and the Jacobian `structure`
    /// (overridden by `opts.structure`).
    pub fn new(n: usize, structure: &Structure, opts: &ImplicitOptions) -> Result<Self, String> {
        Ok(Self {
            matrix: IterationMatrix::new(n, structure, opts, false)?,
            newton: NewtonControl::new(opts.max_newton_iters),
            need_jacobian: true,
            age: 0,
            y: vec![0.0; n],
            f: vec![0.0; n],
            delta: vec![0.0; n],
        })
    }

    /// Forgets the Jacobian and the factorisation (new state).
    pub fn reset(&mut self) {
        self.matrix.restart();
        self.need_jacobian = true;
        self.newton.reset();
    }

    /// Notes an accepted step and plans the next Jacobian.
    pub fn accepted(&mut self) {
        // Rate 0: the cache only learns that its Jacobian is now from an
        // earlier point; the refresh decision is ours.
        self.matrix.after_accept(0.0);
        self.age += 1;
        if self.age >= MAX_JACOBIAN_AGE || self.newton.theta() > SLOW_RATE {
            self.need_jacobian = true;
        }
    }

    /// Evaluates `J` at the accepted state `(e.t, y_n)`. `f_exact` says
    /// whether `e.dydt` is exactly `f(t_n, y_n)`; otherwise, for finite
    /// differences, `f` is evaluated there first.
    fn evaluate_jacobian<S: System>(
        &mut self,
        p: &mut Problem<S>,
        e: &Engine,
        f_exact: bool,
    ) -> Result<(), StepFailure> {
        let y = e.hist.col(0);
        let f0: &[f64] = if f_exact || self.matrix.evaluator().uses_analytic() == Some(true) {
            &e.dydt
        } else {
            p.rhs(e.t, y, &mut self.f);
            &self.f
        };
        // At t_n: a Jacobian of t_n + h cost BDF more steps on the
        // stiffness ramp (264 against 116 at rtol 1e-6).
        self.matrix.evaluate(p, e.t, 0.0, y, f0)?;
        self.need_jacobian = false;
        self.age = 0;
        self.newton.reset();
        Ok(())
    }

    /// Solves the corrector equation of order `q` for the step `e.h`;
    /// on success `e.corr` holds `v`.
    pub fn solve<S: System>(
        &mut self,
        p: &mut Problem<S>,
        e: &mut Engine,
        q: usize,
        norm: &ErrorNorm,
        f_exact: bool,
    ) -> Result<(), StepFailure> {
        let l1 = e.coef.l(q)[1];
        let gamma = e.h / l1;
        self.newton.set_tolerance(norm.rtol());
        loop {
            if self.need_jacobian {
                self.evaluate_jacobian(p, e, f_exact)?;
            }
            // The cache is keyed by gamma: shift 1 / gamma.
            let g =
                self.matrix
                    .factor(p, gamma, false, |g| 1.0 / g, |_| Complex64::new(0.0, 0.0))?;
            match self.iterate(p, e, l1, g, norm) {
                Ok(()) => return Ok(()),
                Err(StepFailure::NewtonFailed) => {
                    p.counters.newton_failures += 1;
                    if self.matrix.is_fresh() {
                        return Err(StepFailure::NewtonFailed);
                    }
                    self.need_jacobian = true;
                }
                Err(other) => return Err(other),
            }
        }
    }

    /// Simplified Newton iterations from `v = 0` with the current matrix.
    fn iterate<S: System>(
        &mut self,
        p: &mut Problem<S>,
        e: &mut Engine,
        l1: f64,
        g: f64,
        norm: &ErrorNorm,
    ) -> Result<(), StepFailure> {
        let (h, tn) = (e.h, e.t + e.h);
        e.corr.fill(0.0);
        self.newton.begin();
        loop {
            let (y0, z1) = (e.hist.trial(0), e.hist.trial(1));
            for i in 0..e.n {
                self.y[i] = y0[i] + e.corr[i];
            }
            p.rhs(tn, &self.y, &mut self.f);
            // -G / gamma~: the right side for (I / gamma~ - J) dv = -G / gamma~.
            for i in 0..e.n {
                self.delta[i] = ((h * self.f[i] - z1[i]) / l1 - e.corr[i]) / g;
            }
            if !self.delta.iter().all(|v| v.is_finite()) {
                return Err(StepFailure::NonFinite);
            }
            self.matrix.solve_real(p, &mut self.delta);
            p.counters.newton_iters += 1;
            for i in 0..e.n {
                e.corr[i] += self.delta[i];
            }
            match self
                .newton
                .update(norm.rms(&self.delta, e.hist.col(0), &self.y))
            {
                NewtonStatus::Converged => return Ok(()),
                NewtonStatus::Continue => {}
                NewtonStatus::Diverged | NewtonStatus::TooSlow => {
                    return Err(StepFailure::NewtonFailed)
                }
            }
        }
    }
}
