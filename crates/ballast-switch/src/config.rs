//! Settings of the controller: step limits, fixed steps and the switching thresholds.

use ballast_core::{Method, SchemeOptions};

/// How the controller chooses and limits steps. Built by the facade from
/// its `Options`; every field has a default that needs no tuning.
#[derive(Clone, Debug, PartialEq)]
pub struct ControlConfig {
    /// The method: a single scheme or a switching pair.
    pub method: Method,
    /// Scheme construction settings (Jacobians, Newton).
    pub scheme: SchemeOptions,
    /// Take exactly this step size (magnitude); no error control.
    pub fixed_step: Option<f64>,
    /// First step size (magnitude); `None` selects it automatically.
    pub first_step: Option<f64>,
    /// Largest step size (magnitude).
    pub max_step: f64,
    /// Smallest step size (magnitude) before the run fails.
    pub min_step: f64,
    /// Most steps (accepted plus rejected) before the run fails.
    pub max_steps: usize,
    /// Apply the stability cap to explicit schemes.
    pub stability_cap: bool,
    /// Thresholds of the switching logic.
    pub switching: SwitchThresholds,
}

impl Default for ControlConfig {
    fn default() -> Self {
        Self {
            method: Method::default(),
            scheme: SchemeOptions::default(),
            fixed_step: None,
            first_step: None,
            max_step: f64::INFINITY,
            min_step: 0.0,
            max_steps: 1_000_000,
            stability_cap: true,
            switching: SwitchThresholds::default(),
        }
    }
}

/// Named thresholds of the stability cap and the switching logic.
#[derive(Clone, Debug, PartialEq)]
pub struct SwitchThresholds {
    /// Fraction of the stability reach an explicit step may use:
    /// `h <= safety * r(theta) / rho`. Below 1 because `rho` is an estimate
    /// (5% accuracy is what the power iteration is asked for) and the
    /// region's edge is where errors stop being damped.
    pub cap_safety: f64,
    /// A step using at least this fraction of the stability reach counts as
    /// held by stability even if the cap did not bind: near the boundary the
    /// explicit method's own error estimate holds the step back (Hairer and
    /// Wanner II, IV.2), so the accuracy controller settles below it
    /// (measured on a stiffness ramp: Dormand–Prince 5(4) settles at 0.2 to
    /// 0.5 of the reach).
    pub stiff_fraction: f64,
    /// Consecutive accepted steps held by the cap before switching to the
    /// implicit scheme is considered: a single capped step can be a
    /// transient; a run of them means the problem is stiff.
    pub capped_steps_to_switch: usize,
    /// Consecutive implicit steps whose `h * rho` would fit inside the
    /// explicit region (with `return_margin`) before switching back.
    pub fitting_steps_to_return: usize,
    /// Margin for switching back: the implicit step must satisfy
    /// `h * rho <= return_margin * r(theta)` of the explicit scheme, so the
    /// explicit scheme is not capped right after the switch.
    pub return_margin: f64,
    /// Minimum accepted steps between two switches (hysteresis against chattering).
    pub min_steps_between_switches: usize,
    /// Accepted steps between two full spectral estimates when nothing
    /// suggests that the stiffness changed.
    pub estimate_interval: usize,
    /// Relative change of the free stage estimate that triggers a full
    /// spectral estimate at once.
    pub stage_change_trigger: f64,
}

impl Default for SwitchThresholds {
    fn default() -> Self {
        Self {
            cap_safety: 0.9,
            stiff_fraction: 0.2,
            capped_steps_to_switch: 5,
            fitting_steps_to_return: 10,
            return_margin: 0.5,
            min_steps_between_switches: 20,
            estimate_interval: 25,
            stage_change_trigger: 0.3,
        }
    }
}
