//! Laws over random diagonalisable matrices (proptest): the estimate never
//! panics, never exceeds a safe bound, and warm starts save products.

use ballast_stiffness::{spectral_radius, PowerOptions, SpectralEstimator, Termination};
use proptest::prelude::*;

use crate::common::{
    basis, block_diagonal, cond, gershgorin, norm2, product, reference_radius, similar, Basis, Eig,
    Rng as TestRng,
};

/// A random diagonalisable matrix: size, spectrum (moduli log-uniform over
/// `1e-2..1e4`, angles in the left half-plane or anywhere), basis `I + s G`.
fn matrix() -> impl Strategy<Value = (nalgebra::DMatrix<f64>, f64)> {
    (2usize..24, any::<u64>(), 0.0f64..0.4, any::<bool>()).prop_map(|(n, seed, s, left)| {
        let mut rng = TestRng::new(seed);
        let mut spec = Vec::new();
        let mut k = 0;
        while k < n {
            let r = 10f64.powf(-2.0 + 6.0 * rng.uniform());
            let phi = if left {
                std::f64::consts::PI * (0.5 + rng.uniform())
            } else {
                std::f64::consts::TAU * rng.uniform()
            };
            if k + 2 <= n && rng.uniform() < 0.4 {
                spec.push(Eig::Pair(r * phi.cos(), r * phi.sin().abs()));
                k += 2;
            } else {
                spec.push(Eig::Real(r * phi.cos().signum()));
                k += 1;
            }
        }
        let v = basis(n, Basis::Perturbed(s), &mut rng);
        let kappa = cond(&v);
        (similar(&v, &block_diagonal(&spec)), kappa)
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 200, ..ProptestConfig::default() })]

    #[test]
    fn never_exceeds_a_safe_bound((a, kappa) in matrix()) {
        let n = a.nrows();
        let opts = PowerOptions::default();
        let e = spectral_radius(n, product(&a), &opts);
        prop_assert!(e.radius.is_finite() && e.radius >= 0.0);
        prop_assert!(e.products >= 1 && e.products <= opts.max_products);
        prop_assert!(e.termination != Termination::NonFinite);
        // Every value returned lies in the field of values or is a gain
        // ||A x||: at most ||A||_2 <= ||A||_F.
        let frobenius = a.norm();
        prop_assert!(e.radius <= frobenius * (1.0 + 1e-12), "{:?} > Frobenius {}", e, frobenius);
        prop_assert!(e.radius <= norm2(&a) * (1.0 + 1e-10));
        prop_assert!(e.max_gain <= norm2(&a) * (1.0 + 1e-10));
        // Converged: by Bauer-Fike the Ritz value is within kappa * tol * |theta|
        // of an eigenvalue, so |theta| <= rho / (1 - kappa tol) <= Gershgorin / (1 - kappa tol).
        if e.converged && kappa * opts.tol < 0.5 {
            let g = gershgorin(&a);
            let rho = reference_radius(&a);
            let slack = 1.0 / (1.0 - kappa * opts.tol) + 1e-9;
            prop_assert!(e.radius <= rho * slack, "{:?} vs rho {} kappa {}", e, rho, kappa);
            prop_assert!(e.radius <= g * slack, "{:?} vs Gershgorin {}", e, g);
        }
    }

    #[test]
    fn warm_start_on_the_same_operator_costs_fewer_products((a, _kappa) in matrix()) {
        let n = a.nrows();
        let opts = PowerOptions::default();
        let mut est = SpectralEstimator::new(n);
        let cold = est.estimate(product(&a), &opts);
        let warm = est.estimate(product(&a), &opts);
        // Only when the cold start found the dominant eigenvalue: a start
        // vector nearly orthogonal to the dominant eigenvector can pass the
        // residual test at a smaller eigenvalue first (see
        // `cold_false_convergence_is_rare`); the warm start then costs more
        // because it finds the right one.
        let rho = reference_radius(&a);
        if cold.converged && (cold.radius - rho).abs() <= 0.05 * rho {
            prop_assert!(warm.converged, "cold {:?} warm {:?}", cold, warm);
            prop_assert!(warm.products <= cold.products.max(opts.min_products + 1), "cold {:?} warm {:?}", cold, warm);
            prop_assert!((warm.radius - cold.radius).abs() <= 2.0 * opts.tol * cold.radius.max(warm.radius) + 1e-300);
        }
    }
}

/// Same family as [`matrix`], drawn deterministically: how often does a
/// cold start pass the residual test at an eigenvalue more than 5% below
/// the spectral radius? (1500 draws: 4 such cases, 0.3%, whatever
/// `min_products` in 2..=6.)
#[test]
fn cold_false_convergence_is_rare() {
    let (mut bad, mut converged, total) = (0, 0, 400u64);
    for seed in 0..total {
        let mut rng = TestRng::new(seed * 7919 + 1);
        let n = 2 + (rng.uniform() * 22.0) as usize;
        let left = rng.uniform() < 0.5;
        let s = 0.4 * rng.uniform();
        let mut spec = Vec::new();
        let mut k = 0;
        while k < n {
            let r = 10f64.powf(-2.0 + 6.0 * rng.uniform());
            let phi = if left {
                std::f64::consts::PI * (0.5 + rng.uniform())
            } else {
                std::f64::consts::TAU * rng.uniform()
            };
            if k + 2 <= n && rng.uniform() < 0.4 {
                spec.push(Eig::Pair(r * phi.cos(), r * phi.sin().abs()));
                k += 2;
            } else {
                spec.push(Eig::Real(r * phi.cos().signum()));
                k += 1;
            }
        }
        let a = similar(
            &basis(n, Basis::Perturbed(s), &mut rng),
            &block_diagonal(&spec),
        );
        let rho = reference_radius(&a);
        let e = spectral_radius(n, product(&a), &PowerOptions::default());
        if e.converged {
            converged += 1;
            bad += usize::from((e.radius - rho).abs() > 0.05 * rho);
        }
    }
    eprintln!("random diagonalisable, n = 2..23: {total} cold starts, {converged} converged, {bad} of them off by > 5%");
    assert!(bad * 100 <= total as usize, "{bad} of {total}");
}
