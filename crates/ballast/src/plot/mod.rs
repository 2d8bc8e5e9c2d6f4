//! SVG pictures through plotters (the `plot` feature).
//!
//! - [`work_precision`]: achieved error against wall time for a comparison report.
//! - [`regions`]: the stability region of every method, one panel per family.

pub mod regions;
mod style;
pub mod work_precision;
