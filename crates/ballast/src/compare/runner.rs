//! Timed runs: one integration, caught failures and panics, medians.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::time::Instant;

use super::reference::relative_error;
use super::report::Row;
use crate::{integrate, Method, Options, Output, Stats, System};

/// One combination of contender and tolerance.
#[derive(Clone, Debug)]
pub(crate) struct Job {
    pub label: String,
    pub rtol: f64,
    pub atol: f64,
    pub options: Options,
}

/// How one run ended.
#[derive(Clone, Debug)]
pub(crate) enum RunResult {
    /// Reached the end of the span.
    Finished { y: Vec<f64>, t: f64, stats: Stats },
    /// Stopped with an error (or a panic), with what was done until then.
    Failed {
        message: String,
        t: Option<f64>,
        stats: Stats,
    },
}

/// One run and its wall time.
#[derive(Clone, Debug)]
pub(crate) struct Sample {
    pub seconds: f64,
    pub result: RunResult,
}

/// Runs `opts` once on a fresh model, keeping only the final state.
/// The model is built before the clock starts.
pub(crate) fn run_once<S: System>(
    make: &dyn Fn() -> S,
    span: (f64, f64),
    y0: &[f64],
    opts: &Options,
) -> Sample {
    let opts = opts.clone().output(Output::Final);
    let outer = Instant::now();
    let caught = catch_unwind(AssertUnwindSafe(|| {
        let system = make();
        let start = Instant::now();
        let result = integrate(system, span, y0, &opts);
        (start.elapsed().as_secs_f64(), result)
    }));
    match caught {
        Ok((seconds, Ok(sol))) => Sample {
            seconds,
            result: RunResult::Finished {
                y: sol.y_final().to_vec(),
                t: sol.t_final(),
                stats: *sol.stats(),
            },
        },
        Ok((seconds, Err(e))) => {
            let message = e.to_string();
            let (t, stats) = match e.partial() {
                Some(p) => (Some(p.t_final()), *p.stats()),
                None => (None, Stats::default()),
            };
            Sample {
                seconds,
                result: RunResult::Failed { message, t, stats },
            }
        }
        Err(payload) => {
            let what = payload
                .downcast_ref::<&str>()
                .map(|s| s.to_string())
                .or_else(|| payload.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "no message".into());
            Sample {
                seconds: outer.elapsed().as_secs_f64(),
                result: RunResult::Failed {
                    message: format!("panicked: {what}"),
                    t: None,
                    stats: Stats::default(),
                },
            }
        }
    }
}

/// Shortest time one timed repetition should take. A run below it is
/// repeated back to back within the repetition (its mean time is the
/// sample): a few-microsecond run timed alone is at the mercy of the
/// clock's resolution and of the caches the other contenders just used,
/// which moved ratios of sub-millisecond runs by about ±0.15 between two
/// comparisons (common practice in benchmark harnesses; the constant is
/// ours).
pub(crate) const MIN_SAMPLE_SECONDS: f64 = 1e-3;

/// Most runs batched into one repetition.
const MAX_BATCH: usize = 1000;

/// One timed repetition: `make`'s model run with `opts` back to back until
/// [`MIN_SAMPLE_SECONDS`] have passed (once, for a run that long), keeping
/// the mean time per run and the last run's outcome (a failure ends the
/// batch).
fn run_batch<S: System>(
    make: &dyn Fn() -> S,
    span: (f64, f64),
    y0: &[f64],
    opts: &Options,
) -> Sample {
    let mut last = run_once(make, span, y0, opts);
    let (mut total, mut runs) = (last.seconds, 1usize);
    while total < MIN_SAMPLE_SECONDS
        && runs < MAX_BATCH
        && matches!(last.result, RunResult::Finished { .. })
    {
        last = run_once(make, span, y0, opts);
        total += last.seconds;
        runs += 1;
    }
    Sample {
        seconds: total / runs as f64,
        result: last.result,
    }
}

/// Runs every job `repeats` times, interleaved, and condenses each into a
/// row; a repetition of a short run is a batch (see [`run_batch`]).
pub(crate) fn measure_all<S: System>(
    make: &dyn Fn() -> S,
    span: (f64, f64),
    y0: &[f64],
    jobs: &[Job],
    repeats: usize,
    reference: Option<&[f64]>,
    floor: f64,
) -> Vec<Row> {
    let mut samples: Vec<Vec<Sample>> = vec![Vec::new(); jobs.len()];
    for _ in 0..repeats {
        for (job, done) in jobs.iter().zip(samples.iter_mut()) {
            let failed = done
                .iter()
                .any(|s| matches!(s.result, RunResult::Failed { .. }));
            if !failed {
                done.push(run_batch(make, span, y0, &job.options));
            }
        }
    }
    jobs.iter()
        .zip(samples)
        .map(|(job, done)| condense(job, done, span.0, reference, floor))
        .collect()
}

/// The row of one job: its failure if any run failed, else the run of
/// median time (for an even count, the time is the mean of the middle two
/// and the counters those of the faster of them).
fn condense(
    job: &Job,
    mut done: Vec<Sample>,
    t0: f64,
    reference: Option<&[f64]>,
    floor: f64,
) -> Row {
    let method: Method = job.options.get_method();
    let timed_runs = done.len();
    let mut row = Row {
        label: job.label.clone(),
        method,
        rtol: job.rtol,
        atol: job.atol,
        error: None,
        seconds: f64::NAN,
        stats: Stats::default(),
        t_reached: t0,
        failure: None,
        timed_runs,
    };
    if let Some(i) = done
        .iter()
        .position(|s| matches!(s.result, RunResult::Failed { .. }))
    {
        let s = done.swap_remove(i);
        row.seconds = s.seconds;
        if let RunResult::Failed { message, t, stats } = s.result {
            row.failure = Some(message);
            row.stats = stats;
            row.t_reached = t.unwrap_or(t0);
        }
        return row;
    }
    done.sort_by(|a, b| a.seconds.total_cmp(&b.seconds));
    let mid = (done.len() - 1) / 2;
    row.seconds = if done.len() % 2 == 0 {
        0.5 * (done[mid].seconds + done[mid + 1].seconds)
    } else {
        done[mid].seconds
    };
    if let RunResult::Finished { y, t, stats } = &done[mid].result {
        row.stats = *stats;
        row.t_reached = *t;
        row.error = reference.map(|r| relative_error(y, r, floor));
    }
    row
}
