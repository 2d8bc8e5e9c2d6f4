//! Small polynomial tools for the stability analysis: evaluation, all
//! roots (Aberth–Ehrlich), the Schur–Cohn test for "all roots inside the
//! unit disc", and exact rational arithmetic for generating coefficients.
//!
//! Polynomials are coefficient slices in ascending powers: `c[k]` multiplies
//! `x^k`.

use num_complex::Complex64;

/// Evaluates a real polynomial at a complex point (Horner).
pub(crate) fn eval_real(c: &[f64], z: Complex64) -> Complex64 {
    let mut acc = Complex64::new(0.0, 0.0);
    for &ck in c.iter().rev() {
        acc = acc * z + ck;
    }
    acc
}

/// Evaluates a complex polynomial and its derivative at `z` (Horner).
fn eval_with_derivative(c: &[Complex64], z: Complex64) -> (Complex64, Complex64) {
    let mut p = Complex64::new(0.0, 0.0);
    let mut dp = Complex64::new(0.0, 0.0);
    for &ck in c.iter().rev() {
        dp = dp * z + p;
        p = p * z + ck;
    }
    (p, dp)
}

/// All roots of a complex polynomial, by the Aberth–Ehrlich simultaneous
/// iteration (Aberth, Math. Comp. 27 (1973) 339–344), with exact zero
/// roots factored out first. Leading zero coefficients are dropped, so the
/// number of roots is the true degree.
pub(crate) fn roots(c: &[Complex64]) -> Vec<Complex64> {
    let zero = Complex64::new(0.0, 0.0);
    let mut n = c.len();
    while n > 0 && c[n - 1] == zero {
        n -= 1;
    }
    if n <= 1 {
        return Vec::new();
    }
    let mut z0 = 0;
    while c[z0] == zero {
        z0 += 1;
    }
    let c = &c[z0..n];
    let deg = c.len() - 1;
    let mut out = vec![zero; z0];
    if deg == 0 {
        return out;
    }
    if deg == 1 {
        out.push(-c[0] / c[1]);
        return out;
    }
    // Start on a circle of the geometric-mean radius of the roots.
    let radius = (c[0] / c[deg]).norm().powf(1.0 / deg as f64);
    let radius = if radius.is_finite() && radius > 0.0 {
        radius
    } else {
        1.0
    };
    let mut z: Vec<Complex64> = (0..deg)
        .map(|k| {
            let a = 2.0 * std::f64::consts::PI * k as f64 / deg as f64 + 0.4;
            Complex64::from_polar(radius, a)
        })
        .collect();
    let mut done = vec![false; deg];
    for _ in 0..500 {
        let mut all_done = true;
        for i in 0..deg {
            if done[i] {
                continue;
            }
            let (p, dp) = eval_with_derivative(c, z[i]);
            if p == zero {
                done[i] = true;
                continue;
            }
            let ratio = p / dp;
            let mut sum = zero;
            for j in 0..deg {
                if j != i {
                    sum += (z[i] - z[j]).inv();
                }
            }
            let w = ratio / (Complex64::new(1.0, 0.0) - ratio * sum);
            if !w.re.is_finite() || !w.im.is_finite() {
                done[i] = true;
                continue;
            }
            z[i] -= w;
            if w.norm() <= 4.0 * f64::EPSILON * z[i].norm().max(1e-300) {
                done[i] = true;
            } else {
                all_done = false;
            }
        }
        if all_done {
            break;
        }
    }
    out.extend(z);
    out
}

/// Whether every root of the complex polynomial `c` lies strictly inside
/// the unit disc, by the Schur–Cohn recursion (Henrici, *Applied and
/// Computational Complex Analysis* I, section 6.8): with `p*` the
/// reciprocal polynomial, all roots of `p` are inside iff `|a_0| < |a_n|`
/// and all roots of `(conj(a_n) p - a_0 p*)/z` are inside. Allocates
/// nothing up to degree [`MAX_SCHUR_DEGREE`]; above it, falls back to
/// [`roots`].
pub(crate) fn all_roots_inside(c: &[Complex64]) -> bool {
    let mut n = c.len();
    while n > 0 && c[n - 1].norm_sqr() == 0.0 {
        n -= 1;
    }
    if n == 0 {
        return false; // the zero polynomial
    }
    if n > MAX_SCHUR_DEGREE + 1 {
        return roots(&c[..n]).iter().all(|r| r.norm() < 1.0);
    }
    let mut a = [Complex64::new(0.0, 0.0); MAX_SCHUR_DEGREE + 1];
    a[..n].copy_from_slice(&c[..n]);
    let mut deg = n - 1;
    while deg > 0 {
        let (a0, an) = (a[0], a[deg]);
        if a0.norm_sqr() >= an.norm_sqr() {
            return false;
        }
        let can = an.conj();
        // q_j = conj(a_n) a_j - a_0 conj(a_{n-j}); q_0 = 0; Tp_j = q_{j+1}.
        let mut scale = 0.0f64;
        let mut next = [Complex64::new(0.0, 0.0); MAX_SCHUR_DEGREE + 1];
        for j in 0..deg {
            let q = can * a[j + 1] - a0 * a[deg - j - 1].conj();
            next[j] = q;
            scale = scale.max(q.re.abs().max(q.im.abs()));
        }
        if scale == 0.0 || !scale.is_finite() {
            return false;
        }
        for j in 0..deg {
            a[j] = next[j] / scale;
        }
        deg -= 1;
    }
    true
}

/// Largest degree [`all_roots_inside`] accepts.
pub(crate) const MAX_SCHUR_DEGREE: usize = 63;

/// An exact rational number `num/den` (`den > 0`, lowest terms), for
/// generating multistep coefficients without rounding.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Rat {
    num: i128,
    den: i128,
}

fn gcd(mut a: i128, mut b: i128) -> i128 {
    a = a.abs();
    b = b.abs();
    while b != 0 {
        let t = a % b;
        a = b;
        b = t;
    }
    a
}

impl Rat {
    /// `num/den` in lowest terms.
    pub(crate) fn new(num: i128, den: i128) -> Rat {
        assert!(den != 0, "zero denominator");
        let g = gcd(num, den).max(1);
        let s = if den < 0 { -1 } else { 1 };
        Rat {
            num: s * num / g,
            den: s * den / g,
        }
    }
    /// The integer `n`.
    pub(crate) fn int(n: i128) -> Rat {
        Rat { num: n, den: 1 }
    }
    /// Sum.
    pub(crate) fn add(self, o: Rat) -> Rat {
        let g = gcd(self.den, o.den);
        Rat::new(
            self.num * (o.den / g) + o.num * (self.den / g),
            self.den / g * o.den,
        )
    }
    /// Product.
    pub(crate) fn mul(self, o: Rat) -> Rat {
        let g1 = gcd(self.num, o.den).max(1);
        let g2 = gcd(o.num, self.den).max(1);
        Rat::new(
            (self.num / g1) * (o.num / g2),
            (self.den / g2) * (o.den / g1),
        )
    }
    /// Quotient (`o` must be non-zero).
    pub(crate) fn div(self, o: Rat) -> Rat {
        self.mul(Rat::new(o.den, o.num))
    }
    /// Nearest `f64`.
    pub(crate) fn to_f64(self) -> f64 {
        self.num as f64 / self.den as f64
    }
}
