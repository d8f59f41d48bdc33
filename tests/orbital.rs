//! Tests of `holecast::orbital`: Cartesian Gaussian orbitals, transforms and plane-wave dipoles.
//!
//! Sources: physics notes §0, §1.7, §5.1, §5.2 and checks #13–#15; quadrature values from
//! `scripts/orbital_reference.py` (mpmath 1.3.0, SciPy 1.17.1) in
//! `tests/data/orbital_reference.json`; Lein et al., PRL 88, 183903 (2002); Chirilă & Lein,
//! PRA 73, 023410 (2006); the Gaussian product theorem (Boys 1950, textbook).

use std::f64::consts::PI;

use holecast::orbital::{
    CartesianSpec, Orbital, OrbitalError, OrbitalSpec, PlaneWaveProjection, Primitive, Rotated,
    TermSpec, gaussian_s_dipole, hermite_gaussian_integral, hydrogenic_dipole,
};
use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;
use proptest::prelude::*;
use serde::Deserialize;

type CVec = Vector3<Complex64>;

fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

fn real_k(x: f64, y: f64, z: f64) -> CVec {
    Vector3::new(c(x, 0.0), c(y, 0.0), c(z, 0.0))
}

fn from_pairs(v: &[[f64; 2]; 3]) -> CVec {
    Vector3::new(
        c(v[0][0], v[0][1]),
        c(v[1][0], v[1][1]),
        c(v[2][0], v[2][1]),
    )
}

/// Largest componentwise |a − b| over the largest |b| (or 1 if smaller): a relative error that
/// stays meaningful where single components pass through zero.
fn vec_error(a: &CVec, b: &CVec) -> f64 {
    let scale = b.iter().map(|x| x.norm()).fold(1e-300, f64::max);
    (a - b).iter().map(|x| x.norm()).fold(0.0, f64::max) / scale
}

fn term(centre: [f64; 3], exponent: f64, cartesian: &str, coefficient: [f64; 2]) -> TermSpec {
    TermSpec {
        centre_bohr: centre,
        exponents_inv_bohr2: vec![exponent],
        contraction: vec![],
        cartesian: CartesianSpec::Label(cartesian.to_owned()),
        coefficient,
    }
}

// ---------------------------------------------------------------------------------------------
// Reference data written by scripts/orbital_reference.py
// ---------------------------------------------------------------------------------------------

#[derive(Deserialize)]
struct Reference {
    libraries: serde_json::Value,
    k_points: Vec<[[f64; 2]; 3]>,
    primitives: Vec<PrimitiveRef>,
    overlaps: Vec<OverlapRef>,
    orbitals: Vec<OrbitalRef>,
    triple_integral_check: TripleIntegralRef,
    length_form_zero: LengthZeroRef,
}

#[derive(Deserialize)]
struct PrimitiveRef {
    centre_bohr: [f64; 3],
    exponent: f64,
    powers: [u32; 3],
    normalisation: f64,
    cases: Vec<PrimitiveCase>,
}

#[derive(Deserialize)]
struct PrimitiveCase {
    transform: [f64; 2],
    dipole_length: [[f64; 2]; 3],
}

#[derive(Deserialize)]
struct OverlapRef {
    a: usize,
    b: usize,
    overlap: f64,
}

#[derive(Deserialize)]
struct OrbitalRef {
    spec: OrbitalSpec,
    norm_before_normalisation: f64,
    cases: Vec<OrbitalCase>,
}

#[derive(Deserialize)]
struct OrbitalCase {
    transform: [f64; 2],
    dipole_length: [[f64; 2]; 3],
    dipole_length_recombination: [[f64; 2]; 3],
}

#[derive(Deserialize)]
struct TripleIntegralRef {
    k_index: usize,
    value: [f64; 2],
}

#[derive(Deserialize)]
struct LengthZeroRef {
    exponent: f64,
    bond_length_bohr: f64,
    k_zero_quadrature: f64,
}

fn reference() -> Reference {
    let text = include_str!("data/orbital_reference.json");
    let r: Reference = serde_json::from_str(text).expect("reference JSON parses");
    assert_eq!(r.libraries["mpmath"], "1.3.0");
    assert_eq!(r.libraries["scipy"], "1.17.1");
    r
}

fn primitive_of(p: &PrimitiveRef) -> Primitive {
    Primitive::new(Vector3::from(p.centre_bohr), p.exponent, p.powers).expect("valid primitive")
}

// ---------------------------------------------------------------------------------------------
// I_n(α, k)
// ---------------------------------------------------------------------------------------------

#[test]
fn hermite_gaussian_integral_matches_notes_table() {
    // Physics notes §5.2 table (values computed there by quadrature), check #14.
    let cases = [
        (0, 0.8, 1.1, c(1.357726647782, 0.0)),
        (1, 0.8, 1.1, c(0.0, -0.933437070350)),
        (2, 0.35, 0.7, c(0.904817642837, 0.0)),
        (3, 1.7, 2.2, c(0.0, -0.200163880010)),
    ];
    for (n, alpha, k, expected) in cases {
        let value = hermite_gaussian_integral(n, alpha, c(k, 0.0)).unwrap();
        assert!(
            (value - expected).norm() < 1e-11,
            "I_{n}({alpha},{k}) = {value}"
        );
    }
}

#[test]
fn hermite_gaussian_integral_rejects_bad_exponent() {
    for alpha in [0.0, -1.0, f64::NAN, f64::INFINITY] {
        let err = hermite_gaussian_integral(1, alpha, c(1.0, 0.0)).unwrap_err();
        assert!(
            matches!(&err, OrbitalError::InvalidParameter { parameter, .. } if parameter == "alpha")
        );
    }
}

// ---------------------------------------------------------------------------------------------
// Primitives and overlaps
// ---------------------------------------------------------------------------------------------

#[test]
fn primitive_transforms_and_dipoles_match_quadrature() {
    // scripts/orbital_reference.py: mpmath.quad of the defining integrals, s…g primitives on
    // off-origin centres, at real and complex k.
    let r = reference();
    let mut worst: f64 = 0.0;
    for p in &r.primitives {
        let prim = primitive_of(p);
        assert!(
            (prim.normalisation() / p.normalisation - 1.0).abs() < 1e-13,
            "N of {:?}",
            p.powers
        );
        for (k, case) in r.k_points.iter().zip(&p.cases) {
            let k = from_pairs(k);
            let t = prim.transform(&k);
            let t_ref = c(case.transform[0], case.transform[1]);
            let d = prim.dipole_length(&k);
            let d_ref = from_pairs(&case.dipole_length);
            let et = (t - t_ref).norm() / t_ref.norm().max(1e-300);
            let ed = vec_error(&d, &d_ref);
            worst = worst.max(et).max(ed);
            assert!(
                et < 1e-9 && ed < 1e-9,
                "{:?} at {k}: {t} vs {t_ref}; {d} vs {d_ref}",
                p.powers
            );
        }
    }
    eprintln!("worst relative error of primitive transforms/dipoles vs quadrature: {worst:.2e}");
}

#[test]
fn primitive_overlaps_match_quadrature() {
    // scripts/orbital_reference.py: overlaps of normalised primitives on different centres by
    // 1-D mpmath quadrature.
    let r = reference();
    let prims: Vec<Primitive> = r.primitives.iter().map(primitive_of).collect();
    for o in &r.overlaps {
        let s = prims[o.a].overlap(&prims[o.b]);
        assert!(
            (s - o.overlap).abs() < 1e-12,
            "S[{}][{}] = {s} vs {}",
            o.a,
            o.b,
            o.overlap
        );
        let s_swapped = prims[o.b].overlap(&prims[o.a]);
        assert!((s - s_swapped).abs() < 1e-15);
    }
}

#[test]
fn normalised_primitives_have_unit_self_overlap() {
    // Normalisation N of physics notes §5.2 against the analytic (Obara–Saika) overlap.
    for a in 0..=4u32 {
        for b in 0..=(4 - a) {
            for cz in 0..=(4 - a - b) {
                for alpha in [0.05, 0.7, 13.0] {
                    let p =
                        Primitive::new(Vector3::new(0.3, -1.2, 2.0), alpha, [a, b, cz]).unwrap();
                    assert!(
                        (p.overlap(&p) - 1.0).abs() < 1e-13,
                        "[{a},{b},{cz}] α={alpha}"
                    );
                }
            }
        }
    }
}

#[test]
fn two_centre_overlaps_match_gaussian_product_theorem() {
    // Textbook Gaussian product theorem (Boys 1950; Helgaker, Jørgensen & Olsen §9.2, from
    // memory): ∫ e^{−α|r−A|²} e^{−β|r−B|²} = (π/p)^{3/2} e^{−αβR²/p}, p = α + β, and with a
    // z factor on A: ⟨(z−A_z) e^{−α…}|e^{−β…}⟩ = (P_z − A_z)(π/p)^{3/2} e^{−αβR²/p}.
    let (alpha, beta): (f64, f64) = (0.8, 0.35);
    let a: Vector3<f64> = Vector3::new(0.1, -0.4, 0.9);
    let b = Vector3::new(-0.6, 0.5, -1.3);
    let p = alpha + beta;
    let r2 = (a - b).norm_squared();
    let gpt = (PI / p).powf(1.5) * (-alpha * beta * r2 / p).exp();
    let sa = Primitive::new(a, alpha, [0, 0, 0]).unwrap();
    let sb = Primitive::new(b, beta, [0, 0, 0]).unwrap();
    let expected = gpt * sa.normalisation() * sb.normalisation();
    assert!((sa.overlap(&sb) - expected).abs() < 1e-15 * expected.abs().max(1.0));

    let pz = Primitive::new(a, alpha, [0, 0, 1]).unwrap();
    let pz_centre = (alpha * a.z + beta * b.z) / p;
    let expected_p = (pz_centre - a.z) * gpt * pz.normalisation() * sb.normalisation();
    assert!((pz.overlap(&sb) - expected_p).abs() < 1e-15);
}

// ---------------------------------------------------------------------------------------------
// Orbitals (LCAO)
// ---------------------------------------------------------------------------------------------

#[test]
fn lcao_orbitals_match_quadrature() {
    // scripts/orbital_reference.py: a two-centre orbital with complex coefficients and a
    // contraction, and a three-centre real s/p/f orbital; transform, length dipole and the
    // recombination continuation ∫ e^{+ik·r} r ψ* d³r, at real and complex k, normalised with
    // quadrature overlaps.
    let r = reference();
    let mut worst: f64 = 0.0;
    for o in &r.orbitals {
        let orbital = Orbital::from_spec(&o.spec).unwrap();
        let norm_error =
            (orbital.norm_before_normalisation() / o.norm_before_normalisation - 1.0).abs();
        assert!(
            norm_error < 1e-12,
            "{}: norm {}",
            o.spec.name,
            orbital.norm_before_normalisation()
        );
        assert!((orbital.overlap(&orbital) - 1.0).norm() < 1e-13);
        for (k, case) in r.k_points.iter().zip(&o.cases) {
            let k = from_pairs(k);
            let t_ref = c(case.transform[0], case.transform[1]);
            let et = (orbital.transform(&k) - t_ref).norm() / t_ref.norm();
            let ed = vec_error(&orbital.dipole_length(&k), &from_pairs(&case.dipole_length));
            let er = vec_error(
                &orbital.dipole_length_recombination(&k),
                &from_pairs(&case.dipole_length_recombination),
            );
            worst = worst.max(et).max(ed).max(er);
            assert!(
                et < 1e-9 && ed < 1e-9 && er < 1e-9,
                "{} at {k}: {et:e} {ed:e} {er:e}",
                o.spec.name
            );
        }
    }
    eprintln!("worst relative error of LCAO projections vs quadrature: {worst:.2e}");
}

#[test]
fn lcao_transform_matches_triple_integral() {
    // scripts/orbital_reference.py: triple integral (no factorisation) of the two-centre
    // orbital's transform at one complex k on a 160³ Gauss–Legendre grid (NumPy).
    let r = reference();
    let orbital = Orbital::from_spec(&r.orbitals[0].spec).unwrap();
    let check = &r.triple_integral_check;
    let k = from_pairs(&r.k_points[check.k_index]);
    let expected = c(check.value[0], check.value[1]);
    assert!((orbital.transform(&k) - expected).norm() < 1e-9);
}

#[test]
fn merged_duplicate_terms_give_the_same_orbital() {
    // Mathematics: c·g + c·g = 2c·g, which normalises to the same orbital.
    let single = Orbital::new("one", &[term([0.0, 0.1, 0.2], 0.7, "py", [1.0, 0.5])]).unwrap();
    let twice = Orbital::new(
        "two",
        &[
            term([0.0, 0.1, 0.2], 0.7, "py", [0.5, 0.25]),
            term([0.0, 0.1, 0.2], 0.7, "py", [0.5, 0.25]),
        ],
    )
    .unwrap();
    assert_eq!(twice.primitive_count(), 1);
    let k = Vector3::new(c(0.3, 0.2), c(-0.7, 0.1), c(0.4, -0.5));
    assert!((single.transform(&k) - twice.transform(&k)).norm() < 1e-15);
    assert!((twice.norm_before_normalisation() - single.norm_before_normalisation()).abs() < 1e-15);
}

// ---------------------------------------------------------------------------------------------
// Closed-form model dipoles (physics notes §1.7)
// ---------------------------------------------------------------------------------------------

#[test]
fn hydrogenic_dipole_matches_notes() {
    // Physics notes §1.7 and check #13: κ = 1 (Ip = 0.5), k along z.
    let d = hydrogenic_dipole(&real_k(0.0, 0.0, 0.5), 0.5).unwrap();
    assert!((d.z - c(0.0, -0.9219239077)).norm() < 1e-10, "{d}");
    assert!(d.x.norm() == 0.0 && d.y.norm() == 0.0);
    let d = hydrogenic_dipole(&real_k(0.0, 0.0, 1.3), 0.5).unwrap();
    assert!((d.z - c(0.0, -0.2405146996)).norm() < 1e-10, "{d}");
    // Isotropy of the 1s state: the same magnitude along any direction (mathematics).
    let dx = hydrogenic_dipole(&real_k(1.3, 0.0, 0.0), 0.5).unwrap();
    assert!((dx.x - d.z).norm() < 1e-15);
}

#[test]
fn hydrogenic_dipole_rejects_bad_input_and_pole() {
    assert!(matches!(
        hydrogenic_dipole(&real_k(0.0, 0.0, 1.0), -0.5),
        Err(OrbitalError::InvalidParameter { ref parameter, .. }) if parameter == "ip"
    ));
    // k·k = −2Ip = −1 at k = i ẑ: the pole (the tunnelling saddle of physics notes §1.3).
    let k = Vector3::new(c(0.0, 0.0), c(0.0, 0.0), c(0.0, 1.0));
    assert!(matches!(
        hydrogenic_dipole(&k, 0.5),
        Err(OrbitalError::HydrogenicPole { .. })
    ));
}

#[test]
fn gaussian_s_dipole_matches_s_orbital_at_complex_k() {
    // Physics notes §1.7 closed form vs the general Cartesian route of §5.2 (s primitive at the
    // origin), at a complex k.
    let a = 0.62;
    let s = Orbital::new("s", &[term([0.0; 3], a, "s", [1.0, 0.0])]).unwrap();
    for k in [
        real_k(0.2, -0.4, 1.1),
        Vector3::new(c(0.3, 0.8), c(-0.1, 0.2), c(1.2, -0.6)),
    ] {
        let closed = gaussian_s_dipole(&k, a).unwrap();
        assert!(vec_error(&s.dipole_length(&k), &closed) < 1e-14);
    }
    assert!(gaussian_s_dipole(&real_k(0.0, 0.0, 1.0), 0.0).is_err());
}

// ---------------------------------------------------------------------------------------------
// Two-centre interference (Lein et al., PRL 88, 183903 (2002); physics notes §5.1, check #15)
// ---------------------------------------------------------------------------------------------

const BOND_EXPONENT: f64 = 0.5;

/// Identical s Gaussians at ±R/2 ẑ, R = 2 bohr; `sign` = +1 bonding, −1 antibonding.
fn pair(sign: f64) -> Orbital {
    Orbital::new(
        "pair",
        &[
            term([0.0, 0.0, 1.0], BOND_EXPONENT, "s", [1.0, 0.0]),
            term([0.0, 0.0, -1.0], BOND_EXPONENT, "s", [sign, 0.0]),
        ],
    )
    .unwrap()
}

fn along(k: f64, theta: f64) -> CVec {
    real_k(k * theta.sin(), 0.0, k * theta.cos())
}

#[test]
fn pair_transform_matches_lcao_interference_factor() {
    // Physics notes §5.1: ψ̃ = 2Nφ̃ cos(k·R/2) (bonding), −2iNφ̃ sin(k·R/2) (antibonding),
    // N = 1/(norm of φ(r−R/2) ± φ(r+R/2)); checked at complex k too.
    let atom = Primitive::new(Vector3::zeros(), BOND_EXPONENT, [0, 0, 0]).unwrap();
    let k = Vector3::new(c(0.4, 0.3), c(-0.2, 0.1), c(1.3, -0.4));
    let half_k_dot_r = k.z; // R/2 = ẑ
    for (sign, factor) in [
        (1.0, 2.0 * half_k_dot_r.cos()),
        (-1.0, c(0.0, -2.0) * half_k_dot_r.sin()),
    ] {
        let orbital = pair(sign);
        let expected = atom.transform(&k) * factor / orbital.norm_before_normalisation();
        assert!(
            (orbital.transform(&k) - expected).norm() < 1e-15,
            "sign {sign}"
        );
    }
}

#[test]
fn bonding_pair_velocity_dipole_vanishes_at_k_r_cos_theta_pi() {
    // Lein et al. 2002: bonding minimum at k R cos θ = π (physics notes §5.1; DESIGN §5 table).
    let bonding = pair(1.0);
    let atom = Primitive::new(Vector3::zeros(), BOND_EXPONENT, [0, 0, 0]).unwrap();
    for theta_deg in [0.0_f64, 30.0, 45.0] {
        let theta = theta_deg.to_radians();
        let k0 = PI / (2.0 * theta.cos());
        let k_hat = along(1.0, theta);
        let along_k = |k: f64| (k_hat.dot(&bonding.dipole_velocity(&along(k, theta)))).re;
        // Scale: k0 |2Nφ̃(k0)|, the largest value the interference factor allows at k0.
        let scale = k0 * 2.0 * atom.transform(&along(k0, theta)).norm()
            / bonding.norm_before_normalisation();
        assert!(
            along_k(k0).abs() < 1e-14 * scale,
            "θ={theta_deg}: {}",
            along_k(k0)
        );
        assert!(
            along_k(k0 - 0.05) * along_k(k0 + 0.05) < 0.0,
            "no sign change at θ={theta_deg}"
        );
    }
}

#[test]
fn antibonding_pair_has_no_zero_at_pi_but_at_two_pi() {
    // Lein et al. 2002 (physics notes §5.1): antibonding minima at k R cos θ = 2πn.
    let anti = pair(-1.0);
    let atom = Primitive::new(Vector3::zeros(), BOND_EXPONENT, [0, 0, 0]).unwrap();
    for theta_deg in [0.0_f64, 30.0, 45.0] {
        let theta = theta_deg.to_radians();
        let envelope = |k: f64| {
            2.0 * atom.transform(&along(k, theta)).norm() / anti.norm_before_normalisation()
        };
        let k_pi = PI / (2.0 * theta.cos());
        // |sin(π/2)| = 1: the antibonding pair has its interference maximum there.
        assert!((anti.transform(&along(k_pi, theta)).norm() / envelope(k_pi) - 1.0).abs() < 1e-13);
        let k_2pi = PI / theta.cos();
        let v = anti.dipole_velocity(&along(k_2pi, theta)).norm();
        assert!(v < 1e-14 * k_2pi * envelope(k_2pi), "θ={theta_deg}: {v}");
    }
}

/// Bisection for the zero of `f` in `[lo, hi]` (sign change assumed).
fn bisect(f: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> f64 {
    let f_lo = f(lo);
    assert!(f_lo * f(hi) < 0.0, "no sign change in [{lo}, {hi}]");
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) * f_lo > 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-15 {
            break;
        }
    }
    0.5 * (lo + hi)
}

#[test]
fn bonding_pair_length_form_zero_is_shifted() {
    // Chirilă & Lein, PRA 73, 023410 (2006): the length form adds a term ∝ R sin(k·R/2) that
    // moves the two-centre minimum. For s Gaussians with α = 0.5 at ±1 ẑ (R = 2), θ = 0, the
    // length-form dipole vanishes at k = 2.028757838110434 (root of tan k = −k), not at
    // k = π/2 = 1.5707963: a shift of +0.4580 a.u. (k²/2 moves from 1.2337 to 2.0579 hartree).
    // Reference: scripts/orbital_reference.py, brentq on the quadrature of ∫e^{−ikz} z ψ dz.
    let r = reference();
    let zero_ref = &r.length_form_zero;
    assert_eq!(zero_ref.exponent, BOND_EXPONENT);
    assert_eq!(zero_ref.bond_length_bohr, 2.0);
    let bonding = pair(1.0);
    let d_z = |k: f64| bonding.dipole_length(&along(k, 0.0)).z.im;
    let k_zero = bisect(d_z, PI / 2.0 + 1e-6, PI - 1e-6);
    assert!(
        (k_zero - zero_ref.k_zero_quadrature).abs() < 1e-10,
        "{k_zero}"
    );
    assert!(
        (k_zero - 2.028757838110434).abs() < 1e-10,
        "pinned value: {k_zero}"
    );
    assert!((k_zero - PI / 2.0 - 0.458).abs() < 1e-3);
    // At θ = 0 the dipole is along the bond only, so the whole vector vanishes there.
    let d = bonding.dipole_length(&along(k_zero, 0.0));
    assert!(d.norm() < 1e-12, "{d}");
}

// ---------------------------------------------------------------------------------------------
// Analytic continuation (physics notes §0)
// ---------------------------------------------------------------------------------------------

fn complex_orbital() -> Orbital {
    Orbital::new(
        "complex",
        &[
            term([0.0, 0.0, -0.7], 0.9, "s", [0.8, 0.1]),
            term([0.0, 0.0, -0.7], 0.9, "dxz", [0.2, -0.1]),
            term([0.1, 0.2, 0.7], 0.6, "pz", [-0.5, 0.3]),
            term([-0.3, 0.5, 0.2], 1.1, "fxyy", [0.1, 0.4]),
        ],
    )
    .unwrap()
}

#[test]
fn recombination_continuation_matches_direct_evaluation() {
    // d̄(k) = [d(k*)]* equals ⟨ψ|r|k⟩ continued: ∫ e^{+ik·r} r ψ* d³r = d_{ψ*}(−k), where ψ*
    // has conjugated coefficients (the primitives are real). Mathematics; the quadrature of
    // the same integral is checked in `lcao_orbitals_match_quadrature`.
    let psi = complex_orbital();
    let conj_terms: Vec<TermSpec> = [
        term([0.0, 0.0, -0.7], 0.9, "s", [0.8, -0.1]),
        term([0.0, 0.0, -0.7], 0.9, "dxz", [0.2, 0.1]),
        term([0.1, 0.2, 0.7], 0.6, "pz", [-0.5, -0.3]),
        term([-0.3, 0.5, 0.2], 1.1, "fxyy", [0.1, -0.4]),
    ]
    .to_vec();
    let psi_conj = Orbital::new("conjugate", &conj_terms).unwrap();
    for k in [
        Vector3::new(c(0.4, 0.3), c(-0.2, 0.1), c(0.9, -0.4)),
        Vector3::new(c(0.1, 1.1), c(0.6, -0.2), c(-1.3, 0.5)),
    ] {
        let minus_k = -k;
        let direct = psi_conj.dipole_length(&minus_k);
        assert!(vec_error(&psi.dipole_length_recombination(&k), &direct) < 1e-13);
        let t_direct = psi_conj.transform(&minus_k);
        assert!((psi.transform_recombination(&k) - t_direct).norm() < 1e-14);
        let v_direct = k * t_direct;
        assert!(vec_error(&psi.dipole_velocity_recombination(&k), &v_direct) < 1e-13);
    }
}

/// ∂ψ̃/∂k_axis by a fourth-order central difference with a complex step `h` (real or
/// imaginary): for an analytic function both must agree (Cauchy–Riemann).
fn partial_derivative(
    orbital: &impl PlaneWaveProjection,
    k: &CVec,
    axis: usize,
    h: Complex64,
) -> Complex64 {
    let f = |s: f64| {
        let mut q = *k;
        q[axis] += h * s;
        orbital.transform(&q)
    };
    (f(-2.0) - 8.0 * f(-1.0) + 8.0 * f(1.0) - f(2.0)) / (12.0 * h)
}

/// Largest relative deviation of d(k) from i∇ψ̃ (real and imaginary steps).
fn check_gradient(orbital: &impl PlaneWaveProjection, k: &CVec) -> f64 {
    let d = orbital.dipole_length(k);
    let scale = d.iter().map(|x| x.norm()).fold(1e-3, f64::max);
    let mut worst: f64 = 0.0;
    for axis in 0..3 {
        for h in [c(1e-3, 0.0), c(0.0, 1e-3)] {
            let from_difference = c(0.0, 1.0) * partial_derivative(orbital, k, axis, h);
            worst = worst.max((from_difference - d[axis]).norm() / scale);
        }
    }
    worst
}

#[test]
fn length_dipole_is_i_gradient_of_transform_at_complex_k() {
    // Physics notes §0: d(k) = i∇_k ψ̃(k); finite differences at complex k along real and
    // imaginary steps (common practice, cf. STYLE.md "derivatives against finite differences").
    let psi = complex_orbital();
    for k in [
        Vector3::new(c(0.4, 0.3), c(-0.2, 0.1), c(0.9, -0.4)),
        Vector3::new(c(1.5, -0.8), c(0.0, 0.7), c(-0.6, 1.2)),
    ] {
        let e = check_gradient(&psi, &k);
        assert!(e < 1e-9, "{k}: {e:e}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]
    #[test]
    fn length_dipole_is_i_gradient_for_random_complex_k(
        kr in proptest::array::uniform3(-2.0f64..2.0),
        ki in proptest::array::uniform3(-1.2f64..1.2),
    ) {
        // Physics notes §0, as above, over random complex k.
        let k = Vector3::new(c(kr[0], ki[0]), c(kr[1], ki[1]), c(kr[2], ki[2]));
        let e = check_gradient(&complex_orbital(), &k);
        prop_assert!(e < 1e-8, "{}: {:e}", k, e);
    }
}

#[test]
fn length_form_picks_up_origin_shift() {
    // Module doc (mathematics): moving every centre by b changes d(k) by
    // b ψ̃_shifted(k) on top of the phase: d_b(k) = e^{−ik·b}(d(k) + b ψ̃(k)).
    let b = [0.4, -0.3, 1.1];
    let terms = [
        term([0.0, 0.0, -0.7], 0.9, "s", [0.8, 0.1]),
        term([0.1, 0.2, 0.7], 0.6, "pz", [-0.5, 0.3]),
    ];
    let shifted: Vec<TermSpec> = terms
        .iter()
        .map(|t| {
            let mut t = t.clone();
            for (x, s) in t.centre_bohr.iter_mut().zip(b) {
                *x += s;
            }
            t
        })
        .collect();
    let psi = Orbital::new("at origin", &terms).unwrap();
    let psi_b = Orbital::new("shifted", &shifted).unwrap();
    let k = Vector3::new(c(0.5, 0.2), c(-0.3, 0.4), c(0.8, -0.1));
    let bv = Vector3::new(c(b[0], 0.0), c(b[1], 0.0), c(b[2], 0.0));
    let phase = (c(0.0, -1.0) * k.dot(&bv)).exp();
    let expected = (psi.dipole_length(&k) + bv * psi.transform(&k)) * phase;
    assert!(vec_error(&psi_b.dipole_length(&k), &expected) < 1e-14);
    assert!(
        vec_error(
            &psi_b.dipole_velocity(&k),
            &(psi.dipole_velocity(&k) * phase)
        ) < 1e-14
    );
}

// ---------------------------------------------------------------------------------------------
// Rotation
// ---------------------------------------------------------------------------------------------

/// Euler ZYZ rotation R = R_z(a) R_y(b) R_z(g) (molecular → lab).
fn euler_zyz(a: f64, b: f64, g: f64) -> Matrix3<f64> {
    let rz = |t: f64| Matrix3::new(t.cos(), -t.sin(), 0.0, t.sin(), t.cos(), 0.0, 0.0, 0.0, 1.0);
    let ry = |t: f64| Matrix3::new(t.cos(), 0.0, t.sin(), 0.0, 1.0, 0.0, -t.sin(), 0.0, t.cos());
    rz(a) * ry(b) * rz(g)
}

/// The lab-frame terms of a molecule rotated by `r`: ψ_lab(r) = ψ_mol(Rᵀr), expanded into
/// Cartesian monomials of v = r − RA (a monomial x^a y^b z^c of Rᵀv is multiplied out).
fn rotate_terms(terms: &[TermSpec], r: &Matrix3<f64>) -> Vec<TermSpec> {
    let mut out = Vec::new();
    for t in terms {
        let powers = t.cartesian.powers("test").unwrap();
        let alpha = t.exponents_inv_bohr2[0];
        let n_mol = Primitive::new(Vector3::zeros(), alpha, powers)
            .unwrap()
            .normalisation();
        // polynomial in v: list of (powers, coefficient)
        let mut poly: Vec<([u32; 3], f64)> = vec![([0, 0, 0], 1.0)];
        for (axis, &power) in powers.iter().enumerate() {
            for _ in 0..power {
                let mut next: Vec<([u32; 3], f64)> = Vec::new();
                for (p, coef) in &poly {
                    for j in 0..3 {
                        let mut q = *p;
                        q[j] += 1;
                        let add = coef * r[(j, axis)];
                        match next.iter_mut().find(|(e, _)| *e == q) {
                            Some(e) => e.1 += add,
                            None => next.push((q, add)),
                        }
                    }
                }
                poly = next;
            }
        }
        let centre = r * Vector3::from(t.centre_bohr);
        for (q, coef) in poly {
            if coef == 0.0 {
                continue;
            }
            let n_lab = Primitive::new(Vector3::zeros(), alpha, q)
                .unwrap()
                .normalisation();
            let scale = coef * n_mol / n_lab;
            out.push(TermSpec {
                centre_bohr: [centre.x, centre.y, centre.z],
                exponents_inv_bohr2: vec![alpha],
                contraction: vec![],
                cartesian: CartesianSpec::Powers(q),
                coefficient: [t.coefficient[0] * scale, t.coefficient[1] * scale],
            });
        }
    }
    out
}

#[test]
fn rotating_the_molecule_equals_rotating_k() {
    // Mathematics: ψ_lab(r) = ψ_mol(Rᵀr) ⇒ ψ̃_lab(k) = ψ̃_mol(Rᵀk), d_lab(k) = R d_mol(Rᵀk).
    let terms = vec![
        term([0.0, 0.0, -0.7], 0.9, "s", [0.8, 0.1]),
        term([0.3, 0.0, -0.7], 0.8, "px", [0.3, -0.2]),
        term([0.0, 0.0, -0.7], 0.9, "dxz", [0.2, -0.1]),
        term([0.1, 0.2, 0.7], 0.6, "dzz", [-0.5, 0.3]),
        term([-0.4, 0.1, 0.2], 1.2, "py", [0.4, 0.0]),
    ];
    let molecule = Orbital::new("mol", &terms).unwrap();
    let proper = euler_zyz(0.7, 1.1, -0.4);
    let mirror = Matrix3::new(1.0, 0.0, 0.0, 0.0, -1.0, 0.0, 0.0, 0.0, 1.0);
    for r in [proper, mirror * proper] {
        let rotated_view = Rotated::new(&molecule, &r).unwrap();
        let rebuilt = Orbital::new("lab", &rotate_terms(&terms, &r)).unwrap();
        assert!(
            (rebuilt.norm_before_normalisation() / molecule.norm_before_normalisation() - 1.0)
                .abs()
                < 1e-13
        );
        for k in [
            real_k(0.3, -1.1, 0.6),
            Vector3::new(c(0.4, 0.3), c(-0.9, 0.1), c(0.2, -0.6)),
        ] {
            assert!((rotated_view.transform(&k) - rebuilt.transform(&k)).norm() < 1e-14);
            assert!(vec_error(&rotated_view.dipole_length(&k), &rebuilt.dipole_length(&k)) < 1e-13);
            assert!(
                vec_error(
                    &rotated_view.dipole_velocity(&k),
                    &rebuilt.dipole_velocity(&k)
                ) < 1e-13
            );
            assert!(
                vec_error(
                    &rotated_view.dipole_length_recombination(&k),
                    &rebuilt.dipole_length_recombination(&k)
                ) < 1e-13
            );
        }
    }
}

#[test]
fn rotation_rejects_non_orthogonal_matrix() {
    let molecule = Orbital::new("mol", &[term([0.0; 3], 1.0, "s", [1.0, 0.0])]).unwrap();
    let sheared = Matrix3::new(1.0, 0.1, 0.0, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0);
    assert!(matches!(
        Rotated::new(&molecule, &sheared),
        Err(OrbitalError::NotOrthogonal { .. })
    ));
    let nan = Matrix3::from_element(f64::NAN);
    assert!(matches!(
        Rotated::new(&molecule, &nan),
        Err(OrbitalError::NotOrthogonal { .. })
    ));
}

// ---------------------------------------------------------------------------------------------
// Errors and the description format
// ---------------------------------------------------------------------------------------------

fn build_error(terms: &[TermSpec]) -> OrbitalError {
    Orbital::new("sigma_g", terms).unwrap_err()
}

#[test]
fn errors_name_the_orbital_term_and_parameter() {
    let good = term([0.0; 3], 1.0, "s", [1.0, 0.0]);

    let err = Orbital::new("sigma_g", &[]).unwrap_err();
    assert_eq!(
        err,
        OrbitalError::EmptyOrbital {
            orbital: "sigma_g".into()
        }
    );
    assert!(err.to_string().contains("sigma_g"));

    for bad_exponent in [0.0, -0.3, f64::NAN] {
        let err = build_error(&[good.clone(), term([0.0; 3], bad_exponent, "s", [1.0, 0.0])]);
        let OrbitalError::InvalidParameter {
            item, parameter, ..
        } = &err
        else {
            panic!("{err}")
        };
        assert_eq!(item, "orbital `sigma_g` terms[1]");
        assert_eq!(parameter, "exponents_inv_bohr2[0]");
        assert!(err.to_string().contains("positive"), "{err}");
    }

    for bad in [[f64::NAN, 0.0], [0.0, f64::INFINITY], [0.0, 0.0]] {
        let err = build_error(&[term([0.0; 3], 1.0, "s", bad)]);
        assert!(
            matches!(&err, OrbitalError::InvalidParameter { parameter, item, .. }
            if parameter == "coefficient" && item == "orbital `sigma_g` terms[0]"),
            "{err}"
        );
    }

    let err = build_error(&[term([0.0, f64::NAN, 0.0], 1.0, "s", [1.0, 0.0])]);
    assert!(
        matches!(&err, OrbitalError::InvalidParameter { parameter, .. } if parameter == "centre_bohr")
    );

    for label in ["dx", "px2", "h", "Px", "fxyzz"] {
        let err = build_error(&[term([0.0; 3], 1.0, label, [1.0, 0.0])]);
        assert!(
            matches!(&err, OrbitalError::InvalidParameter { parameter, value, .. }
            if parameter == "cartesian" && value.contains(label)),
            "{label}: {err}"
        );
    }
    let mut high = good.clone();
    high.cartesian = CartesianSpec::Powers([2, 2, 1]);
    assert!(
        matches!(build_error(&[high]), OrbitalError::InvalidParameter { ref parameter, .. } if parameter == "cartesian")
    );

    let mut contracted = good.clone();
    contracted.exponents_inv_bohr2 = vec![1.0, 0.3];
    let err = build_error(&[contracted.clone()]);
    assert!(
        matches!(&err, OrbitalError::InvalidParameter { parameter, .. } if parameter == "contraction")
    );
    contracted.contraction = vec![0.5, f64::NAN];
    let err = build_error(&[contracted]);
    assert!(
        matches!(&err, OrbitalError::InvalidParameter { parameter, .. } if parameter == "contraction[1]")
    );

    let mut no_exponents = good.clone();
    no_exponents.exponents_inv_bohr2.clear();
    assert!(
        matches!(build_error(&[no_exponents]), OrbitalError::InvalidParameter { ref parameter, .. } if parameter == "exponents_inv_bohr2")
    );
}

#[test]
fn cancelling_terms_are_non_normalisable() {
    // g − g = 0 exactly: merged away, norm 0.
    let err = build_error(&[
        term([0.0; 3], 1.0, "px", [1.0, 0.0]),
        term([0.0; 3], 1.0, "px", [-1.0, 0.0]),
    ]);
    assert!(
        matches!(&err, OrbitalError::NonNormalisable { item, .. } if item == "orbital `sigma_g`"),
        "{err}"
    );
    assert!(err.to_string().contains("non-normalisable"));
    // Two almost identical exponents with opposite signs: the norm is lost in rounding.
    let mut t = term([0.0; 3], 1.0, "s", [1.0, 0.0]);
    t.exponents_inv_bohr2 = vec![1.0, 1.0 + 1e-15];
    t.contraction = vec![1.0, -1.0];
    let err = build_error(&[t]);
    assert!(
        matches!(&err, OrbitalError::NonNormalisable { item, .. } if item.contains("terms[0]")),
        "{err}"
    );
}

#[test]
fn description_parses_labels_and_powers_and_rejects_unknown_keys() {
    let json = r#"{"name": "pi_u", "terms": [
        {"centre_bohr": [0, 0, 1.1], "exponents_inv_bohr2": [0.9, 0.2], "contraction": [0.3, 0.8],
         "cartesian": "px", "coefficient": [0.7, 0]},
        {"centre_bohr": [0, 0, -1.1], "exponents_inv_bohr2": [0.5], "cartesian": [1, 0, 0],
         "coefficient": [0.7, 0]}]}"#;
    let spec: OrbitalSpec = serde_json::from_str(json).unwrap();
    assert_eq!(spec.terms[0].cartesian, CartesianSpec::Label("px".into()));
    assert_eq!(spec.terms[1].cartesian, CartesianSpec::Powers([1, 0, 0]));
    assert_eq!(spec.terms[0].cartesian.powers("t").unwrap(), [1, 0, 0]);
    let orbital = Orbital::from_spec(&spec).unwrap();
    assert_eq!(orbital.name(), "pi_u");
    assert_eq!(orbital.primitive_count(), 3);
    let round_trip: OrbitalSpec =
        serde_json::from_str(&serde_json::to_string(&spec).unwrap()).unwrap();
    assert_eq!(round_trip, spec);

    let unknown = json.replace(
        "\"cartesian\": \"px\"",
        "\"cartesian\": \"px\", \"colour\": 1",
    );
    assert!(serde_json::from_str::<OrbitalSpec>(&unknown).is_err());
}
