//! Dense LU: nalgebra kernels against faer, factor + one solve, sizes 4..200.
//! The crossover chosen from this bench is `linalg::dense::FAER_CROSSOVER`.
use ballast_core::linalg::dense::DenseLu;
use ballast_core::Jacobian;
use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use std::time::Duration;

/// A well-conditioned test matrix (diagonally dominant after the shift).
fn matrix(n: usize) -> Jacobian {
    let mut j = Jacobian::dense(n);
    for c in 0..n {
        for r in 0..n {
            j.set(r, c, ((r * 31 + c * 17) % 13) as f64 / 13.0 - 0.5);
        }
    }
    j
}

fn crossover(c: &mut Criterion) {
    let mut g = c.benchmark_group("dense_lu");
    g.measurement_time(Duration::from_millis(800))
        .warm_up_time(Duration::from_millis(200))
        .sample_size(20);
    for n in [4usize, 8, 16, 24, 32, 48, 64, 96, 128, 200] {
        let j = matrix(n);
        let shift = n as f64;
        let b: Vec<f64> = (0..n).map(|i| i as f64).collect();
        for (name, faer) in [("nalgebra", false), ("faer", true)] {
            let mut lu = DenseLu::<f64>::with_kernel(n, faer);
            let mut x = b.clone();
            g.bench_with_input(BenchmarkId::new(name, n), &n, |bch, _| {
                bch.iter(|| {
                    lu.factor(black_box(shift), black_box(&j)).unwrap();
                    x.copy_from_slice(&b);
                    lu.solve_in_place(&mut x);
                    black_box(x[0])
                })
            });
        }
    }
    g.finish();
}

criterion_group!(benches, crossover);
criterion_main!(benches);
