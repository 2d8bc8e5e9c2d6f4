//! Cheap bounds and estimates: Gershgorin for an assembled matrix, the free
//! estimate from two Runge–Kutta stages, and a dense product helper.

use crate::options::{check_len, StiffnessError};
use crate::vecops::norm_diff;

/// An upper bound of the spectral radius of a dense `n × n` matrix stored
/// column-major (entry `(i, j)` at `a[j * n + i]`):
///
/// `rho(A) <= min( max_i sum_j |a_ij|, max_j sum_i |a_ij| )`.
///
/// Every eigenvalue lies in a Gershgorin disc `|z - a_ii| <= sum_{j != i} |a_ij|`,
/// so `|lambda| <= sum_j |a_ij|` for some row `i`; the same holds for the
/// columns, since `A^T` has the same eigenvalues (Golub and Van Loan,
/// *Matrix Computations*, 4th ed., Theorem 7.2.1). Costs `n^2` additions and
/// no product; use it as a safe cap on the power-iteration estimate when the
/// Jacobian is assembled anyway.
///
/// ```
/// use ballast_stiffness::gershgorin_bound;
/// // [[-4, 1], [2, -3]] column-major; eigenvalues -2 and -5.
/// let b = gershgorin_bound(2, &[-4.0, 2.0, 1.0, -3.0]).unwrap();
/// assert_eq!(b, 5.0);
/// ```
pub fn gershgorin_bound(n: usize, a: &[f64]) -> Result<f64, StiffnessError> {
    check_len("matrix (n * n, column-major)", n.saturating_mul(n), a.len())?;
    let mut max_col = 0.0f64;
    let mut max_row = 0.0f64;
    for i in 0..n {
        let mut row = 0.0;
        for j in 0..n {
            row += a[j * n + i].abs();
        }
        max_row = max_row.max(row);
    }
    for col in a.chunks_exact(n.max(1)) {
        max_col = max_col.max(col.iter().map(|x| x.abs()).sum());
    }
    Ok(max_row.min(max_col))
}

/// [`gershgorin_bound`] for a matrix given by its stored entries
/// `(row, column, value)`, in any order (a sparse or banded Jacobian).
/// Entries outside `n × n` are rejected. Allocates two vectors of length `n`.
///
/// ```
/// use ballast_stiffness::gershgorin_bound_entries;
/// let entries = [(0, 0, -4.0), (0, 1, 1.0), (1, 0, 2.0), (1, 1, -3.0)];
/// assert_eq!(gershgorin_bound_entries(2, entries).unwrap(), 5.0);
/// ```
pub fn gershgorin_bound_entries<I>(n: usize, entries: I) -> Result<f64, StiffnessError>
where
    I: IntoIterator<Item = (usize, usize, f64)>,
{
    let mut rows = vec![0.0f64; n];
    let mut cols = vec![0.0f64; n];
    for (i, j, v) in entries {
        if i >= n || j >= n {
            return Err(StiffnessError::Dimension {
                what: "matrix entry index",
                expected: n,
                got: i.max(j),
            });
        }
        rows[i] += v.abs();
        cols[j] += v.abs();
    }
    let max_row = rows.iter().fold(0.0f64, |m, &x| m.max(x));
    let max_col = cols.iter().fold(0.0f64, |m, &x| m.max(x));
    Ok(max_row.min(max_col))
}

/// The free stiffness estimate from two stages of an explicit Runge–Kutta
/// step evaluated at the same time point:
///
/// `rho ≈ ||k_i - k_j|| / ||Y_i - Y_j||`, where `k = f(t + c h, Y)`.
///
/// With `c_i = c_j` the difference is `f(t, Y_i) - f(t, Y_j) ≈ J (Y_i - Y_j)`,
/// so the ratio is the gain of the Jacobian in the direction `Y_i - Y_j`: a
/// lower estimate of `||J||`, which after a few steps at the stability limit
/// points along the dominant eigenvector. No extra `f` call. Hairer and
/// Wanner, *Solving ODEs II*, section IV.2, "Automatic stiffness detection"
/// (for Dormand–Prince 5(4) the stages 6 and 7, both at `c = 1`; compare `h rho` with
/// the stability boundary 3.3). Returns `None` when the lengths differ, the
/// stages coincide, or a value is not finite.
///
/// ```
/// use ballast_stiffness::stage_estimate;
/// // f(y) = -40 y: two stage values and their slopes.
/// let (y6, y7) = ([1.0, 2.0], [1.1, 2.2]);
/// let (k6, k7) = ([-40.0, -80.0], [-44.0, -88.0]);
/// let rho = stage_estimate(&k7, &k6, &y7, &y6).unwrap();
/// assert!((rho - 40.0).abs() < 1e-9);
/// ```
pub fn stage_estimate(k_i: &[f64], k_j: &[f64], y_i: &[f64], y_j: &[f64]) -> Option<f64> {
    let n = k_i.len();
    if k_j.len() != n || y_i.len() != n || y_j.len() != n {
        return None;
    }
    let dy = norm_diff(y_i, y_j);
    let dk = norm_diff(k_i, k_j);
    let rho = dk / dy;
    (dy > 0.0 && rho.is_finite()).then_some(rho)
}

/// The product `out = A v` for a dense `n × n` matrix stored column-major,
/// as a closure for [`crate::spectral_radius`] (a user Jacobian used
/// directly). Panics inside the closure if `a.len() < n * n`.
///
/// ```
/// use ballast_stiffness::{dense_product, spectral_radius, PowerOptions};
/// let a = [-4.0, 2.0, 1.0, -3.0];
/// let est = spectral_radius(2, dense_product(2, &a), &PowerOptions::default());
/// assert!((est.radius - 5.0).abs() < 0.05);
/// ```
pub fn dense_product(n: usize, a: &[f64]) -> impl FnMut(&[f64], &mut [f64]) + '_ {
    move |v: &[f64], out: &mut [f64]| {
        out.fill(0.0);
        for (j, vj) in v.iter().enumerate().take(n) {
            let col = &a[j * n..(j + 1) * n];
            for (o, aij) in out.iter_mut().zip(col) {
                *o += aij * vj;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gershgorin_both_ways_and_errors() {
        // [[1, 10], [0, 1]]: row sums 11, 1; column sums 1, 11.
        let a = [1.0, 0.0, 10.0, 1.0];
        assert_eq!(gershgorin_bound(2, &a).unwrap(), 11.0);
        // [[1, 0], [10, -1]] row sums 1, 11 -> 11; eigenvalues ±1.
        let ents = [(0, 0, 1.0), (1, 0, 10.0), (1, 1, -1.0)];
        assert_eq!(gershgorin_bound_entries(2, ents).unwrap(), 11.0);
        assert!(gershgorin_bound(3, &a).is_err());
        assert!(gershgorin_bound_entries(2, [(2, 0, 1.0)]).is_err());
        assert_eq!(gershgorin_bound(0, &[]).unwrap(), 0.0);
    }

    #[test]
    fn gershgorin_takes_the_smaller_side() {
        // Column (1,1,1)^T e_1^T: rows sum to 1 each, first column to 3.
        let a = [1.0, 1.0, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0];
        assert_eq!(gershgorin_bound(3, &a).unwrap(), 1.0);
    }

    #[test]
    fn stage_estimate_edges() {
        assert_eq!(stage_estimate(&[1.0], &[1.0], &[2.0], &[2.0]), None);
        assert_eq!(stage_estimate(&[1.0], &[1.0, 2.0], &[2.0], &[2.0]), None);
        assert_eq!(
            stage_estimate(&[3.0, 0.0], &[0.0, 4.0], &[1.0, 0.0], &[0.0, 0.0]),
            Some(5.0)
        );
    }

    #[test]
    fn dense_product_is_column_major() {
        let a = [1.0, 3.0, 2.0, 4.0]; // [[1, 2], [3, 4]]
        let mut p = dense_product(2, &a);
        let mut out = [0.0; 2];
        p(&[1.0, 1.0], &mut out);
        assert_eq!(out, [3.0, 7.0]);
    }
}
