//! Dense LU with partial pivoting: nalgebra kernels for small matrices,
//! faer's blocked LU for large ones.
//!
//! `P (shift I - J) = L U` by Gaussian elimination with row pivoting
//! (Golub and Van Loan, *Matrix Computations*, 4th ed., section 3.4).

use super::{check_pivot, Scalar};
use crate::matrix::{Jacobian, Storage};
use crate::scheme::StepFailure;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::linalg::lu::partial_pivoting::{factor as faer_factor, solve as faer_solve};
use faer::perm::PermRef;
use faer::{MatMut, MatRef, Par};
use nalgebra::{DMatrixViewMut, DVectorViewMut};

/// Dimension from which faer's LU replaces the nalgebra kernels.
///
/// Measured with `cargo bench -p ballast-core --bench lu_crossover` on the
/// project machine (2 cores, faer sequential, real `f64`, factorisation
/// plus one solve, mean time in microseconds):
///
/// | n        |    4 |    8 |   16 |   24 |   32 |   48 |   64 |   96 |  128 |  200 |
/// |----------|------|------|------|------|------|------|------|------|------|------|
/// | nalgebra | 0.15 | 0.52 | 1.41 | 2.95 | 5.48 | 15.7 | 35.8 |  112 |  288 | 1023 |
/// | faer     | 0.38 | 1.03 | 2.11 | 3.57 | 6.52 | 13.9 | 24.7 | 54.3 |  116 |  342 |
///
/// nalgebra's unblocked elimination wins up to 32, faer's recursive
/// blocked LU from 48 on; the curves cross near 40.
pub const FAER_CROSSOVER: usize = 40;

/// Dense LU factorisation of `shift I - J`, column-major.
#[derive(Debug)]
pub struct DenseLu<T: Scalar> {
    n: usize,
    lu: Vec<T>,
    /// nalgebra path: the row swapped with row `k` at step `k`;
    /// faer path: the forward row permutation.
    perm: Vec<usize>,
    perm_inv: Vec<usize>,
    mem: super::Scratch,
    use_faer: bool,
}

impl<T: Scalar> DenseLu<T> {
    /// Work memory for `n × n` matrices, choosing the kernel by [`FAER_CROSSOVER`].
    pub fn new(n: usize) -> Self {
        Self::with_kernel(n, n >= FAER_CROSSOVER)
    }

    /// Work memory for `n × n` matrices with an explicit kernel choice
    /// (`use_faer`), for measurements and tests.
    pub fn with_kernel(n: usize, use_faer: bool) -> Self {
        let req = if use_faer {
            faer_factor::lu_in_place_scratch::<usize, T>(n, n, Par::Seq, Default::default()).or(
                faer_solve::solve_in_place_scratch::<usize, T>(n, 1, Par::Seq),
            )
        } else {
            faer::dyn_stack::StackReq::EMPTY
        };
        Self {
            n,
            lu: vec![T::default(); n * n],
            perm: vec![0; n],
            perm_inv: vec![0; n],
            mem: super::Scratch(MemBuffer::new(req)),
            use_faer,
        }
    }

    /// Whether faer's kernel is in use.
    pub fn uses_faer(&self) -> bool {
        self.use_faer
    }

    /// Fills the work matrix with `shift I - J`.
    fn fill(&mut self, shift: T, jac: &Jacobian) {
        let n = self.n;
        match jac.storage() {
            Storage::Dense(v) => {
                for (dst, &src) in self.lu.iter_mut().zip(v.iter()) {
                    *dst = T::of_real(-src);
                }
            }
            _ => {
                for j in 0..n {
                    for i in 0..n {
                        self.lu[j * n + i] = T::of_real(-jac.get(i, j));
                    }
                }
            }
        }
        for i in 0..n {
            self.lu[i * n + i] += shift;
        }
    }

    /// Factorises `shift I - J`.
    pub fn factor(&mut self, shift: T, jac: &Jacobian) -> Result<(), StepFailure> {
        self.fill(shift, jac);
        self.factor_filled()
    }

    /// Factorises the matrix `a` (column-major `n × n`) as it is.
    pub fn factor_matrix(&mut self, a: &[T]) -> Result<(), StepFailure> {
        self.lu.copy_from_slice(a);
        self.factor_filled()
    }

    fn factor_filled(&mut self) -> Result<(), StepFailure> {
        let n = self.n;
        if self.use_faer {
            let a = MatMut::from_column_major_slice_mut(&mut self.lu, n, n);
            let stack = MemStack::new(&mut self.mem.0);
            faer_factor::lu_in_place(
                a,
                &mut self.perm,
                &mut self.perm_inv,
                Par::Seq,
                stack,
                Default::default(),
            );
        } else {
            let mut a = DMatrixViewMut::from_slice(&mut self.lu, n, n);
            for k in 0..n {
                let piv = a.view_range(k.., k).icamax() + k;
                let diag = a[(piv, k)];
                check_pivot(diag)?;
                self.perm[k] = piv;
                if piv != k {
                    a.columns_range_mut(..k).swap_rows(k, piv);
                    nalgebra::linalg::gauss_step_swap(&mut a, diag, k, piv);
                } else {
                    nalgebra::linalg::gauss_step(&mut a, diag, k);
                }
            }
        }
        for k in 0..n {
            check_pivot(self.lu[k * n + k])?;
        }
        Ok(())
    }

    /// Overwrites `b` with the solution of `(shift I - J) x = b`.
    pub fn solve_in_place(&mut self, b: &mut [T]) {
        let n = self.n;
        if self.use_faer {
            let lu = MatRef::from_column_major_slice(&self.lu, n, n);
            let perm = PermRef::new_checked(&self.perm, &self.perm_inv, n);
            let rhs = MatMut::from_column_major_slice_mut(b, n, 1);
            let stack = MemStack::new(&mut self.mem.0);
            faer_solve::solve_in_place(lu, lu, perm, rhs, Par::Seq, stack);
        } else {
            for k in 0..n {
                b.swap(k, self.perm[k]);
            }
            let a = nalgebra::DMatrixView::from_slice(&self.lu, n, n);
            let mut x = DVectorViewMut::from_slice(b, n);
            a.solve_lower_triangular_with_diag_mut(&mut x, T::one());
            // The pivots were checked at factorisation, so this succeeds.
            let _ = a.solve_upper_triangular_mut(&mut x);
        }
    }
}
