//! Small dense complex matrices of compile-time size `N` (one row and column per channel) and the
//! unitary exponential of an anti-Hermitian matrix.
//!
//! These kernels run in the propagator's inner loop, so they live on the stack (no allocation)
//! and have their size fixed at compile time (the loops unroll). The public types of the
//! `hole` module convert to and from `nalgebra::DMatrix` at the boundary.

// Index loops mirror the matrix formulas (row i, column j) and unroll for fixed N.
#![allow(clippy::needless_range_loop)]

use num_complex::Complex64;

/// A dense `N×N` complex matrix, row-major: `m[row][col]`.
pub(crate) type Mat<const N: usize> = [[Complex64; N]; N];

const ZERO: Complex64 = Complex64::new(0.0, 0.0);
const ONE: Complex64 = Complex64::new(1.0, 0.0);

/// The zero matrix.
#[inline(always)]
pub(crate) fn zero<const N: usize>() -> Mat<N> {
    [[ZERO; N]; N]
}

/// The identity matrix.
#[inline(always)]
pub(crate) fn identity<const N: usize>() -> Mat<N> {
    let mut m = zero::<N>();
    for (i, row) in m.iter_mut().enumerate() {
        row[i] = ONE;
    }
    m
}

/// The matrix product `a b`.
#[inline(always)]
pub(crate) fn mul<const N: usize>(a: &Mat<N>, b: &Mat<N>) -> Mat<N> {
    let mut c = zero::<N>();
    for i in 0..N {
        for k in 0..N {
            let aik = a[i][k];
            for j in 0..N {
                c[i][j] += aik * b[k][j];
            }
        }
    }
    c
}

/// The product `a b` when it is known to be Hermitian (e.g. two commuting Hermitian matrices, or
/// the square of an anti-Hermitian one): only the upper triangle is computed.
#[inline(always)]
fn mul_to_hermitian<const N: usize>(a: &Mat<N>, b: &Mat<N>) -> Mat<N> {
    let mut c = zero::<N>();
    for i in 0..N {
        for j in i..N {
            let mut s = ZERO;
            for k in 0..N {
                s += a[i][k] * b[k][j];
            }
            if i == j {
                c[i][i] = Complex64::new(s.re, 0.0);
            } else {
                c[i][j] = s;
                c[j][i] = s.conj();
            }
        }
    }
    c
}

/// The product `a b` when it is known to be anti-Hermitian (an anti-Hermitian matrix times a
/// Hermitian one that commutes with it): only the upper triangle is computed.
#[inline(always)]
fn mul_to_skew<const N: usize>(a: &Mat<N>, b: &Mat<N>) -> Mat<N> {
    let mut c = zero::<N>();
    for i in 0..N {
        for j in i..N {
            let mut s = ZERO;
            for k in 0..N {
                s += a[i][k] * b[k][j];
            }
            if i == j {
                c[i][i] = Complex64::new(0.0, s.im);
            } else {
                c[i][j] = s;
                c[j][i] = -s.conj();
            }
        }
    }
    c
}

/// The commutator `[x, y] = x y − y x` of two anti-Hermitian matrices.
///
/// For anti-Hermitian `x`, `y` one has `(x y)† = y x`, so `[x, y] = x y − (x y)†`: one product
/// instead of two, and the result is anti-Hermitian to the last bit (which the exactly unitary
/// exponential below relies on).
#[inline(always)]
pub(crate) fn commutator_skew<const N: usize>(x: &Mat<N>, y: &Mat<N>) -> Mat<N> {
    let p = mul(x, y);
    let mut c = zero::<N>();
    for i in 0..N {
        for j in 0..N {
            c[i][j] = p[i][j] - p[j][i].conj();
        }
    }
    c
}

/// `Σ_k w_k m_k` for real weights.
#[inline(always)]
pub(crate) fn combine<const N: usize, const K: usize>(terms: [(f64, &Mat<N>); K]) -> Mat<N> {
    let mut c = zero::<N>();
    for (w, m) in terms {
        for i in 0..N {
            for j in 0..N {
                c[i][j] += m[i][j] * w;
            }
        }
    }
    c
}

/// An upper bound of the 1-norm (maximum column sum), using `|re| + |im| ≥ |z|`.
#[inline(always)]
fn one_norm_bound<const N: usize>(x: &Mat<N>) -> f64 {
    let mut best = 0.0_f64;
    for j in 0..N {
        let mut s = 0.0;
        for row in x.iter() {
            s += row[j].re.abs() + row[j].im.abs();
        }
        if s > best || s.is_nan() {
            best = s;
        }
    }
    best
}

/// Solves `q r = p` for `r` by Gaussian elimination without pivoting (no allocation; a zero
/// pivot produces non-finite entries, never a panic).
///
/// Used only for the Padé denominator `q = q_m(x)` with `‖x‖₁ ≤ θ_m`, where
/// `‖q/b₀ − I‖₁ ≤ p_m(θ_m)/b₀ − 1 ≤ 0.60` (computed from the coefficients): `q` is strictly
/// diagonally dominant by columns, for which elimination without pivoting is stable (a classical
/// result of Wilkinson; see Golub & Van Loan, *Matrix Computations*, on diagonally dominant
/// systems; from memory).
#[inline(always)]
fn solve<const N: usize>(mut q: Mat<N>, mut p: Mat<N>) -> Mat<N> {
    // Reciprocal pivots, each with a single real division (they form the latency chain).
    let mut inv = [ZERO; N];
    for col in 0..N {
        let d = q[col][col];
        let r = 1.0 / d.norm_sqr();
        inv[col] = Complex64::new(d.re * r, -d.im * r);
        for row in (col + 1)..N {
            let f = q[row][col] * inv[col];
            for c in (col + 1)..N {
                let v = q[col][c];
                q[row][c] -= f * v;
            }
            for c in 0..N {
                let v = p[col][c];
                p[row][c] -= f * v;
            }
        }
    }
    for col in (0..N).rev() {
        for c in 0..N {
            p[col][c] *= inv[col];
        }
        for row in 0..col {
            let f = q[row][col];
            for c in 0..N {
                let v = p[col][c];
                p[row][c] -= f * v;
            }
        }
    }
    p
}

/// Coefficients of the numerator of the diagonal `[m/m]` Padé approximant of `e^x`,
/// `p_m(x) = Σ_j b_j x^j`, `b_j ∝ (2m−j)! m! / ((2m)! j! (m−j)!)`, scaled to integers
/// (Higham, SIAM J. Matrix Anal. Appl. 26, 1179 (2005), Eq. (2.2) and §2; the integers were
/// re-derived from the factorial formula).
const PADE3: [f64; 4] = [120.0, 60.0, 12.0, 1.0];
const PADE5: [f64; 6] = [30240.0, 15120.0, 3360.0, 420.0, 30.0, 1.0];
const PADE7: [f64; 8] = [
    17297280.0, 8648640.0, 1995840.0, 277200.0, 25200.0, 1512.0, 56.0, 1.0,
];

/// Largest 1-norms for which the `[3/3]`, `[5/5]` and `[7/7]` approximants have a backward
/// error below the unit roundoff `2⁻⁵³` (Higham 2005, Table 2.3; values from memory). The
/// leading forward-error term `(m!)²/((2m)!(2m+1)!) ‖x‖^{2m+1}` at these norms is 1.7e-18,
/// 2.8e-17 and 1.0e-16 respectively (computed here), which confirms them.
const THETA3: f64 = 1.495585217958292e-2;
const THETA5: f64 = 2.539_398_330_063_23e-1;
const THETA7: f64 = 9.504178996162932e-1;

/// `e^x` for an anti-Hermitian `x`, unitary to rounding.
///
/// Method: diagonal Padé approximant `r_m(x) = q_m(x)⁻¹ p_m(x)` with `q_m(x) = p_m(−x)`,
/// degree `m ∈ {3, 5, 7}` chosen from the 1-norm, with scaling and squaring above
/// `‖x‖₁ = 0.95` (Higham 2005, Algorithm 2.3 restricted to `m ≤ 7`). For anti-Hermitian `x`
/// and real coefficients `p_m(x)† = p_m(−x) = q_m(x)`, so `r_m(x)† r_m(x) = I` exactly in exact
/// arithmetic: the result is unitary to rounding whatever the degree, and its distance from
/// `e^x` is below ~1e-16 by the choice of degree (see [`THETA7`]).
///
/// A non-finite input gives a non-finite result (never a panic or an endless squaring loop).
#[inline(always)]
pub(crate) fn unitary_exp<const N: usize>(x: &Mat<N>) -> Mat<N> {
    let Some(plan) = ExpPlan::for_norm(one_norm_bound(x)) else {
        return [[Complex64::new(f64::NAN, f64::NAN); N]; N];
    };
    let (numerator, denominator) = pade_fraction(x, plan);
    plan.square(solve(denominator, numerator))
}

/// Padé degree and number of squarings for a given 1-norm bound.
#[derive(Clone, Copy)]
struct ExpPlan {
    degree: u32,
    squarings: i32,
}

impl ExpPlan {
    /// `None` for a non-finite norm (the caller returns NaN: no panic, no endless squaring).
    #[inline(always)]
    fn for_norm(norm: f64) -> Option<Self> {
        if !norm.is_finite() {
            return None;
        }
        Some(if norm <= THETA3 {
            Self {
                degree: 3,
                squarings: 0,
            }
        } else if norm <= THETA5 {
            Self {
                degree: 5,
                squarings: 0,
            }
        } else if norm <= THETA7 {
            Self {
                degree: 7,
                squarings: 0,
            }
        } else {
            // norm is finite here, so the exponent is a small positive integer.
            let s = (norm / THETA7).log2().ceil().max(0.0) as i32;
            Self {
                degree: 7,
                squarings: s,
            }
        })
    }

    #[inline(always)]
    fn square<const N: usize>(self, mut r: Mat<N>) -> Mat<N> {
        for _ in 0..self.squarings {
            r = mul(&r, &r);
        }
        r
    }
}

/// Numerator `p_m(x/2^s)` and denominator `q_m(x/2^s) = p_m(−x/2^s)` of the Padé approximant,
/// from the even part `E` (Hermitian) and the odd part `O` (anti-Hermitian): `p = E + O`,
/// `q = E − O`.
#[inline(always)]
fn pade_fraction<const N: usize>(x: &Mat<N>, plan: ExpPlan) -> (Mat<N>, Mat<N>) {
    let scaled;
    let x = if plan.squarings > 0 {
        scaled = combine([(0.5_f64.powi(plan.squarings), x)]);
        &scaled
    } else {
        x
    };
    let x2 = mul_to_hermitian(x, x);
    let (even, odd_poly) = match plan.degree {
        3 => {
            let b = PADE3;
            (
                add_identity(combine([(b[2], &x2)]), b[0]),
                add_identity(combine([(b[3], &x2)]), b[1]),
            )
        }
        5 => {
            let b = PADE5;
            let x4 = mul_to_hermitian(&x2, &x2);
            (
                add_identity(combine([(b[2], &x2), (b[4], &x4)]), b[0]),
                add_identity(combine([(b[3], &x2), (b[5], &x4)]), b[1]),
            )
        }
        _ => {
            let b = PADE7;
            let x4 = mul_to_hermitian(&x2, &x2);
            let x6 = mul_to_hermitian(&x4, &x2);
            (
                add_identity(combine([(b[2], &x2), (b[4], &x4), (b[6], &x6)]), b[0]),
                add_identity(combine([(b[3], &x2), (b[5], &x4), (b[7], &x6)]), b[1]),
            )
        }
    };
    let odd = mul_to_skew(x, &odd_poly);
    (
        combine([(1.0, &even), (1.0, &odd)]),
        combine([(1.0, &even), (-1.0, &odd)]),
    )
}

#[inline(always)]
fn add_identity<const N: usize>(mut m: Mat<N>, c: f64) -> Mat<N> {
    for (i, row) in m.iter_mut().enumerate() {
        row[i] += c;
    }
    m
}

#[cfg(test)]
mod tests {
    //! The exponential against SciPy `linalg.expm` (values in `tests/data/hole_reference.json`,
    //! written by `scripts/hole_reference.py`), at 1-norms that select each Padé degree and the
    //! scaling-and-squaring branch.
    use super::*;
    use serde::Deserialize;

    #[derive(Deserialize)]
    struct ExpCase {
        generator: Vec<Vec<[f64; 2]>>,
        exponential: Vec<Vec<[f64; 2]>>,
    }
    #[derive(Deserialize)]
    struct Reference {
        pade_cases: Vec<ExpCase>,
    }

    fn to_mat(v: &[Vec<[f64; 2]>]) -> Mat<3> {
        let mut m = zero::<3>();
        for i in 0..3 {
            for j in 0..3 {
                m[i][j] = Complex64::new(v[i][j][0], v[i][j][1]);
            }
        }
        m
    }

    #[test]
    fn unitary_exp_matches_scipy_expm_for_every_degree() {
        // Source: SciPy 1.17.1 scipy.linalg.expm (reference script scripts/hole_reference.py).
        let text = include_str!("../../tests/data/hole_reference.json");
        let reference: Reference = serde_json::from_str(text).expect("reference data parses");
        assert!(reference.pade_cases.len() >= 4);
        for case in &reference.pade_cases {
            let x = to_mat(&case.generator);
            let want = to_mat(&case.exponential);
            let got = unitary_exp(&x);
            for i in 0..3 {
                for j in 0..3 {
                    let d = (got[i][j] - want[i][j]).norm();
                    assert!(d < 1e-14, "entry ({i},{j}) differs by {d:e}");
                }
            }
            // Unitarity to rounding (common practice).
            let mut gram = zero::<3>();
            for i in 0..3 {
                for j in 0..3 {
                    for k in 0..3 {
                        gram[i][j] += got[k][i].conj() * got[k][j];
                    }
                }
            }
            for (i, row) in gram.iter().enumerate() {
                for (j, g) in row.iter().enumerate() {
                    let want = if i == j { 1.0 } else { 0.0 };
                    assert!((g - want).norm() < 1e-14);
                }
            }
        }
    }
}
