//! Numerical methods shared by [`crate::geometry`] and [`crate::physics`]:
//! root finding ([`roots`]), quadrature ([`quadrature`]) and complete
//! elliptic integrals ([`elliptic`]). Each function documents its method
//! and tolerance.

pub mod elliptic;
pub mod quadrature;
pub mod roots;

/// A seeded generator of uniform numbers in `[0, 1)` for tests: a 64-bit
/// linear congruential generator (Knuth's MMIX multiplier and increment),
/// its top 53 bits as the fraction. Reproducible random inputs with no
/// dependency.
#[cfg(test)]
pub(crate) fn test_uniform(mut seed: u64) -> impl FnMut() -> f64 {
    move || {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (seed >> 11) as f64 / (1u64 << 53) as f64
    }
}
