//! Tests over every model: Jacobians against finite differences, the
//! registry's bookkeeping, and the consistency of every reference value.

mod jacobians;
mod references;
mod registry;
