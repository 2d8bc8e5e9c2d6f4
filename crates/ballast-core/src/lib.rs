//! # ballast-core
//!
//! The common [`Scheme`] trait and every integrator of ballast, with what
//! they share: the user's [`System`], error norms, step-size control,
//! Jacobians, Newton iterations, linear solvers and the stability
//! functions of every method.
//!
//! Most users want the facade crate `ballast` and its `integrate()`; use
//! this crate directly to drive a scheme step by step or to add a method.
//!
//! ```
//! use ballast_core::{explicit::{ExplicitRk, tableau::DORMAND_PRINCE_54}, Atol, ErrorNorm, Problem, Scheme, SchemeState};
//! // y' = -y, one step of size 0.1 from y(0) = 1.
//! let mut p = Problem::new(|_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -y[0], 1);
//! let mut rk = ExplicitRk::new(&DORMAND_PRINCE_54, 1);
//! let norm = ErrorNorm::new(1e-6, Atol::Scalar(1e-9), 1);
//! rk.start(&mut p, 0.0, &[1.0]).unwrap();
//! let attempt = rk.attempt(&mut p, 0.1, &norm).unwrap();
//! assert!(attempt.error <= 1.0);
//! rk.accept(&mut p);
//! assert!((rk.y()[0] - (-0.1f64).exp()).abs() < 1e-7);
//! ```
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub mod build;
pub mod control;
mod endpoints;
pub mod explicit;
pub mod implicit;
pub mod jacobian;
pub mod linalg;
pub mod matrix;
pub mod method;
pub mod multistep;
pub mod newton;
pub mod norm;
pub mod options;
pub mod problem;
pub mod scheme;
pub mod stability;
pub mod system;

pub use build::{build, BuildError};
pub use matrix::Jacobian;
pub use method::{Method, SwitchPair};
pub use norm::{Atol, ErrorNorm, Reduction};
pub use options::{ImplicitOptions, JacobianSource, SchemeOptions};
pub use problem::{Problem, WorkCounters};
pub use scheme::{Attempt, NextStep, Scheme, SchemeState, StepFailure};
pub use system::{ByRef, SparsityPattern, Structure, System, WithJacobian, WithStructure};
