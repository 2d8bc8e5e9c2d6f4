//! The flame-propagation model: non-stiff before ignition, stiff after.

use crate::lambert::wright_omega;
use ballast_core::{Jacobian, System};

/// A ball of flame (R. E. O'Malley, *Singular Perturbation Methods for
/// ODEs*, Springer 1991; popularised by L. F. Shampine and C. Moler):
///
/// ```text
/// y' = y^2 - y^3,   y(0) = delta,   t in [0, 2/delta].
/// ```
///
/// `y` (the radius of the ball) grows slowly until `t ≈ 1/delta`, then
/// ignites and jumps to the equilibrium `y = 1`, where the Jacobian
/// `2y - 3y^2` is `-1`: non-stiff before ignition, stiff over the long
/// remaining interval (for small `delta`).
///
/// Closed form ([`Flame::exact`]): with `u = 1/y - 1`, `u + ln u = a - t +
/// ln a` where `a = 1/delta - 1`, so
///
/// ```text
/// y(t) = 1 / (W0(a e^(a - t)) + 1) = 1 / (omega(a + ln a - t) + 1)
/// ```
///
/// with `W0` the principal branch of Lambert W ([`crate::lambert_w0`]) and
/// `omega(x) = W0(e^x)` ([`crate::wright_omega`]), which avoids the
/// overflow of `e^(a - t)` for small `delta`.
#[derive(Clone, Debug, PartialEq)]
pub struct Flame {
    delta: f64,
}

impl Default for Flame {
    fn default() -> Self {
        Self::new(1e-4)
    }
}

impl Flame {
    /// The flame started from radius `delta`, `0 < delta < 1`.
    ///
    /// # Panics
    /// If `delta` is not in `(0, 1)`.
    pub fn new(delta: f64) -> Self {
        assert!(delta > 0.0 && delta < 1.0, "Flame: delta must be in (0, 1)");
        Self { delta }
    }

    /// The initial radius `delta`.
    pub fn delta(&self) -> f64 {
        self.delta
    }

    /// The standard span `[0, 2/delta]`.
    pub fn span(&self) -> (f64, f64) {
        (0.0, 2.0 / self.delta)
    }

    /// The standard initial value `delta`.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![self.delta]
    }

    /// Dimension: 1.
    pub fn dim(&self) -> usize {
        1
    }

    /// The exact solution at `t`, through the Lambert W function.
    pub fn exact(&self, t: f64) -> Vec<f64> {
        let a = 1.0 / self.delta - 1.0;
        vec![1.0 / (wright_omega(a + a.ln() - t) + 1.0)]
    }
}

impl System for Flame {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = y[0] * y[0] * (1.0 - y[0]);
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        jac.set(0, 0, y[0] * (2.0 - 3.0 * y[0]));
        true
    }
}
