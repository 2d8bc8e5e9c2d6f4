//! Error weights and norms: the one place where vectors are reduced.
//!
//! The local error of a step is accepted when its weighted RMS norm
//!
//! $$ \|e\| = \sqrt{\tfrac1N \sum_i \big(e_i / w_i\big)^2},\qquad
//!    w_i = \mathrm{atol}_i + \mathrm{rtol}\,\max(|y_{0,i}|, |y_{1,i}|) $$
//!
//! is at most 1 (Hairer, Norsett and Wanner, Solving ODEs I, section II.4).
//! Every norm and dot product in the library goes through [`ErrorNorm`], so
//! a distributed state (each process holding a slice) can supply a global
//! [`Reduction`] without touching the methods.

use std::sync::Arc;

/// Absolute tolerance: one value for all components, or one per component.
#[derive(Clone, Debug, PartialEq)]
pub enum Atol {
    /// The same absolute tolerance for every component.
    Scalar(f64),
    /// One absolute tolerance per component.
    Vector(Vec<f64>),
}

impl Atol {
    /// The absolute tolerance of component `i`.
    #[inline]
    pub fn at(&self, i: usize) -> f64 {
        match self {
            Atol::Scalar(a) => *a,
            Atol::Vector(v) => v[i],
        }
    }
}

/// A global reduction over a distributed state. The default is local.
pub trait Reduction: Send + Sync + std::fmt::Debug {
    /// The sum of `local` over all parts of the state.
    fn sum(&self, local: f64) -> f64;
    /// The maximum of `local` over all parts of the state.
    fn max(&self, local: f64) -> f64;
}

/// Weighted norms under a tolerance, with an optional global reduction.
#[derive(Clone, Debug)]
pub struct ErrorNorm {
    rtol: f64,
    atol: Atol,
    reduction: Option<Arc<dyn Reduction>>,
    /// Global number of components (for the RMS mean).
    global_len: usize,
}

impl ErrorNorm {
    /// A local norm for a state of `n` components.
    pub fn new(rtol: f64, atol: Atol, n: usize) -> Self {
        Self {
            rtol,
            atol,
            reduction: None,
            global_len: n,
        }
    }

    /// Uses `reduction` for sums and maxima; `global_len` is the total
    /// number of components over all parts.
    pub fn with_reduction(mut self, reduction: Arc<dyn Reduction>, global_len: usize) -> Self {
        self.reduction = Some(reduction);
        self.global_len = global_len;
        self
    }

    /// Relative tolerance.
    pub fn rtol(&self) -> f64 {
        self.rtol
    }

    /// Absolute tolerance.
    pub fn atol(&self) -> &Atol {
        &self.atol
    }

    #[inline]
    fn global_sum(&self, s: f64) -> f64 {
        match &self.reduction {
            Some(r) => r.sum(s),
            None => s,
        }
    }

    #[inline]
    fn global_max(&self, s: f64) -> f64 {
        match &self.reduction {
            Some(r) => r.max(s),
            None => s,
        }
    }

    /// The error weight `w_i = atol_i + rtol * max(|a_i|, |b_i|)`.
    #[inline]
    pub fn weight(&self, i: usize, a: f64, b: f64) -> f64 {
        self.atol.at(i) + self.rtol * a.abs().max(b.abs())
    }

    /// Weighted RMS norm of `e` with weights from the two states `y0`, `y1`.
    /// Returns `NaN` or `inf` when any input is not finite.
    #[inline]
    pub fn rms(&self, e: &[f64], y0: &[f64], y1: &[f64]) -> f64 {
        // The tolerance's kind is looked at once, not per component, and the
        // zipped slices need no bounds checks (a third of the norm's cost on
        // a three-equation system); same terms, same order as `weight`.
        let rtol = self.rtol;
        let pairs = e.iter().zip(y0.iter().zip(y1));
        let s = match &self.atol {
            Atol::Scalar(a) => pairs.fold(0.0, |s, (e, (a0, a1))| {
                let q = e / (a + rtol * a0.abs().max(a1.abs()));
                s + q * q
            }),
            Atol::Vector(v) => pairs.zip(v).fold(0.0, |s, ((e, (a0, a1)), a)| {
                let q = e / (a + rtol * a0.abs().max(a1.abs()));
                s + q * q
            }),
        };
        self.finish_rms(s)
    }

    /// Weighted RMS norm of `e` with weights from one state `y`.
    #[inline]
    pub fn rms_at(&self, e: &[f64], y: &[f64]) -> f64 {
        let mut s = 0.0;
        for i in 0..e.len() {
            let q = e[i] / self.weight(i, y[i], y[i]);
            s += q * q;
        }
        self.finish_rms(s)
    }

    /// Weighted RMS norm of `e` with precomputed weights `w`.
    #[inline]
    pub fn rms_weighted(&self, e: &[f64], w: &[f64]) -> f64 {
        let mut s = 0.0;
        for i in 0..e.len() {
            let q = e[i] / w[i];
            s += q * q;
        }
        self.finish_rms(s)
    }

    /// Fills `w` with the weights for state `y`.
    pub fn weights(&self, y: &[f64], w: &mut [f64]) {
        for i in 0..y.len() {
            w[i] = self.weight(i, y[i], y[i]);
        }
    }

    /// The weighted RMS norm from this part's sum of squared scaled
    /// components `sum (e_i / w_i)^2`, for callers that take several norms
    /// in one pass (weights from [`Self::weights`]).
    #[inline]
    pub fn rms_of_sum(&self, local_sum: f64) -> f64 {
        self.finish_rms(local_sum)
    }

    #[inline]
    fn finish_rms(&self, local_sum: f64) -> f64 {
        let n = self.global_len.max(1) as f64;
        (self.global_sum(local_sum) / n).sqrt()
    }

    /// Euclidean dot product `a . b`, globally reduced.
    #[inline]
    pub fn dot(&self, a: &[f64], b: &[f64]) -> f64 {
        let mut s = 0.0;
        for i in 0..a.len() {
            s += a[i] * b[i];
        }
        self.global_sum(s)
    }

    /// Euclidean norm `||a||_2`, globally reduced.
    #[inline]
    pub fn norm2(&self, a: &[f64]) -> f64 {
        self.dot(a, a).sqrt()
    }

    /// Max norm `||a||_inf`, globally reduced.
    pub fn norm_inf(&self, a: &[f64]) -> f64 {
        let m = a.iter().fold(0.0f64, |m, x| m.max(x.abs()));
        self.global_max(m)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(Debug)]
    struct Doubling;
    impl Reduction for Doubling {
        fn sum(&self, local: f64) -> f64 {
            2.0 * local
        }
        fn max(&self, local: f64) -> f64 {
            local
        }
    }

    #[test]
    fn rms_of_error_equal_to_weight_is_one() {
        let n = ErrorNorm::new(1e-3, Atol::Vector(vec![1e-6, 1e-4]), 2);
        let y = [2.0, -3.0];
        let e = [n.weight(0, 2.0, 2.0), -n.weight(1, 3.0, 3.0)];
        assert!((n.rms(&e, &y, &y) - 1.0).abs() < 1e-15);
    }

    #[test]
    fn reduction_goes_through_one_place() {
        // Two equal halves of a state: sums double, so the RMS over the
        // global length 2n equals the local RMS over n.
        let local = ErrorNorm::new(1e-3, Atol::Scalar(1e-6), 3);
        let global = local.clone().with_reduction(Arc::new(Doubling), 6);
        let e = [1e-4, 2e-4, -1e-4];
        let y = [1.0, 2.0, 3.0];
        assert!((local.rms_at(&e, &y) - global.rms_at(&e, &y)).abs() < 1e-15);
        assert!((global.dot(&y, &y) - 28.0).abs() < 1e-12);
    }
}
