//! Random matrices of sizes 2..200 with prescribed spectra, `A = V D V^{-1}`:
//! the power-iteration estimate against the spectral radius computed by
//! faer's real eigenvalue decomposition (the reference, a general-purpose
//! eigen-solver), cold and warm along a slowly changing family `A(s)`.

use ballast_stiffness::{spectral_radius, PowerOptions, SpectralEstimator};
use nalgebra::DMatrix;

use crate::common::*;

/// The accuracy the controller needs (issue 7: "within 5%").
const ACCURACY: f64 = 0.05;

const SIZES: [usize; 9] = [2, 3, 4, 6, 10, 20, 50, 100, 200];
const SEEDS_PER_SIZE: u64 = 3;

/// `-10^(4u)`: real negative eigenvalues spread over four decades.
fn spread(n: usize, rng: &mut Rng) -> Vec<Eig> {
    (0..n)
        .map(|_| Eig::Real(-(10f64.powf(4.0 * rng.uniform()))))
        .collect()
}

/// Moduli spread over decades up to `top`, real or (where room) pairs.
fn below(mut n: usize, top: f64, rng: &mut Rng) -> Vec<Eig> {
    let mut out = Vec::new();
    while n > 0 {
        let r = top * 10f64.powf(-3.0 * rng.uniform());
        if n >= 2 && rng.uniform() < 0.3 {
            let phi = std::f64::consts::PI * (0.5 + 0.5 * rng.uniform());
            out.push(Eig::Pair(r * phi.cos(), r * phi.sin()));
            n -= 2;
        } else {
            out.push(Eig::Real(-r));
            n -= 1;
        }
    }
    out
}

/// A dominant pair `R e^{± i phi}` (left half-plane, up to near the
/// imaginary axis), the rest at most `0.8 R`.
fn dominant_pair(n: usize, rng: &mut Rng) -> Vec<Eig> {
    let r = 1e3;
    let phi = std::f64::consts::PI * (0.52 + 0.45 * rng.uniform());
    let mut s = vec![Eig::Pair(r * phi.cos(), r * phi.sin())];
    s.extend(below(n - 2, 0.8 * r, rng));
    s
}

/// A dominant eigenvalue `-R` of multiplicity 2 or 3, the rest at most `0.8 R`.
fn repeated(n: usize, rng: &mut Rng) -> Vec<Eig> {
    let r = 1e3;
    let m = n.min(2 + (rng.uniform() * 2.0) as usize);
    let mut s = vec![Eig::Real(-r); m];
    s.extend(below(n - m, 0.8 * r, rng));
    s
}

type Family = fn(usize, &mut Rng) -> Vec<Eig>;

struct Outcome {
    cold: Tally,
    warm: Tally,
    max_cond: f64,
}

/// Runs a family over all sizes and seeds: cold estimate of `A(0)`, then
/// warm estimates of `A(s)`, `s = 1..=4`, where the spectrum is scaled by
/// `1 + 0.03 s` and the basis drifts by `0.01 s` of a fixed random matrix.
fn run(name: &str, family: Family, kind: Basis, min_size: usize) -> Outcome {
    let opts = PowerOptions::default();
    let mut out = Outcome {
        cold: Tally::default(),
        warm: Tally::default(),
        max_cond: 0.0,
    };
    for &n in SIZES.iter().filter(|&&n| n >= min_size) {
        for seed in 0..SEEDS_PER_SIZE {
            let mut rng = Rng::new(1000 * n as u64 + seed);
            let spec = family(n, &mut rng);
            let d0 = block_diagonal(&spec);
            let v0 = basis(n, kind, &mut rng);
            let drift = DMatrix::from_fn(n, n, |_, _| rng.normal() / (n as f64).sqrt());
            out.max_cond = out.max_cond.max(cond(&v0));
            let prescribed = spec.iter().map(Eig::modulus).fold(0.0, f64::max);

            let a0 = similar(&v0, &d0);
            let rho = reference_radius(&a0);
            // The eigen-solver reproduces the prescribed spectrum, and so
            // does nalgebra's Schur decomposition where it converges.
            assert!(
                (rho - prescribed).abs() <= 1e-6 * prescribed,
                "{name} n={n}: {rho} vs {prescribed}"
            );
            if let Some(rho2) = reference_radius_nalgebra(&a0) {
                assert!(
                    (rho2 - rho).abs() <= 1e-6 * rho,
                    "{name} n={n}: nalgebra {rho2} vs faer {rho}"
                );
            }

            let cold = spectral_radius(n, product(&a0), &opts);
            let err = (cold.radius - rho).abs() / rho;
            assert!(
                err <= ACCURACY,
                "{name} {kind:?} n={n} seed={seed}: cold {cold:?}, reference {rho}"
            );
            out.cold.add(err, cold.products, cold.converged);

            let mut est = SpectralEstimator::new(n);
            est.estimate(product(&a0), &opts);
            for s in 1..=4 {
                let sf = s as f64;
                let v = &v0 + &drift * (0.01 * sf);
                let a = similar(&v, &(&d0 * (1.0 + 0.03 * sf)));
                let rho = reference_radius(&a);
                let warm = est.estimate(product(&a), &opts);
                let err = (warm.radius - rho).abs() / rho;
                assert!(
                    err <= ACCURACY,
                    "{name} {kind:?} n={n} seed={seed} s={s}: warm {warm:?}, reference {rho}"
                );
                out.warm.add(err, warm.products, warm.converged);
            }
        }
    }
    eprintln!("{}", out.cold.line(&format!("{name} {kind:?} cold")));
    eprintln!("{}", out.warm.line(&format!("{name} {kind:?} warm")));
    eprintln!("{name:<44} max cond(V) {:.1}", out.max_cond);
    out
}

fn check(out: &Outcome) {
    // Warm starts along a slowly changing family cost fewer products.
    assert!(
        out.warm.mean_products() < out.cold.mean_products(),
        "warm {} vs cold {}",
        out.warm.mean_products(),
        out.cold.mean_products()
    );
}

#[test]
fn real_negative_spread_over_decades_normal() {
    check(&run("spread", spread, Basis::Orthogonal, 2));
}

#[test]
fn real_negative_spread_over_decades_non_normal() {
    check(&run("spread", spread, Basis::Perturbed(0.2), 2));
}

#[test]
fn dominant_complex_pair_normal() {
    check(&run("pair", dominant_pair, Basis::Orthogonal, 2));
}

#[test]
fn dominant_complex_pair_non_normal() {
    check(&run("pair", dominant_pair, Basis::Perturbed(0.2), 2));
}

#[test]
fn repeated_dominant_eigenvalue_normal() {
    check(&run("repeated", repeated, Basis::Orthogonal, 2));
}

#[test]
fn repeated_dominant_eigenvalue_non_normal() {
    check(&run("repeated", repeated, Basis::Perturbed(0.2), 2));
}
