//! The coefficients of the Nordsieck forms of Adams and BDF, computed from
//! their defining polynomials rather than typed in.
//!
//! The Nordsieck vector at `t_n` holds the polynomial `p_n(t_n + x h) =
//! sum_j z_j x^j` (Nordsieck 1962; Hairer, Norsett and Wanner I, III.6).
//! A step predicts `p_n^(0) = p_{n-1}` (the Pascal matrix) and corrects
//! `p_n = p_n^(0) + Lambda_q(x) v` with a vector `v` and a polynomial
//! `Lambda_q` of degree `q` whose coefficients are the vector `l`:
//!
//! * **Adams (order q):** `p_n(t_{n-1})` keeps its value and `p_n'` keeps
//!   its values at `t_{n-1}, ..., t_{n-q+1}`; the new slope is `f_n`. So
//!   `Lambda_q'(x) = prod_{j=1}^{q-1} (x + j) / (q-1)!` (normalised by
//!   `Lambda_q'(0) = 1`) and `Lambda_q(-1) = 0`; `v = h f_n - z^(0)_1`.
//!   This is the Adams–Moulton formula of order `q`.
//! * **BDF (order q):** `p_n` keeps its values at `t_{n-1}, ..., t_{n-q}`,
//!   so `Lambda_q(x) = prod_{j=1}^{q} (x + j) / q!` (normalised by
//!   `Lambda_q(0) = 1`); `v = y_n - y_n^(0)` and the BDF equation is
//!   `p_n'(t_n) = f(t_n, y_n)`.
//!
//! Changing the order keeps the same interpolation conditions: the monic
//! polynomial `M_k` of degree `k` vanishes on every condition the order
//! `k - 1` history keeps (BDF: `M_k(x) = prod_{j=0}^{k-1} (x + j)`; Adams:
//! `M_k(0) = 0` and `M_k'(x) = k prod_{j=0}^{k-2} (x + j)`), so
//! `z - z_q M_q` is the order-`q-1` history and `z + a M_{q+1}` the
//! order-`q+1` history with the new leading coefficient `a`.
//!
//! Local errors: with `Y = h^{q+1} y^{(q+1)}`, the corrected value has
//! `y_n - y(t_n) ~ C_q Y` and the correction `v ~ k_q Y`. Adams:
//! `C_q = -gamma*_q` (Adams–Moulton error constants, `gamma*_0 = 1`,
//! `sum_{j=0}^{m} gamma*_j / (m + 1 - j) = 0`, Hairer, Norsett and Wanner I,
//! III.1) and `k_q = 1` (the slope predictor extrapolates `f` with error
//! `Y / h`). BDF: `C_q = 1 / ((q + 1) l_1)` (the error constant
//! `beta_0 / (q + 1)`, Hairer and Wanner II, V.1 and Hairer, Norsett and
//! Wanner I, III.2) and `k_q = 1 + C_q` (the value predictor extrapolates
//! `y` with error `Y`). Unit tests below and the convergence tests confirm
//! these on polynomials.

/// Largest order of any family here (Adams, 12).
pub const MAX_ORDER: usize = 12;

/// Width of the coefficient tables (orders 0 to [`MAX_ORDER`] + 1).
const W: usize = MAX_ORDER + 2;

/// Which multistep family.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Family {
    /// Adams–Moulton corrector (PECE), orders 1 to 12.
    Adams,
    /// Backward differentiation formulas, orders 1 to 5.
    Bdf,
}

impl Family {
    /// The highest order the family supports here.
    pub fn max_order(self) -> usize {
        match self {
            Family::Adams => 12,
            Family::Bdf => 5,
        }
    }
}

/// The Nordsieck coefficients of one family for every order.
#[derive(Clone, Debug)]
pub struct Coefficients {
    family: Family,
    /// `l[q][j]`, `j = 0..=q`: the correction polynomial `Lambda_q`.
    l: [[f64; W]; W],
    /// `m[k][j]`, `j = 0..=k`: the monic order-change polynomial `M_k`.
    m: [[f64; W]; W],
    /// `c[q]`: error constant, `y_n - y(t_n) ~ c[q] h^{q+1} y^{(q+1)}`.
    c: [f64; W],
    /// `k[q]`: correction `~ k[q] h^{q+1} y^{(q+1)}`.
    k: [f64; W],
}

/// Multiplies the polynomial `p` of degree `deg` by `(x + a)`.
fn mul_linear(p: &mut [f64; W], deg: usize, a: f64) {
    for j in (0..=deg).rev() {
        p[j + 1] += p[j];
        p[j] *= a;
    }
}

/// `P(x) = int_{x0}^{x} p(u) du` for `p` of degree `deg`.
fn integrate_from(p: &[f64; W], deg: usize, x0: f64) -> [f64; W] {
    let mut out = [0.0; W];
    for j in 0..=deg {
        out[j + 1] = p[j] / (j + 1) as f64;
    }
    out[0] = -eval(&out, deg + 1, x0);
    out
}

/// Evaluates `p` of degree `deg` at `x` (Horner).
fn eval(p: &[f64; W], deg: usize, x: f64) -> f64 {
    p[..=deg].iter().rev().fold(0.0, |acc, &c| acc * x + c)
}

impl Coefficients {
    /// Computes every table for `family`.
    pub fn new(family: Family) -> Self {
        let mut s = Self {
            family,
            l: [[0.0; W]; W],
            m: [[0.0; W]; W],
            c: [0.0; W],
            k: [0.0; W],
        };
        let top = MAX_ORDER + 1;
        match family {
            Family::Adams => {
                // Adams–Moulton error constants gamma*_m (HNW I, III.1).
                let mut gs = [0.0; W];
                gs[0] = 1.0;
                for m in 1..W {
                    let sum: f64 = (0..m).map(|j| gs[j] / (m + 1 - j) as f64).sum();
                    gs[m] = -sum;
                }
                for q in 1..=top {
                    // Lambda_q' = prod_{j=1}^{q-1} (x + j) / (q-1)!.
                    let mut d = [0.0; W];
                    d[0] = 1.0;
                    for j in 1..q {
                        mul_linear(&mut d, j - 1, j as f64);
                    }
                    let d0 = d[0];
                    d.iter_mut().for_each(|v| *v /= d0);
                    s.l[q] = integrate_from(&d, q - 1, -1.0);
                    // M_q' = q prod_{j=0}^{q-2} (x + j), M_q(0) = 0.
                    let mut e = [0.0; W];
                    e[0] = q as f64;
                    for j in 0..q.saturating_sub(1) {
                        mul_linear(&mut e, j, j as f64);
                    }
                    s.m[q] = integrate_from(&e, q - 1, 0.0);
                    s.c[q] = -gs[q];
                    s.k[q] = 1.0;
                }
            }
            Family::Bdf => {
                for q in 1..=top {
                    let mut p = [0.0; W];
                    p[0] = 1.0;
                    for j in 1..=q {
                        mul_linear(&mut p, j - 1, j as f64);
                    }
                    let p0 = p[0];
                    p.iter_mut().for_each(|v| *v /= p0);
                    s.l[q] = p;
                    let mut e = [0.0; W];
                    e[0] = 1.0;
                    for j in 0..q {
                        mul_linear(&mut e, j, j as f64);
                    }
                    s.m[q] = e;
                    s.c[q] = 1.0 / ((q + 1) as f64 * s.l[q][1]);
                    s.k[q] = 1.0 + s.c[q];
                }
            }
        }
        s
    }

    /// The family.
    pub fn family(&self) -> Family {
        self.family
    }

    /// The correction vector `l` of order `q` (`q + 1` entries).
    pub fn l(&self, q: usize) -> &[f64] {
        &self.l[q][..=q]
    }

    /// The monic order-change polynomial `M_k` (`k + 1` coefficients).
    pub fn m(&self, k: usize) -> &[f64] {
        &self.m[k][..=k]
    }

    /// Error constant `C_q`: `y_n - y(t_n) ~ C_q h^{q+1} y^{(q+1)}`.
    pub fn error_constant(&self, q: usize) -> f64 {
        self.c[q]
    }

    /// `k_q`: the correction vector is `~ k_q h^{q+1} y^{(q+1)}`.
    pub fn correction_gain(&self, q: usize) -> f64 {
        self.k[q]
    }

    /// Factor turning `||correction||` into the order-`q` local error.
    pub fn current_error_factor(&self, q: usize) -> f64 {
        (self.c[q] / self.k[q]).abs()
    }

    /// Factor turning `||z_q||` into the order-`q-1` local error
    /// (`h^q y^{(q)} = q! z_q`).
    pub fn lower_error_factor(&self, q: usize) -> f64 {
        (self.c[q - 1] * factorial(q)).abs()
    }

    /// Factor turning `||v_n - r^{q+1} v_{n-1}||` (difference of successive
    /// corrections, `~ k_q h^{q+2} y^{(q+2)}`) into the order-`q+1` error.
    pub fn higher_error_factor(&self, q: usize) -> f64 {
        (self.c[q + 1] / self.k[q]).abs()
    }

    /// The new leading Nordsieck coefficient `h^{q+1} y^{(q+1)} / (q+1)!`
    /// per unit of the order-`q` correction.
    pub fn raise_scale(&self, q: usize) -> f64 {
        1.0 / (self.k[q] * factorial(q + 1))
    }
}

/// `q!` as a float.
pub fn factorial(q: usize) -> f64 {
    (1..=q).map(|j| j as f64).product()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn adams_low_orders_match_backward_euler_and_trapezoid() {
        // Order 1 is backward Euler, order 2 the trapezoidal rule
        // (Hairer, Norsett and Wanner I, III.1 and III.6).
        let c = Coefficients::new(Family::Adams);
        assert_eq!(c.l(1), &[1.0, 1.0]);
        let l2 = c.l(2);
        assert!((l2[0] - 0.5).abs() < 1e-15 && (l2[1] - 1.0).abs() < 1e-15);
        assert!((l2[2] - 0.5).abs() < 1e-15);
        assert!((c.error_constant(1) - 0.5).abs() < 1e-15);
        assert!((c.error_constant(2) - 1.0 / 12.0).abs() < 1e-15);
        // gamma*_4 = -19/720 (HNW I, III.1, table of Adams–Moulton constants).
        assert!((c.error_constant(4) - 19.0 / 720.0).abs() < 1e-15);
    }

    #[test]
    fn bdf_leading_coefficients_are_the_classical_beta0() {
        // beta_0 = 1/l_1: 1, 2/3, 6/11, 12/25, 60/137 (HW II, V.1, from memory).
        let c = Coefficients::new(Family::Bdf);
        let beta0 = [1.0, 2.0 / 3.0, 6.0 / 11.0, 12.0 / 25.0, 60.0 / 137.0];
        for (q, b) in (1..=5).zip(beta0) {
            assert!((1.0 / c.l(q)[1] - b).abs() < 1e-14, "q = {q}");
            assert!((c.l(q)[0] - 1.0).abs() < 1e-15);
        }
        // Error constant of BDF2: 2/9 (from memory of HNW I, III.2).
        assert!((c.error_constant(2) - 2.0 / 9.0).abs() < 1e-15);
    }

    #[test]
    fn order_change_polynomials_keep_the_history_conditions() {
        let a = Coefficients::new(Family::Adams);
        let b = Coefficients::new(Family::Bdf);
        for k in 2..=MAX_ORDER {
            let (ma, mb) = (a.m[k], b.m[k]);
            assert!((ma[k] - 1.0).abs() < 1e-12 && (mb[k] - 1.0).abs() < 1e-12);
            assert!(eval(&ma, k, 0.0).abs() < 1e-12);
            // Adams: M_k'(-j) = 0 for j = 0..=k-2.
            let mut d = [0.0; W];
            for j in 1..=k {
                d[j - 1] = ma[j] * j as f64;
            }
            for j in 0..=(k - 2) {
                assert!(eval(&d, k - 1, -(j as f64)).abs() < 1e-9, "k={k} j={j}");
            }
            // BDF: M_k(-j) = 0 for j = 0..k.
            for j in 0..k {
                assert!(eval(&mb, k, -(j as f64)).abs() < 1e-6, "k={k} j={j}");
            }
        }
    }
}
