//! The driver: checks the input at the door, runs the controller, keeps the
//! output the options ask for, locates events, calls the observer.

use std::ops::ControlFlow;

use ballast_core::{Atol, ErrorNorm, Structure, System};
use ballast_switch::{ControlConfig, Controller, RunFailure, SetupError};

use crate::error::Error;
use crate::events::{Event, EventTracker};
use crate::options::{Options, Output};
use crate::solution::{DenseRecord, Solution, Stats};

/// What an observer sees after each accepted step.
#[derive(Debug)]
pub struct StepInfo<'a> {
    /// Time reached.
    pub t: f64,
    /// State reached.
    pub y: &'a [f64],
    /// The step just taken.
    pub h: f64,
    /// The method now in use.
    pub method: ballast_core::Method,
    /// Counters so far.
    pub stats: Stats,
}

/// Why a run ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum StopReason {
    /// It reached the end of the span.
    ReachedEnd,
    /// A terminal event (its index) ended it.
    TerminalEvent(usize),
    /// The observer asked to stop.
    ObserverStopped,
}

type Observer<'o> = Box<dyn FnMut(&StepInfo<'_>) -> ControlFlow<()> + 'o>;

/// A run with events or an observer; [`integrate`] is the plain case.
///
/// ```
/// use ballast::{Direction, Event, Options, Run};
/// // A falling body, y'' = -9.81 from height 10: it lands at sqrt(2*10/9.81) (closed form).
/// let sol = Run::new(
///     |_t: f64, y: &[f64], dy: &mut [f64]| { dy[0] = y[1]; dy[1] = -9.81; },
///     (0.0, 5.0), &[10.0, 0.0], &Options::default().rtol(1e-10).atol(1e-12))
///     .event(Event::new(|_t, y: &[f64]| y[0]).direction(Direction::Falling).terminal())
///     .solve()?;
/// assert!((sol.t_final() - (20.0f64 / 9.81).sqrt()).abs() < 1e-9);
/// # Ok::<(), ballast::Error>(())
/// ```
pub struct Run<'o, S: System> {
    system: S,
    span: (f64, f64),
    y0: Vec<f64>,
    opts: Options,
    events: Vec<Event>,
    observer: Option<Observer<'o>>,
}

impl<'o, S: System> Run<'o, S> {
    /// A run of `system` over `span` from `y0`.
    pub fn new(system: S, span: (f64, f64), y0: &[f64], opts: &Options) -> Self {
        Self {
            system,
            span,
            y0: y0.to_vec(),
            opts: opts.clone(),
            events: Vec::new(),
            observer: None,
        }
    }

    /// Adds an event function.
    pub fn event(mut self, event: Event) -> Self {
        self.events.push(event);
        self
    }

    /// Calls `observer` after each accepted step; returning
    /// `ControlFlow::Break(())` ends the run there (successfully).
    pub fn observer(mut self, observer: impl FnMut(&StepInfo<'_>) -> ControlFlow<()> + 'o) -> Self {
        self.observer = Some(Box::new(observer));
        self
    }

    /// Runs the integration.
    pub fn solve(self) -> Result<Solution, Error> {
        self.solve_with_reason().map(|(s, _)| s)
    }

    /// Runs the integration and says why it ended.
    pub fn solve_with_reason(self) -> Result<(Solution, StopReason), Error> {
        let Run {
            system,
            span: (t0, t1),
            y0,
            opts,
            events,
            mut observer,
        } = self;
        validate(&system, t0, t1, &y0, &opts)?;
        let n = y0.len();
        let norm = ErrorNorm::new(opts.rtol, opts.atol.clone(), n);
        let cfg = ControlConfig {
            method: opts.method,
            scheme: ballast_core::SchemeOptions {
                implicit: opts.implicit.clone(),
            },
            fixed_step: opts.fixed_step,
            first_step: opts.first_step,
            max_step: opts.max_step.unwrap_or(f64::INFINITY),
            min_step: opts.min_step,
            max_steps: opts.max_steps,
            stability_cap: opts.stability_cap,
            switching: opts.switching.clone(),
        };
        let mut ctl = Controller::new(system, t0, &y0, t1, norm, cfg).map_err(|e| match e {
            SetupError::NonFiniteInitialRhs { t } => Error::NonFiniteInitialRhs { t },
            SetupError::FixedStepRequired(m) => Error::FixedStepRequired(m),
            other => Error::InvalidSetup(other.to_string()),
        })?;

        let mut out = OutputKeeper::new(&opts, n, t0, t1, &y0);
        let mut tracker = EventTracker::new(events, n);
        tracker.start(t0, &y0);
        let mut sol = Solution {
            n,
            method: opts.method,
            output_mode: out.mode_name(),
            t0,
            t: Vec::new(),
            y: Vec::new(),
            dense: None,
            t_final: t0,
            y_final: y0.clone(),
            stats: Stats::default(),
            switches: Vec::new(),
            events: Vec::new(),
        };
        let mut breakpoints = sorted_breakpoints(&opts.breakpoints, t0, t1);
        let mut reason = StopReason::ReachedEnd;
        loop {
            let limit = breakpoints.first().copied().unwrap_or(t1);
            let report = match ctl.step(limit) {
                Ok(r) => r,
                Err(failure) => {
                    finish(&mut sol, &ctl, &mut out);
                    return Err(run_error(failure, sol));
                }
            };
            let scheme = ctl.scheme();
            let mut t_end = report.t;
            if report.reached_limit {
                t_end = limit;
            }
            let mut stop = false;
            if !tracker.is_empty() {
                let before = sol.events.len();
                if let Some(te) = tracker.scan(
                    report.t_prev,
                    t_end,
                    scheme.y(),
                    |t, o| scheme.interpolate(t, o),
                    &mut sol.events,
                ) {
                    t_end = te;
                    stop = true;
                    reason = StopReason::TerminalEvent(sol.events[sol.events.len() - 1].index);
                }
                let _ = before;
            }
            let y_end: Vec<f64>;
            let y_now: &[f64] = if stop {
                let mut y = vec![0.0; n];
                scheme.interpolate(t_end, &mut y);
                y_end = y;
                &y_end
            } else {
                scheme.y()
            };
            out.record(report.t_prev, t_end, y_now, scheme);
            sol.t_final = t_end;
            sol.y_final.copy_from_slice(y_now);
            if let Some(obs) = observer.as_mut() {
                let info = StepInfo {
                    t: t_end,
                    y: y_now,
                    h: report.h,
                    method: ctl.active_method(),
                    stats: gather_stats(&ctl),
                };
                if obs(&info).is_break() && !stop {
                    stop = true;
                    reason = StopReason::ObserverStopped;
                }
            }
            if stop {
                break;
            }
            if report.reached_limit {
                if limit == t1 {
                    break;
                }
                breakpoints.remove(0);
                let y_here = ctl.y().to_vec();
                if let Err(failure) = ctl.restart(limit, &y_here) {
                    finish(&mut sol, &ctl, &mut out);
                    return Err(run_error(failure, sol));
                }
            }
        }
        finish(&mut sol, &ctl, &mut out);
        Ok((sol, reason))
    }
}

/// Integrates `y' = f(t, y)` over `t_span` from `y0`.
///
/// `system` is any closure `FnMut(f64, &[f64], &mut [f64])` or a type
/// implementing [`System`]. `t_span.1 < t_span.0` integrates backwards.
///
/// ```
/// use ballast::{integrate, Options};
/// // y' = -50 (y - cos t): the exact solution approaches cos t + sin t / 50 quickly.
/// let sol = integrate(
///     |t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -50.0 * (y[0] - t.cos()),
///     (0.0, 2.0), &[0.0], &Options::default().rtol(1e-6).atol(1e-9))?;
/// assert_eq!(sol.t_final(), 2.0);
/// # Ok::<(), ballast::Error>(())
/// ```
pub fn integrate<S: System>(
    system: S,
    t_span: (f64, f64),
    y0: &[f64],
    opts: &Options,
) -> Result<Solution, Error> {
    Run::new(system, t_span, y0, opts).solve()
}

fn gather_stats<S: System>(ctl: &Controller<S>) -> Stats {
    let w = ctl.counters();
    let c = ctl.stats();
    Stats {
        rhs_evals: w.rhs_evals,
        jacobian_evals: w.jacobian_evals,
        jacobian_rhs_evals: w.jacobian_rhs_evals,
        factorizations: w.factorizations,
        linear_solves: w.linear_solves,
        newton_iters: w.newton_iters,
        newton_failures: w.newton_failures,
        accepted: c.accepted,
        rejected: c.rejected,
        failed_attempts: c.failed_attempts,
        stability_limited: c.stability_limited,
        switches: c.switches,
        spectral_estimates: c.spectral_estimates,
        spectral_products: c.spectral_products,
    }
}

fn finish<S: System>(sol: &mut Solution, ctl: &Controller<S>, out: &mut OutputKeeper) {
    sol.stats = gather_stats(ctl);
    sol.switches = ctl.switches().to_vec();
    out.finish(sol);
}

fn run_error(failure: RunFailure, sol: Solution) -> Error {
    let partial = Box::new(sol);
    match failure {
        RunFailure::StepSizeTooSmall { t, h } => Error::StepSizeTooSmall { t, h, partial },
        RunFailure::TooManySteps { t, max } => Error::TooManySteps { t, max, partial },
        RunFailure::NonFiniteRhs { t, h } => Error::NonFiniteRhs { t, h, partial },
        RunFailure::NewtonFailed { t, h } => Error::NewtonFailed { t, h, partial },
        RunFailure::SingularMatrix { t, h } => Error::SingularMatrix { t, h, partial },
        other => Error::InvalidSetup(other.to_string()),
    }
}

fn sorted_breakpoints(points: &[f64], t0: f64, t1: f64) -> Vec<f64> {
    let forward = t1 > t0;
    let mut v: Vec<f64> = points
        .iter()
        .copied()
        .filter(|&b| {
            if forward {
                b > t0 && b < t1
            } else {
                b < t0 && b > t1
            }
        })
        .collect();
    v.sort_by(|a, b| {
        if forward {
            a.total_cmp(b)
        } else {
            b.total_cmp(a)
        }
    });
    v.dedup();
    v
}

/// Keeps the states the output mode asks for.
struct OutputKeeper {
    mode: Output,
    n: usize,
    t: Vec<f64>,
    y: Vec<f64>,
    dense: Option<DenseRecord>,
    /// Requested times in the direction of integration, and the next one due.
    at: Vec<f64>,
    next_at: usize,
    buf: Vec<f64>,
}

impl OutputKeeper {
    fn new(opts: &Options, n: usize, t0: f64, t1: f64, y0: &[f64]) -> Self {
        let mut k = Self {
            mode: opts.output.clone(),
            n,
            t: Vec::new(),
            y: Vec::new(),
            dense: None,
            at: Vec::new(),
            next_at: 0,
            buf: vec![0.0; n],
        };
        match &opts.output {
            Output::Steps => {
                k.t.push(t0);
                k.y.extend_from_slice(y0);
                k.dense = Some(DenseRecord::default());
            }
            Output::At(times) => {
                k.at = times.clone();
                // Validation guarantees the times lie in the span; order them
                // along the direction of integration.
                k.at.sort_by(|a, b| a.total_cmp(b));
                if t1 < t0 {
                    k.at.reverse();
                }
                while k.next_at < k.at.len() && k.at[k.next_at] == t0 {
                    k.t.push(t0);
                    k.y.extend_from_slice(y0);
                    k.next_at += 1;
                }
            }
            Output::Final => {}
        }
        k
    }

    fn mode_name(&self) -> &'static str {
        match self.mode {
            Output::Steps => "steps",
            Output::At(_) => "at requested times",
            Output::Final => "final state only",
        }
    }

    fn record(&mut self, t_prev: f64, t: f64, y: &[f64], scheme: &dyn ballast_core::SchemeState) {
        match self.mode {
            Output::Steps => {
                self.t.push(t);
                self.y.extend_from_slice(y);
                if let Some(d) = self.dense.as_mut() {
                    let deg = scheme.dense_degree();
                    let slot = d.push(t_prev, scheme.t(), deg, self.n);
                    scheme.dense_coefficients(slot);
                }
            }
            Output::At(_) => {
                let forward = t >= t_prev;
                while self.next_at < self.at.len() {
                    let ta = self.at[self.next_at];
                    let due = if forward { ta <= t } else { ta >= t };
                    if !due {
                        break;
                    }
                    if ta == t {
                        self.buf.copy_from_slice(y);
                    } else {
                        scheme.interpolate(ta, &mut self.buf);
                    }
                    self.t.push(ta);
                    self.y.extend_from_slice(&self.buf);
                    self.next_at += 1;
                }
            }
            Output::Final => {}
        }
    }

    fn finish(&mut self, sol: &mut Solution) {
        sol.t = std::mem::take(&mut self.t);
        sol.y = std::mem::take(&mut self.y);
        sol.dense = self.dense.take();
        if matches!(self.mode, Output::Final) {
            sol.t.push(sol.t_final);
            sol.y.extend_from_slice(&sol.y_final);
        }
    }
}

fn positive(name: &'static str, value: f64) -> Result<(), Error> {
    if value > 0.0 && value.is_finite() {
        Ok(())
    } else {
        Err(Error::InvalidStep { name, value })
    }
}

/// Checks every input before any work (rand's rule: the constructor rejects,
/// sampling cannot fail).
fn validate<S: System>(
    system: &S,
    t0: f64,
    t1: f64,
    y0: &[f64],
    opts: &Options,
) -> Result<(), Error> {
    if !t0.is_finite() || !t1.is_finite() {
        return Err(Error::NonFiniteSpan { t0, t1 });
    }
    if t0 == t1 {
        return Err(Error::EmptySpan { t0 });
    }
    let n = y0.len();
    if n == 0 {
        return Err(Error::EmptyState);
    }
    if let Some((index, &value)) = y0.iter().enumerate().find(|(_, v)| !v.is_finite()) {
        return Err(Error::NonFiniteInitialState { index, value });
    }
    if !(opts.rtol > 0.0 && opts.rtol.is_finite()) {
        return Err(Error::InvalidTolerance {
            name: "rtol".into(),
            value: opts.rtol,
        });
    }
    match &opts.atol {
        Atol::Scalar(a) => {
            if !(*a > 0.0 && a.is_finite()) {
                return Err(Error::InvalidTolerance {
                    name: "atol".into(),
                    value: *a,
                });
            }
        }
        Atol::Vector(v) => {
            if v.len() != n {
                return Err(Error::AtolLength {
                    expected: n,
                    got: v.len(),
                });
            }
            if let Some((i, &a)) = v
                .iter()
                .enumerate()
                .find(|(_, a)| !(**a > 0.0 && a.is_finite()))
            {
                return Err(Error::InvalidTolerance {
                    name: format!("atol[{i}]"),
                    value: a,
                });
            }
        }
    }
    if let Some(h) = opts.fixed_step {
        positive("fixed_step", h)?;
    }
    if let Some(h) = opts.first_step {
        positive("first_step", h)?;
    }
    if let Some(h) = opts.max_step {
        positive("max_step", h)?;
    }
    if !(opts.min_step >= 0.0 && opts.min_step.is_finite()) {
        return Err(Error::InvalidStep {
            name: "min_step",
            value: opts.min_step,
        });
    }
    if opts.max_steps == 0 {
        return Err(Error::InvalidSetup("max_steps must be at least 1".into()));
    }
    if opts.method.needs_fixed_step() && opts.fixed_step.is_none() {
        return Err(Error::FixedStepRequired(opts.method));
    }
    let (lo, hi) = if t0 < t1 { (t0, t1) } else { (t1, t0) };
    if let Output::At(times) = &opts.output {
        if let Some(&t) = times.iter().find(|&&t| !(t >= lo && t <= hi)) {
            return Err(Error::OutputTimeOutsideSpan { t, t0, t1 });
        }
    }
    if let Some(&b) = opts.breakpoints.iter().find(|b| !b.is_finite()) {
        return Err(Error::InvalidSetup(format!("breakpoint {b} is not finite")));
    }
    let structure = opts
        .implicit
        .structure
        .clone()
        .unwrap_or_else(|| system.structure());
    match &structure {
        Structure::Dense => {}
        Structure::Banded { lower, upper } => {
            if *lower >= n.max(1) && *upper >= n.max(1) {
                return Err(Error::InvalidSetup(format!(
                    "band widths ({lower}, {upper}) exceed the dimension {n}"
                )));
            }
        }
        Structure::Sparse(p) => {
            if p.dim() != n {
                return Err(Error::InvalidSetup(format!(
                    "the Jacobian's sparsity pattern is {}x{} but the state has {n} components",
                    p.dim(),
                    p.dim()
                )));
            }
        }
    }
    Ok(())
}
