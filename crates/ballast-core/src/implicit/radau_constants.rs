//! The constants of the Radau IIA 5 implementation, computed from the
//! tableau: the transformation `T` with `T^{-1} A^{-1} T = diag(gamma,
//! [[alpha, -beta], [beta, alpha]])`, the embedded error weights and the
//! collocation polynomial's Vandermonde inverse (Hairer and Wanner II,
//! IV.8, eq. (8.15)–(8.20)).

use num_complex::Complex64;

/// 3 × 3 matrices, row-major.
pub type M3 = [[f64; 3]; 3];

/// Everything the Radau IIA 5 step needs besides the tableau.
#[derive(Clone, Debug)]
pub struct RadauConstants {
    /// Nodes.
    pub c: [f64; 3],
    /// Columns: the real eigenvector, then real and imaginary parts of a complex one.
    pub t: M3,
    /// `T^{-1}`.
    pub tinv: M3,
    /// The real eigenvalue of `A^{-1}`.
    pub gamma: f64,
    /// Real part of the complex pair of `A^{-1}`.
    pub alpha: f64,
    /// `Lambda[2][1]` of the transformed `A^{-1}` (imaginary part, with sign).
    pub beta: f64,
    /// Error weights: `err = (gamma/h I - J)^{-1} (f_n + sum_l dd_l Z_l / h)`.
    pub dd: [f64; 3],
    /// Inverse of `V[l][k] = c_l^(k+1)`: collocation polynomial coefficients from `Z`.
    pub vinv: M3,
}

/// Inverse of a 3 × 3 matrix by the adjugate; `None` if singular.
pub fn inv3(m: &M3) -> Option<M3> {
    let cof =
        |r0: usize, r1: usize, c0: usize, c1: usize| m[r0][c0] * m[r1][c1] - m[r0][c1] * m[r1][c0];
    let adj = [
        [cof(1, 2, 1, 2), -cof(0, 2, 1, 2), cof(0, 1, 1, 2)],
        [-cof(1, 2, 0, 2), cof(0, 2, 0, 2), -cof(0, 1, 0, 2)],
        [cof(1, 2, 0, 1), -cof(0, 2, 0, 1), cof(0, 1, 0, 1)],
    ];
    let det = m[0][0] * adj[0][0] + m[0][1] * adj[1][0] + m[0][2] * adj[2][0];
    if det == 0.0 || !det.is_finite() {
        return None;
    }
    let mut r = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            r[i][j] = adj[i][j] / det;
        }
    }
    Some(r)
}

/// `a b`.
pub fn mul3(a: &M3, b: &M3) -> M3 {
    let mut r = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            r[i][j] = (0..3).map(|k| a[i][k] * b[k][j]).sum();
        }
    }
    r
}

/// The cross product of two rows with the largest result (a null vector
/// of a rank-2 matrix), in complex arithmetic.
fn null_vector(rows: [[Complex64; 3]; 3]) -> [Complex64; 3] {
    let cross = |a: &[Complex64; 3], b: &[Complex64; 3]| {
        [
            a[1] * b[2] - a[2] * b[1],
            a[2] * b[0] - a[0] * b[2],
            a[0] * b[1] - a[1] * b[0],
        ]
    };
    let cands = [
        cross(&rows[0], &rows[1]),
        cross(&rows[0], &rows[2]),
        cross(&rows[1], &rows[2]),
    ];
    let size = |v: &[Complex64; 3]| v.iter().map(|x| x.norm_sqr()).sum::<f64>();
    let mut best = cands[0];
    for c in &cands[1..] {
        if size(c) > size(&best) {
            best = *c;
        }
    }
    best
}

impl RadauConstants {
    /// Computes the constants from `A`, `b`, `c` of the three-stage
    /// Radau IIA method. `None` if `A` is singular or has no complex pair.
    pub fn new(a: &M3, b: &[f64; 3], c: &[f64; 3]) -> Option<Self> {
        let ainv = inv3(a)?;
        // Characteristic polynomial lambda^3 - p1 lambda^2 + p2 lambda - p3.
        let p1 = ainv[0][0] + ainv[1][1] + ainv[2][2];
        let minor = |i: usize, j: usize| ainv[i][i] * ainv[j][j] - ainv[i][j] * ainv[j][i];
        let p2 = minor(0, 1) + minor(0, 2) + minor(1, 2);
        let p3 = 1.0 / {
            let m = a;
            m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1])
                - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0])
                + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0])
        };
        // The real root by Newton from above (the cubic is increasing there).
        let mut g = p1.abs() + p2.abs().sqrt() + 1.0;
        for _ in 0..100 {
            let f = ((g - p1) * g + p2) * g - p3;
            let df = (3.0 * g - 2.0 * p1) * g + p2;
            let step = f / df;
            g -= step;
            if step.abs() <= 1e-16 * g.abs() {
                break;
            }
        }
        let alpha0 = (p1 - g) / 2.0;
        let beta2 = p3 / g - alpha0 * alpha0;
        if beta2 <= 0.0 {
            return None;
        }
        let lam = Complex64::new(alpha0, beta2.sqrt());
        let rows = |shift: Complex64| {
            let mut r = [[Complex64::new(0.0, 0.0); 3]; 3];
            for i in 0..3 {
                for j in 0..3 {
                    r[i][j] =
                        Complex64::new(ainv[i][j], 0.0) - if i == j { shift } else { 0.0.into() };
                }
            }
            r
        };
        let v0 = null_vector(rows(Complex64::new(g, 0.0)));
        let w = null_vector(rows(lam));
        let mut t = [[0.0; 3]; 3];
        for i in 0..3 {
            t[i][0] = v0[i].re;
            t[i][1] = w[i].re;
            t[i][2] = w[i].im;
        }
        let tinv = inv3(&t)?;
        let lambda = mul3(&mul3(&tinv, &ainv), &t);
        let (alpha, beta) = (lambda[1][1], lambda[2][1]);
        // Embedded weights: gamma0 = 1/gamma at c = 0 and bhat at c_j with
        // order 3: sum bhat_j c_j^(k-1) = 1/k - gamma0 [k = 1], k = 1..3.
        let g0 = 1.0 / g;
        let v = [[1.0; 3], *c, [c[0] * c[0], c[1] * c[1], c[2] * c[2]]];
        let vi = inv3(&v)?;
        let rhs = [1.0 - g0, 0.5, 1.0 / 3.0];
        let bhat: Vec<f64> = (0..3)
            .map(|j| (0..3).map(|k| vi[j][k] * rhs[k]).sum())
            .collect();
        let mut dd = [0.0; 3];
        for l in 0..3 {
            dd[l] = g * (0..3).map(|j| (bhat[j] - b[j]) * ainv[j][l]).sum::<f64>();
        }
        let vand = [
            [c[0], c[0] * c[0], c[0].powi(3)],
            [c[1], c[1] * c[1], c[1].powi(3)],
            [c[2], c[2] * c[2], c[2].powi(3)],
        ];
        Some(Self {
            c: *c,
            t,
            tinv,
            gamma: g,
            alpha,
            beta,
            dd,
            vinv: inv3(&vand)?,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::implicit::tableau::RADAU_IIA_5;

    fn consts() -> (RadauConstants, M3) {
        let t = &RADAU_IIA_5;
        let mut a = [[0.0; 3]; 3];
        for i in 0..3 {
            for j in 0..3 {
                a[i][j] = t.a[i][j];
            }
        }
        let b = [t.b[0], t.b[1], t.b[2]];
        let c = [t.c[0], t.c[1], t.c[2]];
        (RadauConstants::new(&a, &b, &c).unwrap(), a)
    }

    #[test]
    fn transformation_block_diagonalises_a_inverse() {
        let (k, a) = consts();
        let l = mul3(&mul3(&k.tinv, &inv3(&a).unwrap()), &k.t);
        let want = [
            [k.gamma, 0.0, 0.0],
            [0.0, k.alpha, -k.beta],
            [0.0, k.beta, k.alpha],
        ];
        for i in 0..3 {
            for j in 0..3 {
                assert!(
                    (l[i][j] - want[i][j]).abs() < 1e-12,
                    "Lambda[{i}][{j}] = {}",
                    l[i][j]
                );
            }
        }
        // Eigenvalues of A^{-1}, from memory of Hairer and Wanner II, IV.8
        // (the constants of their Radau code): 3.6378342527444957 and
        // 2.6810828736277521 ± 3.0504301992474106 i.
        assert!((k.gamma - 3.6378342527444957).abs() < 1e-13);
        assert!((k.alpha - 2.6810828736277521).abs() < 1e-13);
        assert!((k.beta.abs() - 3.0504301992474106).abs() < 1e-13);
    }

    #[test]
    fn error_weights_match_the_closed_form() {
        // From memory of Hairer and Wanner II, IV.8, eq. (8.19): the error
        // weights times gamma are -(13 + 7 sqrt6)/3, (-13 + 7 sqrt6)/3, -1/3.
        let (k, _) = consts();
        let s6 = 6f64.sqrt();
        let want = [
            -(13.0 + 7.0 * s6) / 3.0,
            (-13.0 + 7.0 * s6) / 3.0,
            -1.0 / 3.0,
        ];
        for l in 0..3 {
            assert!((k.dd[l] - want[l]).abs() < 1e-12, "dd[{l}] = {}", k.dd[l]);
        }
    }
}
