//! Modules of the `multistep_models` test binary.

mod convergence;
mod driver;
mod handover;
mod models;
mod stability;
