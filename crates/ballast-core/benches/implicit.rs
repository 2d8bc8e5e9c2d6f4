//! Implicit schemes on Robertson (to t = 1e11), HIRES and the Brusselator
//! with N = 500 (banded), at `rtol = 1e-6`, `atol = 1e-10`, with the
//! test-only step driver. Before timing, prints one work table per case:
//! steps, right-hand-side calls, Jacobians, factorisations and the error
//! against the case's reference.
#[path = "../tests/common/driver.rs"]
mod driver;

use ballast_core::{build, Method, Problem, System};
use ballast_models::Model;
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use std::time::Duration;

const SCHEMES: [Method; 7] = [
    Method::BackwardEuler,
    Method::Trapezoid,
    Method::TrBdf2,
    Method::Esdirk43,
    Method::RadauIIA5,
    Method::Ros3p,
    Method::Rosenbrock32,
];
const CASES: [&str; 3] = ["robertson-long", "hires", "brusselator-500"];
const RTOL: f64 = 1e-6;
const ATOL: f64 = 1e-10;

fn solve(case: &ballast_models::Case, m: Method) -> Result<(Vec<f64>, driver::RunStats), String> {
    let n = case.dim();
    let mut p: Problem<Model> = Problem::new(case.system.clone(), n);
    let mut s = build::<Model>(m, n, &case.system.structure(), &Default::default())
        .map_err(|e| e.to_string())?;
    driver::run(
        s.as_mut(),
        &mut p,
        case.span.0,
        case.span.1,
        &case.y0,
        RTOL,
        ATOL,
    )
}

fn work_table() {
    for name in CASES {
        let case = ballast_models::get(name).expect("registered case");
        eprintln!(
            "\n{name} (rtol {RTOL:e}, atol {ATOL:e}); reference: {}",
            case.reference.source
        );
        eprintln!("scheme           steps  rej fail     f(all)  f(jac)     J    LU  rel.err");
        for m in SCHEMES {
            match solve(&case, m) {
                Ok((y, st)) => eprintln!(
                    "{:15} {:6} {:4} {:4} {:10} {:7} {:5} {:5}  {:.2e}",
                    m.name(),
                    st.accepted,
                    st.rejected,
                    st.failed,
                    st.work.rhs_evals,
                    st.work.jacobian_rhs_evals,
                    st.work.jacobian_evals,
                    st.work.factorizations,
                    case.reference.relative_error(&y)
                ),
                Err(e) => eprintln!("{:15} failed: {e}", m.name()),
            }
        }
    }
}

fn implicit(c: &mut Criterion) {
    work_table();
    for name in CASES {
        let case = ballast_models::get(name).expect("registered case");
        let mut g = c.benchmark_group(name);
        g.sample_size(10)
            .warm_up_time(Duration::from_millis(200))
            .measurement_time(Duration::from_secs(2));
        for m in SCHEMES {
            g.bench_with_input(BenchmarkId::from_parameter(m.name()), &m, |b, &m| {
                b.iter(|| black_box(solve(&case, m).map(|(y, _)| y[0]).unwrap_or(f64::NAN)))
            });
        }
        g.finish();
    }
}

criterion_group!(benches, implicit);
criterion_main!(benches);
