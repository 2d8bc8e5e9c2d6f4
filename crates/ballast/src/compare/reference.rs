//! The reference solution of a study and the error measured against it.

use super::runner::{run_once, RunResult};
use super::ReferenceSpec;
use crate::{Method, Options, System};

/// The reference a report measured against.
#[derive(Clone, Debug, PartialEq)]
pub struct ReferenceInfo {
    /// Time of the reference state (the end of the span).
    pub t: f64,
    /// The reference state; `None` when it could not be obtained (then no
    /// run has an error, and the report says why in `source`).
    pub y: Option<Vec<f64>>,
    /// Where it comes from: the caller's note, or the run that computed it.
    pub source: String,
}

/// The achieved error of `y` against `reference`:
///
/// $$ \max_i \frac{|y_i - r_i|}{\max(|r_i|, \mathrm{floor})} $$
///
/// relative for components larger than `floor`, absolute (scaled by
/// `floor`) below it, so a component that is zero in the reference does
/// not make the measure infinite. This is the mixed error of the Bari test
/// set (Mazzia and Magherini, release 2.4, section on the "scd" figure,
/// from memory) with a floor of our choosing. Infinite when `y` has a
/// NaN or infinite component; `f64::NAN` only if `reference` does.
///
/// ```
/// use ballast::compare::relative_error;
/// let e = relative_error(&[1.001, 0.0], &[1.0, 1e-12], 1e-6);
/// assert!((e - 1e-3).abs() < 1e-12);
/// ```
pub fn relative_error(y: &[f64], reference: &[f64], floor: f64) -> f64 {
    let mut worst = 0.0f64;
    for (a, r) in y.iter().zip(reference) {
        let scale = r.abs().max(floor).max(f64::MIN_POSITIVE);
        let e = (a - r).abs() / scale;
        if !e.is_finite() {
            return if r.is_finite() {
                f64::INFINITY
            } else {
                f64::NAN
            };
        }
        worst = worst.max(e);
    }
    worst
}

/// A step budget for the explicit reference attempt, so that a stiff
/// model moves on to the implicit candidates in reasonable time.
const EXPLICIT_REFERENCE_STEPS: usize = 200_000;

/// The tightest relative tolerance asked of a reference run: below about
/// 1e-13 rounding error dominates in double precision (common practice).
const TIGHTEST_RTOL: f64 = 1e-13;

/// How much tighter than the tightest tolerance of the study an automatic
/// reference run is.
const REFERENCE_FACTOR: f64 = 1e-3;

/// Obtains the reference the specification asks for.
pub(crate) fn resolve<S: System>(
    spec: &ReferenceSpec,
    make: &dyn Fn() -> S,
    span: (f64, f64),
    y0: &[f64],
    base: &Options,
    pairs: &[(f64, f64)],
) -> ReferenceInfo {
    let t = span.1;
    match spec {
        ReferenceSpec::Given { y, source } => ReferenceInfo {
            t,
            y: Some(y.clone()),
            source: format!("supplied: {source}"),
        },
        ReferenceSpec::Run { method, rtol, atol } => {
            let opts = base.clone().method(*method).rtol(*rtol).atol(*atol);
            match computed(make, span, y0, &opts) {
                Ok(y) => ReferenceInfo {
                    t,
                    y: Some(y),
                    source: describe(*method, *rtol, *atol),
                },
                Err(msg) => ReferenceInfo {
                    t,
                    y: None,
                    source: format!(
                        "unavailable: {} failed ({msg})",
                        describe(*method, *rtol, *atol)
                    ),
                },
            }
        }
        ReferenceSpec::Auto => {
            let min_rtol = pairs.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
            let min_atol = pairs.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
            let rtol = (min_rtol * REFERENCE_FACTOR).max(TIGHTEST_RTOL);
            let atol = min_atol * REFERENCE_FACTOR;
            let candidates = [
                (
                    Method::DormandPrince853,
                    base.clone().max_steps(EXPLICIT_REFERENCE_STEPS),
                ),
                (Method::RadauIIA5, base.clone()),
                (Method::default(), base.clone()),
            ];
            let mut failures = Vec::new();
            for (method, opts) in candidates {
                let opts = opts.method(method).rtol(rtol).atol(atol);
                match computed(make, span, y0, &opts) {
                    Ok(y) => {
                        let mut source = describe(method, rtol, atol);
                        if !failures.is_empty() {
                            source.push_str(&format!("; tried first: {}", failures.join("; ")));
                        }
                        return ReferenceInfo {
                            t,
                            y: Some(y),
                            source,
                        };
                    }
                    Err(msg) => failures.push(format!("{method} failed ({msg})")),
                }
            }
            ReferenceInfo {
                t,
                y: None,
                source: format!("unavailable: {}", failures.join("; ")),
            }
        }
    }
}

fn describe(method: Method, rtol: f64, atol: f64) -> String {
    format!("computed: {method} at rtol {rtol:.0e}, atol {atol:.0e}")
}

fn computed<S: System>(
    make: &dyn Fn() -> S,
    span: (f64, f64),
    y0: &[f64],
    opts: &Options,
) -> Result<Vec<f64>, String> {
    match run_once(make, span, y0, opts).result {
        RunResult::Finished { y, .. } => Ok(y),
        RunResult::Failed { message, .. } => Err(message),
    }
}
