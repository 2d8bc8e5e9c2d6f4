//! The one-dimensional Brusselator by the method of lines.

use ballast_core::{Jacobian, Structure, System};

/// The Brusselator reaction–diffusion system in one space dimension,
/// discretised by central differences on `N` interior points (method of
/// lines), HNW II, Section IV.1 (eq. (1.6')), from memory; the same system
/// with `N = 40` is in HNW I's experiments:
///
/// ```text
/// u_i' = 1 + u_i^2 v_i - 4 u_i + c (u_{i-1} - 2 u_i + u_{i+1})
/// v_i' = 3 u_i - u_i^2 v_i     + c (v_{i-1} - 2 v_i + v_{i+1})
/// c = alpha (N + 1)^2,  alpha = 1/50,  x_i = i / (N + 1),  i = 1..N,
/// u_0 = u_{N+1} = 1,  v_0 = v_{N+1} = 3,
/// u_i(0) = 1 + sin(2 pi x_i),  v_i(0) = 3,   t in [0, 10].
/// ```
///
/// The unknowns are interleaved, `(u_1, v_1, u_2, v_2, ..., u_N, v_N)`, so
/// the Jacobian is banded with two sub- and two super-diagonals
/// ([`Structure::Banded`]). Its stiffness grows like `4 c = 0.08 (N+1)^2`
/// (about 134 for `N = 40`, 2e4 for `N = 500`).
#[derive(Clone, Debug, PartialEq)]
pub struct Brusselator {
    n: usize,
    c: f64,
}

impl Brusselator {
    /// The diffusion coefficient `alpha = 1/50`.
    pub const ALPHA: f64 = 1.0 / 50.0;

    /// The system on `n >= 1` interior grid points (dimension `2 n`).
    ///
    /// # Panics
    /// If `n == 0`.
    pub fn new(n: usize) -> Self {
        assert!(n >= 1, "Brusselator: need at least one grid point");
        Self {
            n,
            c: Self::ALPHA * ((n + 1) * (n + 1)) as f64,
        }
    }

    /// Number of interior grid points `N`.
    pub fn points(&self) -> usize {
        self.n
    }

    /// Dimension `2 N`.
    pub fn dim(&self) -> usize {
        2 * self.n
    }

    /// The standard initial value, interleaved.
    pub fn initial_value(&self) -> Vec<f64> {
        let mut y = Vec::with_capacity(2 * self.n);
        for i in 1..=self.n {
            let x = i as f64 / (self.n + 1) as f64;
            y.push(1.0 + (2.0 * std::f64::consts::PI * x).sin());
            y.push(3.0);
        }
        y
    }
}

impl System for Brusselator {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        let (n, c) = (self.n, self.c);
        for i in 0..n {
            let (u, v) = (y[2 * i], y[2 * i + 1]);
            let (ul, vl) = if i > 0 {
                (y[2 * i - 2], y[2 * i - 1])
            } else {
                (1.0, 3.0)
            };
            let (ur, vr) = if i + 1 < n {
                (y[2 * i + 2], y[2 * i + 3])
            } else {
                (1.0, 3.0)
            };
            let uuv = u * u * v;
            dy[2 * i] = 1.0 + uuv - 4.0 * u + c * (ul - 2.0 * u + ur);
            dy[2 * i + 1] = 3.0 * u - uuv + c * (vl - 2.0 * v + vr);
        }
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        let (n, c) = (self.n, self.c);
        for i in 0..n {
            let (u, v) = (y[2 * i], y[2 * i + 1]);
            let (ku, kv) = (2 * i, 2 * i + 1);
            jac.set(ku, ku, 2.0 * u * v - 4.0 - 2.0 * c);
            jac.set(ku, kv, u * u);
            jac.set(kv, ku, 3.0 - 2.0 * u * v);
            jac.set(kv, kv, -u * u - 2.0 * c);
            if i > 0 {
                jac.set(ku, ku - 2, c);
                jac.set(kv, kv - 2, c);
            }
            if i + 1 < n {
                jac.set(ku, ku + 2, c);
                jac.set(kv, kv + 2, c);
            }
        }
        true
    }

    fn structure(&self) -> Structure {
        Structure::Banded { lower: 2, upper: 2 }
    }
}
