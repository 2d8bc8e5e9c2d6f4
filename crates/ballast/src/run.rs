//! The driver: checks the input at the door, runs the controller, keeps the
//! output the options ask for, steps onto breakpoints, locates events,
//! calls the observer, and turns a failure into an error that keeps the
//! solution computed so far.

mod guard;
mod output;
mod validate;

use std::ops::ControlFlow;

use ballast_core::{ErrorNorm, System};
use ballast_switch::{ControlConfig, Controller, RunFailure, SetupError};

use crate::error::Error;
use crate::events::{Event, EventTracker, NonFiniteEvent};
use crate::options::Options;
use crate::solution::{Solution, Stats};
use guard::Guarded;
use output::OutputKeeper;
use validate::validate;

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

/// A run with events, an observer or breakpoints; [`integrate`] is the plain case.
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
    events: Vec<Event<'o>>,
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
    pub fn event(mut self, event: Event<'o>) -> Self {
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
        validate(&system, t0, t1, &y0, &opts, &events)?;
        let n = y0.len();
        let norm = ErrorNorm::new(opts.rtol, opts.atol.clone(), n);
        let cfg = ControlConfig {
            method: opts.method,
            scheme: ballast_core::SchemeOptions {
                implicit: opts.implicit.clone(),
                // Only final-state output without events can do without the
                // schemes' own continuous extensions.
                dense_output: !(matches!(opts.output, crate::options::Output::Final)
                    && events.is_empty()),
            },
            fixed_step: opts.fixed_step,
            first_step: opts.first_step,
            max_step: opts.max_step.unwrap_or(f64::INFINITY),
            min_step: opts.min_step,
            max_steps: opts.max_steps,
            stability_cap: opts.stability_cap,
            switching: opts.switching.clone(),
        };
        let mut ctl =
            Controller::new(Guarded::new(system), t0, &y0, t1, norm, cfg).map_err(|e| match e {
                SetupError::NonFiniteInitialRhs { t } => Error::NonFiniteInitialRhs { t },
                SetupError::FixedStepRequired(m) => Error::FixedStepRequired(m),
                other => Error::InvalidSetup(other.to_string()),
            })?;

        let mut out = OutputKeeper::new(&opts, n, t0, t1, &y0);
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
        let mut tracker = EventTracker::new(events, n);
        // Without events the final state is always the scheme's current
        // one (every exit happens right after an accepted step or a failed
        // attempt, which leaves the state alone): it is copied once, at the
        // end, instead of after every step.
        let final_from_scheme = tracker.is_empty();
        if let Err(e) = tracker.start(t0, &y0) {
            finish(&mut sol, &ctl, &mut out, final_from_scheme);
            return Err(event_error(e, sol));
        }
        let mut breakpoints = Breakpoints::new(&opts.breakpoints, t0, t1);
        let mut reason = StopReason::ReachedEnd;
        loop {
            // A breakpoint b is approached to the last float before it, and
            // the scheme restarts at the first float after it: no stage of
            // either neighbouring step evaluates f at b itself, so a forcing
            // that jumps at b is seen from the correct side whichever side
            // it assigns to b. The state moves by ~ulp(b) |f| in between,
            // far below any tolerance; the output reports the time b.
            let (limit, goal) = match breakpoints.next() {
                Some(b) => (breakpoints.before(b), b),
                None => (t1, t1),
            };
            let implicit = ctl.implicit_active();
            ctl.system_mut().prepare(implicit);
            let report = match ctl.step(limit) {
                Ok(r) => r,
                Err(failure) => {
                    let failure = diagnose(failure, &ctl);
                    finish(&mut sol, &ctl, &mut out, final_from_scheme);
                    return Err(run_error(failure, sol));
                }
            };
            let scheme = ctl.scheme();
            let mut t_end = if report.reached_limit { goal } else { report.t };
            let mut stop = false;
            if !tracker.is_empty() {
                let found = tracker.scan(
                    report.t_prev,
                    t_end,
                    scheme.y(),
                    |t, o| scheme.interpolate(t, o),
                    &mut sol.events,
                );
                match found {
                    Ok(Some(te)) => {
                        t_end = te;
                        stop = true;
                        reason = StopReason::TerminalEvent(sol.events[sol.events.len() - 1].index);
                    }
                    Ok(None) => {}
                    Err(e) => {
                        finish(&mut sol, &ctl, &mut out, final_from_scheme);
                        return Err(event_error(e, sol));
                    }
                }
            }
            let y_event: Vec<f64>;
            let y_now: &[f64] = if stop {
                y_event = sol.events[sol.events.len() - 1].y.clone();
                &y_event
            } else {
                scheme.y()
            };
            out.record(report.t_prev, t_end, y_now, scheme);
            sol.t_final = t_end;
            if !final_from_scheme {
                sol.y_final.copy_from_slice(y_now);
            }
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
            if stop || (report.reached_limit && goal == t1) {
                break;
            }
            if report.reached_limit {
                let restart_at = breakpoints.after(goal);
                breakpoints.pop();
                let y_here = ctl.y().to_vec();
                if let Err(failure) = ctl.restart(restart_at, &y_here) {
                    finish(&mut sol, &ctl, &mut out, final_from_scheme);
                    return Err(run_error(failure, sol));
                }
            }
        }
        finish(&mut sol, &ctl, &mut out, final_from_scheme);
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

/// The breakpoints strictly inside the span, in the direction of
/// integration, each at least two floats past the previous one (closer
/// ones could not be stepped between).
struct Breakpoints {
    /// In reverse order of integration, so the next one is at the end.
    pending: Vec<f64>,
    /// `+1` forwards, `-1` backwards.
    dir: f64,
}

impl Breakpoints {
    fn new(points: &[f64], t0: f64, t1: f64) -> Self {
        let dir = if t1 > t0 { 1.0 } else { -1.0 };
        let mut v: Vec<f64> = points.to_vec();
        v.sort_by(|a, b| (dir * a).total_cmp(&(dir * b)));
        let mut kept: Vec<f64> = Vec::with_capacity(v.len());
        let mut last = t0;
        for b in v {
            let (before, after) = (next_float(b, -dir), next_float(b, dir));
            if dir * (before - last) > 0.0 && dir * (t1 - after) > 0.0 {
                kept.push(b);
                last = after;
            }
        }
        kept.reverse();
        Self { pending: kept, dir }
    }

    fn next(&self) -> Option<f64> {
        self.pending.last().copied()
    }

    fn pop(&mut self) {
        self.pending.pop();
    }

    /// The float next to `b` towards the start of the span.
    fn before(&self, b: f64) -> f64 {
        next_float(b, -self.dir)
    }

    /// The float next to `b` towards the end of the span.
    fn after(&self, b: f64) -> f64 {
        next_float(b, self.dir)
    }
}

/// The neighbour of the finite `x` in direction `dir` (`+1` up, `-1` down).
fn next_float(x: f64, dir: f64) -> f64 {
    if x == 0.0 {
        return dir * f64::from_bits(1);
    }
    let bits = x.to_bits();
    // Away from zero increases the magnitude bits.
    if (x > 0.0) == (dir > 0.0) {
        f64::from_bits(bits + 1)
    } else {
        f64::from_bits(bits - 1)
    }
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

fn finish<S: System>(
    sol: &mut Solution,
    ctl: &Controller<S>,
    out: &mut OutputKeeper,
    final_from_scheme: bool,
) {
    if final_from_scheme {
        sol.y_final.copy_from_slice(ctl.y());
    }
    sol.stats = gather_stats(ctl);
    sol.switches = ctl.switches().to_vec();
    out.finish(sol);
}

/// A failure as the facade reports it: the controller's, or the user's
/// Jacobian named as the culprit.
enum Failure {
    Run(RunFailure),
    NonFiniteJacobian { t: f64, h: f64 },
}

impl From<RunFailure> for Failure {
    fn from(f: RunFailure) -> Self {
        Failure::Run(f)
    }
}

/// Names the cause the controller could only see the symptom of: an
/// analytic Jacobian with NaN or infinity in it (the LU fails or Newton
/// diverges), or a right-hand side that returned NaN or infinity during the
/// failed step while the step size shrank to nothing.
fn diagnose<S: System>(failure: RunFailure, ctl: &Controller<Guarded<S>>) -> Failure {
    let g = ctl.system();
    let implicit = !ctl.active_method().is_explicit();
    match failure {
        RunFailure::NonFiniteRhs { t, h }
        | RunFailure::NewtonFailed { t, h }
        | RunFailure::SingularMatrix { t, h }
        | RunFailure::StepSizeTooSmall { t, h }
            if implicit && g.jac_bad =>
        {
            Failure::NonFiniteJacobian { t, h }
        }
        RunFailure::StepSizeTooSmall { t, h } if g.rhs_bad => {
            Failure::Run(RunFailure::NonFiniteRhs { t, h })
        }
        other => Failure::Run(other),
    }
}

fn run_error(failure: impl Into<Failure>, sol: Solution) -> Error {
    let partial = Box::new(sol);
    match failure.into() {
        Failure::NonFiniteJacobian { t, h } => Error::NonFiniteJacobian { t, h, partial },
        Failure::Run(f) => match f {
            RunFailure::StepSizeTooSmall { t, h } => Error::StepSizeTooSmall { t, h, partial },
            RunFailure::TooManySteps { t, max } => Error::TooManySteps { t, max, partial },
            RunFailure::NonFiniteRhs { t, h } => Error::NonFiniteRhs { t, h, partial },
            RunFailure::NewtonFailed { t, h } => Error::NewtonFailed { t, h, partial },
            RunFailure::SingularMatrix { t, h } => Error::SingularMatrix { t, h, partial },
            other => Error::InvalidSetup(other.to_string()),
        },
    }
}

fn event_error(e: NonFiniteEvent, sol: Solution) -> Error {
    Error::NonFiniteEvent {
        index: e.index,
        t: e.t,
        partial: Box::new(sol),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn float_neighbours() {
        for x in [1.0, -1.0, 1e-300, -3.5e7, f64::MIN_POSITIVE] {
            assert!(next_float(x, 1.0) > x && next_float(x, -1.0) < x);
            assert_eq!(next_float(next_float(x, 1.0), -1.0), x);
        }
        assert_eq!(next_float(0.0, 1.0), f64::from_bits(1));
        assert_eq!(next_float(0.0, -1.0), -f64::from_bits(1));
    }

    #[test]
    fn breakpoints_keep_only_those_one_can_step_between() {
        let b = Breakpoints::new(
            &[3.0, 0.5, 2.0, 2.0, next_float(2.0, 1.0), 0.0, 9.0],
            0.0,
            3.0,
        );
        // 0 and 3 are the span's ends, 9 lies outside, the duplicate and
        // the neighbouring float of 2 cannot be stepped between.
        let mut order = Vec::new();
        let mut b = b;
        while let Some(x) = b.next() {
            order.push(x);
            b.pop();
        }
        assert_eq!(order, vec![0.5, 2.0]);
        let mut back = Breakpoints::new(&[0.5, 2.0], 3.0, 0.0);
        assert_eq!(back.next(), Some(2.0));
        assert!(back.before(2.0) > 2.0 && back.after(2.0) < 2.0);
        back.pop();
        assert_eq!(back.next(), Some(0.5));
    }
}
