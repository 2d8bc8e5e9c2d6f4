//! A stiff system of 10^6 unknowns with a declared diagonal Jacobian
//! structure integrates with sparse linear algebra only: the answer
//! matches the closed form and the peak memory of the whole run stays
//! a small multiple of the state's size, where one dense Jacobian would
//! need n^2 = 10^12 values (8 TB).
//!
//! This test binary installs a counting global allocator (through the
//! `allocation-counter` dev-dependency), so it lives apart from the other
//! tests.

use ballast::{
    integrate, Jacobian, Method, Options, Output, SparsityPattern, Structure, WithJacobian,
};

const N: usize = 1_000_000;

/// Rate of component i: spread evenly over [1, 10^6].
fn rate(i: usize) -> f64 {
    1.0 + (1e6 - 1.0) * i as f64 / (N - 1) as f64
}

/// y_i' = -k_i (y_i - 1), y_i(0) = 0: closed form y_i = 1 - e^{-k_i t}.
/// Stiffness ratio 10^6; over the span the fast components decay through
/// a thousand time constants while the slowest barely move.
#[test]
fn million_unknowns_sparse_diagonal() {
    let t_end = 1e-3;
    let (rtol, atol) = (1e-3, 1e-5);
    let structure = Structure::Sparse(SparsityPattern::diagonal(N));
    let system = WithJacobian::new(
        |_t: f64, y: &[f64], dy: &mut [f64]| {
            for (i, (d, v)) in dy.iter_mut().zip(y).enumerate() {
                *d = -rate(i) * (v - 1.0);
            }
        },
        |_t: f64, _y: &[f64], jac: &mut Jacobian| {
            for i in 0..N {
                jac.set(i, i, -rate(i));
            }
        },
    )
    .with_structure(structure);
    let opts = Options::default()
        .rtol(rtol)
        .atol(atol)
        .method(Method::Bdf)
        .output(Output::Final);
    let y0 = vec![0.0; N];
    let mut result = None;
    let clock = std::time::Instant::now();
    let info = allocation_counter::measure(|| {
        result = Some(integrate(system, (0.0, t_end), &y0, &opts));
    });
    let sol = result.unwrap().unwrap();
    println!(
        "{:?} in {:?}, peak {} MB",
        sol.stats(),
        clock.elapsed(),
        info.bytes_max / 1_000_000
    );
    assert_eq!(sol.t_final(), t_end);
    // Closed form, within 100 x the tolerance.
    let worst = (0..N)
        .map(|i| {
            let exact = 1.0 - (-rate(i) * t_end).exp();
            (sol.y_final()[i] - exact).abs() / (atol + rtol * exact.abs())
        })
        .fold(0.0, f64::max);
    assert!(worst < 100.0, "error {worst:.1} x the tolerance");
    let s = sol.stats();
    assert!(s.factorizations > 0 && s.jacobian_evals > 0);
    // Stiff: an explicit method would need at least t_end * 10^6 / 4 steps
    // (its stability limit is a few units over the largest rate).
    assert!(s.accepted < 1000, "{} steps", s.accepted);
    // Memory: one f64 per unknown is 8 MB; the run's peak must stay within
    // a fixed multiple of that, far from the 8 TB of one dense matrix.
    // Measured: about 55 x (440 MB), of which the sparse LU (symbolic
    // analysis, factors, work space) takes about 24 x and the BDF history
    // and work vectors most of the rest.
    let state_bytes = 8 * N as u64;
    assert!(
        info.bytes_max < 100 * state_bytes,
        "peak {} bytes = {:.1} x the state",
        info.bytes_max,
        info.bytes_max as f64 / state_bytes as f64
    );
}
