//! The 2×2 Rayleigh–Ritz step: eigenvalues of a projected 2×2 matrix and
//! the residuals of their Ritz vectors.
//!
//! With an orthonormal basis `Q = [q1 q2]` of the span of the last two
//! iterates, `H = Q^T A Q` and `G = (AQ - QH)^T (AQ - QH) = (AQ)^T (AQ) - H^T H`.
//! A Ritz pair `(theta, Q u)` with `H u = theta u` has the residual
//! `||A Q u - theta Q u||^2 = u^* G u / u^* u` (Saad, *Numerical Methods for
//! Large Eigenvalue Problems*, 2nd ed., SIAM 2011, section 4.3, recalled
//! from memory).

use num_complex::Complex64;

/// One candidate eigenvalue with its quality.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(crate) struct Candidate {
    /// The eigenvalue estimate returned to the user.
    pub lambda: Complex64,
    /// The spectral-radius estimate that goes with it.
    pub radius: f64,
    /// Relative residual.
    pub rel_res: f64,
}

impl Candidate {
    /// A real Rayleigh quotient `mu` with absolute residual `res`.
    pub(crate) fn real(mu: f64, res: f64) -> Self {
        Self {
            lambda: Complex64::new(mu, 0.0),
            radius: mu.abs(),
            rel_res: relative(res, mu.abs()),
        }
    }
}

/// `res / scale`, with `0/0 = 0` and `x/0 = inf`.
pub(crate) fn relative(res: f64, scale: f64) -> f64 {
    if res == 0.0 {
        0.0
    } else if scale == 0.0 {
        f64::INFINITY
    } else {
        res / scale
    }
}

/// Residual norm of the Ritz vector of `h` for `theta`, given `g`.
fn ritz_residual(h: [[f64; 2]; 2], g: [[f64; 2]; 2], theta: Complex64) -> f64 {
    // Two candidate null vectors of H - theta I, one from each row.
    let ua = [Complex64::new(h[0][1], 0.0), theta - h[0][0]];
    let ub = [theta - h[1][1], Complex64::new(h[1][0], 0.0)];
    let na = ua[0].norm_sqr() + ua[1].norm_sqr();
    let nb = ub[0].norm_sqr() + ub[1].norm_sqr();
    let (u, nu) = if na >= nb { (ua, na) } else { (ub, nb) };
    if nu == 0.0 {
        // H = theta I: every vector of the span is a Ritz vector; report the
        // worse of the two basis directions.
        return g[0][0].max(g[1][1]).max(0.0).sqrt();
    }
    let cross = (u[0].conj() * u[1]).re;
    let r2 = g[0][0] * u[0].norm_sqr() + g[1][1] * u[1].norm_sqr() + 2.0 * g[0][1] * cross;
    (r2.max(0.0) / nu).sqrt()
}

/// The dominant Ritz value of `h` (`h[i][j]` = row `i`, column `j`) and its
/// relative residual, given the residual Gram matrix `g` (symmetric).
///
/// A complex pair gives the member with positive imaginary part. Two real
/// values of nearly equal modulus (within `tie`, relative) give the one
/// with the smaller real part, with the larger modulus as radius and the
/// worse of the two residuals.
pub(crate) fn dominant_ritz(h: [[f64; 2]; 2], g: [[f64; 2]; 2], tie: f64) -> Candidate {
    let half = 0.5 * (h[0][0] + h[1][1]);
    let d = 0.5 * (h[0][0] - h[1][1]);
    let disc = d * d + h[0][1] * h[1][0];
    if disc < 0.0 {
        let theta = Complex64::new(half, (-disc).sqrt());
        let res = ritz_residual(h, g, theta);
        let radius = theta.norm();
        return Candidate {
            lambda: theta,
            radius,
            rel_res: relative(res, radius),
        };
    }
    let s = disc.sqrt();
    // The larger-modulus root without cancellation, the other from the determinant.
    let big = if half >= 0.0 { half + s } else { half - s };
    let det = h[0][0] * h[1][1] - h[0][1] * h[1][0];
    let small = if big != 0.0 { det / big } else { 0.0 };
    let tb = Complex64::new(big, 0.0);
    let res_big = ritz_residual(h, g, tb);
    let radius = big.abs();
    let tie = tie.clamp(0.0, 0.5);
    if small.abs() >= (1.0 - tie) * radius && small < big && radius > 0.0 {
        let res_small = ritz_residual(h, g, Complex64::new(small, 0.0));
        Candidate {
            lambda: Complex64::new(small, 0.0),
            radius,
            rel_res: relative(res_big.max(res_small), radius),
        }
    } else {
        Candidate {
            lambda: tb,
            radius,
            rel_res: relative(res_big, radius),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const Z: [[f64; 2]; 2] = [[0.0; 2]; 2];

    #[test]
    fn rotation_gives_the_complex_pair() {
        // [[a, -b], [b, a]] has eigenvalues a ± ib.
        let c = dominant_ritz([[-3.0, -4.0], [4.0, -3.0]], Z, 0.01);
        assert!((c.lambda - Complex64::new(-3.0, 4.0)).norm() < 1e-14);
        assert!((c.radius - 5.0).abs() < 1e-14);
        assert_eq!(c.rel_res, 0.0);
    }

    #[test]
    fn real_roots_ordered_by_modulus() {
        let c = dominant_ritz([[-10.0, 1.0], [0.0, 2.0]], Z, 0.01);
        assert_eq!(c.lambda, Complex64::new(-10.0, 0.0));
        let c = dominant_ritz([[10.0, 0.0], [3.0, -2.0]], Z, 0.01);
        assert_eq!(c.lambda, Complex64::new(10.0, 0.0));
    }

    #[test]
    fn plus_minus_tie_prefers_the_left_half_plane() {
        let c = dominant_ritz([[0.0, 1.0], [100.0, 0.0]], Z, 0.01);
        assert!((c.lambda.re + 10.0).abs() < 1e-12 && c.lambda.im == 0.0);
        assert!((c.radius - 10.0).abs() < 1e-12);
    }

    #[test]
    fn residual_of_a_ritz_vector() {
        // H = diag(2, 1); G says the second basis vector has residual 3.
        let g = [[0.0, 0.0], [0.0, 9.0]];
        let c = dominant_ritz([[2.0, 0.0], [0.0, 1.0]], g, 0.01);
        assert_eq!(c.rel_res, 0.0); // Ritz vector e1 has no residual
        let c = dominant_ritz([[1.0, 0.0], [0.0, 2.0]], g, 0.01);
        assert!((c.rel_res - 1.5).abs() < 1e-14); // Ritz vector e2: 3 / 2
    }

    #[test]
    fn relative_edges() {
        assert_eq!(relative(0.0, 0.0), 0.0);
        assert_eq!(relative(1.0, 0.0), f64::INFINITY);
        assert_eq!(relative(1.0, 4.0), 0.25);
    }
}
