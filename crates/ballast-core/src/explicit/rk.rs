//! The explicit Runge–Kutta engine.
//!
//! For a tableau `(c, A, b)` one step is
//!
//! $$ k_i = f\big(t_n + c_i h,\; y_n + h \sum_{j<i} a_{ij} k_j\big),\qquad
//!    y_{n+1} = y_n + h \sum_i b_i k_i, $$
//!
//! with the local error estimated as `h sum_i e_i k_i`, `e = b - bhat`
//! (Hairer, Norsett and Wanner I, II.4). `f(t_{n+1}, y_{n+1})` is always
//! available after a step: it is the last stage of an FSAL tableau and is
//! evaluated on acceptance otherwise, where it serves as the next step's
//! first stage and as the end slope of Hermite dense output.

use super::tableau::Tableau;
use crate::method::Method;
use crate::norm::ErrorNorm;
use crate::problem::Problem;
use crate::scheme::{Attempt, Scheme, SchemeState, StepFailure};
use crate::system::System;

/// An explicit Runge–Kutta scheme over a static tableau.
#[derive(Debug)]
pub struct ExplicitRk {
    tab: &'static Tableau,
    n: usize,
    t: f64,
    y: Vec<f64>,
    t_prev: f64,
    y_prev: Vec<f64>,
    /// Stage derivatives; `k[s]` holds `f(t_{n+1}, y_{n+1})` for non-FSAL tableaux.
    k: Vec<Vec<f64>>,
    /// After `accept`, stage `0` of the last step lives at index `swapped_first`
    /// (the buffers of the first and the "new slope" stage were exchanged).
    swapped_first: Option<usize>,
    y_new: Vec<f64>,
    tmp: Vec<f64>,
    h: f64,
    h_last: f64,
    have_f0: bool,
}

impl ExplicitRk {
    /// A scheme for a system of dimension `n`; all work arrays are allocated here.
    pub fn new(tab: &'static Tableau, n: usize) -> Self {
        let s = tab.stages();
        let extra = usize::from(!tab.fsal);
        Self {
            tab,
            n,
            t: 0.0,
            y: vec![0.0; n],
            t_prev: 0.0,
            y_prev: vec![0.0; n],
            k: vec![vec![0.0; n]; s + extra],
            swapped_first: None,
            y_new: vec![0.0; n],
            tmp: vec![0.0; n],
            h: 0.0,
            h_last: 0.0,
            have_f0: false,
        }
    }

    /// The tableau driving this scheme.
    pub fn tableau(&self) -> &'static Tableau {
        self.tab
    }

    /// Index of the buffer holding stage `i` of the last step.
    #[inline]
    fn stage(&self, i: usize) -> &[f64] {
        match self.swapped_first {
            Some(other) if i == 0 => &self.k[other],
            Some(other) if i == other => &self.k[0],
            _ => &self.k[i],
        }
    }

    /// Index of the buffer that holds `f(t_{n+1}, y_{n+1})` during a step.
    #[inline]
    fn new_slope_index(&self) -> usize {
        if self.tab.fsal {
            self.tab.stages() - 1
        } else {
            self.tab.stages()
        }
    }
}

impl SchemeState for ExplicitRk {
    fn method(&self) -> Method {
        self.tab.method
    }

    fn order(&self) -> usize {
        self.tab.order
    }

    fn error_order(&self) -> usize {
        self.tab.error_order
    }

    fn is_implicit(&self) -> bool {
        false
    }

    fn has_error_estimate(&self) -> bool {
        self.tab.e.is_some()
    }

    fn t(&self) -> f64 {
        self.t
    }

    fn y(&self) -> &[f64] {
        &self.y
    }

    fn dydt(&self) -> Option<&[f64]> {
        if self.have_f0 {
            Some(&self.k[0])
        } else {
            None
        }
    }

    fn t_prev(&self) -> f64 {
        self.t_prev
    }

    fn interpolate(&self, t: f64, out: &mut [f64]) {
        let h = self.h_last;
        if h == 0.0 {
            out.copy_from_slice(&self.y);
            return;
        }
        let theta = (t - self.t_prev) / h;
        match self.tab.dense {
            Some(weights) => {
                out.copy_from_slice(&self.y_prev);
                for (i, w) in weights.iter().enumerate() {
                    // b_i(theta) by Horner's rule on theta^1..theta^d.
                    let mut bi = 0.0;
                    for &c in w.iter().rev() {
                        bi = (bi + c) * theta;
                    }
                    if bi != 0.0 {
                        let hb = h * bi;
                        let ki = self.stage(i);
                        for m in 0..self.n {
                            out[m] += hb * ki[m];
                        }
                    }
                }
            }
            None => {
                let f0 = self.stage(0);
                let f1 = &self.k[0];
                let (t2, t3) = (theta * theta, theta * theta * theta);
                for m in 0..self.n {
                    let d = self.y[m] - self.y_prev[m];
                    let c2 = 3.0 * d - 2.0 * h * f0[m] - h * f1[m];
                    let c3 = -2.0 * d + h * f0[m] + h * f1[m];
                    out[m] = self.y_prev[m] + theta * h * f0[m] + t2 * c2 + t3 * c3;
                }
            }
        }
    }

    fn dense_degree(&self) -> usize {
        match self.tab.dense {
            Some(w) => w[0].len(),
            None => 3,
        }
    }

    fn dense_coefficients(&self, coeffs: &mut [f64]) {
        let n = self.n;
        let h = self.h_last;
        coeffs[..n].copy_from_slice(&self.y_prev);
        match self.tab.dense {
            Some(weights) => {
                let deg = weights[0].len();
                coeffs[n..(deg + 1) * n].fill(0.0);
                for (i, w) in weights.iter().enumerate() {
                    let ki = self.stage(i);
                    for (k, &c) in w.iter().enumerate() {
                        if c != 0.0 {
                            let hc = h * c;
                            let row = &mut coeffs[(k + 1) * n..(k + 2) * n];
                            for m in 0..n {
                                row[m] += hc * ki[m];
                            }
                        }
                    }
                }
            }
            None => {
                let f0 = self.stage(0);
                let f1 = &self.k[0];
                for m in 0..n {
                    let d = self.y[m] - self.y_prev[m];
                    coeffs[n + m] = h * f0[m];
                    coeffs[2 * n + m] = 3.0 * d - 2.0 * h * f0[m] - h * f1[m];
                    coeffs[3 * n + m] = -2.0 * d + h * f0[m] + h * f1[m];
                }
            }
        }
    }

    fn stage_spectral_estimate(&self) -> Option<f64> {
        let (i, j) = self.tab.stiffness_pair?;
        let ai = self.tab.a.get(i).copied();
        let bj_row: &[f64] = if j < self.tab.a.len() && j > 0 {
            self.tab.a[j]
        } else {
            return None;
        };
        let ai = ai?;
        // Y_i - Y_j = h sum_l (a_il - a_jl) k_l, computed without buffers.
        let h = self.h;
        let (mut num, mut den) = (0.0, 0.0);
        for m in 0..self.n {
            let dk = self.stage(i)[m] - self.stage(j)[m];
            let mut dy = 0.0;
            for l in 0..bj_row.len().max(ai.len()) {
                let a_il = ai.get(l).copied().unwrap_or(0.0);
                let a_jl = bj_row.get(l).copied().unwrap_or(0.0);
                dy += (a_il - a_jl) * self.stage(l)[m];
            }
            num += dk * dk;
            den += (h * dy) * (h * dy);
        }
        if den > 0.0 && num.is_finite() {
            Some((num / den).sqrt())
        } else {
            None
        }
    }
}

impl<S: System> Scheme<S> for ExplicitRk {
    fn start(&mut self, p: &mut Problem<S>, t: f64, y: &[f64]) -> Result<(), StepFailure> {
        self.t = t;
        self.t_prev = t;
        self.y.copy_from_slice(y);
        self.y_prev.copy_from_slice(y);
        self.swapped_first = None;
        self.h_last = 0.0;
        p.rhs(t, &self.y, &mut self.k[0]);
        self.have_f0 = true;
        if self.k[0].iter().all(|v| v.is_finite()) {
            Ok(())
        } else {
            self.have_f0 = false;
            Err(StepFailure::NonFinite)
        }
    }

    fn attempt(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<Attempt, StepFailure> {
        let tab = self.tab;
        let s = tab.stages();
        let n = self.n;
        if !self.have_f0 {
            p.rhs(self.t, &self.y, &mut self.k[0]);
            self.have_f0 = true;
        }
        // The stage buffers are in natural order again from here on.
        self.swapped_first = None;
        self.h = h;
        for i in 1..s {
            let (done, rest) = self.k.split_at_mut(i);
            let target = if tab.fsal && i == s - 1 {
                &mut self.y_new
            } else {
                &mut self.tmp
            };
            target.copy_from_slice(&self.y);
            for (j, &aij) in tab.a[i].iter().enumerate() {
                if aij != 0.0 {
                    let ha = h * aij;
                    let kj = &done[j];
                    for m in 0..n {
                        target[m] += ha * kj[m];
                    }
                }
            }
            p.rhs(self.t + tab.c[i] * h, target, &mut rest[0]);
        }
        if !tab.fsal {
            self.y_new.copy_from_slice(&self.y);
            for (j, &bj) in tab.b.iter().enumerate() {
                if bj != 0.0 {
                    let hb = h * bj;
                    let kj = &self.k[j];
                    for m in 0..n {
                        self.y_new[m] += hb * kj[m];
                    }
                }
            }
        }
        let error = match tab.e {
            Some(e) => {
                self.tmp.fill(0.0);
                for (j, &ej) in e.iter().enumerate() {
                    if ej != 0.0 {
                        let he = h * ej;
                        let kj = &self.k[j];
                        for m in 0..n {
                            self.tmp[m] += he * kj[m];
                        }
                    }
                }
                norm.rms(&self.tmp, &self.y, &self.y_new)
            }
            None => {
                if self.y_new.iter().all(|v| v.is_finite()) {
                    0.0
                } else {
                    f64::NAN
                }
            }
        };
        if error.is_finite() {
            Ok(Attempt::with_error(error))
        } else {
            Err(StepFailure::NonFinite)
        }
    }

    fn accept(&mut self, p: &mut Problem<S>) {
        self.t_prev = self.t;
        self.t += self.h;
        self.h_last = self.h;
        std::mem::swap(&mut self.y_prev, &mut self.y);
        std::mem::swap(&mut self.y, &mut self.y_new);
        let last = self.new_slope_index();
        if !self.tab.fsal {
            let (head, tail) = self.k.split_at_mut(last);
            let _ = head;
            p.rhs(self.t, &self.y, &mut tail[0]);
        }
        // f(t_{n+1}, y_{n+1}) becomes the next step's first stage.
        self.k.swap(0, last);
        self.swapped_first = Some(last);
        self.have_f0 = true;
    }

    fn reject(&mut self) {}
}
