//! The two-body (Kepler) problem with its closed-form solution.

use crate::nonstiff::gravity_jacobian;
use ballast_core::{Jacobian, System};

/// The Kepler problem: one body around a fixed centre of attraction, with
/// the eccentricity `e` of the orbit as a parameter (HNW I, Section I.16
/// exercise / II.10 experiments; Hairer, Lubich and Wanner, *Geometric
/// Numerical Integration*, I.2, from memory).
///
/// State `(q1, q2, p1, p2)`:
///
/// ```text
/// q' = p,   p' = -q / |q|^3,
/// q(0) = (1 - e, 0),   p(0) = (0, sqrt((1 + e) / (1 - e))),
/// ```
///
/// an ellipse with semi-major axis 1 and period `2 pi`. Energy
/// `H = |p|^2 / 2 - 1/|q| = -1/2` and angular momentum
/// `L = q1 p2 - q2 p1 = sqrt(1 - e^2)` are conserved.
///
/// Closed form ([`Kepler::exact`]): solve Kepler's equation
/// `E - e sin E = t` for the eccentric anomaly `E`; then
/// `q = (cos E - e, sqrt(1 - e^2) sin E)`,
/// `p = (-sin E, sqrt(1 - e^2) cos E) / (1 - e cos E)`.
#[derive(Clone, Debug, PartialEq)]
pub struct Kepler {
    e: f64,
}

impl Default for Kepler {
    fn default() -> Self {
        Self::new(0.5)
    }
}

impl Kepler {
    /// The orbit of eccentricity `e` (`0 <= e < 1`).
    ///
    /// # Panics
    /// If `e` is not in `[0, 1)`.
    pub fn new(e: f64) -> Self {
        assert!(
            (0.0..1.0).contains(&e),
            "Kepler: eccentricity must be in [0, 1)"
        );
        Self { e }
    }

    /// The eccentricity.
    pub fn eccentricity(&self) -> f64 {
        self.e
    }

    /// The initial value at `t = 0` (pericentre).
    pub fn initial_value(&self) -> Vec<f64> {
        let e = self.e;
        vec![1.0 - e, 0.0, 0.0, ((1.0 + e) / (1.0 - e)).sqrt()]
    }

    /// Dimension: 4.
    pub fn dim(&self) -> usize {
        4
    }

    /// The period, `2 pi`.
    pub fn period(&self) -> f64 {
        2.0 * std::f64::consts::PI
    }

    /// The eccentric anomaly `E` with `E - e sin E = t`: Newton's method on
    /// `t` reduced to `M` in `[-pi, pi)`, from Danby's `E = M + 0.85 e sign(M)`
    /// (J. M. A. Danby, *Fundamentals of Celestial Mechanics*, 1988, from memory).
    pub fn eccentric_anomaly(&self, t: f64) -> f64 {
        use std::f64::consts::PI;
        let e = self.e;
        let turns = ((t + PI) / (2.0 * PI)).floor();
        let m = t - turns * 2.0 * PI;
        // Danby's starting value, from which Newton converges for every e < 1.
        let mut big_e = m + 0.85 * e * if m < 0.0 { -1.0 } else { 1.0 };
        for _ in 0..50 {
            let d = (big_e - e * big_e.sin() - m) / (1.0 - e * big_e.cos());
            big_e -= d;
            if d.abs() <= 4.0 * f64::EPSILON * big_e.abs().max(1.0) {
                break;
            }
        }
        big_e + turns * 2.0 * PI
    }

    /// The exact solution `(q1, q2, p1, p2)` at time `t`.
    pub fn exact(&self, t: f64) -> Vec<f64> {
        let e = self.e;
        let big_e = self.eccentric_anomaly(t);
        let (s, c) = big_e.sin_cos();
        let b = (1.0 - e * e).sqrt();
        let w = 1.0 - e * c;
        vec![c - e, b * s, -s / w, b * c / w]
    }

    /// Energy `|p|^2 / 2 - 1/|q|` (`-1/2` on every orbit of this family).
    pub fn energy(y: &[f64]) -> f64 {
        0.5 * (y[2] * y[2] + y[3] * y[3]) - 1.0 / y[0].hypot(y[1])
    }

    /// Angular momentum `q1 p2 - q2 p1` (`sqrt(1 - e^2)`).
    pub fn angular_momentum(y: &[f64]) -> f64 {
        y[0] * y[3] - y[1] * y[2]
    }
}

impl System for Kepler {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        let r2 = y[0] * y[0] + y[1] * y[1];
        let r3 = r2 * r2.sqrt();
        dy[0] = y[2];
        dy[1] = y[3];
        dy[2] = -y[0] / r3;
        dy[3] = -y[1] / r3;
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        let (a, b, c) = gravity_jacobian(-1.0, y[0], y[1]);
        jac.set(0, 2, 1.0);
        jac.set(1, 3, 1.0);
        jac.set(2, 0, a);
        jac.set(2, 1, b);
        jac.set(3, 0, b);
        jac.set(3, 1, c);
        true
    }
}
