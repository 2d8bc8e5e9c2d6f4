//! Jacobian-vector products without a Jacobian: one-sided finite differences.

use crate::options::{check_len, StiffnessError};
use crate::vecops::norm;

/// `sqrt(machine epsilon)` for `f64`.
const SQRT_EPS: f64 = 1.4901161193847656e-8;

/// The finite-difference increment for the product `J v` at `y`:
///
/// `e = sqrt(eps) (1 + ||y||) / ||v||` (Euclidean norms),
///
/// so that the perturbation `e v` has norm `sqrt(eps) (1 + ||y||)`: a
/// relative change of `y` of about `sqrt(eps)`, which balances the rounding
/// error `~ eps ||f|| / e` against the truncation error `~ e ||f''|| ||v||^2`
/// of the one-sided difference. Common practice in Jacobian-free Newton–Krylov
/// codes (D. A. Knoll, D. E. Keyes, J. Comput. Phys. 193 (2004) 357–397,
/// section 2.2, recalled from memory); RKC's nonlinear power iteration uses
/// the same relative size `sqrt(uround) ||y||` (Sommeijer, Shampine and
/// Verwer 1998). Returns 0 when `v = 0`.
pub fn fd_increment(y: &[f64], v: &[f64]) -> f64 {
    let nv = norm(v);
    if nv > 0.0 && nv.is_finite() {
        SQRT_EPS * (1.0 + norm(y)) / nv
    } else {
        0.0
    }
}

/// The finite-difference increment with per-component typical sizes:
///
/// `e = sqrt(eps) / RMS_i( v_i / s_i )`, `s_i = max(|y_i|, typical_i)`,
///
/// so that each component is perturbed by about `sqrt(eps) s_i` (in the
/// RMS sense): the directional form of Dennis and Schnabel's step
/// `sqrt(eps) max(|x_j|, typx_j)` (*Numerical Methods for Unconstrained
/// Optimization and Nonlinear Equations*, SIAM 1996, section 5.4, recalled
/// from memory). Use it when components differ in scale by orders of
/// magnitude (Robertson's `y_2 ~ 1e-5` next to `y_1 ~ 1`); a natural
/// `typical` is the integrator's absolute tolerance scaled up, or the
/// magnitudes seen so far. Falls back to [`fd_increment`] when every `s_i`
/// is zero or the lengths differ.
pub fn fd_increment_typical(y: &[f64], v: &[f64], typical: &[f64]) -> f64 {
    let n = y.len();
    if v.len() != n || typical.len() != n || n == 0 {
        return fd_increment(y, v);
    }
    let mut sum = 0.0;
    for ((yi, vi), ti) in y.iter().zip(v).zip(typical) {
        let s = yi.abs().max(ti.abs());
        if s > 0.0 {
            sum += (vi / s) * (vi / s);
        } else if *vi != 0.0 {
            return fd_increment(y, v);
        }
    }
    let rms = (sum / n as f64).sqrt();
    if rms > 0.0 && rms.is_finite() {
        SQRT_EPS / rms
    } else {
        fd_increment(y, v)
    }
}

/// Writes the finite-difference Jacobian-vector product
///
/// `out = (f(y + e v) - f(y)) / e`, with `e =` [`fd_increment`]`(y, v)`,
///
/// and returns `e`. `fy = f(y)` is passed in (the integrator already has
/// it), so each product costs one call of `f`, which writes its second
/// argument from its first (fix `t` in the closure). `y_pert` and `f_pert`
/// are scratch of length `n`; nothing is allocated. `v = 0` gives `out = 0`
/// without calling `f`.
///
/// Accuracy: `O(sqrt(eps))` relative to `||J|| ||v||` for a smooth `f` with
/// moderate second derivatives; a component of `y` much smaller than
/// `||y||` that `f` depends on strongly nonlinearly (Robertson's `y_2`) is
/// perturbed by a large fraction of itself, and the truncation error grows
/// accordingly.
///
/// ```
/// use ballast_stiffness::fd_jvp;
/// // f(y) = (y0^2, y0 y1): J = [[2 y0, 0], [y1, y0]].
/// let mut f = |y: &[f64], out: &mut [f64]| { out[0] = y[0] * y[0]; out[1] = y[0] * y[1]; };
/// let y = [1.0, 2.0];
/// let fy = [1.0, 2.0];
/// let (mut yp, mut fp, mut jv) = ([0.0; 2], [0.0; 2], [0.0; 2]);
/// fd_jvp(&mut f, &y, &fy, &[1.0, 0.0], &mut yp, &mut fp, &mut jv).unwrap();
/// assert!((jv[0] - 2.0).abs() < 1e-6 && (jv[1] - 2.0).abs() < 1e-6);
/// ```
pub fn fd_jvp<F>(
    f: &mut F,
    y: &[f64],
    fy: &[f64],
    v: &[f64],
    y_pert: &mut [f64],
    f_pert: &mut [f64],
    out: &mut [f64],
) -> Result<f64, StiffnessError>
where
    F: FnMut(&[f64], &mut [f64]) + ?Sized,
{
    let n = y.len();
    check_len("f(y)", n, fy.len())?;
    check_len("v", n, v.len())?;
    check_len("y_pert", n, y_pert.len())?;
    check_len("f_pert", n, f_pert.len())?;
    check_len("out", n, out.len())?;
    let e = fd_increment(y, v);
    Ok(fd_jvp_with(f, e, y, fy, v, y_pert, f_pert, out))
}

/// [`fd_jvp`] after the length checks, with the increment `e` given.
fn fd_jvp_with<F>(
    f: &mut F,
    e: f64,
    y: &[f64],
    fy: &[f64],
    v: &[f64],
    y_pert: &mut [f64],
    f_pert: &mut [f64],
    out: &mut [f64],
) -> f64
where
    F: FnMut(&[f64], &mut [f64]) + ?Sized,
{
    if e == 0.0 {
        out.fill(0.0);
        return 0.0;
    }
    for ((p, yi), vi) in y_pert.iter_mut().zip(y).zip(v) {
        *p = yi + e * vi;
    }
    f(y_pert, f_pert);
    let inv = 1.0 / e;
    for ((o, fp), f0) in out.iter_mut().zip(f_pert.iter()).zip(fy) {
        *o = (fp - f0) * inv;
    }
    e
}

/// A finite-difference Jacobian-vector product with its own scratch,
/// sized once: [`fd_jvp`] without passing buffers.
///
/// ```
/// use ballast_stiffness::{FdJvp, spectral_radius, PowerOptions};
/// // f(y) = -(1 + y^2) * (1, 100) componentwise: J = diag(-1, -100) near y = 0.
/// let mut f = |y: &[f64], out: &mut [f64]| {
///     out[0] = -y[0] * (1.0 + y[0] * y[0]);
///     out[1] = -100.0 * y[1] * (1.0 + y[1] * y[1]);
/// };
/// let y = [0.0, 0.0];
/// let mut fy = [0.0; 2];
/// f(&y, &mut fy);
/// let mut jvp = FdJvp::new(2);
/// let est = spectral_radius(2, |v: &[f64], out: &mut [f64]| {
///     jvp.apply(&mut f, &y, &fy, v, out).unwrap();
/// }, &PowerOptions::default());
/// assert!((est.radius - 100.0).abs() < 1.0);
/// ```
#[derive(Clone, Debug)]
pub struct FdJvp {
    /// `y + e v`, then `f(y + e v)`, in one allocation.
    pert: Vec<f64>,
    /// Typical sizes for [`fd_increment_typical`]; empty: [`fd_increment`].
    typical: Vec<f64>,
    evals: usize,
}

impl FdJvp {
    /// Scratch for dimension `n`.
    pub fn new(n: usize) -> Self {
        Self {
            pert: vec![0.0; 2 * n],
            typical: Vec::new(),
            evals: 0,
        }
    }

    /// The dimension `n`.
    pub fn dim(&self) -> usize {
        self.pert.len() / 2
    }

    /// Sets per-component typical sizes: the increment becomes
    /// [`fd_increment_typical`] instead of [`fd_increment`]. `None` goes
    /// back to the default. Allocates (once); not for the inner loop.
    pub fn set_typical(&mut self, typical: Option<&[f64]>) -> Result<(), StiffnessError> {
        match typical {
            Some(t) => {
                check_len("typical sizes", self.dim(), t.len())?;
                self.typical.clear();
                self.typical.extend(t.iter().map(|x| x.abs()));
            }
            None => self.typical.clear(),
        }
        Ok(())
    }

    /// The increment `e` this scratch uses for the product `J v` at `y`.
    pub fn increment(&self, y: &[f64], v: &[f64]) -> f64 {
        if self.typical.is_empty() {
            fd_increment(y, v)
        } else {
            fd_increment_typical(y, v, &self.typical)
        }
    }

    /// Calls of `f` made so far.
    pub fn evals(&self) -> usize {
        self.evals
    }

    /// `out = (f(y + e v) - f(y)) / e`; returns `e`. See [`fd_jvp`]; the
    /// increment is [`FdJvp::increment`].
    pub fn apply<F>(
        &mut self,
        f: &mut F,
        y: &[f64],
        fy: &[f64],
        v: &[f64],
        out: &mut [f64],
    ) -> Result<f64, StiffnessError>
    where
        F: FnMut(&[f64], &mut [f64]) + ?Sized,
    {
        let n = self.dim();
        check_len("y", n, y.len())?;
        check_len("f(y)", n, fy.len())?;
        check_len("v", n, v.len())?;
        check_len("out", n, out.len())?;
        Ok(self.apply_unchecked(f, y, fy, v, out))
    }

    /// [`FdJvp::apply`] for slices already checked to have length `n`.
    pub(crate) fn apply_unchecked<F>(
        &mut self,
        f: &mut F,
        y: &[f64],
        fy: &[f64],
        v: &[f64],
        out: &mut [f64],
    ) -> f64
    where
        F: FnMut(&[f64], &mut [f64]) + ?Sized,
    {
        let e = self.increment(y, v);
        let (y_pert, f_pert) = self.pert.split_at_mut(y.len());
        let e = fd_jvp_with(f, e, y, fy, v, y_pert, f_pert, out);
        if e != 0.0 {
            self.evals += 1;
        }
        e
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn linear_f_is_exact_to_rounding() {
        // f(y) = A y with A = [[1, 2], [3, 4]] (row-major here).
        let mut f = |y: &[f64], o: &mut [f64]| {
            o[0] = y[0] + 2.0 * y[1];
            o[1] = 3.0 * y[0] + 4.0 * y[1];
        };
        let y = [0.3, -0.7];
        let mut fy = [0.0; 2];
        f(&y, &mut fy);
        let mut jvp = FdJvp::new(2);
        let mut out = [0.0; 2];
        let e = jvp.apply(&mut f, &y, &fy, &[1.0, 1.0], &mut out).unwrap();
        assert!(e > 0.0);
        assert!((out[0] - 3.0).abs() < 1e-7 && (out[1] - 7.0).abs() < 1e-7);
        assert_eq!(jvp.evals(), 1);
    }

    #[test]
    fn zero_direction_and_bad_lengths() {
        let mut calls = 0;
        let mut f = |_: &[f64], o: &mut [f64]| {
            calls += 1;
            o.fill(1.0)
        };
        let (mut yp, mut fp, mut out) = ([0.0; 2], [0.0; 2], [5.0; 2]);
        let e = fd_jvp(
            &mut f,
            &[1.0, 1.0],
            &[1.0, 1.0],
            &[0.0, 0.0],
            &mut yp,
            &mut fp,
            &mut out,
        )
        .unwrap();
        assert_eq!(e, 0.0);
        assert_eq!(out, [0.0, 0.0]);
        let r = fd_jvp(
            &mut f,
            &[1.0, 1.0],
            &[1.0],
            &[0.0, 0.0],
            &mut yp,
            &mut fp,
            &mut out,
        );
        assert!(matches!(r, Err(StiffnessError::Dimension { .. })));
        assert_eq!(calls, 0);
    }

    #[test]
    fn typical_sizes_resolve_a_small_component() {
        // f = (0, k y1^2) with y1 = 1e-5: J v = (0, 2 k y1 v1).
        let k = 3e7;
        let mut f = |y: &[f64], o: &mut [f64]| {
            o[0] = 0.0;
            o[1] = k * y[1] * y[1];
        };
        let y = [1.0, 1e-5];
        let mut fy = [0.0; 2];
        f(&y, &mut fy);
        let v = [0.0, 1.0];
        let exact = 2.0 * k * y[1];
        let mut jvp = FdJvp::new(2);
        let mut out = [0.0; 2];
        jvp.apply(&mut f, &y, &fy, &v, &mut out).unwrap();
        let plain = (out[1] - exact).abs() / exact;
        jvp.set_typical(Some(&[1.0, 1e-8])).unwrap();
        jvp.apply(&mut f, &y, &fy, &v, &mut out).unwrap();
        let scaled = (out[1] - exact).abs() / exact;
        assert!(plain > 1e-4, "{plain}");
        assert!(scaled < 1e-6, "{scaled}");
        assert!(jvp.set_typical(Some(&[1.0])).is_err());
        jvp.set_typical(None).unwrap();
        assert_eq!(jvp.increment(&y, &v), fd_increment(&y, &v));
        // Zero typical size on a zero component moved by v: default formula.
        assert_eq!(
            fd_increment_typical(&[0.0], &[1.0], &[0.0]),
            fd_increment(&[0.0], &[1.0])
        );
    }

    #[test]
    fn increment_scales_with_y_and_v() {
        let e1 = fd_increment(&[0.0; 4], &[1.0, 0.0, 0.0, 0.0]);
        assert!((e1 - SQRT_EPS).abs() < 1e-24);
        let e2 = fd_increment(&[3.0, 4.0], &[0.0, 2.0]);
        assert!((e2 - SQRT_EPS * 6.0 / 2.0).abs() < 1e-22);
        assert_eq!(SQRT_EPS, f64::EPSILON.sqrt());
    }
}
