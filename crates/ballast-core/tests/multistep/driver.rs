//! A minimal step loop for tests: the scheme's own factor when it gives
//! one, else a PI controller; end-point clipping; an observer after every
//! accepted step.

use ballast_core::control::{initial_step, PiController};
use ballast_core::{ErrorNorm, Problem, Scheme, SchemeState, System, WorkCounters};

/// What a run did.
#[derive(Clone, Debug)]
pub struct Outcome {
    /// The state at the end of the span.
    pub y: Vec<f64>,
    /// Accepted steps.
    pub accepted: usize,
    /// Steps rejected by the error test.
    pub rejected: usize,
    /// Attempts that failed (Newton, non-finite values).
    pub failed: usize,
    /// The schemes' work counters.
    pub counters: WorkCounters,
}

/// Integrates from the scheme's start at `(t0, y0)` to `t1`.
pub fn drive<S: System>(
    scheme: &mut dyn Scheme<S>,
    p: &mut Problem<S>,
    (t0, t1): (f64, f64),
    y0: &[f64],
    norm: &ErrorNorm,
    observe: impl FnMut(&dyn SchemeState),
) -> Result<Outcome, String> {
    scheme
        .start(p, t0, y0)
        .map_err(|e| format!("start: {e:?}"))?;
    drive_on(scheme, p, t1, norm, None, observe)
}

/// Integrates from the scheme's current state to `t1`, from the step
/// `h0` (or an automatic first step).
pub fn drive_on<S: System>(
    scheme: &mut dyn Scheme<S>,
    p: &mut Problem<S>,
    t1: f64,
    norm: &ErrorNorm,
    h0: Option<f64>,
    mut observe: impl FnMut(&dyn SchemeState),
) -> Result<Outcome, String> {
    let n = scheme.y().len();
    let t0 = scheme.t();
    let dir = (t1 - t0).signum();
    let mut h = match h0 {
        Some(h) => h,
        None => {
            let y0 = scheme.y().to_vec();
            let f0 = scheme.dydt().map_or(vec![0.0; n], <[f64]>::to_vec);
            let (mut y1, mut f1) = (vec![0.0; n], vec![0.0; n]);
            let q0 = scheme.order();
            initial_step(norm, t0, &y0, &f0, q0, dir, &mut y1, &mut f1, |t, y, d| {
                p.rhs(t, y, d)
            })
        }
    };
    let mut pi = PiController::default();
    let (mut accepted, mut rejected, mut failed, mut fails) = (0, 0, 0, 0);
    loop {
        let t = scheme.t();
        let remaining = (t1 - t) * dir;
        if remaining <= 0.0 {
            break;
        }
        if accepted + rejected + failed > 1_000_000 {
            return Err(format!("too many steps at t = {t}"));
        }
        let last = h * 1.01 >= remaining;
        let hm = if last { remaining } else { h };
        if hm < 1e-14 * t.abs().max(1.0) && !last {
            return Err(format!("step {hm} too small at t = {t}"));
        }
        let q = scheme.error_order();
        match scheme.attempt(p, dir * hm, norm) {
            Ok(a) if a.error <= 1.0 => {
                scheme.accept(p);
                accepted += 1;
                fails = 0;
                let pf = pi.factor(a.error, q, true);
                let proposal = hm * a.next_factor(pf);
                h = if last { proposal.max(h) } else { proposal };
                observe(&*scheme);
            }
            Ok(a) => {
                scheme.reject();
                rejected += 1;
                let pf = pi.factor(a.error, q, false);
                h = hm * a.factor().map_or(pf, |f| f.min(0.9));
            }
            Err(e) => {
                scheme.reject();
                failed += 1;
                fails += 1;
                if fails > 20 {
                    return Err(format!("{e:?} repeatedly at t = {t}"));
                }
                h = hm * 0.25;
            }
        }
    }
    Ok(Outcome {
        y: scheme.y().to_vec(),
        accepted,
        rejected,
        failed,
        counters: p.counters,
    })
}
