//! Special functions and quadrature rules.

pub mod airy;
pub mod gauss_hermite;
pub mod gauss_legendre;
