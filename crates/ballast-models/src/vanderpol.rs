//! The Van der Pol oscillator in its two stiff forms.

use ballast_core::{Jacobian, System};

/// Van der Pol's equation in the singular-perturbation scaling, HNW II,
/// Section IV.1 (eq. (1.5')) and IV.10 (VDPOL); the Bari test set (VDPOL):
///
/// ```text
/// y1' = y2
/// y2' = ((1 - y1^2) y2 - y1) / eps
/// ```
///
/// Standard: `eps = 1e-6`, `y(0) = (2, 0)` (the Bari test set's choice;
/// HNW II starts on the slow manifold at `(2, -0.66)` instead), on `[0, 2]`,
/// which holds two fast jumps of `y1` (near `t = 0.81` and `t = 1.61`).
#[derive(Clone, Debug, PartialEq)]
pub struct VanDerPol {
    eps: f64,
}

impl Default for VanDerPol {
    fn default() -> Self {
        Self::new(1e-6)
    }
}

impl VanDerPol {
    /// The oscillator with small parameter `eps > 0`.
    pub fn new(eps: f64) -> Self {
        Self { eps }
    }

    /// The parameter `eps`.
    pub fn eps(&self) -> f64 {
        self.eps
    }

    /// The standard initial value `(2, 0)` (Bari test set).
    pub fn initial_value(&self) -> Vec<f64> {
        vec![2.0, 0.0]
    }

    /// Dimension: 2.
    pub fn dim(&self) -> usize {
        2
    }
}

impl System for VanDerPol {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = y[1];
        dy[1] = ((1.0 - y[0] * y[0]) * y[1] - y[0]) / self.eps;
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        jac.set(0, 1, 1.0);
        jac.set(1, 0, (-2.0 * y[0] * y[1] - 1.0) / self.eps);
        jac.set(1, 1, (1.0 - y[0] * y[0]) / self.eps);
        true
    }
}

/// Van der Pol's equation in the unscaled form with a large `mu`
/// (HNW II, Section IV.1; `mu = 1000` on `[0, 3000]` from `y0 = (2, 0)`
/// is a common stiff test case, common practice):
///
/// ```text
/// y1' = y2
/// y2' = mu (1 - y1^2) y2 - y1
/// ```
///
/// Standard here: `mu = 1000`, `y(0) = (2, 0)` on `[0, 3000]`, which holds
/// three relaxation jumps (the period is about `(3 - 2 ln 2) mu ≈ 1614`).
#[derive(Clone, Debug, PartialEq)]
pub struct VanDerPolMu {
    mu: f64,
}

impl Default for VanDerPolMu {
    fn default() -> Self {
        Self::new(1000.0)
    }
}

impl VanDerPolMu {
    /// The oscillator with parameter `mu`.
    pub fn new(mu: f64) -> Self {
        Self { mu }
    }

    /// The parameter `mu`.
    pub fn mu(&self) -> f64 {
        self.mu
    }

    /// The standard initial value `(2, 0)`.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![2.0, 0.0]
    }

    /// Dimension: 2.
    pub fn dim(&self) -> usize {
        2
    }
}

impl System for VanDerPolMu {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = y[1];
        dy[1] = self.mu * (1.0 - y[0] * y[0]) * y[1] - y[0];
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        jac.set(0, 1, 1.0);
        jac.set(1, 0, -2.0 * self.mu * y[0] * y[1] - 1.0);
        jac.set(1, 1, self.mu * (1.0 - y[0] * y[0]));
        true
    }
}
