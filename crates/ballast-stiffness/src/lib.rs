//! # ballast-stiffness
//!
//! How stiff is the problem now? This crate estimates, cheaply and during a
//! run, the spectral radius `rho(J)` of the Jacobian `J = df/dy` and the
//! direction of its dominant eigenvalue in the complex plane, from products
//! `v -> J v` only. A step-size controller uses `rho` and the angle to cap
//! an explicit step at the stability limit, `h <= r(theta) / rho`, and to
//! decide when an implicit scheme is cheaper.
//!
//! - [`spectral_radius`] / [`SpectralEstimator`]: power iteration with a
//!   2×2 Rayleigh–Ritz step that recovers a dominant complex-conjugate pair
//!   `a ± ib` (and a pair `±a`), a residual-based convergence test, an
//!   iteration cap, and warm starts from the previous dominant vector.
//!   The estimator is sized once and allocates nothing per call.
//! - [`fd_jvp`] / [`FdJvp`] / [`SpectralEstimator::estimate_fd`]:
//!   Jacobian-vector products without a Jacobian,
//!   `(f(y + e v) - f(y)) / e`, one call of `f` each, reusing the `f(y)`
//!   the integrator already has. With an analytic Jacobian, pass its
//!   product directly (e.g. [`dense_product`]).
//! - [`gershgorin_bound`]: a safe upper bound of `rho` for an assembled
//!   matrix, at no product.
//! - [`stage_estimate`]: the free estimate `||k_i - k_j|| / ||Y_i - Y_j||`
//!   from two explicit Runge–Kutta stages at the same time point.
//!
//! ## When not to use it
//!
//! Power iteration finds the eigenvalue of largest modulus, at a rate set
//! by the ratio of the dominant modulus to the next one; it needs the
//! dominant part of the spectrum to be one real eigenvalue or one
//! conjugate pair (or `±a`). It reports failure honestly
//! ([`SpectralEstimate::converged`] is `false`, with the larger of the
//! Ritz value and the last gain `||J x||` as a conservative radius) when
//! several distinct eigenvalues of (nearly) equal modulus that are not a
//! conjugate or `±a` pair lead the spectrum, e.g. `-10` and `±10i`, and
//! when the cap on products is reached before the residual test passes.
//! It can be wrong while saying `converged` for highly non-normal
//! Jacobians (strong advection, some chemical networks) and
//! non-diagonalisable dominant blocks: there a small residual
//! `||J v - lambda v||` does not mean that `lambda` is near an eigenvalue,
//! only that it is in the pseudospectrum, typically outside the spectrum
//! (for the 8×8 Jordan block `-100 I + 100 N` it returns about 137 for
//! `rho = 100`). The error is then on the safe side for a step-size cap, but
//! the transient growth `||J^k||` matters more than `rho` there: look at
//! the pseudospectrum or the field of values instead.
//!
//! The estimate is not a bound: from a matrix-free operator none is
//! available. When the Jacobian is assembled, cap it with
//! [`gershgorin_bound`].
//!
//! Every dot product and norm goes through one private module, so a
//! distributed state can supply a global reduction there.
//!
//! ## Example
//!
//! ```
//! use ballast_stiffness::{spectral_radius, PowerOptions, SpectralEstimator};
//!
//! // The linear test problem of a stiff chemistry-like system:
//! // J = diag(-1, -10, -1000), given only as a product.
//! let d = [-1.0, -10.0, -1000.0];
//! let matvec = |v: &[f64], out: &mut [f64]| {
//!     for i in 0..3 {
//!         out[i] = d[i] * v[i];
//!     }
//! };
//! let est = spectral_radius(3, matvec, &PowerOptions::default());
//! assert!(est.converged);
//! assert!((est.radius - 1000.0).abs() < 10.0);
//! assert!(est.eigenvalue.re < 0.0);
//!
//! // Along a trajectory: one estimator, warm starts, no allocation.
//! // Here y' = f(y) = -(1000 + y0^2) y, and the product comes from
//! // finite differences of f at the current state.
//! let mut f = |y: &[f64], dy: &mut [f64]| {
//!     let s = 1000.0 + y[0] * y[0];
//!     for i in 0..3 {
//!         dy[i] = -s * y[i];
//!     }
//! };
//! let mut est = SpectralEstimator::new(3);
//! let opts = PowerOptions::default();
//! let mut fy = [0.0; 3];
//! for step in 0..5 {
//!     let y = [0.1 * step as f64, 1.0, 2.0];
//!     f(&y, &mut fy);
//!     let e = est.estimate_fd(&mut f, &y, &fy, &opts).unwrap();
//!     assert!((e.radius - 1000.0).abs() < 15.0, "{e:?}");
//! }
//! ```
#![forbid(unsafe_code)]
#![deny(missing_docs)]

mod bounds;
mod jvp;
mod options;
mod power;
mod ritz;
mod vecops;

pub use bounds::{dense_product, gershgorin_bound, gershgorin_bound_entries, stage_estimate};
pub use jvp::{fd_increment, fd_increment_typical, fd_jvp, FdJvp};
pub use num_complex::Complex64;
pub use options::{PowerOptions, SpectralEstimate, StiffnessError, Termination};
pub use power::{spectral_radius, SpectralEstimator};
