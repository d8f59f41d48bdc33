//! The saddle-point equations: closed-form action, analytic derivatives against finite
//! differences, and published saddle values.

use holecast::field::{Colour, Envelope, Field, Polarization};
use holecast::laser::LaserSpec;
use holecast::orbits::{
    Branch, ChannelPair, GaussianTerm, OrbitPoint, OrbitSettings, PhaseStructure, evaluate,
    solve_orbits,
};
use nalgebra::Vector3;
use num_complex::Complex64;

fn cos_field(f: f64, w: f64) -> Field {
    Field::new(
        &[Colour {
            omega: w,
            peak_field: f,
            phase: 0.0,
            polarization: Polarization::Linear { angle: 0.0 },
        }],
        Envelope::Continuous,
    )
    .unwrap()
}

#[test]
fn action_matches_the_lewenstein_closed_form() {
    // Physics notes §1.2 (Lewenstein et al. 1994 closed form, verified there numerically):
    // ω = 1, Up = 1/4 (F = 1), Ip = 0.3, t = 4.1, τ = 3.6 → S = 1.674608572167216 (with Ip).
    let field = cos_field(1.0, 1.0);
    let (t, tau) = (4.1, 3.6);
    let e = evaluate(
        &field,
        ChannelPair::single(0.3),
        0.0,
        Complex64::new(t, 0.0),
        Complex64::new(t - tau, 0.0),
    );
    // Φ = Ω t_r − S_kin − Ip t_r + Ip t_i = −(S_kin + Ip τ) at Ω = 0.
    let s = -e.action;
    assert!((s.re - 1.674_608_572_167_216).abs() < 1e-12, "{s}");
    assert!(s.im.abs() < 1e-15);
}

#[test]
fn hessian_matches_finite_differences_at_complex_times() {
    // Physics notes §1.5: the analytic Hessian agrees with central differences to ≤ 4e-10 at
    // ωt_r = 4.2+0.05i, ωt_i = 0.4+0.3i, ω = F = 1, Ip = 0.3. We check the residuals (first
    // derivatives of Φ) and the Hessian by differentiating Φ and the residuals numerically, for
    // this field and an elliptical two-colour one.
    let two = Field::new(
        &[
            Colour {
                omega: 1.0,
                peak_field: 1.0,
                phase: 0.2,
                polarization: Polarization::Elliptical {
                    ellipticity: 0.3,
                    major_axis: 0.1,
                },
            },
            Colour {
                omega: 2.0,
                peak_field: 0.4,
                phase: 1.0,
                polarization: Polarization::Linear { angle: 1.2 },
            },
        ],
        Envelope::Continuous,
    )
    .unwrap();
    // With Gaussian structure in the phase (orbits::equations, derived there): the same checks
    // for an ionization shell, a recombination shell and both, off the origin.
    let ion = GaussianTerm {
        quarter: 0.25 / 0.45,
        centre: Vector3::new(0.3, -0.2, 1.1),
    };
    let rec = GaussianTerm {
        quarter: 0.25 / 0.6,
        centre: Vector3::new(-0.4, 0.1, -0.7),
    };
    let structures = [
        PhaseStructure::default(),
        PhaseStructure {
            ion: Some(ion),
            rec: None,
        },
        PhaseStructure {
            ion: None,
            rec: Some(rec),
        },
        PhaseStructure {
            ion: Some(ion),
            rec: Some(rec),
        },
    ];
    for (field, structure) in [cos_field(1.0, 1.0), two]
        .into_iter()
        .flat_map(|f| structures.map(|s| (f.clone(), s)))
    {
        let pair = ChannelPair {
            structure,
            ..ChannelPair::new(0.3, 0.45)
        };
        let omega = 1.7;
        let tr = Complex64::new(4.2, 0.05);
        let ti = Complex64::new(0.4, 0.3);
        let e = evaluate(&field, pair, omega, tr, ti);
        let h = 1e-5;
        let phi = |a: Complex64, b: Complex64| evaluate(&field, pair, omega, a, b).action;
        // ∂Φ/∂t_i = f1, ∂Φ/∂t_r = −f2.
        let dphi_i = (phi(tr, ti + h) - phi(tr, ti - h)) / (2.0 * h);
        let dphi_r = (phi(tr + h, ti) - phi(tr - h, ti)) / (2.0 * h);
        assert!(
            (dphi_i - e.residual[0]).norm() < 1e-8,
            "{dphi_i} {}",
            e.residual[0]
        );
        assert!((dphi_r + e.residual[1]).norm() < 1e-8);
        // Hessian from differences of the residuals.
        let res = |a: Complex64, b: Complex64| evaluate(&field, pair, omega, a, b).residual;
        let [rr, ri, ii] = e.hessian;
        let d_rr = -(res(tr + h, ti)[1] - res(tr - h, ti)[1]) / (2.0 * h);
        let d_ii = (res(tr, ti + h)[0] - res(tr, ti - h)[0]) / (2.0 * h);
        let d_ri = (res(tr + h, ti)[0] - res(tr - h, ti)[0]) / (2.0 * h);
        for (a, b) in [(rr, d_rr), (ii, d_ii), (ri, d_ri)] {
            assert!((a - b).norm() < 4e-10 * (1.0 + a.norm()), "{a} vs {b}");
        }
    }
}

/// Notes' saddles for H (Ip = 0.5), 800 nm, 2e14 W/cm² (physics notes §2.1, NUM), given there
/// with ω = 0.0569542 and Up = 0.4392179 a.u.
const NOTES: [(u32, Branch, [f64; 8]); 4] = [
    (
        21,
        Branch::Short,
        [
            0.5931127,
            0.8856940,
            3.238691,
            -0.0801218,
            41.6063459,
            5.4019270,
            -1.76405e-3,
            -4.53860e-3,
        ],
    ),
    (
        21,
        Branch::Long,
        [
            0.0925967,
            0.7006189,
            5.397985,
            0.0026192,
            21.6665343,
            4.2206531,
            -4.17515e-4,
            6.64005e-3,
        ],
    ),
    (
        25,
        Branch::Short,
        [
            0.5424310,
            0.8472031,
            3.458946,
            -0.0642792,
            55.0042035,
            5.1161070,
            -1.41219e-3,
            -4.90257e-3,
        ],
    ),
    (
        25,
        Branch::Long,
        [
            0.1194939,
            0.7026297,
            5.216401,
            0.0041515,
            42.8961926,
            4.2339099,
            -3.61108e-4,
            6.52241e-3,
        ],
    ),
];

#[test]
fn hydrogen_saddles_match_published_values() {
    // Use the notes' rounded ω and Up so that the comparison is not limited by constants.
    let w = 0.056_954_2;
    let f = 2.0 * w * 0.439_217_9f64.sqrt();
    let field = cos_field(f, w);
    let energies = [21.0 * w, 25.0 * w];
    let table = solve_orbits(
        &field,
        ChannelPair::single(0.5),
        &energies,
        &OrbitSettings::default(),
    )
    .unwrap();
    for (q, branch, v) in NOTES {
        let k = if q == 21 { 0 } else { 1 };
        let fam = table
            .families
            .iter()
            .find(|f| f.half_cycle == 0 && f.label.branch == branch && f.label.return_index == 1)
            .expect("family");
        let OrbitPoint::Solved(s) = fam.points[k] else {
            panic!("failed")
        };
        let ti = s.t_ion * w;
        let tr = s.t_ret * w;
        // Times to 1e-6 (the notes' digits), Φ to 1e-6 relative (notes: tol 1e-6), det H of S
        // (equal to det of Φ's Hessian) to 1e-5 relative.
        assert!(
            (ti.re - v[0]).abs() < 2e-6 && (ti.im - v[1]).abs() < 2e-6,
            "{q} {branch:?} ωt_i {ti}"
        );
        assert!(
            (tr.re - v[2]).abs() < 2e-6 && (tr.im - v[3]).abs() < 2e-6,
            "{q} {branch:?} ωt_r {tr}"
        );
        let phi = Complex64::new(v[4], v[5]);
        assert!(
            (s.action - phi).norm() < 1e-6 * phi.norm(),
            "{q} {branch:?} Φ {} vs {phi}",
            s.action
        );
        let det = Complex64::new(v[6], v[7]);
        assert!(
            (s.det_hessian - det).norm() < 1e-5 * det.norm(),
            "{q} {branch:?} det {}",
            s.det_hessian
        );
        assert!(s.residual < 1e-11 && s.t_ion.im > 0.0);
    }
}

#[test]
fn second_half_cycle_is_the_first_shifted_by_half_a_period() {
    // Symmetry of E = F cos ωt: A(t + T/2) = −A(t), so the saddles of half cycle 1 are those of
    // half cycle 0 shifted by T/2; for a single channel the Ip terms cancel in τ and
    // Φ₁ = Φ₀ + ΩT/2 (mathematics).
    let field = LaserSpec::monochromatic(1.5e14, 1000.0).to_field().unwrap();
    let w = field.omega();
    let half = std::f64::consts::PI / w;
    let energies: Vec<f64> = (15..40).map(|q| q as f64 * w).collect();
    let table = solve_orbits(
        &field,
        ChannelPair::single(0.58),
        &energies,
        &OrbitSettings::default(),
    )
    .unwrap();
    for f0 in table.families.iter().filter(|f| f.half_cycle == 0) {
        let f1 = table
            .families
            .iter()
            .find(|f| f.half_cycle == 1 && f.label == f0.label)
            .unwrap();
        for (k, energy) in energies.iter().enumerate() {
            let (a, b) = (
                f0.points[k].saddle().unwrap(),
                f1.points[k].saddle().unwrap(),
            );
            assert!((b.t_ion - a.t_ion - half).norm() < 1e-8);
            assert!((b.t_ret - a.t_ret - half).norm() < 1e-8);
            assert!((b.action - a.action - energy * half).norm() < 1e-7);
        }
    }
}
