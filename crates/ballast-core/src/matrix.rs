//! Matrix storage for Jacobians: dense (column-major), banded and sparse.
//!
//! [`Jacobian`] is what a user's analytic Jacobian writes into, through
//! [`Jacobian::set`], whatever the storage. The linear solvers read it.

use crate::system::{SparsityPattern, Structure};

/// A square matrix in one of three storages, addressed by `(row, column)`.
#[derive(Clone, Debug, PartialEq)]
pub struct Jacobian {
    n: usize,
    storage: Storage,
}

/// The storage behind a [`Jacobian`].
#[derive(Clone, Debug, PartialEq)]
pub enum Storage {
    /// Column-major `n × n` values: entry `(i, j)` at `j * n + i`.
    Dense(Vec<f64>),
    /// Band storage: entry `(i, j)` with `-lower <= j - i <= upper` at
    /// `j * (lower + upper + 1) + (upper + i - j)` (LAPACK-like column bands).
    Banded {
        /// Sub-diagonals.
        lower: usize,
        /// Super-diagonals.
        upper: usize,
        /// `(lower + upper + 1) * n` values.
        values: Vec<f64>,
    },
    /// Compressed sparse column values over a fixed pattern.
    Sparse {
        /// The structural non-zeros.
        pattern: SparsityPattern,
        /// One value per pattern entry.
        values: Vec<f64>,
    },
}

impl Jacobian {
    /// A zero dense `n × n` matrix.
    pub fn dense(n: usize) -> Self {
        Self {
            n,
            storage: Storage::Dense(vec![0.0; n * n]),
        }
    }

    /// A zero banded `n × n` matrix.
    pub fn banded(n: usize, lower: usize, upper: usize) -> Self {
        Self {
            n,
            storage: Storage::Banded {
                lower,
                upper,
                values: vec![0.0; (lower + upper + 1) * n],
            },
        }
    }

    /// A zero sparse matrix over `pattern`.
    pub fn sparse(pattern: SparsityPattern) -> Self {
        let nnz = pattern.nnz();
        Self {
            n: pattern.dim(),
            storage: Storage::Sparse {
                pattern,
                values: vec![0.0; nnz],
            },
        }
    }

    /// A zero matrix laid out for `structure`.
    pub fn for_structure(n: usize, structure: &Structure) -> Self {
        match structure {
            Structure::Dense => Self::dense(n),
            Structure::Banded { lower, upper } => Self::banded(n, *lower, *upper),
            Structure::Sparse(p) => Self::sparse(p.clone()),
        }
    }

    /// Dimension `n`.
    pub fn dim(&self) -> usize {
        self.n
    }

    /// The underlying storage.
    pub fn storage(&self) -> &Storage {
        &self.storage
    }

    /// The underlying storage, mutably.
    pub fn storage_mut(&mut self) -> &mut Storage {
        &mut self.storage
    }

    /// Sets every stored value to zero.
    pub fn fill_zero(&mut self) {
        match &mut self.storage {
            Storage::Dense(v) => v.fill(0.0),
            Storage::Banded { values, .. } => values.fill(0.0),
            Storage::Sparse { values, .. } => values.fill(0.0),
        }
    }

    #[inline]
    fn slot(&self, i: usize, j: usize) -> Option<usize> {
        if i >= self.n || j >= self.n {
            return None;
        }
        match &self.storage {
            Storage::Dense(_) => Some(j * self.n + i),
            Storage::Banded { lower, upper, .. } => {
                let (l, u) = (*lower as isize, *upper as isize);
                let d = j as isize - i as isize;
                if d < -l || d > u {
                    None
                } else {
                    Some(j * (lower + upper + 1) + (u - d) as usize)
                }
            }
            Storage::Sparse { pattern, .. } => pattern.position(i, j),
        }
    }

    fn values_mut(&mut self) -> &mut [f64] {
        match &mut self.storage {
            Storage::Dense(v) => v,
            Storage::Banded { values, .. } => values,
            Storage::Sparse { values, .. } => values,
        }
    }

    fn values(&self) -> &[f64] {
        match &self.storage {
            Storage::Dense(v) => v,
            Storage::Banded { values, .. } => values,
            Storage::Sparse { values, .. } => values,
        }
    }

    /// Sets entry `(i, j)`. Returns `false` (and stores nothing) when the
    /// position is outside the matrix or outside its band or pattern.
    #[inline]
    pub fn set(&mut self, i: usize, j: usize, value: f64) -> bool {
        match self.slot(i, j) {
            Some(k) => {
                self.values_mut()[k] = value;
                true
            }
            None => false,
        }
    }

    /// Adds to entry `(i, j)`; same rules as [`Jacobian::set`].
    #[inline]
    pub fn add(&mut self, i: usize, j: usize, value: f64) -> bool {
        match self.slot(i, j) {
            Some(k) => {
                self.values_mut()[k] += value;
                true
            }
            None => false,
        }
    }

    /// Entry `(i, j)`; zero outside the stored structure.
    #[inline]
    pub fn get(&self, i: usize, j: usize) -> f64 {
        self.slot(i, j).map_or(0.0, |k| self.values()[k])
    }

    /// `out = J v`.
    pub fn mul_vec(&self, v: &[f64], out: &mut [f64]) {
        out.fill(0.0);
        let n = self.n;
        match &self.storage {
            Storage::Dense(a) => {
                for j in 0..n {
                    let vj = v[j];
                    let col = &a[j * n..(j + 1) * n];
                    for i in 0..n {
                        out[i] += col[i] * vj;
                    }
                }
            }
            Storage::Banded {
                lower,
                upper,
                values,
            } => {
                let w = lower + upper + 1;
                for j in 0..n {
                    let i0 = j.saturating_sub(*upper);
                    let i1 = (j + lower + 1).min(n);
                    for i in i0..i1 {
                        out[i] += values[j * w + upper + i - j] * v[j];
                    }
                }
            }
            Storage::Sparse { pattern, values } => {
                for j in 0..n {
                    let p = pattern.col_ptr();
                    for k in p[j]..p[j + 1] {
                        out[pattern.row_idx()[k]] += values[k] * v[j];
                    }
                }
            }
        }
    }

    /// A dense copy, column-major (`j * n + i`).
    pub fn to_dense(&self) -> Vec<f64> {
        let n = self.n;
        let mut d = vec![0.0; n * n];
        for j in 0..n {
            for i in 0..n {
                d[j * n + i] = self.get(i, j);
            }
        }
        d
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn banded_and_sparse_match_dense() {
        let n = 5;
        let mut d = Jacobian::dense(n);
        let mut b = Jacobian::banded(n, 1, 2);
        let pat: Vec<(usize, usize)> = (0..n)
            .flat_map(|i| (0..n).map(move |j| (i, j)))
            .filter(|&(i, j)| j + 1 >= i && j <= i + 2)
            .collect();
        let mut s = Jacobian::sparse(SparsityPattern::new(n, &pat).unwrap());
        for i in 0..n {
            for j in 0..n {
                if j + 1 >= i && j <= i + 2 {
                    let v = (i * 7 + j * 3) as f64 + 0.5;
                    assert!(d.set(i, j, v) && b.set(i, j, v) && s.set(i, j, v));
                } else {
                    assert!(!b.set(i, j, 1.0));
                    assert!(!s.set(i, j, 1.0));
                }
            }
        }
        assert_eq!(d.to_dense(), b.to_dense());
        assert_eq!(d.to_dense(), s.to_dense());
        let v = [1.0, -2.0, 0.5, 3.0, -1.0];
        let (mut o1, mut o2, mut o3) = ([0.0; 5], [0.0; 5], [0.0; 5]);
        d.mul_vec(&v, &mut o1);
        b.mul_vec(&v, &mut o2);
        s.mul_vec(&v, &mut o3);
        assert_eq!(o1, o2);
        assert_eq!(o1, o3);
        assert!(!d.set(5, 0, 1.0));
    }
}
