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

use std::sync::Mutex;

use super::tableau::Tableau;
use crate::endpoints::Endpoints;
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
    /// The end points; the slope `f(t, y)` is `k[0]`.
    ends: Endpoints,
    /// Stage derivatives; `k[s]` holds `f(t_{n+1}, y_{n+1})` for non-FSAL tableaux.
    k: Vec<Vec<f64>>,
    /// After `accept`, stage `0` of the last step lives at index `swapped_first`
    /// (the buffers of the first and the "new slope" stage were exchanged).
    swapped_first: Option<usize>,
    y_new: Vec<f64>,
    tmp: Vec<f64>,
    /// The non-zero weights of each row of `A` (with their stage indices),
    /// then of `b`, then of `e` if the tableau has an estimate.
    terms: &'static [Vec<(usize, f64)>],
    /// The stiffness pair `(i, j)` and the non-zero `a_il - a_jl` (at most
    /// `MAX_STAGES` of them), for the free stage estimate.
    stiffness: &'static Option<StiffnessPair>,
    h: f64,
}

impl ExplicitRk {
    /// A scheme for a system of dimension `n`; all work arrays are allocated here.
    pub fn new(tab: &'static Tableau, n: usize) -> Self {
        let weights = weights_of(tab);
        let s = tab.stages();
        let extra = usize::from(!tab.fsal);
        Self {
            tab,
            n,
            ends: Endpoints::new(n),
            k: vec![vec![0.0; n]; s + extra],
            swapped_first: None,
            y_new: vec![0.0; n],
            tmp: vec![0.0; n],
            terms: &weights.terms,
            stiffness: &weights.stiffness,
            h: 0.0,
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

/// Most terms the free stiffness estimate gathers (every tableau of this
/// engine has fewer stages; a larger one simply has no free estimate).
const MAX_STAGES: usize = 16;

/// Two stages `(i, j)` at one node and the non-zero `(l, a_il - a_jl)`.
type StiffnessPair = (usize, usize, Vec<(usize, f64)>);

/// What a scheme reads from its tableau at every step, in the form the
/// stage loop wants: the non-zero weights per row and the stiffness pair.
#[derive(Debug)]
struct Weights {
    terms: Vec<Vec<(usize, f64)>>,
    stiffness: Option<StiffnessPair>,
}

/// The weights of `tab`, built once per tableau and process and kept for
/// its lifetime (tableaux are static, so the cache stays as small as the
/// set of tableaux in use). A scheme built for a short run would otherwise
/// spend a dozen allocations on them; the switching pair builds one for
/// every run.
fn weights_of(tab: &'static Tableau) -> &'static Weights {
    static CACHE: Mutex<Vec<(&'static Tableau, &'static Weights)>> = Mutex::new(Vec::new());
    let mut cache = CACHE.lock().unwrap_or_else(|e| e.into_inner());
    if let Some(&(_, w)) = cache.iter().find(|(t, _)| std::ptr::eq(*t, tab)) {
        return w;
    }
    let w: &'static Weights = Box::leak(Box::new(Weights {
        terms: tab
            .a
            .iter()
            .copied()
            .chain([tab.b])
            .chain(tab.e)
            .map(non_zero)
            .collect(),
        stiffness: stiffness_weights(tab),
    }));
    cache.push((tab, w));
    w
}

/// The stiffness pair of `tab` with the non-zero `a_il - a_jl`, when the
/// pair is usable: two distinct later stages, at most `MAX_STAGES` terms.
fn stiffness_weights(tab: &Tableau) -> Option<StiffnessPair> {
    let (i, j) = tab.stiffness_pair?;
    let a = tab.a;
    if j == 0 || i >= a.len() || j >= a.len() {
        return None;
    }
    let (ai, aj) = (a[i], a[j]);
    let w: Vec<(usize, f64)> = (0..ai.len().max(aj.len()))
        .map(|l| {
            (
                l,
                ai.get(l).copied().unwrap_or(0.0) - aj.get(l).copied().unwrap_or(0.0),
            )
        })
        .filter(|&(_, w)| w != 0.0)
        .collect();
    (w.len() <= MAX_STAGES).then_some((i, j, w))
}

/// The non-zero weights of `row`, with their stage indices.
fn non_zero(row: &[f64]) -> Vec<(usize, f64)> {
    row.iter()
        .enumerate()
        .filter(|(_, w)| **w != 0.0)
        .map(|(j, &w)| (j, w))
        .collect()
}

/// `out = base + sum_j (h w_j) k_j` in one pass over the components, adding
/// the terms in stage order (the same rounding as one pass per stage).
///
/// The common term counts (up to eight, every row of the five-stage and
/// seven-stage tableaux) go through [`combine_fixed`], whose inner loop the
/// compiler unrolls with the stage slices' bounds checked once; on a cheap
/// three-equation right-hand side that halves the cost of a step's
/// arithmetic (measured with callgrind on the overhead bench).
#[inline(always)]
fn combine(base: Option<&[f64]>, h: f64, terms: &[(usize, f64)], k: &[Vec<f64>], out: &mut [f64]) {
    match terms.len() {
        1 => combine_fixed::<1>(base, h, terms, k, out),
        2 => combine_fixed::<2>(base, h, terms, k, out),
        3 => combine_fixed::<3>(base, h, terms, k, out),
        4 => combine_fixed::<4>(base, h, terms, k, out),
        5 => combine_fixed::<5>(base, h, terms, k, out),
        6 => combine_fixed::<6>(base, h, terms, k, out),
        7 => combine_fixed::<7>(base, h, terms, k, out),
        8 => combine_fixed::<8>(base, h, terms, k, out),
        _ => {
            for (m, o) in out.iter_mut().enumerate() {
                let mut acc = base.map_or(0.0, |b| b[m]);
                for &(j, w) in terms {
                    acc += (h * w) * k[j][m];
                }
                *o = acc;
            }
        }
    }
}

/// [`combine`] for exactly `T` terms: weights and stage slices gathered
/// once, each slice cut to `out.len()` so the loop needs no bounds checks.
#[inline(always)]
fn combine_fixed<const T: usize>(
    base: Option<&[f64]>,
    h: f64,
    terms: &[(usize, f64)],
    k: &[Vec<f64>],
    out: &mut [f64],
) {
    let n = out.len();
    let mut c = [0.0; T];
    let mut ks: [&[f64]; T] = [&[]; T];
    for t in 0..T {
        c[t] = h * terms[t].1;
        ks[t] = &k[terms[t].0][..n];
    }
    match base {
        Some(b) => {
            let b = &b[..n];
            for m in 0..n {
                let mut acc = b[m];
                for t in 0..T {
                    acc += c[t] * ks[t][m];
                }
                out[m] = acc;
            }
        }
        None => {
            for m in 0..n {
                let mut acc = 0.0;
                for t in 0..T {
                    acc += c[t] * ks[t][m];
                }
                out[m] = acc;
            }
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
        self.ends.t
    }

    fn y(&self) -> &[f64] {
        &self.ends.y
    }

    fn dydt(&self) -> Option<&[f64]> {
        self.ends.dydt(&self.k[0])
    }

    fn t_prev(&self) -> f64 {
        self.ends.t_prev
    }

    fn interpolate(&self, t: f64, out: &mut [f64]) {
        let Some(weights) = self.tab.dense else {
            return self.ends.hermite(t, self.stage(0), &self.k[0], out);
        };
        let Some(theta) = self.ends.step_fraction(t, out) else {
            return;
        };
        let h = self.ends.h_last;
        out.copy_from_slice(&self.ends.y_prev);
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

    fn dense_degree(&self) -> usize {
        match self.tab.dense {
            Some(w) => w[0].len(),
            None => 3,
        }
    }

    fn dense_coefficients(&self, coeffs: &mut [f64]) {
        let Some(weights) = self.tab.dense else {
            return self
                .ends
                .hermite_coefficients(self.stage(0), &self.k[0], coeffs);
        };
        let n = self.n;
        let h = self.ends.h_last;
        coeffs[..n].copy_from_slice(&self.ends.y_prev);
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

    fn stage_spectral_estimate(&self) -> Option<f64> {
        let (i, j, weights) = self.stiffness.as_ref()?;
        let (ki, kj) = (self.stage(*i), self.stage(*j));
        // Y_i - Y_j = h sum_l (a_il - a_jl) k_l, computed without buffers.
        let (num, den) = match weights.len() {
            1 => stage_difference::<1>(self, weights, ki, kj),
            2 => stage_difference::<2>(self, weights, ki, kj),
            3 => stage_difference::<3>(self, weights, ki, kj),
            4 => stage_difference::<4>(self, weights, ki, kj),
            5 => stage_difference::<5>(self, weights, ki, kj),
            6 => stage_difference::<6>(self, weights, ki, kj),
            7 => stage_difference::<7>(self, weights, ki, kj),
            8 => stage_difference::<8>(self, weights, ki, kj),
            _ => stage_difference::<MAX_STAGES>(self, weights, ki, kj),
        };
        if den > 0.0 && num.is_finite() {
            Some((num / den).sqrt())
        } else {
            None
        }
    }
}

/// `(|k_i - k_j|^2, |Y_i - Y_j|^2)` for the free stage estimate, with at
/// most `T` weights (fewer are padded with zero weights on stage 0): the
/// weights scaled and their stage slices gathered once, as in
/// [`combine_fixed`].
#[inline(always)]
fn stage_difference<const T: usize>(
    rk: &ExplicitRk,
    weights: &[(usize, f64)],
    ki: &[f64],
    kj: &[f64],
) -> (f64, f64) {
    let n = rk.n;
    let mut ws = [0.0; T];
    let mut ks: [&[f64]; T] = [&ki[..n]; T];
    for (t, &(l, w)) in weights.iter().enumerate().take(T) {
        ws[t] = rk.h * w;
        ks[t] = &rk.stage(l)[..n];
    }
    let (ki, kj) = (&ki[..n], &kj[..n]);
    let (mut num, mut den) = (0.0, 0.0);
    for m in 0..n {
        let dk = ki[m] - kj[m];
        let mut dy = 0.0;
        for t in 0..T {
            dy += ws[t] * ks[t][m];
        }
        num += dk * dk;
        den += dy * dy;
    }
    (num, den)
}

impl<S: System> Scheme<S> for ExplicitRk {
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure> {
        self.swapped_first = None;
        self.ends.start(p, t, y, slope, &mut self.k[0])
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
        self.ends.ensure_f(p, &mut self.k[0]);
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
            combine(
                Some(&self.ends.y),
                h,
                &self.terms[i],
                done,
                &mut target[..n],
            );
            p.rhs(self.ends.t + tab.c[i] * h, target, &mut rest[0]);
        }
        if !tab.fsal {
            combine(
                Some(&self.ends.y),
                h,
                &self.terms[s],
                &self.k,
                &mut self.y_new[..n],
            );
        }
        let error = match self.terms.get(s + 1) {
            Some(e) => {
                combine(None, h, e, &self.k, &mut self.tmp[..n]);
                norm.rms(&self.tmp, &self.ends.y, &self.y_new)
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
        self.ends.advance(self.h, &mut self.y_new);
        let last = self.new_slope_index();
        if !self.tab.fsal {
            p.rhs(self.ends.t, &self.ends.y, &mut self.k[last]);
        }
        // f(t_{n+1}, y_{n+1}) becomes the next step's first stage.
        self.k.swap(0, last);
        self.swapped_first = Some(last);
    }

    fn reject(&mut self) {}
}
