//! SVG pictures through plotters (the `plot` feature).
//!
//! - [`work_precision`]: achieved error against wall time for a comparison report.

pub mod work_precision;
