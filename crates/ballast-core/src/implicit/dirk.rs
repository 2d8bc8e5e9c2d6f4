//! The diagonally implicit Runge–Kutta engine: backward Euler, the
//! trapezoidal rule, TR-BDF2 and ESDIRK 4(3).
//!
//! Stage `i` solves `Y_i = y_n + h sum_{j<i} a_ij k_j + h gamma f(t_n + c_i h, Y_i)`
//! by simplified Newton with the matrix `I - h gamma J` (one factorisation
//! serves every stage), and `k_i = (Y_i - y_n - h sum_{j<i} a_ij k_j)/(h gamma)`
//! (Hairer and Wanner II, IV.6 and IV.8; Kennedy and Carpenter,
//! NASA/TM-2016-219173, section 2). All four tableaux are stiffly accurate,
//! so `y_{n+1} = Y_s` and `k_s` serves as `f(t_{n+1}, y_{n+1})` for the next
//! step's explicit first stage and for dense output.
//!
//! Error estimates, each passed through `(I - h gamma J)^{-1}` so stiff
//! components do not inflate it (the filter of Hairer and Wanner II, IV.8,
//! eq. (8.20), common practice for SDIRK pairs):
//! - TR-BDF2, ESDIRK 4(3): the embedded weights, `h sum (b_i - bhat_i) k_i`;
//! - backward Euler: the difference to the trapezoidal rule through the
//!   same points, `h/2 (f_{n+1} - f_n)` (an extrapolation estimate of the
//!   local error `h^2/2 y''`);
//! - trapezoid: its local error `-h^3/12 y'''` with `y'''` from the second
//!   divided difference of `f` over the last two steps (`h/2 (f_{n+1} - f_n)`
//!   on the first step, when there is no history).
//!
//! Stage predictors: the last step's dense output extrapolated; on the
//! first step `base + h gamma k_{i-1}`; after a failed Newton iteration
//! `y_n`. Dense output: linear for backward Euler, the cubic Hermite interpolant
//! otherwise (none of the other tableaux' publications is used for it).

use super::iteration::IterationMatrix;
use super::tableau::{ImplicitKind, ImplicitTableau};
use crate::endpoints::Endpoints;
use crate::method::Method;
use crate::newton::{NewtonControl, NewtonStatus};
use crate::norm::ErrorNorm;
use crate::options::ImplicitOptions;
use crate::problem::Problem;
use crate::scheme::{Attempt, Scheme, SchemeState, StepFailure};
use crate::system::{Structure, System};

/// How a [`Dirk`] scheme estimates its local error.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Estimate {
    Embedded,
    BackwardEuler,
    Trapezoid,
}

/// A diagonally implicit Runge–Kutta scheme over a static tableau.
#[derive(Debug)]
pub struct Dirk {
    tab: &'static ImplicitTableau,
    estimate: Estimate,
    explicit_first: bool,
    n: usize,
    /// The end points of the last step; the slopes there are `f_prev` and `f0`.
    ends: Endpoints,
    f0: Vec<f64>,
    f_prev: Vec<f64>,
    h: f64,
    k: Vec<Vec<f64>>,
    y_new: Vec<f64>,
    base: Vec<f64>,
    stage: Vec<f64>,
    fy: Vec<f64>,
    res: Vec<f64>,
    iter: IterationMatrix,
    newton: NewtonControl,
    theta_max: f64,
    last_failed: bool,
}

impl Dirk {
    /// A scheme for `tab` on a system of dimension `n` whose Jacobian has
    /// `structure`. Fails for a tableau that is not diagonally implicit
    /// and stiffly accurate, or a structure that does not fit `n`.
    pub fn new(
        tab: &'static ImplicitTableau,
        n: usize,
        structure: &Structure,
        opts: &ImplicitOptions,
    ) -> Result<Self, String> {
        let explicit_first = match tab.kind {
            ImplicitKind::Dirk {
                explicit_first_stage,
            } => explicit_first_stage,
            ImplicitKind::Full => return Err(format!("{} is not diagonally implicit", tab.method)),
        };
        if !tab.stiffly_accurate {
            return Err(format!("{} is not stiffly accurate", tab.method));
        }
        let estimate = match (tab.method, tab.bhat) {
            (_, Some(_)) => Estimate::Embedded,
            (Method::BackwardEuler, None) => Estimate::BackwardEuler,
            (Method::Trapezoid, None) => Estimate::Trapezoid,
            (m, None) => return Err(format!("{m} has no error estimate")),
        };
        let s = tab.stages();
        Ok(Self {
            tab,
            estimate,
            explicit_first,
            n,
            ends: Endpoints::new(n),
            f0: vec![0.0; n],
            f_prev: vec![0.0; n],
            h: 0.0,
            k: vec![vec![0.0; n]; s],
            y_new: vec![0.0; n],
            base: vec![0.0; n],
            stage: vec![0.0; n],
            fy: vec![0.0; n],
            res: vec![0.0; n],
            iter: IterationMatrix::new(n, structure, opts, false)?,
            newton: NewtonControl::new(opts.max_newton_iters),
            theta_max: 0.0,
            last_failed: false,
        })
    }

    /// The tableau driving this scheme.
    pub fn tableau(&self) -> &'static ImplicitTableau {
        self.tab
    }

    fn fail<S: System>(&mut self, p: &mut Problem<S>) -> StepFailure {
        p.counters.newton_failures += 1;
        self.iter.after_failure();
        self.newton.reset();
        self.last_failed = true;
        StepFailure::NewtonFailed
    }

    /// Solves stage `i` for `self.stage`, starting from the predictor in it.
    fn solve_stage<S: System>(
        &mut self,
        p: &mut Problem<S>,
        ti: f64,
        h: f64,
        h_fact: f64,
        norm: &ErrorNorm,
    ) -> Result<(), StepFailure> {
        let g = self.tab.gamma;
        let (hg, scale) = (h * g, 1.0 / (h_fact * g));
        self.newton.begin();
        loop {
            p.rhs(ti, &self.stage, &mut self.fy);
            p.counters.newton_iters += 1;
            // res = -G(Y) = base + h gamma f(Y) - Y, then (I - h gamma J)^{-1} res.
            for m in 0..self.n {
                self.res[m] = (self.base[m] + hg * self.fy[m] - self.stage[m]) * scale;
            }
            self.iter.solve_real(p, &mut self.res);
            for m in 0..self.n {
                self.stage[m] += self.res[m];
            }
            let dn = norm.rms_at(&self.res, &self.ends.y);
            match self.newton.update(dn) {
                NewtonStatus::Converged => return Ok(()),
                NewtonStatus::Continue => {}
                NewtonStatus::Diverged | NewtonStatus::TooSlow => return Err(self.fail(p)),
            }
        }
    }

    fn dense_eval(&self, t: f64, out: &mut [f64]) {
        if self.estimate != Estimate::BackwardEuler {
            return self.ends.hermite(t, &self.f_prev, &self.f0, out);
        }
        if let Some(theta) = self.ends.step_fraction(t, out) {
            let (y0, y1) = (&self.ends.y_prev, &self.ends.y);
            for m in 0..self.n {
                out[m] = y0[m] + theta * (y1[m] - y0[m]);
            }
        }
    }
}

impl SchemeState for Dirk {
    fn method(&self) -> Method {
        self.tab.method
    }
    fn order(&self) -> usize {
        self.tab.order
    }
    fn error_order(&self) -> usize {
        match self.estimate {
            Estimate::Embedded => self.tab.order.min(self.tab.embedded_order),
            Estimate::BackwardEuler => 1,
            Estimate::Trapezoid => 2,
        }
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
        self.dense_eval(t, out);
    }
    fn dense_degree(&self) -> usize {
        if self.estimate == Estimate::BackwardEuler {
            1
        } else {
            3
        }
    }
    fn dense_coefficients(&self, coeffs: &mut [f64]) {
        if self.estimate != Estimate::BackwardEuler {
            return self
                .ends
                .hermite_coefficients(&self.f_prev, &self.f0, coeffs);
        }
        let (n, y0, y1) = (self.n, &self.ends.y_prev, &self.ends.y);
        for m in 0..n {
            coeffs[m] = y0[m];
            coeffs[n + m] = y1[m] - y0[m];
        }
    }
}

impl<S: System> Scheme<S> for Dirk {
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure> {
        self.iter.restart();
        self.newton.reset();
        self.last_failed = false;
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
        // The Jacobian of the step's start: one of its end (as Radau IIA 5
        // takes) damps the filtered error estimates of backward Euler, the
        // trapezoid and TR-BDF2 too much on a growing stiffness (measured on
        // the stiffness ramp: backward Euler's error at rtol 1e-4 went from
        // 2.8e-7 to 2.6).
        self.iter
            .ensure_jacobian(p, self.ends.t, 0.0, &self.ends.y, &self.f0)?;
        let h_fact = self
            .iter
            .factor(p, h, false, |hh| 1.0 / (hh * g), |_| 0.0.into())?;
        self.newton.set_tolerance(norm.rtol());
        self.theta_max = 0.0;
        let first = usize::from(self.explicit_first);
        if self.explicit_first {
            self.k[0].copy_from_slice(&self.f0);
        }
        for i in first..s {
            let ti = self.ends.t + tab.c[i] * h;
            self.base.copy_from_slice(&self.ends.y);
            for j in 0..i {
                let ha = h * tab.a[i][j];
                if ha != 0.0 {
                    for m in 0..n {
                        self.base[m] += ha * self.k[j][m];
                    }
                }
            }
            if self.last_failed {
                self.stage.copy_from_slice(&self.ends.y);
            } else if self.ends.h_last != 0.0 {
                let mut pred = std::mem::take(&mut self.stage);
                self.dense_eval(ti, &mut pred);
                self.stage = pred;
            } else {
                // No history: assume f(Y_i) equals the last stage slope.
                let slope = if i > 0 { &self.k[i - 1] } else { &self.f0 };
                for m in 0..n {
                    self.stage[m] = self.base[m] + h * g * slope[m];
                }
            }
            self.solve_stage(p, ti, h, h_fact, norm)?;
            self.theta_max = self.theta_max.max(self.newton.theta());
            let inv = 1.0 / (h * g);
            for m in 0..n {
                self.k[i][m] = (self.stage[m] - self.base[m]) * inv;
            }
        }
        self.y_new.copy_from_slice(&self.stage);
        // Local error estimate into `res`.
        match self.estimate {
            Estimate::Embedded => {
                let bhat = tab.bhat.unwrap_or(tab.b);
                self.res.fill(0.0);
                for j in 0..s {
                    let w = h * (tab.b[j] - bhat[j]);
                    if w != 0.0 {
                        for m in 0..n {
                            self.res[m] += w * self.k[j][m];
                        }
                    }
                }
            }
            Estimate::BackwardEuler => {
                for m in 0..n {
                    self.res[m] = 0.5 * h * (self.k[0][m] - self.f0[m]);
                }
            }
            Estimate::Trapezoid => {
                let hl = self.ends.h_last;
                if hl != 0.0 {
                    let c = -h * h * h / 6.0 / (h + hl);
                    for m in 0..n {
                        let d2 =
                            (self.k[1][m] - self.f0[m]) / h - (self.f0[m] - self.f_prev[m]) / hl;
                        self.res[m] = c * d2;
                    }
                } else {
                    for m in 0..n {
                        self.res[m] = 0.5 * h * (self.k[1][m] - self.f0[m]);
                    }
                }
            }
        }
        let scale = 1.0 / (h_fact * g);
        for v in self.res.iter_mut() {
            *v *= scale;
        }
        self.iter.solve_real(p, &mut self.res);
        let error = norm.rms(&self.res, &self.ends.y, &self.y_new);
        self.last_failed = false;
        if error.is_finite() {
            Ok(Attempt::with_error(error))
        } else {
            self.iter.after_failure();
            Err(StepFailure::NonFinite)
        }
    }

    fn accept(&mut self, _p: &mut Problem<S>) {
        self.ends.advance(self.h, &mut self.y_new);
        std::mem::swap(&mut self.f_prev, &mut self.f0);
        let last = self.tab.stages() - 1;
        self.f0.copy_from_slice(&self.k[last]);
        self.iter.after_accept(self.theta_max);
    }

    fn reject(&mut self) {
        self.iter.after_reject();
    }
}
