//! Cubic Hermite dense output over one step, from the end values and slopes:
//!
//! $$ u(\theta) = y_0 + \theta h f_0 + \theta^2 (3 d - 2 h f_0 - h f_1)
//!    + \theta^3 (-2 d + h f_0 + h f_1),\qquad d = y_1 - y_0 $$
//!
//! (Hairer, Norsett and Wanner I, II.6, eq. (6.7)). Third order; used where
//! a method publishes no continuous extension of its own.

/// Writes the monomial coefficients of the Hermite cubic into `coeffs`
/// (`c_k` at `coeffs[k*n..(k+1)*n]`, `k = 0..=3`).
pub fn coefficients(y0: &[f64], y1: &[f64], f0: &[f64], f1: &[f64], h: f64, coeffs: &mut [f64]) {
    let n = y0.len();
    for m in 0..n {
        let d = y1[m] - y0[m];
        coeffs[m] = y0[m];
        coeffs[n + m] = h * f0[m];
        coeffs[2 * n + m] = 3.0 * d - 2.0 * h * f0[m] - h * f1[m];
        coeffs[3 * n + m] = -2.0 * d + h * f0[m] + h * f1[m];
    }
}

/// Evaluates the Hermite cubic at `theta` into `out`.
pub fn eval(y0: &[f64], y1: &[f64], f0: &[f64], f1: &[f64], h: f64, theta: f64, out: &mut [f64]) {
    let (t2, t3) = (theta * theta, theta * theta * theta);
    for m in 0..y0.len() {
        let d = y1[m] - y0[m];
        let c2 = 3.0 * d - 2.0 * h * f0[m] - h * f1[m];
        let c3 = -2.0 * d + h * f0[m] + h * f1[m];
        out[m] = y0[m] + theta * h * f0[m] + t2 * c2 + t3 * c3;
    }
}

#[cfg(test)]
mod tests {
    #[test]
    fn reproduces_a_cubic() {
        // y = 1 + 2t - t^2 + 0.5 t^3 on [0, 2]: exact for a cubic.
        let y = |t: f64| 1.0 + 2.0 * t - t * t + 0.5 * t * t * t;
        let dy = |t: f64| 2.0 - 2.0 * t + 1.5 * t * t;
        let h = 2.0;
        let mut out = [0.0];
        super::eval(&[y(0.0)], &[y(h)], &[dy(0.0)], &[dy(h)], h, 0.3, &mut out);
        assert!((out[0] - y(0.6)).abs() < 1e-14);
        let mut c = [0.0; 4];
        super::coefficients(&[y(0.0)], &[y(h)], &[dy(0.0)], &[dy(h)], h, &mut c);
        let th: f64 = 0.7;
        let v = c[0] + th * (c[1] + th * (c[2] + th * c[3]));
        assert!((v - y(1.4)).abs() < 1e-14);
    }
}
