//! A system together with its dimension and work counters.

use crate::system::System;

/// Work counters shared by every scheme and the controller. Plain numbers.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct WorkCounters {
    /// Right-hand-side evaluations (including those for finite-difference Jacobians).
    pub rhs_evals: usize,
    /// Jacobian evaluations (analytic or finite-difference).
    pub jacobian_evals: usize,
    /// Right-hand-side evaluations spent on finite-difference Jacobians.
    pub jacobian_rhs_evals: usize,
    /// Matrix factorisations (LU).
    pub factorizations: usize,
    /// Linear solves with a factorised matrix.
    pub linear_solves: usize,
    /// Newton iterations.
    pub newton_iters: usize,
    /// Newton convergence failures (divergence or too slow).
    pub newton_failures: usize,
}

impl WorkCounters {
    /// Adds `other` into `self`.
    pub fn absorb(&mut self, other: &WorkCounters) {
        self.rhs_evals += other.rhs_evals;
        self.jacobian_evals += other.jacobian_evals;
        self.jacobian_rhs_evals += other.jacobian_rhs_evals;
        self.factorizations += other.factorizations;
        self.linear_solves += other.linear_solves;
        self.newton_iters += other.newton_iters;
        self.newton_failures += other.newton_failures;
    }
}

/// The user's system with its dimension and the run's work counters.
///
/// Schemes call [`Problem::rhs`] rather than the system directly so every
/// evaluation is counted in one place.
#[derive(Debug)]
pub struct Problem<S> {
    /// The user's system.
    pub system: S,
    /// Dimension of the state.
    pub n: usize,
    /// Work counters for the run.
    pub counters: WorkCounters,
}

impl<S: System> Problem<S> {
    /// Wraps `system` of dimension `n`.
    pub fn new(system: S, n: usize) -> Self {
        Self {
            system,
            n,
            counters: WorkCounters::default(),
        }
    }

    /// Evaluates `dydt = f(t, y)` and counts it.
    #[inline]
    pub fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]) {
        self.counters.rhs_evals += 1;
        self.system.rhs(t, y, dydt);
    }
}
