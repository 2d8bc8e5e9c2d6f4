//! Adams and BDF against the outside: closed forms, the published
//! problems of `ballast-models` with their reference solutions, the
//! stability regions of `ballast_core::stability`. One test binary; a
//! minimal test-only step loop stands in for the controller of
//! `ballast-switch`.

mod multistep;
