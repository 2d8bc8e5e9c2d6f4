//! Variable-step, variable-order multistep schemes: Adams (orders 1 to 12)
//! and BDF (orders 1 to 5).
//!
//! # Why the Nordsieck form
//!
//! Both families keep their history as a Nordsieck array, the scaled
//! derivatives `h^j y^{(j)} / j!` of one interpolating polynomial
//! (Nordsieck 1962; Hairer, Norsett and Wanner I, III.6; Hairer and
//! Wanner II, V.5 for BDF). We chose it over the fixed-leading-coefficient
//! form because
//!
//! * a step change is one rescaling (column `j` times `r^j`), an order
//!   change is adding one polynomial — both `O(q n)`, no coefficients to
//!   recompute;
//! * the correction coefficients `l` depend on the order only, so for BDF
//!   the iteration matrix `I - h/l_1 J` changes only with `h` and `q`;
//! * dense output, hand-over and start-up are the same array: the history
//!   polynomial is evaluated, or built from `(t, y, f)` at order 1, or from
//!   exact derivatives at any order, or taken from the other family
//!   (`Adams::history` / `Bdf::start_with_history` and back).
//!
//! The price is that a step change interpolates the history, which is
//! stable only when changes are bounded and not too frequent; the order
//! selector enforces that (see [`order`]).
//!
//! Every scheme sits behind [`crate::Scheme`]: `start` (order 1, from the
//! state, also after a hand-over or a discontinuity), `attempt` (reports
//! the local error and, through `Attempt::factor`, the step factor its own
//! order selection wants), `accept`/`reject`. `order()` reports the order
//! the next step will use.

mod adams;
mod bdf;
pub mod coefficients;
mod corrector;
mod engine;
pub mod nordsieck;
pub mod order;

pub use adams::Adams;

/// Why a Nordsieck history could not start a scheme.
#[derive(Clone, Copy, Debug, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum HistoryError {
    /// The order is outside `1..=max`.
    #[error("history order {order} is outside 1..={max}")]
    Order {
        /// The order given.
        order: usize,
        /// The scheme's largest order.
        max: usize,
    },
    /// Fewer than `(q + 1) n` values, or a zero or non-finite step.
    #[error("history needs {need} values scaled to a finite non-zero step, got {got}")]
    Shape {
        /// Values needed.
        need: usize,
        /// Values given.
        got: usize,
    },
    /// A value of the history or `f` at its first column is not finite.
    #[error("history or right-hand side not finite")]
    NonFinite,
}
pub use bdf::Bdf;
pub use coefficients::{Coefficients, Family};

#[cfg(test)]
mod tests;
