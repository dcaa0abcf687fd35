//! Numerical methods shared by [`crate::geometry`] and [`crate::physics`]:
//! root finding ([`roots`]), quadrature ([`quadrature`]) and complete
//! elliptic integrals ([`elliptic`]). Each function documents its method
//! and tolerance.

pub mod elliptic;
pub mod quadrature;
pub mod roots;
