//! The step loop: accuracy control, stability caps, failure handling, switching.
//!
//! The controller owns the schemes, the step size and the counters; the
//! caller asks it for one accepted step at a time ([`Controller::step`]) and
//! reads dense output from [`Controller::scheme`] between steps. Output,
//! events and breakpoints are the caller's business (the facade's).

use ballast_core::control::{initial_step, PiController};
use ballast_core::{
    build, ErrorNorm, Method, NextStep, Problem, Scheme, SchemeState, StepFailure, System,
    WorkCounters,
};

use crate::config::ControlConfig;
use crate::error::{RunFailure, SetupError};
use crate::switching::{SwitchRecord, Switcher};

/// Consecutive failed attempts (NaN, Newton, singular matrix) tolerated in
/// one step before the run gives up. Each failure shrinks the step, so 30
/// failures span more than nine decades of step size.
const MAX_CONSECUTIVE_FAILURES: usize = 30;

/// Counters kept by the controller (the schemes' work is in [`WorkCounters`]).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct ControlStats {
    /// Accepted steps.
    pub accepted: usize,
    /// Steps rejected by the error test.
    pub rejected: usize,
    /// Attempts that failed before an error estimate (NaN, Newton, singular).
    pub failed_attempts: usize,
    /// Accepted explicit steps whose size the stability cap set.
    pub stability_limited: usize,
    /// Switches between schemes.
    pub switches: usize,
    /// Full spectral-radius estimates (power iterations).
    pub spectral_estimates: usize,
    /// Operator products spent on spectral estimates.
    pub spectral_products: usize,
}

/// What happened in one accepted step.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct StepReport {
    /// Start of the step.
    pub t_prev: f64,
    /// End of the step.
    pub t: f64,
    /// The step taken (signed).
    pub h: f64,
    /// Whether the stability cap set the step size.
    pub capped: bool,
    /// Whether the step reached the requested limit exactly.
    pub reached_limit: bool,
}

/// The step just accepted, as the switching logic needs it: passed by
/// value (the full [`StepReport`] is built after the switching logic has
/// run and written once, straight into the result), with the scheme's
/// identity from the controller's cache instead of calls through it.
#[derive(Clone, Copy, Debug)]
pub(crate) struct TakenStep {
    /// The step taken (signed).
    pub(crate) h: f64,
    /// Whether the stability cap set the step size.
    pub(crate) capped: bool,
    /// Whether the scheme that took it is implicit.
    pub(crate) implicit: bool,
    /// The method that took it.
    pub(crate) method: Method,
    /// What remains of the span after it (magnitude).
    pub(crate) remaining: f64,
}

/// Drives one scheme, or a switching pair, over a time span.
pub struct Controller<S: System> {
    problem: Problem<S>,
    norm: ErrorNorm,
    active: Box<dyn Scheme<S>>,
    switcher: Switcher<S>,
    cfg: ControlConfig,
    pi: PiController,
    direction: f64,
    /// Magnitude of the next step the accuracy rule proposes.
    h: f64,
    stats: ControlStats,
    /// Whether the active scheme is implicit, and its method (kept in
    /// step with switches).
    implicit_active: bool,
    method_active: Method,
    /// The active scheme's time, kept here so a step starts without a
    /// call through the scheme (every scheme advances by exactly `h`).
    t: f64,
    /// The end of the span (the switching pair weighs what is left of it).
    t_end: f64,
}

impl<S: System> std::fmt::Debug for Controller<S> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Controller")
            .field("method", &self.active.method())
            .field("t", &self.active.t())
            .field("h", &self.h)
            .field("stats", &self.stats)
            .finish()
    }
}

impl<S: System> Controller<S> {
    /// Sets up a run of `system` from `(t0, y0)` towards `t_end` (either
    /// direction). Inputs must already be validated (finite, consistent
    /// sizes, positive tolerances): the facade checks them at the door.
    pub fn new(
        system: S,
        t0: f64,
        y0: &[f64],
        t_end: f64,
        norm: ErrorNorm,
        cfg: ControlConfig,
    ) -> Result<Self, SetupError> {
        let n = y0.len();
        let structure = cfg
            .scheme
            .implicit
            .structure
            .clone()
            .unwrap_or_else(|| system.structure());
        let mut problem = Problem::new(system, n);
        if cfg.scheme.implicit.jacobian == ballast_core::JacobianSource::Analytic {
            let mut probe = ballast_core::Jacobian::for_structure(n, &structure);
            if !problem.system.jacobian(t0, y0, &mut probe) {
                return Err(SetupError::MissingJacobian);
            }
        }
        let (active, switcher) = Switcher::new(cfg.method, n, structure, &cfg)?;
        if cfg.fixed_step.is_none() && !active.has_error_estimate() {
            return Err(SetupError::FixedStepRequired(active.method()));
        }
        let mut f0 = vec![0.0; n];
        problem.rhs(t0, y0, &mut f0);
        if !f0.iter().all(|v| v.is_finite()) {
            return Err(SetupError::NonFiniteInitialRhs { t: t0 });
        }
        let direction = if t_end >= t0 { 1.0 } else { -1.0 };
        let span = (t_end - t0).abs();
        let (implicit_active, method_active) = (active.is_implicit(), active.method());
        let mut ctl = Self {
            problem,
            norm,
            active,
            switcher,
            cfg,
            pi: PiController::default(),
            direction,
            h: 0.0,
            stats: ControlStats::default(),
            implicit_active,
            method_active,
            t: t0,
            t_end,
        };
        ctl.h = match (ctl.cfg.fixed_step, ctl.cfg.first_step) {
            (Some(h), _) => h,
            (None, Some(h)) => h,
            (None, None) => {
                let order = ctl.switcher.opening_order(ctl.active.as_ref());
                ctl.automatic_first_step(t0, y0, &f0, order)
            }
        }
        .min(ctl.cfg.max_step)
        .min(span.max(f64::MIN_POSITIVE));
        if let Some(h) = ctl.switcher.at_start(
            &mut ctl.problem,
            &mut ctl.active,
            (t0, y0, &f0),
            ctl.h,
            &ctl.cfg,
            &mut ctl.stats,
        )? {
            ctl.h = h.min(ctl.cfg.max_step);
        }
        ctl.implicit_active = ctl.active.is_implicit();
        ctl.method_active = ctl.active.method();
        ctl.t = ctl.active.t();
        Ok(ctl)
    }

    /// The first step from `(t0, y0)` with slope `f0` for a method of `order`.
    fn automatic_first_step(&mut self, t0: f64, y0: &[f64], f0: &[f64], order: usize) -> f64 {
        let n = self.problem.n;
        let (mut y1, mut f1) = (vec![0.0; n], vec![0.0; n]);
        let p = &mut self.problem;
        initial_step(
            &self.norm,
            t0,
            y0,
            f0,
            order,
            self.direction,
            &mut y1,
            &mut f1,
            |t, y, dy| p.rhs(t, y, dy),
        )
    }

    /// The scheme now in use: current state and dense output of the last step.
    pub fn scheme(&self) -> &dyn SchemeState {
        self.active.as_ref()
    }

    /// The method now in use.
    pub fn active_method(&self) -> Method {
        debug_assert_eq!(self.method_active, self.active.method());
        self.method_active
    }

    /// Whether the scheme now in use is implicit (no call through the
    /// scheme: cheap enough to ask after every step).
    pub fn implicit_active(&self) -> bool {
        debug_assert_eq!(self.implicit_active, self.active.is_implicit());
        self.implicit_active
    }

    /// Current time.
    pub fn t(&self) -> f64 {
        self.active.t()
    }

    /// Current state.
    pub fn y(&self) -> &[f64] {
        self.active.y()
    }

    /// Magnitude of the next step the controller will try.
    pub fn next_step(&self) -> f64 {
        self.h
    }

    /// The controller's counters.
    pub fn stats(&self) -> ControlStats {
        self.stats
    }

    /// The schemes' work counters.
    pub fn counters(&self) -> WorkCounters {
        self.problem.counters
    }

    /// Every switch so far, in order.
    pub fn switches(&self) -> &[SwitchRecord] {
        self.switcher.records()
    }

    /// The latest spectral estimate `(rho, lambda)` if any.
    pub fn spectral_estimate(&self) -> Option<(f64, num_complex::Complex64)> {
        self.switcher.latest_estimate()
    }

    /// The user's system (for instance to read its state after the run).
    pub fn system(&self) -> &S {
        &self.problem.system
    }

    /// The user's system, mutably.
    pub fn system_mut(&mut self) -> &mut S {
        &mut self.problem.system
    }

    /// Consumes the controller and returns the user's system.
    pub fn into_system(self) -> S {
        self.problem.system
    }

    /// Restarts the active scheme from `(t, y)` after a discontinuity (a
    /// breakpoint or a state change at an event). The step size is kept.
    pub fn restart(&mut self, t: f64, y: &[f64]) -> Result<(), RunFailure> {
        self.pi.reset();
        let started = self.active.start(&mut self.problem, t, y);
        self.t = self.active.t();
        started.map_err(|_| RunFailure::NonFiniteRhs { t, h: self.h })
    }

    /// Takes one accepted step towards `t_limit`, never past it.
    #[inline]
    pub fn step(&mut self, t_limit: f64) -> Result<StepReport, RunFailure> {
        let mut failures = 0usize;
        // The last attempt failed on a non-finite value.
        let mut last_non_finite = false;
        loop {
            let t = self.t;
            debug_assert_eq!(t, self.active.t());
            let remaining = (t_limit - t) * self.direction;
            if remaining <= 0.0 {
                return Ok(StepReport {
                    t_prev: t,
                    t,
                    h: 0.0,
                    capped: false,
                    reached_limit: true,
                });
            }
            if self.stats.accepted + self.stats.rejected + self.stats.failed_attempts
                >= self.cfg.max_steps
            {
                return Err(RunFailure::TooManySteps {
                    t,
                    max: self.cfg.max_steps,
                });
            }
            // `self.h` never exceeds max_step (every assignment keeps it so).
            debug_assert!(self.h <= self.cfg.max_step);
            let mut h_mag = self.cfg.fixed_step.unwrap_or(self.h);
            let mut capped = false;
            if let Some(cap) = self.switcher.step_cap() {
                if cap < h_mag {
                    h_mag = cap;
                    capped = true;
                }
            }
            // Stretch the last step up to 1% rather than leave a sliver.
            let reached_limit = h_mag * 1.01 >= remaining;
            if reached_limit {
                h_mag = remaining;
            }
            let h_floor = self.cfg.min_step.max(16.0 * f64::EPSILON * t.abs());
            if h_mag < h_floor && !reached_limit {
                // Steps cut short by non-finite values: name the cause.
                return Err(if last_non_finite {
                    RunFailure::NonFiniteRhs { t, h: h_mag }
                } else {
                    RunFailure::StepSizeTooSmall { t, h: h_mag }
                });
            }
            let h = self.direction * h_mag;
            let result = self.active.attempt(&mut self.problem, h, &self.norm);
            let fixed = self.cfg.fixed_step.is_some();
            match result {
                Ok(a) if fixed || a.error <= 1.0 => {
                    self.active.accept(&mut self.problem);
                    self.stats.accepted += 1;
                    if capped {
                        self.stats.stability_limited += 1;
                    }
                    if !fixed {
                        let q = self.active.error_order();
                        let f = a.next_factor(self.pi.factor(a.error, q, true));
                        // The next step size is on every step's critical path
                        // (the stages wait for it): plain comparisons, where
                        // `f64::min` / `max` add NaN handling (all values here
                        // are finite).
                        let proposal = h_mag * f;
                        let proposal = if proposal > self.cfg.max_step {
                            self.cfg.max_step
                        } else {
                            proposal
                        };
                        // A step shortened to land on the limit says nothing
                        // about the step accuracy allows: keep the larger one.
                        if !(reached_limit && !capped && self.h > proposal) {
                            self.h = proposal;
                        }
                    }
                    // Every scheme advances its time by exactly `h`.
                    self.t = t + h;
                    debug_assert_eq!(self.active.t(), self.t);
                    let switched = if self.switcher.is_watching() {
                        self.switcher.after_accept(
                            &mut self.problem,
                            &mut self.active,
                            TakenStep {
                                h,
                                capped,
                                implicit: self.implicit_active,
                                method: self.method_active,
                                remaining: (self.t_end - self.t).abs(),
                            },
                            self.h,
                            &self.cfg,
                            &mut self.stats,
                        )
                    } else {
                        None
                    };
                    if let Some(next) = switched {
                        self.pi.reset();
                        self.h = next.min(self.cfg.max_step);
                        self.implicit_active = self.active.is_implicit();
                        self.method_active = self.active.method();
                    }
                    return Ok(StepReport {
                        t_prev: t,
                        t: self.t,
                        h,
                        capped,
                        reached_limit,
                    });
                }
                Ok(a) => {
                    last_non_finite = false;
                    self.active.reject();
                    self.stats.rejected += 1;
                    let q = self.active.error_order();
                    let f = match a.next {
                        NextStep::Factor(f) => f.min(0.9),
                        NextStep::Accuracy => self.pi.factor(a.error, q, false),
                        NextStep::AtMost(m) => self.pi.factor(a.error, q, false).min(m),
                    };
                    self.h = h_mag * f;
                    self.switcher.after_reject();
                }
                Err(failure) => {
                    last_non_finite = matches!(failure, StepFailure::NonFinite);
                    self.active.reject();
                    self.stats.failed_attempts += 1;
                    failures += 1;
                    let as_run_failure = |t: f64, h: f64| match failure {
                        StepFailure::NonFinite => RunFailure::NonFiniteRhs { t, h },
                        StepFailure::NewtonFailed => RunFailure::NewtonFailed { t, h },
                        StepFailure::SingularMatrix => RunFailure::SingularMatrix { t, h },
                    };
                    if fixed || failures >= MAX_CONSECUTIVE_FAILURES {
                        return Err(as_run_failure(t, h_mag));
                    }
                    self.h = h_mag
                        * match failure {
                            StepFailure::NonFinite => 0.25,
                            StepFailure::NewtonFailed | StepFailure::SingularMatrix => 0.5,
                        };
                    self.switcher.after_reject();
                }
            }
        }
    }
}

/// Builds the single scheme for `method`, mapping build errors.
pub(crate) fn build_scheme<S: System>(
    method: Method,
    n: usize,
    structure: &ballast_core::Structure,
    cfg: &ControlConfig,
) -> Result<Box<dyn Scheme<S>>, SetupError> {
    Ok(build::<S>(method, n, structure, &cfg.scheme)?)
}
