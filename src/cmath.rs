//! Fast elementary complex functions for the hot loops.
//!
//! `num_complex` computes `|z|` with `hypot` and `√z` through polar form (`hypot`, `atan2`,
//! `sin_cos`), which guard against overflow at a large cost. The quantities here are far from
//! overflow, so the plain formulas are used.

use num_complex::Complex64;

/// Modulus `sqrt(re² + im²)`.
#[inline]
pub fn modulus(c: Complex64) -> f64 {
    (c.re * c.re + c.im * c.im).sqrt()
}

/// Principal square root (branch cut along the negative real axis, as `Complex64::sqrt`).
#[inline]
pub fn sqrt(z: Complex64) -> Complex64 {
    let r = modulus(z);
    if r == 0.0 {
        return Complex64::new(0.0, 0.0);
    }
    let t = (0.5 * (r + z.re.abs())).sqrt();
    if z.re >= 0.0 {
        Complex64::new(t, 0.5 * z.im / t)
    } else {
        Complex64::new(0.5 * z.im.abs() / t, t.copysign(z.im))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn agrees_with_num_complex() {
        // num_complex's principal square root is the reference (general-purpose library).
        for &(x, y) in &[
            (1.0, 0.0),
            (-1.0, 1e-300),
            (-1.0, -1e-300),
            (3.0, -4.0),
            (-2.5, 0.7),
            (0.0, -2.0),
            (-7.0, 0.0),
        ] {
            let z = Complex64::new(x, y);
            let (a, b) = (sqrt(z), z.sqrt());
            assert!(
                (a - b).norm() <= 1e-15 * b.norm().max(1e-300),
                "{z}: {a} vs {b}"
            );
            assert!((modulus(z) - z.norm()).abs() <= 1e-15 * z.norm());
        }
    }
}
