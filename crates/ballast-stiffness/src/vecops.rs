//! The one place where this crate reduces vectors.
//!
//! Every dot product and norm of the power iteration, the finite-difference
//! increment and the stage estimate goes through these functions, so a
//! distributed state (each process holding a slice) can later replace the
//! local sums by a global reduction here and nowhere else.

/// `sum_i a_i b_i` over the common length.
#[inline]
pub(crate) fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

/// Euclidean norm `sqrt(sum_i a_i^2)`.
#[inline]
pub(crate) fn norm(a: &[f64]) -> f64 {
    dot(a, a).sqrt()
}

/// Euclidean norm of `a - b`, without forming the difference.
#[inline]
pub(crate) fn norm_diff(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y) * (x - y))
        .sum::<f64>()
        .sqrt()
}

/// `out = a - c b`.
#[inline]
pub(crate) fn sub_scaled(a: &[f64], c: f64, b: &[f64], out: &mut [f64]) {
    for ((o, x), y) in out.iter_mut().zip(a).zip(b) {
        *o = x - c * y;
    }
}

/// `out = s a`.
#[inline]
pub(crate) fn scale_into(s: f64, a: &[f64], out: &mut [f64]) {
    for (o, x) in out.iter_mut().zip(a) {
        *o = s * x;
    }
}

/// `a *= s`.
#[inline]
pub(crate) fn scale(s: f64, a: &mut [f64]) {
    for x in a {
        *x *= s;
    }
}

/// `a += s b`.
#[inline]
pub(crate) fn axpy(s: f64, b: &[f64], a: &mut [f64]) {
    for (x, y) in a.iter_mut().zip(b) {
        *x += s * y;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reductions() {
        let a = [3.0, 4.0, 0.0];
        let b = [1.0, 2.0, 5.0];
        assert_eq!(dot(&a, &b), 11.0);
        assert_eq!(norm(&a), 5.0);
        assert_eq!(norm_diff(&a, &a), 0.0);
        let mut o = [0.0; 3];
        sub_scaled(&a, 2.0, &b, &mut o);
        assert_eq!(o, [1.0, 0.0, -10.0]);
        scale_into(0.5, &a, &mut o);
        assert_eq!(o, [1.5, 2.0, 0.0]);
        scale(2.0, &mut o);
        assert_eq!(o, [3.0, 4.0, 0.0]);
        axpy(1.0, &b, &mut o);
        assert_eq!(o, [4.0, 6.0, 5.0]);
    }
}
