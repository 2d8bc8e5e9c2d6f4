//! Options of the power iteration, its result, and the crate's error type.

use num_complex::Complex64;

/// Options of the power iteration.
///
/// Build from [`Default`] and the builder methods; [`PowerOptions::validate`]
/// says whether a set of options is sensible. The estimator never fails on
/// options: a zero `max_products` is taken as 1, `min_products` is clamped
/// to `1..=max_products`, and a tolerance that is not a positive number
/// simply never declares convergence.
///
/// ```
/// use ballast_stiffness::PowerOptions;
/// let opts = PowerOptions::default().tol(5e-3).max_products(80);
/// assert!(opts.validate().is_ok());
/// assert!(PowerOptions::default().tol(-1.0).validate().is_err());
/// ```
#[derive(Clone, Debug, PartialEq)]
#[non_exhaustive]
pub struct PowerOptions {
    /// Relative residual at which the estimate is declared converged:
    /// `||J v - lambda v|| <= tol * |lambda|` for the returned eigenpair
    /// (for a complex pair, the residual of its Ritz vector in the
    /// two-dimensional subspace). Default `1e-2`: for a normal `J` the
    /// eigenvalue is then within 1% (Bauer–Fike), for a modestly non-normal
    /// one within a few percent, which is what a step-size controller needs.
    pub tol: f64,
    /// Largest number of products `J v` per call. Default 50.
    pub max_products: usize,
    /// Fewest products per call before convergence may be declared.
    /// Default 2, so that the two-dimensional Ritz step (and with it the
    /// check for a dominant pair `a ± ib` or `±a`) has run at least once.
    pub min_products: usize,
    /// Extract a dominant complex-conjugate pair (or a pair `±a`) by a 2×2
    /// Rayleigh–Ritz projection on the last two iterates. Default `true`;
    /// `false` gives the plain power iteration with the Rayleigh quotient.
    pub complex_pair: bool,
    /// Start from the previous call's dominant vector, when there is one.
    /// Default `true`. Only [`crate::SpectralEstimator`] keeps a vector
    /// between calls; [`crate::spectral_radius`] always starts cold.
    pub warm_start: bool,
    /// Relative size of the pseudo-random perturbation added to a warm
    /// start vector, so that a mode which has become dominant since the
    /// last call is present in the start vector. Default `1e-2`.
    pub warm_perturbation: f64,
}

impl Default for PowerOptions {
    fn default() -> Self {
        Self {
            tol: 1e-2,
            max_products: 50,
            min_products: 2,
            complex_pair: true,
            warm_start: true,
            warm_perturbation: 1e-2,
        }
    }
}

impl PowerOptions {
    /// Sets the relative residual tolerance.
    pub fn tol(mut self, tol: f64) -> Self {
        self.tol = tol;
        self
    }
    /// Sets the largest number of products per call.
    pub fn max_products(mut self, max_products: usize) -> Self {
        self.max_products = max_products;
        self
    }
    /// Sets the fewest products per call before convergence may be declared.
    pub fn min_products(mut self, min_products: usize) -> Self {
        self.min_products = min_products;
        self
    }
    /// Turns the complex-pair (2×2 Rayleigh–Ritz) extraction on or off.
    pub fn complex_pair(mut self, on: bool) -> Self {
        self.complex_pair = on;
        self
    }
    /// Turns warm starts on or off.
    pub fn warm_start(mut self, on: bool) -> Self {
        self.warm_start = on;
        self
    }
    /// Sets the relative perturbation of a warm start vector.
    pub fn warm_perturbation(mut self, size: f64) -> Self {
        self.warm_perturbation = size;
        self
    }

    /// Checks the options: `tol` finite and positive, `max_products >= 1`,
    /// `min_products <= max_products`, `warm_perturbation` finite and
    /// non-negative.
    pub fn validate(&self) -> Result<(), StiffnessError> {
        if !(self.tol.is_finite() && self.tol > 0.0) {
            return Err(StiffnessError::InvalidOption {
                name: "tol",
                value: self.tol,
                why: "must be finite and positive",
            });
        }
        if self.max_products == 0 {
            return Err(StiffnessError::InvalidOption {
                name: "max_products",
                value: 0.0,
                why: "must be at least 1",
            });
        }
        if self.min_products > self.max_products {
            return Err(StiffnessError::InvalidOption {
                name: "min_products",
                value: self.min_products as f64,
                why: "must not exceed max_products",
            });
        }
        if !(self.warm_perturbation.is_finite() && self.warm_perturbation >= 0.0) {
            return Err(StiffnessError::InvalidOption {
                name: "warm_perturbation",
                value: self.warm_perturbation,
                why: "must be finite and non-negative",
            });
        }
        Ok(())
    }
}

/// Why a call of the power iteration stopped.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Termination {
    /// The relative residual fell below `tol` (or the operator mapped the
    /// iterate to zero: an exact eigenvalue 0).
    Converged,
    /// `max_products` were used without convergence.
    MaxProducts,
    /// A product returned a non-finite value (NaN or infinity).
    NonFinite,
}

/// The result of one call of the power iteration.
///
/// When `converged`, `radius` is the modulus of the dominant Ritz value.
/// When not, `radius` is the larger of that modulus and `||J x|| / ||x||`
/// for the last iterate `x`: still at most `||J||_2`, never a wild value,
/// and on the safe (large) side of the Ritz value. After a non-finite
/// product `radius` is `+inf`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[non_exhaustive]
pub struct SpectralEstimate {
    /// Estimate of the spectral radius `max |lambda_i|`.
    pub radius: f64,
    /// Estimate of the dominant eigenvalue; of a conjugate pair, the member
    /// with non-negative imaginary part. When the Ritz step resolves two
    /// real eigenvalues of (nearly, within `tol`) equal modulus together,
    /// the one with the smaller real part, the one that limits an explicit
    /// step; a start vector dominated by the other eigenvector may still
    /// return the other one (its eigenpair is just as correct).
    pub eigenvalue: Complex64,
    /// Whether the relative residual reached `tol`.
    pub converged: bool,
    /// Number of products `J v` used (for finite differences: `f` calls).
    pub products: usize,
    /// Relative residual `||J v - lambda v|| / (|lambda| ||v||)` of the
    /// returned eigenpair (`inf` when `lambda = 0` with a non-zero residual).
    pub residual: f64,
    /// The largest gain `||J x|| / ||x||` over the iterates of this call:
    /// a lower bound of `||J||_2`, equal to the spectral radius for a normal
    /// `J` and larger than it for a non-normal one.
    pub max_gain: f64,
    /// Why the iteration stopped.
    pub termination: Termination,
}

impl SpectralEstimate {
    /// The estimate of a zero-dimensional or zero operator.
    pub(crate) fn zero(products: usize) -> Self {
        Self {
            radius: 0.0,
            eigenvalue: Complex64::new(0.0, 0.0),
            converged: true,
            products,
            residual: 0.0,
            max_gain: 0.0,
            termination: Termination::Converged,
        }
    }

    /// Whether the dominant eigenvalue was found as a complex pair.
    pub fn is_complex(&self) -> bool {
        self.eigenvalue.im != 0.0
    }
}

/// Errors of this crate: inputs rejected at the door.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum StiffnessError {
    /// A slice has the wrong length.
    #[error("{what}: expected length {expected}, got {got}")]
    Dimension {
        /// Which argument.
        what: &'static str,
        /// The length required.
        expected: usize,
        /// The length given.
        got: usize,
    },
    /// An option is out of range.
    #[error("option {name} = {value} {why}")]
    InvalidOption {
        /// The option's name.
        name: &'static str,
        /// Its value.
        value: f64,
        /// What is wrong with it.
        why: &'static str,
    },
}

/// Returns an error unless `len == expected`.
pub(crate) fn check_len(
    what: &'static str,
    expected: usize,
    len: usize,
) -> Result<(), StiffnessError> {
    if len == expected {
        Ok(())
    } else {
        Err(StiffnessError::Dimension {
            what,
            expected,
            got: len,
        })
    }
}
