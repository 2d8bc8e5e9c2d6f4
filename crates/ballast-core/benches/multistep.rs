//! Multistep schemes against one-step ones on the problems of their
//! issue: Adams and Dormand–Prince 8(5,3) on Pleiades; BDF and Radau IIA 5
//! on Robertson (to t = 1e11) and the Brusselator (N = 40 and N = 500,
//! banded). Groups are problem × tolerance, one entry per method; the
//! step loop is the test-only driver of the `multistep_models` tests.
#[path = "../tests/multistep/driver.rs"]
#[allow(dead_code)]
mod driver;

use ballast_core::{build, Atol, ErrorNorm, Method, Problem, System};
use ballast_models::{get, Case, Model};
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use std::time::Duration;

/// `(case, atol / rtol, methods)`.
const CASES: [(&str, f64, [Method; 2]); 4] = [
    ("pleiades", 1.0, [Method::Adams, Method::DormandPrince853]),
    ("robertson-long", 1e-6, [Method::Bdf, Method::RadauIIA5]),
    ("brusselator", 1.0, [Method::Bdf, Method::RadauIIA5]),
    ("brusselator-500", 1.0, [Method::Bdf, Method::RadauIIA5]),
];

fn solve(case: &Case, m: Method, rtol: f64, atol_scale: f64) -> usize {
    let n = case.dim();
    let mut p: Problem<Model> = Problem::new(case.system.clone(), n);
    let norm = ErrorNorm::new(rtol, Atol::Scalar(rtol * atol_scale), n);
    let mut s = build::<Model>(m, n, &case.system.structure(), &Default::default())
        .expect("a single scheme");
    let out = driver::drive(s.as_mut(), &mut p, case.span, &case.y0, &norm, |_| {})
        .expect("the run reaches the end");
    out.accepted
}

fn multistep(c: &mut Criterion) {
    for (name, atol_scale, methods) in CASES {
        let case = get(name).expect("registered case");
        for rtol in [1e-6, 1e-9] {
            let mut g = c.benchmark_group(format!("{name}/rtol={rtol:e}"));
            g.measurement_time(Duration::from_secs(2))
                .warm_up_time(Duration::from_millis(300))
                .sample_size(10);
            for m in methods {
                g.bench_with_input(BenchmarkId::from_parameter(m.name()), &m, |b, &m| {
                    b.iter(|| black_box(solve(black_box(&case), m, rtol, atol_scale)))
                });
            }
            g.finish();
        }
    }
}

criterion_group!(benches, multistep);
criterion_main!(benches);
