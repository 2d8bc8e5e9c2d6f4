//! Checking an analytic Jacobian against finite differences.
//!
//! Used by this crate's tests for every model; public so that tests of
//! other crates and users' own models can run the same check.

use ballast_core::{Jacobian, System};

/// The worst mismatch between a system's analytic Jacobian and central
/// differences, see [`jacobian_error`].
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct JacobianError {
    /// The largest scaled difference `|J_ij - D_ij| / s_i`, with `D` the
    /// central difference and `s = |D_ij| + 1e-4 max_k |D_ik| + 1e-7`: relative
    /// for the entries that matter, absolute (to the row's size, or to 1e-7)
    /// for entries too small for central differences to resolve.
    pub error: f64,
    /// Row of the worst entry.
    pub row: usize,
    /// Column of the worst entry.
    pub col: usize,
}

/// Compares `sys.jacobian(t, y)` (written into storage laid out for
/// `sys.structure()`, so entries outside a declared band or pattern count
/// as zero) with central differences `(f(y + h e_j) - f(y - h e_j)) / 2h`,
/// `h = eps^(1/3) max(|y_j|, 1)` and `h / 16` (the better of the two per
/// entry), over every entry of the dense matrix.
///
/// Returns `None` when the system has no analytic Jacobian. An `error`
/// below about `1e-6` means the two agree to the accuracy of central
/// differences; a wrong entry or a structure that hides a non-zero gives
/// an error of order 1.
///
/// ```
/// use ballast_models::{check::jacobian_error, Lorenz};
/// let e = jacobian_error(&mut Lorenz::default(), 0.0, &[1.0, 2.0, 3.0]).unwrap();
/// assert!(e.error < 1e-8);
/// ```
pub fn jacobian_error<S: System + ?Sized>(sys: &mut S, t: f64, y: &[f64]) -> Option<JacobianError> {
    let n = y.len();
    let mut jac = Jacobian::for_structure(n, &sys.structure());
    jac.fill_zero();
    if !sys.jacobian(t, y, &mut jac) {
        return None;
    }
    let step = f64::EPSILON.cbrt();
    let mut worst = JacobianError {
        error: f64::INFINITY,
        row: 0,
        col: 0,
    };
    // Per entry, the better of two step sizes: near a singularity (the
    // Arenstorf orbit passes 0.006 from the Moon) the standard step is too
    // coarse for central differences.
    let mut best = vec![f64::INFINITY; n * n];
    for shrink in [1.0, 1.0 / 16.0] {
        let d = central_differences(sys, t, y, step * shrink);
        for i in 0..n {
            let row = &d[i * n..(i + 1) * n];
            let big = row.iter().fold(0.0f64, |m, v| m.max(v.abs()));
            for j in 0..n {
                let s = row[j].abs() + 1e-4 * big + 1e-7;
                let e = (jac.get(i, j) - row[j]).abs() / s;
                let e = if e.is_nan() { f64::INFINITY } else { e };
                best[i * n + j] = best[i * n + j].min(e);
            }
        }
    }
    worst.error = 0.0;
    for i in 0..n {
        for j in 0..n {
            if best[i * n + j] > worst.error {
                worst = JacobianError {
                    error: best[i * n + j],
                    row: i,
                    col: j,
                };
            }
        }
    }
    Some(worst)
}

/// Central differences `(f(y + h_j e_j) - f(y - h_j e_j)) / 2h_j`,
/// `h_j = rel max(|y_j|, 1)`, row-major.
fn central_differences<S: System + ?Sized>(sys: &mut S, t: f64, y: &[f64], rel: f64) -> Vec<f64> {
    let n = y.len();
    let mut d = vec![0.0; n * n];
    let (mut yp, mut fp, mut fm) = (y.to_vec(), vec![0.0; n], vec![0.0; n]);
    for j in 0..n {
        let h = rel * y[j].abs().max(1.0);
        yp[j] = y[j] + h;
        sys.rhs(t, &yp, &mut fp);
        yp[j] = y[j] - h;
        sys.rhs(t, &yp, &mut fm);
        yp[j] = y[j];
        let h2 = (y[j] + h) - (y[j] - h);
        for i in 0..n {
            d[i * n + j] = (fp[i] - fm[i]) / h2;
        }
    }
    d
}
