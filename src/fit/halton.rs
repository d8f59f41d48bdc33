//! Halton points: a quasi-random sequence in the unit cube for multi-start fits.
//!
//! Coordinate `d` of point `i` is the radical inverse of `i` in the `d`-th prime base
//! (J. H. Halton, Numer. Math. 2, 84 (1960)). Points start at index 1 (index 0 is the origin).
//! Plain Halton points are correlated between high prime bases; for the few dimensions of a fit
//! (≤ 20 here) the first points are well spread.

const PRIMES: [u64; 20] = [
    2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71,
];

/// The largest dimension supported.
pub const MAX_DIMENSION: usize = PRIMES.len();

/// The radical inverse of `i` in base `b`.
pub fn radical_inverse(mut i: u64, b: u64) -> f64 {
    let mut f = 1.0;
    let mut x = 0.0;
    let inv = 1.0 / b as f64;
    while i > 0 {
        f *= inv;
        x += f * (i % b) as f64;
        i /= b;
    }
    x
}

/// The Halton point of index `i` (from 1) in `dim` dimensions (`dim ≤ MAX_DIMENSION`).
pub fn point(i: u64, dim: usize) -> Vec<f64> {
    (0..dim).map(|d| radical_inverse(i, PRIMES[d])).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn first_points_are_the_textbook_ones() {
        // Base 2: 1/2, 1/4, 3/4; base 3: 1/3, 2/3, 1/9 (Halton 1960).
        assert_eq!(point(1, 2), vec![0.5, 1.0 / 3.0]);
        assert_eq!(point(2, 2), vec![0.25, 2.0 / 3.0]);
        assert!((point(3, 2)[1] - 1.0 / 9.0).abs() < 1e-15);
        assert_eq!(point(3, 1), vec![0.75]);
    }
}
