//! Non-stiff problems of Hairer, Norsett and Wanner, *Solving ODEs I*:
//! the Arenstorf orbit, the Pleiades and the Lorenz equations.

use ballast_core::{Jacobian, System};

/// Writes `k * (I / r^3 - 3 d d^T / r^5)` (the Jacobian of `k d / |d|^3`
/// with respect to `d`, a plane vector) as `[[a, b], [b, c]]`.
#[inline]
pub(crate) fn gravity_jacobian(k: f64, dx: f64, dy: f64) -> (f64, f64, f64) {
    let r2 = dx * dx + dy * dy;
    let r3 = r2 * r2.sqrt();
    let r5 = r3 * r2;
    (
        k * (1.0 / r3 - 3.0 * dx * dx / r5),
        -k * 3.0 * dx * dy / r5,
        k * (1.0 / r3 - 3.0 * dy * dy / r5),
    )
}

/// The Arenstorf orbit: a periodic orbit of the restricted three-body
/// problem (a light body near the Earth and the Moon), HNW I, Section II.0,
/// eq. (0.1).
///
/// With `mu = 0.012277471`, `mu' = 1 - mu`, state `(y1, y2, y1', y2')`:
///
/// ```text
/// y1'' = y1 + 2 y2' - mu' (y1 + mu) / D1 - mu (y1 - mu') / D2
/// y2'' = y2 - 2 y1' - mu' y2 / D1 - mu y2 / D2
/// D1 = ((y1 + mu)^2 + y2^2)^(3/2),  D2 = ((y1 - mu')^2 + y2^2)^(3/2)
/// ```
///
/// `y(0) = (0.994, 0, 0, -2.00158510637908252240537862224)`, periodic with
/// period [`Arenstorf::PERIOD`] `= 17.0652165601579625588917206249`
/// (both from HNW I, Section II.0).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Arenstorf;

impl Arenstorf {
    /// The mass ratio `mu` of the Moon (HNW I, II.0).
    pub const MU: f64 = 0.012277471;
    /// The period of the orbit, HNW I, II.0 (30 digits there).
    pub const PERIOD: f64 = 17.0652165601579625588917206249;

    /// The standard initial value (HNW I, II.0).
    pub fn initial_value(&self) -> Vec<f64> {
        vec![0.994, 0.0, 0.0, -2.00158510637908252240537862224]
    }

    /// Dimension: 4.
    pub fn dim(&self) -> usize {
        4
    }
}

impl System for Arenstorf {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        let (mu, mup) = (Self::MU, 1.0 - Self::MU);
        let a1 = y[0] + mu;
        let a2 = y[0] - mup;
        let r1 = a1 * a1 + y[1] * y[1];
        let r2 = a2 * a2 + y[1] * y[1];
        let d1 = r1 * r1.sqrt();
        let d2 = r2 * r2.sqrt();
        dy[0] = y[2];
        dy[1] = y[3];
        dy[2] = y[0] + 2.0 * y[3] - mup * a1 / d1 - mu * a2 / d2;
        dy[3] = y[1] - 2.0 * y[2] - mup * y[1] / d1 - mu * y[1] / d2;
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        let (mu, mup) = (Self::MU, 1.0 - Self::MU);
        let (p, q, r) = gravity_jacobian(mup, y[0] + mu, y[1]);
        let (s, u, v) = gravity_jacobian(mu, y[0] - mup, y[1]);
        jac.set(0, 2, 1.0);
        jac.set(1, 3, 1.0);
        jac.set(2, 0, 1.0 - p - s);
        jac.set(2, 1, -q - u);
        jac.set(2, 3, 2.0);
        jac.set(3, 0, -q - u);
        jac.set(3, 1, 1.0 - r - v);
        jac.set(3, 2, -2.0);
        true
    }
}

/// The Pleiades: seven stars in the plane attracting each other by
/// gravitation, masses `m_i = i`, HNW I, Section II.10 (PLEI; also the
/// Bari test set).
///
/// State `(x_1..x_7, y_1..y_7, x_1'..x_7', y_1'..y_7')` (28 equations):
///
/// ```text
/// x_i'' = sum_{j != i} m_j (x_j - x_i) / r_ij^3,   y_i'' likewise,
/// r_ij^2 = (x_i - x_j)^2 + (y_i - y_j)^2,
/// ```
///
/// on `[0, 3]` with the initial values of [`Pleiades::initial_value`]
/// (from memory of HNW I II.10 / the Bari test set; the reference solution
/// is computed for exactly these values).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Pleiades;

impl Pleiades {
    /// The standard initial value (positions, then velocities).
    pub fn initial_value(&self) -> Vec<f64> {
        let mut y = Vec::with_capacity(28);
        y.extend_from_slice(&[3.0, 3.0, -1.0, -3.0, 2.0, -2.0, 2.0]);
        y.extend_from_slice(&[3.0, -3.0, 2.0, 0.0, 0.0, -4.0, 4.0]);
        y.extend_from_slice(&[0.0, 0.0, 0.0, 0.0, 0.0, 1.75, -1.5]);
        y.extend_from_slice(&[0.0, 0.0, 0.0, -1.25, 1.0, 0.0, 0.0]);
        y
    }

    /// Dimension: 28.
    pub fn dim(&self) -> usize {
        28
    }
}

impl System for Pleiades {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        dy[..14].copy_from_slice(&y[14..28]);
        dy[14..].fill(0.0);
        for i in 0..7 {
            for j in i + 1..7 {
                let dx = y[j] - y[i];
                let dz = y[7 + j] - y[7 + i];
                let r2 = dx * dx + dz * dz;
                let r3 = r2 * r2.sqrt();
                let (mi, mj) = ((i + 1) as f64, (j + 1) as f64);
                dy[14 + i] += mj * dx / r3;
                dy[21 + i] += mj * dz / r3;
                dy[14 + j] -= mi * dx / r3;
                dy[21 + j] -= mi * dz / r3;
            }
        }
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        for i in 0..14 {
            jac.set(i, 14 + i, 1.0);
        }
        for i in 0..7 {
            for j in i + 1..7 {
                // K = I/r^3 - 3 d d^T / r^5 with d = q_j - q_i; the force on i
                // is m_j K-weighted, on j is -m_i.
                let (a, b, c) = gravity_jacobian(1.0, y[j] - y[i], y[7 + j] - y[7 + i]);
                let (mi, mj) = ((i + 1) as f64, (j + 1) as f64);
                for (body, other, m) in [(i, j, mj), (j, i, mi)] {
                    let (ax, ay) = (14 + body, 21 + body);
                    let (xb, yb, xo, yo) = (body, 7 + body, other, 7 + other);
                    jac.add(ax, xo, m * a);
                    jac.add(ax, yo, m * b);
                    jac.add(ay, xo, m * b);
                    jac.add(ay, yo, m * c);
                    jac.add(ax, xb, -m * a);
                    jac.add(ax, yb, -m * b);
                    jac.add(ay, xb, -m * b);
                    jac.add(ay, yb, -m * c);
                }
            }
        }
        true
    }
}

/// The Lorenz equations (E. N. Lorenz 1963), as in HNW I (LRNZ in the
/// experiments of Section II.10, from memory):
///
/// ```text
/// y1' = sigma (y2 - y1),  y2' = y1 (r - y3) - y2,  y3' = y1 y2 - b y3
/// ```
///
/// with `sigma = 10`, `r = 28`, `b = 8/3`, `y(0) = (-8, 8, 27)` on `[0, 16]`.
/// Chaotic: errors grow like `e^(0.9 t)` (largest Lyapunov exponent about
/// 0.906, common knowledge), so a double-precision solver cannot get closer
/// than about `1e-10` relative at `t = 16` whatever its tolerance.
#[derive(Clone, Debug, PartialEq)]
pub struct Lorenz {
    /// Prandtl number `sigma`.
    pub sigma: f64,
    /// Rayleigh number `r`.
    pub r: f64,
    /// Geometric factor `b`.
    pub b: f64,
}

impl Default for Lorenz {
    fn default() -> Self {
        Self {
            sigma: 10.0,
            r: 28.0,
            b: 8.0 / 3.0,
        }
    }
}

impl Lorenz {
    /// The standard initial value `(-8, 8, 27)`.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![-8.0, 8.0, 27.0]
    }

    /// Dimension: 3.
    pub fn dim(&self) -> usize {
        3
    }
}

impl System for Lorenz {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = self.sigma * (y[1] - y[0]);
        dy[1] = y[0] * (self.r - y[2]) - y[1];
        dy[2] = y[0] * y[1] - self.b * y[2];
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        jac.set(0, 0, -self.sigma);
        jac.set(0, 1, self.sigma);
        jac.set(1, 0, self.r - y[2]);
        jac.set(1, 1, -1.0);
        jac.set(1, 2, -y[0]);
        jac.set(2, 0, y[1]);
        jac.set(2, 1, y[0]);
        jac.set(2, 2, -self.b);
        true
    }
}
