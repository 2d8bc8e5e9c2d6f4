//! Laws: generated multistep coefficients satisfy their order conditions,
//! the PECE polynomial matches the PECE recursion, and integrating
//! `y' = lambda y` just below / above the critical step stays bounded /
//! grows (proptest).
use super::*;
use num_complex::Complex64;
use proptest::prelude::*;

#[test]
fn adams_and_bdf_coefficients_match_published_tables() {
    // HNW I, III.1, Tables 1.1 and 1.2 (from memory): AB4 = (55, -59, 37, -9)/24
    // on f_n .. f_{n-3}; AM of order 4 = (9, 19, -5, 1)/24 on f_{n+1} .. f_{n-2}.
    let ab4 = Lmm::adams_bashforth(4).unwrap();
    let want = [-9.0, 37.0, -59.0, 55.0, 0.0].map(|x| x / 24.0);
    for (g, w) in ab4.sigma.iter().zip(want) {
        assert!((g - w).abs() < 1e-15);
    }
    let am4 = Lmm::adams_moulton(4).unwrap();
    let want = [1.0, -5.0, 19.0, 9.0].map(|x| x / 24.0);
    for (g, w) in am4.sigma.iter().zip(want) {
        assert!((g - w).abs() < 1e-15);
    }
    // HNW I, III.1, eq. (1.22'): BDF3 is 11/6 y_{n+1} - 3 y_n + 3/2 y_{n-1} - 1/3 y_{n-2} = h f_{n+1}.
    let bdf3 = Lmm::bdf(3).unwrap();
    let want = [-1.0 / 3.0, 1.5, -3.0, 11.0 / 6.0].map(|x| x * 6.0 / 11.0);
    for (g, w) in bdf3.rho.iter().zip(want) {
        assert!((g - w).abs() < 1e-15);
    }
    assert!((bdf3.sigma[3] - 6.0 / 11.0).abs() < 1e-15);
}

/// `sum_j alpha_j j^q - q sum_j beta_j j^(q-1)` (HNW I, III.2, Theorem 2.4:
/// order `p` iff zero for `q = 0..=p`).
fn order_residual(m: &Lmm, q: i32) -> f64 {
    let a: f64 = m
        .rho
        .iter()
        .enumerate()
        .map(|(j, x)| x * (j as f64).powi(q))
        .sum();
    let b: f64 = if q == 0 {
        0.0
    } else {
        m.sigma
            .iter()
            .enumerate()
            .map(|(j, x)| x * q as f64 * (j as f64).powi(q - 1))
            .sum()
    };
    (a - b) / (m.rho.len() as f64).powi(q)
}

#[test]
fn generated_coefficients_have_their_order() {
    let mut all = Vec::new();
    for k in 1..=12 {
        all.push(Lmm::adams_bashforth(k).unwrap());
        all.push(Lmm::adams_moulton(k).unwrap());
    }
    for k in 1..=6 {
        all.push(Lmm::bdf(k).unwrap());
    }
    for m in &all {
        for q in 0..=m.order as i32 {
            assert!(order_residual(m, q).abs() < 1e-12, "{m:?}: condition {q}");
        }
        assert!(
            order_residual(m, m.order as i32 + 1).abs() > 1e-8,
            "{m:?}: order too high"
        );
    }
    assert!(Lmm::bdf(7).is_none() && Lmm::adams_bashforth(13).is_none());
}

/// Runs the PECE recursion (AB(k) predicts, AM(k) corrects, both
/// evaluations of `f = lambda y`) on `y' = lambda y` directly from the
/// Adams weights, for `n` steps from a history of ones.
fn pece_run(k: usize, z: Complex64, n: usize) -> Vec<Complex64> {
    let ab = Lmm::adams_bashforth(k).unwrap();
    let am = Lmm::adams_moulton(k).unwrap();
    // beta*_j on f_{n-j}, beta_j on f_{n+1-j}.
    let bp: Vec<f64> = (0..k).map(|j| ab.sigma[k - 1 - j]).collect();
    let q = am.sigma.len() - 1;
    let bc: Vec<f64> = (0..k).map(|j| am.sigma[q - j]).collect();
    let mut y = vec![Complex64::new(1.0, 0.0); k];
    for _ in 0..n {
        let last = y.len() - 1;
        let f = |i: usize| z * y[last - i]; // h f_{n-i}
        let p = y[last] + (0..k).map(|j| f(j) * bp[j]).sum::<Complex64>();
        let corr = y[last] + z * p * bc[0] + (1..k).map(|j| f(j - 1) * bc[j]).sum::<Complex64>();
        y.push(corr);
    }
    y
}

#[test]
fn pece_polynomial_matches_the_recursion() {
    // Every sequence the PECE recursion produces satisfies the linear
    // recurrence with the characteristic polynomial's coefficients:
    // sum_j pi_j(z) y_{n+j} = 0.
    for k in 1..=12 {
        let p = CharPoly::pece(
            &Lmm::adams_bashforth(k).unwrap(),
            &Lmm::adams_moulton(k).unwrap(),
        );
        for z in [
            Complex64::new(-0.9, 0.4),
            Complex64::new(-2.5, 0.0),
            Complex64::new(0.3, 1.2),
        ] {
            let mut c = vec![Complex64::new(0.0, 0.0); p.degree() + 1];
            p.at(z, &mut c);
            let y = pece_run(k, z, 40);
            for n in 0..y.len() - c.len() {
                let res: Complex64 = c.iter().enumerate().map(|(j, cj)| cj * y[n + j]).sum();
                let scale: f64 = c
                    .iter()
                    .enumerate()
                    .map(|(j, cj)| (cj * y[n + j]).norm())
                    .sum();
                assert!(
                    res.norm() <= 1e-12 * scale,
                    "PECE{k} at {z}, n = {n}: {res}"
                );
            }
        }
    }
}

/// Integrates `y' = lambda y` with an explicit Runge–Kutta method given by
/// the rows of `a` and the weights `b`, in complex arithmetic: `steps`
/// steps of size `h` from `y = 1`; returns `|y_N|`.
fn rk_run(a: &[&[f64]], b: &[f64], lambda: Complex64, h: f64, steps: usize) -> f64 {
    let s = b.len();
    let mut y = Complex64::new(1.0, 0.0);
    let mut k = vec![Complex64::new(0.0, 0.0); s];
    for _ in 0..steps {
        for i in 0..s {
            let yi = y + a[i]
                .iter()
                .enumerate()
                .map(|(j, aij)| k[j] * (h * aij))
                .sum::<Complex64>();
            k[i] = lambda * yi;
        }
        y += k
            .iter()
            .zip(b)
            .map(|(ki, bi)| ki * (h * bi))
            .sum::<Complex64>();
    }
    y.norm()
}

/// Every explicit Runge–Kutta method with coefficients in the library:
/// `(method, rows of a, b)`.
/// `(method, rows of a, b)`.
type ExplicitRk = (Method, &'static [&'static [f64]], &'static [f64]);

fn explicit_methods() -> Vec<ExplicitRk> {
    use crate::explicit::dp853_tableau as d;
    use crate::explicit::tableau as ex;
    [
        &ex::FORWARD_EULER,
        &ex::HEUN,
        &ex::RK4,
        &ex::BOGACKI_SHAMPINE_32,
        &ex::DORMAND_PRINCE_54,
    ]
    .into_iter()
    .map(|t| (t.method, t.a, t.b))
    .chain([
        (Method::Tsitouras54, ex::TSITOURAS_54.a, ex::TSITOURAS_54.b),
        (Method::DormandPrince853, &d::A[..d::STEP_STAGES], &d::B[..]),
    ])
    .collect()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// For every explicit Runge–Kutta method and random lambda in the left
    /// half-plane (away from the imaginary axis, where the boundary of some
    /// regions only touches the ray): 200 steps at 0.99 h_crit do not grow,
    /// at 1.05 h_crit they grow.
    #[test]
    fn explicit_rk_critical_step_separates_decay_from_growth(
        theta in (PI_HALF + 0.06)..(3.0 * PI_HALF - 0.06),
        log_mag in -3.0f64..6.0,
    ) {
        let lambda = Complex64::from_polar(10f64.powf(log_mag), theta);
        for (m, a, b) in explicit_methods() {
            let hc = critical_step(m, lambda).unwrap();
            let below = rk_run(a, b, lambda, 0.99 * hc, 200);
            let above = rk_run(a, b, lambda, 1.05 * hc, 200);
            prop_assert!(below <= 1.0 + 1e-9, "{:?} theta {} below: {}", m, theta, below);
            prop_assert!(above > 1.0, "{:?} theta {} above: {}", m, theta, above);
        }
    }

    /// The same law for the explicit Adams scheme (PECE) at a random order:
    /// below the critical step the recursion does not grow (its last 100
    /// values stay below the 100 before), above it they grow.
    #[test]
    fn adams_pece_critical_step_separates_decay_from_growth(
        theta in (PI_HALF + 0.06)..(3.0 * PI_HALF - 0.06),
        k in 1usize..=12,
    ) {
        let lambda = Complex64::from_polar(1.0, theta);
        let hc = critical_step_for_order(Method::Adams, k, lambda).unwrap();
        let peak = |y: &[Complex64], a: usize, b: usize| y[a..b].iter().fold(0.0f64, |m, x| m.max(x.norm()));
        let y = pece_run(k, lambda * (0.99 * hc), 2000);
        prop_assert!(peak(&y, 1900, 2000) <= peak(&y, 1000, 1100) * (1.0 + 1e-9), "PECE{} below", k);
        let y = pece_run(k, lambda * (1.05 * hc), 2000);
        prop_assert!(peak(&y, 1900, 2000) > peak(&y, 1000, 1100), "PECE{} above", k);
    }
}

const PI_HALF: f64 = std::f64::consts::FRAC_PI_2;
