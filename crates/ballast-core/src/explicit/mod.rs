//! Explicit Runge–Kutta schemes: one engine driven by a [`Tableau`].

mod rk;
pub mod tableau;

pub use rk::ExplicitRk;
pub use tableau::Tableau;
