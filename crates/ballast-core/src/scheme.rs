//! The common trait behind every integrator.
//!
//! A [`Scheme`] owns the state `(t, y)` and its work arrays; it attempts one
//! step of a given size, reports the weighted local error, and commits or
//! discards it. The controller (in `ballast-switch`) owns the loop: step-size
//! choice, stability caps, switching, output and termination. Schemes stay
//! small.
//!
//! The trait is generic over the user's system `S` (so right-hand-side calls
//! are monomorphised and inlined) and object-safe for a fixed `S`, so a
//! controller can hold `Box<dyn Scheme<S>>`.

use crate::method::Method;
use crate::norm::ErrorNorm;
use crate::problem::Problem;
use crate::system::System;

/// Why an attempted step failed before an error estimate existed.
/// Every failure is recoverable by a smaller step; the controller decides
/// when to give up.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum StepFailure {
    /// The right-hand side or the step produced NaN or infinity.
    NonFinite,
    /// The Newton iteration diverged or converged too slowly.
    NewtonFailed,
    /// The iteration matrix was singular to working precision.
    SingularMatrix,
}

/// The outcome of an attempted step that produced an error estimate.
///
/// `repr(C)` puts the error first: with the default layout it came last,
/// behind the `NextStep`, and the run loop, which reads the error the moment
/// an explicit step returns, measured 3-4 % slower on the abstraction-cost
/// bench (same instruction count; DP5(4) on Lorenz, 1.10-1.11 against
/// 1.07-1.09 of the floor).
#[derive(Clone, Copy, Debug, PartialEq)]
#[repr(C)]
pub struct Attempt {
    /// Weighted RMS norm of the local error estimate; `<= 1` means accept.
    /// Fixed-step methods without an estimate report 0.
    pub error: f64,
    /// What the scheme says about the next step's size.
    pub next: NextStep,
}

/// A scheme's say in the next step's size (the step-size factor).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum NextStep {
    /// The controller's accuracy rule decides.
    Accuracy,
    /// The scheme proposes the factor itself (multistep order selection).
    Factor(f64),
    /// The accuracy rule decides, up to this factor: an implicit scheme
    /// whose Newton iteration contracted slowly limits the growth that
    /// would make the next iteration fail.
    AtMost(f64),
}

impl Attempt {
    /// An attempt with only an error estimate.
    pub fn with_error(error: f64) -> Self {
        Self {
            error,
            next: NextStep::Accuracy,
        }
    }

    /// The same attempt with the next step's factor limited to `max_factor`.
    pub fn limited_to(self, max_factor: f64) -> Self {
        Self {
            next: NextStep::AtMost(max_factor),
            ..self
        }
    }

    /// The factor the scheme proposes itself, if it does.
    pub fn factor(&self) -> Option<f64> {
        match self.next {
            NextStep::Factor(f) => Some(f),
            _ => None,
        }
    }

    /// The next step's factor after an accepted step, given the accuracy
    /// rule's `accuracy`.
    #[inline]
    pub fn next_factor(&self, accuracy: f64) -> f64 {
        match self.next {
            NextStep::Accuracy => accuracy,
            NextStep::Factor(f) => f,
            NextStep::AtMost(m) => accuracy.min(m),
        }
    }
}

/// What every scheme tells about itself and its last step, independent of
/// the system type: identity, orders, current state and dense output.
pub trait SchemeState {
    /// Which method this is.
    fn method(&self) -> Method;

    /// The current order of the propagated solution.
    fn order(&self) -> usize;

    /// The order `q` of the local error estimate's leading term, so that
    /// the estimate scales like `h^(q+1)`. Step control uses exponent `1/(q+1)`.
    fn error_order(&self) -> usize;

    /// Whether the scheme solves (non)linear systems.
    fn is_implicit(&self) -> bool;

    /// Whether the scheme has an error estimate (fixed-step-only schemes do not).
    fn has_error_estimate(&self) -> bool {
        true
    }

    /// Current time.
    fn t(&self) -> f64;

    /// Current state.
    fn y(&self) -> &[f64];

    /// `f(t, y)` at the current state, when the scheme has it (FSAL and
    /// multistep schemes always do).
    fn dydt(&self) -> Option<&[f64]>;

    /// Start time of the last accepted step (equals `t()` before any step).
    fn t_prev(&self) -> f64;

    /// Writes the dense-output value at `t` within the last accepted step
    /// `[t_prev, t]` into `out`. Outside it the polynomial is extrapolated.
    fn interpolate(&self, t: f64, out: &mut [f64]);

    /// Degree of the dense-output polynomial over the last step.
    fn dense_degree(&self) -> usize;

    /// Writes the dense output of the last accepted step as monomial
    /// coefficients in `theta = (t - t_prev) / h`: `y(t_prev + theta h) =
    /// sum_k c_k theta^k`, with `c_k` at `coeffs[k*n..(k+1)*n]` for
    /// `k = 0..=dense_degree()`.
    fn dense_coefficients(&self, coeffs: &mut [f64]);

    /// A free estimate of the Jacobian's spectral radius from the last
    /// attempted step's stages, `||k_i - k_j|| / ||Y_i - Y_j||` (Hairer and
    /// Wanner II, IV.2), when the scheme can give one without extra work.
    fn stage_spectral_estimate(&self) -> Option<f64> {
        None
    }
}

/// One integrator behind the common interface.
///
/// Protocol: [`start`](Scheme::start) once (or after a hand-over or a
/// discontinuity), then repeatedly [`attempt`](Scheme::attempt) followed by
/// [`accept`](Scheme::accept) or [`reject`](Scheme::reject). Dense output
/// ([`SchemeState::interpolate`]) covers the last accepted step and is valid
/// until the next `attempt`. Nothing allocates after construction.
pub trait Scheme<S: System>: SchemeState {
    /// Sets the state to `(t, y)` and prepares to step from it. Used at the
    /// start of a run, after a hand-over from another scheme, and after a
    /// discontinuity. Multistep schemes restart at low order.
    fn start(&mut self, p: &mut Problem<S>, t: f64, y: &[f64]) -> Result<(), StepFailure> {
        self.start_with(p, t, y, None)
    }

    /// [`Scheme::start`] with the slope `f(t, y)` given when the caller
    /// has it (the controller's first evaluation, or the slope of the
    /// scheme handing over): it is copied instead of evaluated again.
    fn start_with(
        &mut self,
        p: &mut Problem<S>,
        t: f64,
        y: &[f64],
        slope: Option<&[f64]>,
    ) -> Result<(), StepFailure>;

    /// Attempts one step of size `h` (negative when integrating backwards)
    /// from the current state. Does not change the state until `accept`.
    fn attempt(
        &mut self,
        p: &mut Problem<S>,
        h: f64,
        norm: &ErrorNorm,
    ) -> Result<Attempt, StepFailure>;

    /// Commits the last attempted step.
    fn accept(&mut self, p: &mut Problem<S>);

    /// Discards the last attempted step.
    fn reject(&mut self);
}
