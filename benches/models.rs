//! Every registered model × its leading methods × two tolerances.
//!
//! ```text
//! cargo bench --bench models                 # everything (a few minutes)
//! cargo bench --bench models -- robertson    # one model (criterion filter)
//! ```
//!
//! The contenders are those of the `compare` example's short list
//! (`examples/compare/lineup.rs`), with the same settings; runs keep only
//! the final state. A combination that fails is reported and skipped.

use std::hint::black_box;
use std::time::Duration;

use ballast::{integrate, Output};
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};

#[allow(dead_code)] // `lineup::full` serves the example
#[path = "../examples/compare/lineup.rs"]
mod lineup;

/// The two tolerances (`atol = 1e-3 rtol`, as in the example).
const RTOLS: [f64; 2] = [1e-5, 1e-8];

/// Largest model on which the dense-Jacobian variants are timed: on the
/// 1000-equation Brusselator a dense run takes seconds (the `compare`
/// example measures it; ten criterion samples of it would take minutes).
const DENSE_VARIANTS_UP_TO: usize = 200;

fn models(c: &mut Criterion) {
    for case in ballast_models::all() {
        let mut g = c.benchmark_group(format!("models/{}", case.name));
        g.sample_size(10)
            .warm_up_time(Duration::from_millis(200))
            .measurement_time(Duration::from_secs(1));
        let entries = lineup::entries(&case, &lineup::short(case.character))
            .into_iter()
            .filter(|e| {
                case.dim() <= DENSE_VARIANTS_UP_TO || !e.label.ends_with(lineup::DENSE_SUFFIX)
            });
        for entry in entries {
            for rtol in RTOLS {
                let opts = entry
                    .options
                    .clone()
                    .rtol(rtol)
                    .atol(rtol * 1e-3)
                    .output(Output::Final);
                if let Err(e) = integrate(case.system.clone(), case.span, &case.y0, &opts) {
                    eprintln!(
                        "{} / {} / rtol {rtol:e}: skipped, {e}",
                        case.name, entry.label
                    );
                    continue;
                }
                let id = BenchmarkId::new(entry.label.as_str(), format!("rtol={rtol:e}"));
                g.bench_with_input(id, &opts, |b, opts| {
                    b.iter(|| integrate(case.system.clone(), case.span, black_box(&case.y0), opts))
                });
            }
        }
        g.finish();
    }
}

criterion_group!(benches, models);
criterion_main!(benches);
