//! SVG pictures through plotters (the `plot` feature).
//!
//! - [`regions`]: the stability region of every method, one panel per family.

pub mod regions;
