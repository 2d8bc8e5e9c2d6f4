//! Explicit Runge–Kutta schemes: one engine driven by a [`Tableau`], and
//! Dormand–Prince 8(5,3) ([`Dop853`]), whose two embedded estimates and extra
//! dense-output stages do not fit a single tableau.

mod dop853;
pub mod dop853_tableau;
mod rk;
pub mod tableau;

#[cfg(test)]
mod tests;

pub use dop853::Dop853;
pub use rk::ExplicitRk;
pub use tableau::Tableau;
