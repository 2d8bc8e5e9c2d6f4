//! Implicit one-step methods: diagonally and fully implicit Runge–Kutta, Rosenbrock.
pub mod tableau;
