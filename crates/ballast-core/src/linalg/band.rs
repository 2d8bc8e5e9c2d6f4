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

/// Largest window of rows the narrow-band sweeps keep in registers.
const MAX_WINDOW: usize = 7;

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
        self.fill(shift, jac);
        self.factor_filled()
    }

    /// Factorises `shift I - J` and, in the same sweep, `shift_o I - J`
    /// into `other`, a factorisation of the same shape (the complex one of Radau
    /// IIA beside the real one). An elimination is a chain of dependent
    /// operations from column to column (each pivot waits for the last
    /// column's update and its reciprocal); two independent chains in one
    /// loop overlap. Each factorisation is bit for bit what
    /// [`Self::factor`] gives. Measured (n = 1000, two diagonals on each
    /// side): a real and a complex factorisation one after the other
    /// 19.9 + 31.1 us, paired 37.7 us.
    pub fn factor_pair<U: Scalar>(
        &mut self,
        shift: T,
        other: &mut BandLu<U>,
        shift_o: U,
        jac: &Jacobian,
    ) -> Result<(), StepFailure> {
        let (n, l, d) = (self.n, self.lower, self.lower + self.upper);
        if (other.n, other.lower, other.upper) != (n, l, self.upper) || !narrow_elimination(l, d) {
            self.factor(shift, jac)?;
            return other.factor(shift_o, jac);
        }
        self.fill(shift, jac);
        other.fill(shift_o, jac);
        let full = n.saturating_sub(l);
        // The last columns touched by interchanges, for the tails.
        let (mut ja, mut jb) = with_const!(l, L: 1 | 2 else 3 => {
            with_const!(d, D: 1 | 2 | 3 | 4 | 5 else 6 => {
                let mut a = Elimination::<T, L, D>::new(self);
                let mut b = Elimination::<U, L, D>::new(other);
                for j in 0..full {
                    a.column(j)?;
                    b.column(j)?;
                }
                (a.ju, b.ju)
            })
        });
        self.eliminate(full, &mut ja)?;
        other.eliminate(full, &mut jb)
    }

    /// Writes `shift I - J` into the band storage.
    fn fill(&mut self, shift: T, jac: &Jacobian) {
        let (n, l, u, ld) = (self.n, self.lower, self.upper, self.ld);
        match jac.storage() {
            Storage::Banded {
                lower,
                upper,
                values,
            } if *lower <= l && *upper <= u => {
                // Column j of J holds rows j - upper ..= j + lower at 0..w;
                // in `ab` they start at offset l + u - upper of the column.
                let w = lower + upper + 1;
                let top = l + u - upper;
                // One pass of zeros over the whole storage, not one per
                // column: a column is a few entries, and a fill call per
                // column cost more than the zeros (about 2 % of Radau IIA 5
                // on the 1000-equation Brusselator).
                self.ab.fill(T::default());
                let columns = self.ab.chunks_exact_mut(ld).zip(values.chunks_exact(w));
                for (j, (dst, src)) in columns.enumerate() {
                    // Rows that exist: 0 <= i < n.
                    let (r0, r1) = (upper.saturating_sub(j), w.min(upper + n - j));
                    for (d, &v) in dst[top + r0..top + r1].iter_mut().zip(&src[r0..r1]) {
                        *d = T::of_real(-v);
                    }
                }
            }
            _ => {
                self.ab.fill(T::default());
                for j in 0..n {
                    for i in j.saturating_sub(u)..(j + l + 1).min(n) {
                        let k = self.idx(i, j);
                        self.ab[k] = T::of_real(-jac.get(i, j));
                    }
                }
            }
        }
        for d in self.ab[l + u..].iter_mut().step_by(ld) {
            *d += shift;
        }
    }

    /// Unblocked band LU (the elimination of LAPACK's `gbtf2`), walking
    /// contiguous column slices: in this layout the entries of one column
    /// are adjacent, the diagonal at offset `l + u`. The pivot is the entry
    /// of largest `|re| + |im|` (as LAPACK's `izamax` chooses it), which
    /// needs no square root.
    ///
    /// Narrow bands (at most 3 sub-diagonals and 6 diagonals above) take
    /// their columns with `l` rows below through [`Elimination`],
    /// whose loops have constant bounds; the last `l` columns, and wider
    /// bands, go through [`Self::eliminate`]. Both apply the same updates
    /// in the same order, so the factors are bit for bit the same.
    fn factor_filled(&mut self) -> Result<(), StepFailure> {
        let (l, d) = (self.lower, self.lower + self.upper);
        // Last column touched so far by row interchanges.
        let mut ju = 0usize;
        let mut done = 0;
        if narrow_elimination(l, d) {
            done = self.n.saturating_sub(l);
            with_const!(l, L: 1 | 2 else 3 => {
                with_const!(d, D: 1 | 2 | 3 | 4 | 5 else 6 => {
                    let mut e = Elimination::<T, L, D>::new(self);
                    for j in 0..done {
                        e.column(j)?;
                    }
                    ju = e.ju;
                })
            });
        }
        self.eliminate(done, &mut ju)
    }

    /// Eliminates columns `from..n`, for any band.
    fn eliminate(&mut self, from: usize, ju: &mut usize) -> Result<(), StepFailure> {
        let (n, u, ld) = (self.n, self.upper, self.ld);
        let d = self.lower + u;
        for j in from..n {
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
            *ju = (*ju).max((j + u + p).min(n - 1));
            if p != 0 {
                for c in j..=*ju {
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
            for c in j + 1..=*ju {
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
    ///
    /// Narrow bands (at most 3 sub-diagonals and 6 diagonals above: the
    /// Jacobians of method-of-lines problems) go through sweeps that hold
    /// the rows still being updated in registers (`Forward`,
    /// `Backward`). The generic sweep pays per row for slicing and loop
    /// set-up and for the chain of each row's store and the next row's load
    /// of the same entry, which outweigh its few multiplications: with two
    /// diagonals on each side, 9.9 ns per row against 6.8 (n = 1000). Every
    /// entry receives the same updates in the same order, so the result is
    /// bit for bit the generic sweep's.
    pub fn solve_in_place(&self, b: &mut [T]) {
        let (n, l, d) = (self.n, self.lower, self.lower + self.upper);
        if narrow_width(n, l) {
            with_const!(l, L: 1 | 2 else 3 => {
                let mut f = Forward::<T, L>::new(self, b);
                (0..n - L).for_each(|j| f.row(j));
                f.finish();
            });
        } else {
            self.forward_from(b, 0);
        }
        if narrow_depth(n, d) {
            with_const!(d, D: 1 | 2 | 3 | 4 | 5 else 6 => {
                let mut s = Backward::<T, D>::new(self, b);
                (D..n).rev().for_each(|j| s.row(j));
                s.finish();
            });
        } else {
            self.backward_below(b, n);
        }
    }

    /// Solves with this factorisation and, in the same sweeps, with
    /// `other`, a factorisation of the same shape (the complex one of Radau
    /// IIA beside the real one): `b` and `c` are overwritten by the two
    /// solutions, each bit for bit what [`Self::solve_in_place`] gives.
    /// A narrow sweep is a chain of dependent operations from row to row;
    /// two independent chains in one loop overlap. Measured (n = 1000, two
    /// diagonals on each side): a real and a complex solve one after the
    /// other 5.6 + 11.5 us, paired 11.0 us.
    pub fn solve_pair<U: Scalar>(&self, b: &mut [T], other: &BandLu<U>, c: &mut [U]) {
        let (n, l, d) = (self.n, self.lower, self.lower + self.upper);
        if (other.n, other.lower, other.upper) != (n, l, self.upper) {
            self.solve_in_place(b);
            return other.solve_in_place(c);
        }
        if narrow_width(n, l) {
            with_const!(l, L: 1 | 2 else 3 => {
                let mut f = Forward::<T, L>::new(self, b);
                let mut g = Forward::<U, L>::new(other, c);
                for j in 0..n - L {
                    f.row(j);
                    g.row(j);
                }
                f.finish();
                g.finish();
            });
        } else {
            self.forward_from(b, 0);
            other.forward_from(c, 0);
        }
        if narrow_depth(n, d) {
            with_const!(d, D: 1 | 2 | 3 | 4 | 5 else 6 => {
                let mut s = Backward::<T, D>::new(self, b);
                let mut t = Backward::<U, D>::new(other, c);
                for j in (D..n).rev() {
                    s.row(j);
                    t.row(j);
                }
                s.finish();
                t.finish();
            });
        } else {
            self.backward_below(b, n);
            other.backward_below(c, n);
        }
    }

    /// Applies `L^{-1}` from row `from` on, for any band.
    fn forward_from(&self, b: &mut [T], from: usize) {
        let (n, ld) = (self.n, self.ld);
        let d = self.lower + self.upper;
        for j in from..n {
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
    }

    /// Applies `U^{-1}` to rows `to - 1` down to 0, for any band.
    fn backward_below(&self, b: &mut [T], to: usize) {
        let ld = self.ld;
        let d = self.lower + self.upper;
        for j in (0..to).rev() {
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

/// Whether the forward sweep of `lower` sub-diagonals runs in registers
/// ([`Forward`]) for an `n × n` matrix.
fn narrow_width(n: usize, lower: usize) -> bool {
    (1..=3).contains(&lower) && n > lower + 1
}

/// Whether the backward sweep of `depth = lower + upper` diagonals above
/// runs in registers ([`Backward`]) for an `n × n` matrix.
fn narrow_depth(n: usize, depth: usize) -> bool {
    (1..=6).contains(&depth) && n > depth + 1
}

/// Runs `$body` with the constant `$c` equal to `$v`, one of the listed
/// values, or else `$last` (callers check the range first).
macro_rules! with_const {
    ($v:expr, $c:ident: $($k:literal)|* else $last:literal => $body:block) => {
        match $v {
            $($k => {
                const $c: usize = $k;
                $body
            })*
            _ => {
                const $c: usize = $last;
                $body
            }
        }
    };
}
use with_const;

/// Whether columns with `lower` rows below the diagonal are eliminated by
/// [`Elimination`] (`depth = lower + upper` diagonals above).
fn narrow_elimination(lower: usize, depth: usize) -> bool {
    (1..=3).contains(&lower) && depth <= 6
}

/// The elimination of columns with `L` rows below the diagonal, for `L`
/// sub-diagonals and `D = l + u` diagonals above: loops of constant
/// bounds, the multipliers in registers while the columns to the right are
/// updated. `ju` is the last column touched so far by row interchanges.
struct Elimination<'a, T: Scalar, const L: usize, const D: usize> {
    lu: &'a mut BandLu<T>,
    ju: usize,
}

impl<'a, T: Scalar, const L: usize, const D: usize> Elimination<'a, T, L, D> {
    fn new(lu: &'a mut BandLu<T>) -> Self {
        debug_assert!(L == lu.lower && D == L + lu.upper && lu.ld == L + D + 1);
        Self { lu, ju: 0 }
    }

    /// Eliminates column `j < n - L`.
    #[inline(always)]
    fn column(&mut self, j: usize) -> Result<(), StepFailure> {
        let (n, u, ld) = (self.lu.n, self.lu.upper, self.lu.ld);
        let ab = &mut self.lu.ab[..];
        let diag = j * ld + D;
        let col: &[T; L] = ab[diag + 1..diag + 1 + L].try_into().unwrap();
        let (mut p, mut best) = (0, ab[diag].pivot_size());
        for (r, v) in col.iter().enumerate() {
            let m = v.pivot_size();
            if m > best {
                best = m;
                p = r + 1;
            }
        }
        self.lu.piv[j] = j + p;
        let pivot = ab[diag + p];
        check_pivot(pivot)?;
        let ju = self.ju.max((j + u + p).min(n - 1));
        self.ju = ju;
        if p != 0 {
            for c in j..=ju {
                // (j, c) and (j + p, c).
                let a = c * ld + D + j - c;
                ab.swap(a, a + p);
            }
        }
        let inv = T::one() / pivot;
        self.lu.inv_diag[j] = inv;
        let mult: &mut [T; L] = (&mut ab[diag + 1..diag + 1 + L]).try_into().unwrap();
        for m in mult.iter_mut() {
            *m *= inv;
        }
        let mult = *mult;
        for c in j + 1..=ju {
            let off = c * ld + D + j - c;
            let ujc = ab[off];
            if ujc == T::default() {
                continue;
            }
            let t: &mut [T; L] = (&mut ab[off + 1..off + 1 + L]).try_into().unwrap();
            for (t, &m) in t.iter_mut().zip(&mult) {
                *t -= m * ujc;
            }
        }
        Ok(())
    }
}

/// Applies `L^{-1}` (with the row interchanges) for `L` sub-diagonals,
/// holding rows `j..=j + L` while row `j` is eliminated; rows
/// `0..n - L` through [`Self::row`], the rest in [`Self::finish`].
struct Forward<'a, T: Scalar, const L: usize> {
    lu: &'a BandLu<T>,
    b: &'a mut [T],
    w: [T; MAX_WINDOW],
}

impl<'a, T: Scalar, const L: usize> Forward<'a, T, L> {
    fn new(lu: &'a BandLu<T>, b: &'a mut [T]) -> Self {
        let mut w = [T::default(); MAX_WINDOW];
        w[..=L].copy_from_slice(&b[..=L]);
        Self { lu, b, w }
    }

    #[inline(always)]
    fn row(&mut self, j: usize) {
        let (lu, w) = (self.lu, &mut self.w);
        // The interchange within the window; the loop over constant
        // indices keeps the window out of memory.
        let p = lu.piv[j] - j;
        if p != 0 {
            for i in 1..L + 1 {
                if p == i {
                    w.swap(0, i);
                }
            }
        }
        let bj = w[0];
        self.b[j] = bj;
        let start = j * lu.ld + lu.lower + lu.upper + 1;
        let mult: &[T; L] = lu.ab[start..start + L].try_into().unwrap();
        for i in 0..L {
            w[i] = w[i + 1] - mult[i] * bj;
        }
        if j + 1 + L < lu.n {
            w[L] = self.b[j + 1 + L];
        }
    }

    fn finish(self) {
        let full = self.lu.n - L;
        self.b[full..].copy_from_slice(&self.w[..L]);
        self.lu.forward_from(self.b, full);
    }
}

/// Applies `U^{-1}` for `D = lower + upper` diagonals above, from the last
/// row up, holding the `D` rows above the current one; rows `D..n` through
/// [`Self::row`] (last first), the rest in [`Self::finish`].
struct Backward<'a, T: Scalar, const D: usize> {
    lu: &'a BandLu<T>,
    b: &'a mut [T],
    w: [T; MAX_WINDOW],
    cur: T,
}

impl<'a, T: Scalar, const D: usize> Backward<'a, T, D> {
    fn new(lu: &'a BandLu<T>, b: &'a mut [T]) -> Self {
        let n = lu.n;
        let mut w = [T::default(); MAX_WINDOW];
        w[..D].copy_from_slice(&b[n - 1 - D..n - 1]);
        let cur = b[n - 1];
        Self { lu, b, w, cur }
    }

    #[inline(always)]
    fn row(&mut self, j: usize) {
        let (lu, w) = (self.lu, &mut self.w);
        let xj = self.cur * lu.inv_diag[j];
        self.b[j] = xj;
        // Column j of U above the diagonal starts the column's storage.
        let col: &[T; D] = lu.ab[j * lu.ld..j * lu.ld + D].try_into().unwrap();
        self.cur = w[D - 1] - col[D - 1] * xj;
        for k in (1..D).rev() {
            w[k] = w[k - 1] - col[k - 1] * xj;
        }
        if j > D {
            w[0] = self.b[j - 1 - D];
        }
    }

    fn finish(self) {
        // Rows `0..D`, updated, are in `w[1..D]` and `cur`.
        self.b[..D - 1].copy_from_slice(&self.w[1..D]);
        self.b[D - 1] = self.cur;
        self.lu.backward_below(self.b, D);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64;

    /// A band with small diagonal entries, so that partial pivoting swaps
    /// rows (pseudo-random values, a fixed linear congruential sequence).
    fn pivoting_band(n: usize, l: usize, u: usize, seed: u64) -> Jacobian {
        let mut j = Jacobian::banded(n, l, u);
        let mut x = seed;
        for c in 0..n {
            for r in c.saturating_sub(u)..(c + l + 1).min(n) {
                x = x
                    .wrapping_mul(6364136223846793005)
                    .wrapping_add(1442695040888963407);
                let v = (x >> 11) as f64 / (1u64 << 53) as f64 - 0.5;
                j.set(r, c, if r == c { 0.01 * v } else { v });
            }
        }
        j
    }

    fn check<T: Scalar>(shift: T, make: impl Fn(usize) -> T) {
        let (mut solved, mut swapped) = (0, 0);
        for n in 1..14 {
            for l in 0..5 {
                for u in 0..5 {
                    let jac = pivoting_band(n, l, u, (n * 31 + l * 7 + u) as u64);
                    let mut lu = BandLu::<T>::new(n, l, u);
                    if lu.factor(shift, &jac).is_err() {
                        continue;
                    }
                    solved += 1;
                    swapped += usize::from(lu.piv.iter().enumerate().any(|(i, &p)| p != i));
                    let b: Vec<T> = (0..n).map(&make).collect();
                    let mut fast = b.clone();
                    lu.solve_in_place(&mut fast);
                    let mut plain = b;
                    lu.forward_from(&mut plain, 0);
                    lu.backward_below(&mut plain, n);
                    assert_eq!(fast, plain, "n {n}, l {l}, u {u}");
                }
            }
        }
        assert!(
            solved > 300 && swapped > 200,
            "{solved} solved, {swapped} with interchanges"
        );
    }

    /// The narrow eliminations give bit for bit the generic one's factors,
    /// with row interchanges, and a Jacobian stored in a narrower band is
    /// copied as the same matrix stored dense.
    #[test]
    fn narrow_eliminations_equal_the_generic_one() {
        let (mut compared, mut swapped) = (0, 0);
        for n in 1..14usize {
            for l in 0..5usize {
                for u in 0..8usize {
                    for (jl, ju) in [(l, u), (l.saturating_sub(1), u.saturating_sub(2))] {
                        let banded = pivoting_band(n, jl, ju, (n * 31 + l * 7 + u) as u64);
                        let mut dense = Jacobian::dense(n);
                        for c in 0..n {
                            for r in 0..n {
                                dense.set(r, c, banded.get(r, c));
                            }
                        }
                        let shift = 0.003;
                        let mut fast = BandLu::<f64>::new(n, l, u);
                        if fast.factor(shift, &banded).is_err() {
                            continue;
                        }
                        // The same matrix stored dense goes through the other copy.
                        let mut plain = BandLu::<f64>::new(n, l, u);
                        plain.factor(shift, &dense).unwrap();
                        // Filled by hand, then the generic elimination alone.
                        let mut generic = BandLu::<f64>::new(n, l, u);
                        for c in 0..n {
                            for r in c.saturating_sub(u)..(c + l + 1).min(n) {
                                let k = generic.idx(r, c);
                                let d = if r == c { shift } else { 0.0 };
                                generic.ab[k] = -dense.get(r, c) + d;
                            }
                        }
                        generic.eliminate(0, &mut 0).unwrap();
                        assert_eq!(fast.ab, generic.ab, "n {n}, l {l}, u {u}, J {jl} {ju}");
                        assert_eq!(fast.piv, generic.piv);
                        assert_eq!(fast.inv_diag, generic.inv_diag);
                        assert_eq!(fast.ab, plain.ab);
                        compared += 1;
                        swapped += usize::from(fast.piv.iter().enumerate().any(|(i, &p)| p != i));
                    }
                }
            }
        }
        assert!(
            compared > 600 && swapped > 400,
            "{compared} compared, {swapped} swapped"
        );
    }

    /// A real and a complex factorisation paired in one sweep give bit for
    /// bit the separate factors, narrow bands and wide, with interchanges;
    /// a singular matrix fails either way.
    #[test]
    fn paired_factorisations_equal_separate_ones() {
        let (mut compared, mut failed) = (0, 0);
        for n in 1..14usize {
            for l in 0..5usize {
                for u in 0..8usize {
                    let jac = pivoting_band(n, l, u, (n * 17 + l * 3 + u) as u64);
                    let (sr, sc) = (0.001, Complex64::new(0.001, 0.002));
                    let mut real = BandLu::<f64>::new(n, l, u);
                    let mut cplx = BandLu::<Complex64>::new(n, l, u);
                    let separate = real.factor(sr, &jac).and(cplx.factor(sc, &jac));
                    let mut real2 = BandLu::<f64>::new(n, l, u);
                    let mut cplx2 = BandLu::<Complex64>::new(n, l, u);
                    let paired = real2.factor_pair(sr, &mut cplx2, sc, &jac);
                    assert_eq!(separate.is_ok(), paired.is_ok(), "n {n}, l {l}, u {u}");
                    if separate.is_err() {
                        failed += 1;
                        continue;
                    }
                    assert_eq!(
                        (&real.ab, &real.piv, &real.inv_diag),
                        (&real2.ab, &real2.piv, &real2.inv_diag)
                    );
                    assert_eq!(
                        (&cplx.ab, &cplx.piv, &cplx.inv_diag),
                        (&cplx2.ab, &cplx2.piv, &cplx2.inv_diag)
                    );
                    compared += 1;
                }
            }
        }
        assert!(
            compared > 500 && failed > 0,
            "{compared} compared, {failed} singular"
        );
    }

    /// A real and a complex solve paired in one sweep give bit for bit the
    /// separate solves' results, narrow bands and wide, with interchanges.
    #[test]
    fn paired_solves_equal_separate_ones() {
        let mut compared = 0;
        for n in 1..14usize {
            for l in 0..5usize {
                for u in 0..8usize {
                    let jac = pivoting_band(n, l, u, (n * 13 + l * 5 + u) as u64);
                    let mut real = BandLu::<f64>::new(n, l, u);
                    let mut cplx = BandLu::<Complex64>::new(n, l, u);
                    if real.factor(0.001, &jac).is_err()
                        || cplx.factor(Complex64::new(0.001, 0.002), &jac).is_err()
                    {
                        continue;
                    }
                    let b: Vec<f64> = (0..n).map(|i| 1.0 + i as f64).collect();
                    let c: Vec<Complex64> = (0..n)
                        .map(|i| Complex64::new(0.5 - i as f64, 1.0 + i as f64))
                        .collect();
                    let (mut b1, mut c1) = (b.clone(), c.clone());
                    real.solve_in_place(&mut b1);
                    cplx.solve_in_place(&mut c1);
                    let (mut b2, mut c2) = (b, c);
                    real.solve_pair(&mut b2, &cplx, &mut c2);
                    assert_eq!((b1, c1), (b2, c2), "n {n}, l {l}, u {u}");
                    compared += 1;
                }
            }
        }
        assert!(compared > 500, "{compared}");
    }

    /// The narrow-band sweeps give bit for bit the generic sweeps' result,
    /// with row interchanges, at every size around the window's edges.
    #[test]
    fn narrow_band_sweeps_equal_the_generic_sweeps() {
        check(0.001, |i| 1.0 + i as f64);
        check(Complex64::new(0.001, 0.002), |i| {
            Complex64::new(1.0 + i as f64, 0.5 - i as f64)
        });
    }
}
