//! Which scheme runs, how far its step may go, and when to switch.
//!
//! An explicit scheme is capped at `h_stab = cap_safety * r(theta) / rho`
//! (see [`crate::monitor`]). A switching pair starts explicit (unless the
//! first estimate already holds the explicit scheme below the first step
//! and the implicit one is expected cheaper: then it opens implicit and
//! builds the explicit scheme only if the run returns to it); it moves to
//! the implicit scheme when the cap has held the step for
//! `capped_steps_to_switch` accepted steps and the implicit scheme's
//! expected cost per unit time is lower, and back when the implicit step
//! `h` satisfies `h * rho <= return_margin * r(theta)` of the explicit
//! region for `fitting_steps_to_return` steps. At least
//! `min_steps_between_switches` steps separate two switches.
//!
//! Costs per unit time are `seconds per step / h`, from measured
//! quantities: the time of the runs of explicit steps the cap holds
//! (before one is timed, its right-hand-side calls per step at the time
//! per call measured during the spectral estimates), and, once the
//! implicit scheme has run, the time of its runs (which includes Jacobians
//! and factorisations). A run is timed as a whole, one clock reading at
//! its start and one per decision, so a step slowed by a one-time cost
//! (the first use of the implicit scheme's memory, an interrupt) weighs
//! as one step among all of the run, not as one sample among two. Before
//! the implicit scheme has run once, its step is predicted as
//! `PRIOR_RHS_PER_IMPLICIT_STEP` calls plus an LU of the Jacobian's structure at
//! `PRIOR_SECONDS_PER_FLOP`; after the first switch measurements replace
//! the prior.
//!
//! A long held run triggers a trial switch even when the prediction does
//! not favour it; a trial measured dearer switches back (after 4 implicit
//! steps when eight times dearer, after 12 when twice, else after
//! `min_steps_between_switches`) and
//! lengthens the run needed for the next one, unless the stiffness has
//! doubled since. No trial starts with less of the span left than the 12
//! implicit steps it needs before it can be judged, and a repeated trial
//! only where its expected waste is a small part of the work left. A
//! return to the explicit scheme is decided on a fresh spectral estimate
//! (the implicit steps are long, and the stiffness may have grown since the
//! last one).

use std::time::Instant;

use ballast_core::{Method, Problem, Scheme, SchemeState, Structure, System};
use num_complex::Complex64;

use crate::config::ControlConfig;
use crate::controller::{build_scheme, ControlStats, TakenStep};
use crate::error::SetupError;
use crate::monitor::{critical_step, current_region, Monitor, Spectrum};

/// Prior for an implicit step before it has been measured: one
/// right-hand-side call for the stage start plus three stages times two
/// Newton iterations (a typical Radau IIA step; Hairer and Wanner II, IV.8).
const PRIOR_RHS_PER_IMPLICIT_STEP: f64 = 7.0;

/// Prior time per floating-point operation of a small dense LU (about one
/// GFlop/s; common practice as an order of magnitude). Used only until the
/// implicit scheme's own steps are timed.
const PRIOR_SECONDS_PER_FLOP: f64 = 1e-9;

/// Floating-point operations of one real LU of an `n × n` iteration
/// matrix whose Jacobian has `structure`, for the prior only: `2/3 n^3`
/// dense; `2 n l (l + u)` for `l` sub- and `u` super-diagonals (each
/// column's `l` multipliers update the `l + u` entries pivoting may widen
/// the row to; Golub and Van Loan, *Matrix Computations*, 4th ed., 4.3.5);
/// for a sparse pattern with `c` entries per column on average, a band of
/// that width, `n c^2` (fill-in ignored: an order of magnitude).
fn lu_flops(n: usize, structure: &Structure) -> f64 {
    let nf = n as f64;
    match structure {
        Structure::Dense => (2.0 / 3.0) * nf * nf * nf,
        Structure::Banded { lower, upper } => {
            let (l, u) = ((*lower).min(n) as f64, (*upper).min(n) as f64);
            2.0 * nf * l * (l + u)
        }
        Structure::Sparse(pattern) => {
            let c = pattern.nnz() as f64 / nf.max(1.0);
            nf * c * c
        }
    }
}

/// A run of this many steps held by stability triggers a trial switch even
/// when the predicted costs do not favour it (the implicit step cannot be
/// predicted well from explicit steps held at the stability limit); the
/// implicit scheme's cost is then measured. Each trial that turns out
/// dearer than the explicit scheme lengthens the run needed before the
/// next (see `PROBE_BACKOFF`).
const PROBE_AFTER_CAPPED_STEPS: usize = 15;

/// The implicit scheme is switched away from when its measured cost per
/// unit time exceeds the capped explicit scheme's by this factor.
const COSTLIER_FACTOR: f64 = 1.2;

/// A trial that measures this many times dearer per unit time than the
/// capped explicit scheme ends after `EARLY_RETURN_STEPS` implicit steps
/// instead of `min_steps_between_switches`, once the implicit step has
/// settled (the controller asks for less than `SETTLED_GROWTH` times the
/// last step): just after a switch the implicit steps still grow from the
/// explicit scheme's size and their cost per unit time says little.
const CLEARLY_DEARER_FACTOR: f64 = 2.0;
const EARLY_RETURN_STEPS: usize = 12;
const SETTLED_GROWTH: f64 = 1.5;

/// A trial that measures this many times dearer, its step no longer
/// growing, ends after `FAR_DEARER_RETURN_STEPS` implicit steps: no
/// start-up effect explains a factor of eight. Measured on Brusselator
/// N = 40 at rtol 1e-8, where Radau IIA 5 needs steps of 0.0066 against the
/// capped explicit 0.016 (about 20 times dearer per unit time): the trial
/// lasted from t = 0.161 to 0.248, about 14 implicit steps, and the run
/// 621-636 us; now to t = 0.193, 4 steps, and 569-571 us (Dormand-Prince
/// 5(4) alone 498 us; the ratio to it in five comparison runs 1.24-1.29 ->
/// 1.11-1.16). Every other stiff or changing model of `ballast-models` at
/// 1e-6 and 1e-8 took the same steps and switches (a shorter early return,
/// 8 steps at 4 times dearer, had cost HIRES 9 %).
const FAR_DEARER_FACTOR: f64 = 8.0;
const FAR_DEARER_RETURN_STEPS: usize = 4;

/// Whether a trial of the implicit scheme, `steps` implicit steps old and
/// measured `ratio` times dearer per unit time than the capped explicit
/// scheme, should end: once `settled` (past `min_steps_between_switches`)
/// when dearer by `COSTLIER_FACTOR`; before that only while its step is
/// not `growing`, after `EARLY_RETURN_STEPS` when dearer by
/// `CLEARLY_DEARER_FACTOR` and after `FAR_DEARER_RETURN_STEPS` when dearer
/// by `FAR_DEARER_FACTOR`.
fn trial_is_dearer(steps: usize, settled: bool, growing: bool, ratio: f64) -> bool {
    if settled {
        return ratio > COSTLIER_FACTOR;
    }
    !growing
        && ((steps >= EARLY_RETURN_STEPS && ratio > CLEARLY_DEARER_FACTOR)
            || (steps >= FAR_DEARER_RETURN_STEPS && ratio > FAR_DEARER_FACTOR))
}

/// After the implicit scheme was measured dearer and left, the held run
/// needed before the next trial grows by `PROBE_BACKOFF`, and is at least
/// `PROBE_BACKOFF * PROBE_AFTER_CAPPED_STEPS` times the measured cost ratio
/// (rounded up, at most `MAX_RATIO_BACKOFF`), unless the spectral radius
/// has grown by `PROBE_AGAIN_GROWTH` since. The geometric growth bounds
/// the total cost of trials; the ratio term makes a trial that measured the
/// implicit scheme many times dearer (it cost about that many times its
/// span of explicit work) wait longer than a close call. The implicit
/// scheme's advantage grows with the stiffness and with the smoothness of
/// the solution, which only a trial measures, so trials never stop.
/// Measured (rtol 1e-6 / 1e-8): Brusselator N = 40, where capped
/// Dormand–Prince 5(4) is up to eight times cheaper, three trials became
/// one (0.87 -> 0.68 ms, 1.11 -> 0.81 ms); compounding the ratio instead
/// waited too long on HIRES, whose implicit steps lengthen once its
/// transient has passed (0.81 -> 1.49 ms at 1e-8; this rule: 0.99).
const PROBE_BACKOFF: usize = 4;
const MAX_RATIO_BACKOFF: f64 = 8.0;
const PROBE_AGAIN_GROWTH: f64 = 2.0;

/// A trial that repeats one which measured the implicit scheme dearer
/// starts only if its expected waste is at most this fraction of the
/// explicit work left in the span (see [`room_for_trial`]).
const TRIAL_WASTE_FRACTION: f64 = 0.1;

/// Whether a forced trial whose judgement takes a span `trial`
/// (`EARLY_RETURN_STEPS` implicit steps) is worth starting with `remaining`
/// of the span left. With less than `trial` left it would only add the
/// implicit scheme's start-up to the run. A repeat of a trial that
/// measured the implicit scheme `last_ratio` times dearer per unit time
/// (at a stiffness not doubled since; `1` for a first trial) wastes about
/// `last_ratio - 1` times the explicit work over `trial` if it ends the
/// same way; it starts only if that is at most `TRIAL_WASTE_FRACTION` of
/// the explicit work left. Measured on Brusselator N = 40 at rtol 1e-6
/// (capped Dormand–Prince 5(4) two to three times cheaper per unit time),
/// six fresh runs each: 0.72-1.09 ms without this rule, 0.65-0.67 ms with
/// it (the second and third trials, at t = 3.6 or 8.6 of [0, 10], lasted
/// up to two time units); other models unchanged within the noise.
fn room_for_trial(remaining: f64, trial: f64, last_ratio: f64) -> bool {
    remaining >= trial && TRIAL_WASTE_FRACTION * remaining >= (last_ratio - 1.0) * trial
}

/// Implicit steps between two looks at the way back to the explicit scheme
/// (the estimate that decides it changes only every few steps anyway).
const RETURN_CHECK_EVERY: usize = 4;

/// A cap below this fraction of the real-axis reach comes from a ray that
/// only grazes the region (an eigenvalue near the imaginary axis): there
/// growth is slow and the error estimate governs, so no cap is applied.
const GRAZING_FRACTION: f64 = 0.01;

/// Why the controller switched schemes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum SwitchReason {
    /// The explicit scheme was held by its stability limit and the implicit
    /// scheme is expected to be cheaper per unit time.
    StabilityBound,
    /// The implicit run's steps fit inside the explicit region with margin.
    NonStiffAgain,
    /// The implicit scheme's measured cost per unit time exceeded the
    /// capped explicit scheme's.
    ExplicitCheaper,
}

impl std::fmt::Display for SwitchReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            SwitchReason::StabilityBound => "explicit step held by stability; implicit cheaper",
            SwitchReason::NonStiffAgain => "steps fit the explicit region again",
            SwitchReason::ExplicitCheaper => "implicit steps cost more than capped explicit ones",
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

/// Measured cost of one scheme: seconds and right-hand-side calls per step.
///
/// Time is measured over runs of steps (see the module text): a run opens
/// with a clock reading and closes into the totals.
#[derive(Clone, Copy, Debug, Default)]
struct CostMeter {
    /// Accepted steps and their right-hand-side calls.
    steps: usize,
    rhs: usize,
    /// Steps of closed timed runs, and their time.
    timed: usize,
    seconds: f64,
    /// The open run: its clock and `steps` when it opened.
    run: Option<(Instant, usize)>,
}

impl CostMeter {
    fn rhs_per_step(&self) -> Option<f64> {
        (self.steps > 0).then(|| self.rhs as f64 / self.steps as f64)
    }

    /// Opens a timed run unless one is open.
    fn open_run(&mut self) {
        if self.run.is_none() {
            self.run = Some((Instant::now(), self.steps));
        }
    }

    /// Closes the open run (if any) into the totals.
    fn close_run(&mut self) {
        if let Some((clock, from)) = self.run.take() {
            let steps = self.steps - from;
            if steps > 0 {
                self.seconds += clock.elapsed().as_secs_f64();
                self.timed += steps;
            }
        }
    }

    /// Drops the open run's time and steps and opens it again now: a
    /// one-time cost fell inside it.
    fn restart_run(&mut self) {
        if self.run.is_some() {
            self.run = Some((Instant::now(), self.steps));
        }
    }

    /// Mean seconds per step over the closed runs and the open one.
    fn seconds_per_step(&self) -> Option<f64> {
        let (mut seconds, mut steps) = (self.seconds, self.timed);
        if let Some((clock, from)) = self.run {
            if self.steps > from {
                seconds += clock.elapsed().as_secs_f64();
                steps += self.steps - from;
            }
        }
        (steps > 0 && seconds > 0.0).then(|| seconds / steps as f64)
    }
}

/// The scheme of a pair that is not running.
enum Standby<S: System> {
    /// A single method: there is no other scheme.
    Absent,
    /// Not built yet: the explicit scheme of a pair whose run opened on
    /// the implicit one is built only if the run ever returns to it.
    Named(Method),
    Built(Box<dyn Scheme<S>>),
}

impl<S: System> Standby<S> {
    fn exists(&self) -> bool {
        !matches!(self, Standby::Absent)
    }

    /// The method, and the order whose stability region applies to it.
    fn method_and_order(&self) -> Option<(Method, usize)> {
        match self {
            Standby::Absent => None,
            Standby::Named(m) => Some((*m, starting_order(*m))),
            Standby::Built(s) => Some((s.method(), s.order())),
        }
    }
}

/// The order a freshly started scheme of `method` steps at: multistep
/// schemes start at order 1.
fn starting_order(method: Method) -> usize {
    match method {
        Method::Adams | Method::Bdf => 1,
        m => m.order().unwrap_or(1),
    }
}

/// The switching state of a run: the standby scheme of a pair (if any),
/// the stiffness monitor, and the record of switches.
pub(crate) struct Switcher<S: System> {
    standby: Standby<S>,
    /// The structure of the Jacobian, kept to build a named standby.
    structure: Structure,
    monitor: Option<Monitor>,
    records: Vec<SwitchRecord>,
    n: usize,
    /// Cap in force for the active explicit scheme (magnitude), from the latest estimate.
    cap: Option<f64>,
    capped_run: usize,
    fitting_run: usize,
    since_switch: usize,
    explicit_cost: CostMeter,
    implicit_cost: CostMeter,
    /// Accuracy step proposed at the last accepted step that the cap did not hold.
    h_uncapped: f64,
    /// Implicit step size when the implicit scheme was last left.
    h_implicit_seen: f64,
    /// Capped steps in a row before a trial switch.
    probe_after: usize,
    /// Spectral radius when the implicit scheme was last left as dearer,
    /// and how many times dearer per unit time it was measured then.
    rho_left_dearer: Option<f64>,
    ratio_left_dearer: f64,
    /// Counter snapshot at the previous accepted step.
    last_rhs: usize,
}

impl<S: System> Switcher<S> {
    /// Builds the scheme the run holds before it opens, and the switcher
    /// around it. For a pair that is the implicit scheme (built at once, so
    /// that its options are checked before the run), with the explicit one
    /// named: [`Self::at_start`] decides which opens the run and builds the
    /// explicit scheme only if it does.
    pub(crate) fn new(
        method: Method,
        n: usize,
        structure: Structure,
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
                (build_scheme::<S>(i, n, &structure, cfg)?, Standby::Named(e))
            }
            single => (
                build_scheme::<S>(single, n, &structure, cfg)?,
                Standby::Absent,
            ),
        };
        let monitored = standby.exists()
            || (cfg.stability_cap && cfg.fixed_step.is_none() && !first.is_implicit());
        Ok((
            first,
            Self {
                standby,
                structure,
                monitor: monitored.then(|| Monitor::new(n)),
                records: Vec::new(),
                n,
                cap: None,
                capped_run: 0,
                fitting_run: 0,
                // Hysteresis separates switches; nothing precedes the first.
                since_switch: usize::MAX / 2,
                explicit_cost: CostMeter::default(),
                implicit_cost: CostMeter::default(),
                h_uncapped: 0.0,
                h_implicit_seen: 0.0,
                probe_after: PROBE_AFTER_CAPPED_STEPS,
                rho_left_dearer: None,
                ratio_left_dearer: 1.0,
                last_rhs: 0,
            },
        ))
    }

    pub(crate) fn records(&self) -> &[SwitchRecord] {
        &self.records
    }

    pub(crate) fn latest_estimate(&self) -> Option<(f64, Complex64)> {
        self.monitor
            .as_ref()
            .and_then(|m| m.latest())
            .map(|s| (s.rho, s.lambda))
    }

    /// The order for the first step's size: that of the scheme the run
    /// would open with, the explicit one of a pair.
    pub(crate) fn opening_order(&self, first: &dyn SchemeState) -> usize {
        match &self.standby {
            Standby::Named(m) => starting_order(*m),
            _ => first.order(),
        }
    }

    /// Opens the run at `(t0, y0)` with the slope `f0` known: starts the
    /// scheme and takes a first estimate, so the first step is capped too.
    /// A pair opens on its explicit scheme (built here) unless that scheme
    /// would be held far below the first step `h0`: then it opens on the
    /// implicit one, recorded as a switch, and the step to take is returned.
    pub(crate) fn at_start(
        &mut self,
        p: &mut Problem<S>,
        active: &mut Box<dyn Scheme<S>>,
        (t0, y0, f0): (f64, &[f64], &[f64]),
        h0: f64,
        cfg: &ControlConfig,
        stats: &mut ControlStats,
    ) -> Result<Option<f64>, SetupError> {
        let not_finite = |_| SetupError::NonFiniteInitialRhs { t: t0 };
        let Standby::Named(explicit) = self.standby else {
            active.start_with(p, t0, y0, Some(f0)).map_err(not_finite)?;
            if let Some(m) = self.monitor.as_mut() {
                m.estimate(p, active.as_ref(), stats);
            }
            self.refresh_cap(active.as_ref(), cfg);
            self.last_rhs = p.counters.rhs_evals;
            return Ok(None);
        };
        let rho = self.monitor.as_mut().and_then(|m| {
            m.estimate_at(p, t0, y0, Some(f0), None, stats);
            m.latest().map(|s| s.rho)
        });
        self.refresh_cap_for(explicit, starting_order(explicit), cfg);
        let implicit_cheaper = self.cap.is_some_and(|cap| {
            self.implicit_step_seconds() / h0 < self.explicit_step_seconds() / cap
        });
        let opened = match rho {
            Some(rho) if implicit_cheaper => {
                active.start_with(p, t0, y0, Some(f0)).map_err(not_finite)?;
                self.note_switch(
                    t0,
                    explicit,
                    active.as_ref(),
                    SwitchReason::StabilityBound,
                    h0,
                    rho,
                    stats,
                );
                Some(h0)
            }
            _ => {
                let mut e = build_scheme::<S>(explicit, self.n, &self.structure, cfg)?;
                e.start_with(p, t0, y0, Some(f0)).map_err(not_finite)?;
                std::mem::swap(active, &mut e);
                self.standby = Standby::Built(e);
                None
            }
        };
        self.last_rhs = p.counters.rhs_evals;
        Ok(opened)
    }

    /// The stability cap (step magnitude) for the next step of `active`.
    pub(crate) fn step_cap(&self) -> Option<f64> {
        self.cap
    }

    fn refresh_cap(&mut self, active: &dyn SchemeState, cfg: &ControlConfig) {
        if active.is_implicit() {
            self.cap = None;
            return;
        }
        self.refresh_cap_for(active.method(), active.order(), cfg);
    }

    /// The cap for an explicit `method` stepping at `order`.
    fn refresh_cap_for(&mut self, method: Method, order: usize, cfg: &ControlConfig) {
        self.cap = None;
        if !cfg.stability_cap || cfg.fixed_step.is_some() {
            return;
        }
        let (Some(m), Some(region)) = (self.monitor.as_ref(), current_region(method, order)) else {
            return;
        };
        let Some(s) = m.latest() else { return };
        let Some(h) = critical_step(region, s) else {
            return;
        };
        let real = region.summary().real_interval.unwrap_or(f64::INFINITY);
        if let Some(m) = self.monitor.as_mut() {
            m.set_reach(if real.is_finite() { real } else { 0.0 });
        }
        if h * s.rho < GRAZING_FRACTION * real {
            return;
        }
        self.cap = Some(cfg.switching.cap_safety * h);
    }

    pub(crate) fn after_reject(&mut self) {
        if let Some(m) = self.monitor.as_mut() {
            m.note_reject();
        }
    }

    /// Whether anything watches the run (a pair, or the stability cap):
    /// without a monitor [`Self::after_accept`] has nothing to do, and the
    /// controller, asking this inline, skips the call.
    #[inline]
    pub(crate) fn is_watching(&self) -> bool {
        self.monitor.is_some()
    }

    /// Bookkeeping after an accepted step: estimates, costs, switching.
    /// Returns the step size to use next when a switch happened.
    pub(crate) fn after_accept(
        &mut self,
        p: &mut Problem<S>,
        active: &mut Box<dyn Scheme<S>>,
        report: TakenStep,
        h_next: f64,
        cfg: &ControlConfig,
        stats: &mut ControlStats,
    ) -> Option<f64> {
        let m = self.monitor.as_mut()?;
        let analyses = ballast_core::stability::analyses_done();
        // Cost of the step just taken.
        let rhs_now = p.counters.rhs_evals;
        let meter = if report.implicit {
            &mut self.implicit_cost
        } else {
            &mut self.explicit_cost
        };
        meter.steps += 1;
        meter.rhs += rhs_now - self.last_rhs;
        m.note_accept();
        if report.capped {
            m.watch_closely();
        }
        self.since_switch += 1;
        if m.due(active.as_ref(), &cfg.switching) {
            m.estimate(p, active.as_ref(), stats);
            self.refresh_cap(active.as_ref(), cfg);
            let fraction = match (self.cap, report.implicit) {
                (Some(c), false) => report.h.abs() * cfg.switching.cap_safety / c,
                (None, false) => 0.0,
                // The implicit scheme needs the estimate to decide the way back.
                (_, true) => 1.0,
            };
            if let Some(m) = self.monitor.as_mut() {
                m.note_margin(fraction);
            }
        } else if matches!(report.method, Method::Adams) {
            // The region follows the current order.
            self.refresh_cap(active.as_ref(), cfg);
        }
        let spectrum = self.monitor.as_ref().and_then(|m| m.latest());
        // Nothing is decided on the step that ends the span.
        let look = report.remaining > 0.0
            && (!report.implicit || self.since_switch % RETURN_CHECK_EVERY == 0);
        let next = match (self.standby.exists() && look, spectrum) {
            (true, Some(s)) => self.consider_switch(p, active, report, h_next, s, cfg, stats),
            _ => None,
        };
        self.last_rhs = p.counters.rhs_evals;
        if ballast_core::stability::analyses_done() != analyses {
            // A stability region or ray was computed for the first time in
            // this process (once only, tens of microseconds or more): it is
            // no cost of either scheme.
            self.explicit_cost.restart_run();
            self.implicit_cost.restart_run();
        }
        next
    }

    fn seconds_per_rhs(&self) -> f64 {
        self.monitor
            .as_ref()
            .and_then(|m| m.seconds_per_rhs)
            .unwrap_or(1e-7)
    }

    /// Expected seconds per implicit step: measured once it has run, else the prior.
    fn implicit_step_seconds(&self) -> f64 {
        if let Some(s) = self.implicit_cost.seconds_per_step() {
            return s;
        }
        // A real LU plus a complex one (four real flops per complex one).
        let lu_flops = 5.0 * lu_flops(self.n, &self.structure);
        PRIOR_RHS_PER_IMPLICIT_STEP * self.seconds_per_rhs() + lu_flops * PRIOR_SECONDS_PER_FLOP
    }

    /// Expected seconds per explicit step: measured on capped steps once
    /// some were timed, else its right-hand-side calls at the measured
    /// time per call.
    fn explicit_step_seconds(&self) -> f64 {
        self.explicit_cost.seconds_per_step().unwrap_or_else(|| {
            self.explicit_cost.rhs_per_step().unwrap_or(6.0) * self.seconds_per_rhs()
        })
    }

    #[allow(clippy::too_many_arguments)]
    fn consider_switch(
        &mut self,
        p: &mut Problem<S>,
        active: &mut Box<dyn Scheme<S>>,
        report: TakenStep,
        h_next: f64,
        s: Spectrum,
        cfg: &ControlConfig,
        stats: &mut ControlStats,
    ) -> Option<f64> {
        let th = &cfg.switching;
        let (standby_method, standby_order) = self.standby.method_and_order()?;
        if !report.implicit {
            let held = report.capped
                || self
                    .cap
                    .is_some_and(|c| report.h.abs() >= th.stiff_fraction * c / th.cap_safety);
            if !held {
                self.capped_run = 0;
                self.explicit_cost.close_run();
                self.h_uncapped = h_next;
                return None;
            }
            self.capped_run += 1;
            self.explicit_cost.open_run();
            if self.capped_run < th.capped_steps_to_switch
                || self.since_switch < th.min_steps_between_switches
            {
                return None;
            }
            let h_explicit = report.h.abs();
            // After a capped step the accuracy controller's proposal says
            // little (the stiff mode dominates the error estimate): predict
            // the implicit step from the last uncapped proposal and from
            // the implicit steps seen before, whichever is larger.
            let h_pred = h_next.max(self.h_uncapped).max(self.h_implicit_seen);
            let explicit_rate = self.explicit_step_seconds() / h_explicit;
            let implicit_rate = self.implicit_step_seconds() / h_pred.max(h_explicit);
            let stiffer = self
                .rho_left_dearer
                .is_some_and(|r| s.rho >= PROBE_AGAIN_GROWTH * r);
            let probe = self.capped_run >= self.probe_after
                || (stiffer && self.capped_run >= PROBE_AFTER_CAPPED_STEPS);
            let trial = EARLY_RETURN_STEPS as f64 * h_pred.max(h_explicit);
            let last_ratio = if stiffer { 1.0 } else { self.ratio_left_dearer };
            let room = room_for_trial(report.remaining, trial, last_ratio);
            if implicit_rate >= explicit_rate && !(probe && room) {
                return None;
            }
            self.switch(
                p,
                active,
                SwitchReason::StabilityBound,
                h_pred,
                s.rho,
                (cfg, stats),
            )?;
            Some(h_pred)
        } else {
            let region = current_region(standby_method, standby_order.max(1))?;
            let h_now = report.h.abs();
            let mut s = s;
            let mut hc = critical_step(region, s);
            let fits = hc.is_none_or(|hc| h_now <= th.return_margin * hc);
            self.fitting_run = if fits {
                self.fitting_run + RETURN_CHECK_EVERY
            } else {
                0
            };
            let growing = h_next > SETTLED_GROWTH * h_now;
            // Before `EARLY_RETURN_STEPS` only a far dearer trial whose step
            // no longer grows may end: skip the costs' clock otherwise.
            if self.since_switch < FAR_DEARER_RETURN_STEPS.min(th.min_steps_between_switches)
                || (self.since_switch < EARLY_RETURN_STEPS && growing)
            {
                return None;
            }
            let settled = self.since_switch >= th.min_steps_between_switches;
            let mut h_explicit = hc.map_or(h_next, |hc| h_next.min(th.cap_safety * hc));
            let mut explicit_rate = self.explicit_step_seconds() / h_explicit;
            // The step just taken, not the proposal: proposals of an implicit
            // scheme are often cut back (Newton, rejections).
            let implicit_rate = self.implicit_step_seconds() / h_now;
            let measured = self.implicit_cost.seconds_per_step().is_some();
            let fits_again = |run: usize, explicit_rate: f64| {
                settled && run >= th.fitting_steps_to_return && explicit_rate <= implicit_rate
            };
            let steps = self.since_switch;
            let dearer = |explicit_rate: f64| {
                measured && trial_is_dearer(steps, settled, growing, implicit_rate / explicit_rate)
            };
            let m = self.monitor.as_mut()?;
            let due = fits_again(self.fitting_run, explicit_rate) || dearer(explicit_rate);
            if due && m.age() >= RETURN_CHECK_EVERY {
                // A return is due, but the implicit steps are long and the
                // estimate may predate a growth of the stiffness: decide on
                // a fresh one (a few right-hand-side calls).
                m.estimate(p, active.as_ref(), stats);
                s = m.latest()?;
                hc = critical_step(region, s);
                h_explicit = hc.map_or(h_next, |hc| h_next.min(th.cap_safety * hc));
                explicit_rate = self.explicit_step_seconds() / h_explicit;
                if !hc.is_none_or(|hc| h_now <= th.return_margin * hc) {
                    self.fitting_run = 0;
                }
            }
            let reason = if fits_again(self.fitting_run, explicit_rate) {
                SwitchReason::NonStiffAgain
            } else if dearer(explicit_rate) {
                let ratio = (implicit_rate / explicit_rate).clamp(1.0, MAX_RATIO_BACKOFF);
                self.probe_after = (self.probe_after.saturating_mul(PROBE_BACKOFF))
                    .max(PROBE_AFTER_CAPPED_STEPS * PROBE_BACKOFF * ratio.ceil() as usize);
                self.rho_left_dearer = Some(s.rho);
                self.ratio_left_dearer = ratio;
                SwitchReason::ExplicitCheaper
            } else {
                return None;
            };
            self.h_implicit_seen = h_now;
            self.switch(p, active, reason, h_explicit, s.rho, (cfg, stats))?;
            self.refresh_cap(active.as_ref(), cfg);
            Some(h_explicit)
        }
    }

    fn switch(
        &mut self,
        p: &mut Problem<S>,
        active: &mut Box<dyn Scheme<S>>,
        reason: SwitchReason,
        h: f64,
        rho: f64,
        (cfg, stats): (&ControlConfig, &mut ControlStats),
    ) -> Option<()> {
        let mut next = match std::mem::replace(&mut self.standby, Standby::Absent) {
            Standby::Built(s) => s,
            Standby::Named(m) => match build_scheme::<S>(m, self.n, &self.structure, cfg) {
                Ok(s) => s,
                Err(_) => {
                    self.standby = Standby::Named(m);
                    return None;
                }
            },
            Standby::Absent => return None,
        };
        let (t, from) = (active.t(), active.method());
        // The outgoing scheme's run ends here: starting the other scheme
        // (its first right-hand side, its first touch of memory) is no
        // cost of the outgoing one.
        let outgoing = if active.is_implicit() {
            &mut self.implicit_cost
        } else {
            &mut self.explicit_cost
        };
        outgoing.close_run();
        if next.start(p, t, active.y()).is_err() {
            outgoing.open_run();
            self.standby = Standby::Built(next);
            return None;
        }
        std::mem::swap(active, &mut next);
        self.standby = Standby::Built(next);
        self.note_switch(t, from, active.as_ref(), reason, h, rho, stats);
        Some(())
    }

    /// Records a switch from `from` to `to` (now running) and resets the
    /// runs and the cap that belonged to the scheme left.
    #[allow(clippy::too_many_arguments)]
    fn note_switch(
        &mut self,
        t: f64,
        from: Method,
        to: &dyn SchemeState,
        reason: SwitchReason,
        h: f64,
        rho: f64,
        stats: &mut ControlStats,
    ) {
        self.records.push(SwitchRecord {
            t,
            from,
            to: to.method(),
            reason,
            h,
            rho,
        });
        stats.switches += 1;
        if to.is_implicit() {
            self.implicit_cost.open_run();
        }
        if let Some(m) = self.monitor.as_mut() {
            m.watch_closely();
        }
        self.since_switch = 0;
        self.capped_run = 0;
        self.fitting_run = 0;
        self.cap = None;
    }
}

#[cfg(test)]
mod tests {
    use super::{
        lu_flops, room_for_trial, trial_is_dearer, CostMeter, CLEARLY_DEARER_FACTOR,
        COSTLIER_FACTOR, EARLY_RETURN_STEPS, FAR_DEARER_FACTOR, FAR_DEARER_RETURN_STEPS,
        TRIAL_WASTE_FRACTION,
    };

    /// A trial ends early only while its step has stopped growing, the
    /// sooner the dearer it measured; once settled, at a small margin.
    #[test]
    fn trials_end_sooner_the_dearer_they_measure() {
        let (far, clearly) = (FAR_DEARER_FACTOR * 1.01, CLEARLY_DEARER_FACTOR * 1.01);
        // A trial not settled, its step no longer growing.
        let ends = |steps, ratio| trial_is_dearer(steps, false, false, ratio);
        // Far dearer: from FAR_DEARER_RETURN_STEPS on, not before.
        assert!(!ends(FAR_DEARER_RETURN_STEPS - 1, far));
        assert!(ends(FAR_DEARER_RETURN_STEPS, far));
        // Clearly dearer: only from EARLY_RETURN_STEPS on.
        assert!(!ends(EARLY_RETURN_STEPS - 1, clearly));
        assert!(ends(EARLY_RETURN_STEPS, clearly));
        // A growing step says little about the cost per unit time.
        assert!(!trial_is_dearer(EARLY_RETURN_STEPS, false, true, 100.0));
        // Settled: any ratio above COSTLIER_FACTOR, growing or not.
        assert!(trial_is_dearer(30, true, true, COSTLIER_FACTOR * 1.01));
        assert!(!trial_is_dearer(30, true, false, COSTLIER_FACTOR));
    }
    use ballast_core::{SparsityPattern, Structure};

    /// The prior's LU counts: `2/3 n^3` dense, `2 n l (l + u)` banded, a
    /// band of the mean column count for a sparse pattern.
    #[test]
    fn lu_flops_follow_the_structure() {
        assert_eq!(lu_flops(30, &Structure::Dense), 18_000.0);
        let band = Structure::Banded { lower: 2, upper: 2 };
        assert_eq!(lu_flops(1000, &band), 16_000.0);
        // A band wider than the matrix counts as the matrix.
        let wide = Structure::Banded { lower: 9, upper: 9 };
        assert_eq!(lu_flops(3, &wide), 2.0 * 3.0 * 3.0 * 6.0);
        let diag = Structure::Sparse(SparsityPattern::diagonal(50));
        assert_eq!(lu_flops(50, &diag), 50.0);
    }

    /// A first trial needs only the span it is judged over; a repeat needs
    /// a span left whose explicit work dwarfs its expected waste.
    #[test]
    fn repeated_trials_need_room_for_their_waste() {
        let trial = 0.5;
        assert!(room_for_trial(trial, trial, 1.0));
        assert!(!room_for_trial(0.99 * trial, trial, 1.0));
        // Measured 3x dearer last time: waste 2 * trial, needs 20 trials' span.
        let needed = 2.0 * trial / TRIAL_WASTE_FRACTION;
        assert!(room_for_trial(needed, trial, 3.0));
        assert!(!room_for_trial(0.99 * needed, trial, 3.0));
    }
    use std::time::Duration;

    /// A timed run weighs every step it spans, a slow first one included:
    /// the mean is the run's time over its steps, and closed runs add up.
    #[test]
    fn cost_meter_times_whole_runs() {
        let mut m = CostMeter::default();
        assert_eq!(m.seconds_per_step(), None);
        m.steps = 3; // steps before the run are not timed
        m.open_run();
        assert_eq!(m.seconds_per_step(), None, "an empty run says nothing");
        std::thread::sleep(Duration::from_millis(20));
        m.steps += 4;
        let open = m.seconds_per_step().unwrap();
        assert!(open >= 0.020 / 4.0, "{open}");
        m.close_run();
        assert_eq!(m.timed, 4);
        let closed = m.seconds_per_step().unwrap();
        assert!(closed >= open, "{closed} < {open}");
        // Steps outside any run change nothing; a second run adds in.
        m.steps += 10;
        assert_eq!(m.seconds_per_step(), Some(closed));
        m.open_run();
        m.steps += 4;
        m.close_run();
        assert_eq!(m.timed, 8);
        assert!(m.seconds_per_step().unwrap() <= closed);
        // A restarted run forgets its slow part: only later steps count.
        let before = m.seconds_per_step().unwrap();
        m.open_run();
        std::thread::sleep(Duration::from_millis(20));
        m.steps += 1;
        m.restart_run();
        m.steps += 2;
        m.close_run();
        assert_eq!(m.timed, 10);
        assert!(
            m.seconds_per_step().unwrap() <= before,
            "the sleep was dropped"
        );
    }
}
