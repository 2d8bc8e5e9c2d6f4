//! The cost of the abstraction: `integrate()` with Dormand–Prince 5(4) on
//! the Lorenz equations against a hand-written loop of the same tableau,
//! the same step controller, the same error norm and the same starting
//! step, written out in this file with every stage inlined — the floor.
//!
//! ```text
//! cargo bench --bench overhead
//! ```
//!
//! Ratio library / floor is the abstraction cost (goal: at most 1.10). The
//! library runs with `Output::Final`, once with the stability monitor on
//! (the default: power iterations and a cap check) and once with
//! `stability_cap(false)`, so the monitor's cost shows separately. Before
//! timing, the bench checks that the floor's constants are the library's
//! and that the floor takes exactly the library's steps.
//!
//! Two modes for a shared machine and for profilers, outside criterion:
//! `OVERHEAD_PAIRED=50 cargo bench --bench overhead` times the variants
//! side by side in alternating batches and prints median ratios;
//! `OVERHEAD_PROFILE=floor|off|on OVERHEAD_ITERS=n` runs one variant `n`
//! times (run the bench binary under `perf record` or callgrind).

use std::hint::black_box;
use std::time::Duration;

use ballast::{integrate, Method, Options, Output};
use ballast_core::control::PiController;
use ballast_core::explicit::tableau::DORMAND_PRINCE_54;
use criterion::{criterion_group, Criterion};

/// Lorenz equations, sigma 10, r 28, b 8/3 (Hairer, Norsett and Wanner I, I.16).
/// Autonomous: `t` is passed, as the library passes it, and ignored.
#[inline(always)]
fn lorenz(_t: f64, y: &[f64], dy: &mut [f64]) {
    dy[0] = 10.0 * (y[1] - y[0]);
    dy[1] = y[0] * (28.0 - y[2]) - y[1];
    dy[2] = y[0] * y[1] - 8.0 / 3.0 * y[2];
}

const Y0: [f64; 3] = [-8.0, 8.0, 27.0];
const SPAN: (f64, f64) = (0.0, 16.0);

// Dormand and Prince (1980) 5(4): the same expressions as the library's
// tableau (checked equal in `check_constants`).
const C2: f64 = 1.0 / 5.0;
const C3: f64 = 3.0 / 10.0;
const C4: f64 = 4.0 / 5.0;
const C5: f64 = 8.0 / 9.0;
const A21: f64 = 1.0 / 5.0;
const A31: f64 = 3.0 / 40.0;
const A32: f64 = 9.0 / 40.0;
const A41: f64 = 44.0 / 45.0;
const A42: f64 = -56.0 / 15.0;
const A43: f64 = 32.0 / 9.0;
const A51: f64 = 19372.0 / 6561.0;
const A52: f64 = -25360.0 / 2187.0;
const A53: f64 = 64448.0 / 6561.0;
const A54: f64 = -212.0 / 729.0;
const A61: f64 = 9017.0 / 3168.0;
const A62: f64 = -355.0 / 33.0;
const A63: f64 = 46732.0 / 5247.0;
const A64: f64 = 49.0 / 176.0;
const A65: f64 = -5103.0 / 18656.0;
const B1: f64 = 35.0 / 384.0;
const B3: f64 = 500.0 / 1113.0;
const B4: f64 = 125.0 / 192.0;
const B5: f64 = -2187.0 / 6784.0;
const B6: f64 = 11.0 / 84.0;
const E1: f64 = 35.0 / 384.0 - 5179.0 / 57600.0;
const E3: f64 = 500.0 / 1113.0 - 7571.0 / 16695.0;
const E4: f64 = 125.0 / 192.0 - 393.0 / 640.0;
const E5: f64 = -2187.0 / 6784.0 + 92097.0 / 339200.0;
const E6: f64 = 11.0 / 84.0 - 187.0 / 2100.0;
const E7: f64 = -1.0 / 40.0;

// The library's PI controller defaults (checked equal in `check_constants`).
const SAFETY: f64 = 0.9;
const MIN_FACTOR: f64 = 0.2;
const MAX_FACTOR: f64 = 10.0;
const KP: f64 = 0.7;
const KI: f64 = 0.4;
/// Order of the propagated solution (starting step) and of the estimate (control).
const ORDER: usize = 5;
const ERROR_ORDER: usize = 4;
const MAX_STEPS: usize = 1_000_000;

/// What the floor computed.
struct FloorRun {
    y: Vec<f64>,
    accepted: usize,
    rejected: usize,
    rhs: usize,
}

/// Weighted RMS norm `sqrt(mean((e_i / (atol + rtol max(|a_i|, |b_i|)))^2))`.
#[inline(always)]
fn rms(e: &[f64], a: &[f64], b: &[f64], rtol: f64, atol: f64) -> f64 {
    let mut s = 0.0;
    for i in 0..e.len() {
        let q = e[i] / (atol + rtol * a[i].abs().max(b[i].abs()));
        s += q * q;
    }
    (s / e.len() as f64).sqrt()
}

/// Dormand–Prince 5(4) with the PI controller and the starting-step rule
/// of Hairer, Norsett and Wanner I, II.4, in one function.
fn floor(t0: f64, t1: f64, y0: &[f64], rtol: f64, atol: f64) -> FloorRun {
    let n = y0.len();
    let dir = if t1 >= t0 { 1.0 } else { -1.0 };
    let mut y = y0.to_vec();
    let mut y_new = vec![0.0; n];
    let mut tmp = vec![0.0; n];
    let mut k: [Vec<f64>; 7] = std::array::from_fn(|_| vec![0.0; n]);
    let mut rhs = 0usize;
    lorenz(t0, &y, &mut k[0]);
    rhs += 1;

    // Starting step.
    let d0 = rms(&y, &y, &y, rtol, atol);
    let d1 = rms(&k[0], &y, &y, rtol, atol);
    let h0 = if d0 < 1e-5 || d1 < 1e-5 {
        1e-6
    } else {
        0.01 * d0 / d1
    };
    for i in 0..n {
        tmp[i] = y[i] + dir * h0 * k[0][i];
    }
    lorenz(t0 + dir * h0, &tmp, &mut y_new);
    rhs += 1;
    for i in 0..n {
        tmp[i] = y_new[i] - k[0][i];
    }
    let d2 = rms(&tmp, &y, &y, rtol, atol) / h0;
    let mut h = if !d2.is_finite() {
        h0 * 1e-3
    } else {
        let m = d1.max(d2);
        let h1 = if m <= 1e-15 {
            (h0 * 1e-3).max(1e-6)
        } else {
            (0.01 / m).powf(1.0 / (ORDER as f64 + 1.0))
        };
        (100.0 * h0).min(h1)
    };
    h = h.min((t1 - t0).abs().max(f64::MIN_POSITIVE));

    let q1 = (ERROR_ORDER + 1) as f64;
    let (mut prev_error, mut rejected_last) = (1.0f64, false);
    let (mut t, mut accepted, mut rejected) = (t0, 0usize, 0usize);
    loop {
        let remaining = (t1 - t) * dir;
        if remaining <= 0.0 || accepted + rejected >= MAX_STEPS {
            break;
        }
        let mut h_mag = h;
        let reached_limit = h_mag * 1.01 >= remaining;
        if reached_limit {
            h_mag = remaining;
        }
        if h_mag < 16.0 * f64::EPSILON * t.abs() && !reached_limit {
            break;
        }
        let hs = dir * h_mag;
        let (h21, h31, h32) = (hs * A21, hs * A31, hs * A32);
        let (h41, h42, h43) = (hs * A41, hs * A42, hs * A43);
        let (h51, h52, h53, h54) = (hs * A51, hs * A52, hs * A53, hs * A54);
        let (h61, h62, h63, h64, h65) = (hs * A61, hs * A62, hs * A63, hs * A64, hs * A65);
        let (hb1, hb3, hb4, hb5, hb6) = (hs * B1, hs * B3, hs * B4, hs * B5, hs * B6);
        let [k1, k2, k3, k4, k5, k6, k7] = &mut k;
        for i in 0..n {
            tmp[i] = y[i] + h21 * k1[i];
        }
        lorenz(t + C2 * hs, &tmp, k2);
        for i in 0..n {
            tmp[i] = y[i] + h31 * k1[i] + h32 * k2[i];
        }
        lorenz(t + C3 * hs, &tmp, k3);
        for i in 0..n {
            tmp[i] = y[i] + h41 * k1[i] + h42 * k2[i] + h43 * k3[i];
        }
        lorenz(t + C4 * hs, &tmp, k4);
        for i in 0..n {
            tmp[i] = y[i] + h51 * k1[i] + h52 * k2[i] + h53 * k3[i] + h54 * k4[i];
        }
        lorenz(t + C5 * hs, &tmp, k5);
        for i in 0..n {
            tmp[i] = y[i] + h61 * k1[i] + h62 * k2[i] + h63 * k3[i] + h64 * k4[i] + h65 * k5[i];
        }
        lorenz(t + hs, &tmp, k6);
        for i in 0..n {
            y_new[i] = y[i] + hb1 * k1[i] + hb3 * k3[i] + hb4 * k4[i] + hb5 * k5[i] + hb6 * k6[i];
        }
        lorenz(t + hs, &y_new, k7);
        rhs += 6;
        let (he1, he3, he4, he5, he6, he7) = (hs * E1, hs * E3, hs * E4, hs * E5, hs * E6, hs * E7);
        for i in 0..n {
            tmp[i] =
                he1 * k1[i] + he3 * k3[i] + he4 * k4[i] + he5 * k5[i] + he6 * k6[i] + he7 * k7[i];
        }
        let err = rms(&tmp, &y, &y_new, rtol, atol).max(1e-10);
        if err <= 1.0 {
            t += hs;
            std::mem::swap(&mut y, &mut y_new);
            k.swap(0, 6);
            accepted += 1;
            let f = SAFETY * err.powf(-KP / q1) * prev_error.powf(KI / q1);
            let cap = if rejected_last { 1.0 } else { MAX_FACTOR };
            prev_error = err;
            rejected_last = false;
            let proposal = h_mag * f.clamp(MIN_FACTOR, cap);
            h = if reached_limit {
                proposal.max(h)
            } else {
                proposal
            };
            if reached_limit {
                break;
            }
        } else {
            rejected += 1;
            rejected_last = true;
            h = h_mag * (SAFETY * err.powf(-1.0 / q1)).clamp(MIN_FACTOR, 0.9);
        }
    }
    FloorRun {
        y,
        accepted,
        rejected,
        rhs,
    }
}

fn library(rtol: f64, atol: f64, cap: bool) -> ballast::Solution {
    let opts = Options::default()
        .method(Method::DormandPrince54)
        .rtol(rtol)
        .atol(atol)
        .output(Output::Final)
        .stability_cap(cap);
    integrate(
        |t: f64, y: &[f64], dy: &mut [f64]| lorenz(t, y, dy),
        SPAN,
        &Y0,
        &opts,
    )
    .expect("Lorenz with Dormand-Prince 5(4) runs to the end")
}

/// The floor's constants are the library's.
fn check_constants() {
    let t = &DORMAND_PRINCE_54;
    assert_eq!(&t.c[1..5], &[C2, C3, C4, C5]);
    assert_eq!(t.a[1], &[A21]);
    assert_eq!(t.a[2], &[A31, A32]);
    assert_eq!(t.a[3], &[A41, A42, A43]);
    assert_eq!(t.a[4], &[A51, A52, A53, A54]);
    assert_eq!(t.a[5], &[A61, A62, A63, A64, A65]);
    assert_eq!(t.b, &[B1, 0.0, B3, B4, B5, B6, 0.0]);
    assert_eq!(t.e.unwrap(), &[E1, 0.0, E3, E4, E5, E6, E7]);
    assert!(t.fsal && t.order == ORDER && t.error_order == ERROR_ORDER);
    let pi = PiController::default();
    assert_eq!(
        (pi.safety, pi.min_factor, pi.max_factor, pi.kp, pi.ki),
        (SAFETY, MIN_FACTOR, MAX_FACTOR, KP, KI)
    );
}

/// The floor takes the library's steps (stability cap off: no monitor).
fn check_same_steps(rtol: f64, atol: f64) {
    let f = floor(SPAN.0, SPAN.1, &Y0, rtol, atol);
    let lib = library(rtol, atol, false);
    let s = lib.stats();
    assert_eq!(
        (f.accepted, f.rejected, f.rhs),
        (s.accepted, s.rejected, s.rhs_evals),
        "floor and library took different steps at rtol {rtol:e}"
    );
    assert_eq!(
        f.y,
        lib.y_final(),
        "floor and library disagree at rtol {rtol:e}"
    );
    let capped = library(rtol, atol, true);
    println!(
        "rtol {rtol:e}: {} accepted, {} rejected, {} rhs calls (floor = library without cap); \
         with the monitor: {} rhs calls, {} spectral estimates, {} capped steps",
        f.accepted,
        f.rejected,
        f.rhs,
        capped.stats().rhs_evals,
        capped.stats().spectral_estimates,
        capped.stats().stability_limited
    );
}

fn overhead(c: &mut Criterion) {
    check_constants();
    for (rtol, atol) in [(1e-6, 1e-9), (1e-10, 1e-12)] {
        check_same_steps(rtol, atol);
        let mut g = c.benchmark_group(format!("overhead/lorenz/rtol={rtol:e}"));
        g.sample_size(30)
            .warm_up_time(Duration::from_millis(500))
            .measurement_time(Duration::from_secs(3));
        g.bench_function("floor", |b| {
            b.iter(|| {
                floor(
                    SPAN.0,
                    SPAN.1,
                    black_box(&Y0),
                    black_box(rtol),
                    black_box(atol),
                )
            })
        });
        g.bench_function("integrate, cap off", |b| {
            b.iter(|| library(black_box(rtol), black_box(atol), false))
        });
        g.bench_function("integrate, cap on", |b| {
            b.iter(|| library(black_box(rtol), black_box(atol), true))
        });
        g.finish();
    }
}

/// Runs one variant `iters` times at rtol 1e-6 without criterion, for a
/// profiler: `OVERHEAD_PROFILE=floor|off|on OVERHEAD_ITERS=200
/// valgrind --tool=callgrind target/release/deps/overhead-<hash>`.
fn profile(which: &str, iters: usize) {
    let (rtol, atol) = (1e-6, 1e-9);
    let mut accepted = 0;
    for _ in 0..iters {
        accepted += match which {
            "floor" => floor(SPAN.0, SPAN.1, black_box(&Y0), rtol, atol).accepted,
            "off" => library(rtol, atol, false).stats().accepted,
            "on" => library(rtol, atol, true).stats().accepted,
            other => {
                eprintln!("OVERHEAD_PROFILE must be floor, off or on, not {other:?}");
                std::process::exit(2);
            }
        };
    }
    println!("{which}: {iters} runs, {accepted} accepted steps");
}

/// Side-by-side timing for a shared, noisy machine: `rounds` rounds, each
/// timing a batch of every variant in turn at both tolerances; prints the
/// median over rounds of each variant's time per run and of the per-round
/// ratios to the floor (`OVERHEAD_PAIRED=rounds`).
fn paired(rounds: usize) {
    const BATCH: usize = 20;
    let median = |v: &mut Vec<f64>| {
        v.sort_by(f64::total_cmp);
        v[v.len() / 2]
    };
    for (rtol, atol) in [(1e-6, 1e-9), (1e-10, 1e-12)] {
        let mut times: [Vec<f64>; 3] = Default::default();
        let mut ratios: [Vec<f64>; 2] = Default::default();
        for _ in 0..rounds {
            let mut round = [0.0; 3];
            for (v, slot) in round.iter_mut().enumerate() {
                let start = std::time::Instant::now();
                for _ in 0..BATCH {
                    match v {
                        0 => {
                            black_box(floor(SPAN.0, SPAN.1, black_box(&Y0), rtol, atol));
                        }
                        1 => {
                            black_box(library(rtol, atol, false));
                        }
                        _ => {
                            black_box(library(rtol, atol, true));
                        }
                    }
                }
                *slot = start.elapsed().as_secs_f64() / BATCH as f64;
            }
            for v in 0..3 {
                times[v].push(round[v]);
            }
            ratios[0].push(round[1] / round[0]);
            ratios[1].push(round[2] / round[0]);
        }
        let [f, off, on] = times.each_mut().map(median);
        let [r_off, r_on] = ratios.each_mut().map(median);
        println!(
            "rtol {rtol:e}: floor {:.1} us, cap off {:.1} us, cap on {:.1} us per run; \
             median ratios to the floor: cap off {r_off:.3}, cap on {r_on:.3} ({rounds} rounds)",
            f * 1e6,
            off * 1e6,
            on * 1e6
        );
    }
}

criterion_group!(benches, overhead);

fn main() {
    if let Some(rounds) = std::env::var("OVERHEAD_PAIRED")
        .ok()
        .and_then(|v| v.parse().ok())
    {
        check_constants();
        paired(rounds);
        return;
    }
    if let Ok(which) = std::env::var("OVERHEAD_PROFILE") {
        let iters = std::env::var("OVERHEAD_ITERS")
            .ok()
            .and_then(|v| v.parse().ok())
            .unwrap_or(200);
        profile(&which, iters);
        return;
    }
    benches();
    Criterion::default().configure_from_args().final_summary();
}
