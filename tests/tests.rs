//! Integration tests of ballast, built as one binary (one module per topic).

mod common;
mod contract;
mod explicit_runs;
mod switching;
mod breakpoints;
mod events;
mod observer;
mod robustness;
mod robustness_props;
