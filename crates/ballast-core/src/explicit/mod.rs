//! Explicit Runge–Kutta schemes: one engine driven by a [`Tableau`], and
//! Dormand–Prince 8(5,3) ([`Dp853`]), whose two embedded estimates and extra
//! dense-output stages do not fit a single tableau.

mod dp853;
pub mod dp853_tableau;
mod rk;
pub mod tableau;

#[cfg(test)]
mod tests;

pub use dp853::Dp853;
pub use rk::ExplicitRk;
pub use tableau::Tableau;
