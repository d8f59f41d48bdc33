//! Tests of `holecast::tunnelling`: PPT g(γ), the Gamma function, atomic ADK, Wigner matrices
//! and MO-ADK structure factors and rates.
//!
//! Reference data: `tests/data/tunnelling_reference.json`, written by
//! `scripts/tunnelling_reference.py` with mpmath 1.3.0 (50 digits) and sympy 1.14.0 (versions
//! recorded in the file).

use std::f64::consts::{FRAC_1_SQRT_2, PI};

use holecast::tunnelling::{
    AsymptoticOrbital, AsymptoticTerm, EulerZyz, MAX_ANGULAR_MOMENTUM, TunnellingError,
    adk_angular_factor, adk_coefficient_squared, adk_cycle_averaged_rate, adk_static_rate,
    effective_principal_quantum_number, gamma_function, linear_cycle_average_factor,
    ln_gamma_function, mo_adk_q, ppt_g, ppt_g_taylor_coefficient, wigner_big_d, wigner_small_d,
};
use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;
use proptest::prelude::*;
use serde_json::Value;

/// CODATA 2018 Hartree energy in eV (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)).
const HARTREE_EV: f64 = 27.211_386_245_988;

fn reference() -> Value {
    let text = include_str!("data/tunnelling_reference.json");
    serde_json::from_str(text).expect("reference JSON parses")
}

fn num(v: &Value) -> f64 {
    v.as_str()
        .expect("number stored as string")
        .parse()
        .expect("parsable number")
}

fn cnum(v: &Value) -> Complex64 {
    Complex64::new(num(&v[0]), num(&v[1]))
}

fn rel(a: f64, b: f64) -> f64 {
    if b == 0.0 {
        a.abs()
    } else {
        ((a - b) / b).abs()
    }
}

fn real(x: f64) -> Complex64 {
    Complex64::new(x, 0.0)
}

fn orbital_from_reference(r: &Value, name: &str) -> AsymptoticOrbital {
    let o = &r["mo_adk_orbitals"][name];
    let terms = o["terms"]
        .as_array()
        .expect("terms")
        .iter()
        .map(|t| {
            AsymptoticTerm::new(
                t[0].as_u64().expect("l") as u32,
                t[1].as_i64().expect("m'") as i32,
                cnum(&t[2]),
            )
        })
        .collect();
    AsymptoticOrbital::new(num(&o["ip"]), o["charge"].as_f64().expect("charge"), terms)
        .expect("valid orbital")
}

/// Direction with polar angle `theta` and azimuth `phi`.
fn direction(theta: f64, phi: f64) -> Vector3<f64> {
    Vector3::new(
        theta.sin() * phi.cos(),
        theta.sin() * phi.sin(),
        theta.cos(),
    )
}

// ------------------------------------------------------------------------------------------
// PPT g(γ)
// ------------------------------------------------------------------------------------------

#[test]
fn ppt_g_matches_physics_notes_table() {
    // Physics notes §3.1 [NUM] and check #9 (PPT 1966 formula, from memory): 7 decimals given.
    for (gamma, expected) in [
        (0.1, 0.9990032),
        (0.5, 0.9768045),
        (1.0, 0.9224304),
        (2.0, 0.7988047),
        (5.0, 0.5546355),
    ] {
        let g = ppt_g(gamma).unwrap();
        assert!(
            (g - expected).abs() < 5e-8,
            "g({gamma}) = {g}, notes {expected}"
        );
    }
}

#[test]
fn ppt_g_matches_mpmath_to_double_precision() {
    // mpmath 1.3.0, 50 digits, closed form (scripts/tunnelling_reference.py).
    let r = reference();
    let mut worst: f64 = 0.0;
    for p in r["ppt_g"].as_array().unwrap() {
        let gamma: f64 = p[0].as_str().unwrap().parse().unwrap();
        let err = rel(ppt_g(gamma).unwrap(), num(&p[1]));
        worst = worst.max(err);
        assert!(err < 1e-14, "g({gamma}): rel. error {err:e}");
    }
    assert!(worst < 1e-14);
}

#[test]
fn ppt_g_taylor_coefficients_match_sympy_series() {
    // sympy 1.14.0 series of the closed form, exact rationals (reference script).
    let r = reference();
    for p in r["ppt_g_taylor"].as_array().unwrap() {
        let k = p[0].as_u64().unwrap() as u32;
        let c = ppt_g_taylor_coefficient(k);
        assert!(rel(c, num(&p[2])) < 1e-14, "g_{k} = {c}, sympy {}", p[1]);
    }
    // Physics notes §3.1: g → 1 − γ²/10 + … ; next terms derived here: +9/280 γ⁴ − 5/336 γ⁶.
    assert_eq!(ppt_g_taylor_coefficient(0), 1.0);
    assert!(rel(ppt_g_taylor_coefficient(1), -0.1) < 1e-16);
    assert!(rel(ppt_g_taylor_coefficient(2), 9.0 / 280.0) < 1e-15);
    assert!(rel(ppt_g_taylor_coefficient(3), -5.0 / 336.0) < 1e-15);
}

#[test]
fn ppt_g_small_gamma_and_limits() {
    // γ → 0: g = 1 exactly (static limit; PPT 1966 via notes §3.1).
    assert_eq!(ppt_g(0.0).unwrap(), 1.0);
    // Three-term series at γ = 1e-3 (truncation 35/4224 γ⁸ ≈ 8e-27).
    let x: f64 = 1e-3;
    let three = 1.0 - x * x / 10.0 + 9.0 / 280.0 * x.powi(4);
    assert!((ppt_g(x).unwrap() - three).abs() < 2e-16);
    // Continuity across the series / closed-form switch at γ = 0.25.
    // (adjacent doubles; the slope g' ≈ −γ/5 contributes < 1e-18).
    let below = ppt_g(f64::from_bits(0.25f64.to_bits() - 1)).unwrap();
    let at = ppt_g(0.25).unwrap();
    assert!((below - at).abs() < 5e-15, "{below} vs {at}");
    // γ ≫ 1: g ≈ (3/(2γ)) (ln 2γ − ½) (notes §3.1); corrections O(ln γ / γ²) relative.
    let big: f64 = 1e6;
    let asymptotic = 1.5 / big * ((2.0 * big).ln() - 0.5);
    assert!(rel(ppt_g(big).unwrap(), asymptotic) < 1e-10);
}

#[test]
fn ppt_exponent_equals_saddle_point_action() {
    // Notes §3.1 [DER, NUM]: 2 Im W = (2κ³/3F) g(γ) = 12.065995134939 for Ip = 0.5, F = 0.05,
    // ω = 0.057 (γ = 1.14).
    let (kappa, field, omega) = (1.0, 0.05, 0.057);
    let exponent =
        2.0 * kappa * kappa * kappa / (3.0 * field) * ppt_g(omega * kappa / field).unwrap();
    assert!((exponent - 12.065_995_134_939).abs() < 5e-12);
}

#[test]
fn ppt_g_rejects_bad_gamma() {
    for bad in [-0.1, f64::NAN, f64::INFINITY] {
        let err = ppt_g(bad).unwrap_err();
        assert!(matches!(
            err,
            TunnellingError::InvalidValue { name: "gamma", .. }
        ));
        assert!(err.to_string().contains("gamma"));
    }
}

// ------------------------------------------------------------------------------------------
// Gamma function
// ------------------------------------------------------------------------------------------

#[test]
fn gamma_function_matches_mpmath() {
    // mpmath.gamma at 50 digits (reference script).
    let r = reference();
    for p in r["gamma"].as_array().unwrap() {
        let x: f64 = p[0].as_str().unwrap().parse().unwrap();
        let err = rel(gamma_function(x).unwrap(), num(&p[1]));
        assert!(err < 1e-14, "Γ({x}): rel. error {err:e}");
    }
    for p in r["ln_gamma"].as_array().unwrap() {
        let x: f64 = p[0].as_str().unwrap().parse().unwrap();
        let err = rel(ln_gamma_function(x).unwrap(), num(&p[1]));
        assert!(err < 1e-14, "ln Γ({x}): rel. error {err:e}");
    }
}

#[test]
fn gamma_function_known_values() {
    // DLMF 5.4.1 (Γ(n+1) = n!) and 5.4.6 (Γ(½) = √π).
    let mut fact = 1.0;
    for n in 1..=20u32 {
        assert!(
            rel(gamma_function(f64::from(n)).unwrap(), fact) < 1e-15,
            "Γ({n})"
        );
        fact *= f64::from(n);
    }
    assert!(rel(gamma_function(0.5).unwrap(), PI.sqrt()) < 1e-15);
    // DLMF 5.5.1 recurrence, spot check off the grid.
    for x in [0.3, 1.7, 9.9, 33.3] {
        let lhs = gamma_function(x + 1.0).unwrap();
        let rhs = x * gamma_function(x).unwrap();
        assert!(rel(lhs, rhs) < 2e-15, "recurrence at {x}");
    }
}

#[test]
fn gamma_function_rejects_poles_overflow_and_nan() {
    for bad in [0.0, -1.0, -7.0, 172.0, f64::NAN, f64::NEG_INFINITY] {
        let err = gamma_function(bad).unwrap_err();
        assert!(
            matches!(err, TunnellingError::InvalidValue { name: "x", .. }),
            "{bad}: {err}"
        );
    }
    assert!(ln_gamma_function(-1.5).is_err());
    assert!(ln_gamma_function(0.0).is_err());
}

// ------------------------------------------------------------------------------------------
// Atomic ADK
// ------------------------------------------------------------------------------------------

/// Landau & Lifshitz, QM §77 (weak-field hydrogen 1s rate); notes §3.3.
fn landau_lifshitz(field: f64) -> f64 {
    4.0 / field * (-2.0 / (3.0 * field)).exp()
}

#[test]
fn hydrogen_adk_and_mo_adk_reproduce_landau_lifshitz() {
    // Landau & Lifshitz QM §77; the table of the notes §3.3 [NUM] to 7 digits; check #11.
    let h1s = AsymptoticOrbital::new(0.5, 1.0, vec![AsymptoticTerm::new(0, 0, real(2.0))]).unwrap();
    for (field, table) in [
        (0.04, 5.777749e-6),
        (0.05, 1.295677e-4),
        (0.06, 9.963559e-4),
        (0.08, 1.201847e-2),
        (0.1, 5.090535e-2),
    ] {
        let exact = landau_lifshitz(field);
        assert!(
            rel(exact, table) < 1e-6,
            "formula vs notes table at F = {field}"
        );
        let adk = adk_static_rate(0.5, 1.0, 0, 0, field).unwrap();
        assert!(
            rel(adk, exact) < 1e-14,
            "ADK at F = {field}: {adk} vs {exact}"
        );
        for dir in [Vector3::z(), Vector3::new(0.3, -0.2, 0.9)] {
            let mo = h1s.static_rate_for_field(field, dir).unwrap();
            assert!(
                rel(mo, exact) < 1e-14,
                "MO-ADK at F = {field}: {mo} vs {exact}"
            );
        }
    }
    // C²_{n*l*} = 4 for n* = 1 (ADK 1986 with Γ(2) = Γ(1) = 1).
    assert!(rel(adk_coefficient_squared(0.5, 1.0).unwrap(), 4.0) < 1e-15);
}

#[test]
fn adk_argon_matches_physics_notes() {
    // Notes §3.2 [NUM] / check #12 (ADK formula from memory): Ip = 15.7596 eV, l = 1, m = 0,
    // Z = 1, CODATA 2018 hartree. rel. tolerance 1e-4 as asked in check #12.
    let ip = 15.7596 / HARTREE_EV;
    let n_star = effective_principal_quantum_number(ip, 1.0).unwrap();
    assert!(rel(n_star, 0.929150) < 1e-4, "n* = {n_star}");
    let c2 = adk_coefficient_squared(ip, 1.0).unwrap();
    assert!(rel(c2, 4.1156) < 1e-4, "C² = {c2}");
    let w = adk_static_rate(ip, 1.0, 1, 0, 0.0534).unwrap();
    assert!(rel(w, 3.3726e-5) < 1e-4, "w(0.0534) = {w}");
    let w2 = adk_static_rate(ip, 1.0, 1, 0, 0.0755).unwrap();
    assert!(rel(w2, 2.3843e-3) < 1e-4, "w(0.0755) = {w2}");
    let avg = linear_cycle_average_factor(ip, 0.0534).unwrap();
    assert!(rel(avg, 0.2022) < 3e-4, "cycle factor {avg}");
    // 1.394e12 s⁻¹ with the CODATA 2018 atomic unit of time 2.4188843265857e-17 s.
    assert!(rel(w / 2.418_884_326_585_7e-17, 1.394e12) < 5e-4);
}

#[test]
fn adk_matches_mpmath() {
    // Same formulas evaluated with mpmath at 50 digits (reference script).
    let r = reference();
    for case in r["adk"].as_array().unwrap() {
        let ip = num(&case["ip"]);
        let z = case["z"].as_f64().unwrap();
        let l = case["l"].as_u64().unwrap() as u32;
        let m = case["m"].as_i64().unwrap() as i32;
        let field = num(&case["field"]);
        let label = case["label"].as_str().unwrap();
        assert!(
            rel(
                effective_principal_quantum_number(ip, z).unwrap(),
                num(&case["n_star"])
            ) < 1e-15
        );
        assert!(
            rel(adk_coefficient_squared(ip, z).unwrap(), num(&case["c2"])) < 1e-14,
            "{label}"
        );
        assert!(
            rel(adk_angular_factor(l, m).unwrap(), num(&case["f_lm"])) < 1e-15,
            "{label}"
        );
        let w = adk_static_rate(ip, z, l, m, field).unwrap();
        assert!(rel(w, num(&case["static_rate"])) < 1e-13, "{label}: {w}");
        let wc = adk_cycle_averaged_rate(ip, z, l, m, field).unwrap();
        assert!(
            rel(wc, num(&case["cycle_averaged_rate"])) < 1e-13,
            "{label}: {wc}"
        );
    }
}

#[test]
fn adk_angular_factor_values() {
    // f(l, m) = (2l+1)(l+|m|)!/(2^|m| |m|! (l−|m|)!) (ADK 1986, notes §3.2), by hand:
    // f(0,0) = 1, f(1,0) = 3, f(1,±1) = 3·2/2 = 3, f(2,±2) = 5·24/(4·2) = 15.
    assert_eq!(adk_angular_factor(0, 0).unwrap(), 1.0);
    assert_eq!(adk_angular_factor(1, 0).unwrap(), 3.0);
    assert_eq!(adk_angular_factor(1, -1).unwrap(), 3.0);
    assert_eq!(adk_angular_factor(2, 2).unwrap(), 15.0);
}

#[test]
fn adk_rejects_invalid_arguments() {
    let cases: [(Result<f64, TunnellingError>, &str); 6] = [
        (adk_static_rate(0.0, 1.0, 0, 0, 0.05), "ip"),
        (adk_static_rate(-0.5, 1.0, 0, 0, 0.05), "ip"),
        (adk_static_rate(0.5, 1.0, 0, 0, 0.0), "field"),
        (adk_static_rate(0.5, 1.0, 0, 0, f64::NAN), "field"),
        (adk_static_rate(0.5, 0.0, 0, 0, 0.05), "z"),
        (adk_cycle_averaged_rate(0.5, 1.0, 0, 0, -0.05), "field"),
    ];
    for (result, name) in cases {
        let err = result.unwrap_err();
        match &err {
            TunnellingError::InvalidValue { name: n, .. } => assert_eq!(*n, name, "{err}"),
            other => panic!("unexpected error {other}"),
        }
        assert!(err.to_string().contains(name));
    }
    let err = adk_static_rate(0.5, 1.0, 1, 2, 0.05).unwrap_err();
    assert!(
        matches!(
            err,
            TunnellingError::InvalidQuantumNumbers { l: 1, m: 2, .. }
        ),
        "{err}"
    );
    assert!(err.to_string().contains("m = 2"));
}

// ------------------------------------------------------------------------------------------
// MO-ADK normalisation
// ------------------------------------------------------------------------------------------

#[test]
fn mo_adk_hydrogenic_ion_scaling() {
    // Notes §3.4 normalisation check [DER]: C_0 = 2 Z^{3/2}, Ip = Z²/2 gives 4 Z⁵/F e^{−2Z³/(3F)}
    // (the Landau–Lifshitz rate scaled to charge Z).
    for z in [1.0_f64, 2.0, 3.0, 5.0] {
        let orbital = AsymptoticOrbital::new(
            0.5 * z * z,
            z,
            vec![AsymptoticTerm::new(0, 0, real(2.0 * z.powf(1.5)))],
        )
        .unwrap();
        for scaled_field in [0.04, 0.07, 0.1] {
            let field = scaled_field * z.powi(3);
            let exact = 4.0 * z.powi(5) / field * (-2.0 * z.powi(3) / (3.0 * field)).exp();
            let w = orbital.static_rate_for_field(field, Vector3::x()).unwrap();
            assert!(
                rel(w, exact) < 1e-13,
                "Z = {z}, F = {field}: {w} vs {exact}"
            );
        }
    }
}

#[test]
fn mo_adk_rate_weight_is_prefactor_times_exponent() {
    // Notes §3.4 rate formula, split as DESIGN §4.4 needs it (exponent e^{−2κ³/(3F)} apart).
    let orbital =
        AsymptoticOrbital::new(0.6, 1.0, vec![AsymptoticTerm::new(2, 1, real(1.0))]).unwrap();
    let kappa: f64 = 1.2f64.sqrt();
    let field = 0.07;
    for abs_m in 0..=2u32 {
        let w = orbital.rate_weight(abs_m, field).unwrap();
        let p = orbital.rate_prefactor(abs_m, field).unwrap();
        let exponent = (-2.0 * kappa.powi(3) / (3.0 * field)).exp();
        assert!(rel(w, p * exponent) < 1e-14);
        // By hand: κ^{1−2/κ} (2κ³/F)^{2/κ−|m|−1} / (2^|m| |m|!).
        let by_hand = kappa.powf(1.0 - 2.0 / kappa)
            * (2.0 * kappa.powi(3) / field).powf(2.0 / kappa - f64::from(abs_m) - 1.0)
            / [1.0, 2.0, 8.0][abs_m as usize];
        assert!(rel(p, by_hand) < 1e-13, "|m| = {abs_m}");
    }
}

#[test]
fn mo_adk_reduces_to_atomic_adk() {
    // Notes §3.4 [DER]: MO-ADK equals ADK for C_l² = C²_{n*l*} κ^{2n*+1}, with m' = m and the
    // field along the quantization axis. Argon 3p, l = 1, m = 0 and m = ±1.
    let ip = 15.7596 / HARTREE_EV;
    let kappa = (2.0 * ip).sqrt();
    let n_star = 1.0 / kappa;
    let c_l = (adk_coefficient_squared(ip, 1.0).unwrap() * kappa.powf(2.0 * n_star + 1.0)).sqrt();
    // ADK-equivalent Ar C_1 = 2.253 (notes §3.4 [NUM]).
    assert!((c_l - 2.253).abs() < 5e-4, "C_1 = {c_l}");
    for m in [-1, 0, 1] {
        let orbital =
            AsymptoticOrbital::new(ip, 1.0, vec![AsymptoticTerm::new(1, m, real(c_l))]).unwrap();
        for field in [0.03, 0.0534, 0.08] {
            let adk = adk_static_rate(ip, 1.0, 1, m, field).unwrap();
            for dir in [Vector3::z(), -Vector3::z()] {
                let mo = orbital.static_rate_for_field(field, dir).unwrap();
                assert!(rel(mo, adk) < 1e-13, "m = {m}, F = {field}: {mo} vs {adk}");
            }
        }
    }
}

// ------------------------------------------------------------------------------------------
// Wigner matrices and Euler angles
// ------------------------------------------------------------------------------------------

#[test]
fn wigner_small_d_convention_values() {
    // Edmonds/Sakurai sign, as checked with sympy in the notes §3.4:
    // d¹₁₀ = −sinβ/√2, d¹₀₁ = +sinβ/√2, d¹₁₁ = (1+cosβ)/2, d²₀₀ = (3cos²β−1)/2.
    for beta in [0.0, 0.3, 1.2, 2.0, 3.1, -0.8] {
        let (s, c) = f64::sin_cos(beta);
        let d10 = wigner_small_d(1, 1, 0, beta).unwrap();
        let d01 = wigner_small_d(1, 0, 1, beta).unwrap();
        let d11 = wigner_small_d(1, 1, 1, beta).unwrap();
        let d2_00 = wigner_small_d(2, 0, 0, beta).unwrap();
        assert!((d10 + s * FRAC_1_SQRT_2).abs() < 1e-15, "d¹₁₀({beta})");
        assert!((d01 - s * FRAC_1_SQRT_2).abs() < 1e-15, "d¹₀₁({beta})");
        assert!((d11 - 0.5 * (1.0 + c)).abs() < 1e-15, "d¹₁₁({beta})");
        assert!(
            (d2_00 - 0.5 * (3.0 * c * c - 1.0)).abs() < 1e-15,
            "d²₀₀({beta})"
        );
    }
}

#[test]
fn wigner_d_matches_mpmath_matrix_exponential() {
    // Reference: D = expm(−iαJz) expm(−iβJy) expm(−iγJz) in mpmath 1.3.0 (the definition,
    // Edmonds Eq. 4.1.9), not Wigner's sum.
    let r = reference();
    let mut worst: f64 = 0.0;
    for p in r["wigner_small_d"].as_array().unwrap() {
        let l = p[0].as_u64().unwrap() as u32;
        let m = p[1].as_i64().unwrap() as i32;
        let mp = p[2].as_i64().unwrap() as i32;
        let beta: f64 = p[3].as_str().unwrap().parse().unwrap();
        let err = (wigner_small_d(l, m, mp, beta).unwrap() - num(&p[4])).abs();
        worst = worst.max(err);
        assert!(err < 1e-13, "d^{l}_{m},{mp}({beta}): abs. error {err:e}");
    }
    assert!(worst < 1e-13);
    for p in r["wigner_big_d"].as_array().unwrap() {
        let l = p[0].as_u64().unwrap() as u32;
        let m = p[1].as_i64().unwrap() as i32;
        let mp = p[2].as_i64().unwrap() as i32;
        let parse = |v: &Value| v.as_str().unwrap().parse::<f64>().unwrap();
        let angles = EulerZyz::new(parse(&p[3]), parse(&p[4]), parse(&p[5])).unwrap();
        let err = (wigner_big_d(l, m, mp, &angles).unwrap() - cnum(&p[6])).norm();
        assert!(err < 1e-14, "D^{l}_{m},{mp}: error {err:e}");
    }
}

#[test]
fn wigner_small_d_unitarity_and_orthogonality() {
    // d^l(β) is a real orthogonal matrix (Edmonds Eq. 4.2.x; textbook): Σ_m d_{m a} d_{m b} = δ_ab.
    for l in 0..=MAX_ANGULAR_MOMENTUM {
        let li = l as i32;
        for beta in [0.37, 1.3, 2.2, 3.0] {
            for a in -li..=li {
                for b in -li..=li {
                    let sum: f64 = (-li..=li)
                        .map(|m| {
                            wigner_small_d(l, m, a, beta).unwrap()
                                * wigner_small_d(l, m, b, beta).unwrap()
                        })
                        .sum();
                    let expected = if a == b { 1.0 } else { 0.0 };
                    let tol = if l <= 4 { 1e-14 } else { 1e-12 };
                    assert!(
                        (sum - expected).abs() < tol,
                        "l={l} β={beta} ({a},{b}): {sum}"
                    );
                }
            }
        }
    }
}

/// Condon–Shortley Y_lm for l ≤ 2 from Cartesian components of a unit vector (textbook
/// closed forms; e.g. Sakurai Appendix A).
fn ylm(l: u32, m: i32, v: &Vector3<f64>) -> Complex64 {
    let (x, y, z) = (v.x, v.y, v.z);
    let xp = Complex64::new(x, y);
    let xm = xp.conj();
    let k1 = (3.0 / (8.0 * PI)).sqrt();
    let k2 = (15.0 / (32.0 * PI)).sqrt();
    let k21 = (15.0 / (8.0 * PI)).sqrt();
    match (l, m) {
        (0, 0) => real((1.0 / (4.0 * PI)).sqrt()),
        (1, 0) => real((3.0 / (4.0 * PI)).sqrt() * z),
        (1, 1) => -k1 * xp,
        (1, -1) => k1 * xm,
        (2, 0) => real((5.0 / (16.0 * PI)).sqrt() * (3.0 * z * z - 1.0)),
        (2, 1) => -k21 * z * xp,
        (2, -1) => k21 * z * xm,
        (2, 2) => k2 * xp * xp,
        (2, -2) => k2 * xm * xm,
        _ => unreachable!("test helper covers l ≤ 2"),
    }
}

#[test]
fn wigner_big_d_rotates_spherical_harmonics_actively() {
    // Y_{lm'}(R⁻¹ r̂) = Σ_m Y_{lm}(r̂) D^l_{mm'}(R) for the active R = Rz(α)Ry(β)Rz(γ)
    // (Sakurai Eq. 3.10.x / Edmonds Ch. 4): fixes both the active convention and the ZYZ order.
    let angles = EulerZyz::new(0.7, 1.1, -2.3).unwrap();
    let rot = angles.rotation_matrix();
    let rinv = rot.transpose();
    for v in [Vector3::new(0.2, -0.5, 0.84), Vector3::new(-0.9, 0.1, -0.3)] {
        let v = v.normalize();
        let back = rinv * v;
        for l in 1..=2u32 {
            let li = l as i32;
            for mp in -li..=li {
                let lhs = ylm(l, mp, &back);
                let rhs: Complex64 = (-li..=li)
                    .map(|m| ylm(l, m, &v) * wigner_big_d(l, m, mp, &angles).unwrap())
                    .sum();
                assert!((lhs - rhs).norm() < 1e-14, "l={l} m'={mp}: {lhs} vs {rhs}");
            }
        }
    }
}

fn rz(a: f64) -> Matrix3<f64> {
    let (s, c) = a.sin_cos();
    Matrix3::new(c, -s, 0.0, s, c, 0.0, 0.0, 0.0, 1.0)
}

fn ry(a: f64) -> Matrix3<f64> {
    let (s, c) = a.sin_cos();
    Matrix3::new(c, 0.0, s, 0.0, 1.0, 0.0, -s, 0.0, c)
}

#[test]
fn euler_angle_helpers_are_consistent() {
    // Pure rotation algebra (common practice, no source needed beyond the definitions).
    let e = EulerZyz::new(0.4, 2.2, -1.3).unwrap();
    let r = e.rotation_matrix();
    let expected = rz(0.4) * ry(2.2) * rz(-1.3);
    assert!((r - expected).norm() < 1e-15);
    assert!((e.inverse().rotation_matrix() - r.transpose()).norm() < 1e-14);
    assert!((e.lab_z_in_molecular_frame() - r.transpose() * Vector3::z()).norm() < 1e-15);
    // Exit frame for E ∥ +z_lab: Rx(π) R.
    let rx_pi = Matrix3::new(1.0, 0.0, 0.0, 0.0, -1.0, 0.0, 0.0, 0.0, -1.0);
    let exit = e.exit_frame_for_field_along_lab_z().rotation_matrix();
    assert!((exit - rx_pi * r).norm() < 1e-14);
    assert!(EulerZyz::new(f64::NAN, 0.0, 0.0).is_err());
}

#[test]
fn wigner_rejects_bad_arguments() {
    let err = wigner_small_d(1, 0, 2, 0.3).unwrap_err();
    assert!(
        matches!(
            err,
            TunnellingError::InvalidQuantumNumbers { l: 1, m: 2, .. }
        ),
        "{err}"
    );
    assert!(err.to_string().contains("m'"));
    assert!(wigner_small_d(MAX_ANGULAR_MOMENTUM + 1, 0, 0, 0.3).is_err());
    assert!(wigner_small_d(2, 0, 0, f64::NAN).is_err());
}

// ------------------------------------------------------------------------------------------
// MO-ADK structure factors
// ------------------------------------------------------------------------------------------

#[test]
fn mo_adk_structure_factors_match_mpmath() {
    // B(m) from the expm-defined D matrices and the notes' Q(l, m), evaluated with mpmath, and
    // the rate formula of notes §3.4 (Tong, Zhao, Lin 2002; from memory).
    let r = reference();
    for case in r["mo_adk"].as_array().unwrap() {
        let name = case["orbital"].as_str().unwrap();
        let orbital = orbital_from_reference(&r, name);
        let field: f64 = case["field"].as_str().unwrap().parse().unwrap();
        let parse = |v: &Value| v.as_str().unwrap().parse::<f64>().unwrap();
        let (amps, rate) = if case["mode"] == "frame" {
            let e = EulerZyz::new(
                parse(&case["alpha"]),
                parse(&case["beta"]),
                parse(&case["gamma"]),
            )
            .unwrap();
            (
                orbital.structure_factor_in_frame(&e),
                orbital.static_rate_in_frame(field, &e).unwrap(),
            )
        } else {
            let d = &case["field_direction"];
            let dir = Vector3::new(parse(&d[0]), parse(&d[1]), parse(&d[2]));
            let amps = orbital.amplitudes_for_field(dir).unwrap();
            // B(0) = √(2π) Σ C Y_{lm'}(−Ê), mpmath.spherharm [DER here].
            let b0 = cnum(&case["b0_from_ylm"]);
            assert!(
                (amps.leading() - b0).norm() < 1e-13,
                "{name}: B(0) vs Y_lm identity"
            );
            assert!((orbital.leading_amplitude_for_field(dir).unwrap() - b0).norm() < 1e-13);
            (amps, orbital.static_rate_for_field(field, dir).unwrap())
        };
        for (m, v) in case["b"].as_object().unwrap() {
            let m: i32 = m.parse().unwrap();
            let got = amps.get(m).unwrap();
            let want = cnum(v);
            assert!(
                (got - want).norm() < 1e-13 * (1.0 + want.norm()),
                "{name} B({m}): {got} vs {want}"
            );
        }
        assert!(
            rel(rate, num(&case["static_rate"])) < 1e-13,
            "{name}: rate {rate}"
        );
    }
}

/// Plain path: B(m) summed term by term with `wigner_big_d` and `mo_adk_q`.
fn plain_b(terms: &[AsymptoticTerm], m: i32, frame: &EulerZyz) -> Complex64 {
    terms
        .iter()
        .filter(|t| m.unsigned_abs() <= t.l)
        .map(|t| {
            t.coefficient
                * wigner_big_d(t.l, m, t.m_prime, frame).unwrap()
                * mo_adk_q(t.l, m).unwrap()
        })
        .sum()
}

fn test_orbital() -> AsymptoticOrbital {
    AsymptoticOrbital::new(
        0.55,
        1.0,
        vec![
            AsymptoticTerm::new(0, 0, real(1.2)),
            AsymptoticTerm::new(1, -1, Complex64::new(0.3, -0.7)),
            AsymptoticTerm::new(3, 2, Complex64::new(-0.5, 0.2)),
            AsymptoticTerm::new(4, 4, real(0.1)),
            AsymptoticTerm::new(3, 2, real(0.05)),
        ],
    )
    .unwrap()
}

proptest! {
    // Integration tests have no lib.rs beside them: keep regressions in tests/regressions/.
    #![proptest_config(ProptestConfig {
        failure_persistence: Some(Box::new(
            proptest::test_runner::FileFailurePersistence::WithSource("regressions"),
        )),
        ..ProptestConfig::default()
    })]

    #[test]
    fn fast_structure_factor_equals_plain_sum(
        alpha in -7.0f64..7.0, beta in -1.0f64..4.2, gamma in -7.0f64..7.0
    ) {
        // Slow-and-obvious path beside the precomputed one (STYLE.md).
        let orbital = test_orbital();
        let frame = EulerZyz::new(alpha, beta, gamma).unwrap();
        let fast = orbital.structure_factor_in_frame(&frame);
        for m in -4..=4 {
            let plain = plain_b(orbital.terms(), m, &frame);
            // Relative: phases e^{−i(mα + m'γ)} are formed differently on the two paths.
            prop_assert!((fast.get(m).unwrap() - plain).norm() < 2e-14 * (1.0 + plain.norm()));
        }
    }

    #[test]
    fn field_and_frame_apis_agree(alpha in -3.2f64..3.2, beta in 0.0f64..PI, gamma in -3.2f64..3.2) {
        // For R the molecular → lab rotation and E ∥ +z_lab: amplitudes_for_field(Rᵀẑ) and
        // structure_factor_in_frame(Rx(π)R) describe the same exit direction; they agree in
        // B(0) and |B(m)| (the exit frames differ by a rotation about the exit axis).
        let orbital = test_orbital();
        let r = EulerZyz::new(alpha, beta, gamma).unwrap();
        let a = orbital.amplitudes_for_field(r.lab_z_in_molecular_frame()).unwrap();
        let b = orbital.structure_factor_in_frame(&r.exit_frame_for_field_along_lab_z());
        prop_assert!((a.leading() - b.leading()).norm() < 1e-13);
        for m in -4..=4 {
            prop_assert!((a.get(m).unwrap().norm() - b.get(m).unwrap().norm()).abs() < 1e-13);
        }
        let wa = orbital.static_rate_for_field(0.05, r.lab_z_in_molecular_frame()).unwrap();
        let wb = orbital.static_rate_in_frame(0.05, &r.exit_frame_for_field_along_lab_z()).unwrap();
        prop_assert!(((wa - wb) / wb).abs() < 1e-13);
    }

    #[test]
    fn sigma_rate_depends_only_on_bond_field_angle(
        beta in 0.0f64..PI, a1 in -3.2f64..3.2, g1 in -3.2f64..3.2, a2 in -3.2f64..3.2, g2 in -3.2f64..3.2
    ) {
        // Tong, Zhao, Lin 2002: a σ orbital (m' = 0 only) is symmetric about the bond, so its
        // rate depends on the angle β between bond and field alone.
        let sigma = AsymptoticOrbital::new(0.57, 1.0, vec![
            AsymptoticTerm::new(0, 0, real(2.0)),
            AsymptoticTerm::new(1, 0, real(-0.6)),
            AsymptoticTerm::new(2, 0, real(0.8)),
        ]).unwrap();
        let r1 = EulerZyz::new(a1, beta, g1).unwrap();
        let r2 = EulerZyz::new(a2, beta, g2).unwrap();
        let w1 = sigma.static_rate_for_field(0.05, r1.lab_z_in_molecular_frame()).unwrap();
        let w2 = sigma.static_rate_for_field(0.05, r2.lab_z_in_molecular_frame()).unwrap();
        prop_assert!(((w1 - w2) / w1).abs() < 1e-12);
        let bond = Vector3::z();
        let n = r1.lab_z_in_molecular_frame();
        prop_assert!((n.dot(&bond) - beta.cos()).abs() < 1e-14);
    }
}

#[test]
fn sigma_gerade_orbital_peaks_along_bond_and_is_symmetric() {
    // Tong, Zhao, Lin 2002 (angular structure): σ_g with C_0, C_2 > 0 (illustrative values,
    // not from the paper) ionizes most easily along the bond; gerade ⇒ w(θ) = w(π − θ).
    let sigma = AsymptoticOrbital::new(
        0.5726,
        1.0,
        vec![
            AsymptoticTerm::new(0, 0, real(2.0)),
            AsymptoticTerm::new(2, 0, real(0.8)),
        ],
    )
    .unwrap();
    let field = 0.05;
    let w0 = sigma.static_rate_for_field(field, Vector3::z()).unwrap();
    for k in 1..=180 {
        let theta = f64::from(k) * PI / 180.0;
        let w = sigma
            .static_rate_for_field(field, direction(theta, 0.4))
            .unwrap();
        let w_mirror = sigma
            .static_rate_for_field(field, direction(PI - theta, 0.4))
            .unwrap();
        assert!(rel(w, w_mirror) < 1e-12, "θ = {theta}");
        if k < 180 {
            assert!(w < w0, "θ = {theta}: {w} ≥ {w0}");
        }
    }
    // Leading amplitude = Σ C_l √((2l+1)/2) P_l(cos θ) (notes §3.4); sign: gerade ⇒ even in Ê.
    let theta: f64 = 1.0;
    let p2 = 0.5 * (3.0 * theta.cos().powi(2) - 1.0);
    let expected = 2.0 * 0.5f64.sqrt() + 0.8 * 2.5f64.sqrt() * p2;
    let b0 = sigma
        .leading_amplitude_for_field(direction(theta, 2.0))
        .unwrap();
    assert!((b0 - real(expected)).norm() < 1e-14);
}

/// A pure l = 2 π_x orbital (real combination ∝ xz): C·(Y_{2,−1} − Y_{2,1})/√2.
fn pi_g_orbital(kappa: f64) -> AsymptoticOrbital {
    let c = 1.0;
    AsymptoticOrbital::new(
        0.5 * kappa * kappa,
        1.0,
        vec![
            AsymptoticTerm::new(2, -1, real(c * FRAC_1_SQRT_2)),
            AsymptoticTerm::new(2, 1, real(-c * FRAC_1_SQRT_2)),
        ],
    )
    .unwrap()
}

#[test]
fn pi_orbital_has_node_along_bond_and_peaks_at_45_degrees() {
    // Tong, Zhao, Lin 2002: for π orbitals d^l_{0,±1} ∝ sin θ, so the leading (m = 0) term
    // vanishes along the bond; for a pure l = 2 π_g orbital B(0) ∝ sin θ cos θ cos φ, whose
    // square peaks at θ = 45° in the xz plane.
    let kappa = 1.0;
    let field = 0.05;
    let pi = pi_g_orbital(kappa);
    let along_bond = pi.amplitudes_for_field(Vector3::z()).unwrap();
    assert!(along_bond.leading().norm() < 1e-15);
    // Leading-order rate B(0)² · rate_weight(0): scan θ ∈ [0°, 90°] at φ = 0 in 0.01° steps
    // (the mirror lobe at 135° is checked below).
    let weight0 = pi.rate_weight(0, field).unwrap();
    let mut best = (0.0, 0.0);
    for k in 0..=9_000 {
        let theta = f64::from(k) * 0.01_f64.to_radians();
        let w = pi
            .leading_amplitude_for_field(direction(theta, 0.0))
            .unwrap()
            .norm_sqr()
            * weight0;
        if w > best.1 {
            best = (theta, w);
        }
    }
    assert!(
        (best.0.to_degrees() - 45.0).abs() < 0.011,
        "peak at {}°",
        best.0.to_degrees()
    );
    // Also at 135° (the other lobe), with equal height (gerade).
    let w135 = pi
        .leading_amplitude_for_field(direction(0.75 * PI, 0.0))
        .unwrap()
        .norm_sqr()
        * weight0;
    assert!(rel(w135, best.1) < 1e-12);
    // Analytic peak value [DER]: B(0)² = 2π |Y_{2x}(45°)|² = 2π · (15/4π) · ¼ = 15/8.
    assert!(rel(best.1 / weight0, 15.0 / 8.0) < 1e-12);

    // What the |m| = 1 terms add along the bond [DER]: there only D_{±1,±1} survive, so
    // |B(±1)|² = ½ Q(2,1)² = 15/2 each; with the weight 1/(2·1!) and the extra (2κ³/F)⁻¹ the
    // |m| = 1 rate is 7.5 (F/2κ³) · weight0 = 0.1875 weight0 for F = 0.05, κ = 1, i.e.
    // 2F/κ³ = 10 % of the leading-order peak rate at 45°. The full rate therefore does not
    // vanish along the bond, but is suppressed by a factor 10 there at this field.
    let m1_rate = pi.static_rate_for_field(field, Vector3::z()).unwrap();
    let expected_m1 = 7.5 * field / (2.0 * kappa.powi(3)) * weight0;
    assert!(
        rel(m1_rate, expected_m1) < 1e-12,
        "{m1_rate} vs {expected_m1}"
    );
    let ratio = m1_rate / best.1;
    assert!(
        (ratio - 0.1).abs() < 1e-12,
        "|m|=1 at θ=0 relative to the peak: {ratio}"
    );
}

#[test]
fn exit_direction_is_opposite_to_the_field() {
    // Convention (notes §0: charge −1, H_int = +E·r): the electron leaves along −Ê, so
    // B(0; Ê) = √(2π) Σ C Y_{lm'}(−Ê) [DER]. A mixed-parity σ orbital (C_0 = 1, C_1 = 1, lobe
    // along +z) ionizes more easily when the field points along −z (electron pushed to +z).
    let polar = AsymptoticOrbital::new(
        0.5,
        1.0,
        vec![
            AsymptoticTerm::new(0, 0, real(1.0)),
            AsymptoticTerm::new(1, 0, real(1.0)),
        ],
    )
    .unwrap();
    let b_down = polar.leading_amplitude_for_field(-Vector3::z()).unwrap();
    let b_up = polar.leading_amplitude_for_field(Vector3::z()).unwrap();
    let expected_down = (2.0 * PI).sqrt() * (ylm(0, 0, &Vector3::z()) + ylm(1, 0, &Vector3::z()));
    assert!((b_down - expected_down).norm() < 1e-14);
    assert!(b_down.norm() > b_up.norm());
    let w_down = polar.static_rate_for_field(0.05, -Vector3::z()).unwrap();
    let w_up = polar.static_rate_for_field(0.05, Vector3::z()).unwrap();
    assert!(w_down > w_up);
    // Cycle average = mean of both half cycles × √(3F/(πκ³)) (notes §3.4).
    let avg = polar
        .cycle_averaged_rate_for_field(0.05, Vector3::z())
        .unwrap();
    let factor = linear_cycle_average_factor(0.5, 0.05).unwrap();
    assert!(rel(avg, 0.5 * (w_down + w_up) * factor) < 1e-15);
    // An odd orbital changes the sign of B(0) with the field, an even one does not.
    let odd = AsymptoticOrbital::new(0.5, 1.0, vec![AsymptoticTerm::new(1, 0, real(1.0))]).unwrap();
    let dir = Vector3::new(0.2, 0.4, 0.7);
    let plus = odd.leading_amplitude_for_field(dir).unwrap();
    let minus = odd.leading_amplitude_for_field(-dir).unwrap();
    assert!((plus + minus).norm() < 1e-15 && plus.norm() > 0.1);
}

#[test]
fn field_direction_length_does_not_matter_and_poles_are_regular() {
    // Normalisation and the pole branch of the half-angle formulas (implementation checks,
    // no external source): same result for any positive length, and continuity at θ → 0, π.
    let orbital = test_orbital();
    let dir = Vector3::new(0.3, -0.4, 0.5);
    let a = orbital.amplitudes_for_field(dir).unwrap();
    let b = orbital.amplitudes_for_field(dir * 1e250).unwrap();
    let c = orbital.amplitudes_for_field(dir * 1e-250).unwrap();
    for m in -4..=4 {
        let scale = 1e-14 * (1.0 + a.get(m).unwrap().norm());
        assert!(
            (a.get(m).unwrap() - b.get(m).unwrap()).norm() < scale,
            "m = {m}"
        );
        assert!(
            (a.get(m).unwrap() - c.get(m).unwrap()).norm() < scale,
            "m = {m}"
        );
    }
    for pole in [Vector3::z(), -Vector3::z()] {
        let w_pole = orbital.static_rate_for_field(0.05, pole).unwrap();
        let near = pole + Vector3::new(1e-9, 0.0, 0.0);
        let w_near = orbital.static_rate_for_field(0.05, near).unwrap();
        assert!(rel(w_near, w_pole) < 1e-7);
        let b_pole = orbital.leading_amplitude_for_field(pole).unwrap();
        let b_near = orbital.leading_amplitude_for_field(near).unwrap();
        assert!((b_pole - b_near).norm() < 1e-7);
    }
    assert_eq!(a.as_slice().len(), 9);
    assert_eq!(a.get(5), None);
    assert_eq!(a.l_max(), 4);
}

#[test]
fn mo_adk_q_values() {
    // Q(l,m) = (−1)^m √((2l+1)(l+|m|)!/(2(l−|m|)!)) (Tong et al. 2002 via notes §3.4), by hand:
    // Q(0,0) = 1/√2, Q(1,±1) = −√3, Q(2,2) = √(5·24/2) = √60.
    assert!(rel(mo_adk_q(0, 0).unwrap(), FRAC_1_SQRT_2) < 1e-15);
    assert!(rel(mo_adk_q(1, 1).unwrap(), -3f64.sqrt()) < 1e-15);
    assert!(rel(mo_adk_q(1, -1).unwrap(), -3f64.sqrt()) < 1e-15);
    assert!(rel(mo_adk_q(2, -2).unwrap(), 60f64.sqrt()) < 1e-15);
    assert!(mo_adk_q(1, 2).is_err());
}

#[test]
fn asymptotic_orbital_rejects_invalid_input() {
    let ok = vec![AsymptoticTerm::new(0, 0, real(1.0))];
    let err = AsymptoticOrbital::new(0.0, 1.0, ok.clone()).unwrap_err();
    assert!(
        matches!(err, TunnellingError::InvalidValue { name: "ip", .. }),
        "{err}"
    );
    let err = AsymptoticOrbital::new(-1.0, 1.0, ok.clone()).unwrap_err();
    assert!(err.to_string().contains("ip = -1"), "{err}");
    let err = AsymptoticOrbital::new(0.5, -1.0, ok.clone()).unwrap_err();
    assert!(
        matches!(err, TunnellingError::InvalidValue { name: "charge", .. }),
        "{err}"
    );
    assert_eq!(
        AsymptoticOrbital::new(0.5, 1.0, vec![]).unwrap_err(),
        TunnellingError::EmptyOrbital
    );

    let err = AsymptoticOrbital::new(0.5, 1.0, vec![ok[0], AsymptoticTerm::new(1, 2, real(1.0))])
        .unwrap_err();
    match &err {
        TunnellingError::InvalidTerm {
            index: 1,
            l: 1,
            m_prime: 2,
            ..
        } => {}
        other => panic!("unexpected {other}"),
    }
    assert!(err.to_string().contains("m' = 2"), "{err}");
    for bad in [
        Complex64::new(f64::NAN, 0.0),
        Complex64::new(1.0, f64::INFINITY),
    ] {
        let err =
            AsymptoticOrbital::new(0.5, 1.0, vec![AsymptoticTerm::new(2, 1, bad)]).unwrap_err();
        assert!(
            matches!(err, TunnellingError::InvalidTerm { index: 0, .. }),
            "{err}"
        );
        assert!(err.to_string().contains("finite"), "{err}");
    }
    let too_big = AsymptoticTerm::new(MAX_ANGULAR_MOMENTUM + 1, 0, real(1.0));
    assert!(AsymptoticOrbital::new(0.5, 1.0, vec![too_big]).is_err());

    let orbital = AsymptoticOrbital::new(0.5, 1.0, ok).unwrap();
    let err = orbital
        .static_rate_for_field(0.0, Vector3::z())
        .unwrap_err();
    assert!(
        matches!(err, TunnellingError::InvalidValue { name: "field", .. }),
        "{err}"
    );
    assert!(orbital.rate_weight(0, -1.0).is_err());
    assert!(orbital.rate_prefactor(1, f64::NAN).is_err());
    for bad in [Vector3::zeros(), Vector3::new(f64::NAN, 0.0, 1.0)] {
        let err = orbital.amplitudes_for_field(bad).unwrap_err();
        assert!(matches!(
            err,
            TunnellingError::InvalidDirection {
                name: "field_direction",
                ..
            }
        ));
        assert!(err.to_string().contains("field_direction"));
    }
}
