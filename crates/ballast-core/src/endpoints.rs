//! The end points of the last accepted step, kept the same way by every
//! one-step scheme: the current `(t, y)`, the previous `(t_prev, y_prev)`,
//! the accepted step `h_last = t - t_prev`, and whether the slope
//! `f(t, y)` is known.
//!
//! The slope itself stays with the scheme, since where it lives differs:
//! an owned buffer in the implicit schemes, a stage buffer in the explicit
//! ones (whose first and last stages change places instead of being
//! copied). Methods that need it take it as an argument.

use crate::implicit::hermite;
use crate::problem::Problem;
use crate::scheme::StepFailure;
use crate::system::System;

/// The state at both ends of the last accepted step.
#[derive(Debug)]
pub(crate) struct Endpoints {
    /// Current time.
    pub(crate) t: f64,
    /// Current state.
    pub(crate) y: Vec<f64>,
    /// Time at the start of the last accepted step (`t` before the first).
    pub(crate) t_prev: f64,
    /// State at `t_prev`.
    pub(crate) y_prev: Vec<f64>,
    /// The last accepted step, `0` before the first.
    pub(crate) h_last: f64,
    /// Whether the scheme's slope buffer holds `f(t, y)`.
    pub(crate) have_f: bool,
}

impl Endpoints {
    /// End points for a system of dimension `n`.
    pub(crate) fn new(n: usize) -> Self {
        Self {
            t: 0.0,
            y: vec![0.0; n],
            t_prev: 0.0,
            y_prev: vec![0.0; n],
            h_last: 0.0,
            have_f: false,
        }
    }

    /// Starts at `(t, y)` with no step taken and fills `f = f(t, y)`:
    /// copied from `slope` when given, else evaluated. A non-finite slope
    /// is [`StepFailure::NonFinite`].
    pub(crate) fn start<S: System>(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
        f: &mut [f64],
    ) -> Result<(), StepFailure> {
        self.t = t;
        self.t_prev = t;
        self.y.copy_from_slice(y);
        self.y_prev.copy_from_slice(y);
        self.h_last = 0.0;
        match slope {
            Some(known) => f.copy_from_slice(known),
            None => p.rhs(t, &self.y, f),
        }
        self.have_f = f.iter().all(|v| v.is_finite());
        if self.have_f {
            Ok(())
        } else {
            Err(StepFailure::NonFinite)
        }
    }

    /// Evaluates `f = f(t, y)` unless it is known already.
    #[inline]
    pub(crate) fn ensure_f<S: System>(&mut self, p: &mut Problem<S>, f: &mut [f64]) {
        if !self.have_f {
            p.rhs(self.t, &self.y, f);
            self.have_f = true;
        }
    }

    /// The slope `f` when it is known.
    pub(crate) fn dydt<'a>(&self, f: &'a [f64]) -> Option<&'a [f64]> {
        self.have_f.then_some(f)
    }

    /// Accepts a step of size `h` to `y_new`: the current point becomes the
    /// previous one and `y_new` the current one, by exchanging buffers
    /// (`y_new` is left with the old `y_prev`). The caller provides
    /// `f(t, y)` at the new point before its next use.
    pub(crate) fn advance(&mut self, h: f64, y_new: &mut Vec<f64>) {
        self.t_prev = self.t;
        self.t += h;
        self.h_last = h;
        std::mem::swap(&mut self.y_prev, &mut self.y);
        std::mem::swap(&mut self.y, y_new);
        self.have_f = true;
    }

    /// `theta = (t - t_prev) / h_last`, the position of `t` in the last
    /// step; before the first step there is none, and `out` gets `y`.
    pub(crate) fn step_fraction(&self, t: f64, out: &mut [f64]) -> Option<f64> {
        if self.h_last == 0.0 {
            out.copy_from_slice(&self.y);
            None
        } else {
            Some((t - self.t_prev) / self.h_last)
        }
    }

    /// The cubic Hermite interpolant of the last step at `t`, from the
    /// slopes `f_prev` at `t_prev` and `f` at `t` (see [`hermite`]).
    pub(crate) fn hermite(&self, t: f64, f_prev: &[f64], f: &[f64], out: &mut [f64]) {
        if let Some(theta) = self.step_fraction(t, out) {
            hermite::eval(&self.y_prev, &self.y, f_prev, f, self.h_last, theta, out);
        }
    }

    /// The monomial coefficients of [`Self::hermite`] in `theta`.
    pub(crate) fn hermite_coefficients(&self, f_prev: &[f64], f: &[f64], coeffs: &mut [f64]) {
        hermite::coefficients(&self.y_prev, &self.y, f_prev, f, self.h_last, coeffs);
    }
}
