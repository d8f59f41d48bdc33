//! Group delay dφ/dΩ of one family against its saddle's Re t_r: at a saddle d(Ωt_r − S)/dΩ =
//! t_r by stationarity, so the two agree up to the slowly varying prefactor (physics notes §6.3;
//! Mairesse et al., Science 302, 1540 (2003) for the measured attochirp).

use holecast::dipole::SaddleSum;
use holecast::ionization::IonizationModel;
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, spectrum};
use holecast::orbits::Branch;
use holecast::recombination::RecombinationModel;
use holecast::target::Target;
use holecast::units::au_to_as;

#[test]
fn family_group_delay_equals_its_return_time() {
    let field = LaserSpec::monochromatic(2e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let target = Target::one_channel(
        0.5,
        IonizationModel::Gaussian { exponent: 1.0 },
        RecombinationModel::Hydrogenic { ip: 0.5 },
    )
    .unwrap();
    let orders: Vec<f64> = (17..=29).map(f64::from).collect();
    let energies: Vec<f64> = orders.iter().map(|q| q * w).collect();
    let settings = MultichannelSettings {
        sum: SaddleSum::Plain,
        ..MultichannelSettings::default()
    };
    let s = spectrum(&field, &target, &energies, &settings).unwrap();
    let mut worst: f64 = 0.0;
    for c in s.pairs[0].families.iter() {
        for k in 0..orders.len() {
            let (gd, tr) = (c.group_delay[k].unwrap(), c.emission_time[k].unwrap());
            worst = worst.max(au_to_as(gd - tr).abs());
        }
    }
    // Tolerance 20 as for the prefactor's phase slope (measured worst over H17–H29: 14.6 as).
    assert!(worst < 20.0, "worst |dφ/dΩ − Re t_r| = {worst} as");
    // Physics notes §6.3 (NUM): H21 short Re t_r = 1375.5 as, long 2292.6 as; attochirp
    // +15.5 / −12.4 as/eV for short / long at H21 (hydrogen, 800 nm, 2e14 W/cm²).
    let k21 = 4;
    for c in s.pairs[0].families.iter().filter(|c| c.half_cycle == 0) {
        let tr = au_to_as(c.emission_time[k21].unwrap());
        let expect = if c.label.branch == Branch::Short {
            1375.5
        } else {
            2292.6
        };
        assert!((tr - expect).abs() < 0.5, "{} Re t_r = {tr} as", c.label);
        let chirp = au_to_as(c.emission_time[k21 + 1].unwrap() - c.emission_time[k21 - 1].unwrap())
            / (2.0 * holecast::units::au_to_ev(w));
        let chirp_ref = if c.label.branch == Branch::Short {
            15.5
        } else {
            -12.4
        };
        assert!(
            (chirp - chirp_ref).abs() < 0.3,
            "{} attochirp {chirp} as/eV",
            c.label
        );
    }
}

/// The log-derivative formula is exact when `ln(v e^{−iΦ})` is a quadratic in Ω, on any grid
/// (centred, one-sided and uneven spacings): mathematics, no physics.
#[test]
fn tangent_log_derivative_is_exact_for_a_quadratic_residual() {
    use holecast::spectrum::tangent_log_derivatives;
    use num_complex::Complex64;
    let energies = [1.0, 1.03, 1.07, 1.12, 1.16];
    let (a, b, c) = (
        Complex64::new(0.3, -1.2),
        Complex64::new(-0.5, 1.2),
        Complex64::new(0.4, -0.3),
    );
    // Φ(Ω) with Φ' = t_r: a fast phase Φ = 80Ω + 3Ω² + i(2 + 0.5Ω), t_r = 80 + 6Ω + 0.5i.
    let phi = |w: f64| Complex64::new(80.0 * w + 3.0 * w * w, 2.0 + 0.5 * w);
    let t_r = |w: f64| Complex64::new(80.0 + 6.0 * w, 0.5);
    let values: Vec<Complex64> = energies
        .iter()
        .map(|&w| (a + b * w + c * w * w + Complex64::i() * phi(w)).exp())
        .collect();
    let saddles: Vec<_> = energies.iter().map(|&w| Some((t_r(w), phi(w)))).collect();
    let l = tangent_log_derivatives(&energies, &values, &saddles, false);
    for (k, &w) in energies.iter().enumerate() {
        let exact = b + 2.0 * c * w + Complex64::i() * t_r(w);
        let got = l[k].value().unwrap();
        assert!((got - exact).norm() < 1e-9, "Ω = {w}: {got} vs {exact}");
    }
    // A missing saddle between two points: the neighbours fall back to one-sided formulas.
    let mut gap = saddles.clone();
    gap[2] = None;
    let l = tangent_log_derivatives(&energies, &values, &gap, false);
    assert_eq!(l[2], holecast::spectrum::LogDerivative::Missing);
    for k in [0, 1, 3, 4] {
        let w = energies[k];
        let exact = b + 2.0 * c * w + Complex64::i() * t_r(w);
        // Two-point differences (one usable neighbour each, the gap cuts the others): first
        // order, error |R''|Δ/2 ≈ 0.02 here.
        let tol = 0.1;
        let got = l[k].value().unwrap();
        assert!((got - exact).norm() < tol, "k = {k}: {got} vs {exact}");
    }
    // A residual whose phase turns by more than RESOLVED_STEP between neighbours (a zero of the
    // prefactor close to the grid) is marked unresolved, not differenced.
    let fast: Vec<Complex64> = energies
        .iter()
        .map(|&w| Complex64::new(w - 1.08, 0.004) * (Complex64::i() * phi(w)).exp())
        .collect();
    let l = tangent_log_derivatives(&energies, &fast, &saddles, true);
    assert_eq!(l[2], holecast::spectrum::LogDerivative::Unresolved);
}

/// Group delays from the saddles' own phase against the central difference over Ω ± 0.001ω
/// with re-solved saddles (the reference: its error is O(δ²) with δ = 0.001ω). The difference
/// is that of the prefactors' phase slope taken across the grid (mathematics: the three-point
/// derivative's O(Δ²) error; tolerances from the measured worst case with a margin).
#[test]
fn tangent_group_delays_agree_with_the_re_solved_difference() {
    use holecast::multichannel::GroupDelays;
    let field = LaserSpec::monochromatic(2e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let target = Target::one_channel(
        0.5,
        IonizationModel::Gaussian { exponent: 1.0 },
        RecombinationModel::Hydrogenic { ip: 0.5 },
    )
    .unwrap();
    for (step, tolerance_as) in [(0.2, 8.0), (0.1, 2.0)] {
        let n = (30.0 / step) as usize;
        let energies: Vec<f64> = (0..=n).map(|k| (13.0 + step * k as f64) * w).collect();
        for sum in [SaddleSum::Plain, SaddleSum::Uniform] {
            let run = |g: GroupDelays| {
                let s = MultichannelSettings {
                    sum,
                    group_delays: g,
                    ..MultichannelSettings::default()
                };
                spectrum(&field, &target, &energies, &s).unwrap()
            };
            let a = run(GroupDelays::Tangent);
            let b = run(GroupDelays::Difference { step: 1e-3 });
            let mut worst: f64 = 0.0;
            let mut compared = 0;
            for (fa, fb) in a.pairs[0].families.iter().zip(&b.pairs[0].families) {
                for (k, &e) in energies.iter().enumerate() {
                    // Plateau only (below H35, the cutoff is H35.8): far beyond it the family
                    // is weak and both are differences of a decaying phase.
                    if e > 35.0 * w {
                        continue;
                    }
                    match (fa.group_delay[k], fb.group_delay[k]) {
                        (Some(x), Some(y)) => {
                            worst = worst.max(au_to_as(x - y).abs());
                            compared += 1;
                        }
                        (None, None) => {}
                        (x, y) => panic!("Δq = {step}, {}: {x:?} vs {y:?}", fa.label),
                    }
                }
            }
            eprintln!(
                "Δq = {step}, {sum:?}: worst |tangent − difference| = {worst:.3} as over {compared}"
            );
            assert!(compared > 0);
            assert!(
                worst < tolerance_as,
                "Δq = {step}, {sum:?}: worst {worst} as"
            );
        }
    }
}

/// Skipped group delays are None everywhere, and the rest of the spectrum is unchanged.
#[test]
fn skipped_group_delays_leave_the_dipole_unchanged() {
    use holecast::multichannel::GroupDelays;
    let field = LaserSpec::monochromatic(2e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let target = Target::one_channel(
        0.5,
        IonizationModel::Gaussian { exponent: 1.0 },
        RecombinationModel::Hydrogenic { ip: 0.5 },
    )
    .unwrap();
    let energies: Vec<f64> = (0..=180).map(|k| (15.0 + 0.1 * k as f64) * w).collect();
    let run = |g: GroupDelays| {
        let s = MultichannelSettings {
            group_delays: g,
            ..MultichannelSettings::default()
        };
        spectrum(&field, &target, &energies, &s).unwrap()
    };
    let a = run(GroupDelays::Skip);
    let b = run(GroupDelays::Tangent);
    let c = run(GroupDelays::Difference { step: 1e-3 });
    for f in &a.pairs[0].families {
        assert!(f.group_delay.iter().all(Option::is_none));
    }
    // The tangent solves the same saddles on the same grid: bit-identical dipoles.
    assert_eq!(a.total, b.total);
    // The difference solves the triples Ω − δ, Ω, Ω + δ: the continuation takes other steps
    // (saddles equal to the Newton tolerance), and near a caustic the next-order hole terms are
    // bridged in photon energy between the nearest grid points outside the zone, which are
    // others on that grid (measured: 4e-5 of the largest dipole at most).
    let largest = a.total.iter().map(|d| d.norm()).fold(0.0, f64::max);
    for (x, y) in a.total.iter().zip(&c.total) {
        assert!((x - y).norm() <= 1e-4 * largest, "{x} vs {y}");
    }
}

/// A coupled three-channel molecule in a pulse: family, pair and total delays (sums of families
/// whose phases interfere; strongly cancelling sums and unresolved members are recomputed by
/// difference) agree with the re-solved difference, and a coarse grid falls back to the
/// difference itself (bit-identical delays).
#[test]
fn tangent_group_delays_of_a_molecule_in_a_pulse() {
    use holecast::multichannel::GroupDelays;
    use holecast::target::TargetSpec;
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/channels/demo-linear-triatomic.json"
    );
    let target = TargetSpec::from_json(&std::fs::read_to_string(path).unwrap())
        .unwrap()
        .validate()
        .unwrap();
    let spec: LaserSpec = serde_json::from_str(
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1.5e14}],
            "envelope": {"kind": "sin2", "fwhm_fs": 8}}"#,
    )
    .unwrap();
    let field = spec.to_field().unwrap();
    let w = field.omega();
    let run = |energies: &[f64], g: GroupDelays| {
        let s = MultichannelSettings {
            group_delays: g,
            ..MultichannelSettings::default()
        };
        spectrum(&field, &target, energies, &s).unwrap()
    };
    let fine: Vec<f64> = (0..=100).map(|k| (15.0 + 0.1 * k as f64) * w).collect();
    let a = run(&fine, GroupDelays::Tangent);
    let b = run(&fine, GroupDelays::Difference { step: 1e-3 });
    let mut diffs: Vec<f64> = Vec::new();
    let mut add = |x: &[Option<f64>], y: &[Option<f64>]| {
        for (x, y) in x.iter().zip(y) {
            if let (Some(x), Some(y)) = (x, y) {
                diffs.push(au_to_as(x - y).abs());
            }
        }
    };
    add(&a.group_delay, &b.group_delay);
    for (pa, pb) in a.pairs.iter().zip(&b.pairs) {
        add(&pa.group_delay, &pb.group_delay);
        for (fa, fb) in pa.families.iter().zip(&pb.families) {
            add(&fa.group_delay, &fb.group_delay);
        }
    }
    diffs.sort_by(f64::total_cmp);
    let median = diffs[diffs.len() / 2];
    let p90 = diffs[diffs.len() * 9 / 10];
    eprintln!(
        "pulse, Δq = 0.1: {} delays, median {median:.3} as, 90 % {p90:.3} as, worst {:.3} as",
        diffs.len(),
        diffs[diffs.len() - 1]
    );
    assert!(diffs.len() > 1000, "{} delays", diffs.len());
    assert!(
        median < 0.5 && p90 < 5.0,
        "median {median} as, 90 % {p90} as"
    );
    // Δq = 1: the difference is used throughout.
    let coarse: Vec<f64> = (15..=25).map(|q| f64::from(q) * w).collect();
    let a = run(&coarse, GroupDelays::Tangent);
    let b = run(&coarse, GroupDelays::Difference { step: 1e-3 });
    assert_eq!(a.group_delay, b.group_delay);
}
