//! Convergence control for simplified Newton iterations.
//!
//! With increments `dx_k`, the contraction rate is estimated as
//! `theta_k = ||dx_k|| / ||dx_{k-1}||`, and the error of the current iterate
//! is at most `eta_k ||dx_k||` with `eta_k = theta_k / (1 - theta_k)`. The
//! iteration stops when `eta_k ||dx_k|| <= kappa` (norms weighted by the
//! tolerance, so 1 is the local error allowed), fails when `theta_k >= 1`,
//! and fails early when `theta_k^(kmax - k) / (1 - theta_k) ||dx_k|| > kappa`
//! predicts it cannot converge within the cap. Before the second iterate
//! the previous solve's `eta`, as `max(eta, eps)^0.8`, stands in (Hairer
//! and Wanner II, IV.8, eq. (8.10)–(8.14) and the text after them).
//!
//! ```
//! use ballast_core::newton::{NewtonControl, NewtonStatus};
//! let mut c = NewtonControl::new(7);
//! c.set_tolerance(1e-6);
//! c.begin();
//! // Increments shrinking by 10 each time converge in a few iterations.
//! let mut d = 1.0;
//! let status = loop {
//!     match c.update(d) { NewtonStatus::Continue => d *= 0.1, s => break s }
//! };
//! assert_eq!(status, NewtonStatus::Converged);
//! assert!((c.theta() - 0.1).abs() < 1e-12);
//! ```

/// What to do after an iterate.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NewtonStatus {
    /// The iterate is within `kappa` of the solution.
    Converged,
    /// Iterate again.
    Continue,
    /// The increments grew (`theta >= 1`) or became non-finite.
    Diverged,
    /// Convergence is too slow to finish within the iteration cap.
    TooSlow,
}

/// Rate monitoring and stopping rule for one Newton solve after another.
#[derive(Clone, Debug)]
pub struct NewtonControl {
    max_iters: usize,
    kappa: f64,
    eta: f64,
    theta: f64,
    prev: f64,
    /// The first increment's norm in the current (or last) solve.
    first: f64,
    k: usize,
}

impl NewtonControl {
    /// A controller capping each solve at `max_iters` iterations (at least 1).
    pub fn new(max_iters: usize) -> Self {
        Self {
            max_iters: max_iters.max(1),
            kappa: 0.03,
            eta: 1.0,
            theta: 0.0,
            prev: 0.0,
            first: 0.0,
            k: 0,
        }
    }

    /// Sets `kappa` from the relative tolerance:
    /// `kappa = max(10 eps / rtol, min(0.03, sqrt(rtol)))` (Hairer and
    /// Wanner II, IV.8, as used with their Radau code).
    pub fn set_tolerance(&mut self, rtol: f64) {
        let r = rtol.max(f64::EPSILON);
        self.kappa = (10.0 * f64::EPSILON / r).max(0.03f64.min(r.sqrt()));
    }

    /// The stopping threshold `kappa`.
    pub fn kappa(&self) -> f64 {
        self.kappa
    }

    /// Starts a new solve, carrying `eta` over from the last one.
    pub fn begin(&mut self) {
        self.eta = self.eta.max(f64::EPSILON).powf(0.8);
        self.k = 0;
        self.theta = 0.0;
        self.prev = 0.0;
    }

    /// Forgets the carried `eta` (after a new Jacobian or a failure).
    pub fn reset(&mut self) {
        self.eta = 1.0;
    }

    /// Records the weighted norm of the increment just applied.
    pub fn update(&mut self, dx_norm: f64) -> NewtonStatus {
        self.k += 1;
        if !dx_norm.is_finite() {
            self.eta = 1.0;
            return NewtonStatus::Diverged;
        }
        if self.k > 1 {
            if self.prev == 0.0 {
                return NewtonStatus::Converged;
            }
            self.theta = dx_norm / self.prev;
            if self.theta >= 0.99 {
                self.eta = 1.0;
                return NewtonStatus::Diverged;
            }
            self.eta = self.theta / (1.0 - self.theta);
            let left = (self.max_iters.saturating_sub(self.k)) as i32;
            if self.theta.powi(left) / (1.0 - self.theta) * dx_norm > self.kappa {
                self.eta = 1.0;
                return NewtonStatus::TooSlow;
            }
        }
        if self.k == 1 {
            self.first = dx_norm;
        }
        self.prev = dx_norm;
        if self.eta * dx_norm <= self.kappa || dx_norm == 0.0 {
            return NewtonStatus::Converged;
        }
        if self.k >= self.max_iters {
            self.eta = 1.0;
            return NewtonStatus::TooSlow;
        }
        NewtonStatus::Continue
    }

    /// Iterations of the current (or last) solve.
    pub fn iterations(&self) -> usize {
        self.k
    }

    /// The last contraction-rate estimate (0 before the second iterate).
    pub fn theta(&self) -> f64 {
        self.theta
    }

    /// The weighted norm of the first increment of the current (or last)
    /// solve: how far the starting guess was from the solution.
    pub fn first_increment(&self) -> f64 {
        self.first
    }

    /// The contraction rate at which a solve starting as far from the
    /// solution as the last one converges in `iters` iterations:
    /// `theta^(iters - 1) * first_increment = kappa`.
    pub fn rate_for(&self, iters: usize) -> f64 {
        if self.first <= self.kappa || iters < 2 {
            return 1.0;
        }
        (self.kappa / self.first).powf(1.0 / (iters - 1) as f64)
    }

    /// The iteration cap.
    pub fn max_iters(&self) -> usize {
        self.max_iters
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A solve whose first increment was 1e3 times `kappa` reaches `kappa`
    /// in 4 iterations at rate 0.1 (`0.1^3 * 1e3 = 1`); a start already
    /// within `kappa` asks for no particular rate.
    #[test]
    fn rate_for_inverts_the_convergence_count() {
        let mut c = NewtonControl::new(7);
        c.set_tolerance(1e-6); // kappa = 1e-3
        c.begin();
        assert_eq!(c.update(1.0), NewtonStatus::Continue);
        assert_eq!(c.first_increment(), 1.0);
        assert!((c.rate_for(4) - 0.1).abs() < 1e-12);
        assert!((c.rate_for(2) - 1e-3).abs() < 1e-15);
        c.begin();
        let _ = c.update(1e-4);
        assert_eq!(c.rate_for(4), 1.0);
    }

    #[test]
    fn growing_increments_diverge() {
        let mut c = NewtonControl::new(7);
        c.begin();
        assert_eq!(c.update(1.0), NewtonStatus::Continue);
        assert_eq!(c.update(2.0), NewtonStatus::Diverged);
        c.begin();
        assert_eq!(c.update(f64::NAN), NewtonStatus::Diverged);
    }

    #[test]
    fn slow_contraction_is_stopped_early() {
        // theta = 0.9 from a large start cannot reach kappa in 7 iterations:
        // 0.9^5 / 0.1 * 0.9 = 5.3 > 0.03.
        let mut c = NewtonControl::new(7);
        c.set_tolerance(1e-6);
        c.begin();
        assert_eq!(c.update(1.0), NewtonStatus::Continue);
        assert_eq!(c.update(0.9), NewtonStatus::TooSlow);
        assert_eq!(c.iterations(), 2);
    }

    #[test]
    fn fast_solve_carries_eta_to_the_next() {
        // After a solve with theta = 0.01 (eta ~ 0.0101), the next solve may
        // stop at its first iterate if eta^0.8 * ||dx|| <= kappa.
        let mut c = NewtonControl::new(7);
        c.set_tolerance(1e-4);
        assert!((c.kappa() - 0.01).abs() < 1e-15);
        c.begin();
        assert_eq!(c.update(1.0), NewtonStatus::Continue);
        assert_eq!(c.update(0.01), NewtonStatus::Converged);
        c.begin();
        assert_eq!(c.update(0.1), NewtonStatus::Converged);
        c.reset();
        c.begin();
        assert_eq!(c.update(0.1), NewtonStatus::Continue);
    }

    #[test]
    fn iteration_cap_is_respected() {
        let mut c = NewtonControl::new(2);
        c.set_tolerance(1e-10);
        c.begin();
        assert_eq!(c.update(1.0), NewtonStatus::Continue);
        assert_eq!(c.update(1e-3), NewtonStatus::TooSlow);
    }
}
