//! Which scheme runs, when to cap its step, and when to switch.

use ballast_core::{ErrorNorm, Method, Problem, Scheme, SchemeState, Structure, System};
use num_complex::Complex64;

use crate::config::ControlConfig;
use crate::controller::{build_scheme, ControlStats, StepReport};
use crate::error::SetupError;

/// Why the controller switched schemes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SwitchReason {
    /// The explicit scheme was held by its stability limit and the implicit
    /// scheme is expected to be cheaper per unit time.
    StabilityBound,
    /// The implicit run's steps fit inside the explicit region with margin.
    NonStiffAgain,
}

impl std::fmt::Display for SwitchReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            SwitchReason::StabilityBound => "explicit step held by stability; implicit cheaper",
            SwitchReason::NonStiffAgain => "steps fit the explicit region again",
        })
    }
}

/// One switch between schemes.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SwitchRecord {
    /// Time of the switch.
    pub t: f64,
    /// Scheme switched from.
    pub from: Method,
    /// Scheme switched to.
    pub to: Method,
    /// Why.
    pub reason: SwitchReason,
    /// Step size at the switch (magnitude of the next step).
    pub h: f64,
    /// Spectral-radius estimate at the switch.
    pub rho: f64,
}

/// The switching state of a run: the standby scheme of a pair (if any),
/// the stiffness monitor, and the record of switches.
pub(crate) struct Switcher<S: System> {
    standby: Option<Box<dyn Scheme<S>>>,
    records: Vec<SwitchRecord>,
    estimate: Option<(f64, Complex64)>,
}

impl<S: System> Switcher<S> {
    /// Builds the scheme that starts the run, and the switcher around it.
    pub(crate) fn new(
        method: Method,
        n: usize,
        structure: &Structure,
        cfg: &ControlConfig,
    ) -> Result<(Box<dyn Scheme<S>>, Self), SetupError> {
        let (first, standby) = match method {
            Method::Switching(pair) => {
                let (e, i) = match pair {
                    ballast_core::SwitchPair::DormandPrinceRadau => {
                        (Method::DormandPrince54, Method::RadauIIA5)
                    }
                    ballast_core::SwitchPair::AdamsBdf => (Method::Adams, Method::Bdf),
                };
                (
                    build_scheme::<S>(e, n, structure, cfg)?,
                    Some(build_scheme::<S>(i, n, structure, cfg)?),
                )
            }
            single => (build_scheme::<S>(single, n, structure, cfg)?, None),
        };
        Ok((
            first,
            Self {
                standby,
                records: Vec::new(),
                estimate: None,
            },
        ))
    }

    pub(crate) fn records(&self) -> &[SwitchRecord] {
        &self.records
    }

    pub(crate) fn latest_estimate(&self) -> Option<(f64, Complex64)> {
        self.estimate
    }

    pub(crate) fn at_start(
        &mut self,
        _p: &mut Problem<S>,
        _active: &dyn Scheme<S>,
        _norm: &ErrorNorm,
        _stats: &mut ControlStats,
    ) {
    }

    pub(crate) fn step_cap(&self, _active: &dyn Scheme<S>, _cfg: &ControlConfig) -> Option<f64> {
        None
    }

    pub(crate) fn after_reject(&mut self) {}

    pub(crate) fn after_accept(
        &mut self,
        _p: &mut Problem<S>,
        _active: &mut Box<dyn Scheme<S>>,
        _norm: &ErrorNorm,
        _report: &StepReport,
        _h_next: f64,
        _cfg: &ControlConfig,
        _stats: &mut ControlStats,
    ) -> Option<f64> {
        let _ = &self.standby;
        None
    }
}
