//! Scalar problems with a prescribed eigenvalue: Prothero–Robinson and a
//! stiffness ramp.

use ballast_core::{Jacobian, System};

/// The Prothero–Robinson problem (A. Prothero and A. Robinson, Math. Comp.
/// 28 (1974) 145–162; HNW II, Section IV.15):
///
/// ```text
/// y' = lambda (y - g(t)) + g'(t),   g(t) = sin t,
/// ```
///
/// with exact solution `y(t) = g(t) + (y(t0) - g(t0)) e^(lambda (t - t0))`,
/// so `y = sin t` from `y(0) = 0`. The Jacobian is the constant `lambda`;
/// for `lambda << 0` it is the classic test of order reduction. Standard
/// here: `lambda = -1e6` on `[0, 10]`, `y(0) = 0`.
#[derive(Clone, Debug, PartialEq)]
pub struct ProtheroRobinson {
    lambda: f64,
}

impl Default for ProtheroRobinson {
    fn default() -> Self {
        Self::new(-1e6)
    }
}

impl ProtheroRobinson {
    /// The problem with eigenvalue `lambda` (stiff for `lambda` large and
    /// negative, e.g. `-1e6`).
    pub fn new(lambda: f64) -> Self {
        Self { lambda }
    }

    /// The eigenvalue `lambda` (the Jacobian, at every point).
    pub fn lambda(&self) -> f64 {
        self.lambda
    }

    /// The smooth solution `g(t) = sin t`.
    pub fn g(t: f64) -> f64 {
        t.sin()
    }

    /// The standard initial value `y(0) = g(0) = 0`.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![0.0]
    }

    /// Dimension: 1.
    pub fn dim(&self) -> usize {
        1
    }

    /// The exact solution from the standard initial value: `sin t`.
    pub fn exact(&self, t: f64) -> Vec<f64> {
        vec![t.sin()]
    }

    /// The exact solution through `y(t0) = y0`:
    /// `g(t) + (y0 - g(t0)) e^(lambda (t - t0))`.
    pub fn exact_from(&self, t0: f64, y0: f64, t: f64) -> f64 {
        t.sin() + (y0 - t0.sin()) * (self.lambda * (t - t0)).exp()
    }
}

impl System for ProtheroRobinson {
    fn rhs(&mut self, t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = self.lambda * (y[0] - t.sin()) + t.cos();
    }

    fn jacobian(&mut self, _t: f64, _y: &[f64], jac: &mut Jacobian) -> bool {
        jac.set(0, 0, self.lambda);
        true
    }
}

/// A problem whose stiffness grows in time: the Prothero–Robinson form
/// with a time-dependent eigenvalue sweeping geometrically from `-1` to
/// `-S` over `[0, T]` (a construction of this crate):
///
/// ```text
/// y' = lambda(t) (y - cos t) - sin t,   lambda(t) = -S^(t/T),
/// ```
///
/// Exact solution `y(t) = cos t + (y(0) - 1) e^(Lambda(t))` with
/// `Lambda(t) = -(T / ln S) (S^(t/T) - 1)`; from the standard `y(0) = 1`
/// the solution is exactly `cos t`, smooth all along, so the problem is a
/// pure stiffness test: only stability, not accuracy, forces an explicit
/// method's step down as `|lambda|` grows. Non-stiff at the start, stiff
/// at the end. Standard: `S = 1e6`, `T = 10`, span `[0, 10]`.
#[derive(Clone, Debug, PartialEq)]
pub struct StiffnessRamp {
    stiffness: f64,
    t_end: f64,
}

impl Default for StiffnessRamp {
    fn default() -> Self {
        Self::new(1e6, 10.0)
    }
}

impl StiffnessRamp {
    /// `lambda(t) = -stiffness^(t / t_end)`: `-1` at `t = 0`, `-stiffness`
    /// at `t = t_end`.
    ///
    /// # Panics
    /// If `stiffness <= 1` or `t_end <= 0`.
    pub fn new(stiffness: f64, t_end: f64) -> Self {
        assert!(
            stiffness > 1.0 && t_end > 0.0,
            "StiffnessRamp: need stiffness > 1, t_end > 0"
        );
        Self { stiffness, t_end }
    }

    /// The end of the ramp `T`.
    pub fn t_end(&self) -> f64 {
        self.t_end
    }

    /// The eigenvalue (the Jacobian) at time `t`.
    pub fn lambda(&self, t: f64) -> f64 {
        -(self.stiffness.ln() * t / self.t_end).exp()
    }

    /// `Lambda(t) = integral of lambda from 0 to t`.
    pub fn lambda_integral(&self, t: f64) -> f64 {
        let k = self.stiffness.ln() / self.t_end;
        -((k * t).exp_m1()) / k
    }

    /// The standard initial value `y(0) = 1`.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![1.0]
    }

    /// Dimension: 1.
    pub fn dim(&self) -> usize {
        1
    }

    /// The exact solution from the standard initial value: `cos t`.
    pub fn exact(&self, t: f64) -> Vec<f64> {
        vec![t.cos()]
    }

    /// The exact solution through `y(0) = y0`.
    pub fn exact_from(&self, y0: f64, t: f64) -> f64 {
        t.cos() + (y0 - 1.0) * self.lambda_integral(t).exp()
    }
}

impl System for StiffnessRamp {
    fn rhs(&mut self, t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = self.lambda(t) * (y[0] - t.cos()) - t.sin();
    }

    fn jacobian(&mut self, t: f64, _y: &[f64], jac: &mut Jacobian) -> bool {
        jac.set(0, 0, self.lambda(t));
        true
    }
}
