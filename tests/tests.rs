//! Integration tests of ballast, built as one binary (one module per topic).

mod breakpoints;
mod common;
mod contract;
mod events;
mod explicit_runs;
mod observer;
mod robustness;
mod robustness_props;
mod switching;
