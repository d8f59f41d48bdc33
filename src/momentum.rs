//! The drift-momentum integral of the strong-field harmonic amplitude, exact for Gaussian-type
//! structure.
//!
//! # The integral
//! For ionization at `t_i` and recombination at `t_r = t_i + τ` the length-gauge dipole
//! (M. Lewenstein et al., PRA 49, 2117 (1994); physics notes §1.1, §1.4) contains the integral
//! over the drift momentum
//!
//! ```text
//! J = ∫ d³p  d̄_m(p + A_r) [E_i · d_n(p + A_i)] e^{−iS(p)},     S(p) = S(p_s) + ½ τ (p − p_s)²,
//! ```
//!
//! where the action is exactly quadratic in `p` around the stationary momentum `p_s`. With
//! `q = p − p_s`, `v_i = p_s + A_i`, `v_r = p_s + A_r` and `ρ = ε + iτ` (ε the regulator),
//! `J = e^{−iS(p_s)} ∫ d³q  d̄_m(q + v_r) [E_i·d_n(q + v_i)] e^{−ρ q²/2}`. The common shortcut
//! evaluates both structure factors at `q = 0`, which gives the spreading factor
//! `(2π/ρ)^{3/2}` times the factors at `p_s` ([`stationary_integral`]).
//!
//! For Gaussian-type orbitals (Cartesian Gaussians, [`crate::orbital`]) the factors are, shell
//! by shell (centre `C`, exponent `α`),
//!
//! ```text
//! d_n(k) = (2α)^{−3/2} e^{−ik·C − k²/4α} P(k),      d̄_m(k) = (2β)^{−3/2} e^{+ik·C′ − k²/4β} P̄(k),
//! ```
//!
//! with `P`, `P̄` polynomials (products over the three axes of the scaled Hermite polynomials
//! `t_n(k) = (−i)^n (2√α)^{−n} H_n(k/2√α)`, physics notes §5.2, and their recombination
//! continuations `t̄_n(k) = [t_n(k*)]*`). The exponent of the integrand is then a complex
//! quadratic form in `q`,
//!
//! ```text
//! −λ q² − B·q + c₀,    λ = ρ/2 + 1/4α + 1/4β,
//! B = v_i/2α + v_r/2β + i(C − C′),     c₀ = −i v_i·C − v_i²/4α + i v_r·C′ − v_r²/4β,
//! ```
//!
//! and the integral is a Gaussian moment, exactly:
//!
//! ```text
//! ∫ d³q e^{−λq² − B·q} f(q) = (π/λ)^{3/2} e^{B·B/4λ} E[f(μ + σZ)],   μ = −B/2λ,  σ² = 1/2λ,
//! ```
//!
//! `Z` a standard normal 3-vector (textbook Gaussian integral, valid for `Re λ > 0`; principal
//! branch of `λ^{3/2}`, the same branch as the spreading factor when the shells are absent). The
//! covariance is a multiple of the identity, so the moment factorises over the Cartesian axes
//! of any frame; the molecular frame is used, where the polynomials are products over axes. Each
//! one-dimensional moment of the product of two polynomials (degree ≤ 5 each, since the
//! largest angular momentum is 4 and the dipole adds one) is evaluated exactly by the 6-point
//! Gauss–Hermite rule with complex shift and scale ([`crate::special::gauss_hermite`]).
//!
//! Limits (tested): for exponents → ∞ and centres → 0 the result tends to the shortcut; for a
//! constant structure it equals the shortcut exactly; against a brute-force 3-D quadrature of the
//! same integral (SciPy, `scripts/momentum_integral_reference.py`).
//!
//! # Sides that are not Gaussian
//! A side without a Gaussian form (the hydrogenic, tabulated or `photon`-momentum recombination
//! models) is evaluated at the mean `q = μ` of the Gaussian measure formed by the other side and
//! the action (zeroth order in the variance `σ² = 1/2λ`); with both sides opaque this is the
//! shortcut at `q = 0`. A constant side is exact in either form.

// Index loops over Cartesian axes and quadrature nodes mirror the formulas.
#![allow(clippy::needless_range_loop)]

use std::sync::OnceLock;

use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

use crate::field::{CVec3, bdot};
use crate::ionization::IonizationModel;
use crate::orbital::{Orbital, ShellTerm};
use crate::recombination::{DipoleForm, RecombinationModel, ReturnMomentum};

/// Nodes of the Gauss–Hermite rule: exact for the products of two polynomials of degree ≤ 5.
const RULE_NODES: usize = 6;

/// Largest polynomial degree per axis plus one (powers up to 4, the dipole adds 1, tables
/// hold `t_0 … t_5`).
const TABLE_LEN: usize = 6;

/// `(√2 x_i, w_i/√π)`: `E[p(m + σZ)] = Σ_i W_i p(m + σ X_i)`.
fn rule() -> &'static ([f64; RULE_NODES], [f64; RULE_NODES]) {
    static RULE: OnceLock<([f64; RULE_NODES], [f64; RULE_NODES])> = OnceLock::new();
    RULE.get_or_init(|| {
        let (x, w) = crate::special::gauss_hermite::gauss_hermite(RULE_NODES);
        let mut nodes = [0.0; RULE_NODES];
        let mut weights = [0.0; RULE_NODES];
        for i in 0..RULE_NODES {
            nodes[i] = std::f64::consts::SQRT_2 * x[i];
            weights[i] = w[i] / std::f64::consts::PI.sqrt();
        }
        (nodes, weights)
    })
}

/// How a side's polynomial is formed from its shells.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Form {
    /// `d(k) = ⟨k|r|ψ⟩` (ionization, length form).
    IonizationLength,
    /// `d̄(k) = [d(k*)]*` (recombination, length form).
    RecombinationLength,
    /// `[k* ψ̃(k*)]* = k [ψ̃(k*)]*` (recombination, velocity form).
    RecombinationVelocity,
}

impl Form {
    fn is_recombination(self) -> bool {
        !matches!(self, Form::IonizationLength)
    }
}

/// One shell (common centre and exponent) of a Gaussian-type side.
#[derive(Clone, Debug, PartialEq)]
pub struct GaussianShell {
    /// Centre (bohr, molecular frame).
    pub centre: Vector3<f64>,
    /// Exponent α (bohr⁻²).
    pub exponent: f64,
    /// `(2π)^{−3/2} (π/α)^{3/2} = (2α)^{−3/2}`.
    prefactor: f64,
    /// Terms; for recombination forms the weights are already conjugated.
    terms: Vec<ShellTerm>,
    /// Largest power per axis among the terms.
    max_power: [usize; 3],
}

impl GaussianShell {
    fn new(centre: Vector3<f64>, exponent: f64, terms: &[ShellTerm], conjugate: bool) -> Self {
        let mut max_power = [0usize; 3];
        for t in terms {
            for (m, &p) in max_power.iter_mut().zip(&t.powers) {
                *m = (*m).max(usize::from(p));
            }
        }
        GaussianShell {
            centre,
            exponent,
            prefactor: (0.5 / exponent).powf(1.5),
            terms: terms
                .iter()
                .map(|t| ShellTerm {
                    powers: t.powers,
                    weight: if conjugate { t.weight.conj() } else { t.weight },
                })
                .collect(),
            max_power,
        }
    }
}

/// A structure factor written as a sum of Gaussian shells (see the module documentation).
#[derive(Clone, Debug, PartialEq)]
pub struct GaussianSide {
    /// How the polynomial is formed.
    pub form: Form,
    /// The shells.
    pub shells: Vec<GaussianShell>,
}

impl GaussianSide {
    fn from_orbital(orbital: &Orbital, form: Form) -> Self {
        let conjugate = form.is_recombination();
        GaussianSide {
            form,
            shells: orbital
                .shells()
                .map(|s| GaussianShell::new(s.centre, s.exponent, s.terms, conjugate))
                .collect(),
        }
    }

    fn s_gaussian(exponent: f64, form: Form) -> Self {
        // Normalised s-Gaussian (2a/π)^{3/4} e^{−ar²} at the origin.
        let weight = Complex64::new((2.0 * exponent / std::f64::consts::PI).powf(0.75), 0.0);
        let term = ShellTerm {
            powers: [0, 0, 0],
            weight,
        };
        GaussianSide {
            form,
            shells: vec![GaussianShell::new(
                Vector3::zeros(),
                exponent,
                &[term],
                form.is_recombination(),
            )],
        }
    }

    /// A side made of unnormalised primitives `w (x−Cₓ)^a (y−C_y)^b (z−C_z)^c e^{−α|r−C|²}`
    /// given as `(centre, exponent, [a, b, c], w)` (each its own shell; the weights are those of
    /// `ψ` itself, conjugated here for the recombination forms). Powers above 4 are clamped
    /// out: such terms are dropped (the orbital module never produces them).
    pub fn from_primitives(
        form: Form,
        primitives: &[(Vector3<f64>, f64, [u8; 3], Complex64)],
    ) -> Self {
        GaussianSide {
            form,
            shells: primitives
                .iter()
                .filter(|p| p.2.iter().map(|&x| u32::from(x)).sum::<u32>() <= 4 && p.1 > 0.0)
                .map(|&(centre, exponent, powers, weight)| {
                    GaussianShell::new(
                        centre,
                        exponent,
                        &[ShellTerm { powers, weight }],
                        form.is_recombination(),
                    )
                })
                .collect(),
        }
    }

    /// The Gaussian form of an ionization model (`gaussian`, `orbital`), if it has one.
    pub fn ionization(model: &IonizationModel) -> Option<Self> {
        match model {
            IonizationModel::Gaussian { exponent } => {
                Some(Self::s_gaussian(*exponent, Form::IonizationLength))
            }
            IonizationModel::Orbital { orbital } => {
                Some(Self::from_orbital(orbital, Form::IonizationLength))
            }
            _ => None,
        }
    }

    /// The Gaussian form of a recombination model (`gaussian`; `lcao` at the saddle's return
    /// momentum, length or velocity form), if it has one. The `photon` return momentum rescales
    /// `k` by a non-analytic factor and has none.
    pub fn recombination(model: &RecombinationModel) -> Option<Self> {
        match model {
            RecombinationModel::Gaussian { exponent } => {
                Some(Self::s_gaussian(*exponent, Form::RecombinationLength))
            }
            RecombinationModel::Lcao {
                orbital,
                form,
                momentum: ReturnMomentum::Saddle,
            } => Some(Self::from_orbital(
                orbital,
                match form {
                    DipoleForm::Length => Form::RecombinationLength,
                    DipoleForm::Velocity => Form::RecombinationVelocity,
                },
            )),
            _ => None,
        }
    }

    /// The side's plain value at momentum `k` (molecular frame): the dipole vector `d(k)` or
    /// `d̄(k)` (depending on the form). Equals the models' own evaluation (tested).
    pub fn value(&self, k: &CVec3) -> CVec3 {
        let mut out = CVec3::zeros();
        let rec = self.form.is_recombination();
        for s in &self.shells {
            let t: [[Complex64; TABLE_LEN]; 3] =
                std::array::from_fn(|a| hermite(s.exponent, rec, k[a], s.max_power[a] + 2));
            let kc = bdot(k, &s.centre.map(|x| Complex64::new(x, 0.0)));
            let phase = if rec {
                Complex64::new(-kc.im, kc.re)
            } else {
                Complex64::new(kc.im, -kc.re)
            };
            let envelope = s.prefactor * (phase - bdot(k, k) * (0.25 / s.exponent)).exp();
            for term in &s.terms {
                let n = term.powers.map(usize::from);
                for c in 0..3 {
                    let mut prod = term.weight;
                    for a in 0..3 {
                        prod *= if a == c {
                            dipole_factor(self.form, &t[a], n[a], s.centre[a], k[a])
                        } else {
                            t[a][n[a]]
                        };
                    }
                    out[c] += envelope * prod;
                }
            }
        }
        out
    }
}

/// `t_n(z)` (ionization) or `t̄_n(z)` (recombination) for `n < len` (≤ [`TABLE_LEN`]):
/// `t_{n+1} = (∓iz t_n + n t_{n−1})/(2α)` (physics notes §5.2 rescaled; `−` for `t`, `+` for
/// `t̄`).
#[inline(always)]
fn hermite(alpha: f64, conjugate: bool, z: Complex64, len: usize) -> [Complex64; TABLE_LEN] {
    let inv = 0.5 / alpha;
    let mut t = [Complex64::new(0.0, 0.0); TABLE_LEN];
    t[0] = Complex64::new(1.0, 0.0);
    let step = if conjugate {
        Complex64::new(-z.im * inv, z.re * inv)
    } else {
        Complex64::new(z.im * inv, -z.re * inv)
    };
    let len = len.min(TABLE_LEN);
    if len > 1 {
        t[1] = step;
    }
    for n in 1..len.saturating_sub(1) {
        t[n + 1] = step * t[n] + (n as f64 * inv) * t[n - 1];
    }
    t
}

/// The one-axis factor of a dipole component along that axis: `t_{n+1} + C t_n` (length
/// forms: `⟨k|x|χ⟩ = χ̃_{n+1} + Aₓ χ̃_n`, physics notes §5.2) or `k t̄_n` (velocity form).
#[inline(always)]
fn dipole_factor(
    form: Form,
    t: &[Complex64; TABLE_LEN],
    n: usize,
    centre: f64,
    k: Complex64,
) -> Complex64 {
    match form {
        Form::RecombinationVelocity => k * t[n],
        _ => t[n + 1] + centre * t[n],
    }
}

/// The ionization side of the integral.
#[derive(Clone, Copy, Debug)]
pub enum IonSide<'a> {
    /// Gaussian-type: `E_i·d_n(k)` with the shells.
    Gaussian(&'a GaussianSide),
    /// A constant amplitude.
    Constant(Complex64),
}

/// The recombination side of the integral.
#[derive(Clone, Copy)]
pub enum RecSide<'a> {
    /// Gaussian-type: `d̄_m(k)` with the shells.
    Gaussian(&'a GaussianSide),
    /// Any other model, evaluated at the mean momentum of the Gaussian measure: the model and
    /// the photon energy it needs.
    Model(&'a RecombinationModel, f64),
}

/// The Gaussian measure of one shell pair: `λ`, the mean `μ` of `q`, the scale `σ` of the
/// rule's nodes, the exponent `c₀ + B·B/4λ` and the spreading `(π/λ)^{3/2}`.
#[derive(Clone, Copy, Debug)]
pub struct Measure {
    /// `λ = ρ/2 + 1/4α + 1/4β`.
    pub lambda: Complex64,
    /// `μ = −B/2λ`.
    pub mean: CVec3,
    /// `σ = (2λ)^{−1/2}` (either sign: the rule is symmetric).
    pub sigma: Complex64,
    /// `c₀ + B·B/4λ`.
    pub exponent: Complex64,
    /// `(π/λ)^{3/2}` on the principal branch.
    pub spreading: Complex64,
}

impl Measure {
    /// The measure for the ionization shell `(1/4α, C)` and recombination shell `(1/4β, C′)`
    /// (zeros for a side without a Gaussian), at momenta `v_i`, `v_r` and `ρ = ε + iτ`.
    #[allow(clippy::too_many_arguments)]
    pub fn new(
        ion_quarter: f64,
        ion_centre: &Vector3<f64>,
        rec_quarter: f64,
        rec_centre: &Vector3<f64>,
        v_ion: &CVec3,
        v_ret: &CVec3,
        rho: Complex64,
    ) -> Measure {
        let lambda = 0.5 * rho + ion_quarter + rec_quarter;
        let dc = (ion_centre - rec_centre).map(|x| Complex64::new(0.0, x));
        let b = v_ion * Complex64::new(2.0 * ion_quarter, 0.0)
            + v_ret * Complex64::new(2.0 * rec_quarter, 0.0)
            + dc;
        let ci = ion_centre.map(|x| Complex64::new(x, 0.0));
        let cr = rec_centre.map(|x| Complex64::new(x, 0.0));
        let i = Complex64::i();
        let c0 = -i * bdot(v_ion, &ci) - ion_quarter * bdot(v_ion, v_ion) + i * bdot(v_ret, &cr)
            - rec_quarter * bdot(v_ret, v_ret);
        let inv_lambda = 1.0 / lambda;
        let w = std::f64::consts::PI * inv_lambda;
        Measure {
            lambda,
            mean: -b * (0.5 * inv_lambda),
            sigma: (0.5 * inv_lambda).sqrt(),
            exponent: c0 + 0.25 * bdot(&b, &b) * inv_lambda,
            spreading: w * w.sqrt(),
        }
    }
}

/// Per-axis tables of one side at the rule's nodes.
struct AxisTables {
    t: [[[Complex64; TABLE_LEN]; RULE_NODES]; 3],
    k: [[Complex64; RULE_NODES]; 3],
}

fn tables(
    shell: &GaussianShell,
    rec: bool,
    centre_of_mass: &CVec3,
    sigma: Complex64,
) -> AxisTables {
    let (x, _) = rule();
    let mut out = AxisTables {
        t: [[[Complex64::new(0.0, 0.0); TABLE_LEN]; RULE_NODES]; 3],
        k: [[Complex64::new(0.0, 0.0); RULE_NODES]; 3],
    };
    for a in 0..3 {
        for (node, &xi) in x.iter().enumerate() {
            let z = centre_of_mass[a] + sigma * xi;
            out.k[a][node] = z;
            out.t[a][node] = hermite(shell.exponent, rec, z, shell.max_power[a] + 2);
        }
    }
    out
}

/// `E[poly_rec(v_r + μ + q) (e·poly_ion(v_i + μ + q))]` over `q = σZ` for one shell pair, with
/// the shells' prefactors and weights (vector over the recombination component).
fn pair_moment(
    ion: &GaussianShell,
    rec: &GaussianShell,
    rec_form: Form,
    measure: &Measure,
    v_ion: &CVec3,
    v_ret: &CVec3,
    e_ion: &CVec3,
) -> CVec3 {
    let (_, w) = rule();
    let ti = tables(ion, false, &(v_ion + measure.mean), measure.sigma);
    let tr = tables(rec, true, &(v_ret + measure.mean), measure.sigma);
    let mut out = CVec3::zeros();
    for a_term in &rec.terms {
        let nr = a_term.powers.map(usize::from);
        for b_term in &ion.terms {
            let ni = b_term.powers.map(usize::from);
            // e[a][r][i]: moment along axis a with the recombination factor plain (r = 0) or
            // dipole (r = 1) and the ionization factor plain (i = 0) or dipole (i = 1).
            let mut e = [[[Complex64::new(0.0, 0.0); 2]; 2]; 3];
            for a in 0..3 {
                for node in 0..RULE_NODES {
                    let t_r = &tr.t[a][node];
                    let t_i = &ti.t[a][node];
                    let pr = t_r[nr[a]];
                    let dr = dipole_factor(rec_form, t_r, nr[a], rec.centre[a], tr.k[a][node]);
                    let pi = t_i[ni[a]];
                    let di = t_i[ni[a] + 1] + ion.centre[a] * t_i[ni[a]];
                    let wn = w[node];
                    e[a][0][0] += wn * pr * pi;
                    e[a][0][1] += wn * pr * di;
                    e[a][1][0] += wn * dr * pi;
                    e[a][1][1] += wn * dr * di;
                }
            }
            let weight = a_term.weight * b_term.weight;
            for c in 0..3 {
                let mut sum = Complex64::new(0.0, 0.0);
                for (cp, ec) in e_ion.iter().enumerate() {
                    if *ec == Complex64::new(0.0, 0.0) {
                        continue;
                    }
                    let mut prod = *ec;
                    for (a, ea) in e.iter().enumerate() {
                        prod *= ea[usize::from(a == c)][usize::from(a == cp)];
                    }
                    sum += prod;
                }
                out[c] += weight * sum;
            }
        }
    }
    out * Complex64::new(ion.prefactor * rec.prefactor, 0.0)
}

/// `E[e·poly_ion(v_i + μ + q)]` for one ionization shell (prefactor and weights included).
fn ion_moment(ion: &GaussianShell, measure: &Measure, v_ion: &CVec3, e_ion: &CVec3) -> Complex64 {
    let (_, w) = rule();
    let ti = tables(ion, false, &(v_ion + measure.mean), measure.sigma);
    let mut out = Complex64::new(0.0, 0.0);
    for term in &ion.terms {
        let n = term.powers.map(usize::from);
        let mut e = [[Complex64::new(0.0, 0.0); 2]; 3];
        for a in 0..3 {
            for node in 0..RULE_NODES {
                let t = &ti.t[a][node];
                e[a][0] += w[node] * t[n[a]];
                e[a][1] += w[node] * (t[n[a] + 1] + ion.centre[a] * t[n[a]]);
            }
        }
        for (cp, ec) in e_ion.iter().enumerate() {
            let mut prod = *ec;
            for (a, ea) in e.iter().enumerate() {
                prod *= ea[usize::from(a == cp)];
            }
            out += term.weight * prod;
        }
    }
    out * ion.prefactor
}

/// `E[poly_rec(v_r + μ + q)]` for one recombination shell (prefactor and weights included).
fn rec_moment(rec: &GaussianShell, form: Form, measure: &Measure, v_ret: &CVec3) -> CVec3 {
    let (_, w) = rule();
    let tr = tables(rec, true, &(v_ret + measure.mean), measure.sigma);
    let mut out = CVec3::zeros();
    for term in &rec.terms {
        let n = term.powers.map(usize::from);
        let mut e = [[Complex64::new(0.0, 0.0); 2]; 3];
        for a in 0..3 {
            for node in 0..RULE_NODES {
                let t = &tr.t[a][node];
                e[a][0] += w[node] * t[n[a]];
                e[a][1] += w[node] * dipole_factor(form, t, n[a], rec.centre[a], tr.k[a][node]);
            }
        }
        for c in 0..3 {
            let mut prod = term.weight;
            for (a, ea) in e.iter().enumerate() {
                prod *= ea[usize::from(a == c)];
            }
            out[c] += prod;
        }
    }
    out * Complex64::new(rec.prefactor, 0.0)
}

/// The exact momentum integral
/// `∫ d³q d̄_m(q + v_r) [e·d_n(q + v_i)] e^{−ρq²/2}` (module documentation), all vectors in the
/// molecular frame, `ρ = ε + iτ` with `Re ρ ≥ 0` and `Im ρ` such that `Re λ > 0`.
pub fn exact_integral(
    ion: IonSide<'_>,
    rec: RecSide<'_>,
    v_ion: &CVec3,
    v_ret: &CVec3,
    e_ion: &CVec3,
    rho: Complex64,
) -> CVec3 {
    let zero = Vector3::zeros();
    let mut total = CVec3::zeros();
    match (ion, rec) {
        (IonSide::Gaussian(is), RecSide::Gaussian(rs)) => {
            for a in &is.shells {
                for b in &rs.shells {
                    let m = Measure::new(
                        0.25 / a.exponent,
                        &a.centre,
                        0.25 / b.exponent,
                        &b.centre,
                        v_ion,
                        v_ret,
                        rho,
                    );
                    let f = m.spreading * m.exponent.exp();
                    total += pair_moment(a, b, rs.form, &m, v_ion, v_ret, e_ion) * f;
                }
            }
        }
        (IonSide::Gaussian(is), RecSide::Model(model, omega)) => {
            for a in &is.shells {
                let m = Measure::new(0.25 / a.exponent, &a.centre, 0.0, &zero, v_ion, v_ret, rho);
                let f = m.spreading * m.exponent.exp() * ion_moment(a, &m, v_ion, e_ion);
                total += model.vector(&(v_ret + m.mean), omega) * f;
            }
        }
        (IonSide::Constant(amplitude), RecSide::Gaussian(rs)) => {
            for b in &rs.shells {
                let m = Measure::new(0.0, &zero, 0.25 / b.exponent, &b.centre, v_ion, v_ret, rho);
                let f = m.spreading * m.exponent.exp() * amplitude;
                total += rec_moment(b, rs.form, &m, v_ret) * f;
            }
        }
        (IonSide::Constant(amplitude), RecSide::Model(model, omega)) => {
            total = model.vector(v_ret, omega) * (stationary_spreading(rho) * amplitude);
        }
    }
    total
}

/// A measure centred on the given momenta (mean `q = 0`) with variance `σ² = 1/(iτ + w)`: the
/// polynomial moments at a saddle whose Gaussian structure is in the phase
/// ([`crate::orbits::equations`]), where the kinetic momenta `k` already include the shift of
/// the stationary momentum.
fn saddle_measure(sigma2: Complex64) -> Measure {
    Measure {
        lambda: 0.5 / sigma2,
        mean: CVec3::zeros(),
        sigma: sigma2.sqrt(),
        exponent: Complex64::new(0.0, 0.0),
        spreading: Complex64::new(0.0, 0.0),
    }
}

/// The polynomial part of one ionization shell and one recombination shell at a saddle with
/// both Gaussians in the phase: `E[P̄(k_r + q) (e·P(k_i + q))]` over `q` of variance `sigma2`
/// (`1/(iτ + w)`), with the shells' normalisation prefactors and weights (molecular frame; the
/// Gaussian exponentials themselves are in the phase).
pub fn shell_pair_prefactor(
    ion: &GaussianShell,
    rec: &GaussianShell,
    rec_form: Form,
    k_ion: &CVec3,
    k_ret: &CVec3,
    e_ion: &CVec3,
    sigma2: Complex64,
) -> CVec3 {
    pair_moment(
        ion,
        rec,
        rec_form,
        &saddle_measure(sigma2),
        k_ion,
        k_ret,
        e_ion,
    )
}

/// The polynomial part of one ionization shell in the phase: `E[e·P(k_i + q)]` (see
/// [`shell_pair_prefactor`]).
pub fn ion_shell_prefactor(
    ion: &GaussianShell,
    k_ion: &CVec3,
    e_ion: &CVec3,
    sigma2: Complex64,
) -> Complex64 {
    ion_moment(ion, &saddle_measure(sigma2), k_ion, e_ion)
}

/// The polynomial part of one recombination shell in the phase: `E[P̄(k_r + q)]` (see
/// [`shell_pair_prefactor`]).
pub fn rec_shell_prefactor(
    rec: &GaussianShell,
    form: Form,
    k_ret: &CVec3,
    sigma2: Complex64,
) -> CVec3 {
    rec_moment(rec, form, &saddle_measure(sigma2), k_ret)
}

/// `(2π/ρ)^{3/2}` on the principal branch: the spreading factor of the shortcut.
pub fn stationary_spreading(rho: Complex64) -> Complex64 {
    let w = 2.0 * std::f64::consts::PI / rho;
    w * w.sqrt()
}

/// The shortcut: both structure factors at the stationary momentum,
/// `(2π/ρ)^{3/2} d̄_m(v_r) [e·d_n(v_i)]` (what [`exact_integral`] tends to for flat structure).
pub fn stationary_integral(rec_value: &CVec3, ion_value: Complex64, rho: Complex64) -> CVec3 {
    rec_value * (stationary_spreading(rho) * ion_value)
}

/// Rotates a complex vector with a real matrix, `R v`.
#[inline]
pub fn rotate(r: &Matrix3<f64>, v: &CVec3) -> CVec3 {
    CVec3::new(
        v.x * r[(0, 0)] + v.y * r[(0, 1)] + v.z * r[(0, 2)],
        v.x * r[(1, 0)] + v.y * r[(1, 1)] + v.z * r[(1, 2)],
        v.x * r[(2, 0)] + v.y * r[(2, 1)] + v.z * r[(2, 2)],
    )
}
