//! Power iteration with a 2×2 Rayleigh–Ritz step, sized once, warm-started.

use std::mem::swap;

use num_complex::Complex64;

use crate::jvp::FdJvp;
use crate::options::{check_len, PowerOptions, SpectralEstimate, StiffnessError, Termination};
use crate::ritz::{dominant_ritz, Candidate};
use crate::vecops::{axpy, dot, norm, scale, scale_into, sub_scaled};

/// Below this `sin` of the angle between the last two iterates their span
/// is taken as one-dimensional and only the Rayleigh quotient is used.
const MIN_SINE: f64 = 1e-6;

/// Default seed of the start-vector generator.
const DEFAULT_SEED: u64 = 0x9E37_79B9_7F4A_7C15;

/// A small xorshift64* generator for start vectors (Marsaglia 2003;
/// Vigna 2016): deterministic, no dependency.
#[derive(Clone, Debug)]
struct Rng(u64);

impl Rng {
    fn new(seed: u64) -> Self {
        Self(if seed == 0 { DEFAULT_SEED } else { seed })
    }
    /// Uniform in `[-1, 1)`.
    fn next_sym(&mut self) -> f64 {
        let mut s = self.0;
        s ^= s >> 12;
        s ^= s << 25;
        s ^= s >> 27;
        self.0 = s;
        let r = s.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11;
        (r as f64) * (2.0 / (1u64 << 53) as f64) - 1.0
    }
    /// Fills `v` with a random unit vector.
    fn fill_unit(&mut self, v: &mut [f64]) {
        loop {
            for x in v.iter_mut() {
                *x = self.next_sym();
            }
            let nv = norm(v);
            if nv > 0.0 {
                scale(1.0 / nv, v);
                return;
            }
        }
    }
}

/// Dominant-eigenvalue estimator for operators of one dimension `n`.
///
/// All work vectors are allocated by [`SpectralEstimator::new`]; the
/// estimate methods allocate nothing. Between calls the estimator keeps
/// its last dominant vector, and (with [`PowerOptions::warm_start`], the
/// default) starts the next call from it, so a check along a trajectory,
/// where the Jacobian changes slowly, typically costs two or three products.
///
/// The iteration is the power method `x_{k+1} = J x_k / ||J x_k||`
/// (Golub and Van Loan, *Matrix Computations*, 4th ed., section 7.3.1).
/// After every product it forms two estimates and keeps the one with the
/// smaller relative residual: the Rayleigh quotient `mu = x^T J x` with
/// residual `||J x - mu x||`, and the dominant Ritz value of `J` on the
/// span of the last two iterates (a 2×2 Rayleigh–Ritz projection) with the
/// residual of its Ritz vector. The second recovers a dominant pair
/// `a ± ib` of a real matrix, for which the plain iteration rotates without
/// converging, and a pair `±a`; it converges at the rate
/// `|lambda_3| / |lambda_1|` (the span of two iterates is a subspace
/// iteration of dimension two). It stops when the residual is at most
/// `tol * |lambda|`, or after `max_products` products.
///
/// ```
/// use ballast_stiffness::{PowerOptions, SpectralEstimator};
/// // J = [[-2, 1], [0, -50]] (column-major below).
/// let j = [-2.0, 0.0, 1.0, -50.0];
/// let mut est = SpectralEstimator::new(2);
/// let opts = PowerOptions::default();
/// let mut matvec = |v: &[f64], out: &mut [f64]| {
///     out[0] = j[0] * v[0] + j[2] * v[1];
///     out[1] = j[1] * v[0] + j[3] * v[1];
/// };
/// let cold = est.estimate(&mut matvec, &opts);
/// assert!(cold.converged && (cold.radius - 50.0).abs() < 0.5);
/// let warm = est.estimate(&mut matvec, &opts); // starts from the last vector
/// assert!(warm.converged && warm.products <= cold.products);
/// ```
#[derive(Clone, Debug)]
pub struct SpectralEstimator {
    work: Work,
    fd: FdJvp,
}

/// The state of the iteration between calls.
#[derive(Clone, Debug)]
struct Work {
    n: usize,
    /// The six vectors of [`Vectors`] in one allocation (an estimator is
    /// built for every run of the switching controller, short ones too).
    /// Between calls the first `n` entries hold the kept iterate `x`.
    buf: Vec<f64>,
    rng: Rng,
    /// `x` holds a dominant vector from an earlier call.
    has_vector: bool,
}

/// The vectors of one call, borrowed from [`Work::buf`].
struct Vectors<'a> {
    /// Current unit iterate.
    x: &'a mut [f64],
    /// `J x`.
    y: &'a mut [f64],
    /// Previous unit iterate.
    x_prev: &'a mut [f64],
    /// `J x_prev` (a multiple of `x`).
    y_prev: &'a mut [f64],
    /// Scratch: `x - c x_prev`, the second basis direction.
    w: &'a mut [f64],
    /// Scratch: `J w`.
    z: &'a mut [f64],
    /// `x` and `x_prev` have changed places an odd number of times: the
    /// first slot of the buffer is `x_prev`'s.
    exchanged: bool,
}

impl<'a> Vectors<'a> {
    fn of(buf: &'a mut [f64], n: usize) -> Self {
        let (x, rest) = buf.split_at_mut(n);
        let (y, rest) = rest.split_at_mut(n);
        let (x_prev, rest) = rest.split_at_mut(n);
        let (y_prev, rest) = rest.split_at_mut(n);
        let (w, z) = rest.split_at_mut(n);
        Self {
            x,
            y,
            x_prev,
            y_prev,
            w,
            z,
            exchanged: false,
        }
    }

    /// The next iterate takes the place of the previous one.
    fn advance(&mut self) {
        swap(&mut self.x, &mut self.x_prev);
        swap(&mut self.y, &mut self.y_prev);
        self.exchanged = !self.exchanged;
    }

    /// Puts `x` back into the buffer's first slot, where the next call
    /// (and [`SpectralEstimator::vector`]) looks for it.
    fn keep_x(self) {
        if self.exchanged {
            self.x_prev.copy_from_slice(self.x);
        }
    }
}

impl SpectralEstimator {
    /// An estimator for operators on `R^n`, with the default seed.
    pub fn new(n: usize) -> Self {
        Self::with_seed(n, DEFAULT_SEED)
    }

    /// An estimator whose pseudo-random start vectors come from `seed`.
    pub fn with_seed(n: usize, seed: u64) -> Self {
        Self {
            work: Work {
                n,
                buf: vec![0.0; 6 * n],
                rng: Rng::new(seed),
                has_vector: false,
            },
            fd: FdJvp::new(n),
        }
    }

    /// The dimension `n`.
    pub fn dim(&self) -> usize {
        self.work.n
    }

    /// The dominant vector kept for the next warm start (unit length), if any.
    pub fn vector(&self) -> Option<&[f64]> {
        let n = self.work.n;
        self.work.has_vector.then_some(&self.work.buf[..n])
    }

    /// The finite-difference scratch of [`SpectralEstimator::estimate_fd`],
    /// to set typical sizes ([`FdJvp::set_typical`]) or read its `f` count.
    pub fn fd_mut(&mut self) -> &mut FdJvp {
        &mut self.fd
    }

    /// Forgets the kept vector: the next call starts cold.
    pub fn reset(&mut self) {
        self.work.has_vector = false;
    }

    /// Sets the start vector of the next call (it is normalised; a zero or
    /// non-finite vector makes the next call start cold).
    pub fn set_start(&mut self, v: &[f64]) -> Result<(), StiffnessError> {
        check_len("start vector", self.work.n, v.len())?;
        let nv = norm(v);
        if nv > 0.0 && nv.is_finite() {
            let n = self.work.n;
            scale_into(1.0 / nv, v, &mut self.work.buf[..n]);
            self.work.has_vector = true;
        } else {
            self.work.has_vector = false;
        }
        Ok(())
    }

    /// Estimates the dominant eigenvalue of the operator `matvec`, which
    /// writes `out = J v` (both of length `n`). Warm-starts when
    /// `opts.warm_start` and a vector is kept. Allocates nothing.
    pub fn estimate<M>(&mut self, mut matvec: M, opts: &PowerOptions) -> SpectralEstimate
    where
        M: FnMut(&[f64], &mut [f64]),
    {
        self.work.run(&mut matvec, opts)
    }

    /// Estimates the dominant eigenvalue of the Jacobian of `f` at `y`
    /// without forming it: each product is the finite difference
    /// `(f(y + e v) - f(y)) / e` of [`crate::fd_jvp`] (increment as set on
    /// [`SpectralEstimator::fd_mut`]), one call of `f`.
    /// `fy = f(y)` is the value the integrator already has; `f` writes its
    /// second argument from its first (fix `t` in the closure).
    pub fn estimate_fd<F>(
        &mut self,
        mut f: F,
        y: &[f64],
        fy: &[f64],
        opts: &PowerOptions,
    ) -> Result<SpectralEstimate, StiffnessError>
    where
        F: FnMut(&[f64], &mut [f64]),
    {
        let n = self.work.n;
        check_len("y", n, y.len())?;
        check_len("f(y)", n, fy.len())?;
        let Self { work, fd } = self;
        let mut product = |v: &[f64], out: &mut [f64]| {
            fd.apply_unchecked(&mut f, y, fy, v, out);
        };
        Ok(work.run(&mut product, opts))
    }
}

impl Work {
    /// Fills `x` with the start vector.
    fn start(v: &mut Vectors<'_>, rng: &mut Rng, warm: bool, perturbation: f64) {
        if warm {
            rng.fill_unit(v.w);
            axpy(perturbation, v.w, v.x);
            let nx = norm(v.x);
            if nx > 0.0 && nx.is_finite() {
                scale(1.0 / nx, v.x);
                return;
            }
        }
        rng.fill_unit(v.x);
    }

    fn run(
        &mut self,
        matvec: &mut dyn FnMut(&[f64], &mut [f64]),
        opts: &PowerOptions,
    ) -> SpectralEstimate {
        if self.n == 0 {
            return SpectralEstimate::zero(0);
        }
        let Work {
            n,
            buf,
            rng,
            has_vector,
        } = self;
        let mut v = Vectors::of(buf, *n);
        let max_products = opts.max_products.max(1);
        let min_products = opts.min_products.clamp(1, max_products);
        let tol = opts.tol;
        let warm = opts.warm_start && *has_vector;
        let perturbation = if opts.warm_perturbation.is_finite() {
            opts.warm_perturbation.abs()
        } else {
            0.0
        };
        Self::start(&mut v, rng, warm, perturbation);
        *has_vector = false;

        let mut products = 0usize;
        let mut has_prev = false;
        let mut reseeded = false;
        let mut prev_mu = 0.0;
        let mut prev_ny2 = 0.0;
        let mut max_gain = 0.0f64;
        let mut best: Option<Candidate> = None;
        loop {
            matvec(v.x, v.y);
            products += 1;
            let ny2 = dot(v.y, v.y);
            if !ny2.is_finite() {
                return SpectralEstimate {
                    radius: f64::INFINITY,
                    eigenvalue: best.map_or(Complex64::new(0.0, 0.0), |b| b.lambda),
                    converged: false,
                    products,
                    residual: f64::INFINITY,
                    max_gain: f64::INFINITY,
                    termination: Termination::NonFinite,
                };
            }
            let gain = ny2.sqrt();
            max_gain = max_gain.max(gain);
            if gain == 0.0 {
                if warm && !reseeded && !has_prev {
                    // The kept vector is in the kernel of the new operator:
                    // start again from a random vector.
                    reseeded = true;
                    rng.fill_unit(v.x);
                    if products < max_products {
                        continue;
                    }
                }
                // J x = 0: x is an eigenvector for 0. From a random start
                // (J^k x_0 = 0 for a generic x_0) J is nilpotent.
                let mut e = SpectralEstimate::zero(products);
                e.max_gain = max_gain;
                v.keep_x();
                *has_vector = true;
                return e;
            }
            let mu = dot(v.x, v.y);
            let res1 = (ny2 - mu * mu).max(0.0).sqrt();
            let mut cand = Candidate::real(mu, res1);
            if opts.complex_pair && has_prev {
                if let Some(pair) = ritz(&mut v, prev_mu, prev_ny2, tol) {
                    if pair.rel_res < cand.rel_res {
                        cand = pair;
                    }
                }
            }
            if best.is_none_or(|b| cand.rel_res <= b.rel_res) {
                best = Some(cand);
            }
            let converged = products >= min_products && cand.rel_res <= tol;
            if converged || products >= max_products {
                // Keep J x / ||J x||, one more power step for free, for the
                // next warm start.
                scale_into(1.0 / gain, v.y, v.x);
                v.keep_x();
                *has_vector = true;
                let b = if converged {
                    cand
                } else {
                    best.unwrap_or(cand)
                };
                return SpectralEstimate {
                    radius: if converged {
                        b.radius
                    } else {
                        b.radius.max(gain)
                    },
                    eigenvalue: b.lambda,
                    converged,
                    products,
                    residual: b.rel_res,
                    max_gain,
                    termination: if converged {
                        Termination::Converged
                    } else {
                        Termination::MaxProducts
                    },
                };
            }
            v.advance();
            scale_into(1.0 / gain, v.y_prev, v.x);
            prev_mu = mu;
            prev_ny2 = ny2;
            has_prev = true;
        }
    }
}

/// The 2×2 Rayleigh–Ritz step on `span{x_prev, x}`, where
/// `x = J x_prev / ||J x_prev||`. `h11 = x_prev^T J x_prev` and
/// `m11 = ||J x_prev||^2` come from the previous step.
fn ritz(v: &mut Vectors<'_>, h11: f64, m11: f64, tol: f64) -> Option<Candidate> {
    // q1 = x_prev, q2 = w / beta with w = x - c x_prev.
    let c = dot(v.x_prev, v.x);
    sub_scaled(v.x, c, v.x_prev, v.w);
    let beta2 = dot(v.w, v.w);
    let beta = beta2.sqrt();
    if beta.is_nan() || beta <= MIN_SINE {
        return None;
    }
    // J q2 = z / beta with z = J x - c J x_prev.
    sub_scaled(v.y, c, v.y_prev, v.z);
    let h21 = dot(v.w, v.y_prev) / beta;
    let h12 = dot(v.x_prev, v.z) / beta;
    let h22 = dot(v.w, v.z) / beta2;
    let m12 = dot(v.y_prev, v.z) / beta;
    let m22 = dot(v.z, v.z) / beta2;
    let h = [[h11, h12], [h21, h22]];
    let g11 = m11 - h11 * h11 - h21 * h21;
    let g12 = m12 - h11 * h12 - h21 * h22;
    let g22 = m22 - h12 * h12 - h22 * h22;
    Some(dominant_ritz(h, [[g11, g12], [g12, g22]], tol))
}

/// Estimates the spectral radius and dominant eigenvalue of the linear
/// operator `v -> J v` on `R^n`, from a cold start.
///
/// `matvec(v, out)` writes `out = J v` (both of length `n`). For repeated
/// estimates along a trajectory keep a [`SpectralEstimator`] instead: it
/// allocates once and warm-starts.
///
/// ```
/// use ballast_stiffness::{spectral_radius, PowerOptions};
/// // A rotation-dilation block with eigenvalues -3 ± 4i, and a mode at -1.
/// let est = spectral_radius(3, |v: &[f64], out: &mut [f64]| {
///     out[0] = -3.0 * v[0] - 4.0 * v[1];
///     out[1] = 4.0 * v[0] - 3.0 * v[1];
///     out[2] = -v[2];
/// }, &PowerOptions::default());
/// assert!(est.converged);
/// assert!((est.radius - 5.0).abs() < 0.05);
/// assert!((est.eigenvalue.im.abs() - 4.0).abs() < 0.05);
/// ```
pub fn spectral_radius<M>(n: usize, matvec: M, opts: &PowerOptions) -> SpectralEstimate
where
    M: FnMut(&[f64], &mut [f64]),
{
    let mut est = SpectralEstimator::new(n);
    est.estimate(matvec, opts)
}
