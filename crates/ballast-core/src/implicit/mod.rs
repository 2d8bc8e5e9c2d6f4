//! Implicit one-step methods: diagonally and fully implicit Runge–Kutta, Rosenbrock.
//!
//! - [`Dirk`] — backward Euler, trapezoid, TR-BDF2, ESDIRK 4(3);
//! - [`RadauIia5`] — Radau IIA of order 5 with the real/complex splitting;
//! - [`Rosenbrock`] — ROS3P and a four-stage L-stable Rosenbrock 3(2).
//!
//! All share the [`iteration::IterationMatrix`] cache (Jacobian reuse,
//! factorisation reuse) and the Newton control of [`crate::newton`].
//!
//! ```
//! use ballast_core::{implicit::Dirk, implicit::tableau::ESDIRK_43, Atol, ErrorNorm,
//!                    ImplicitOptions, Problem, Scheme, SchemeState, Structure};
//! // A stiff linear decay y' = -1000 (y - 1), one step far beyond 1/1000.
//! let mut p = Problem::new(|_t: f64, y: &[f64], d: &mut [f64]| d[0] = -1000.0 * (y[0] - 1.0), 1);
//! let mut s = Dirk::new(&ESDIRK_43, 1, &Structure::Dense, &ImplicitOptions::default()).unwrap();
//! s.start(&mut p, 0.0, &[0.0]).unwrap();
//! let norm = ErrorNorm::new(1e-6, Atol::Scalar(1e-9), 1);
//! let _ = s.attempt(&mut p, 0.5, &norm).unwrap();
//! s.accept(&mut p);
//! // On a linear problem one step multiplies the transient y - 1 by the
//! // stability function: y1 - 1 = R(-500) (0 - 1), damped since |R| < 1.
//! let r = ballast_core::stability::method_region(ballast_core::Method::Esdirk43)
//!     .unwrap().function().eval(num_complex::Complex64::new(-500.0, 0.0)).unwrap().re;
//! assert!(r.abs() < 1.0);
//! assert!((s.y()[0] - 1.0 + r).abs() < 1e-6);
//! ```
pub mod dirk;
pub mod hermite;
pub mod iteration;
pub mod radau_constants;
pub mod radau_iia5;
pub mod rosenbrock;
pub mod tableau;

pub use dirk::Dirk;
pub use radau_iia5::RadauIia5;
pub use rosenbrock::Rosenbrock;

#[cfg(test)]
mod tests;
