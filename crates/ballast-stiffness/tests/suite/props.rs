//! Laws over random diagonalisable matrices: the estimate never panics and
//! never exceeds a safe bound (proptest), and warm starts save products
//! (a deterministic sweep of the same family, since they do so in nearly
//! all cases, not all).

use ballast_stiffness::{spectral_radius, PowerOptions, SpectralEstimator, Termination};
use proptest::prelude::*;

use crate::common::{
    basis, block_diagonal, cond, gershgorin, norm2, product, reference_radius, similar, Basis, Eig,
    Rng as TestRng,
};

/// A diagonalisable `n x n` matrix drawn from `rng`: spectrum (moduli
/// log-uniform over `1e-2..1e4`, angles in the left half-plane when `left`,
/// else anywhere; a complex pair with probability 0.4), basis `I + s G`.
/// Returns it with the basis' condition number.
fn family(n: usize, s: f64, left: bool, rng: &mut TestRng) -> (nalgebra::DMatrix<f64>, f64) {
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
    let v = basis(n, Basis::Perturbed(s), rng);
    let kappa = cond(&v);
    (similar(&v, &block_diagonal(&spec)), kappa)
}

/// The family of [`family`] drawn deterministically from `seed`: size
/// 2..=23, either kind of spectrum, `s` in `0..0.4`.
fn seeded(seed: u64) -> nalgebra::DMatrix<f64> {
    let mut rng = TestRng::new(seed * 7919 + 1);
    let n = 2 + (rng.uniform() * 22.0) as usize;
    let left = rng.uniform() < 0.5;
    let s = 0.4 * rng.uniform();
    family(n, s, left, &mut rng).0
}

/// A random diagonalisable matrix for proptest (see [`family`]).
fn matrix() -> impl Strategy<Value = (nalgebra::DMatrix<f64>, f64)> {
    (2usize..24, any::<u64>(), 0.0f64..0.4, any::<bool>())
        .prop_map(|(n, seed, s, left)| family(n, s, left, &mut TestRng::new(seed)))
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
}

/// Same family as [`matrix`], drawn deterministically: how often does a
/// cold start pass the residual test at an eigenvalue more than 5% below
/// the spectral radius? (1500 draws: 4 such cases, 0.3%, whatever
/// `min_products` in 2..=6.)
#[test]
fn cold_false_convergence_is_rare() {
    let (mut bad, mut converged, total) = (0, 0, 400u64);
    for seed in 0..total {
        let a = seeded(seed);
        let n = a.nrows();
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

/// Same family, drawn deterministically: a warm start on the operator a
/// cold start has just converged on goes on from the cold start's vector.
/// Among the draws whose cold start found the dominant eigenvalue (within
/// 5%), the warm start converges, costs no more products than the cold one
/// (or `min_products + 1`), and lands no farther from the spectral radius
/// (up to `2 tol rho`) in nearly all cases, and costs fewer products in
/// total. Not in every case: a cold start that stops just under the
/// tolerance can leave the warm one a harder residual test (a non-normal
/// complex pair, warm 50 products without converging after cold's 7), and
/// with two dominant eigenvalues a few per cent apart the cold start can
/// stop near the second (eigenvalues 132.25 and 127.75: cold 128.89 after
/// two products, warm 132.04), which random draws of a property test met
/// about once in a few thousand. Measured over 3000 draws: 2887 such
/// cases; the warm start converged and cost no more in 2886, landed no
/// farther in all; 6600 products against the cold starts' 20406.
#[test]
fn warm_starts_are_cheaper_and_no_worse() {
    let opts = PowerOptions::default();
    let (mut cases, mut converged, mut cheaper, mut closer) = (0usize, 0, 0, 0);
    let (mut cold_products, mut warm_products) = (0usize, 0usize);
    for seed in 0..3000u64 {
        let a = seeded(seed);
        let n = a.nrows();
        let rho = reference_radius(&a);
        let mut est = SpectralEstimator::new(n);
        let cold = est.estimate(product(&a), &opts);
        if !(cold.converged && (cold.radius - rho).abs() <= 0.05 * rho) {
            continue;
        }
        let warm = est.estimate(product(&a), &opts);
        cases += 1;
        converged += usize::from(warm.converged);
        cheaper += usize::from(warm.products <= cold.products.max(opts.min_products + 1));
        closer += usize::from(
            (warm.radius - rho).abs() <= (cold.radius - rho).abs() + 2.0 * opts.tol * rho,
        );
        cold_products += cold.products;
        warm_products += warm.products;
    }
    let msg = format!(
        "{cases} cases: warm converged {converged}, no dearer {cheaper}, no farther {closer}; \
         products cold {cold_products}, warm {warm_products}"
    );
    eprintln!("{msg}");
    assert!(cases > 2000, "{msg}");
    assert!(converged * 1000 >= cases * 995, "{msg}");
    assert!(cheaper * 1000 >= cases * 995, "{msg}");
    assert!(closer * 1000 >= cases * 995, "{msg}");
    assert!(warm_products * 2 < cold_products, "{msg}");
}
