//! Coefficients of the implicit one-step methods, from their published
//! values, as data.
//!
//! Two shapes are stored:
//!
//! - [`ImplicitTableau`]: an implicit Runge–Kutta method (diagonally
//!   implicit or fully implicit) as a full Butcher tableau `(c, A, b)` with
//!   `A` given as `s` rows of length `s`, and an optional embedded weight
//!   vector `bhat`;
//! - [`RosenbrockTableau`]: a Rosenbrock method in the form of Hairer and
//!   Wanner II, IV.7, eq. (7.4):
//!
//!   ```text
//!   (I - h gamma J) k_i = h f(t + alpha_i h, y_n + sum_{j<i} alpha_ij k_j)
//!                         + h J sum_{j<i} gamma_ij k_j + gamma_i h^2 f_t,
//!   y_{n+1} = y_n + sum_i b_i k_i,     yhat_{n+1} = y_n + sum_i bhat_i k_i,
//!   ```
//!
//!   with `alpha_i = sum_j alpha_ij` and `gamma_i = gamma + sum_j gamma_ij`.
//!
//! Irrational entries (`sqrt(2)`, `sqrt(3)`, `sqrt(6)`) are written as the
//! nearest `f64`; the unit tests below recompute them from their closed
//! forms and check the order conditions, so a wrong digit fails a test.
//!
//! Scheme-specific data (error weights, dense output, transformation
//! matrices) can be added as further fields of these structs or as
//! companion statics next to each method.

use crate::method::Method;

/// How the implicit stages of an [`ImplicitTableau`] couple.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ImplicitKind {
    /// Diagonally implicit: `a_ij = 0` for `j > i`, the same diagonal
    /// entry `gamma` in every implicit stage. With `explicit_first_stage`
    /// the first row of `A` is zero (an ESDIRK; the first stage is
    /// `f(t_n, y_n)`).
    Dirk {
        /// Whether the first stage is explicit (`a_11 = 0`).
        explicit_first_stage: bool,
    },
    /// Fully implicit: all stages are solved together (collocation
    /// methods such as Radau IIA).
    Full,
}

/// The coefficients of an implicit Runge–Kutta method.
#[derive(Debug)]
pub struct ImplicitTableau {
    /// The method these coefficients define.
    pub method: Method,
    /// Structure of `A`.
    pub kind: ImplicitKind,
    /// Nodes `c_i = sum_j a_ij`.
    pub c: &'static [f64],
    /// The full `s x s` matrix `A`, row by row (every row has `s` entries).
    pub a: &'static [&'static [f64]],
    /// Weights `b_i` of the propagated solution.
    pub b: &'static [f64],
    /// Weights `bhat_i` of the embedded solution (`None`: the method has
    /// no embedded formula in tableau form; its scheme estimates the error
    /// another way).
    pub bhat: Option<&'static [f64]>,
    /// Diagonal entry of `A` for diagonally implicit methods (0 for fully
    /// implicit methods).
    pub gamma: f64,
    /// Classical order of the propagated solution.
    pub order: usize,
    /// Classical order of the embedded solution (0 when `bhat` is `None`).
    pub embedded_order: usize,
    /// Stiffly accurate: the last row of `A` equals `b` (so `y_{n+1}` is
    /// the last stage value).
    pub stiffly_accurate: bool,
}

impl ImplicitTableau {
    /// Number of stages.
    pub fn stages(&self) -> usize {
        self.b.len()
    }
}

/// Backward Euler: `y_{n+1} = y_n + h f(t_{n+1}, y_{n+1})`. Order 1,
/// L-stable (Hairer and Wanner II, IV.3). One stage, `c = 1`, `A = [1]`.
pub static BACKWARD_EULER: ImplicitTableau = ImplicitTableau {
    method: Method::BackwardEuler,
    kind: ImplicitKind::Dirk {
        explicit_first_stage: false,
    },
    c: &[1.0],
    a: &[&[1.0]],
    b: &[1.0],
    bhat: None,
    gamma: 1.0,
    order: 1,
    embedded_order: 0,
    stiffly_accurate: true,
};

/// The trapezoidal rule `y_{n+1} = y_n + h/2 (f_n + f_{n+1})` as the
/// two-stage Lobatto IIIA method: `c = (0, 1)`, `A = [[0, 0], [1/2, 1/2]]`,
/// `b = (1/2, 1/2)` (Hairer and Wanner II, IV.5, Table 5.7 with `s = 2`).
/// Order 2, A-stable, not L-stable (`R(-inf) = -1`).
pub static TRAPEZOID: ImplicitTableau = ImplicitTableau {
    method: Method::Trapezoid,
    kind: ImplicitKind::Dirk {
        explicit_first_stage: true,
    },
    c: &[0.0, 1.0],
    a: &[&[0.0, 0.0], &[0.5, 0.5]],
    b: &[0.5, 0.5],
    bhat: None,
    gamma: 0.5,
    order: 2,
    embedded_order: 0,
    stiffly_accurate: true,
};

/// TR-BDF2 written as a three-stage ESDIRK with `gamma = 2 - sqrt(2)`
/// (Bank et al., IEEE Trans. CAD 4 (1985); Hosea and Shampine, Appl. Numer.
/// Math. 20 (1996) 21–37, eq. (3) ff.): a trapezoidal step to
/// `t_n + gamma h`, then BDF2 through `t_n, t_n + gamma h, t_{n+1}`.
///
/// With `d = gamma/2 = 1 - sqrt(2)/2` and `w = sqrt(2)/4`:
/// `c = (0, gamma, 1)`, `A = [[0,0,0], [d, d, 0], [w, w, d]]`, `b = (w, w, d)`
/// (stiffly accurate, order 2, L-stable); the embedded third-order weights
/// of Hosea and Shampine are `bhat = ((1 - w)/3, (3w + 1)/3, d/3)`.
pub static TR_BDF2: ImplicitTableau = ImplicitTableau {
    method: Method::TrBdf2,
    kind: ImplicitKind::Dirk {
        explicit_first_stage: true,
    },
    c: &[0.0, 0.5857864376269049, 1.0],
    a: &[
        &[0.0, 0.0, 0.0],
        &[0.2928932188134524, 0.2928932188134524, 0.0],
        &[0.3535533905932738, 0.3535533905932738, 0.2928932188134524],
    ],
    b: &[0.3535533905932738, 0.3535533905932738, 0.2928932188134524],
    bhat: Some(&[0.21548220313557542, 0.6868867239266071, 0.09763107293781748]),
    gamma: 0.2928932188134524,
    order: 2,
    embedded_order: 3,
    stiffly_accurate: true,
};

/// `ESDIRK4(3)6L[2]SA`: six stages, order 4, embedded order 3, L-stable,
/// stiffly accurate, `gamma = 1/4`, stage order 2.
///
/// From memory of Kennedy and Carpenter: these are the coefficients of the
/// implicit part of their `ARK4(3)6L[2]SA` (Appl. Numer. Math. 44 (2003) 139–181),
/// which the review NASA/TM-2016-219173 lists as
/// `ESDIRK4(3)6L[2]SA`. `c = (0, 1/2, 83/250, 31/50, 17/20, 1)`. Confirmed by
/// the tests below: the order-4 conditions for `b`, the order-3 conditions
/// for `bhat`, stiff accuracy and `R(-inf) = 0`.
pub static ESDIRK_43: ImplicitTableau = ImplicitTableau {
    method: Method::Esdirk43,
    kind: ImplicitKind::Dirk {
        explicit_first_stage: true,
    },
    c: &[0.0, 0.5, 83.0 / 250.0, 31.0 / 50.0, 17.0 / 20.0, 1.0],
    a: &[
        &[0.0, 0.0, 0.0, 0.0, 0.0, 0.0],
        &[0.25, 0.25, 0.0, 0.0, 0.0, 0.0],
        &[8611.0 / 62500.0, -1743.0 / 31250.0, 0.25, 0.0, 0.0, 0.0],
        &[
            5012029.0 / 34652500.0,
            -654441.0 / 2922500.0,
            174375.0 / 388108.0,
            0.25,
            0.0,
            0.0,
        ],
        &[
            15267082809.0 / 155376265600.0,
            -71443401.0 / 120774400.0,
            730878875.0 / 902184768.0,
            2285395.0 / 8070912.0,
            0.25,
            0.0,
        ],
        &[
            82889.0 / 524892.0,
            0.0,
            15625.0 / 83664.0,
            69875.0 / 102672.0,
            -2260.0 / 8211.0,
            0.25,
        ],
    ],
    b: &[
        82889.0 / 524892.0,
        0.0,
        15625.0 / 83664.0,
        69875.0 / 102672.0,
        -2260.0 / 8211.0,
        0.25,
    ],
    bhat: Some(&[
        4586570599.0 / 29645900160.0,
        0.0,
        178811875.0 / 945068544.0,
        814220225.0 / 1159782912.0,
        -3700637.0 / 11593932.0,
        61727.0 / 225920.0,
    ]),
    gamma: 0.25,
    order: 4,
    embedded_order: 3,
    stiffly_accurate: true,
};

/// Radau IIA with three stages, order 5, L-stable, stiffly accurate
/// (Hairer and Wanner II, IV.5, Table 5.6):
///
/// ```text
/// c = ((4 - sqrt6)/10, (4 + sqrt6)/10, 1)
/// A = [ (88 - 7 sqrt6)/360      (296 - 169 sqrt6)/1800  (-2 + 3 sqrt6)/225 ]
///     [ (296 + 169 sqrt6)/1800  (88 + 7 sqrt6)/360      (-2 - 3 sqrt6)/225 ]
///     [ (16 - sqrt6)/36         (16 + sqrt6)/36         1/9                ]
/// b = last row of A
/// ```
///
/// No embedded weights in tableau form: the error estimate of Hairer and
/// Wanner (IV.8, eq. (8.19)–(8.20)) uses an extra explicit stage.
pub static RADAU_IIA_5: ImplicitTableau = ImplicitTableau {
    method: Method::RadauIIA5,
    kind: ImplicitKind::Full,
    c: &[0.15505102572168222, 0.6449489742783178, 1.0],
    a: &[
        &[
            0.19681547722366044,
            -0.06553542585019838,
            0.02377097434822015,
        ],
        &[
            0.3944243147390873,
            0.29207341166522843,
            -0.04154875212599792,
        ],
        &[0.37640306270046725, 0.5124858261884216, 1.0 / 9.0],
    ],
    b: &[0.37640306270046725, 0.5124858261884216, 1.0 / 9.0],
    bhat: None,
    gamma: 0.0,
    order: 5,
    embedded_order: 0,
    stiffly_accurate: true,
};

/// The coefficients of a Rosenbrock method in the form of Hairer and
/// Wanner II, IV.7, eq. (7.4) (see the module documentation).
#[derive(Debug)]
pub struct RosenbrockTableau {
    /// The method these coefficients define.
    pub method: Method,
    /// The diagonal `gamma = gamma_ii`.
    pub gamma: f64,
    /// Strictly lower-triangular `alpha_ij`: row `i` has `i` entries.
    pub alpha: &'static [&'static [f64]],
    /// Strictly lower-triangular `gamma_ij` (`j < i`): row `i` has `i` entries.
    pub gamma_ij: &'static [&'static [f64]],
    /// Weights `b_i` of the propagated solution.
    pub b: &'static [f64],
    /// Weights `bhat_i` of the embedded solution.
    pub bhat: Option<&'static [f64]>,
    /// `alpha_i = sum_j alpha_ij` (the stage times).
    pub alpha_sum: &'static [f64],
    /// `gamma_i = gamma + sum_j gamma_ij` (the `h^2 f_t` weights).
    pub gamma_sum: &'static [f64],
    /// Classical order of the propagated solution.
    pub order: usize,
    /// Classical order of the embedded solution.
    pub embedded_order: usize,
    /// Whether the error estimate must be filtered through
    /// `(I - h gamma J)^{-1}`: true when the embedded solution does not damp
    /// stiff components (its stability function does not vanish at infinity).
    pub filter_estimate: bool,
}

impl RosenbrockTableau {
    /// Number of stages.
    pub fn stages(&self) -> usize {
        self.b.len()
    }
}

/// ROS3P: three stages, order 3, embedded order 2, A-stable, designed to
/// keep order 3 on parabolic problems (Lang and Verwer, BIT 41 (2001)
/// 731–738). `gamma = 1/2 + sqrt(3)/6`;
/// `alpha_21 = alpha_31 = 1`, `alpha_32 = 0`;
/// `gamma_21 = -1`, `gamma_31 = -gamma`, `gamma_32 = -(1/2 + sqrt(3)/3)`;
/// `b = (2/3, 0, 1/3)`, `bhat = (1/3, 1/3, 1/3)`.
///
/// From memory of the paper's coefficients as they appear in the
/// transformed form `(a_ij, c_ij, m_i)` of Hairer and Wanner II, eq.
/// (7.5)–(7.6), converted back to this form; confirmed by the tests below
/// (order 3 conditions of Hairer and Wanner II, Table 7.1 for `b`, order 2
/// for `bhat`).
pub static ROS3P: RosenbrockTableau = RosenbrockTableau {
    method: Method::Ros3p,
    gamma: 0.7886751345948129,
    alpha: &[&[], &[1.0], &[1.0, 0.0]],
    gamma_ij: &[&[], &[-1.0], &[-0.7886751345948129, -1.0773502691896257]],
    b: &[2.0 / 3.0, 0.0, 1.0 / 3.0],
    bhat: Some(&[1.0 / 3.0, 1.0 / 3.0, 1.0 / 3.0]),
    alpha_sum: &[0.0, 1.0, 1.0],
    gamma_sum: &[
        0.7886751345948129,
        -0.21132486540518713,
        -1.0773502691896257,
    ],
    order: 3,
    embedded_order: 2,
    filter_estimate: true,
};

/// A four-stage Rosenbrock method of order 3 with an embedded order-2
/// solution, L-stable and stiffly accurate, with an L-stable embedded
/// solution; called RODAS3 by its authors (Sandu, Verwer, Blom, Spee,
/// Carmichael and Potra, Atmospheric Environment 31 (1997) 3459–3472).
///
/// The paper gives the transformed form of Hairer and Wanner II, eq.
/// (7.5)–(7.6), with `gamma = 1/2`: `a_31 = a_41 = 2`, `a_43 = 1` (others
/// 0); `c_21 = 4`, `c_31 = 1`, `c_32 = -1`, `c_41 = 1`, `c_42 = -1`,
/// `c_43 = -8/3`; `m = (2, 0, 1, 1)`, error weights `(0, 0, 0, 1)`
/// (from memory of the paper). Converted back to this form through
/// `Gamma^{-1} = I / gamma - C` (`C` strictly lower), `alpha = A Gamma`,
/// `b = m Gamma`, exactly in rationals: `gamma_ij` rows `(1)`,
/// `(-1/4, -1/4)`, `(1/12, 1/12, -2/3)`; `alpha_ij` rows `(0)`, `(1, 0)`,
/// `(3/4, -1/4, 1/2)`; `b = (5/6, -1/6, -1/6, 1/2)` (the last row of
/// `beta = alpha + Gamma`: stiffly accurate) and `bhat = (3/4, -1/4, 1/2, 0)`
/// (the last row of `alpha`). The tests below confirm the order conditions
/// (order 3 for `b`, exactly 2 for `bhat`) and
/// `R(z) = 8 (z^3 - 6z + 6) / (3 (z - 2)^4)`, which vanishes at infinity.
///
/// Unlike ROS3P's, its estimate does not vanish on linear problems: on
/// `y' = lambda y` it is `(R(z) - Rhat(z)) y_n = 2 z^3 / (3 (z - 2)^4) y_n`,
/// of order `z^3` for small `z` and damped for large `|z|`, so it needs no filter.
pub static ROSENBROCK_32: RosenbrockTableau = RosenbrockTableau {
    method: Method::Rosenbrock32,
    gamma: 0.5,
    alpha: &[&[], &[0.0], &[1.0, 0.0], &[0.75, -0.25, 0.5]],
    gamma_ij: &[
        &[],
        &[1.0],
        &[-0.25, -0.25],
        &[1.0 / 12.0, 1.0 / 12.0, -2.0 / 3.0],
    ],
    b: &[5.0 / 6.0, -1.0 / 6.0, -1.0 / 6.0, 0.5],
    bhat: Some(&[0.75, -0.25, 0.5, 0.0]),
    alpha_sum: &[0.0, 0.0, 1.0, 1.0],
    gamma_sum: &[0.5, 1.5, 0.0, 0.0],
    order: 3,
    embedded_order: 2,
    filter_estimate: false,
};

/// Every implicit Runge–Kutta tableau in this module.
pub static IMPLICIT_TABLEAUX: [&ImplicitTableau; 5] = [
    &BACKWARD_EULER,
    &TRAPEZOID,
    &TR_BDF2,
    &ESDIRK_43,
    &RADAU_IIA_5,
];

#[cfg(test)]
mod tests {
    use super::*;

    const TOL: f64 = 1e-14;

    fn dot(u: &[f64], v: &[f64]) -> f64 {
        u.iter().zip(v).map(|(x, y)| x * y).sum()
    }

    fn mat_vec(a: &[&[f64]], v: &[f64]) -> Vec<f64> {
        a.iter().map(|row| dot(row, v)).collect()
    }

    /// Residuals of the eight order conditions up to order 4 (Butcher 2016,
    /// section 31; Hairer, Norsett and Wanner I, II.2, Table 2.2), in order
    /// of the trees: order 1, 2, 3, 3, 4, 4, 4, 4.
    fn rk_residuals(a: &[&[f64]], b: &[f64], c: &[f64]) -> [f64; 8] {
        let s = b.len();
        let ones = vec![1.0; s];
        let c2: Vec<f64> = c.iter().map(|x| x * x).collect();
        let c3: Vec<f64> = c.iter().map(|x| x * x * x).collect();
        let ac = mat_vec(a, c);
        let ac2 = mat_vec(a, &c2);
        let aac = mat_vec(a, &ac);
        let cac: Vec<f64> = c.iter().zip(&ac).map(|(x, y)| x * y).collect();
        [
            dot(b, &ones) - 1.0,
            dot(b, c) - 0.5,
            dot(b, &c2) - 1.0 / 3.0,
            dot(b, &ac) - 1.0 / 6.0,
            dot(b, &c3) - 0.25,
            dot(b, &cac) - 0.125,
            dot(b, &ac2) - 1.0 / 12.0,
            dot(b, &aac) - 1.0 / 24.0,
        ]
    }

    /// The number of conditions satisfied for each order `p`: 1, 2, 4, 8.
    fn conditions_up_to(p: usize) -> usize {
        [0, 1, 2, 4, 8][p]
    }

    fn assert_order(name: &str, a: &[&[f64]], b: &[f64], c: &[f64], p: usize) {
        let r = rk_residuals(a, b, c);
        for (k, res) in r.iter().take(conditions_up_to(p)).enumerate() {
            assert!(
                res.abs() < TOL,
                "{name}: order condition {k} residual {res}"
            );
        }
        if p < 4 {
            // The next order must fail, or the stated order is too low.
            let next = &r[conditions_up_to(p)..conditions_up_to(p + 1)];
            assert!(
                next.iter().any(|x| x.abs() > 1e-6),
                "{name}: order higher than {p}"
            );
        }
    }

    fn check_tableau_shape(t: &ImplicitTableau) {
        let s = t.stages();
        assert_eq!(t.a.len(), s);
        assert_eq!(t.c.len(), s);
        for (i, row) in t.a.iter().enumerate() {
            assert_eq!(row.len(), s);
            // Row sums are the nodes.
            assert!(
                (row.iter().sum::<f64>() - t.c[i]).abs() < TOL,
                "{:?} row {i}",
                t.method
            );
            if let ImplicitKind::Dirk {
                explicit_first_stage,
            } = t.kind
            {
                for (j, &x) in row.iter().enumerate().skip(i + 1) {
                    assert_eq!(x, 0.0, "{:?}: a[{i}][{j}] above diagonal", t.method);
                }
                let diag = if i == 0 && explicit_first_stage {
                    0.0
                } else {
                    t.gamma
                };
                assert_eq!(row[i], diag, "{:?}: diagonal at {i}", t.method);
            }
        }
        if t.stiffly_accurate {
            assert_eq!(t.a[s - 1], t.b, "{:?}: not stiffly accurate", t.method);
        }
    }

    /// `R(z) = 1 + z b^T (I - zA)^{-1} 1` for real `z`, by Gaussian elimination.
    fn stability_real(t: &ImplicitTableau, z: f64) -> f64 {
        let s = t.stages();
        let mut m: Vec<Vec<f64>> = (0..s)
            .map(|i| {
                let mut row: Vec<f64> = (0..s)
                    .map(|j| if i == j { 1.0 } else { 0.0 } - z * t.a[i][j])
                    .collect();
                row.push(1.0);
                row
            })
            .collect();
        for k in 0..s {
            let p = (k..s)
                .max_by(|&i, &j| m[i][k].abs().total_cmp(&m[j][k].abs()))
                .unwrap();
            m.swap(k, p);
            for i in k + 1..s {
                let f = m[i][k] / m[k][k];
                for j in k..=s {
                    m[i][j] -= f * m[k][j];
                }
            }
        }
        let mut x = vec![0.0; s];
        for k in (0..s).rev() {
            let sum: f64 = (k + 1..s).map(|j| m[k][j] * x[j]).sum();
            x[k] = (m[k][s] - sum) / m[k][k];
        }
        1.0 + z * dot(t.b, &x)
    }

    #[test]
    fn shapes_and_row_sums() {
        for t in IMPLICIT_TABLEAUX {
            check_tableau_shape(t);
            assert!(t.order >= 1);
            if let Some(bhat) = t.bhat {
                assert_eq!(bhat.len(), t.stages());
            }
        }
    }

    #[test]
    fn backward_euler_and_trapezoid_orders() {
        // Closed forms: backward Euler has order 1, the trapezoidal rule order 2.
        let t = &BACKWARD_EULER;
        assert_order("backward Euler", t.a, t.b, t.c, 1);
        let t = &TRAPEZOID;
        assert_order("trapezoid", t.a, t.b, t.c, 2);
    }

    #[test]
    fn tr_bdf2_coefficients_and_orders() {
        // Closed forms of Hosea and Shampine (1996): gamma = 2 - sqrt(2),
        // d = gamma/2, w = sqrt(2)/4.
        let g = 2.0 - 2f64.sqrt();
        let (d, w) = (g / 2.0, 2f64.sqrt() / 4.0);
        let t = &TR_BDF2;
        assert!((t.c[1] - g).abs() < TOL && (t.gamma - d).abs() < TOL);
        assert!((t.b[0] - w).abs() < TOL && (t.b[2] - d).abs() < TOL);
        let bhat = t.bhat.unwrap();
        let want = [(1.0 - w) / 3.0, (3.0 * w + 1.0) / 3.0, d / 3.0];
        for (x, y) in bhat.iter().zip(want) {
            assert!((x - y).abs() < TOL);
        }
        assert_order("TR-BDF2 b", t.a, t.b, t.c, 2);
        assert_order("TR-BDF2 bhat", t.a, bhat, t.c, 3);
    }

    #[test]
    fn esdirk43_orders() {
        // Kennedy and Carpenter: order 4 for b, 3 for bhat.
        let t = &ESDIRK_43;
        assert_order("ESDIRK4(3) b", t.a, t.b, t.c, 4);
        assert_order("ESDIRK4(3) bhat", t.a, t.bhat.unwrap(), t.c, 3);
        // Stage order 2 (the "[2]" in the name): sum_j a_ij c_j = c_i^2/2 for i >= 2.
        let ac = mat_vec(t.a, t.c);
        for i in 1..t.stages() {
            assert!((ac[i] - t.c[i] * t.c[i] / 2.0).abs() < 1e-13, "stage {i}");
        }
    }

    #[test]
    fn radau_iia5_coefficients_and_order() {
        // Hairer and Wanner II, Table 5.6, closed forms with sqrt(6).
        let s6 = 6f64.sqrt();
        let want = [
            [
                (88.0 - 7.0 * s6) / 360.0,
                (296.0 - 169.0 * s6) / 1800.0,
                (-2.0 + 3.0 * s6) / 225.0,
            ],
            [
                (296.0 + 169.0 * s6) / 1800.0,
                (88.0 + 7.0 * s6) / 360.0,
                (-2.0 - 3.0 * s6) / 225.0,
            ],
            [(16.0 - s6) / 36.0, (16.0 + s6) / 36.0, 1.0 / 9.0],
        ];
        let t = &RADAU_IIA_5;
        for i in 0..3 {
            for j in 0..3 {
                assert!((t.a[i][j] - want[i][j]).abs() < TOL, "a[{i}][{j}]");
            }
        }
        assert!((t.c[0] - (4.0 - s6) / 10.0).abs() < TOL);
        assert!((t.c[1] - (4.0 + s6) / 10.0).abs() < TOL);
        // Order 5 by Butcher's simplifying assumptions (HW II, IV.5,
        // Theorem 5.1): B(5), C(3), D(2) give order 5.
        let (a, b, c) = (t.a, t.b, t.c);
        for k in 1..=5 {
            let bk: f64 = (0..3).map(|i| b[i] * c[i].powi(k - 1)).sum();
            assert!((bk - 1.0 / k as f64).abs() < TOL, "B({k})");
        }
        let b6: f64 = (0..3).map(|i| b[i] * c[i].powi(5)).sum();
        assert!(
            (b6 - 1.0 / 6.0).abs() > 1e-6,
            "B(6) must fail: order is 5, not 6"
        );
        for i in 0..3 {
            for k in 1..=3 {
                let ck: f64 = (0..3).map(|j| a[i][j] * c[j].powi(k - 1)).sum();
                assert!((ck - c[i].powi(k) / k as f64).abs() < TOL, "C({k}) row {i}");
            }
        }
        for j in 0..3 {
            for k in 1..=2 {
                let dk: f64 = (0..3).map(|i| b[i] * c[i].powi(k - 1) * a[i][j]).sum();
                let want = b[j] * (1.0 - c[j].powi(k)) / k as f64;
                assert!((dk - want).abs() < TOL, "D({k}) column {j}");
            }
        }
        assert_order("Radau IIA b", a, b, c, 4);
    }

    #[test]
    fn l_stable_methods_vanish_at_infinity() {
        // HW II, IV.3: L-stable methods have R(-inf) = 0; the trapezoid has -1.
        for t in [&BACKWARD_EULER, &TR_BDF2, &ESDIRK_43, &RADAU_IIA_5] {
            let r = stability_real(t, -1e9);
            assert!(r.abs() < 1e-6, "{:?}: R(-1e9) = {r}", t.method);
        }
        let r = stability_real(&TRAPEZOID, -1e9);
        assert!((r + 1.0).abs() < 1e-6, "trapezoid: R(-1e9) = {r}");
    }

    /// The residuals of the order conditions 1–4 of Hairer and Wanner II,
    /// IV.7, Table 7.1 (orders 1, 2, 3, 3) for the weights `b` of `t`,
    /// after checking the tabulated sums `alpha_i`, `gamma_i`.
    fn rosenbrock_residuals(t: &RosenbrockTableau, b: &[f64]) -> [f64; 4] {
        let (s, g) = (t.stages(), t.gamma);
        for i in 0..s {
            let ai: f64 = t.alpha[i].iter().sum();
            assert!((ai - t.alpha_sum[i]).abs() < TOL);
            let gi: f64 = g + t.gamma_ij[i].iter().sum::<f64>();
            assert!((gi - t.gamma_sum[i]).abs() < TOL);
        }
        // beta_ij = alpha_ij + gamma_ij (j < i); beta'_i = sum_j beta_ij.
        let beta = |i: usize, j: usize| t.alpha[i][j] + t.gamma_ij[i][j];
        let beta_p: Vec<f64> = (0..s).map(|i| (0..i).map(|j| beta(i, j)).sum()).collect();
        let bb: f64 = (0..s)
            .map(|i| (0..i).map(|k| b[i] * beta(i, k) * beta_p[k]).sum::<f64>())
            .sum();
        [
            b.iter().sum::<f64>() - 1.0,
            dot(b, &beta_p) - (0.5 - g),
            (0..s).map(|i| b[i] * t.alpha_sum[i].powi(2)).sum::<f64>() - 1.0 / 3.0,
            bb - (1.0 / 6.0 - g + g * g),
        ]
    }

    /// `b` has order 3, `bhat` order 2 and not 3.
    fn assert_rosenbrock_orders(t: &RosenbrockTableau) {
        for (k, r) in rosenbrock_residuals(t, t.b).iter().enumerate() {
            assert!(r.abs() < TOL, "{:?} b: condition {k}: {r}", t.method);
        }
        let rh = rosenbrock_residuals(t, t.bhat.unwrap());
        assert!(
            rh[0].abs() < TOL && rh[1].abs() < TOL,
            "{:?} bhat order 2: {rh:?}",
            t.method
        );
        assert!(
            rh[2].abs() > 1e-6 || rh[3].abs() > 1e-6,
            "{:?} bhat should be order 2 only",
            t.method
        );
    }

    #[test]
    fn ros3p_coefficients_and_orders() {
        // Lang and Verwer (2001): gamma = 1/2 + sqrt(3)/6.
        let t = &ROS3P;
        let s3 = 3f64.sqrt();
        let g = 0.5 + s3 / 6.0;
        assert!((t.gamma - g).abs() < TOL);
        assert!((t.gamma_ij[2][0] + g).abs() < TOL);
        assert!((t.gamma_ij[2][1] + 0.5 + s3 / 3.0).abs() < TOL);
        assert_rosenbrock_orders(t);
    }

    #[test]
    fn rosenbrock_32_orders_and_stiff_accuracy() {
        // Sandu et al. (1997): order 3(2), stiffly accurate, so b is the
        // last row of beta = alpha + Gamma and bhat the last row of alpha.
        let t = &ROSENBROCK_32;
        assert_rosenbrock_orders(t);
        let s = t.stages();
        for j in 0..s - 1 {
            let beta = t.alpha[s - 1][j] + t.gamma_ij[s - 1][j];
            assert!((t.b[j] - beta).abs() < TOL, "b_{j} vs beta_{j}");
            assert!((t.bhat.unwrap()[j] - t.alpha[s - 1][j]).abs() < TOL);
        }
        assert_eq!(t.b[s - 1], t.gamma);
    }
}
