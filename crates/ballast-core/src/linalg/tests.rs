//! Laws of the linear solvers: every layout and kernel solves the same
//! system; the residual `(shift I - J) x - b` is at rounding level.

use super::dense::DenseLu;
use super::*;
use crate::system::SparsityPattern;
use proptest::prelude::*;

/// A banded test matrix with entries from `vals` (cycled), `l` sub- and
/// `u` super-diagonals.
fn banded(n: usize, l: usize, u: usize, vals: &[f64]) -> Jacobian {
    let mut j = Jacobian::banded(n, l, u);
    let mut k = 0;
    for c in 0..n {
        for r in c.saturating_sub(u)..(c + l + 1).min(n) {
            j.set(r, c, vals[k % vals.len()]);
            k += 1;
        }
    }
    j
}

fn as_dense(j: &Jacobian) -> Jacobian {
    let n = j.dim();
    let mut d = Jacobian::dense(n);
    for c in 0..n {
        for r in 0..n {
            d.set(r, c, j.get(r, c));
        }
    }
    d
}

fn as_sparse(j: &Jacobian) -> Jacobian {
    let n = j.dim();
    let entries: Vec<(usize, usize)> = (0..n)
        .flat_map(|c| (0..n).map(move |r| (r, c)))
        .filter(|&(r, c)| j.get(r, c) != 0.0)
        .collect();
    let mut s = Jacobian::sparse(SparsityPattern::new(n, &entries).unwrap());
    for &(r, c) in &entries {
        s.set(r, c, j.get(r, c));
    }
    s
}

/// `max_i |((shift I - J) x - b)_i|` in complex arithmetic.
fn residual<T: Scalar + Into<Complex64>>(shift: T, j: &Jacobian, x: &[T], b: &[T]) -> f64 {
    let n = j.dim();
    let mut worst = 0.0f64;
    for r in 0..n {
        let mut s: Complex64 = shift.into() * x[r].into();
        for c in 0..n {
            s -= j.get(r, c) * x[c].into();
        }
        worst = worst.max((s - b[r].into()).norm());
    }
    worst
}

fn solve_with<T: Scalar>(s: &mut LinearSolver<T>, shift: T, j: &Jacobian, b: &[T]) -> Vec<T> {
    s.factor(shift, j).unwrap();
    let mut x = b.to_vec();
    s.solve_in_place(&mut x);
    x
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(32))]

    #[test]
    fn every_layout_solves_the_banded_system(
        n in 1usize..60, l in 0usize..4, u in 0usize..4,
        vals in prop::collection::vec(-3.0f64..3.0, 7..20),
        shift in 0.5f64..20.0,
    ) {
        let jb = banded(n, l, u, &vals);
        let (jd, js) = (as_dense(&jb), as_sparse(&jb));
        let b: Vec<f64> = (0..n).map(|i| (i as f64 * 0.37).sin() + 0.1).collect();
        let tol = 1e-9 * (1.0 + shift);
        let mut band = LinearSolver::<f64>::new(n, &Structure::Banded { lower: l, upper: u }).unwrap();
        let x = solve_with(&mut band, shift, &jb, &b);
        // Each layout must solve the system to a small residual (backward
        // error); the solutions themselves may differ by the condition
        // number times that, which a random shifted band can make large.
        let scale_of = |x: &[f64]| 1.0 + x.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        prop_assert!(residual(shift, &jd, &x, &b) < tol * scale_of(&x));
        for use_faer in [false, true] {
            let mut d = LinearSolver::Dense(DenseLu::with_kernel(n, use_faer));
            let xd = solve_with(&mut d, shift, &jd, &b);
            prop_assert!(residual(shift, &jd, &xd, &b) < tol * scale_of(&xd));
        }
        let pat = match js.storage() { crate::matrix::Storage::Sparse { pattern, .. } => pattern.clone(), _ => unreachable!() };
        let mut sp = LinearSolver::<f64>::new(n, &Structure::Sparse(pat)).unwrap();
        let xs = solve_with(&mut sp, shift, &js, &b);
        prop_assert!(residual(shift, &jd, &xs, &b) < tol * scale_of(&xs));
    }

    #[test]
    fn complex_shift_solves_in_every_layout(
        n in 1usize..40, l in 0usize..3, u in 0usize..3,
        vals in prop::collection::vec(-3.0f64..3.0, 5..15),
        re in 0.5f64..10.0, im in -10.0f64..10.0,
    ) {
        let jb = banded(n, l, u, &vals);
        let (jd, js) = (as_dense(&jb), as_sparse(&jb));
        let shift = Complex64::new(re, im);
        let b: Vec<Complex64> = (0..n).map(|i| Complex64::new((i as f64).cos(), 0.5)).collect();
        let mut solvers = vec![
            LinearSolver::Dense(DenseLu::with_kernel(n, false)),
            LinearSolver::Dense(DenseLu::with_kernel(n, true)),
            LinearSolver::<Complex64>::new(n, &Structure::Banded { lower: l, upper: u }).unwrap(),
        ];
        let pat = match js.storage() { crate::matrix::Storage::Sparse { pattern, .. } => pattern.clone(), _ => unreachable!() };
        solvers.push(LinearSolver::new(n, &Structure::Sparse(pat)).unwrap());
        for (k, s) in solvers.iter_mut().enumerate() {
            let j = match k { 2 => &jb, 3 => &js, _ => &jd };
            let x = solve_with(s, shift, j, &b);
            let scale = 1.0 + x.iter().fold(0.0f64, |m, v| m.max(v.norm()));
            prop_assert!(residual(shift, &jd, &x, &b) < 1e-9 * (1.0 + shift.norm()) * scale, "solver {}", k);
        }
    }
}

#[test]
fn pivoting_handles_a_zero_leading_entry() {
    // shift I - J = [[0, 1], [1, 0]]: needs a row interchange.
    let mut j = Jacobian::dense(2);
    j.set(0, 0, 1.0);
    j.set(1, 1, 1.0);
    j.set(0, 1, -1.0);
    j.set(1, 0, -1.0);
    for use_faer in [false, true] {
        let mut s = DenseLu::<f64>::with_kernel(2, use_faer);
        s.factor(1.0, &j).unwrap();
        let mut b = [2.0, 3.0];
        s.solve_in_place(&mut b);
        assert_eq!(b, [3.0, 2.0]);
    }
    let mut band = LinearSolver::<f64>::new(2, &Structure::Banded { lower: 1, upper: 1 }).unwrap();
    let mut b = [2.0, 3.0];
    band.factor(1.0, &j).unwrap();
    band.solve_in_place(&mut b);
    assert_eq!(b, [3.0, 2.0]);
}

#[test]
fn singular_matrix_is_reported_not_panicked() {
    // shift I - J = 0 for J = I, shift = 1.
    let n = 5;
    let mut j = Jacobian::dense(n);
    for i in 0..n {
        j.set(i, i, 1.0);
    }
    for use_faer in [false, true] {
        let mut s = DenseLu::<f64>::with_kernel(n, use_faer);
        assert_eq!(s.factor(1.0, &j), Err(StepFailure::SingularMatrix));
    }
    let mut band = LinearSolver::<f64>::new(n, &Structure::Banded { lower: 0, upper: 0 }).unwrap();
    assert_eq!(band.factor(1.0, &j), Err(StepFailure::SingularMatrix));
    let mut sp =
        LinearSolver::<f64>::new(n, &Structure::Sparse(SparsityPattern::diagonal(n))).unwrap();
    assert_eq!(sp.factor(1.0, &j), Err(StepFailure::SingularMatrix));
    let mut x = vec![1.0; n];
    sp.solve_in_place(&mut x);
    assert!(x.iter().all(|v| v.is_finite()));
}

#[test]
fn mismatched_pattern_is_an_error() {
    assert!(LinearSolver::<f64>::new(4, &Structure::Sparse(SparsityPattern::diagonal(3))).is_err());
}
