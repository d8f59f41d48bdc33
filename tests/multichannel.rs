//! The multichannel dipole: consistency with the one-channel path, coherent sums, channel
//! order, orientation averaging, hole populations and symmetry selection rules.

use holecast::dipole::{SaddleSum, kernels};
use holecast::field::{CVec3, Field};
use holecast::hole::{ComplexHole, HoleContour, HolePropagator};
use holecast::laser::LaserSpec;
use holecast::multichannel::{
    MultichannelSettings, MultichannelSpectrum, StructurePlacement, assemble, assemble_serial,
    trajectory_stage,
};
use holecast::orbits::{ChannelPair, OrbitSettings, solve_orbits};
use holecast::target::{OrientationSpec, Target, TargetSpec};

fn load(name: &str) -> TargetSpec {
    let path = format!("{}/channels/{name}", env!("CARGO_MANIFEST_DIR"));
    TargetSpec::from_json(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn parse(text: &str) -> TargetSpec {
    TargetSpec::from_json(text).unwrap()
}

fn field() -> Field {
    LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap()
}

fn orders(field: &Field, qs: impl Iterator<Item = f64>) -> Vec<f64> {
    qs.map(|q| q * field.omega()).collect()
}

fn run(
    target: &Target,
    field: &Field,
    energies: &[f64],
    settings: &MultichannelSettings,
) -> MultichannelSpectrum {
    let stage = trajectory_stage(field, target, energies, settings).unwrap();
    assemble(field, target, &stage, settings.linear_fast_path, &|_, _| {}).unwrap()
}

fn largest(v: &[CVec3]) -> f64 {
    v.iter().map(|d| d.norm()).fold(0.0, f64::max)
}

/// Largest difference between two dipole series relative to the largest value.
fn difference(a: &[CVec3], b: &[CVec3]) -> f64 {
    let scale = largest(a).max(largest(b));
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y).norm())
        .fold(0.0, f64::max)
        / scale
}

/// The plain saddle sum of one channel written out from the orbit table, the kernels and the
/// models, with no multichannel machinery: `D = Σ_s K_s d̄(v_r) [E·d(v_i)]`.
fn plain_sum(target: &Target, field: &Field, energies: &[f64], sum: SaddleSum) -> Vec<CVec3> {
    let c = &target.channels[0];
    let table = solve_orbits(
        field,
        ChannelPair::single(c.ip),
        energies,
        &OrbitSettings::default(),
    )
    .unwrap();
    let k = kernels(&table, sum, 0.0);
    (0..energies.len())
        .map(|i| {
            let mut d = CVec3::zeros();
            for (f, family) in table.families.iter().enumerate() {
                if let Some(s) = family.points[i].saddle() {
                    let pre = c.recombination.vector(&s.v_ret, energies[i])
                        * c.ionization.factor(&s.v_ion, &s.e_ion, &s.e_exit);
                    d += pre * k.values[f][i].value;
                }
            }
            d
        })
        .collect()
}

#[test]
fn one_channel_target_equals_the_plain_saddle_sum() {
    // Consistency (common practice, no external source): with one channel, no couplings, no
    // orientation dependence and the structure in the prefactor, the multichannel path (which
    // is also the only path for atoms) evaluates exactly Σ_s K_s d̄ (E·d).
    let field = field();
    let target = load("hydrogen.json").validate().unwrap();
    let energies = orders(&field, (9..=33).map(f64::from));
    let prefactor = MultichannelSettings {
        ionization_structure: StructurePlacement::Prefactor,
        recombination_structure: StructurePlacement::Prefactor,
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let direct = plain_sum(&target, &field, &energies, SaddleSum::Uniform);
    let multi = run(&target, &field, &energies, &prefactor);
    // The factorised linear-field path evaluates the structure factors at the exact momenta
    // |v_r| = sqrt(2(Ω − Ip)), |v_i| = sqrt(2 Ip), which the converged saddles satisfy to their
    // residual (≤ 1e-11 relative): measured difference 3e-12.
    assert!(difference(&multi.total, &direct) < 1e-10);
    let per_saddle = MultichannelSettings {
        linear_fast_path: false,
        ..prefactor
    };
    let slow = run(&target, &field, &energies, &per_saddle);
    assert!(difference(&slow.total, &direct) < 1e-14);
    // Target::one_channel builds the same target as the file.
    let c = &target.channels[0];
    let built = Target::one_channel(c.ip, c.ionization.clone(), c.recombination.clone()).unwrap();
    let again = run(&built, &field, &energies, &prefactor);
    assert!(difference(&again.total, &multi.total) < 1e-15);
}

const TWO_IDENTICAL: &str = r#"{
  "name": "two identical channels", "invented": true,
  "channels": [
    { "label": "X", "ip_ev": 14.0, "ionization": { "model": "gaussian", "exponent_au": 0.4 },
      "recombination": { "model": "gaussian", "exponent_au": 0.3 } },
    { "label": "Y", "ip_ev": 14.0, "ionization": { "model": "constant", "amplitude": [0.002, 0.001] },
      "recombination": { "model": "hydrogenic" } }
  ]
}"#;

#[test]
fn identical_uncoupled_channels_add_coherently() {
    // The dipole is a coherent sum over channels (Smirnova et al., Nature 460, 972 (2009),
    // Eq. 1-type factorisation, from memory): uncoupled, it is the sum of one-channel dipoles.
    let field = field();
    let target = parse(TWO_IDENTICAL).validate().unwrap();
    let energies = orders(&field, (11..=31).map(f64::from));
    let multi = run(&target, &field, &energies, &MultichannelSettings::default());
    assert_eq!(multi.pairs.len(), 2, "uncoupled: only the diagonal pairs");
    let mut sum = vec![CVec3::zeros(); energies.len()];
    for c in &target.channels {
        let one = Target::one_channel(c.ip, c.ionization.clone(), c.recombination.clone()).unwrap();
        let s = run(&one, &field, &energies, &MultichannelSettings::default());
        for (a, b) in sum.iter_mut().zip(&s.total) {
            *a += b;
        }
    }
    assert!(difference(&multi.total, &sum) < 1e-12);
}

#[test]
fn permuting_channels_in_the_file_changes_no_number() {
    // Channels are put in a canonical order when the file is read (our design rule).
    let field = field();
    let spec = load("demo-linear-triatomic.json");
    let mut permuted = spec.clone();
    permuted.channels.reverse();
    permuted.couplings.reverse();
    let energies = orders(&field, (15..=25).map(f64::from));
    let settings = MultichannelSettings::default();
    let a = run(&spec.validate().unwrap(), &field, &energies, &settings);
    let b = run(&permuted.validate().unwrap(), &field, &energies, &settings);
    use holecast::report::Table;
    use holecast::report::spectrum::{HoleRows, SpectrumRows};
    let rows = |s| {
        Table::collect(&SpectrumRows {
            spectrum: s,
            grid: None,
        })
        .unwrap()
    };
    assert_eq!(rows(&a), rows(&b));
    let holes = |s| {
        Table::collect(&HoleRows {
            spectrum: s,
            grid: None,
        })
        .unwrap()
    };
    assert_eq!(holes(&a), holes(&b));
}

#[test]
fn orientation_average_of_an_atom_equals_the_unaveraged_result() {
    // An isotropic system is invariant under rotations (mathematics).
    let field = field();
    let mut spec = load("hydrogen.json");
    let energies = orders(&field, (13..=31).step_by(2).map(f64::from));
    let settings = MultichannelSettings::default();
    let single = run(
        &spec.clone().validate().unwrap(),
        &field,
        &energies,
        &settings,
    );
    spec.orientations = Some(OrientationSpec::Full {
        beta_points: 5,
        alpha_points: 4,
        gamma_points: 3,
    });
    let averaged = run(&spec.validate().unwrap(), &field, &energies, &settings);
    assert_eq!(averaged.orientations, 60);
    assert!(difference(&single.total, &averaged.total) < 1e-12);
}

#[test]
fn isotropic_average_of_a_linear_molecule_converges_with_the_grid() {
    // Gauss–Legendre quadrature in cos β converges exponentially for smooth integrands
    // (textbook numerical analysis). Stated tolerance: the two finest grids agree to 1e-3.
    let field = field();
    let mut spec = load("demo-diatomic-minimum.json");
    spec.alignment = holecast::orientation::AlignmentDescription::Isotropic {};
    let energies = orders(&field, (15..=31).step_by(2).map(f64::from));
    let settings = MultichannelSettings {
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let mut results = Vec::new();
    for n in [8, 14, 20, 26] {
        spec.orientations = Some(OrientationSpec::Axis { beta_points: n });
        results.push(
            run(
                &spec.clone().validate().unwrap(),
                &field,
                &energies,
                &settings,
            )
            .total,
        );
    }
    let d: Vec<f64> = results
        .windows(2)
        .map(|w| difference(&w[0], &w[1]))
        .collect();
    assert!(d[2] < 1e-3, "finest grids differ by {}", d[2]);
    assert!(d[2] < d[0], "no convergence: {d:?}");
    // The full SO(3) grid gives the same isotropic average as the β-only grid.
    spec.orientations = Some(OrientationSpec::Full {
        beta_points: 26,
        alpha_points: 3,
        gamma_points: 3,
    });
    let full = run(&spec.validate().unwrap(), &field, &energies, &settings).total;
    assert!(difference(&full, &results[3]) < 1e-10);
}

const TWO_COUPLED: &str = r#"{
  "name": "two coupled channels", "invented": true,
  "channels": [
    { "label": "X", "ip_ev": 14.0, "ionization": { "model": "gaussian", "exponent_au": 0.4 },
      "recombination": { "model": "gaussian", "exponent_au": 0.4 } },
    { "label": "A", "ip_ev": 15.5, "ionization": { "model": "constant", "amplitude": [0, 0] },
      "recombination": { "model": "gaussian", "exponent_au": 0.4 } }
  ],
  "couplings": [ { "channels": ["X", "A"], "dipole_au": [0, 0, 1.2] } ]
}"#;

#[test]
fn hole_populations_match_the_propagator() {
    // With ionization into X only, the hole at recombination is c = U_I(t_r, t_i) (1, 0)ᵀ times
    // the ionization amplitude, so the density of the normalised amplitude (module doc of
    // multichannel::holes) has ρ_AA = |U_AX|²/(|U_XX|² + |U_AX|²): checked against the complex-
    // time propagator evaluated directly at the reference saddle's complex times. With the
    // real-time shortcut the same holds at Re t_r, Re t_i with |U_XX|² + |U_AX|² = 1 (unitarity).
    let field = field();
    let target = parse(TWO_COUPLED).validate().unwrap();
    let energies = orders(&field, (11..=29).map(f64::from));
    for contour in [HoleContour::Complex, HoleContour::Real] {
        let settings = MultichannelSettings {
            hole_contour: contour,
            ..MultichannelSettings::default()
        };
        let stage = trajectory_stage(&field, &target, &energies, &settings).unwrap();
        let s = assemble(&field, &target, &stage, true, &|_, _| {}).unwrap();
        let identity = nalgebra::Matrix3::identity();
        let prop =
            HolePropagator::new(&target.ion, &identity, stage.samples.as_ref().unwrap()).unwrap();
        let complex = ComplexHole::new(&target.ion, &identity, &field, &prop).unwrap();
        let table = &stage.pairs[0].table;
        let mut checked = 0;
        let mut largest_transfer: f64 = 0.0;
        for (f, h) in s.holes.iter().enumerate() {
            assert_eq!(h.label, table.families[f].label);
            for (k, p) in h.points.iter().enumerate() {
                let Some(p) = p else { continue };
                let saddle = table.families[f].points[stage.central(k)].saddle().unwrap();
                let u = match contour {
                    HoleContour::Complex => complex.matrix(saddle.t_ret, saddle.t_ion).unwrap(),
                    HoleContour::Real => prop.matrix(p.t_ret, p.t_ion).unwrap(),
                };
                let (xx, ax) = (u[(0, 0)].norm_sqr(), u[(1, 0)].norm_sqr());
                let expect = ax / (xx + ax);
                assert!(
                    (p.rho[(1, 1)].re - expect).abs() < 1e-9,
                    "{contour:?}: {} vs {expect}",
                    p.rho[(1, 1)].re
                );
                assert!((p.rho[(0, 0)].re + p.rho[(1, 1)].re - 1.0).abs() < 1e-12);
                if contour == HoleContour::Real {
                    assert!((xx + ax - 1.0).abs() < 1e-9, "unitarity at real times");
                }
                largest_transfer = largest_transfer.max(expect);
                checked += 1;
            }
        }
        assert!(checked > 50);
        assert!(
            largest_transfer > 0.01,
            "the coupling must move population: {largest_transfer}"
        );
    }
}

const HETERONUCLEAR: &str = r#"{
  "name": "heteronuclear pair", "invented": true,
  "atoms": [ { "element": "A", "position_bohr": [0, 0, -1.1] }, { "element": "B", "position_bohr": [0, 0, 1.1] } ],
  "channels": [ { "label": "X", "ip_ev": 14.5, "ionization": { "model": "orbital" }, "recombination": { "model": "lcao" },
    "dyson_orbital": { "name": "polar sigma", "terms": [
      { "centre_bohr": [0, 0, -1.1], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [1, 0] },
      { "centre_bohr": [0, 0, 1.1], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [0.5, 0] } ] } } ],
  "orientations": { "grid": "fixed", "euler_deg": [0, 0, 0] }
}"#;

/// Largest even/odd intensity ratio over H14–H26.
fn even_to_odd(s: &MultichannelSpectrum) -> f64 {
    let mut worst: f64 = 0.0;
    for k in 1..s.energies.len() - 1 {
        let q = (s.energies[k] / s.omega).round() as i64;
        if q % 2 == 0 {
            let odd = s.intensity(k - 1).max(s.intensity(k + 1));
            worst = worst.max(s.intensity(k) / odd);
        }
    }
    worst
}

#[test]
fn oriented_targets_give_even_harmonics_centrosymmetric_ones_do_not() {
    // Inversion symmetry of target and field forbids even harmonics; an oriented polar target
    // breaks it (textbook selection rule; e.g. Kreibich et al., PRL 87, 103901 (2001), from
    // memory).
    let field = field();
    let energies = orders(&field, (13..=27).map(f64::from));
    let settings = MultichannelSettings::default();
    let polar = parse(HETERONUCLEAR);
    let oriented = run(
        &polar.clone().validate().unwrap(),
        &field,
        &energies,
        &settings,
    );
    assert!(
        even_to_odd(&oriented) > 1e-3,
        "polar, oriented: {}",
        even_to_odd(&oriented)
    );
    let mut symmetric = load("demo-diatomic-minimum.json");
    symmetric.orientations = Some(OrientationSpec::Fixed {
        euler_deg: [0.0, 30.0, 0.0],
    });
    let sym = run(&symmetric.validate().unwrap(), &field, &energies, &settings);
    assert!(
        even_to_odd(&sym) < 1e-20,
        "centrosymmetric: {}",
        even_to_odd(&sym)
    );
    // An isotropic ensemble of the polar molecule is centrosymmetric again.
    let mut ensemble = polar;
    ensemble.orientations = Some(OrientationSpec::Axis { beta_points: 16 });
    let avg = run(&ensemble.validate().unwrap(), &field, &energies, &settings);
    assert!(
        even_to_odd(&avg) < 1e-20,
        "isotropic ensemble: {}",
        even_to_odd(&avg)
    );
}

#[test]
fn factorised_linear_field_path_equals_the_serial_per_saddle_path() {
    // "Slow and obvious beside fast" (STYLE): the factorised structure evaluation for linear
    // fields and the parallel chunked sum agree with the serial per-saddle reference.
    let field = field();
    let energies = orders(&field, (13..=31).map(f64::from));
    let settings = MultichannelSettings::default();
    for (name, grid) in [
        ("demo-linear-triatomic.json", None),
        (
            "demo-bent-triatomic.json",
            Some(OrientationSpec::Full {
                beta_points: 3,
                alpha_points: 3,
                gamma_points: 2,
            }),
        ),
    ] {
        let mut spec = load(name);
        if grid.is_some() {
            spec.orientations = grid;
        }
        let target = spec.validate().unwrap();
        let stage = trajectory_stage(&field, &target, &energies, &settings).unwrap();
        let fast = assemble(&field, &target, &stage, true, &|_, _| {}).unwrap();
        let slow = assemble_serial(&field, &target, &stage).unwrap();
        assert!(difference(&fast.total, &slow.total) < 1e-10, "{name}");
        // Pairs relative to the total's scale (some pairs vanish by symmetry).
        let scale = largest(&slow.total);
        for (a, b) in fast.pairs.iter().zip(&slow.pairs) {
            let d = a
                .dipole
                .iter()
                .zip(&b.dipole)
                .map(|(x, y)| (x - y).norm())
                .fold(0.0, f64::max);
            assert!(d < 1e-10 * scale, "{name} pair {}->{}", a.ion, a.rec);
        }
        for (a, b) in fast.holes.iter().zip(&slow.holes) {
            for (x, y) in a.points.iter().zip(&b.points) {
                if let (Some(x), Some(y)) = (x, y) {
                    assert!((&x.rho - &y.rho).norm() < 1e-9, "{name} holes");
                }
            }
        }
    }
}

#[test]
fn two_centre_interference_minimum_appears_in_the_spectrum() {
    // Lein et al., PRL 88, 183903 (2002): for a bonding pair along the field the velocity-form
    // dipole vanishes where k R = π; with the saddle momentum k²/2 = Ω − Ip. With the structure
    // in the prefactor (evaluated at the plain saddle) the short trajectory of the first crest
    // must have its minimum there within 2% in photon energy. With the structure in the phase
    // (the default) each centre recombines at its own saddle — its centre factor e^{±ik·R/2}
    // shifts the stationary return time by about (E·R/2)/(v·E) ≈ 1 a.u. here — and the minimum
    // moves by a few per cent (measured +2.2%); it must stay within 4%.
    let field = field();
    let mut spec = load("demo-diatomic-minimum.json");
    spec.orientations = Some(OrientationSpec::Fixed {
        euler_deg: [0.0, 0.0, 0.0],
    });
    let target = spec.validate().unwrap();
    let w = field.omega();
    let energies: Vec<f64> = (0..=240)
        .map(|k| (18.0 + 0.05 * f64::from(k)) * w)
        .collect();
    let r = 2.4;
    let expected = target.channels[0].ip + 0.5 * (std::f64::consts::PI / r).powi(2);
    for (placement, tolerance) in [
        (StructurePlacement::Prefactor, 0.02),
        (StructurePlacement::Auto, 0.04),
    ] {
        let settings = MultichannelSettings {
            group_delays: holecast::multichannel::GroupDelays::Skip,
            ionization_structure: placement,
            recombination_structure: placement,
            ..MultichannelSettings::default()
        };
        let s = run(&target, &field, &energies, &settings);
        let fam = s.pairs[0]
            .families
            .iter()
            .find(|c| c.half_cycle == 0 && c.label.branch == holecast::orbits::Branch::Short)
            .unwrap();
        let (k_min, _) = fam
            .dipole
            .iter()
            .enumerate()
            .map(|(k, d)| (k, d.map_or(f64::INFINITY, |d| d.norm())))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .unwrap();
        let found = energies[k_min];
        assert!(
            (found / expected - 1.0).abs() < tolerance,
            "{placement:?}: minimum at {found}, expected {expected}"
        );
    }
}

#[test]
fn polarization_state_of_a_linear_response_is_linear_along_the_field() {
    // An atom in a linear field radiates along the field: ellipticity 0, angle 0 (symmetry).
    let field = field();
    let target = load("hydrogen.json").validate().unwrap();
    let energies = orders(&field, (13..=25).step_by(2).map(f64::from));
    let s = run(&target, &field, &energies, &MultichannelSettings::default());
    for k in 0..energies.len() {
        let (e, angle) = s.polarization_state(k).unwrap();
        assert!(e.abs() < 1e-12 && angle.abs() < 1e-12);
    }
}

// Regressions of issue-level defects --------------------------------------------------------

#[test]
fn axis_grid_is_refused_for_a_molecule_not_symmetric_about_its_axis() {
    // A β-only grid samples the angle about the molecular axis at one value; that is exact only
    // for a molecule symmetric about the axis (mathematics). Each kind of breaker must be named.
    let base = r#"{
      "name": "off-axis", "invented": true,
      "channels": [
        { "label": "X", "ip_ev": 14.0, "ionization": { "model": "orbital" }, "recombination": { "model": "lcao" },
          "dyson_orbital": { "name": "ORBITAL", "terms": [ TERMS ] } },
        { "label": "A", "ip_ev": 15.5, "ionization": { "model": "gaussian" }, "recombination": { "model": "hydrogenic" } }
      ],
      "couplings": [ { "channels": ["X", "A"], "dipole_au": DIPOLE } ],
      "orientations": { "grid": "axis", "beta_points": 8 }
    }"#;
    let make = |terms: &str, dipole: &str| {
        base.replace("TERMS", terms)
            .replace("DIPOLE", dipole)
            .replace("ORBITAL", "test orbital")
    };
    let sigma = r#"{ "centre_bohr": [0, 0, 1.1], "exponents_inv_bohr2": [0.5], "cartesian": "pz", "coefficient": [1, 0] },
                   { "centre_bohr": [0, 0, -1.1], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [0.4, 0] }"#;
    // Symmetric: accepted.
    assert!(parse(&make(sigma, "[0, 0, 0.8]")).validate().is_ok());
    // A transverse transition dipole.
    let e = parse(&make(sigma, "[0.3, 0, 0.8]")).validate().unwrap_err();
    assert!(e.to_string().contains("x component"), "{e}");
    // An off-axis centre.
    let off = r#"{ "centre_bohr": [0.5, 0, 1.1], "exponents_inv_bohr2": [0.5], "cartesian": "s", "coefficient": [1, 0] }"#;
    let e = parse(&make(off, "[0, 0, 0.8]")).validate().unwrap_err();
    assert!(
        e.to_string().contains("changes under a rotation about z"),
        "{e}"
    );
    // A π orbital on the axis.
    let pi = r#"{ "centre_bohr": [0, 0, 0], "exponents_inv_bohr2": [0.5], "cartesian": "px", "coefficient": [1, 0] }"#;
    let e = parse(&make(pi, "[0, 0, 0.8]")).validate().unwrap_err();
    assert!(e.to_string().contains("orientations.grid"), "{e}");
    // The full grid accepts the same molecule.
    let full = make(pi, "[0.3, 0, 0.8]").replace(
        r#""grid": "axis", "beta_points": 8"#,
        r#""grid": "full", "beta_points": 4, "alpha_points": 4, "gamma_points": 3"#,
    );
    assert!(parse(&full).validate().is_ok());
}

#[test]
fn total_group_delay_of_a_periodic_field_is_not_reported_as_an_emission_time() {
    // For a periodic field the lines sum both half cycles, D = D₁(1 ± e^{iΩT/2}); the phase
    // derivative of that sum is a half cycle's emission time plus T/4 (derived), so it is not
    // reported for the total or the pairs; the families (one half cycle each) keep theirs. A
    // pulse has no such sum and reports all.
    let field = field();
    let target = load("hydrogen.json").validate().unwrap();
    let energies = orders(&field, (15..=29).step_by(2).map(f64::from));
    let s = run(&target, &field, &energies, &MultichannelSettings::default());
    assert!(s.group_delay.iter().all(|g| g.is_none()));
    assert!(s.pairs[0].group_delay.iter().all(|g| g.is_none()));
    assert!(
        s.pairs[0]
            .families
            .iter()
            .all(|f| f.group_delay.iter().all(|g| g.is_some()))
    );
    let pulse: LaserSpec = serde_json::from_str(
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1.5e14}],
            "envelope": {"kind": "sin2", "fwhm_fs": 10}}"#,
    )
    .unwrap();
    let pulse = pulse.to_field().unwrap();
    let p = run(&target, &pulse, &energies, &MultichannelSettings::default());
    assert!(p.group_delay.iter().any(|g| g.is_some()));
}

#[test]
fn hole_densities_are_listed_only_for_saddles_that_contribute() {
    // One rule for which saddles exist in every output (the Stokes rule of the orbit tables,
    // physics notes §2.2): beyond a pair's cutoff the growing member has no hole density, and the
    // densities are those of normalised amplitudes (populations in [0, 1], unit trace,
    // Hermitian, |ρ_mn|² ≤ ρ_mm ρ_nn).
    let field = field();
    let target = load("demo-linear-triatomic.json").validate().unwrap();
    let energies = orders(&field, (21..=41).map(f64::from));
    let settings = MultichannelSettings {
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let stage = trajectory_stage(&field, &target, &energies, &settings).unwrap();
    let s = assemble(&field, &target, &stage, true, &|_, _| {}).unwrap();
    let table = &stage.pairs[0].table;
    let mut excluded = 0;
    for (f, h) in s.holes.iter().enumerate() {
        for (k, p) in h.points.iter().enumerate() {
            let physical = table.is_physical(f, stage.central(k));
            if !physical {
                excluded += 1;
                assert!(
                    p.is_none(),
                    "{} H{}: growing saddle listed",
                    h.label,
                    21 + k
                );
            }
            if let Some(p) = p {
                let n = p.rho.nrows();
                let trace: f64 = (0..n).map(|i| p.rho[(i, i)].re).sum();
                assert!((trace - 1.0).abs() < 1e-12);
                for i in 0..n {
                    assert!((-1e-12..=1.0 + 1e-12).contains(&p.rho[(i, i)].re));
                    for j in 0..n {
                        assert!((p.rho[(i, j)] - p.rho[(j, i)].conj()).norm() < 1e-12);
                        assert!(
                            p.rho[(i, j)].norm_sqr() <= p.rho[(i, i)].re * p.rho[(j, j)].re + 1e-12
                        );
                    }
                }
            }
        }
    }
    assert!(excluded > 0, "the grid must reach past the cutoff");
}
