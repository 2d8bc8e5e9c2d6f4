//! Dormand–Prince 8(5,3): the eighth-order explicit pair with two embedded
//! estimates and a seventh-order dense output.
//!
//! One step evaluates 12 stages `k_i = f(t_n + c_i h, y_n + h sum_{j<i} a_ij k_j)`,
//! sets `y_{n+1} = y_n + h sum_i b_i k_i`, and evaluates `f(t_{n+1}, y_{n+1})`,
//! which is the next step's first stage (FSAL). The local error combines a
//! fifth-order estimate `e5 = h sum_i (b_i - bhat5_i) k_i` and a third-order
//! one `e3 = h sum_i (b_i - bhat3_i) k_i` as
//!
//! $$ \mathrm{err} = \frac{\|e_5\|^2}{\sqrt{\|e_5\|^2 + 0.01\,\|e_3\|^2}}, $$
//!
//! which behaves like `O(h^8)` (Hairer, Norsett and Wanner I, II.10). On
//! acceptance three more stages give the continuous extension of order 7
//! (II.6). Coefficients: [`super::dp853_tableau`].

use super::dp853_tableau::{self as tab, ALL_STAGES, DENSE, DENSE_DEGREE, STEP_STAGES};
use crate::endpoints::Endpoints;
use crate::method::Method;
use crate::norm::ErrorNorm;
use crate::problem::Problem;
use crate::scheme::{Attempt, Scheme, SchemeState, StepFailure};
use crate::system::System;

/// Index of the FSAL stage `f(t_{n+1}, y_{n+1})`.
const FSAL: usize = STEP_STAGES;

/// The buffer that holds stage `i` when the step's first stage lives in buffer `first`
/// (the first and the FSAL buffers alternate from step to step, so nothing is copied).
#[inline]
fn slot(i: usize, first: usize) -> usize {
    if first == 0 {
        i
    } else if i == 0 {
        FSAL
    } else if i == FSAL {
        0
    } else {
        i
    }
}

/// `out = y + h sum_j row[j] k_j` over the stages of a step whose first stage is in `first`.
fn stage_input(out: &mut [f64], y: &[f64], h: f64, row: &[f64], k: &[Vec<f64>], first: usize) {
    out.copy_from_slice(y);
    for (j, &a) in row.iter().enumerate() {
        if a != 0.0 {
            let ha = h * a;
            let kj = &k[slot(j, first)];
            for (o, &v) in out.iter_mut().zip(kj) {
                *o += ha * v;
            }
        }
    }
}

/// Dormand–Prince 8(5,3) with its seventh-order dense output.
///
/// ```
/// use ballast_core::explicit::Dp853;
/// use ballast_core::{Atol, ErrorNorm, Problem, Scheme, SchemeState};
/// // y' = -y, one step of size 0.2 from y(0) = 1.
/// let mut p = Problem::new(|_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0], 1);
/// let mut s = Dp853::new(1);
/// let norm = ErrorNorm::new(1e-10, Atol::Scalar(1e-12), 1);
/// s.start(&mut p, 0.0, &[1.0]).unwrap();
/// let a = s.attempt(&mut p, 0.2, &norm).unwrap();
/// assert!(a.error <= 1.0);
/// s.accept(&mut p);
/// assert!((s.y()[0] - (-0.2f64).exp()).abs() < 1e-12);
/// let mut mid = [0.0];
/// s.interpolate(0.1, &mut mid);
/// assert!((mid[0] - (-0.1f64).exp()).abs() < 1e-11);
/// ```
#[derive(Debug)]
pub struct Dp853 {
    n: usize,
    /// The end points; the slope `f(t, y)` is `k[first]`.
    ends: Endpoints,
    y_new: Vec<f64>,
    /// Stage derivatives: 12 stages, the FSAL stage, 3 dense-output stages.
    k: Vec<Vec<f64>>,
    /// Buffer holding `f(t, y)` at the current state (0 or [`FSAL`]).
    first: usize,
    /// Buffer that held the first stage of the last accepted step.
    dense_first: usize,
    tmp: Vec<f64>,
    e5: Vec<f64>,
    e3: Vec<f64>,
    h: f64,
    dense_stages: bool,
    spectral: Option<f64>,
}

impl Dp853 {
    /// A scheme for a system of dimension `n`, with the seventh-order dense
    /// output (3 extra right-hand-side evaluations per accepted step). All
    /// work arrays are allocated here.
    pub fn new(n: usize) -> Self {
        Self {
            n,
            ends: Endpoints::new(n),
            y_new: vec![0.0; n],
            k: vec![vec![0.0; n]; ALL_STAGES],
            first: 0,
            dense_first: 0,
            tmp: vec![0.0; n],
            e5: vec![0.0; n],
            e3: vec![0.0; n],
            h: 0.0,
            dense_stages: true,
            spectral: None,
        }
    }

    /// With `false`, skips the three dense-output stages: dense output is
    /// then the cubic Hermite interpolant of the end values and slopes
    /// (order 3), and an accepted step costs 12 evaluations instead of 15.
    /// For runs that only need the solution at step ends.
    pub fn with_dense_output(mut self, on: bool) -> Self {
        self.dense_stages = on;
        self
    }

    /// The slopes at the start and the end of the last accepted step.
    fn step_slopes(&self) -> (&[f64], &[f64]) {
        (
            &self.k[slot(0, self.dense_first)],
            &self.k[slot(FSAL, self.dense_first)],
        )
    }
}

impl SchemeState for Dp853 {
    fn method(&self) -> Method {
        Method::DormandPrince853
    }

    fn order(&self) -> usize {
        8
    }

    fn error_order(&self) -> usize {
        7
    }

    fn is_implicit(&self) -> bool {
        false
    }

    fn t(&self) -> f64 {
        self.ends.t
    }

    fn y(&self) -> &[f64] {
        &self.ends.y
    }

    fn dydt(&self) -> Option<&[f64]> {
        self.ends.dydt(&self.k[self.first])
    }

    fn t_prev(&self) -> f64 {
        self.ends.t_prev
    }

    fn interpolate(&self, t: f64, out: &mut [f64]) {
        if !self.dense_stages {
            let (f0, f1) = self.step_slopes();
            return self.ends.hermite(t, f0, f1, out);
        }
        let Some(theta) = self.ends.step_fraction(t, out) else {
            return;
        };
        let h = self.ends.h_last;
        out.copy_from_slice(&self.ends.y_prev);
        for (i, w) in DENSE.iter().enumerate() {
            let mut bi = 0.0;
            for &c in w.iter().rev() {
                bi = (bi + c) * theta;
            }
            if bi != 0.0 {
                let hb = h * bi;
                let ki = &self.k[slot(i, self.dense_first)];
                for (o, &v) in out.iter_mut().zip(ki) {
                    *o += hb * v;
                }
            }
        }
    }

    fn dense_degree(&self) -> usize {
        if self.dense_stages {
            DENSE_DEGREE
        } else {
            3
        }
    }

    fn dense_coefficients(&self, coeffs: &mut [f64]) {
        if !self.dense_stages {
            let (f0, f1) = self.step_slopes();
            return self.ends.hermite_coefficients(f0, f1, coeffs);
        }
        let n = self.n;
        let h = self.ends.h_last;
        coeffs[..n].copy_from_slice(&self.ends.y_prev);
        coeffs[n..(DENSE_DEGREE + 1) * n].fill(0.0);
        for (i, w) in DENSE.iter().enumerate() {
            let ki = &self.k[slot(i, self.dense_first)];
            for (d, &c) in w.iter().enumerate() {
                if c != 0.0 {
                    let hc = h * c;
                    let row = &mut coeffs[(d + 1) * n..(d + 2) * n];
                    for (r, &v) in row.iter_mut().zip(ki) {
                        *r += hc * v;
                    }
                }
            }
        }
    }

    /// `||k_12 - k_11|| / ||Y_12 - Y_11||` from the two stages at `c = 1`:
    /// stage 11 and the FSAL stage `f(t + h, y_{n+1})` (Hairer and Wanner II, IV.2).
    fn stage_spectral_estimate(&self) -> Option<f64> {
        self.spectral
    }
}

impl<S: System> Scheme<S> for Dp853 {
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure> {
        self.first = 0;
        self.dense_first = 0;
        self.spectral = None;
        self.ends.start(p, t, y, slope, &mut self.k[0])
    }

    fn attempt(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<Attempt, StepFailure> {
        let first = self.first;
        self.ends.ensure_f(p, &mut self.k[first]);
        self.h = h;
        self.spectral = None;
        for i in 1..STEP_STAGES {
            stage_input(&mut self.tmp, &self.ends.y, h, tab::A[i], &self.k, first);
            p.rhs(
                self.ends.t + tab::C[i] * h,
                &self.tmp,
                &mut self.k[slot(i, first)],
            );
        }
        // `tmp` now holds the stage input of stage 11 (at c = 1).
        stage_input(&mut self.y_new, &self.ends.y, h, &tab::B, &self.k, first);
        self.e5.fill(0.0);
        self.e3.fill(0.0);
        for j in 0..STEP_STAGES {
            let (a5, a3) = (h * tab::E5[j], h * tab::E3[j]);
            if a5 == 0.0 && a3 == 0.0 {
                continue;
            }
            let kj = &self.k[slot(j, first)];
            for m in 0..self.n {
                self.e5[m] += a5 * kj[m];
                self.e3[m] += a3 * kj[m];
            }
        }
        let err5 = norm.rms(&self.e5, &self.ends.y, &self.y_new);
        let err3 = norm.rms(&self.e3, &self.ends.y, &self.y_new);
        let sq = err5 * err5;
        let deno = sq + 0.01 * err3 * err3;
        let error = if deno > 0.0 { sq / deno.sqrt() } else { sq };
        if !error.is_finite() {
            return Err(StepFailure::NonFinite);
        }
        let fsal = slot(FSAL, first);
        p.rhs(self.ends.t + h, &self.y_new, &mut self.k[fsal]);
        // Free stiffness estimate from the two stages at c = 1.
        let k11 = &self.k[slot(STEP_STAGES - 1, first)];
        for m in 0..self.n {
            self.e5[m] = self.k[fsal][m] - k11[m];
            self.e3[m] = self.y_new[m] - self.tmp[m];
        }
        let (num, den) = (norm.norm2(&self.e5), norm.norm2(&self.e3));
        if den > 0.0 && num.is_finite() {
            self.spectral = Some(num / den);
        }
        if self.k[fsal].iter().all(|v| v.is_finite()) {
            Ok(Attempt::with_error(error))
        } else {
            Err(StepFailure::NonFinite)
        }
    }

    fn accept(&mut self, p: &mut Problem<S>) {
        let first = self.first;
        self.ends.advance(self.h, &mut self.y_new);
        if self.dense_stages {
            for i in FSAL + 1..ALL_STAGES {
                stage_input(
                    &mut self.tmp,
                    &self.ends.y_prev,
                    self.h,
                    tab::A[i],
                    &self.k,
                    first,
                );
                let ti = self.ends.t_prev + tab::C[i] * self.h;
                p.rhs(ti, &self.tmp, &mut self.k[i]);
            }
        }
        self.dense_first = first;
        self.first = slot(FSAL, first);
    }

    fn reject(&mut self) {}
}
