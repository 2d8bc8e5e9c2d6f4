//! # ballast-switch
//!
//! The step controller of ballast. It runs one scheme, or a pair of an
//! explicit and an implicit scheme, over a time span:
//!
//! 1. accuracy: the embedded error estimate and a PI controller propose `h_acc`;
//! 2. stability: with the estimate `lambda_hat = rho e^{i theta}` of the
//!    Jacobian's dominant eigenvalue, an explicit scheme takes at most
//!    `h_stab = safety * r(theta) / rho`, where `r(theta)` is the reach of
//!    its stability region along that ray;
//! 3. switching: held by `h_stab` for several steps while the implicit
//!    scheme is cheaper per unit time, it switches to the implicit scheme,
//!    and back when the implicit steps fit the explicit region with margin.
//!
//! Every decision is counted and every switch recorded. Most users call
//! `ballast::integrate`, which drives a [`Controller`]; use this crate
//! directly to step a run by hand.
#![forbid(unsafe_code)]
#![deny(missing_docs)]

mod config;
mod controller;
mod error;
mod monitor;
mod switching;

pub use config::{ControlConfig, SwitchThresholds};
pub use controller::{ControlStats, Controller, StepReport};
pub use error::{RunFailure, SetupError};
pub use switching::{SwitchReason, SwitchRecord};
