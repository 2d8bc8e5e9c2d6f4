//! Settings that shape how schemes are built (Jacobians, Newton, linear algebra).
//!
//! Defaults need no tuning; the facade's `Options` carries one of these.

use crate::system::Structure;

/// Where an implicit scheme gets its Jacobian from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum JacobianSource {
    /// The system's analytic Jacobian when it provides one, else finite differences.
    #[default]
    Auto,
    /// Always the system's analytic Jacobian (an error at start if it has none).
    Analytic,
    /// Always finite differences (grouped columns for banded or sparse structure).
    FiniteDifference,
}

/// Settings for implicit schemes.
#[derive(Clone, Debug, PartialEq)]
pub struct ImplicitOptions {
    /// Jacobian source.
    pub jacobian: JacobianSource,
    /// Overrides the structure the system declares (dense, banded, sparse).
    pub structure: Option<Structure>,
    /// Cap on Newton iterations per step (stage system).
    pub max_newton_iters: usize,
    /// Recompute the Jacobian after an accepted step whose Newton
    /// contraction rate `theta` exceeded this (Hairer and Wanner II, IV.8
    /// use 0.001 with their Radau code; raise it towards 0.1 when Jacobians
    /// are expensive).
    pub jacobian_refresh_rate: f64,
    /// Keep the factorised iteration matrix while `|h / h_factored - 1|`
    /// stays below this and the Jacobian is unchanged (common practice).
    pub refactor_threshold: f64,
}

impl Default for ImplicitOptions {
    fn default() -> Self {
        Self {
            jacobian: JacobianSource::Auto,
            structure: None,
            max_newton_iters: 7,
            jacobian_refresh_rate: 1e-3,
            refactor_threshold: 0.2,
        }
    }
}

/// Everything needed to build a scheme besides the method and the dimension.
#[derive(Clone, Debug, PartialEq)]
pub struct SchemeOptions {
    /// Settings for implicit schemes (ignored by explicit ones).
    pub implicit: ImplicitOptions,
    /// Whether the run needs the schemes' own continuous extensions. When
    /// `false` a scheme may skip work that serves only dense output
    /// (Dormand–Prince 8(5,3) then saves its three extra stages per step and
    /// interpolates by cubic Hermite). Default `true`.
    pub dense_output: bool,
}

impl Default for SchemeOptions {
    fn default() -> Self {
        Self {
            implicit: ImplicitOptions::default(),
            dense_output: true,
        }
    }
}
