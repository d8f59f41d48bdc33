//! Atom-centred Cartesian Gaussian orbitals, their analytic Fourier transforms and their
//! plane-wave dipole matrix elements, all evaluated at complex momentum.
//!
//! # Conventions
//! Atomic units throughout; positions in bohr in the molecular frame, exponents in bohr⁻².
//! Plane waves are `⟨r|k⟩ = (2π)^{-3/2} e^{ik·r}`, so for a bound orbital `ψ`
//!
//! * transform: `ψ̃(k) = ⟨k|ψ⟩ = (2π)^{-3/2} ∫ e^{-ik·r} ψ(r) d³r`,
//! * length-form dipole: `d(k) = ⟨k|r|ψ⟩ = i ∇_k ψ̃(k)`,
//! * velocity-form dipole: `⟨k|p̂|ψ⟩ = k ψ̃(k)`.
//!
//! All three are entire functions of `k` for Gaussian orbitals. They are evaluated at complex
//! `k ∈ ℂ³` by analytic continuation: `k·A` and `k·k` are bilinear (no complex conjugation of
//! `k`). The recombination step needs the complex conjugate of these elements; for complex `k`
//! its analytic continuation is `d̄(k) ≡ [d(k*)]*`, provided by the `*_recombination` methods of
//! [`PlaneWaveProjection`] for any coefficients, real or complex.
//!
//! # Example
//! A bonding pair of s Gaussians 2 bohr apart (an H₂⁺-like model orbital), evaluated at a
//! complex momentum and in a rotated molecule:
//! ```
//! use holecast::orbital::{Orbital, OrbitalSpec, PlaneWaveProjection, Rotated};
//! use nalgebra::{Matrix3, Vector3};
//! use num_complex::Complex64;
//!
//! let spec: OrbitalSpec = serde_json::from_str(r#"{"name": "sigma_g", "terms": [
//!     {"centre_bohr": [0, 0,  1], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [1, 0]},
//!     {"centre_bohr": [0, 0, -1], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [1, 0]}
//! ]}"#)?;
//! let orbital = Orbital::from_spec(&spec)?;
//! let k = Vector3::new(Complex64::ZERO, Complex64::ZERO, Complex64::new(1.2, 0.3));
//! let d = orbital.dipole_length(&k);
//! let d_rec = orbital.dipole_length_recombination(&k);
//! assert!((d_rec - d.map(|c| c.conj())).norm() > 0.0); // complex k: not just conj(d(k))
//! // Velocity form vanishes at k R cos θ = π (Lein et al. 2002): here k = π/2 along the bond.
//! let k_min = Vector3::new(Complex64::ZERO, Complex64::ZERO, Complex64::new(std::f64::consts::FRAC_PI_2, 0.0));
//! assert!(orbital.dipole_velocity(&k_min).norm() < 1e-15);
//! // The same molecule turned by 90° about y (molecular → lab): its bond now lies along x.
//! let turn = Matrix3::new(0.0, 0.0, 1.0, 0.0, 1.0, 0.0, -1.0, 0.0, 0.0);
//! let lab = Rotated::new(&orbital, &turn)?;
//! let k_lab = Vector3::new(Complex64::new(std::f64::consts::FRAC_PI_2, 0.0), Complex64::ZERO, Complex64::ZERO);
//! assert!(lab.dipole_velocity(&k_lab).norm() < 1e-15);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! # Origin dependence
//! The length-form dipole depends on the origin of the molecular frame. Moving the origin by `a`
//! (every centre shifts by `−a`) gives `ψ̃'(k) = e^{ik·a} ψ̃(k)` and
//! `d'(k) = e^{ik·a} [d(k) − a ψ̃(k)]`: beyond the common phase, the length form gains
//! `−a ψ̃(k)`, because plane waves are not orthogonal to bound states; the velocity form only
//! takes the phase. Callers choose the origin (centre of mass or of nuclear charge, say) when
//! they give the centres; this module takes the centres as given.
//!
//! # Sources
//! Primitive normalisation and transforms: physics notes §5.2 (derived there and checked by
//! quadrature), Hermite polynomials in the physicists' convention of DLMF §18.3, three-term
//! recurrence DLMF Table 18.9.1. Overlaps: Gaussian product theorem (S. F. Boys, Proc. R. Soc.
//! A 200, 542 (1950), from memory) with the Obara–Saika recurrence (S. Obara and A. Saika,
//! J. Chem. Phys. 84, 3963 (1986), from memory). Two-centre interference: M. Lein et al.,
//! PRL 88, 183903 (2002); length/velocity form dependence: C. C. Chirilă and M. Lein,
//! PRA 73, 023410 (2006).

use std::f64::consts::PI;

use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// Largest total Cartesian power `a + b + c` accepted (s, p, d, f and g functions).
pub const MAX_ANGULAR_MOMENTUM: u32 = 4;

/// Length of the per-axis tables: powers `0..=MAX_ANGULAR_MOMENTUM + 1` (the `+1` is the shift
/// of the length-form dipole).
const TABLE_LEN: usize = MAX_ANGULAR_MOMENTUM as usize + 2;

/// `(2n − 1)!!` for `n = 0..=MAX_ANGULAR_MOMENTUM`, with `(−1)!! = 1`.
const ODD_DOUBLE_FACTORIAL: [f64; MAX_ANGULAR_MOMENTUM as usize + 1] = [1.0, 1.0, 3.0, 15.0, 105.0];

/// An orbital (or contraction) whose squared norm is below this fraction of
/// `Σ_μν |c_μ| |c_ν| |S_μν|` is rejected as non-normalisable: its norm is lost in rounding.
const NORM_CANCELLATION_LIMIT: f64 = 1e-12;

/// Largest accepted entry of `|RᵀR − 1|` for a rotation matrix.
pub const ORTHOGONALITY_TOLERANCE: f64 = 1e-9;

/// Errors from building or evaluating orbitals.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum OrbitalError {
    /// The orbital has no terms.
    #[error("orbital `{orbital}`: no terms given; an orbital needs at least one Gaussian term")]
    EmptyOrbital {
        /// Name of the orbital.
        orbital: String,
    },
    /// A parameter of a term, primitive or function is out of range.
    #[error("{item}: {parameter} = {value} is invalid: {reason}")]
    InvalidParameter {
        /// Which orbital and term (or which function) the parameter belongs to.
        item: String,
        /// Name of the parameter, as in the orbital description.
        parameter: String,
        /// The offending value, as text.
        value: String,
        /// Why it was rejected.
        reason: &'static str,
    },
    /// The squared norm of an orbital or of a contraction is not positive and finite.
    #[error("{item} is non-normalisable: <phi|phi> = {norm_squared:e} ({reason})")]
    NonNormalisable {
        /// Which orbital (or which contracted term).
        item: String,
        /// The squared norm that was found.
        norm_squared: f64,
        /// Why it was rejected.
        reason: &'static str,
    },
    /// A matrix given as a rotation is not orthogonal.
    #[error(
        "rotation matrix is not orthogonal: max |R^T R - 1| = {deviation:e} exceeds {tolerance:e}"
    )]
    NotOrthogonal {
        /// Largest entry of `|RᵀR − 1|` (NaN for a non-finite matrix).
        deviation: f64,
        /// The accepted limit, [`ORTHOGONALITY_TOLERANCE`].
        tolerance: f64,
    },
    /// The hydrogenic dipole was asked for at its pole `k·k = −2 Ip`.
    #[error(
        "hydrogenic dipole: k.k = {k_squared} equals -2 Ip = {minus_alpha}, a pole of the 1s dipole"
    )]
    HydrogenicPole {
        /// `k·k` (bilinear, complex).
        k_squared: Complex64,
        /// `−2 Ip`.
        minus_alpha: f64,
    },
}

fn invalid(item: &str, parameter: &str, value: String, reason: &'static str) -> OrbitalError {
    OrbitalError::InvalidParameter {
        item: item.to_owned(),
        parameter: parameter.to_owned(),
        value,
        reason,
    }
}

// ---------------------------------------------------------------------------------------------
// Plain descriptions (what a target file holds)
// ---------------------------------------------------------------------------------------------

/// The Cartesian part `(x−Aₓ)^a (y−A_y)^b (z−A_z)^c` of a term: either a shell label or the
/// powers `[a, b, c]`.
///
/// Labels are a shell letter (`s`, `p`, `d`, `f`, `g`) followed by as many axis letters as the
/// angular momentum, in any order: `"s"`, `"pz"`, `"dxy"`, `"dzz"`, `"fxyz"`, `"gxxyy"`.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum CartesianSpec {
    /// A label such as `"s"`, `"px"`, `"dxy"`.
    Label(String),
    /// Powers `[a, b, c]` of `x`, `y`, `z`.
    Powers([u32; 3]),
}

impl CartesianSpec {
    /// The powers `[a, b, c]`, validated (`a + b + c ≤ MAX_ANGULAR_MOMENTUM`, known label).
    pub fn powers(&self, item: &str) -> Result<[u32; 3], OrbitalError> {
        match self {
            CartesianSpec::Powers(p) => {
                check_powers(item, *p)?;
                Ok(*p)
            }
            CartesianSpec::Label(label) => parse_label(item, label),
        }
    }
}

fn check_powers(item: &str, p: [u32; 3]) -> Result<(), OrbitalError> {
    let total: u64 = p.iter().map(|&n| u64::from(n)).sum();
    if total > u64::from(MAX_ANGULAR_MOMENTUM) {
        return Err(invalid(
            item,
            "cartesian",
            format!("{p:?}"),
            "total power a+b+c exceeds 4 (g functions are the highest supported)",
        ));
    }
    Ok(())
}

fn parse_label(item: &str, label: &str) -> Result<[u32; 3], OrbitalError> {
    let bad = |reason| invalid(item, "cartesian", format!("\"{label}\""), reason);
    let mut chars = label.chars();
    let l = match chars.next() {
        Some('s') => 0,
        Some('p') => 1,
        Some('d') => 2,
        Some('f') => 3,
        Some('g') => 4,
        _ => return Err(bad("a label starts with one of s, p, d, f, g (lower case)")),
    };
    let mut powers = [0u32; 3];
    let mut count = 0u32;
    for c in chars {
        let axis = match c {
            'x' => 0,
            'y' => 1,
            'z' => 2,
            _ => {
                return Err(bad(
                    "after the shell letter only the axis letters x, y, z may follow",
                ));
            }
        };
        powers[axis] += 1;
        count += 1;
        if count > l {
            break;
        }
    }
    if count != l {
        return Err(bad(
            "the number of axis letters must equal the angular momentum (s: 0, p: 1, d: 2, ...)",
        ));
    }
    Ok(powers)
}

/// One term `c · g(r)` of a molecular orbital: a contracted Cartesian Gaussian `g` on one centre
/// times a complex coefficient `c`.
///
/// `g = 𝒩 Σ_p d_p χ_p` where the `χ_p` are normalised primitives (see [`Primitive`]) sharing the
/// centre and Cartesian powers, `d_p` the contraction coefficients and `𝒩` makes `g` normalised
/// (the usual convention of Gaussian basis sets: contraction coefficients refer to normalised
/// primitives, basis functions are normalised).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TermSpec {
    /// Centre `A` in bohr, molecular frame.
    pub centre_bohr: [f64; 3],
    /// Exponents `α_p` in bohr⁻² (positive, finite).
    pub exponents_inv_bohr2: Vec<f64>,
    /// Contraction coefficients `d_p`, one per exponent (non-zero, finite). May be left out
    /// (empty) when there is a single exponent; it then means `[1.0]`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub contraction: Vec<f64>,
    /// Cartesian powers or shell label.
    pub cartesian: CartesianSpec,
    /// Complex coefficient `c` as `[re, im]` (finite, not zero).
    pub coefficient: [f64; 2],
}

/// A molecular (or Dyson) orbital `φ = Σ_μ c_μ g_μ` described by its terms.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct OrbitalSpec {
    /// Name used in error messages.
    pub name: String,
    /// The terms; at least one.
    pub terms: Vec<TermSpec>,
}

// ---------------------------------------------------------------------------------------------
// Primitive Cartesian Gaussian
// ---------------------------------------------------------------------------------------------

/// A normalised primitive Cartesian Gaussian
/// `χ(r) = N (x−Aₓ)^a (y−A_y)^b (z−A_z)^c e^{−α|r−A|²}` with
/// `N = (2α/π)^{3/4} (4α)^{(a+b+c)/2} / √((2a−1)!!(2b−1)!!(2c−1)!!)` (physics notes §5.2),
/// `a + b + c ≤ MAX_ANGULAR_MOMENTUM`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Primitive {
    centre: Vector3<f64>,
    exponent: f64,
    powers: [u8; 3],
    normalisation: f64,
}

impl Primitive {
    /// A normalised primitive on `centre` (bohr) with exponent `exponent` (bohr⁻²) and Cartesian
    /// powers `[a, b, c]`. Errors name the bad parameter: non-finite centre, exponent not positive
    /// and finite, total power above [`MAX_ANGULAR_MOMENTUM`].
    pub fn new(
        centre: Vector3<f64>,
        exponent: f64,
        powers: [u32; 3],
    ) -> Result<Primitive, OrbitalError> {
        Primitive::checked("primitive", "exponent", centre, exponent, powers)
    }

    fn checked(
        item: &str,
        exponent_name: &str,
        centre: Vector3<f64>,
        exponent: f64,
        powers: [u32; 3],
    ) -> Result<Primitive, OrbitalError> {
        if !centre.iter().all(|c| c.is_finite()) {
            return Err(invalid(
                item,
                "centre_bohr",
                format!("{:?}", [centre.x, centre.y, centre.z]),
                "coordinates must be finite",
            ));
        }
        if !(exponent.is_finite() && exponent > 0.0) {
            return Err(invalid(
                item,
                exponent_name,
                format!("{exponent:e}"),
                "a Gaussian exponent must be positive and finite",
            ));
        }
        check_powers(item, powers)?;
        // Each power is ≤ 4 here, so the narrowing is exact.
        let p = powers.map(|n| n as u8);
        let l = f64::from(powers[0] + powers[1] + powers[2]);
        let double_factorials: f64 = p
            .iter()
            .map(|&n| ODD_DOUBLE_FACTORIAL[usize::from(n)])
            .product();
        let normalisation = (2.0 * exponent / PI).powf(0.75) * (4.0 * exponent).powf(0.5 * l)
            / double_factorials.sqrt();
        Ok(Primitive {
            centre,
            exponent,
            powers: p,
            normalisation,
        })
    }

    /// Centre `A` in bohr.
    pub fn centre(&self) -> Vector3<f64> {
        self.centre
    }

    /// Exponent `α` in bohr⁻².
    pub fn exponent(&self) -> f64 {
        self.exponent
    }

    /// Cartesian powers `[a, b, c]`.
    pub fn powers(&self) -> [u32; 3] {
        self.powers.map(u32::from)
    }

    /// Normalisation constant `N` (physics notes §5.2).
    pub fn normalisation(&self) -> f64 {
        self.normalisation
    }

    /// Overlap `⟨χ_self|χ_other⟩` of the two normalised primitives, exact for any two centres
    /// (Gaussian product theorem + Obara–Saika recurrence, see the module doc).
    pub fn overlap(&self, other: &Primitive) -> f64 {
        self.normalisation
            * other.normalisation
            * raw_overlap(
                self.exponent,
                &self.centre,
                self.powers,
                other.exponent,
                &other.centre,
                other.powers,
            )
    }

    fn shell(&self) -> (Shell, ShellTerm) {
        let member = ShellTerm {
            powers: self.powers,
            weight: Complex64::new(self.normalisation, 0.0),
        };
        (
            Shell::new(self.centre, self.exponent, self.powers, 0..1),
            member,
        )
    }
}

impl PlaneWaveProjection for Primitive {
    fn transform(&self, k: &Vector3<Complex64>) -> Complex64 {
        let (shell, member) = self.shell();
        shell.project::<false>(std::slice::from_ref(&member), k).0
    }

    fn dipole_length(&self, k: &Vector3<Complex64>) -> Vector3<Complex64> {
        let (shell, member) = self.shell();
        shell.project::<true>(std::slice::from_ref(&member), k).1
    }
}

/// `I_n(α, k) = ∫ x^n e^{−αx² − ikx} dx
///            = √(π/α) (−i)^n (2√α)^{−n} H_n(k/(2√α)) e^{−k²/4α}` (physics notes §5.2; `H_n`
/// physicists' Hermite polynomials, DLMF §18.3), for complex `k` by analytic continuation.
///
/// Evaluated with the recurrence `t_{n+1} = (−ik t_n + n t_{n−1})/(2α)` for
/// `t_n = (−i)^n (2√α)^{−n} H_n(k/(2√α))`, which is DLMF Table 18.9.1 rescaled.
/// `alpha` must be positive and finite.
pub fn hermite_gaussian_integral(
    n: u32,
    alpha: f64,
    k: Complex64,
) -> Result<Complex64, OrbitalError> {
    if !(alpha.is_finite() && alpha > 0.0) {
        return Err(invalid(
            "hermite_gaussian_integral",
            "alpha",
            format!("{alpha:e}"),
            "a Gaussian exponent must be positive and finite",
        ));
    }
    let inv_two_alpha = 0.5 / alpha;
    let step = Complex64::new(0.0, -inv_two_alpha) * k;
    let (mut previous, mut current) = (Complex64::ZERO, Complex64::ONE);
    for m in 0..n {
        let next = step * current + f64::from(m) * inv_two_alpha * previous;
        previous = current;
        current = next;
    }
    Ok((PI / alpha).sqrt() * (-k * k * (0.25 / alpha)).exp() * current)
}

/// `t_n = (−i)^n (2√α)^{−n} H_n(k/(2√α))` for `n = 0..len` (entries beyond stay zero).
#[inline(always)]
fn hermite_table(inv_two_alpha: f64, k: Complex64, len: usize) -> [Complex64; TABLE_LEN] {
    let mut t = [Complex64::ZERO; TABLE_LEN];
    t[0] = Complex64::ONE;
    let step = Complex64::new(k.im * inv_two_alpha, -k.re * inv_two_alpha); // −ik/(2α)
    if len > 1 {
        t[1] = step;
    }
    for n in 1..len.saturating_sub(1) {
        t[n + 1] = step * t[n] + (n as f64 * inv_two_alpha) * t[n - 1];
    }
    t
}

/// 1-D overlap table `s[i][j] = ∫ (x−a)^i (x−b)^j e^{−α(x−a)² − β(x−b)²} dx`
/// (Obara–Saika recurrence).
fn overlap_table_1d(alpha: f64, a: f64, beta: f64, b: f64) -> [[f64; 5]; 5] {
    let p = alpha + beta;
    let centre = (alpha * a + beta * b) / p;
    let (xpa, xpb) = (centre - a, centre - b);
    let half_inv_p = 0.5 / p;
    let mut s = [[0.0; 5]; 5];
    s[0][0] = (PI / p).sqrt() * (-alpha * beta / p * (a - b) * (a - b)).exp();
    for i in 0..4 {
        let lower = if i > 0 { i as f64 * s[i - 1][0] } else { 0.0 };
        s[i + 1][0] = xpa * s[i][0] + half_inv_p * lower;
    }
    for j in 0..4 {
        for i in 0..5 {
            let from_i = if i > 0 { i as f64 * s[i - 1][j] } else { 0.0 };
            let from_j = if j > 0 { j as f64 * s[i][j - 1] } else { 0.0 };
            s[i][j + 1] = xpb * s[i][j] + half_inv_p * (from_i + from_j);
        }
    }
    s
}

/// Overlap of two unnormalised primitives `(r−A)^p e^{−α|r−A|²}` and `(r−B)^q e^{−β|r−B|²}`.
fn raw_overlap(
    alpha: f64,
    a: &Vector3<f64>,
    pa: [u8; 3],
    beta: f64,
    b: &Vector3<f64>,
    pb: [u8; 3],
) -> f64 {
    (0..3)
        .map(|axis| {
            overlap_table_1d(alpha, a[axis], beta, b[axis])[usize::from(pa[axis])]
                [usize::from(pb[axis])]
        })
        .product()
}

// ---------------------------------------------------------------------------------------------
// Evaluation kernel: primitives grouped by (centre, exponent)
// ---------------------------------------------------------------------------------------------

/// Primitives sharing a centre and an exponent: they share the exponential factor and the
/// Hermite tables of one evaluation.
#[derive(Debug, Clone, PartialEq)]
struct Shell {
    centre: Vector3<f64>,
    exponent: f64,
    inv_two_alpha: f64,
    inv_four_alpha: f64,
    /// `(2π)^{-3/2} (π/α)^{3/2} = (2α)^{-3/2}`.
    prefactor: f64,
    /// Largest power of each axis among the members.
    max_power: [usize; 3],
    members: std::ops::Range<usize>,
}

/// One Cartesian component of a shell with its weight: the coefficient of the unnormalised
/// primitive `(r−A)^p e^{−α|r−A|²}` in the normalised orbital.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShellTerm {
    /// Cartesian powers `[a, b, c]` of `(x−Aₓ)^a (y−A_y)^b (z−A_z)^c`.
    pub powers: [u8; 3],
    /// Coefficient of the unnormalised primitive in the normalised orbital.
    pub weight: Complex64,
}

/// The primitives of an orbital that share one centre and one exponent (a view into
/// [`Orbital`]): `φ_shell(r) = Σ_t w_t (x−Aₓ)^a (y−A_y)^b (z−A_z)^c e^{−α|r−A|²}`.
#[derive(Debug, Clone, Copy)]
pub struct ShellView<'a> {
    /// Centre `A` (bohr, molecular frame).
    pub centre: Vector3<f64>,
    /// Exponent `α` (bohr⁻²).
    pub exponent: f64,
    /// The Cartesian terms with their weights.
    pub terms: &'a [ShellTerm],
}

impl Shell {
    fn new(
        centre: Vector3<f64>,
        exponent: f64,
        powers: [u8; 3],
        members: std::ops::Range<usize>,
    ) -> Shell {
        Shell {
            centre,
            exponent,
            inv_two_alpha: 0.5 / exponent,
            inv_four_alpha: 0.25 / exponent,
            prefactor: (0.5 / exponent).powf(1.5),
            max_power: powers.map(usize::from),
            members,
        }
    }

    /// `(Σ_m w_m χ̃_m(k), Σ_m w_m ⟨k|r|χ_m⟩)`; the dipole is computed only when `DIPOLE`.
    #[inline(always)]
    fn project<const DIPOLE: bool>(
        &self,
        members: &[ShellTerm],
        k: &Vector3<Complex64>,
    ) -> (Complex64, Vector3<Complex64>) {
        let extra = usize::from(DIPOLE);
        let inv2a = self.inv_two_alpha;
        let tx = hermite_table(inv2a, k.x, self.max_power[0] + 1 + extra);
        let ty = hermite_table(inv2a, k.y, self.max_power[1] + 1 + extra);
        let tz = hermite_table(inv2a, k.z, self.max_power[2] + 1 + extra);
        let mut sum = Complex64::ZERO;
        let mut shifted = [Complex64::ZERO; 3];
        for m in members {
            let [a, b, c] = m.powers.map(usize::from);
            let wx = m.weight * tx[a];
            let wxy = wx * ty[b];
            sum += wxy * tz[c];
            if DIPOLE {
                // ⟨k|(x−Aₓ)|χ_abc⟩ = χ̃_{a+1,b,c} with the same N (physics notes §5.2).
                shifted[0] += m.weight * tx[a + 1] * ty[b] * tz[c];
                shifted[1] += wx * ty[b + 1] * tz[c];
                shifted[2] += wxy * tz[c + 1];
            }
        }
        let c = &self.centre;
        let k_dot_a = k.x * c.x + k.y * c.y + k.z * c.z;
        let k_dot_k = k.x * k.x + k.y * k.y + k.z * k.z;
        let exponent = Complex64::new(k_dot_a.im, -k_dot_a.re) - k_dot_k * self.inv_four_alpha;
        let envelope = self.prefactor * exponent.exp();
        let transform = envelope * sum;
        if DIPOLE {
            // ⟨k|x|χ⟩ = ⟨k|(x−Aₓ)|χ⟩ + Aₓ χ̃: the second term is the origin dependence.
            let dipole = Vector3::new(
                envelope * shifted[0] + c.x * transform,
                envelope * shifted[1] + c.y * transform,
                envelope * shifted[2] + c.z * transform,
            );
            (transform, dipole)
        } else {
            (transform, Vector3::zeros())
        }
    }
}

// ---------------------------------------------------------------------------------------------
// Plane-wave projections (common interface)
// ---------------------------------------------------------------------------------------------

/// Plane-wave matrix elements of a bound orbital at complex momentum (conventions in the module
/// doc). Implementors give the transform and the length-form dipole; the velocity form and the
/// recombination continuations follow.
pub trait PlaneWaveProjection {
    /// `ψ̃(k) = ⟨k|ψ⟩`, analytically continued to complex `k`.
    fn transform(&self, k: &Vector3<Complex64>) -> Complex64;

    /// Length-form dipole `d(k) = ⟨k|r|ψ⟩ = i∇_k ψ̃(k)` (origin-dependent, see the module doc).
    fn dipole_length(&self, k: &Vector3<Complex64>) -> Vector3<Complex64>;

    /// Velocity-form dipole `⟨k|p̂|ψ⟩ = k ψ̃(k)` (origin-independent up to the phase of `ψ̃`).
    fn dipole_velocity(&self, k: &Vector3<Complex64>) -> Vector3<Complex64> {
        k * self.transform(k)
    }

    /// Recombination continuation of the transform, `[ψ̃(k*)]*` (equals `⟨ψ|k⟩` for real `k`).
    fn transform_recombination(&self, k: &Vector3<Complex64>) -> Complex64 {
        self.transform(&k.map(|c| c.conj())).conj()
    }

    /// Recombination continuation of the length form, `d̄(k) = [d(k*)]*` (equals `⟨ψ|r|k⟩` for
    /// real `k`; physics notes §0).
    fn dipole_length_recombination(&self, k: &Vector3<Complex64>) -> Vector3<Complex64> {
        self.dipole_length(&k.map(|c| c.conj())).map(|c| c.conj())
    }

    /// Recombination continuation of the velocity form, `[k* ψ̃(k*)]* = k [ψ̃(k*)]*`.
    fn dipole_velocity_recombination(&self, k: &Vector3<Complex64>) -> Vector3<Complex64> {
        k * self.transform_recombination(k)
    }
}

// ---------------------------------------------------------------------------------------------
// Orbital
// ---------------------------------------------------------------------------------------------

/// A normalised molecular orbital `φ = Σ_μ c_μ g_μ` of contracted Cartesian Gaussians on any
/// number of centres, with complex coefficients; built once from an [`OrbitalSpec`], then
/// evaluated without allocation through [`PlaneWaveProjection`].
///
/// Construction normalises every contracted term and then the whole orbital with the analytic
/// overlap matrix, and merges primitives that share centre, exponent and powers.
#[derive(Debug, Clone, PartialEq)]
pub struct Orbital {
    name: String,
    shells: Vec<Shell>,
    members: Vec<ShellTerm>,
    norm_before_normalisation: f64,
}

/// An unnormalised primitive with its weight, before grouping.
struct WeightedPrimitive {
    centre: Vector3<f64>,
    exponent: f64,
    powers: [u8; 3],
    weight: Complex64,
}

impl Orbital {
    /// Builds and normalises the orbital described by `spec`; see [`Orbital::new`].
    pub fn from_spec(spec: &OrbitalSpec) -> Result<Orbital, OrbitalError> {
        Orbital::new(&spec.name, &spec.terms)
    }

    /// Builds and normalises the orbital `name` from its terms.
    ///
    /// Rejected, with an error naming the orbital, the term (`terms[i]`) and the parameter: no
    /// terms; non-finite centre; empty exponent list; exponent not positive and finite;
    /// contraction of the wrong length; zero or non-finite contraction coefficient or
    /// coefficient; unknown label or total power above 4; a contraction or orbital whose squared
    /// norm is not positive and finite or is lost in cancellation (below `1e-12` of
    /// `Σ|c_μ||c_ν||S_μν|`).
    pub fn new(name: &str, terms: &[TermSpec]) -> Result<Orbital, OrbitalError> {
        if terms.is_empty() {
            return Err(OrbitalError::EmptyOrbital {
                orbital: name.to_owned(),
            });
        }
        let mut primitives = Vec::new();
        for (index, term) in terms.iter().enumerate() {
            let item = format!("orbital `{name}` terms[{index}]");
            push_term(&item, term, &mut primitives)?;
        }
        let (shells, mut members) = group_into_shells(&primitives);
        let norm_squared = checked_norm_squared(&format!("orbital `{name}`"), &shells, &members)?;
        let norm = norm_squared.sqrt();
        for m in &mut members {
            m.weight /= norm;
        }
        Ok(Orbital {
            name: name.to_owned(),
            shells,
            members,
            norm_before_normalisation: norm,
        })
    }

    /// Name of the orbital.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// `√⟨φ|φ⟩` of `Σ_μ c_μ g_μ` with the coefficients as given (each contracted `g_μ`
    /// normalised), before the orbital was normalised.
    pub fn norm_before_normalisation(&self) -> f64 {
        self.norm_before_normalisation
    }

    /// The shells of the orbital: primitives grouped by (centre, exponent), in order of first
    /// appearance in the description. `φ = Σ_shells φ_shell` exactly.
    pub fn shells(&self) -> impl Iterator<Item = ShellView<'_>> {
        self.shells.iter().map(|s| ShellView {
            centre: s.centre,
            exponent: s.exponent,
            terms: &self.members[s.members.clone()],
        })
    }

    /// Number of distinct primitives after merging equal ones.
    pub fn primitive_count(&self) -> usize {
        self.members.len()
    }

    /// Overlap `⟨self|other⟩` (analytic), e.g. to check that two channels' orbitals are
    /// orthogonal. `⟨φ|φ⟩ = 1` up to rounding.
    pub fn overlap(&self, other: &Orbital) -> Complex64 {
        let mut total = Complex64::ZERO;
        for sa in &self.shells {
            for sb in &other.shells {
                let ta = overlap_tables(sa, sb);
                for ma in &self.members[sa.members.clone()] {
                    for mb in &other.members[sb.members.clone()] {
                        total +=
                            ma.weight.conj() * mb.weight * table_entry(&ta, ma.powers, mb.powers);
                    }
                }
            }
        }
        total
    }

    #[inline(always)]
    fn project<const DIPOLE: bool>(
        &self,
        k: &Vector3<Complex64>,
    ) -> (Complex64, Vector3<Complex64>) {
        let mut transform = Complex64::ZERO;
        let mut dipole = Vector3::zeros();
        for shell in &self.shells {
            let members = self.members.get(shell.members.clone()).unwrap_or(&[]);
            let (t, d) = shell.project::<DIPOLE>(members, k);
            transform += t;
            if DIPOLE {
                dipole += d;
            }
        }
        (transform, dipole)
    }
}

impl PlaneWaveProjection for Orbital {
    fn transform(&self, k: &Vector3<Complex64>) -> Complex64 {
        self.project::<false>(k).0
    }

    fn dipole_length(&self, k: &Vector3<Complex64>) -> Vector3<Complex64> {
        self.project::<true>(k).1
    }
}

/// Validates one term and appends its normalised contraction to `out`.
fn push_term(
    item: &str,
    term: &TermSpec,
    out: &mut Vec<WeightedPrimitive>,
) -> Result<(), OrbitalError> {
    let powers = term.cartesian.powers(item)?;
    let centre = Vector3::from(term.centre_bohr);
    let [re, im] = term.coefficient;
    if !(re.is_finite() && im.is_finite()) || (re == 0.0 && im == 0.0) {
        return Err(invalid(
            item,
            "coefficient",
            format!("[{re:e}, {im:e}]"),
            "an orbital coefficient must be finite and not zero (leave a zero term out)",
        ));
    }
    let exponents = &term.exponents_inv_bohr2;
    if exponents.is_empty() {
        return Err(invalid(
            item,
            "exponents_inv_bohr2",
            "[]".to_owned(),
            "at least one exponent is needed",
        ));
    }
    let contraction: &[f64] = if term.contraction.is_empty() && exponents.len() == 1 {
        &[1.0]
    } else {
        &term.contraction
    };
    if contraction.len() != exponents.len() {
        return Err(invalid(
            item,
            "contraction",
            format!("{:?}", term.contraction),
            "give one contraction coefficient per exponent (it may be left out for a single exponent)",
        ));
    }
    let mut contracted = Vec::with_capacity(exponents.len());
    for (p, (&alpha, &d)) in exponents.iter().zip(contraction).enumerate() {
        let primitive = Primitive::checked(
            item,
            &format!("exponents_inv_bohr2[{p}]"),
            centre,
            alpha,
            powers,
        )?;
        if !d.is_finite() || d == 0.0 {
            return Err(invalid(
                item,
                &format!("contraction[{p}]"),
                format!("{d:e}"),
                "a contraction coefficient must be finite and not zero",
            ));
        }
        contracted.push((primitive, d * primitive.normalisation));
    }
    let mut norm_squared = 0.0;
    let mut scale = 0.0;
    for (pa, da) in &contracted {
        for (pb, db) in &contracted {
            let s = da
                * db
                * raw_overlap(
                    pa.exponent,
                    &centre,
                    pa.powers,
                    pb.exponent,
                    &centre,
                    pb.powers,
                );
            norm_squared += s;
            scale += s.abs();
        }
    }
    check_norm_squared(&format!("{item} (contraction)"), norm_squared, scale)?;
    let factor = Complex64::new(re, im) / norm_squared.sqrt();
    out.extend(contracted.iter().map(|(p, d)| WeightedPrimitive {
        centre,
        exponent: p.exponent,
        powers: p.powers,
        weight: factor * *d,
    }));
    Ok(())
}

fn check_norm_squared(item: &str, norm_squared: f64, scale: f64) -> Result<(), OrbitalError> {
    let reason = if !norm_squared.is_finite() {
        "the squared norm is not finite"
    } else if norm_squared <= 0.0 {
        "the squared norm is not positive"
    } else if norm_squared <= NORM_CANCELLATION_LIMIT * scale {
        "the terms cancel: the norm is lost in rounding"
    } else {
        return Ok(());
    };
    Err(OrbitalError::NonNormalisable {
        item: item.to_owned(),
        norm_squared,
        reason,
    })
}

/// Groups primitives by exact (centre, exponent), in order of first appearance, merging equal
/// powers and dropping members whose merged weight is exactly zero.
fn group_into_shells(primitives: &[WeightedPrimitive]) -> (Vec<Shell>, Vec<ShellTerm>) {
    let mut groups: Vec<(Vector3<f64>, f64, Vec<ShellTerm>)> = Vec::new();
    for p in primitives {
        let position = groups
            .iter()
            .position(|(c, a, _)| c == &p.centre && a.to_bits() == p.exponent.to_bits());
        let index = match position {
            Some(i) => i,
            None => {
                groups.push((p.centre, p.exponent, Vec::new()));
                groups.len() - 1
            }
        };
        let members = &mut groups[index].2;
        match members.iter_mut().find(|m| m.powers == p.powers) {
            Some(m) => m.weight += p.weight,
            None => members.push(ShellTerm {
                powers: p.powers,
                weight: p.weight,
            }),
        }
    }
    let mut shells = Vec::with_capacity(groups.len());
    let mut all_members = Vec::new();
    for (centre, exponent, members) in groups {
        let start = all_members.len();
        all_members.extend(members.into_iter().filter(|m| m.weight != Complex64::ZERO));
        let end = all_members.len();
        if end == start {
            continue;
        }
        let mut shell = Shell::new(centre, exponent, [0; 3], start..end);
        for m in &all_members[start..end] {
            for axis in 0..3 {
                shell.max_power[axis] = shell.max_power[axis].max(usize::from(m.powers[axis]));
            }
        }
        shells.push(shell);
    }
    (shells, all_members)
}

fn overlap_tables(a: &Shell, b: &Shell) -> [[[f64; 5]; 5]; 3] {
    [0, 1, 2].map(|axis| overlap_table_1d(a.exponent, a.centre[axis], b.exponent, b.centre[axis]))
}

fn table_entry(tables: &[[[f64; 5]; 5]; 3], pa: [u8; 3], pb: [u8; 3]) -> f64 {
    (0..3)
        .map(|axis| tables[axis][usize::from(pa[axis])][usize::from(pb[axis])])
        .product()
}

fn checked_norm_squared(
    item: &str,
    shells: &[Shell],
    members: &[ShellTerm],
) -> Result<f64, OrbitalError> {
    let mut norm_squared = 0.0;
    let mut scale = 0.0;
    for sa in shells {
        for sb in shells {
            let tables = overlap_tables(sa, sb);
            for ma in &members[sa.members.clone()] {
                for mb in &members[sb.members.clone()] {
                    let s = table_entry(&tables, ma.powers, mb.powers);
                    // The overlap matrix is real symmetric, so the imaginary parts cancel.
                    norm_squared += (ma.weight.conj() * mb.weight).re * s;
                    scale += ma.weight.norm() * mb.weight.norm() * s.abs();
                }
            }
        }
    }
    check_norm_squared(item, norm_squared, scale)?;
    Ok(norm_squared)
}

// ---------------------------------------------------------------------------------------------
// Rotation
// ---------------------------------------------------------------------------------------------

/// A plane-wave projection of a rotated molecule: `to_lab` (3×3 orthogonal, molecular → lab)
/// maps molecular-frame vectors to the lab frame, so `ψ_lab(r) = ψ_mol(Rᵀr)`,
/// `ψ̃_lab(k) = ψ̃_mol(Rᵀk)` and `d_lab(k) = R d_mol(Rᵀk)` for a lab-frame `k`. Nothing is rebuilt.
/// Proper and improper (det −1) orthogonal matrices are accepted.
#[derive(Debug)]
pub struct Rotated<'a, T: PlaneWaveProjection> {
    inner: &'a T,
    to_lab: Matrix3<f64>,
}

// A view holds a reference and a matrix, so it is `Copy` whatever `T` is.
impl<T: PlaneWaveProjection> Clone for Rotated<'_, T> {
    fn clone(&self) -> Self {
        *self
    }
}

impl<T: PlaneWaveProjection> Copy for Rotated<'_, T> {}

impl<'a, T: PlaneWaveProjection> Rotated<'a, T> {
    /// `inner` rotated by `to_lab`; fails if `|RᵀR − 1|` exceeds [`ORTHOGONALITY_TOLERANCE`] in
    /// any entry or `to_lab` is not finite.
    pub fn new(inner: &'a T, to_lab: &Matrix3<f64>) -> Result<Rotated<'a, T>, OrbitalError> {
        let deviation = if to_lab.iter().all(|x| x.is_finite()) {
            (to_lab.transpose() * to_lab - Matrix3::identity()).amax()
        } else {
            f64::NAN
        };
        if deviation.is_nan() || deviation > ORTHOGONALITY_TOLERANCE {
            return Err(OrbitalError::NotOrthogonal {
                deviation,
                tolerance: ORTHOGONALITY_TOLERANCE,
            });
        }
        Ok(Rotated {
            inner,
            to_lab: *to_lab,
        })
    }

    /// The rotation matrix (molecular → lab).
    pub fn to_lab(&self) -> &Matrix3<f64> {
        &self.to_lab
    }
}

/// `m v` for a real matrix and a complex vector.
#[inline(always)]
fn real_times_complex(m: &Matrix3<f64>, v: &Vector3<Complex64>) -> Vector3<Complex64> {
    Vector3::from_fn(|i, _| m[(i, 0)] * v.x + m[(i, 1)] * v.y + m[(i, 2)] * v.z)
}

/// `mᵀ v` for a real matrix and a complex vector.
#[inline(always)]
fn real_transpose_times_complex(m: &Matrix3<f64>, v: &Vector3<Complex64>) -> Vector3<Complex64> {
    Vector3::from_fn(|i, _| m[(0, i)] * v.x + m[(1, i)] * v.y + m[(2, i)] * v.z)
}

impl<T: PlaneWaveProjection> PlaneWaveProjection for Rotated<'_, T> {
    fn transform(&self, k: &Vector3<Complex64>) -> Complex64 {
        self.inner
            .transform(&real_transpose_times_complex(&self.to_lab, k))
    }

    fn dipole_length(&self, k: &Vector3<Complex64>) -> Vector3<Complex64> {
        let k_mol = real_transpose_times_complex(&self.to_lab, k);
        real_times_complex(&self.to_lab, &self.inner.dipole_length(&k_mol))
    }
}

// ---------------------------------------------------------------------------------------------
// Closed-form model dipoles (physics notes §1.7)
// ---------------------------------------------------------------------------------------------

/// Plane-wave dipole of a hydrogen-like 1s state with ionization potential `ip` (hartree):
/// `⟨k|r|1s⟩ = −i 2^{7/2} α^{5/4}/π · k/(k·k + α)³`, `α = κ² = 2 Ip`, for
/// `ψ = (κ³/π)^{1/2} e^{−κr}` (physics notes §1.7, derived there in the §0 convention; the form
/// of M. Lewenstein et al., PRA 49, 2117 (1994), up to the sign of `i`). Complex `k` by analytic
/// continuation; pole at `k·k = −2 Ip` (the tunnelling saddle), reported as an error.
pub fn hydrogenic_dipole(
    k: &Vector3<Complex64>,
    ip: f64,
) -> Result<Vector3<Complex64>, OrbitalError> {
    if !(ip.is_finite() && ip > 0.0) {
        return Err(invalid(
            "hydrogenic_dipole",
            "ip",
            format!("{ip:e}"),
            "the ionization potential must be positive and finite (hartree)",
        ));
    }
    let alpha = 2.0 * ip;
    let k_squared = k.x * k.x + k.y * k.y + k.z * k.z;
    let denominator = (k_squared + alpha).powi(3);
    if denominator == Complex64::ZERO {
        return Err(OrbitalError::HydrogenicPole {
            k_squared,
            minus_alpha: -alpha,
        });
    }
    // 2^{7/2} α^{5/4} / π with α^{5/4} = α √√α (cheaper than powf in this hot path).
    let magnitude = 8.0 * std::f64::consts::SQRT_2 * alpha * alpha.sqrt().sqrt() / PI;
    let scale = Complex64::new(0.0, -magnitude) / denominator;
    Ok(k * scale)
}

/// Plane-wave dipole of the normalised s Gaussian `ψ = (2a/π)^{3/4} e^{−ar²}` at the origin:
/// `⟨k|r|ψ⟩ = −i k/(2a) (2πa)^{−3/4} e^{−k·k/4a}` (physics notes §1.7). Entire in `k`.
/// `a` (bohr⁻²) must be positive and finite.
pub fn gaussian_s_dipole(
    k: &Vector3<Complex64>,
    a: f64,
) -> Result<Vector3<Complex64>, OrbitalError> {
    if !(a.is_finite() && a > 0.0) {
        return Err(invalid(
            "gaussian_s_dipole",
            "a",
            format!("{a:e}"),
            "a Gaussian exponent must be positive and finite",
        ));
    }
    let k_squared = k.x * k.x + k.y * k.y + k.z * k.z;
    let scale = Complex64::new(0.0, -0.5 / a)
        * (2.0 * PI * a).powf(-0.75)
        * (-k_squared * (0.25 / a)).exp();
    Ok(k * scale)
}
