//! The user's problem: `y' = f(t, y)`, optionally with its Jacobian.
//!
//! One required method writes the right-hand side into the caller's buffer;
//! optional methods supply an analytic Jacobian and its sparsity structure.
//! Everything optional falls back to finite differences.

use crate::matrix::Jacobian;

/// How the Jacobian `J = df/dy` is laid out.
///
/// Implicit schemes use this to choose the linear solver and the
/// finite-difference column grouping (Curtis, Powell and Reid 1974).
#[derive(Clone, Debug, PartialEq, Eq, Default)]
pub enum Structure {
    /// Every entry may be non-zero.
    #[default]
    Dense,
    /// `J[i][j] != 0` only for `i - lower <= j <= i + upper`.
    Banded {
        /// Number of sub-diagonals.
        lower: usize,
        /// Number of super-diagonals.
        upper: usize,
    },
    /// Only the listed `(row, column)` entries may be non-zero.
    Sparse(SparsityPattern),
}

/// A set of structurally non-zero `(row, column)` positions of an `n × n` matrix.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct SparsityPattern {
    n: usize,
    /// For each column, the sorted rows that may be non-zero (compressed sparse column).
    col_ptr: Vec<usize>,
    row_idx: Vec<usize>,
}

impl SparsityPattern {
    /// Builds a pattern from `(row, column)` pairs; duplicates are merged,
    /// pairs outside `n × n` are rejected with `None`.
    pub fn new(n: usize, entries: &[(usize, usize)]) -> Option<Self> {
        let mut cols: Vec<Vec<usize>> = vec![Vec::new(); n];
        for &(i, j) in entries {
            if i >= n || j >= n {
                return None;
            }
            cols[j].push(i);
        }
        let mut col_ptr = Vec::with_capacity(n + 1);
        let mut row_idx = Vec::new();
        col_ptr.push(0);
        for mut rows in cols {
            rows.sort_unstable();
            rows.dedup();
            row_idx.extend_from_slice(&rows);
            col_ptr.push(row_idx.len());
        }
        Some(Self {
            n,
            col_ptr,
            row_idx,
        })
    }

    /// The diagonal pattern of an `n × n` matrix.
    pub fn diagonal(n: usize) -> Self {
        Self {
            n,
            col_ptr: (0..=n).collect(),
            row_idx: (0..n).collect(),
        }
    }

    /// Matrix dimension.
    pub fn dim(&self) -> usize {
        self.n
    }

    /// Number of structural non-zeros.
    pub fn nnz(&self) -> usize {
        self.row_idx.len()
    }

    /// Column pointers (length `n + 1`) of the compressed-column layout.
    pub fn col_ptr(&self) -> &[usize] {
        &self.col_ptr
    }

    /// Row indices, column by column, sorted within each column.
    pub fn row_idx(&self) -> &[usize] {
        &self.row_idx
    }

    /// The rows that may be non-zero in column `j`.
    pub fn column(&self, j: usize) -> &[usize] {
        &self.row_idx[self.col_ptr[j]..self.col_ptr[j + 1]]
    }

    /// Position of `(i, j)` in the value array, if it is in the pattern.
    pub fn position(&self, i: usize, j: usize) -> Option<usize> {
        if j >= self.n {
            return None;
        }
        let start = self.col_ptr[j];
        self.column(j).binary_search(&i).ok().map(|k| start + k)
    }
}

/// An ordinary differential equation `y' = f(t, y)`.
///
/// Implemented for every closure `FnMut(f64, &[f64], &mut [f64])` (and so
/// for `&mut` closures). Implement it on your own type to add an analytic
/// Jacobian or a sparsity structure; lend such a value to a run without
/// giving it up with [`ByRef`].
///
/// ```
/// use ballast_core::System;
/// let mut decay = |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -2.0 * y[0];
/// let mut dy = [0.0];
/// decay.rhs(0.0, &[1.0], &mut dy);
/// assert_eq!(dy[0], -2.0);
/// ```
pub trait System {
    /// Writes `f(t, y)` into `dydt` (same length as `y`).
    fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]);

    /// Writes the analytic Jacobian `df/dy` at `(t, y)` into `jac` (every
    /// structurally non-zero entry; `jac` is zeroed before the call) and
    /// returns `true`; the default returns `false`, meaning "not available,
    /// use finite differences".
    fn jacobian(&mut self, t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        let _ = (t, y, jac);
        false
    }

    /// The structure of the Jacobian. Default: dense.
    fn structure(&self) -> Structure {
        Structure::Dense
    }
}

impl<F> System for F
where
    F: FnMut(f64, &[f64], &mut [f64]),
{
    #[inline]
    fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]) {
        self(t, y, dydt)
    }
}

/// A right-hand side closure paired with an analytic Jacobian closure.
///
/// ```
/// use ballast_core::{System, WithJacobian, Jacobian};
/// let mut sys = WithJacobian::new(
///     |_t: f64, y: &[f64], dy: &mut [f64]| dy[0] = -3.0 * y[0],
///     |_t: f64, _y: &[f64], jac: &mut Jacobian| { jac.set(0, 0, -3.0); },
/// );
/// let mut jac = Jacobian::dense(1);
/// assert!(sys.jacobian(0.0, &[1.0], &mut jac));
/// assert_eq!(jac.get(0, 0), -3.0);
/// ```
#[derive(Clone, Debug)]
pub struct WithJacobian<F, J> {
    rhs: F,
    jac: J,
    structure: Structure,
}

impl<F, J> WithJacobian<F, J>
where
    F: FnMut(f64, &[f64], &mut [f64]),
    J: FnMut(f64, &[f64], &mut Jacobian),
{
    /// Pairs `rhs` with the Jacobian writer `jac` (dense structure).
    pub fn new(rhs: F, jac: J) -> Self {
        Self {
            rhs,
            jac,
            structure: Structure::Dense,
        }
    }

    /// Declares the Jacobian's structure (banded or sparse).
    pub fn with_structure(mut self, structure: Structure) -> Self {
        self.structure = structure;
        self
    }
}

impl<F, J> System for WithJacobian<F, J>
where
    F: FnMut(f64, &[f64], &mut [f64]),
    J: FnMut(f64, &[f64], &mut Jacobian),
{
    #[inline]
    fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]) {
        (self.rhs)(t, y, dydt)
    }
    fn jacobian(&mut self, t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        (self.jac)(t, y, jac);
        true
    }
    fn structure(&self) -> Structure {
        self.structure.clone()
    }
}

/// A right-hand side closure with a declared Jacobian structure but no
/// analytic Jacobian: finite differences then use the structure.
#[derive(Clone, Debug)]
pub struct WithStructure<F> {
    rhs: F,
    structure: Structure,
}

impl<F> WithStructure<F>
where
    F: FnMut(f64, &[f64], &mut [f64]),
{
    /// Declares `structure` for the Jacobian of `rhs`.
    pub fn new(rhs: F, structure: Structure) -> Self {
        Self { rhs, structure }
    }
}

impl<F> System for WithStructure<F>
where
    F: FnMut(f64, &[f64], &mut [f64]),
{
    #[inline]
    fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]) {
        (self.rhs)(t, y, dydt)
    }
    fn structure(&self) -> Structure {
        self.structure.clone()
    }
}

/// Lends a system to a run by mutable reference: `ByRef(&mut model)`.
///
/// A blanket `impl System for &mut S` would overlap with the closure impl,
/// so borrowing goes through this wrapper instead.
#[derive(Debug)]
pub struct ByRef<'a, S: ?Sized>(pub &'a mut S);

impl<S: System + ?Sized> System for ByRef<'_, S> {
    #[inline]
    fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]) {
        self.0.rhs(t, y, dydt)
    }
    fn jacobian(&mut self, t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        self.0.jacobian(t, y, jac)
    }
    fn structure(&self) -> Structure {
        self.0.structure()
    }
}
