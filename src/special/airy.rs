//! Airy function Ai and its derivative Ai′ for complex argument.
//!
//! # Definition and conventions
//! Ai is the solution of the Airy equation w″ = z w that decays along the positive real
//! axis, normalised by Ai(0) = 1/(3^{2/3} Γ(2/3)) and Ai′(0) = −1/(3^{1/3} Γ(1/3))
//! (NIST DLMF §9.2, eqs. 9.2.1, 9.2.3, 9.2.4). Ai is entire; [`airy`] takes the principal
//! branches of z^{1/4} and z^{3/2} internally, but the result does not depend on a branch.
//!
//! # Method
//! The plane is split into three regions (after reflecting z to Im z ≥ 0 with
//! Ai(z̄) = conj Ai(z), which holds because Ai is real on the real axis):
//!
//! * **|z| ≤ 1 — Maclaurin series**, DLMF 9.4.1–9.4.2: Ai = c₁ f(z) − c₂ g(z) with the two
//!   power series f, g in z³. Cancellation between c₁f and c₂g costs at most a factor ≈ 3
//!   of rounding error at |z| = 1.
//! * **|z| ≥ 9.5 — asymptotic expansions**, DLMF 9.7.5/9.7.6 for |ph z| ≤ 2π/3 and
//!   9.7.9/9.7.10 (written for Ai(−w), w = −z) for 2π/3 < |ph z| ≤ π, with the
//!   coefficients u_k, v_k of DLMF 9.7.2. At |z| = 9.5, |ζ| = (2/3)|z|^{3/2} ≈ 19.5 and the
//!   series reach relative term size 1e-17 before they start to diverge; the exponentially
//!   small contributions that the expansions neglect (Stokes phenomenon at ph z = ±2π/3)
//!   are ≈ e^{−2|ζ|} < 1e-16. The exponent ζ = (2/3) z^{3/2} is formed in double-double
//!   arithmetic, so the oscillation phase and the exponential are accurate to a few ulp
//!   of the *result* even for |ζ| in the thousands (plain double arithmetic would lose
//!   |ζ|·ε, i.e. 4e-13 at |z| = 200).
//! * **1 < |z| < 9.5 — Taylor steps of the Airy equation.** A table of (Ai, Ai′) at the
//!   nodes of a square grid with spacing 0.5 covering the upper half of this annulus is
//!   built once, on first use (861 nodes, about 1.1e7 instructions, i.e. a few
//!   milliseconds; thread-safe through `OnceLock`). Each call then takes one Taylor step
//!   of the ODE from the nearest node (|h| ≤ 0.36), with the coefficient recurrence
//!   (k+2)(k+1) c_{k+2} = z₀ c_k + c_{k−1} that follows from w″ = z w about z₀.
//!   The node values come from integrating the ODE with short Taylor steps along the ray
//!   through the node, in the direction in which Ai does not decay relative to the other
//!   solutions (rounding errors excite those, so only then do they not grow relative to
//!   Ai): *inward* from the asymptotic radius for |ph z| ≤ π/3 (Ai recessive at ∞), and
//!   *outward* from the Maclaurin radius for π/3 < |ph z| ≤ π (Ai dominant or, on the
//!   negative axis, oscillatory). That ray integration is also available to the unit
//!   tests as the plain reference path (`airy_by_ray_integration` in this file).
//!
//! # Range, overflow and special inputs
//! * Accuracy, measured against mpmath at 30 digits with |z| ≤ 200 (the 399 points of
//!   `tests/data/airy_reference.json` and about 6300 more random and boundary points made
//!   the same way during development): ≤ 7e-16 for |z| ≤ 1 and for |z| ≥ 9.5, ≤ 1.8e-15
//!   in between, as envelope-relative error: the error of Ai is divided by
//!   √(|Ai|² + |Ai′|²/ρ), that of Ai′ by √(|Ai′|² + ρ|Ai|²), ρ = max(|z|, 1). This is the
//!   plain relative error except close to zeros, where it becomes the absolute error in
//!   units of the local amplitude.
//!   These figures are for the exact double input: Ai is ill-conditioned for large |z|
//!   (relative condition number |z Ai′/Ai| ≈ |z|^{3/2}), so an argument that carries its
//!   own rounding error of relative size ε gives a result no better than ε|z|^{3/2}.
//! * |Ai| grows like e^{|Re ζ|} for π/3 < |ph z| < π. Each component of Ai or Ai′ whose
//!   true value exceeds f64::MAX is returned as +∞ or −∞ with the sign of that component;
//!   components below the smallest subnormal are returned as 0 (with gradual underflow
//!   before). NaN never arises from overflow.
//! * For max(|Re z|, |Im z|) > 1e200, where ζ itself can leave the f64 range, the function
//!   returns 0 where Ai decays (|ph z| < π/3), NaN on the exact negative real axis (the
//!   phase (2/3)|z|^{3/2} > 1e300 cannot be represented, so no value would mean anything)
//!   and +∞ + i∞ elsewhere (outside a sliver around the negative axis the true values
//!   overflow there).
//! * Non-finite input (NaN or ±∞ in either part) gives NaN in both parts of both values.
//!   The function never panics and never allocates (apart from the one-time table).

use num_complex::Complex64;
use std::sync::OnceLock;

/// Ai(0) = 1/(3^{2/3} Γ(2/3)), DLMF 9.2.3 (digits: mpmath 1.3.0, 40 digits, rounded).
const AI_AT_ZERO: f64 = 0.355_028_053_887_817_2;
/// −Ai′(0) = 1/(3^{1/3} Γ(1/3)), DLMF 9.2.4 (digits: mpmath 1.3.0, 40 digits, rounded).
const MINUS_AIP_AT_ZERO: f64 = 0.258_819_403_792_806_8;
/// 1/(2√π).
const HALF_INV_SQRT_PI: f64 = 0.282_094_791_773_878_14;
/// e^{iπ/4} components, √½.
const SQRT_HALF: f64 = std::f64::consts::FRAC_1_SQRT_2;
/// tan(π/3) = √3, used to classify phases without an atan2.
const SQRT_3: f64 = 1.732_050_807_568_877_2;

/// Radius up to which the Maclaurin series is used.
const MACLAURIN_RADIUS: f64 = 1.0;
/// Number of terms (powers of z³) kept in the Maclaurin series; the first omitted term is
/// below 1e-18 at |z| = MACLAURIN_RADIUS (checked by a unit test).
const MACLAURIN_TERMS: usize = 9;
/// Radius from which the asymptotic expansions are used.
const ASYMPTOTIC_RADIUS: f64 = 9.5;
/// Largest number of asymptotic terms; the series is cut earlier by its own size.
const ASYMPTOTIC_TERMS: usize = 48;
/// Relative size of the first neglected term in the series sums.
const SERIES_TOLERANCE: f64 = 1e-17;
/// Beyond this size of max(|Re z|, |Im z|), ζ = (2/3) z^{3/2} can overflow; see the module
/// documentation.
const HUGE_MODULUS: f64 = 1e200;

/// Grid spacing of the node table for the middle annulus.
const NODE_SPACING: f64 = 0.5;
/// Half-width of the node grid: nodes have Re z ∈ [−NODE_EXTENT, NODE_EXTENT],
/// Im z ∈ [0, NODE_EXTENT].
const NODE_EXTENT: f64 = 10.0;
/// Number of node columns (real direction) and rows (imaginary direction).
const NODE_COLUMNS: usize = 41;
const NODE_ROWS: usize = 21;
/// Largest Taylor order in one ODE step.
const TAYLOR_TERMS: usize = 60;
/// Ray integration: step length |h| ≤ min(RAY_STEP_SCALE/√|z|, RAY_STEP_MAX).
const RAY_STEP_SCALE: f64 = 1.0;
const RAY_STEP_MAX: f64 = 0.5;

/// Returns `(Ai(z), Ai′(z))` for complex `z`.
///
/// Ai is the Airy function of the first kind (NIST DLMF §9.2), the solution of
/// w″ = z w with Ai(0) = 0.35502805388781724, Ai′(0) = −0.25881940379280680.
/// Methods (see the module documentation for details): Maclaurin series DLMF 9.4.1–9.4.2
/// for |z| ≤ 1, asymptotic expansions DLMF 9.7.5/9.7.6 and 9.7.9/9.7.10 for |z| ≥ 9.5, and
/// one Taylor step of the Airy equation from a precomputed node in between.
///
/// Accuracy: relative error ≲ 2e-15 (near zeros: absolute error ≲ 2e-15 × local amplitude)
/// for |z| up to at least 200 at all phases, as far as the values are representable.
/// Overflowing components are ±∞, underflowing ones 0; non-finite input gives NaN;
/// |z| > 1e200 is handled as described in the module documentation.
///
/// ```
/// use holecast::special::airy::airy;
/// use num_complex::Complex64;
/// let (ai, aip) = airy(Complex64::new(0.0, 0.0));
/// assert!((ai.re - 0.3550280538878172).abs() < 1e-15);
/// assert!((aip.re + 0.2588194037928068).abs() < 1e-15);
/// ```
pub fn airy(z: Complex64) -> (Complex64, Complex64) {
    if !(z.re.is_finite() && z.im.is_finite()) {
        let nan = Complex64::new(f64::NAN, f64::NAN);
        return (nan, nan);
    }
    // Schwarz reflection: Ai(z̄) = conj Ai(z). Work in Im z ≥ 0.
    if z.im < 0.0 {
        let (ai, aip) = airy_upper(z.conj());
        return (ai.conj(), aip.conj());
    }
    airy_upper(z)
}

/// Ai and Ai′ for Im z ≥ 0 (finite z).
fn airy_upper(z: Complex64) -> (Complex64, Complex64) {
    let modulus_sq = z.norm_sqr();
    if modulus_sq <= MACLAURIN_RADIUS * MACLAURIN_RADIUS {
        maclaurin(z)
    } else if modulus_sq >= ASYMPTOTIC_RADIUS * ASYMPTOTIC_RADIUS {
        asymptotic(z)
    } else {
        from_nearest_node(z)
    }
}

/// Airy values without the node table: Maclaurin series, asymptotic expansion, or
/// integration of the Airy equation along the ray through `z` (Im z ≥ 0).
///
/// This is the plain path from which the node table is built, and the reference that the
/// unit tests compare the fast path with.
fn airy_by_ray_integration(z: Complex64) -> (Complex64, Complex64) {
    let modulus = z.norm();
    if modulus <= MACLAURIN_RADIUS {
        return maclaurin(z);
    }
    if modulus >= ASYMPTOTIC_RADIUS {
        return asymptotic(z);
    }
    let direction = z / modulus;
    let recessive_sector = z.re > 0.0 && z.im <= SQRT_3 * z.re;
    let (start, (ai, aip)) = if recessive_sector {
        // |ph z| ≤ π/3: Ai decays outwards, so integrate inwards.
        let start = direction * ASYMPTOTIC_RADIUS;
        (start, asymptotic(start))
    } else {
        // π/3 < |ph z| ≤ π: Ai grows (or oscillates) outwards, so integrate outwards.
        let start = direction * MACLAURIN_RADIUS;
        (start, maclaurin(start))
    };
    integrate_along_segment(start, z, ai, aip)
}

/// Integrates (w, w′) of w″ = z w along the straight segment from `from` to `to` with
/// Taylor steps short enough for fast convergence (|h|·√|z| ≤ 1, |h| ≤ 0.5).
fn integrate_along_segment(
    from: Complex64,
    to: Complex64,
    mut w: Complex64,
    mut wp: Complex64,
) -> (Complex64, Complex64) {
    let mut here = from;
    // Bounded loop: the segment is shorter than 2·ASYMPTOTIC_RADIUS and every step but the
    // last is at least RAY_STEP_SCALE/√(2·ASYMPTOTIC_RADIUS) long.
    for _ in 0..1000 {
        let remaining = to - here;
        let distance = remaining.norm();
        if distance == 0.0 {
            break;
        }
        let step = (RAY_STEP_SCALE / here.norm().max(1e-300).sqrt()).min(RAY_STEP_MAX);
        let next = if distance <= step * 1.000_001 {
            to
        } else {
            here + remaining * (step / distance)
        };
        (w, wp) = taylor_step(here, w, wp, next - here);
        here = next;
    }
    (w, wp)
}

/// One Taylor step of the Airy equation: given w(z₀), w′(z₀), returns w(z₀+h), w′(z₀+h).
///
/// With d_k = c_k h^k, the recurrence (k+2)(k+1) c_{k+2} = z₀ c_k + c_{k−1} (from
/// w″ = z w = (z₀ + (z − z₀)) w) becomes n(n−1) d_n = z₀h² d_{n−2} + h³ d_{n−3}, and
/// w(z₀+h) = Σ d_n, w′(z₀+h) = w′(z₀) + Σ_{n≥2} n d_n / h.
/// The sum stops when three consecutive terms (weighted by n) are below
/// `SERIES_TOLERANCE` relative to |w| + |h w′|.
fn taylor_step(z0: Complex64, w: Complex64, wp: Complex64, h: Complex64) -> (Complex64, Complex64) {
    if h.re == 0.0 && h.im == 0.0 {
        return (w, wp);
    }
    let a = z0 * h * h;
    let b = h * h * h;
    let mut d3 = Complex64::new(0.0, 0.0); // d_{n-3}
    let mut d2 = w; // d_{n-2}
    let mut d1 = wp * h; // d_{n-1}
    let mut value = d2 + d1;
    let mut slope = Complex64::new(0.0, 0.0); // Σ_{n≥2} n d_n
    for (n, inv) in TAYLOR_INVERSE.iter().enumerate().skip(2) {
        let d = (a * d2 + b * d3) * *inv;
        value += d;
        slope += d * (n as f64);
        let small = (norm1(d) + norm1(d1) + norm1(d2)) * (n as f64);
        if small <= SERIES_TOLERANCE * (norm1(value) + norm1(d1) + norm1(slope)) {
            break;
        }
        d3 = d2;
        d2 = d1;
        d1 = d;
    }
    (value, wp + slope / h)
}

/// 1/(n(n−1)) for the Taylor recurrence (entries 0 and 1 unused).
const TAYLOR_INVERSE: [f64; TAYLOR_TERMS] = {
    let mut table = [0.0; TAYLOR_TERMS];
    let mut n = 2;
    while n < TAYLOR_TERMS {
        table[n] = 1.0 / ((n * (n - 1)) as f64);
        n += 1;
    }
    table
};

/// Node values (Ai, Ai′) on the grid x = −NODE_EXTENT + i·NODE_SPACING,
/// y = j·NODE_SPACING, row-major in j.
struct NodeTable {
    values: Vec<(Complex64, Complex64)>,
}

fn node_table() -> &'static NodeTable {
    static TABLE: OnceLock<NodeTable> = OnceLock::new();
    TABLE.get_or_init(|| {
        let mut values = Vec::with_capacity(NODE_ROWS * NODE_COLUMNS);
        for row in 0..NODE_ROWS {
            for column in 0..NODE_COLUMNS {
                values.push(airy_by_ray_integration(node_position(row, column)));
            }
        }
        NodeTable { values }
    })
}

fn node_position(row: usize, column: usize) -> Complex64 {
    Complex64::new(
        -NODE_EXTENT + column as f64 * NODE_SPACING,
        row as f64 * NODE_SPACING,
    )
}

/// 1 < |z| < 9.5, Im z ≥ 0: one Taylor step from the nearest grid node.
fn from_nearest_node(z: Complex64) -> (Complex64, Complex64) {
    let table = node_table();
    // Rounded indices; the clamps only guard the indexing (|z| < 9.5 keeps them inside).
    let column = ((z.re + NODE_EXTENT) / NODE_SPACING).round().max(0.0) as usize;
    let row = (z.im / NODE_SPACING).round().max(0.0) as usize;
    let column = column.min(NODE_COLUMNS - 1);
    let row = row.min(NODE_ROWS - 1);
    let node = node_position(row, column);
    let (ai, aip) = table.values[row * NODE_COLUMNS + column];
    taylor_step(node, ai, aip, z - node)
}

/// Maclaurin coefficients: f = Σ F[k] t^k, g = z Σ G[k] t^k, f′ = z² Σ FD[k] t^k,
/// g′ = Σ GD[k] t^k with t = z³ (DLMF 9.4.1–9.4.2 in the form of the power series of
/// the two standard solutions f, g of w″ = z w, f(0) = 1, f′(0) = 0, g(0) = 0, g′(0) = 1).
struct MaclaurinCoefficients {
    f: [f64; MACLAURIN_TERMS],
    g: [f64; MACLAURIN_TERMS],
    fd: [f64; MACLAURIN_TERMS],
    gd: [f64; MACLAURIN_TERMS],
}

const MACLAURIN: MaclaurinCoefficients = {
    let mut f = [0.0; MACLAURIN_TERMS];
    let mut g = [0.0; MACLAURIN_TERMS];
    let mut fd = [0.0; MACLAURIN_TERMS];
    let mut gd = [0.0; MACLAURIN_TERMS];
    // a_k = a_{k−1}/((3k−1)3k), b_k = b_{k−1}/(3k(3k+1)), a_0 = b_0 = 1.
    let mut a = 1.0;
    let mut b = 1.0;
    let mut k = 0;
    while k < MACLAURIN_TERMS {
        f[k] = a;
        g[k] = b;
        gd[k] = (3 * k + 1) as f64 * b;
        let kn = (k + 1) as f64;
        a /= (3.0 * kn - 1.0) * (3.0 * kn);
        b /= (3.0 * kn) * (3.0 * kn + 1.0);
        fd[k] = 3.0 * kn * a;
        k += 1;
    }
    MaclaurinCoefficients { f, g, fd, gd }
};

/// |z| ≤ MACLAURIN_RADIUS: Ai = c₁f − c₂g, Ai′ = c₁f′ − c₂g′ (DLMF 9.4.1–9.4.2).
fn maclaurin(z: Complex64) -> (Complex64, Complex64) {
    let t = z * z * z;
    let zero = Complex64::new(0.0, 0.0);
    let (mut f, mut g, mut fd, mut gd) = (zero, zero, zero, zero);
    for k in (0..MACLAURIN_TERMS).rev() {
        f = f * t + MACLAURIN.f[k];
        g = g * t + MACLAURIN.g[k];
        fd = fd * t + MACLAURIN.fd[k];
        gd = gd * t + MACLAURIN.gd[k];
    }
    let g = g * z;
    let fd = fd * (z * z);
    (
        f * AI_AT_ZERO - g * MINUS_AIP_AT_ZERO,
        fd * AI_AT_ZERO - gd * MINUS_AIP_AT_ZERO,
    )
}

/// Coefficients u_k and v_k of DLMF 9.7.2:
/// u_k = (6k−5)(6k−3)(6k−1)/((2k−1)·216·k) · u_{k−1}, v_k = −(6k+1)/(6k−1) · u_k,
/// u_0 = v_0 = 1.
struct AsymptoticCoefficients {
    u: [f64; ASYMPTOTIC_TERMS],
    v: [f64; ASYMPTOTIC_TERMS],
}

const ASYMPTOTIC: AsymptoticCoefficients = {
    let mut u = [0.0; ASYMPTOTIC_TERMS];
    let mut v = [0.0; ASYMPTOTIC_TERMS];
    u[0] = 1.0;
    v[0] = 1.0;
    let mut k = 1;
    while k < ASYMPTOTIC_TERMS {
        let kf = k as f64;
        u[k] = u[k - 1] * (6.0 * kf - 5.0) * (6.0 * kf - 3.0) * (6.0 * kf - 1.0)
            / ((2.0 * kf - 1.0) * 216.0 * kf);
        v[k] = -(6.0 * kf + 1.0) / (6.0 * kf - 1.0) * u[k];
        k += 1;
    }
    AsymptoticCoefficients { u, v }
};

/// |z| ≥ ASYMPTOTIC_RADIUS, Im z ≥ 0.
fn asymptotic(z: Complex64) -> (Complex64, Complex64) {
    // (z.norm_sqr() itself overflows beyond 1e154, so compare the components.)
    if z.re.abs().max(z.im.abs()) > HUGE_MODULUS {
        return beyond_range(z);
    }
    // ph z ≤ 2π/3  ⇔  Re z ≥ 0 or Im z ≥ √3·(−Re z)   (Im z ≥ 0 here).
    if z.re >= 0.0 || z.im >= -SQRT_3 * z.re {
        asymptotic_principal(z)
    } else {
        asymptotic_negative(-z)
    }
}

/// Number of terms to keep in the asymptotic sums for 1/|ζ| = `inverse_modulus`: up to the first
/// term |v_k| |ζ|^{−k} below `SERIES_TOLERANCE` (|v_k| > |u_k|, and the sums are ≈ 1),
/// or up to the smallest term if the series diverges first (not reached for |z| ≥ 9.5:
/// there the smallest term is below 1e-18).
fn asymptotic_term_count(inverse_modulus: f64) -> usize {
    let inverse = inverse_modulus;
    let mut power = 1.0;
    let mut previous = f64::INFINITY;
    for (k, v) in ASYMPTOTIC.v.iter().enumerate().skip(1) {
        power *= inverse;
        let size = v.abs() * power;
        if size <= SERIES_TOLERANCE || size > previous {
            return k;
        }
        previous = size;
    }
    ASYMPTOTIC_TERMS
}

/// DLMF 9.7.5 and 9.7.6 (|ph z| ≤ 2π/3 here):
/// Ai(z) ~ e^{−ζ}/(2√π z^{1/4}) Σ (−1)^k u_k ζ^{−k},
/// Ai′(z) ~ −z^{1/4} e^{−ζ}/(2√π) Σ (−1)^k v_k ζ^{−k}.
fn asymptotic_principal(z: Complex64) -> (Complex64, Complex64) {
    let (zeta, root) = zeta_double_double(z);
    let quarter = complex_sqrt(root); // z^{1/4}
    let x = -zeta.hi.inv();
    let terms = asymptotic_term_count(x.norm_sqr().sqrt());
    let zero = Complex64::new(0.0, 0.0);
    let (mut sum_u, mut sum_v) = (zero, zero);
    for k in (0..terms).rev() {
        sum_u = sum_u * x + ASYMPTOTIC.u[k];
        sum_v = sum_v * x + ASYMPTOTIC.v[k];
    }
    // e^{−ζ} = e^{−ζ_hi} e^{−ζ_lo}.
    let exponential = Exponential::new(-zeta.hi);
    let common = exponential.unit * exp_small(-zeta.lo) * HALF_INV_SQRT_PI;
    let ai = common * sum_u * quarter.inv();
    let aip = -(common * sum_v * quarter);
    (exponential.finish(ai), exponential.finish(aip))
}

/// DLMF 9.7.9 and 9.7.10 for Ai(−w), Ai′(−w), |ph w| ≤ π/3 here, written with
/// exponentials instead of cos/sin so that neither overflows separately:
/// Ai(−w) ~ (1/(2√π w^{1/4})) [e^{−iφ} L(iζ) + e^{iφ} L(−iζ)],
/// Ai′(−w) ~ (i w^{1/4}/(2√π)) [e^{−iφ} M(iζ) − e^{iφ} M(−iζ)],
/// φ = ζ − π/4, L(ξ) = Σ (−1)^k u_k ξ^{−k}, M(ξ) = Σ (−1)^k v_k ξ^{−k}.
/// (Expanding cos φ and sin φ gives back the printed forms, whose even/odd parts in k
/// are the even/odd parts of L(±iζ) = E ± O below.)
fn asymptotic_negative(w: Complex64) -> (Complex64, Complex64) {
    let (zeta, root) = zeta_double_double(w);
    let quarter = complex_sqrt(root); // w^{1/4}
    // (−1)^k (iζ)^{−k} = y^k with y = i/ζ; even part in y², odd part y·(…in y²).
    let y = Complex64::new(0.0, 1.0) * zeta.hi.inv();
    let y2 = y * y;
    let terms = asymptotic_term_count(y.norm_sqr().sqrt());
    let zero = Complex64::new(0.0, 0.0);
    let (mut even_u, mut odd_u, mut even_v, mut odd_v) = (zero, zero, zero, zero);
    for k in (0..terms).rev() {
        if k % 2 == 0 {
            even_u = even_u * y2 + ASYMPTOTIC.u[k];
            even_v = even_v * y2 + ASYMPTOTIC.v[k];
        } else {
            odd_u = odd_u * y2 + ASYMPTOTIC.u[k];
            odd_v = odd_v * y2 + ASYMPTOTIC.v[k];
        }
    }
    let odd_u = odd_u * y;
    let odd_v = odd_v * y;
    // e^{−iφ} = e^{iπ/4} e^{−iζ},  e^{iφ} = e^{−iπ/4} e^{iζ}; ζ = ζ_hi + ζ_lo.
    // Im ζ ≤ 0 here, so e^{−iζ} is the decaying and e^{iζ} the growing exponential. When
    // the growing one exceeds e^{SAFE} its excess factor is applied to the final sums; the
    // decaying contribution, then below e^{−2·SAFE} relative, stays negligible after that.
    let (sin, cos) = zeta.hi.re.sin_cos();
    let decaying = Exponential::from_polar_parts(zeta.hi.im, cos, -sin);
    let growing = Exponential::from_polar_parts(-zeta.hi.im, cos, sin);
    let to_decaying = decaying.unit
        * Complex64::new(SQRT_HALF, SQRT_HALF)
        * exp_small(Complex64::new(zeta.lo.im, -zeta.lo.re));
    let to_growing = growing.unit
        * Complex64::new(SQRT_HALF, -SQRT_HALF)
        * exp_small(Complex64::new(-zeta.lo.im, zeta.lo.re));
    let ai = (to_decaying * (even_u + odd_u) + to_growing * (even_u - odd_u))
        * (quarter.inv() * HALF_INV_SQRT_PI);
    let difference = (to_decaying * (even_v + odd_v) - to_growing * (even_v - odd_v))
        * (quarter * HALF_INV_SQRT_PI);
    let aip = Complex64::new(-difference.im, difference.re); // i · difference
    (growing.finish(ai), growing.finish(aip))
}

/// |z| > HUGE_MODULUS (Im z ≥ 0): limits described in the module documentation.
fn beyond_range(z: Complex64) -> (Complex64, Complex64) {
    if z.re > 0.0 && z.im < SQRT_3 * z.re {
        let zero = Complex64::new(0.0, 0.0);
        (zero, zero)
    } else if z.im == 0.0 {
        let nan = Complex64::new(f64::NAN, f64::NAN);
        (nan, nan)
    } else {
        let inf = Complex64::new(f64::INFINITY, f64::INFINITY);
        (inf, inf)
    }
}

/// A complex number as an unevaluated sum hi + lo, |lo| ≲ ulp(|hi|).
#[derive(Clone, Copy, Debug)]
struct DoubleDouble {
    hi: Complex64,
    lo: Complex64,
}

/// ζ = (2/3) z^{3/2} in double-double, and √z (principal branches), for
/// ASYMPTOTIC_RADIUS ≤ |z| ≤ HUGE_MODULUS.
///
/// √z is refined by one Newton step with the exact residual z − s², then z·√z and the
/// factor 2/3 are multiplied with error-free products (Dekker) and sums (Knuth).
fn zeta_double_double(z: Complex64) -> (DoubleDouble, Complex64) {
    let s = complex_sqrt(z);
    // Residual z − s² exactly up to O(ε²|z|).
    let (p, ep) = two_product(s.re, s.re);
    let (q, eq) = two_product(s.im, s.im);
    let (a, ea) = two_sum(z.re, -p);
    let (b, eb) = two_sum(a, q);
    let residual_re = b + (ea + eb - ep + eq);
    let (m, em) = two_product(s.re, s.im);
    let (c, ec) = two_sum(z.im, -2.0 * m);
    let residual_im = c + (ec - 2.0 * em);
    let correction = Complex64::new(residual_re, residual_im) / (s * 2.0);
    // z^{3/2} = z·(s + correction).
    let zc = z * correction;
    let (p1, e1) = two_product(z.re, s.re);
    let (p2, e2) = two_product(z.im, s.im);
    let (re_hi, e3) = two_sum(p1, -p2);
    let re = two_sum(re_hi, e1 - e2 + e3 + zc.re);
    let (p3, e4) = two_product(z.re, s.im);
    let (p4, e5) = two_product(z.im, s.re);
    let (im_hi, e6) = two_sum(p3, p4);
    let im = two_sum(im_hi, e4 + e5 + e6 + zc.im);
    // ζ = (2/3)·z^{3/2}.
    let zeta_re = two_thirds_of(re.0, re.1);
    let zeta_im = two_thirds_of(im.0, im.1);
    (
        DoubleDouble {
            hi: Complex64::new(zeta_re.0, zeta_im.0),
            lo: Complex64::new(zeta_re.1, zeta_im.1),
        },
        s,
    )
}

/// (2/3)(hi + lo) as a double-double: q = fl(2·hi/3) and the exact remainder 2·hi − 3q
/// (3q = 2q + q formed error-free; 2·hi − fl(3q) is exact by Sterbenz' lemma).
#[inline]
fn two_thirds_of(hi: f64, lo: f64) -> (f64, f64) {
    let twice = 2.0 * hi;
    let q = twice / 3.0;
    let (u, eu) = two_sum(2.0 * q, q);
    let remainder = (twice - u) - eu;
    two_sum(q, (remainder + 2.0 * lo) / 3.0)
}

/// Knuth's error-free sum: a + b = s + e exactly.
#[inline]
fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

/// Error-free product: a·b = p + e exactly (|a|, |b| < 1e300). Uses the fused multiply-add
/// when the build targets a CPU that has it, otherwise Dekker's splitting; both give the
/// same (exact) e, so results do not depend on the build.
#[inline]
fn two_product(a: f64, b: f64) -> (f64, f64) {
    const SPLITTER: f64 = 134_217_729.0; // 2^27 + 1
    let p = a * b;
    if cfg!(target_feature = "fma") {
        return (p, a.mul_add(b, -p));
    }
    let ta = SPLITTER * a;
    let a_hi = ta - (ta - a);
    let a_lo = a - a_hi;
    let tb = SPLITTER * b;
    let b_hi = tb - (tb - b);
    let b_lo = b - b_hi;
    let e = ((a_hi * b_hi - p) + a_hi * b_lo + a_lo * b_hi) + a_lo * b_lo;
    (p, e)
}

/// Principal square root, accurate to a few ulp in each component (no polar form).
#[inline]
fn complex_sqrt(z: Complex64) -> Complex64 {
    let (x, y) = (z.re, z.im);
    if x == 0.0 && y == 0.0 {
        return Complex64::new(0.0, y);
    }
    let modulus = if x.abs().max(y.abs()) < 1e150 {
        (x * x + y * y).sqrt()
    } else {
        x.hypot(y)
    };
    let t = ((x.abs() + modulus) * 0.5).sqrt();
    if x >= 0.0 {
        Complex64::new(t, y / (2.0 * t))
    } else {
        Complex64::new(y.abs() / (2.0 * t), t.copysign(y))
    }
}

/// e^{δ} for the low part δ of a double-double exponent (|δ| ≲ 1e-16·|ζ|).
///
/// The real part is clamped to [−1, 1]: it exceeds 1e-8 only for |ζ| > 1e8, and then it
/// matters only where e^{ζ_hi} is representable, i.e. |Re ζ_hi| < 745, where it is below
/// 1e-13; where Re ζ_lo is larger the result is 0 or ±∞ anyway, and the clamp keeps this
/// factor from overflowing on its own (∞·0). The imaginary part is a rotation of any size.
#[inline]
fn exp_small(delta: Complex64) -> Complex64 {
    if norm1(delta) < 1e-8 {
        Complex64::new(1.0 + delta.re, delta.im)
    } else {
        Complex64::from_polar(delta.re.clamp(-1.0, 1.0).exp(), delta.im)
    }
}

/// e^{x} prepared for multiplication by moderate factors without intermediate overflow
/// and without ∞·0 = NaN: components of the product that overflow become ±∞, exactly
/// zero components stay zero.
struct Exponential {
    /// e^{min(Re x, SAFE)} e^{i Im x}.
    unit: Complex64,
    /// e^{Re x − SAFE} when Re x > SAFE (may be +∞), otherwise 1.
    excess: f64,
}

impl Exponential {
    /// Largest Re x applied directly; leaves room for factors up to 1e170 (here ≤ |z|^{1/4}).
    const SAFE: f64 = 300.0;

    #[inline]
    fn new(exponent: Complex64) -> Self {
        let (sin, cos) = exponent.im.sin_cos();
        Self::from_polar_parts(exponent.re, cos, sin)
    }

    /// e^{log_modulus} (cos + i sin), with cos and sin of the imaginary part given.
    #[inline]
    fn from_polar_parts(log_modulus: f64, cos: f64, sin: f64) -> Self {
        if log_modulus <= Self::SAFE {
            let modulus = log_modulus.exp();
            Self {
                unit: Complex64::new(modulus * cos, modulus * sin),
                excess: 1.0,
            }
        } else {
            let modulus = Self::SAFE.exp();
            Self {
                unit: Complex64::new(modulus * cos, modulus * sin),
                excess: (log_modulus - Self::SAFE).exp(),
            }
        }
    }

    /// Applies the excess factor to a value already multiplied by `unit`.
    #[inline]
    fn finish(&self, value: Complex64) -> Complex64 {
        if self.excess == 1.0 {
            return value;
        }
        let scale = |x: f64| if x == 0.0 { x } else { x * self.excess };
        Complex64::new(scale(value.re), scale(value.im))
    }

    #[cfg(test)]
    fn times(&self, factor: Complex64) -> Complex64 {
        self.finish(factor * self.unit)
    }
}

/// |Re z| + |Im z|, a cheap norm for convergence tests.
#[inline]
fn norm1(z: Complex64) -> f64 {
    z.re.abs() + z.im.abs()
}

#[cfg(test)]
mod tests {
    //! Internal consistency of the regions (the external references are in tests/airy.rs).
    use super::*;

    /// Envelope-relative distance of two (Ai, Ai′) pairs (see the module documentation).
    fn distance(z: Complex64, a: (Complex64, Complex64), b: (Complex64, Complex64)) -> f64 {
        let rho = z.norm().max(1.0);
        let scale_ai = b.0.norm().hypot(b.1.norm() / rho.sqrt());
        let scale_aip = b.1.norm().hypot(b.0.norm() * rho.sqrt());
        ((a.0 - b.0).norm() / scale_ai).max((a.1 - b.1).norm() / scale_aip)
    }

    // The Maclaurin truncation is far below rounding at the radius where it is used: the
    // first omitted term of each of the four series f, g, f′, g′ at |z| = MACLAURIN_RADIUS
    // is < 1e-18 (Ai, Ai′ ≥ 0.01 there). Common practice: bound a factorially decreasing
    // tail by its first term.
    #[test]
    fn maclaurin_truncation_is_negligible() {
        let n = MACLAURIN_TERMS;
        let nf = n as f64;
        let r = MACLAURIN_RADIUS;
        let t = r.powi(3);
        let a_n = MACLAURIN.f[n - 1] / ((3.0 * nf - 1.0) * (3.0 * nf));
        let a_n1 = a_n / ((3.0 * nf + 2.0) * (3.0 * nf + 3.0));
        let b_n = MACLAURIN.g[n - 1] / ((3.0 * nf) * (3.0 * nf + 1.0));
        let tail_f = a_n * t.powi(n as i32);
        let tail_g = r * b_n * t.powi(n as i32);
        let tail_fd = r * r * 3.0 * (nf + 1.0) * a_n1 * t.powi(n as i32);
        let tail_gd = (3.0 * nf + 1.0) * b_n * t.powi(n as i32);
        for tail in [tail_f, tail_g, tail_fd, tail_gd] {
            assert!(tail < 1e-18, "tail {tail:e}");
        }
    }

    // The table path (one short Taylor step) agrees with the plain ray integration.
    #[test]
    fn node_path_matches_ray_integration() {
        let mut worst: f64 = 0.0;
        for i in 0..400 {
            let r = 1.0 + 8.49 * ((i as f64) * 0.618_033_988_75).fract();
            let theta = std::f64::consts::PI * ((i as f64) * 0.414_213_562_37).fract();
            let z = Complex64::from_polar(r, theta);
            let fast = from_nearest_node(z);
            let slow = airy_by_ray_integration(z);
            worst = worst.max(distance(z, fast, slow));
        }
        assert!(worst < 4e-15, "worst {worst:e}");
    }

    // The double-double ζ agrees with the plain product to rounding, and its low part
    // carries the error of the plain product (checked on a case with exact answer:
    // z = 16 gives ζ = (2/3)·64 exactly up to the split of 2/3).
    #[test]
    fn zeta_double_double_exact_case() {
        let (zeta, root) = zeta_double_double(Complex64::new(16.0, 0.0));
        assert_eq!(root, Complex64::new(4.0, 0.0));
        // 128/3 = hi + lo with hi the double nearest to 128/3 and 3(hi + lo) = 128 to
        // within double-double rounding.
        assert_eq!(zeta.hi.re, 128.0 / 3.0);
        let (p, e) = two_product(3.0, zeta.hi.re);
        assert!(((p - 128.0) + e + 3.0 * zeta.lo.re).abs() < 1e-28);
        assert_eq!(zeta.hi.im, 0.0);
    }

    #[test]
    fn exponential_overflows_to_signed_infinity() {
        let v = Exponential::new(Complex64::new(800.0, 2.0)).times(Complex64::new(1.0, 0.0));
        assert!(v.re == f64::NEG_INFINITY && v.im == f64::INFINITY);
        let v = Exponential::new(Complex64::new(705.0, 0.0)).times(Complex64::new(2.0, 0.0));
        assert!(v.re.is_finite() && v.im == 0.0);
        assert!((v.re / (2.0 * 705f64.exp()) - 1.0).abs() < 1e-14);
    }
}
