//! Tests of the explicit Runge–Kutta coefficients and schemes against
//! outside facts: order conditions (B-series), convergence order on a
//! problem with a closed-form solution, and exact one-step results on
//! `y' = lambda y`.

mod convergence;
mod linear;
mod order_conditions;
mod problems;
mod schemes;
mod trees;

use super::dp853_tableau as dop;
use super::tableau::{self, Tableau};
use crate::method::Method;

/// Every generic tableau, for loops over methods.
pub(super) const TABLEAUX: [&Tableau; 6] = [
    &tableau::FORWARD_EULER,
    &tableau::HEUN,
    &tableau::RK4,
    &tableau::BOGACKI_SHAMPINE_32,
    &tableau::DORMAND_PRINCE_54,
    &tableau::TSITOURAS_54,
];

/// Every explicit Runge–Kutta method with its published order.
pub(super) const METHODS: [(Method, usize); 7] = [
    (Method::ForwardEuler, 1),
    (Method::Heun, 2),
    (Method::BogackiShampine32, 3),
    (Method::Rk4, 4),
    (Method::DormandPrince54, 5),
    (Method::Tsitouras54, 5),
    (Method::DormandPrince853, 8),
];

/// The step-proper part of Dormand–Prince 8(5,3): rows `0..=12` of `a`
/// (the last is the FSAL stage) as a list of rows.
pub(super) fn dop853_rows() -> &'static [&'static [f64]] {
    &dop::A[..=dop::STEP_STAGES]
}
