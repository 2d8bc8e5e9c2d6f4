//! # ballast-models
//!
//! Well-known test problems for ODE integrators, each a type implementing
//! [`ballast_core::System`] with its right-hand side, its analytic
//! Jacobian and its Jacobian structure, and a registry that hands out each
//! problem with its standard initial value, time span and a reference
//! solution whose source is written beside it. Tests, benchmarks, examples
//! and the method-comparison tool of ballast all draw on these.
//!
//! | name | model | dim | character |
//! | --- | --- | --- | --- |
//! | `arenstorf` | [`Arenstorf`] orbit, HNW I II.0 | 4 | non-stiff |
//! | `pleiades` | [`Pleiades`], 7 bodies, HNW I II.10 | 28 | non-stiff |
//! | `lorenz` | [`Lorenz`] on [0, 16], HNW I (LRNZ) | 3 | non-stiff |
//! | `kepler` | [`Kepler`] two-body orbit, e = 0.5 | 4 | non-stiff |
//! | `robertson`, `robertson-long` | [`Robertson`] kinetics to 40 and 1e11 | 3 | stiff |
//! | `hires` | [`Hires`], Bari test set | 8 | stiff |
//! | `vanderpol` | [`VanDerPol`], eps = 1e-6 on [0, 2] | 2 | stiff |
//! | `vanderpol-mu1000` | [`VanDerPolMu`], mu = 1000 on [0, 3000] | 2 | stiff |
//! | `oregonator` | [`Oregonator`], HNW II IV.10 | 3 | stiff |
//! | `brusselator`, `brusselator-500` | 1D [`Brusselator`], N = 40 and 500 (banded) | 2N | stiff |
//! | `prothero-robinson` | [`ProtheroRobinson`], lambda = -1e6 | 1 | stiff |
//! | `linear-real`, `linear-complex` | `y' = A y`, prescribed spectrum ([`LinearSpectrum`]) | 4 | stiff |
//! | `flame` | [`Flame`] `y' = y^2 - y^3`, delta = 1e-4 | 1 | changing |
//! | `stiffness-ramp` | [`StiffnessRamp`], lambda from -1 to -1e6 | 1 | changing |
//!
//! Parameterised constructors ([`Kepler::new`], [`Brusselator::new`],
//! [`ProtheroRobinson::new`], [`Flame::new`], [`StiffnessRamp::new`],
//! [`LinearSpectrum::new`], [`VanDerPol::new`], [`VanDerPolMu::new`]) give
//! other instances; closed forms are callable where they exist
//! ([`Kepler::exact`], [`Flame::exact`], [`ProtheroRobinson::exact`],
//! [`StiffnessRamp::exact`], [`LinearSpectrum::exact`], with
//! [`lambert_w0`] and [`wright_omega`] behind the flame), and so are the
//! true eigenvalues where they are known ([`LinearSpectrum::eigenvalues`],
//! [`StiffnessRamp::lambda`]).
//!
//! Reference values without a closed form come from
//! `tools/reference/models.py` (mpmath at 40 digits, two tolerances, checked
//! by SciPy); [`Reference::source`] says how each was obtained and
//! [`Reference::digits`] how many significant digits it is trusted to.
//!
//! Not for: measuring a solver's speed on your own model (use your model),
//! or problems beyond ODEs (no DAEs, no delays).
//!
//! ```
//! use ballast_core::System;
//! use ballast_models::{get, names, Character};
//!
//! assert!(names().contains(&"robertson"));
//! let mut case = get("robertson").unwrap();
//! assert_eq!(case.character, Character::Stiff);
//! let mut dy = vec![0.0; case.dim()];
//! case.system.rhs(case.span.0, &case.y0, &mut dy);
//! assert_eq!(dy, [-0.04, 0.04, 0.0]);
//! // The reference conserves mass, to its trusted digits.
//! let sum: f64 = case.reference.y.iter().sum();
//! assert!((sum - 1.0).abs() < 10f64.powf(-case.reference.digits));
//! ```
#![forbid(unsafe_code)]
#![deny(missing_docs)]

mod brusselator;
pub mod check;
mod flame;
mod kepler;
mod kinetics;
mod lambert;
mod linear;
mod nonstiff;
#[rustfmt::skip]
mod reference;
mod registry;
mod scalar;
#[cfg(test)]
mod tests;
mod vanderpol;

pub use brusselator::Brusselator;
pub use flame::Flame;
pub use kepler::Kepler;
pub use kinetics::{Hires, Oregonator, Robertson};
pub use lambert::{lambert_w0, wright_omega};
pub use linear::LinearSpectrum;
pub use nonstiff::{Arenstorf, Lorenz, Pleiades};
pub use registry::{all, get, names, Case, Character, Model, Reference};
pub use scalar::{ProtheroRobinson, StiffnessRamp};
pub use vanderpol::{VanDerPol, VanDerPolMu};
