//! Errors of a run: bad input found before any work, or a failure during
//! the run that carries the solution computed so far.

use ballast_core::Method;
use thiserror::Error;

use crate::solution::Solution;

/// What went wrong. Input errors come before any work; run errors carry
/// the solution up to the failure ([`Error::partial`]).
#[derive(Debug, Error)]
#[non_exhaustive]
pub enum Error {
    /// A component of the initial state is NaN or infinite.
    #[error("initial state component {index} is not finite ({value})")]
    NonFiniteInitialState {
        /// The component.
        index: usize,
        /// Its value.
        value: f64,
    },
    /// The state has no components.
    #[error("the initial state is empty: nothing to integrate")]
    EmptyState,
    /// The span's start or end is NaN or infinite.
    #[error("time span ({t0}, {t1}) must be finite")]
    NonFiniteSpan {
        /// Start.
        t0: f64,
        /// End.
        t1: f64,
    },
    /// The span has zero length.
    #[error("empty time span: t0 = t1 = {t0}")]
    EmptySpan {
        /// Start (= end).
        t0: f64,
    },
    /// A tolerance is zero, negative or not finite.
    #[error("{name} must be positive and finite, got {value}")]
    InvalidTolerance {
        /// `"rtol"` or `"atol"` (with component index for per-component atol).
        name: String,
        /// The offending value.
        value: f64,
    },
    /// `rtol` is below what double precision can deliver.
    #[error("rtol {value:e} is below {min:e}: double precision cannot deliver it")]
    RtolTooSmall {
        /// The tolerance asked for.
        value: f64,
        /// The smallest accepted, [`Options::MIN_RTOL`](crate::Options::MIN_RTOL).
        min: f64,
    },
    /// Per-component `atol` of the wrong length.
    #[error("atol has {got} components, the state has {expected}")]
    AtolLength {
        /// State dimension.
        expected: usize,
        /// `atol` length.
        got: usize,
    },
    /// The method has no error estimate and no fixed step was given.
    #[error("{0} needs a fixed step: use Options::fixed_step(h)")]
    FixedStepRequired(Method),
    /// A step-size option is zero, negative or not finite.
    #[error("{name} must be positive and finite, got {value}")]
    InvalidStep {
        /// Which option.
        name: &'static str,
        /// The offending value.
        value: f64,
    },
    /// A requested output time lies outside the span or is not finite.
    #[error("output time {t} lies outside the span [{t0}, {t1}]")]
    OutputTimeOutsideSpan {
        /// The time.
        t: f64,
        /// Span start.
        t0: f64,
        /// Span end.
        t1: f64,
    },
    /// The options or the system are inconsistent (for example a declared
    /// Jacobian structure of the wrong size).
    #[error("invalid setup: {0}")]
    InvalidSetup(String),
    /// The time span's length `t1 - t0` overflows to infinity.
    #[error("time span ({t0}, {t1}) is too long: t1 - t0 overflows")]
    SpanTooLong {
        /// Start.
        t0: f64,
        /// End.
        t1: f64,
    },
    /// `min_step` is larger than `max_step` (or the fixed step).
    #[error("min_step {min_step} exceeds max_step {max_step}")]
    StepBoundsCrossed {
        /// The smallest step allowed.
        min_step: f64,
        /// The largest step allowed.
        max_step: f64,
    },
    /// `max_steps` is zero.
    #[error("max_steps must be at least 1")]
    ZeroMaxSteps,
    /// A breakpoint is NaN or infinite.
    #[error("breakpoint {value} is not finite")]
    NonFiniteBreakpoint {
        /// The breakpoint.
        value: f64,
    },
    /// An event's time tolerance is negative or not finite.
    #[error("event {index}: time tolerance must be finite and >= 0, got {value}")]
    InvalidEventTolerance {
        /// The event (in the order added).
        index: usize,
        /// The tolerance.
        value: f64,
    },
    /// A declared Jacobian structure (sparsity pattern) has another
    /// dimension than the state.
    #[error("the Jacobian's declared structure is {jacobian}x{jacobian} but the state has {state} components")]
    JacobianDimension {
        /// Components of the state.
        state: usize,
        /// Dimension of the declared structure.
        jacobian: usize,
    },
    /// The right-hand side is NaN or infinite at the initial state.
    #[error("the right-hand side is NaN or infinite at the initial state (t = {t})")]
    NonFiniteInitialRhs {
        /// Initial time.
        t: f64,
    },
    /// `eval(t)` outside the integrated span.
    #[error("t = {t} lies outside the integrated span [{t0}, {t1}]")]
    EvalOutsideSpan {
        /// The time asked for.
        t: f64,
        /// Span start.
        t0: f64,
        /// Span end reached.
        t1: f64,
    },
    /// The buffer given to `eval_into` has the wrong length.
    #[error("output buffer has {got} components, the state has {expected}")]
    OutputLength {
        /// State dimension.
        expected: usize,
        /// Buffer length.
        got: usize,
    },
    /// `eval(t)` on a solution that kept no dense output.
    #[error(
        "this solution kept no dense output (output mode {mode}); t = {t} is not a stored time"
    )]
    NoDenseOutput {
        /// The time asked for.
        t: f64,
        /// The output mode used.
        mode: &'static str,
    },
    /// The step size fell below the smallest allowed step.
    #[error("step size {h:e} too small at t = {t}")]
    StepSizeTooSmall {
        /// Time reached.
        t: f64,
        /// The step.
        h: f64,
        /// The solution up to `t`.
        partial: Box<Solution>,
    },
    /// The step budget ran out.
    #[error("maximum number of steps ({max}) reached at t = {t}")]
    TooManySteps {
        /// Time reached.
        t: f64,
        /// The budget.
        max: usize,
        /// The solution up to `t`.
        partial: Box<Solution>,
    },
    /// The right-hand side (or the step built from it) kept producing NaN
    /// or infinity while the step shrank.
    #[error("NaN or infinity from the right-hand side near t = {t} (step {h:e})")]
    NonFiniteRhs {
        /// Time reached.
        t: f64,
        /// The last step tried.
        h: f64,
        /// The solution up to `t`.
        partial: Box<Solution>,
    },
    /// The user's analytic Jacobian returned NaN or infinity, and the step
    /// failed because of it.
    #[error("the analytic Jacobian returned NaN or infinity near t = {t} (step {h:e})")]
    NonFiniteJacobian {
        /// Time reached.
        t: f64,
        /// The last step tried.
        h: f64,
        /// The solution up to `t`.
        partial: Box<Solution>,
    },
    /// An event function returned NaN or infinity.
    #[error("event {index} returned NaN or infinity at t = {t}")]
    NonFiniteEvent {
        /// The event (in the order added).
        index: usize,
        /// Where.
        t: f64,
        /// The solution up to the last accepted step before `t`.
        partial: Box<Solution>,
    },
    /// Newton's iteration failed even at the smallest step.
    #[error("Newton iteration failed near t = {t} (step {h:e})")]
    NewtonFailed {
        /// Time reached.
        t: f64,
        /// The last step tried.
        h: f64,
        /// The solution up to `t`.
        partial: Box<Solution>,
    },
    /// The iteration matrix was singular even at the smallest step.
    #[error("singular iteration matrix near t = {t} (step {h:e})")]
    SingularMatrix {
        /// Time reached.
        t: f64,
        /// The last step tried.
        h: f64,
        /// The solution up to `t`.
        partial: Box<Solution>,
    },
}

impl Error {
    /// The solution computed before a run failure; `None` for input errors.
    pub fn partial(&self) -> Option<&Solution> {
        match self {
            Error::StepSizeTooSmall { partial, .. }
            | Error::TooManySteps { partial, .. }
            | Error::NonFiniteRhs { partial, .. }
            | Error::NewtonFailed { partial, .. }
            | Error::SingularMatrix { partial, .. }
            | Error::NonFiniteJacobian { partial, .. }
            | Error::NonFiniteEvent { partial, .. } => Some(partial),
            _ => None,
        }
    }

    /// Takes the partial solution out of a run failure.
    pub fn into_partial(self) -> Option<Solution> {
        match self {
            Error::StepSizeTooSmall { partial, .. }
            | Error::TooManySteps { partial, .. }
            | Error::NonFiniteRhs { partial, .. }
            | Error::NewtonFailed { partial, .. }
            | Error::SingularMatrix { partial, .. }
            | Error::NonFiniteJacobian { partial, .. }
            | Error::NonFiniteEvent { partial, .. } => Some(*partial),
            _ => None,
        }
    }

    /// Whether the error is about the input (found before any work).
    pub fn is_input_error(&self) -> bool {
        self.partial().is_none()
            && !matches!(
                self,
                Error::EvalOutsideSpan { .. }
                    | Error::NoDenseOutput { .. }
                    | Error::OutputLength { .. }
            )
    }
}
