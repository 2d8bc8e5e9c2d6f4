//! A watch on the user's functions: notes when the right-hand side or the
//! analytic Jacobian hands back NaN or infinity, so a failed run can name
//! the culprit instead of only the symptom (a step size that shrank to
//! nothing, or a singular iteration matrix).
//!
//! The right-hand side is watched only while an implicit scheme runs:
//! there a non-finite value hides behind a failed Newton iteration. An
//! explicit scheme's error estimate turns any non-finite stage into a
//! non-finite error, which the controller already reports as such, so
//! explicit steps skip the check (on the three-equation Lorenz system it
//! cost 5% of a forced Dormand–Prince 5(4) run on the overhead bench and
//! 30% of the switching default's run, measured with perf and the
//! `compare` example).

use ballast_core::matrix::Storage;
use ballast_core::{Jacobian, Structure, System};

/// Whether every value is finite: `x * 0` is zero for finite `x` and NaN
/// for NaN or infinity. Eight independent accumulators let the loop run in
/// SIMD lanes, so the check costs a small fraction of any right-hand side
/// that writes the same values.
#[inline]
pub(crate) fn all_finite(v: &[f64]) -> bool {
    // x * 0 is 0 for finite x and NaN otherwise. Short vectors (the common
    // case of a cheap right-hand side): one branch-free sum, written out up
    // to four components (a loop costs more than the check there). Long
    // ones: eight lanes, which vectorise.
    match *v {
        [] => return true,
        [a] => return a * 0.0 == 0.0,
        [a, b] => return a * 0.0 + b * 0.0 == 0.0,
        [a, b, c] => return a * 0.0 + b * 0.0 + c * 0.0 == 0.0,
        [a, b, c, d] => return (a * 0.0 + b * 0.0) + (c * 0.0 + d * 0.0) == 0.0,
        _ if v.len() < 16 => return v.iter().fold(0.0f64, |acc, &x| acc + x * 0.0) == 0.0,
        _ => {}
    }
    let mut acc = [0.0f64; 8];
    let chunks = v.chunks_exact(8);
    let rest = chunks.remainder();
    for c in chunks {
        for k in 0..8 {
            acc[k] += c[k] * 0.0;
        }
    }
    for (k, &x) in rest.iter().enumerate() {
        acc[k] += x * 0.0;
    }
    acc.iter().sum::<f64>() == 0.0
}

/// The user's system with two flags on its outputs.
#[derive(Debug)]
pub(crate) struct Guarded<S> {
    inner: S,
    /// Whether right-hand-side values are checked (set by the run loop
    /// while an implicit scheme is active).
    watch_rhs: bool,
    /// The right-hand side returned a non-finite value since [`Guarded::clear`].
    pub(crate) rhs_bad: bool,
    /// The latest analytic Jacobian held a non-finite value.
    pub(crate) jac_bad: bool,
}

impl<S> Guarded<S> {
    /// Wraps `inner`; the right-hand-side check starts off.
    pub(crate) fn new(inner: S) -> Self {
        Self {
            inner,
            watch_rhs: false,
            rhs_bad: false,
            jac_bad: false,
        }
    }

    /// Before a step: forgets earlier non-finite right-hand-side values
    /// and watches the right-hand side if the scheme is implicit.
    pub(crate) fn prepare(&mut self, implicit: bool) {
        self.rhs_bad = false;
        self.watch_rhs = implicit;
    }
}

impl<S: System> System for Guarded<S> {
    #[inline(always)]
    fn rhs(&mut self, t: f64, y: &[f64], dydt: &mut [f64]) {
        self.inner.rhs(t, y, dydt);
        if self.watch_rhs && !all_finite(dydt) {
            self.rhs_bad = true;
        }
    }

    fn jacobian(&mut self, t: f64, y: &[f64], jac: &mut Jacobian) -> bool {
        let given = self.inner.jacobian(t, y, jac);
        if given {
            let values = match jac.storage() {
                Storage::Dense(v) => v,
                Storage::Banded { values, .. } | Storage::Sparse { values, .. } => values,
            };
            self.jac_bad = !all_finite(values);
        }
        given
    }

    fn structure(&self) -> Structure {
        self.inner.structure()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finiteness_check_sees_every_position() {
        for len in [0usize, 1, 7, 8, 9, 31] {
            let v = vec![1.5; len];
            assert!(all_finite(&v));
            for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
                for i in 0..len {
                    let mut w = v.clone();
                    w[i] = bad;
                    assert!(!all_finite(&w), "len {len}, position {i}, {bad}");
                }
            }
        }
        assert!(all_finite(&[f64::MAX, -f64::MAX, f64::MIN_POSITIVE]));
    }
}
