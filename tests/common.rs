//! Helpers shared by the test modules.

/// Relative-or-absolute error `max_i |a_i - b_i| / (atol + rtol |b_i|)`-style
/// scaled by the given tolerances: values below 1 mean "within tolerance".
pub fn scaled_error(a: &[f64], b: &[f64], rtol: f64, atol: f64) -> f64 {
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y).abs() / (atol + rtol * y.abs()))
        .fold(0.0, f64::max)
}
