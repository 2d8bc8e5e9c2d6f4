//! # ballast
//!
//! Integrates ordinary differential equations `y' = f(t, y)` and keeps
//! every step inside the stability region of the method in use. While it
//! runs, ballast estimates the dominant eigenvalue of the Jacobian by power
//! iteration, caps explicit steps at the stability limit, switches between
//! an explicit and an implicit scheme when the step accuracy wants would
//! leave the explicit region, and records every decision.
//!
//! Use it when you embed time integration in a simulation code and do not
//! want to choose between explicit and implicit methods by hand. It is not
//! for differential-algebraic systems or delay equations.
//!
//! ```
//! use ballast::{integrate, Options};
//! // y' = -50 (y - cos t), y(0) = 0
//! let sol = integrate(
//!     |t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -50.0 * (y[0] - t.cos()),
//!     (0.0, 2.0),
//!     &[0.0],
//!     &Options::default().rtol(1e-6).atol(1e-9),
//! )?;
//! // Closed form: y = (2500 cos t + 50 sin t - 2500 e^{-50 t}) / 2501.
//! let exact = (2500.0 * 2f64.cos() + 50.0 * 2f64.sin() - 2500.0 * (-100f64).exp()) / 2501.0;
//! assert!((sol.y_final()[0] - exact).abs() < 1e-5);
//! let y_mid = sol.eval(1.0)?;
//! println!("y(1) = {}, {} steps", y_mid[0], sol.stats().accepted);
//! # Ok::<(), ballast::Error>(())
//! ```
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub mod compare;
mod error;
mod events;
mod options;
#[cfg(feature = "plot")]
pub mod plot;
mod run;
mod solution;

/// Stability regions of every method: `R(z)`, reach along rays, intervals,
/// A-/L-stability, A(alpha), and [`critical_step`](stability::critical_step).
pub use ballast_core::stability;
/// The dominant eigenvalue by power iteration, matrix-free:
/// [`spectral_radius`](stiffness::spectral_radius) and a warm-started estimator.
pub use ballast_stiffness as stiffness;

pub use ballast_core::{
    ByRef, Jacobian, JacobianSource, Method, SparsityPattern, Structure, SwitchPair, System,
    WithJacobian, WithStructure,
};
pub use ballast_switch::{SwitchReason, SwitchRecord, SwitchThresholds};
pub use error::Error;
pub use events::{Direction, Event, EventRecord};
pub use num_complex::Complex64;
pub use options::{Options, Output};
pub use run::{integrate, Run, StepInfo, StopReason};
pub use solution::{Solution, Stats};

/// The README's code examples, compiled and run as doctests.
#[cfg(doctest)]
#[doc = include_str!("../../../README.md")]
struct ReadmeDoctests;
