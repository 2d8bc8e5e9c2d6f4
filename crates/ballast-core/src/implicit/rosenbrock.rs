//! Rosenbrock (linearly implicit) methods, both of order 3 with an embedded
//! order-2 solution: ROS3P (Lang and Verwer, BIT 41 (2001) 731–738) and a
//! four-stage L-stable method (Sandu et al., Atmospheric Environment 31
//! (1997) 3459–3472).
//!
//! Written in the variables `u_i = sum_{j<=i} gamma_ij k_j` (Hairer and
//! Wanner II, IV.7, eq. (7.6)–(7.7)), each stage is one solve with the same
//! matrix `1/(h gamma) I - J`:
//!
//! $$ \Big(\tfrac{1}{h\gamma} I - J\Big) u_i = f\Big(t_n + \alpha_i h,\;
//!    y_n + \sum_{j<i} a_{ij} u_j\Big) + \sum_{j<i} \tfrac{c_{ij}}{h} u_j
//!    + \gamma_i h f_t, $$
//!
//! `y_{n+1} = y_n + sum_i m_i u_i`, with `a = alpha Gamma^{-1}`,
//! `c_ij = -(Gamma^{-1})_ij`, `m = b^T Gamma^{-1}`. The Jacobian and `f_t`
//! (forward difference) are evaluated at every new step, since the order of
//! a Rosenbrock method rests on the exact Jacobian. A stage whose argument
//! equals the previous stage's reuses its `f` value (ROS3P's third stage,
//! the four-stage method's second).
//!
//! The error estimate is `sum (m_i - mhat_i) u_i`. When the embedded
//! solution does not damp stiff components (ROS3P), the estimate is passed
//! through `(I - h gamma J)^{-1}` (one more solve with the same
//! factorisation), as for the implicit Runge–Kutta schemes (Hairer and
//! Wanner II, IV.8, eq. (8.20); common practice); unfiltered, those
//! components would dictate the step.
//!
//! Dense output: the cubic Hermite interpolant (order 3, the order of both
//! methods), since neither paper publishes a continuous extension.

use super::iteration::IterationMatrix;
use super::tableau::RosenbrockTableau;
use crate::endpoints::Endpoints;
use crate::jacobian::time_derivative;
use crate::method::Method;
use crate::norm::ErrorNorm;
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::{Attempt, Scheme, SchemeState, StepFailure};
use crate::system::{Structure, System};

/// A Rosenbrock scheme over a static tableau.
#[derive(Debug)]
pub struct Rosenbrock {
    tab: &'static RosenbrockTableau,
    /// Transformed coefficients (row `i` has `i` entries).
    a: Vec<Vec<f64>>,
    c: Vec<Vec<f64>>,
    m: Vec<f64>,
    m_err: Vec<f64>,
    same_point: Vec<bool>,
    n: usize,
    /// The end points of the last step; the slopes there are `f_prev` and `f0`.
    ends: Endpoints,
    f0: Vec<f64>,
    f_prev: Vec<f64>,
    h: f64,
    u: Vec<Vec<f64>>,
    ft: Vec<f64>,
    ys: Vec<f64>,
    fy: Vec<f64>,
    y_new: Vec<f64>,
    err: Vec<f64>,
    iter: IterationMatrix,
}

impl Rosenbrock {
    /// A scheme for `tab` on a system of dimension `n` whose Jacobian has `structure`.
    pub fn new(
        tab: &'static RosenbrockTableau,
        n: usize,
        structure: &Structure,
        opts: &ImplicitOptions,
    ) -> Result<Self, String> {
        let s = tab.stages();
        // Gamma^{-1} by forward substitution (Gamma lower triangular, diagonal gamma).
        let gam = |i: usize, j: usize| {
            if i == j {
                tab.gamma
            } else {
                tab.gamma_ij[i][j]
            }
        };
        let mut gi = vec![vec![0.0; s]; s];
        for j in 0..s {
            for i in j..s {
                let rhs = if i == j { 1.0 } else { 0.0 };
                let sum: f64 = (j..i).map(|k| gam(i, k) * gi[k][j]).sum();
                gi[i][j] = (rhs - sum) / tab.gamma;
            }
        }
        let a: Vec<Vec<f64>> = (0..s)
            .map(|i| {
                (0..i)
                    .map(|j| (j..i).map(|k| tab.alpha[i][k] * gi[k][j]).sum())
                    .collect()
            })
            .collect();
        let c: Vec<Vec<f64>> = (0..s)
            .map(|i| (0..i).map(|j| -gi[i][j]).collect())
            .collect();
        let weights = |b: &[f64]| -> Vec<f64> {
            (0..s)
                .map(|j| (j..s).map(|i| b[i] * gi[i][j]).sum())
                .collect()
        };
        let m = weights(tab.b);
        let mh = weights(
            tab.bhat
                .ok_or_else(|| format!("{} has no embedded solution", tab.method))?,
        );
        let m_err = m.iter().zip(&mh).map(|(x, y)| x - y).collect();
        let same_point = (0..s)
            .map(|i| {
                i >= 1
                    && tab.alpha_sum[i] == tab.alpha_sum[i - 1]
                    && a[i][i - 1] == 0.0
                    && (0..i - 1).all(|j| a[i][j] == a[i - 1][j])
            })
            .collect();
        Ok(Self {
            tab,
            a,
            c,
            m,
            m_err,
            same_point,
            n,
            ends: Endpoints::new(n),
            f0: vec![0.0; n],
            f_prev: vec![0.0; n],
            h: 0.0,
            u: vec![vec![0.0; n]; s],
            ft: vec![0.0; n],
            ys: vec![0.0; n],
            fy: vec![0.0; n],
            y_new: vec![0.0; n],
            err: vec![0.0; n],
            iter: IterationMatrix::new(n, structure, opts, false)?,
        })
    }

    /// The transformed weights `m = b^T Gamma^{-1}`.
    pub fn weights(&self) -> &[f64] {
        &self.m
    }
}

impl SchemeState for Rosenbrock {
    fn method(&self) -> Method {
        self.tab.method
    }
    fn order(&self) -> usize {
        self.tab.order
    }
    fn error_order(&self) -> usize {
        self.tab.embedded_order
    }
    fn is_implicit(&self) -> bool {
        true
    }
    fn t(&self) -> f64 {
        self.ends.t
    }
    fn y(&self) -> &[f64] {
        &self.ends.y
    }
    fn dydt(&self) -> Option<&[f64]> {
        self.ends.dydt(&self.f0)
    }
    fn t_prev(&self) -> f64 {
        self.ends.t_prev
    }
    fn interpolate(&self, t: f64, out: &mut [f64]) {
        self.ends.hermite(t, &self.f_prev, &self.f0, out);
    }
    fn dense_degree(&self) -> usize {
        3
    }
    fn dense_coefficients(&self, coeffs: &mut [f64]) {
        self.ends
            .hermite_coefficients(&self.f_prev, &self.f0, coeffs);
    }
}

impl<S: System> Scheme<S> for Rosenbrock {
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure> {
        self.iter.restart();
        let started = self.ends.start(p, t, y, slope, &mut self.f0);
        self.f_prev.copy_from_slice(&self.f0);
        started
    }

    fn attempt(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<Attempt, StepFailure> {
        let tab = self.tab;
        let (n, s, g) = (self.n, tab.stages(), tab.gamma);
        self.ends.ensure_f(p, &mut self.f0);
        self.h = h;
        let (t, y) = (self.ends.t, &self.ends.y);
        if !self.iter.is_fresh() {
            self.iter.evaluate(p, t, 0.0, y, &self.f0)?;
            time_derivative(p, t, y, &self.f0, &mut self.ft);
        }
        self.iter.drop_factorisation();
        self.iter
            .factor(p, h, false, |hh| 1.0 / (hh * g), |_| 0.0.into())?;
        for i in 0..s {
            if i == 0 {
                self.fy.copy_from_slice(&self.f0);
            } else if !self.same_point[i] {
                self.ys.copy_from_slice(y);
                for j in 0..i {
                    let aij = self.a[i][j];
                    if aij != 0.0 {
                        for m in 0..n {
                            self.ys[m] += aij * self.u[j][m];
                        }
                    }
                }
                p.rhs(t + tab.alpha_sum[i] * h, &self.ys, &mut self.fy);
            }
            let gh = tab.gamma_sum[i] * h;
            let (done, rest) = self.u.split_at_mut(i);
            let ui = &mut rest[0];
            for m in 0..n {
                ui[m] = self.fy[m] + gh * self.ft[m];
            }
            for j in 0..i {
                let cij = self.c[i][j] / h;
                if cij != 0.0 {
                    for m in 0..n {
                        ui[m] += cij * done[j][m];
                    }
                }
            }
            self.iter.solve_real(p, ui);
        }
        self.y_new.copy_from_slice(y);
        self.err.fill(0.0);
        for i in 0..s {
            let (mi, ei) = (self.m[i], self.m_err[i]);
            for m in 0..n {
                self.y_new[m] += mi * self.u[i][m];
                self.err[m] += ei * self.u[i][m];
            }
        }
        if tab.filter_estimate {
            // Filter (I - h gamma J)^{-1}: the embedded solution is not
            // L-stable, and unfiltered its stiff components would dominate.
            let scale = 1.0 / (h * g);
            for v in self.err.iter_mut() {
                *v *= scale;
            }
            self.iter.solve_real(p, &mut self.err);
        }
        let error = norm.rms(&self.err, y, &self.y_new);
        if error.is_finite() {
            Ok(Attempt::with_error(error))
        } else {
            Err(StepFailure::NonFinite)
        }
    }

    fn accept(&mut self, p: &mut Problem<S>) {
        self.ends.advance(self.h, &mut self.y_new);
        std::mem::swap(&mut self.f_prev, &mut self.f0);
        p.rhs(self.ends.t, &self.ends.y, &mut self.f0);
        self.iter.after_accept(0.0);
    }

    fn reject(&mut self) {}
}
