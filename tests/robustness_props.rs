//! Random small nonlinear systems never make `integrate()` panic, whatever
//! adaptive method runs them: it returns `Ok` with finite states, or a
//! typed error whose partial solution is finite.

use std::panic::{catch_unwind, AssertUnwindSafe};

use ballast::{integrate, Method, Options};
use proptest::prelude::*;

/// A polynomial right-hand side: for each component, a sum of terms
/// `c * t^a * prod_j y_j^{e_j}` of total degree at most 3.
#[derive(Clone, Debug)]
struct Poly {
    /// Per component: (coefficient, power of t, powers of each y_j).
    terms: Vec<Vec<(f64, u32, Vec<u32>)>>,
}

impl Poly {
    fn eval(&self, t: f64, y: &[f64], dy: &mut [f64]) {
        for (d, terms) in dy.iter_mut().zip(&self.terms) {
            *d = terms
                .iter()
                .map(|(c, a, e)| {
                    c * t.powi(*a as i32)
                        * y.iter()
                            .zip(e)
                            .map(|(v, &k)| v.powi(k as i32))
                            .product::<f64>()
                })
                .sum();
        }
    }
}

/// Powers `(a, e_1..e_n)` with total degree at most 3.
fn term(n: usize) -> impl Strategy<Value = (f64, u32, Vec<u32>)> {
    (-2.0..2.0f64, prop::collection::vec(0u32..=3, n + 1)).prop_map(|(c, mut p)| {
        // Trim the powers to total degree 3, first come first served.
        let mut left = 3u32;
        for k in p.iter_mut() {
            *k = (*k).min(left);
            left -= *k;
        }
        let a = p.remove(0);
        (c, a, p)
    })
}

fn system() -> impl Strategy<Value = (Poly, Vec<f64>)> {
    (1usize..4).prop_flat_map(|n| {
        (
            prop::collection::vec(prop::collection::vec(term(n), 1..5), n),
            prop::collection::vec(-2.0..2.0f64, n),
        )
            .prop_map(|(terms, y0)| (Poly { terms }, y0))
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(96))]

    #[test]
    fn random_polynomial_systems_never_panic(
        (poly, y0) in system(),
        t0 in -2.0..2.0f64,
        length in 0.01..5.0f64,
        backwards in any::<bool>(),
        log_rtol in -10.0..-2.0f64,
        atol_ratio in -3.0..0.0f64,
        pick in 0usize..64,
    ) {
        let t1 = if backwards { t0 - length } else { t0 + length };
        let rtol = 10f64.powf(log_rtol);
        // Every single method that chooses its own steps (the fixed-step
        // ones are refused without `Options::fixed_step`), and the default.
        let adaptive: Vec<Method> = Method::SINGLE
            .into_iter()
            .filter(|m| !m.needs_fixed_step())
            .collect();
        let method = adaptive
            .get(pick % (adaptive.len() + 1))
            .copied()
            .unwrap_or_default();
        let opts = Options::default()
            .rtol(rtol)
            .atol(rtol * 10f64.powf(atol_ratio))
            .method(method)
            .max_steps(20_000);
        let p = poly.clone();
        let result = catch_unwind(AssertUnwindSafe(|| {
            integrate(move |t: f64, y: &[f64], dy: &mut [f64]| p.eval(t, y, dy), (t0, t1), &y0, &opts)
        }));
        let result = match result {
            Ok(r) => r,
            Err(_) => return Err(TestCaseError::fail(format!("panicked: {poly:?}, y0 {y0:?}, ({t0}, {t1}), {method}"))),
        };
        let finite = |s: &ballast::Solution| s.iter().all(|(t, y)| t.is_finite() && y.iter().all(|v| v.is_finite()))
            && s.y_final().iter().all(|v| v.is_finite());
        match result {
            Ok(sol) => {
                prop_assert_eq!(sol.t_final(), t1);
                prop_assert!(finite(&sol), "non-finite Ok result");
            }
            Err(e) => {
                // Valid input: only run failures, each with a finite partial solution.
                let partial = e.partial();
                prop_assert!(partial.is_some(), "unexpected error kind: {e:?}");
                let partial = partial.unwrap();
                prop_assert!(finite(partial), "non-finite partial solution: {e}");
                let (lo, hi) = if t1 > t0 { (t0, t1) } else { (t1, t0) };
                prop_assert!(partial.t_final() >= lo && partial.t_final() <= hi);
            }
        }
    }
}
