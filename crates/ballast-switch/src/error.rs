//! Why a run stopped early.

use thiserror::Error;

/// A failure during the run. The controller's state stays at the last
/// accepted step, so the caller keeps everything computed up to `t`.
#[derive(Clone, Debug, PartialEq, Error)]
#[non_exhaustive]
pub enum RunFailure {
    /// The step size fell below the smallest allowed (or representable) step.
    #[error("step size {h:e} too small at t = {t}")]
    StepSizeTooSmall {
        /// Time of the last accepted step.
        t: f64,
        /// The step that was too small.
        h: f64,
    },
    /// The step budget is used up.
    #[error("maximum number of steps ({max}) reached at t = {t}")]
    TooManySteps {
        /// Time of the last accepted step.
        t: f64,
        /// The budget.
        max: usize,
    },
    /// The right-hand side kept returning NaN or infinity while the step shrank.
    #[error("the right-hand side returned NaN or infinity near t = {t} (step {h:e})")]
    NonFiniteRhs {
        /// Time of the last accepted step.
        t: f64,
        /// The last step tried.
        h: f64,
    },
    /// The Newton iteration kept failing while the step shrank.
    #[error("Newton iteration failed to converge near t = {t} (step {h:e})")]
    NewtonFailed {
        /// Time of the last accepted step.
        t: f64,
        /// The last step tried.
        h: f64,
    },
    /// The iteration matrix stayed singular while the step shrank.
    #[error("singular iteration matrix near t = {t} (step {h:e})")]
    SingularMatrix {
        /// Time of the last accepted step.
        t: f64,
        /// The last step tried.
        h: f64,
    },
}

impl RunFailure {
    /// Time of the last accepted step.
    pub fn t(&self) -> f64 {
        match self {
            RunFailure::StepSizeTooSmall { t, .. }
            | RunFailure::TooManySteps { t, .. }
            | RunFailure::NonFiniteRhs { t, .. }
            | RunFailure::NewtonFailed { t, .. }
            | RunFailure::SingularMatrix { t, .. } => *t,
        }
    }
}

/// Why a controller could not be set up.
#[derive(Clone, Debug, PartialEq, Error)]
#[non_exhaustive]
pub enum SetupError {
    /// The scheme could not be built.
    #[error(transparent)]
    Build(#[from] ballast_core::BuildError),
    /// The right-hand side is not finite at the initial state.
    #[error("the right-hand side is NaN or infinite at the initial state (t = {t})")]
    NonFiniteInitialRhs {
        /// Initial time.
        t: f64,
    },
    /// An analytic Jacobian was asked for, but the system does not provide one.
    #[error("JacobianSource::Analytic was requested but the system provides no analytic Jacobian")]
    MissingJacobian,
    /// The method has no error estimate and needs a fixed step.
    #[error("{0} has no error estimate: give a fixed step")]
    FixedStepRequired(ballast_core::Method),
}
