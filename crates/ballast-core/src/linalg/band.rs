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

    /// Unblocked band LU (the elimination of LAPACK's `gbtf2`).
    fn factor_filled(&mut self) -> Result<(), StepFailure> {
        let (n, l, u) = (self.n, self.lower, self.upper);
        // Last column touched so far by row interchanges.
        let mut ju = 0usize;
        for j in 0..n {
            let km = l.min(n - 1 - j);
            let mut p = 0;
            let mut best = -1.0;
            for r in 0..=km {
                let m = self.ab[self.idx(j + r, j)].magnitude();
                if m > best {
                    best = m;
                    p = r;
                }
            }
            self.piv[j] = j + p;
            let pivot = self.ab[self.idx(j + p, j)];
            check_pivot(pivot)?;
            ju = ju.max((j + u + p).min(n - 1));
            if p != 0 {
                for c in j..=ju {
                    let (a, b) = (self.idx(j, c), self.idx(j + p, c));
                    self.ab.swap(a, b);
                }
            }
            let inv = T::one() / pivot;
            for r in 1..=km {
                let k = self.idx(j + r, j);
                self.ab[k] *= inv;
            }
            for c in j + 1..=ju {
                let ujc = self.ab[self.idx(j, c)];
                if ujc == T::default() {
                    continue;
                }
                for r in 1..=km {
                    let m = self.ab[self.idx(j + r, j)];
                    let k = self.idx(j + r, c);
                    self.ab[k] -= m * ujc;
                }
            }
        }
        Ok(())
    }

    /// Overwrites `b` with the solution of `(shift I - J) x = b`.
    pub fn solve_in_place(&mut self, b: &mut [T]) {
        let (n, l, u) = (self.n, self.lower, self.upper);
        for j in 0..n {
            b.swap(j, self.piv[j]);
            let bj = b[j];
            for r in 1..=l.min(n - 1 - j) {
                b[j + r] -= self.ab[self.idx(j + r, j)] * bj;
            }
        }
        for j in (0..n).rev() {
            b[j] /= self.ab[self.idx(j, j)];
            let bj = b[j];
            for i in j.saturating_sub(l + u)..j {
                b[i] -= self.ab[self.idx(i, j)] * bj;
            }
        }
    }
}
