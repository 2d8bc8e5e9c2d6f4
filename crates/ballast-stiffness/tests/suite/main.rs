//! Integration tests of ballast-stiffness, one binary with a module per topic.
//!
//! Run with `-- --nocapture` to see the accuracy and product counts of each
//! test family.

mod common;
mod fd;
mod hard;
mod models;
mod props;
mod spectra;
mod stages;
