//! Stiff chemical kinetics: Robertson, HIRES and the Oregonator.

use ballast_core::{Jacobian, System};

/// Robertson's chemical reaction (H. H. Robertson 1966), HNW II, Section
/// IV.1 and IV.10 (ROBER); the Bari test set (ROBER):
///
/// ```text
/// y1' = -k1 y1 + k3 y2 y3
/// y2' =  k1 y1 - k3 y2 y3 - k2 y2^2
/// y3' =                     k2 y2^2
/// ```
///
/// `k1 = 0.04`, `k2 = 3e7`, `k3 = 1e4`, `y(0) = (1, 0, 0)`. The sum
/// `y1 + y2 + y3 = 1` is conserved. Standard spans: `[0, 40]` (HNW II) and
/// `[0, 1e11]` (Bari), where `y2` falls to about `8e-14` and needs an
/// absolute tolerance far below it.
#[derive(Clone, Debug, PartialEq)]
pub struct Robertson {
    /// Rate `k1`.
    pub k1: f64,
    /// Rate `k2`.
    pub k2: f64,
    /// Rate `k3`.
    pub k3: f64,
}

impl Default for Robertson {
    fn default() -> Self {
        Self {
            k1: 0.04,
            k2: 3e7,
            k3: 1e4,
        }
    }
}

impl Robertson {
    /// The standard initial value `(1, 0, 0)`.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![1.0, 0.0, 0.0]
    }

    /// Dimension: 3.
    pub fn dim(&self) -> usize {
        3
    }
}

impl System for Robertson {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        let a = self.k1 * y[0];
        let b = self.k3 * y[1] * y[2];
        let c = self.k2 * y[1] * y[1];
        dy[0] = -a + b;
        dy[1] = a - b - c;
        dy[2] = c;
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        let (k1, k2, k3) = (self.k1, self.k2, self.k3);
        jac.set(0, 0, -k1);
        jac.set(0, 1, k3 * y[2]);
        jac.set(0, 2, k3 * y[1]);
        jac.set(1, 0, k1);
        jac.set(1, 1, -k3 * y[2] - 2.0 * k2 * y[1]);
        jac.set(1, 2, -k3 * y[1]);
        jac.set(2, 1, 2.0 * k2 * y[1]);
        true
    }
}

/// HIRES: "High Irradiance RESponse" of photomorphogenesis (Schäfer 1975),
/// 8 equations, from the Bari test set (Mazzia and Magherini) and HNW II,
/// Section IV.10:
///
/// ```text
/// y1' = -1.71 y1 + 0.43 y2 + 8.32 y3 + 0.0007
/// y2' =  1.71 y1 - 8.75 y2
/// y3' = -10.03 y3 + 0.43 y4 + 0.035 y5
/// y4' =  8.32 y2 + 1.71 y3 - 1.12 y4
/// y5' = -1.745 y5 + 0.43 y6 + 0.43 y7
/// y6' = -280 y6 y8 + 0.69 y4 + 1.71 y5 - 0.43 y6 + 0.69 y7
/// y7' =  280 y6 y8 - 1.81 y7
/// y8' = -280 y6 y8 + 1.81 y7
/// ```
///
/// `y(0) = (1, 0, 0, 0, 0, 0, 0, 0.0057)` on `[0, 321.8122]`.
/// `y7 + y8 = 0.0057` is conserved.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Hires;

impl Hires {
    /// The end of the standard span (Bari test set).
    pub const T_END: f64 = 321.8122;

    /// The standard initial value.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0057]
    }

    /// Dimension: 8.
    pub fn dim(&self) -> usize {
        8
    }
}

impl System for Hires {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        let r = 280.0 * y[5] * y[7];
        dy[0] = -1.71 * y[0] + 0.43 * y[1] + 8.32 * y[2] + 0.0007;
        dy[1] = 1.71 * y[0] - 8.75 * y[1];
        dy[2] = -10.03 * y[2] + 0.43 * y[3] + 0.035 * y[4];
        dy[3] = 8.32 * y[1] + 1.71 * y[2] - 1.12 * y[3];
        dy[4] = -1.745 * y[4] + 0.43 * y[5] + 0.43 * y[6];
        dy[5] = -r + 0.69 * y[3] + 1.71 * y[4] - 0.43 * y[5] + 0.69 * y[6];
        dy[6] = r - 1.81 * y[6];
        dy[7] = -r + 1.81 * y[6];
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        let entries = [
            (0, 0, -1.71),
            (0, 1, 0.43),
            (0, 2, 8.32),
            (1, 0, 1.71),
            (1, 1, -8.75),
            (2, 2, -10.03),
            (2, 3, 0.43),
            (2, 4, 0.035),
            (3, 1, 8.32),
            (3, 2, 1.71),
            (3, 3, -1.12),
            (4, 4, -1.745),
            (4, 5, 0.43),
            (4, 6, 0.43),
            (5, 3, 0.69),
            (5, 4, 1.71),
            (5, 5, -0.43 - 280.0 * y[7]),
            (5, 6, 0.69),
            (5, 7, -280.0 * y[5]),
            (6, 5, 280.0 * y[7]),
            (6, 6, -1.81),
            (6, 7, 280.0 * y[5]),
            (7, 5, -280.0 * y[7]),
            (7, 6, 1.81),
            (7, 7, -280.0 * y[5]),
        ];
        for (i, j, v) in entries {
            jac.set(i, j, v);
        }
        true
    }
}

/// The Oregonator: Field and Noyes' model of the Belousov–Zhabotinskii
/// reaction, HNW II, Section IV.10 (OREGO):
///
/// ```text
/// y1' = 77.27 (y2 + y1 (1 - 8.375e-6 y1 - y2))
/// y2' = (y3 - (1 + y1) y2) / 77.27
/// y3' = 0.161 (y1 - y3)
/// ```
///
/// `y(0) = (1, 2, 3)` on `[0, 360]`: a stiff limit cycle with sharp spikes.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Oregonator;

impl Oregonator {
    /// The standard initial value `(1, 2, 3)`.
    pub fn initial_value(&self) -> Vec<f64> {
        vec![1.0, 2.0, 3.0]
    }

    /// Dimension: 3.
    pub fn dim(&self) -> usize {
        3
    }
}

impl System for Oregonator {
    fn rhs(&mut self, _t: f64, y: &[f64], dy: &mut [f64]) {
        dy[0] = 77.27 * (y[1] + y[0] * (1.0 - 8.375e-6 * y[0] - y[1]));
        dy[1] = (y[2] - (1.0 + y[0]) * y[1]) / 77.27;
        dy[2] = 0.161 * (y[0] - y[2]);
    }

    fn jacobian(&mut self, _t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        jac.set(0, 0, 77.27 * (1.0 - 2.0 * 8.375e-6 * y[0] - y[1]));
        jac.set(0, 1, 77.27 * (1.0 - y[0]));
        jac.set(1, 0, -y[1] / 77.27);
        jac.set(1, 1, -(1.0 + y[0]) / 77.27);
        jac.set(1, 2, 1.0 / 77.27);
        jac.set(2, 0, 0.161);
        jac.set(2, 2, -0.161);
        true
    }
}
