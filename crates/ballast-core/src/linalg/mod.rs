//! Linear solvers for the iteration matrices of implicit schemes.
//!
//! Every implicit scheme solves systems with matrices `shift * I - J`,
//! where `J` is the Jacobian and `shift` is `1/(h gamma)` (real, for
//! diagonally implicit and Rosenbrock methods) or `(alpha + i beta)/h`
//! (complex, for the Radau IIA pair of eigenvalues; Hairer and Wanner II,
//! IV.8). [`LinearSolver`] factorises such a matrix once and solves with it
//! many times, in the layout of the Jacobian:
//!
//! - dense: LU with partial pivoting, nalgebra kernels below
//!   [`dense::FAER_CROSSOVER`] and faer above it ([`dense::DenseLu`]);
//! - banded: LU with partial pivoting in band storage with room for the
//!   fill-in ([`band::BandLu`]; Golub and Van Loan, *Matrix Computations*,
//!   4th ed., section 4.3);
//! - sparse: faer's sparse LU with a symbolic analysis done once
//!   ([`sparse::SparseLu`]).
//!
//! ```
//! use ballast_core::{linalg::LinearSolver, Jacobian, Structure};
//! // (2 I - J) x = b with J = [[1, 1], [0, -1]].
//! let mut j = Jacobian::dense(2);
//! j.set(0, 0, 1.0); j.set(0, 1, 1.0); j.set(1, 1, -1.0);
//! let mut lu = LinearSolver::<f64>::new(2, &Structure::Dense).unwrap();
//! lu.factor(2.0, &j).unwrap();
//! let mut b = [0.0, 3.0]; // the matrix is [[1, -1], [0, 3]]
//! lu.solve_in_place(&mut b);
//! assert!((b[0] - 1.0).abs() < 1e-15 && (b[1] - 1.0).abs() < 1e-15);
//! ```

pub mod band;
pub mod dense;
pub mod sparse;

use crate::matrix::Jacobian;
use crate::scheme::StepFailure;
use crate::system::Structure;
use num_complex::Complex64;

/// The scalar types the solvers work in: `f64` and `Complex64`.
pub trait Scalar:
    nalgebra::ComplexField<RealField = f64>
    + faer::traits::ComplexField
    + Copy
    + Default
    + std::fmt::Debug
    + 'static
{
    /// The real number `x` as this scalar.
    fn of_real(x: f64) -> Self;
    /// The modulus `|x|`.
    fn magnitude(self) -> f64;
    /// Whether both parts are finite.
    fn finite(self) -> bool;
    /// The size used to choose pivots: `|x|` for reals, `|re| + |im|` for
    /// complex numbers (LAPACK's choice; no square root).
    fn pivot_size(self) -> f64;
}

impl Scalar for f64 {
    #[inline]
    fn of_real(x: f64) -> Self {
        x
    }
    #[inline]
    fn magnitude(self) -> f64 {
        f64::abs(self)
    }
    #[inline]
    fn pivot_size(self) -> f64 {
        f64::abs(self)
    }
    #[inline]
    fn finite(self) -> bool {
        f64::is_finite(self)
    }
}

impl Scalar for Complex64 {
    #[inline]
    fn of_real(x: f64) -> Self {
        Complex64::new(x, 0.0)
    }
    #[inline]
    fn magnitude(self) -> f64 {
        Complex64::norm(self)
    }
    #[inline]
    fn pivot_size(self) -> f64 {
        self.re.abs() + self.im.abs()
    }
    #[inline]
    fn finite(self) -> bool {
        Complex64::is_finite(self)
    }
}

/// A factorisation of `shift * I - J` in the layout of `J`.
#[derive(Debug)]
pub enum LinearSolver<T: Scalar> {
    /// Dense LU with partial pivoting.
    Dense(dense::DenseLu<T>),
    /// Banded LU with partial pivoting.
    Banded(band::BandLu<T>),
    /// Sparse LU (faer).
    Sparse(Box<sparse::SparseLu<T>>),
}

impl<T: Scalar> LinearSolver<T> {
    /// A solver for `n × n` matrices of the given structure; all work memory
    /// is allocated here (the sparse symbolic analysis too). Fails with a
    /// message when the structure does not fit `n`.
    pub fn new(n: usize, structure: &Structure) -> Result<Self, String> {
        Ok(match structure {
            Structure::Dense => LinearSolver::Dense(dense::DenseLu::new(n)),
            Structure::Banded { lower, upper } => {
                LinearSolver::Banded(band::BandLu::new(n, *lower, *upper))
            }
            Structure::Sparse(p) => {
                if p.dim() != n {
                    return Err(format!(
                        "sparsity pattern is {0}×{0}, the system has dimension {n}",
                        p.dim()
                    ));
                }
                LinearSolver::Sparse(Box::new(sparse::SparseLu::new(p)?))
            }
        })
    }

    /// Factorises `shift * I - J`. `jac` must have the layout this solver
    /// was built for (a dense `jac` is accepted by every solver).
    pub fn factor(&mut self, shift: T, jac: &Jacobian) -> Result<(), StepFailure> {
        match self {
            LinearSolver::Dense(s) => s.factor(shift, jac),
            LinearSolver::Banded(s) => s.factor(shift, jac),
            LinearSolver::Sparse(s) => s.factor(shift, jac),
        }
    }

    /// Overwrites `b` with the solution `x` of `(shift I - J) x = b`, using
    /// the last factorisation.
    pub fn solve_in_place(&mut self, b: &mut [T]) {
        match self {
            LinearSolver::Dense(s) => s.solve_in_place(b),
            LinearSolver::Banded(s) => s.solve_in_place(b),
            LinearSolver::Sparse(s) => s.solve_in_place(b),
        }
    }
}

impl LinearSolver<f64> {
    /// Factorises `shift I - J` here and `shift_c I - J` in `other`, a
    /// complex solver of the same structure (Radau IIA). Two band
    /// factorisations share their sweep ([`band::BandLu::factor_pair`]);
    /// the factors are bit for bit those of two separate factorisations.
    pub fn factor_with_complex(
        &mut self,
        shift: f64,
        other: &mut LinearSolver<Complex64>,
        shift_c: Complex64,
        jac: &Jacobian,
    ) -> Result<(), StepFailure> {
        match (self, other) {
            (LinearSolver::Banded(r), LinearSolver::Banded(z)) => {
                r.factor_pair(shift, z, shift_c, jac)
            }
            (r, z) => {
                r.factor(shift, jac)?;
                z.factor(shift_c, jac)
            }
        }
    }

    /// Solves `(shift I - J) x = b` with this real factorisation and
    /// `(shift' I - J) z = c` with `other`, a complex one of the same
    /// Jacobian (Radau IIA), overwriting `b` and `c`. Two band
    /// factorisations share their sweeps ([`band::BandLu::solve_pair`]);
    /// the results are bit for bit those of two separate solves.
    pub fn solve_with_complex(
        &mut self,
        b: &mut [f64],
        other: &mut LinearSolver<Complex64>,
        c: &mut [Complex64],
    ) {
        match (self, other) {
            (LinearSolver::Banded(r), LinearSolver::Banded(z)) => r.solve_pair(b, z, c),
            (r, z) => {
                r.solve_in_place(b);
                z.solve_in_place(c);
            }
        }
    }
}

/// faer's work memory, with a `Debug` that shows its size only.
pub(crate) struct Scratch(pub(crate) faer::dyn_stack::MemBuffer);

impl std::fmt::Debug for Scratch {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("Scratch")
    }
}

/// Checks the factor diagonal for zero or non-finite pivots.
pub(crate) fn check_pivot<T: Scalar>(p: T) -> Result<(), StepFailure> {
    if p.finite() && p.pivot_size() > 0.0 {
        Ok(())
    } else {
        Err(StepFailure::SingularMatrix)
    }
}

#[cfg(test)]
mod tests;
