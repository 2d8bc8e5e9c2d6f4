//! Jacobians `J = df/dy` for the implicit schemes: the system's analytic
//! Jacobian, or forward differences with grouped columns.
//!
//! A forward difference perturbs `y_j` by
//! `delta_j = sqrt(eps) * max(|y_j|, FD_FLOOR)` (common practice; Hairer and
//! Wanner II, IV.8 use the same order of increment) and reads column `j` as
//! `(f(t, y + delta_j e_j) - f(t, y)) / delta_j`. Columns that share no row
//! are perturbed together ([`colouring`]), so a banded Jacobian costs
//! `lower + upper + 1` calls and a sparse one as many calls as colours.
//!
//! ```
//! use ballast_core::{jacobian::JacobianEval, Jacobian, JacobianSource, Problem, Structure};
//! // f = (-2 y0 + y1, y0 - 2 y1 + y2, y1 - 2 y2): tridiagonal.
//! let f = |_t: f64, y: &[f64], d: &mut [f64]| {
//!     d[0] = -2.0 * y[0] + y[1];
//!     d[1] = y[0] - 2.0 * y[1] + y[2];
//!     d[2] = y[1] - 2.0 * y[2];
//! };
//! let s = Structure::Banded { lower: 1, upper: 1 };
//! let mut p = Problem::new(f, 3);
//! let mut ev = JacobianEval::new(3, &s, JacobianSource::FiniteDifference).unwrap();
//! let mut jac = Jacobian::for_structure(3, &s);
//! let (y, mut f0) = ([1.0, 2.0, 3.0], [0.0; 3]);
//! p.rhs(0.0, &y, &mut f0);
//! ev.evaluate(&mut p, 0.0, 0.0, &y, &f0, &mut jac).unwrap();
//! assert_eq!(p.counters.jacobian_rhs_evals, 3); // bandwidth + 1 calls, not n
//! assert!((jac.get(1, 0) - 1.0).abs() < 1e-6 && (jac.get(1, 1) + 2.0).abs() < 1e-6);
//! ```

pub mod colouring;

use crate::matrix::Jacobian;
use crate::options::JacobianSource;
use crate::problem::Problem;
use crate::scheme::StepFailure;
use crate::system::{Structure, System};
use colouring::ColumnGroups;

/// Smallest scale of a component in the finite-difference increment, so a
/// zero component still gets a perturbation (common practice).
pub const FD_FLOOR: f64 = 1e-5;

/// Why an analytic Jacobian could not be used.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum JacobianIssue {
    /// The options demand an analytic Jacobian and the system has none.
    Missing,
    /// The analytic Jacobian has a non-finite entry.
    NonFinite,
}

/// Evaluates Jacobians into a [`Jacobian`] of a fixed structure, with
/// work arrays allocated once.
#[derive(Debug)]
pub struct JacobianEval {
    n: usize,
    structure: Structure,
    source: JacobianSource,
    groups: ColumnGroups,
    y_pert: Vec<f64>,
    f_pert: Vec<f64>,
    delta: Vec<f64>,
    /// Whether the system supplied an analytic Jacobian (known after the
    /// first evaluation).
    analytic: Option<bool>,
    issue: Option<JacobianIssue>,
}

impl JacobianEval {
    /// An evaluator for dimension `n` and `structure`; the column grouping
    /// for finite differences is computed here. Fails when the structure
    /// does not fit `n`.
    pub fn new(n: usize, structure: &Structure, source: JacobianSource) -> Result<Self, String> {
        let groups = match structure {
            Structure::Dense => ColumnGroups::dense(n),
            Structure::Banded { lower, upper } => ColumnGroups::banded(n, *lower, *upper),
            Structure::Sparse(p) => {
                if p.dim() != n {
                    return Err(format!(
                        "sparsity pattern is {0}×{0}, the system has dimension {n}",
                        p.dim()
                    ));
                }
                ColumnGroups::greedy(p)
            }
        };
        Ok(Self {
            n,
            structure: structure.clone(),
            source,
            groups,
            y_pert: vec![0.0; n],
            f_pert: vec![0.0; n],
            delta: vec![0.0; n],
            analytic: None,
            issue: None,
        })
    }

    /// Right-hand-side calls per finite-difference Jacobian.
    pub fn fd_calls(&self) -> usize {
        self.groups.len()
    }

    /// Whether the Jacobians come from the system's analytic Jacobian
    /// (`None` before the first evaluation).
    pub fn uses_analytic(&self) -> Option<bool> {
        self.analytic
    }

    /// What went wrong with the analytic Jacobian in the last evaluation.
    pub fn issue(&self) -> Option<JacobianIssue> {
        self.issue
    }

    /// Writes `J(t, y)` into `jac` (laid out for this evaluator's
    /// structure). `f0 = f(t, y)` is needed for finite differences. Counts
    /// the evaluation and its right-hand-side calls in `p.counters`. An
    /// analytic Jacobian is taken at time `t + ahead` (with the same `y`;
    /// `ahead = 0` for `J(t, y)`); finite differences stay at `t`, where the
    /// base value `f0` is in hand: moving them would cost a call per
    /// Jacobian on every problem, time-dependent or not.
    pub fn evaluate<S: System>(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        ahead: f64,
        y: &[f64],
        f0: &[f64],
        jac: &mut Jacobian,
    ) -> Result<(), StepFailure> {
        p.counters.jacobian_evals += 1;
        self.issue = None;
        if self.source != JacobianSource::FiniteDifference && self.analytic != Some(false) {
            jac.fill_zero();
            let given = jac.dim() == self.n && p.system.jacobian(t + ahead, y, jac);
            self.analytic = Some(given);
            if given {
                return if all_finite(jac) {
                    Ok(())
                } else {
                    self.issue = Some(JacobianIssue::NonFinite);
                    Err(StepFailure::NonFinite)
                };
            }
            if self.source == JacobianSource::Analytic {
                self.issue = Some(JacobianIssue::Missing);
                return Err(StepFailure::NewtonFailed);
            }
        }
        self.finite_difference(p, t, y, f0, jac)
    }

    fn finite_difference<S: System>(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        f0: &[f64],
        jac: &mut Jacobian,
    ) -> Result<(), StepFailure> {
        let n = self.n;
        let sq = f64::EPSILON.sqrt();
        self.y_pert.copy_from_slice(y);
        for g in 0..self.groups.len() {
            for &j in self.groups.group(g) {
                let yj = y[j];
                let d = sq * yj.abs().max(FD_FLOOR);
                self.y_pert[j] = yj + d;
                // The increment actually represented in floating point.
                self.delta[j] = self.y_pert[j] - yj;
            }
            p.rhs(t, &self.y_pert, &mut self.f_pert);
            p.counters.jacobian_rhs_evals += 1;
            for &j in self.groups.group(g) {
                self.y_pert[j] = y[j];
                let inv = 1.0 / self.delta[j];
                match &self.structure {
                    Structure::Dense => {
                        for i in 0..n {
                            jac.set(i, j, (self.f_pert[i] - f0[i]) * inv);
                        }
                    }
                    Structure::Banded { lower, upper } => {
                        for i in j.saturating_sub(*upper)..(j + lower + 1).min(n) {
                            jac.set(i, j, (self.f_pert[i] - f0[i]) * inv);
                        }
                    }
                    Structure::Sparse(pat) => {
                        for &i in pat.column(j) {
                            jac.set(i, j, (self.f_pert[i] - f0[i]) * inv);
                        }
                    }
                }
            }
        }
        if self.f_pert.iter().all(|v| v.is_finite()) && all_finite(jac) {
            Ok(())
        } else {
            Err(StepFailure::NonFinite)
        }
    }
}

fn all_finite(jac: &Jacobian) -> bool {
    use crate::matrix::Storage;
    match jac.storage() {
        Storage::Dense(v) => v.iter().all(|x| x.is_finite()),
        Storage::Banded { values, .. } => values.iter().all(|x| x.is_finite()),
        Storage::Sparse { values, .. } => values.iter().all(|x| x.is_finite()),
    }
}

/// Forward-difference time derivative `f_t ≈ (f(t + d, y) - f(t, y)) / d`,
/// `d = sqrt(eps) * max(|t|, 1)`, for Rosenbrock methods on non-autonomous
/// systems (Hairer and Wanner II, IV.7). One right-hand-side call.
pub fn time_derivative<S: System>(
    p: &mut Problem<S>,
    t: f64,
    y: &[f64],
    f0: &[f64],
    out: &mut [f64],
) {
    let d = f64::EPSILON.sqrt() * t.abs().max(1.0);
    let t1 = t + d;
    let d = t1 - t;
    p.rhs(t1, y, out);
    p.counters.jacobian_rhs_evals += 1;
    for i in 0..out.len() {
        out[i] = (out[i] - f0[i]) / d;
    }
}

#[cfg(test)]
mod tests;
