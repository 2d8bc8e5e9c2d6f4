//! Products and time for a spectral-radius estimate of the Brusselator
//! Jacobian, N = 500 (dimension 1000, HNW II, section IV.1), cold and warm.
//!
//! Before the timings, prints how many products a 5%-accurate estimate
//! needs (against faer's eigenvalues of the assembled Jacobian), cold and
//! warm, with the analytic product and with finite differences of `f`.
//!
//! `cargo bench -p ballast-stiffness`

use std::hint::black_box;
use std::time::Duration;

use ballast_core::{Jacobian, System};
use ballast_models::Brusselator;
use ballast_stiffness::{PowerOptions, SpectralEstimator};
use criterion::{criterion_group, criterion_main, BatchSize, Criterion};

const N_POINTS: usize = 500;

struct Setup {
    sys: Brusselator,
    n: usize,
    /// Two nearby states on the trajectory: `y0` and `y1` at `t1`.
    y0: Vec<f64>,
    y1: Vec<f64>,
    t1: f64,
    f0: Vec<f64>,
    f1: Vec<f64>,
    j0: Jacobian,
    j1: Jacobian,
    rho1: f64,
}

fn jacobian(sys: &mut Brusselator, y: &[f64]) -> Jacobian {
    let mut j = Jacobian::for_structure(y.len(), &sys.structure());
    sys.jacobian(0.0, y, &mut j);
    j
}

fn reference_radius(j: &Jacobian) -> f64 {
    let n = j.dim();
    let d = j.to_dense();
    let m = faer::Mat::<f64>::from_fn(n, n, |i, k| d[k * n + i]);
    let eig = m.eigenvalues().expect("faer eigenvalues");
    eig.iter().map(|z| z.re.hypot(z.im)).fold(0.0, f64::max)
}

fn setup() -> Setup {
    let mut sys = Brusselator::new(N_POINTS);
    let n = sys.dim();
    let y0 = sys.initial_value();
    // 20 forward Euler steps of h = 5e-5 (h rho ~ 1, stable): a state a
    // little way along the trajectory, where a warm start would be used.
    let (h, steps) = (5e-5, 20);
    let mut y1 = y0.clone();
    let mut f = vec![0.0; n];
    for _ in 0..steps {
        sys.rhs(0.0, &y1, &mut f);
        for (yi, fi) in y1.iter_mut().zip(&f) {
            *yi += h * fi;
        }
    }
    let mut f0 = vec![0.0; n];
    let mut f1 = vec![0.0; n];
    sys.rhs(0.0, &y0, &mut f0);
    sys.rhs(0.0, &y1, &mut f1);
    let j0 = jacobian(&mut sys, &y0);
    let j1 = jacobian(&mut sys, &y1);
    let rho1 = reference_radius(&j1);
    Setup {
        sys,
        n,
        y0,
        y1,
        t1: h * steps as f64,
        f0,
        f1,
        j0,
        j1,
        rho1,
    }
}

/// Fewest products after which the estimate of `rho(J(y1))` is within 5%:
/// cold, and warm from the dominant vector at `y0`.
fn products_for_five_percent(s: &mut Setup, fd: bool) -> (Option<usize>, Option<usize>) {
    let mut warmed = SpectralEstimator::new(s.n);
    if fd {
        let sys = &mut s.sys;
        warmed
            .estimate_fd(
                |v: &[f64], o: &mut [f64]| sys.rhs(0.0, v, o),
                &s.y0,
                &s.f0,
                &PowerOptions::default(),
            )
            .unwrap();
    } else {
        let j0 = &s.j0;
        warmed.estimate(
            |v: &[f64], o: &mut [f64]| j0.mul_vec(v, o),
            &PowerOptions::default(),
        );
    }
    let mut first = [None, None];
    for k in 1..=80 {
        let opts = PowerOptions::default()
            .tol(0.0)
            .min_products(1)
            .max_products(k);
        for (slot, start) in first
            .iter_mut()
            .zip([SpectralEstimator::new(s.n), warmed.clone()])
        {
            if slot.is_some() {
                continue;
            }
            let mut est = start;
            let e = if fd {
                let sys = &mut s.sys;
                est.estimate_fd(
                    |v: &[f64], o: &mut [f64]| sys.rhs(0.0, v, o),
                    &s.y1,
                    &s.f1,
                    &opts,
                )
                .unwrap()
            } else {
                let j1 = &s.j1;
                est.estimate(|v: &[f64], o: &mut [f64]| j1.mul_vec(v, o), &opts)
            };
            if (e.radius - s.rho1).abs() <= 0.05 * s.rho1 {
                *slot = Some(k);
            }
        }
    }
    (first[0], first[1])
}

fn report(s: &mut Setup) {
    println!(
        "Brusselator N = {N_POINTS} (dim {}), t = {}: rho = {:.2} (faer)",
        s.n, s.t1, s.rho1
    );
    for fd in [false, true] {
        let (cold, warm) = products_for_five_percent(s, fd);
        println!(
            "  {:<10} products for a 5%-accurate estimate: cold {:?}, warm {:?}",
            if fd { "fd" } else { "analytic" },
            cold,
            warm
        );
    }
    let opts = PowerOptions::default();
    let j0 = &s.j0;
    let j1 = &s.j1;
    let mut est = SpectralEstimator::new(s.n);
    let cold = est.estimate(|v: &[f64], o: &mut [f64]| j1.mul_vec(v, o), &opts);
    let mut est = SpectralEstimator::new(s.n);
    est.estimate(|v: &[f64], o: &mut [f64]| j0.mul_vec(v, o), &opts);
    let warm = est.estimate(|v: &[f64], o: &mut [f64]| j1.mul_vec(v, o), &opts);
    let sys = &mut s.sys;
    let mut est = SpectralEstimator::new(s.n);
    let fd_cold = est
        .estimate_fd(
            |v: &[f64], o: &mut [f64]| sys.rhs(0.0, v, o),
            &s.y1,
            &s.f1,
            &opts,
        )
        .unwrap();
    let mut est = SpectralEstimator::new(s.n);
    est.estimate_fd(
        |v: &[f64], o: &mut [f64]| sys.rhs(0.0, v, o),
        &s.y0,
        &s.f0,
        &opts,
    )
    .unwrap();
    let fd_warm = est
        .estimate_fd(
            |v: &[f64], o: &mut [f64]| sys.rhs(0.0, v, o),
            &s.y1,
            &s.f1,
            &opts,
        )
        .unwrap();
    for (name, e) in [
        ("analytic, cold", cold),
        ("analytic, warm", warm),
        ("fd, cold", fd_cold),
        ("fd, warm", fd_warm),
    ] {
        println!(
            "  default options, {name}: radius {:.2} (error {:.1e}), {} products, converged {}",
            e.radius,
            (e.radius - s.rho1).abs() / s.rho1,
            e.products,
            e.converged
        );
    }
}

fn bench(c: &mut Criterion) {
    let mut s = setup();
    report(&mut s);
    let opts = PowerOptions::default();
    let mut warmed = SpectralEstimator::new(s.n);
    {
        let j0 = &s.j0;
        warmed.estimate(|v: &[f64], o: &mut [f64]| j0.mul_vec(v, o), &opts);
    }
    let mut g = c.benchmark_group("brusselator-500");
    g.sample_size(20)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(2));
    let j1 = &s.j1;
    g.bench_function("analytic/cold", |b| {
        b.iter_batched(
            || SpectralEstimator::new(s.n),
            |mut e| {
                e.estimate(
                    |v: &[f64], o: &mut [f64]| j1.mul_vec(black_box(v), o),
                    black_box(&opts),
                )
            },
            BatchSize::SmallInput,
        )
    });
    g.bench_function("analytic/warm", |b| {
        b.iter_batched(
            || warmed.clone(),
            |mut e| {
                e.estimate(
                    |v: &[f64], o: &mut [f64]| j1.mul_vec(black_box(v), o),
                    black_box(&opts),
                )
            },
            BatchSize::SmallInput,
        )
    });
    let (y1, f1) = (s.y1.clone(), s.f1.clone());
    let sys = &mut s.sys;
    g.bench_function("fd/cold", |b| {
        b.iter_batched(
            || SpectralEstimator::new(y1.len()),
            |mut e| {
                e.estimate_fd(
                    |v: &[f64], o: &mut [f64]| sys.rhs(0.0, v, o),
                    black_box(&y1),
                    &f1,
                    &opts,
                )
            },
            BatchSize::SmallInput,
        )
    });
    g.bench_function("fd/warm", |b| {
        b.iter_batched(
            || warmed.clone(),
            |mut e| {
                e.estimate_fd(
                    |v: &[f64], o: &mut [f64]| sys.rhs(0.0, v, o),
                    black_box(&y1),
                    &f1,
                    &opts,
                )
            },
            BatchSize::SmallInput,
        )
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
