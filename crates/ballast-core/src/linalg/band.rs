//! Banded LU with partial pivoting.
//!
//! For a matrix with `l` sub- and `u` super-diagonals, row interchanges
//! widen `U` to `l + u` super-diagonals, so the factor is stored in
//! `2l + u + 1` diagonals: entry `(i, j)` with `-(l + u) <= i - j <= l`
//! lives at `j * ld + (l + u + i - j)`, `ld = 2l + u + 1` (the layout of
//! LAPACK's band LU; Golub and Van Loan, *Matrix Computations*, 4th ed.,
//! section 4.3.5). Factorisation costs `O(n l (l + u))`, a solve
//! `O(n (2l + u))`.

use super::{check_pivot, Scalar};
use crate::matrix::{Jacobian, Storage};
use crate::scheme::StepFailure;

/// LU factorisation of a banded `shift I - J` with partial pivoting.
#[derive(Debug)]
pub struct BandLu<T: Scalar> {
    n: usize,
    lower: usize,
    upper: usize,
    ld: usize,
    ab: Vec<T>,
    piv: Vec<usize>,
    /// `1 / U_jj`: the solve multiplies instead of dividing.
    inv_diag: Vec<T>,
}

impl<T: Scalar> BandLu<T> {
    /// Work memory for `n × n` matrices with `lower` sub- and `upper`
    /// super-diagonals.
    pub fn new(n: usize, lower: usize, upper: usize) -> Self {
        let ld = 2 * lower + upper + 1;
        Self {
            n,
            lower,
            upper,
            ld,
            ab: vec![T::default(); ld * n],
            piv: vec![0; n],
            inv_diag: vec![T::default(); n],
        }
    }

    #[inline]
    fn idx(&self, i: usize, j: usize) -> usize {
        j * self.ld + self.lower + self.upper + i - j
    }

    /// Factorises `shift I - J`. Entries of `J` outside the band are ignored.
    pub fn factor(&mut self, shift: T, jac: &Jacobian) -> Result<(), StepFailure> {
        let (n, l, u) = (self.n, self.lower, self.upper);
        self.ab.fill(T::default());
        match jac.storage() {
            Storage::Banded {
                lower,
                upper,
                values,
            } if *lower <= l && *upper <= u => {
                let w = lower + upper + 1;
                for j in 0..n {
                    let i0 = j.saturating_sub(*upper);
                    let i1 = (j + lower + 1).min(n);
                    for i in i0..i1 {
                        let k = self.idx(i, j);
                        self.ab[k] = T::of_real(-values[j * w + upper + i - j]);
                    }
                }
            }
            _ => {
                for j in 0..n {
                    for i in j.saturating_sub(u)..(j + l + 1).min(n) {
                        let k = self.idx(i, j);
                        self.ab[k] = T::of_real(-jac.get(i, j));
                    }
                }
            }
        }
        for i in 0..n {
            let k = self.idx(i, i);
            self.ab[k] += shift;
        }
        self.factor_filled()
    }

    /// Unblocked band LU (the elimination of LAPACK's `gbtf2`), walking
    /// contiguous column slices: in this layout the entries of one column
    /// are adjacent, the diagonal at offset `l + u`. The pivot is the entry
    /// of largest `|re| + |im|` (as LAPACK's `izamax` chooses it), which
    /// needs no square root.
    fn factor_filled(&mut self) -> Result<(), StepFailure> {
        let (n, u, ld) = (self.n, self.upper, self.ld);
        let d = self.lower + u;
        // Last column touched so far by row interchanges.
        let mut ju = 0usize;
        for j in 0..n {
            let km = self.lower.min(n - 1 - j);
            let col = &self.ab[j * ld + d..j * ld + d + km + 1];
            let (mut p, mut best) = (0, -1.0);
            for (r, v) in col.iter().enumerate() {
                let m = v.pivot_size();
                if m > best {
                    best = m;
                    p = r;
                }
            }
            self.piv[j] = j + p;
            let pivot = col[p];
            check_pivot(pivot)?;
            ju = ju.max((j + u + p).min(n - 1));
            if p != 0 {
                for c in j..=ju {
                    let (a, b) = (self.idx(j, c), self.idx(j + p, c));
                    self.ab.swap(a, b);
                }
            }
            let inv = T::one() / pivot;
            self.inv_diag[j] = inv;
            // Column j ends before column j + 1 begins.
            let (left, right) = self.ab.split_at_mut((j + 1) * ld);
            let mult = &mut left[j * ld + d + 1..j * ld + d + 1 + km];
            for m in mult.iter_mut() {
                *m *= inv;
            }
            let mult = &*mult;
            for c in j + 1..=ju {
                // (j, c) relative to the start of column j + 1; c <= j + d.
                let off = (c - j - 1) * ld + d + j - c;
                let ujc = right[off];
                if ujc == T::default() {
                    continue;
                }
                for (t, &m) in right[off + 1..off + 1 + km].iter_mut().zip(mult) {
                    *t -= m * ujc;
                }
            }
        }
        Ok(())
    }

    /// Overwrites `b` with the solution of `(shift I - J) x = b`.
    pub fn solve_in_place(&mut self, b: &mut [T]) {
        let (n, ld) = (self.n, self.ld);
        let d = self.lower + self.upper;
        for j in 0..n {
            let pj = self.piv[j];
            if pj != j {
                b.swap(j, pj);
            }
            let km = self.lower.min(n - 1 - j);
            let bj = b[j];
            let mult = &self.ab[j * ld + d + 1..j * ld + d + 1 + km];
            for (x, &m) in b[j + 1..j + 1 + km].iter_mut().zip(mult) {
                *x -= m * bj;
            }
        }
        for j in (0..n).rev() {
            b[j] *= self.inv_diag[j];
            let bj = b[j];
            let i0 = j.saturating_sub(d);
            let col = &self.ab[j * ld + d - (j - i0)..j * ld + d];
            for (x, &a) in b[i0..j].iter_mut().zip(col) {
                *x -= a * bj;
            }
        }
    }
}
