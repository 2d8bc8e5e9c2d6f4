//! Sparse LU through faer: a symbolic analysis (column ordering and
//! elimination structure) once per pattern, a numeric factorisation with
//! partial pivoting per iteration matrix.
//!
//! The pattern factorised is the Jacobian's pattern joined with the
//! diagonal, since `shift I - J` always has a diagonal.

use super::Scalar;
use crate::matrix::{Jacobian, Storage};
use crate::scheme::StepFailure;
use crate::system::SparsityPattern;
use faer::dyn_stack::{MemBuffer, MemStack};
use faer::sparse::linalg::lu::{factorize_symbolic_lu, LuRef, NumericLu, SymbolicLu};
use faer::sparse::{SparseColMatRef, SymbolicSparseColMatRef};
use faer::{Conj, MatMut, Par};

/// Sparse LU factorisation of `shift I - J` over a fixed pattern.
#[derive(Debug)]
pub struct SparseLu<T: Scalar> {
    n: usize,
    col_ptr: Vec<usize>,
    row_idx: Vec<usize>,
    values: Vec<T>,
    /// Position in `values` of each entry of the Jacobian's pattern.
    jac_pos: Vec<usize>,
    /// Position in `values` of each diagonal entry.
    diag_pos: Vec<usize>,
    symbolic: SymbolicLu<usize>,
    numeric: NumericLu<usize, T>,
    mem: super::Scratch,
    probe: Vec<T>,
    factored: bool,
}

impl<T: Scalar> SparseLu<T> {
    /// Analyses `pattern` (joined with the diagonal) once.
    pub fn new(pattern: &SparsityPattern) -> Result<Self, String> {
        let n = pattern.dim();
        let mut col_ptr = Vec::with_capacity(n + 1);
        let mut row_idx = Vec::with_capacity(pattern.nnz() + n);
        let mut jac_pos = vec![0; pattern.nnz()];
        let mut diag_pos = vec![0; n];
        col_ptr.push(0);
        for j in 0..n {
            let base = pattern.col_ptr()[j];
            let mut diag_done = false;
            for (k, &i) in pattern.column(j).iter().enumerate() {
                if !diag_done && i >= j {
                    if i > j {
                        diag_pos[j] = row_idx.len();
                        row_idx.push(j);
                    }
                    diag_done = true;
                }
                if i == j {
                    diag_pos[j] = row_idx.len();
                }
                jac_pos[base + k] = row_idx.len();
                row_idx.push(i);
            }
            if !diag_done {
                diag_pos[j] = row_idx.len();
                row_idx.push(j);
            }
            col_ptr.push(row_idx.len());
        }
        let sym = SymbolicSparseColMatRef::new_checked(n, n, &col_ptr, None, &row_idx);
        let symbolic = factorize_symbolic_lu(sym, Default::default())
            .map_err(|e| format!("sparse LU analysis failed: {e:?}"))?;
        let req = symbolic
            .factorize_numeric_lu_scratch::<T>(Par::Seq, Default::default())
            .or(symbolic.solve_in_place_scratch::<T>(1, Par::Seq));
        let nnz = row_idx.len();
        Ok(Self {
            n,
            col_ptr,
            row_idx,
            values: vec![T::default(); nnz],
            jac_pos,
            diag_pos,
            symbolic,
            numeric: NumericLu::new(),
            mem: super::Scratch(MemBuffer::new(req)),
            probe: vec![T::default(); n],
            factored: false,
        })
    }

    /// Structural non-zeros of the factorised matrix (pattern and diagonal).
    pub fn nnz(&self) -> usize {
        self.row_idx.len()
    }

    /// Factorises `shift I - J`. `jac` is read through its pattern when it
    /// is stored sparse with the pattern this solver was built for, entry
    /// by entry otherwise.
    pub fn factor(&mut self, shift: T, jac: &Jacobian) -> Result<(), StepFailure> {
        self.factored = false;
        self.values.fill(T::default());
        match jac.storage() {
            Storage::Sparse { values, .. } if values.len() == self.jac_pos.len() => {
                for (k, &v) in values.iter().enumerate() {
                    self.values[self.jac_pos[k]] = T::of_real(-v);
                }
            }
            _ => {
                for j in 0..self.n {
                    for k in self.col_ptr[j]..self.col_ptr[j + 1] {
                        self.values[k] = T::of_real(-jac.get(self.row_idx[k], j));
                    }
                }
            }
        }
        for j in 0..self.n {
            self.values[self.diag_pos[j]] += shift;
        }
        if !self.values.iter().all(|v| v.finite()) {
            return Err(StepFailure::SingularMatrix);
        }
        let sym = SymbolicSparseColMatRef::new_checked(
            self.n,
            self.n,
            &self.col_ptr,
            None,
            &self.row_idx,
        );
        let a = SparseColMatRef::new(sym, &self.values);
        let stack = MemStack::new(&mut self.mem.0);
        self.symbolic
            .factorize_numeric_lu(&mut self.numeric, a, Par::Seq, stack, Default::default())
            .map_err(|_| StepFailure::SingularMatrix)?;
        self.factored = true;
        // faer reports structural singularity only; a zero pivot shows as a
        // non-finite solution, which one probe solve detects.
        let mut probe = std::mem::take(&mut self.probe);
        probe.fill(T::of_real(1.0));
        self.solve_in_place(&mut probe);
        let ok = probe.iter().all(|v| v.finite());
        self.probe = probe;
        if ok {
            Ok(())
        } else {
            self.factored = false;
            Err(StepFailure::SingularMatrix)
        }
    }

    /// Overwrites `b` with the solution of `(shift I - J) x = b`. Leaves
    /// `b` unchanged when no factorisation succeeded yet.
    pub fn solve_in_place(&mut self, b: &mut [T]) {
        if !self.factored {
            return;
        }
        let lu = LuRef::new_unchecked(&self.symbolic, &self.numeric);
        let rhs = MatMut::from_column_major_slice_mut(b, self.n, 1);
        let stack = MemStack::new(&mut self.mem.0);
        lu.solve_in_place_with_conj(Conj::No, rhs, Par::Seq, stack);
    }
}
