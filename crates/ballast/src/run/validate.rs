//! Checks every input before any work (rand's rule: the constructor
//! rejects, sampling cannot fail), so the stepping code never meets a
//! malformed request. docs/bad-input.md lists every case and its error.

use ballast_core::{Atol, Structure, System};

use crate::error::Error;
use crate::events::Event;
use crate::options::{Options, Output};

fn positive(name: &'static str, value: f64) -> Result<(), Error> {
    if value > 0.0 && value.is_finite() {
        Ok(())
    } else {
        Err(Error::InvalidStep { name, value })
    }
}

fn tolerance(name: impl FnOnce() -> String, value: f64) -> Result<(), Error> {
    if value > 0.0 && value.is_finite() {
        Ok(())
    } else {
        Err(Error::InvalidTolerance {
            name: name(),
            value,
        })
    }
}

/// The span, the initial state and the tolerances.
fn validate_problem(t0: f64, t1: f64, y0: &[f64], opts: &Options) -> Result<(), Error> {
    if !t0.is_finite() || !t1.is_finite() {
        return Err(Error::NonFiniteSpan { t0, t1 });
    }
    if t0 == t1 {
        return Err(Error::EmptySpan { t0 });
    }
    if !(t1 - t0).is_finite() {
        return Err(Error::SpanTooLong { t0, t1 });
    }
    let n = y0.len();
    if n == 0 {
        return Err(Error::EmptyState);
    }
    if let Some((index, &value)) = y0.iter().enumerate().find(|(_, v)| !v.is_finite()) {
        return Err(Error::NonFiniteInitialState { index, value });
    }
    tolerance(|| "rtol".into(), opts.rtol)?;
    if opts.rtol < Options::MIN_RTOL {
        return Err(Error::RtolTooSmall {
            value: opts.rtol,
            min: Options::MIN_RTOL,
        });
    }
    match &opts.atol {
        Atol::Scalar(a) => tolerance(|| "atol".into(), *a)?,
        Atol::Vector(v) => {
            if v.len() != n {
                return Err(Error::AtolLength {
                    expected: n,
                    got: v.len(),
                });
            }
            for (i, &a) in v.iter().enumerate() {
                tolerance(|| format!("atol[{i}]"), a)?;
            }
        }
    }
    Ok(())
}

/// Step sizes and step budget.
fn validate_steps(opts: &Options) -> Result<(), Error> {
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
    let largest = opts
        .fixed_step
        .unwrap_or(f64::INFINITY)
        .min(opts.max_step.unwrap_or(f64::INFINITY));
    if opts.min_step > largest {
        return Err(Error::StepBoundsCrossed {
            min_step: opts.min_step,
            max_step: largest,
        });
    }
    if opts.max_steps == 0 {
        return Err(Error::ZeroMaxSteps);
    }
    if opts.method.needs_fixed_step() && opts.fixed_step.is_none() {
        return Err(Error::FixedStepRequired(opts.method));
    }
    if opts.implicit.max_newton_iters == 0 {
        return Err(Error::InvalidSetup(
            "max_newton_iters must be at least 1".into(),
        ));
    }
    let rate = opts.implicit.jacobian_refresh_rate;
    if !(rate > 0.0 && rate <= 1.0) {
        return Err(Error::InvalidSetup(format!(
            "jacobian_refresh_rate must lie in (0, 1], not {rate}"
        )));
    }
    Ok(())
}

/// Checks every input before any work.
pub(crate) fn validate<S: System>(
    system: &S,
    t0: f64,
    t1: f64,
    y0: &[f64],
    opts: &Options,
    events: &[Event<'_>],
) -> Result<(), Error> {
    validate_problem(t0, t1, y0, opts)?;
    validate_steps(opts)?;
    let n = y0.len();
    let (lo, hi) = if t0 < t1 { (t0, t1) } else { (t1, t0) };
    if let Output::At(times) = &opts.output {
        if let Some(&t) = times.iter().find(|&&t| !(t >= lo && t <= hi)) {
            return Err(Error::OutputTimeOutsideSpan { t, t0, t1 });
        }
    }
    if let Some(&value) = opts.breakpoints.iter().find(|b| !b.is_finite()) {
        return Err(Error::NonFiniteBreakpoint { value });
    }
    for (index, e) in events.iter().enumerate() {
        let value = e.get_time_tolerance();
        if !(value >= 0.0 && value.is_finite()) {
            return Err(Error::InvalidEventTolerance { index, value });
        }
    }
    let structure = opts
        .implicit
        .structure
        .clone()
        .unwrap_or_else(|| system.structure());
    match &structure {
        Structure::Dense => {}
        Structure::Banded { lower, upper } => {
            if *lower >= n && *upper >= n {
                return Err(Error::InvalidSetup(format!(
                    "band widths ({lower}, {upper}) exceed the dimension {n}"
                )));
            }
        }
        Structure::Sparse(p) => {
            if p.dim() != n {
                return Err(Error::JacobianDimension {
                    state: n,
                    jacobian: p.dim(),
                });
            }
        }
    }
    Ok(())
}
