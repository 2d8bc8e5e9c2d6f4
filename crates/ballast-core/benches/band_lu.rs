//! Banded LU of `shift I - J` with two diagonals on each side (the
//! Jacobian of the Brusselator by the method of lines), n = 1000: a real
//! and a complex factorisation and solve one after the other against the
//! two paired in one sweep (`BandLu::factor_pair`, `BandLu::solve_pair`),
//! as Radau IIA 5 uses them. The README's figures come from here.
use ballast_core::linalg::band::BandLu;
use ballast_core::Jacobian;
use criterion::{criterion_group, criterion_main, Criterion};
use num_complex::Complex64;
use std::hint::black_box;
use std::time::Duration;

const N: usize = 1000;
const L: usize = 2;
const U: usize = 2;

/// A band with pseudo-random entries (a fixed linear congruential
/// sequence) and a diagonal small enough that pivoting swaps rows.
fn band() -> Jacobian {
    let mut j = Jacobian::banded(N, L, U);
    let mut x: u64 = 7;
    for c in 0..N {
        for r in c.saturating_sub(U)..(c + L + 1).min(N) {
            x = x
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let v = (x >> 11) as f64 / (1u64 << 53) as f64 - 0.5;
            j.set(r, c, if r == c { -2.0 + v } else { v });
        }
    }
    j
}

fn band_lu(c: &mut Criterion) {
    let j = band();
    let (sr, sc) = (0.01, Complex64::new(0.01, 0.01));
    let mut real = BandLu::<f64>::new(N, L, U);
    let mut cplx = BandLu::<Complex64>::new(N, L, U);
    let mut g = c.benchmark_group("band_lu_n1000");
    g.measurement_time(Duration::from_secs(2))
        .warm_up_time(Duration::from_millis(300));
    g.bench_function("factor real then complex", |b| {
        b.iter(|| {
            real.factor(black_box(sr), &j).unwrap();
            cplx.factor(black_box(sc), &j).unwrap();
        })
    });
    g.bench_function("factor paired", |b| {
        b.iter(|| {
            real.factor_pair(black_box(sr), &mut cplx, black_box(sc), &j)
                .unwrap()
        })
    });
    let rb: Vec<f64> = (0..N).map(|i| 1.0 + i as f64).collect();
    let cb: Vec<Complex64> = (0..N).map(|i| Complex64::new(0.5, i as f64)).collect();
    let (mut x, mut z) = (rb.clone(), cb.clone());
    g.bench_function("solve real then complex", |b| {
        b.iter(|| {
            x.copy_from_slice(&rb);
            z.copy_from_slice(&cb);
            real.solve_in_place(&mut x);
            cplx.solve_in_place(&mut z);
            black_box((x[0], z[0]))
        })
    });
    g.bench_function("solve paired", |b| {
        b.iter(|| {
            x.copy_from_slice(&rb);
            z.copy_from_slice(&cb);
            real.solve_pair(&mut x, &cplx, &mut z);
            black_box((x[0], z[0]))
        })
    });
    g.finish();
}

criterion_group!(benches, band_lu);
criterion_main!(benches);
