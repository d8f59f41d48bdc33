//! Spectra and orbits in fields beyond one linear colour: bicircular selection rules, pulses,
//! higher returns.

use holecast::field::CVec3;
use holecast::ionization::IonizationModel;
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, MultichannelSpectrum, spectrum};
use holecast::orbits::{ChannelPair, OrbitSettings, solve_orbits};
use holecast::recombination::RecombinationModel;
use holecast::target::Target;

fn atom(ip: f64) -> Target {
    Target::one_channel(
        ip,
        IonizationModel::Gaussian { exponent: 0.5 },
        RecombinationModel::Gaussian { exponent: 0.5 },
    )
    .unwrap()
}

fn run(field: &holecast::field::Field, target: &Target, energies: &[f64]) -> MultichannelSpectrum {
    spectrum(field, target, energies, &MultichannelSettings::default()).unwrap()
}

fn laser(text: &str) -> LaserSpec {
    serde_json::from_str(text).unwrap()
}

/// Helicity (|D₊|² − |D₋|²)/(|D₊|² + |D₋|²) in the z–x polarization plane, D± = D_z ∓ i D_x.
fn helicity(d: &CVec3) -> f64 {
    let i = num_complex::Complex64::i();
    let plus = (d.z - i * d.x).norm_sqr();
    let minus = (d.z + i * d.x).norm_sqr();
    (plus - minus) / (plus + minus)
}

#[test]
fn bicircular_field_selection_rules() {
    // Counter-rotating ω–2ω field: the dynamical symmetry (rotation by 120° with a shift of T/3)
    // allows only harmonics 3n ± 1, circularly polarized with alternating helicity (H. Eichmann
    // et al., PRA 51, R3414 (1995); D. B. Milošević, W. Becker, R. Kopold, PRA 61, 063403 (2000);
    // both from memory).
    let spec = laser(
        r#"{"colours": [
        {"wavelength_nm": 800, "intensity_wcm2": 1e14, "polarization": {"kind": "circular", "helicity": 1}},
        {"harmonic_of_first": 2, "intensity_ratio": 1, "polarization": {"kind": "circular", "helicity": -1}}]}"#,
    );
    let field = spec.to_field().unwrap();
    let w = field.omega();
    let orders: Vec<f64> = (13..=23).map(f64::from).collect();
    let energies: Vec<f64> = orders.iter().map(|q| q * w).collect();
    let s = run(&field, &atom(0.58), &energies);
    assert!(s.complete.iter().all(|c| *c), "every orbit converged");
    assert_eq!(
        s.pairs[0].families.len(),
        6,
        "short and long from each of the three lobes"
    );
    let mut signs = Vec::new();
    for (k, q) in orders.iter().enumerate() {
        let q = *q as i64;
        let mag = s.intensity(k);
        if q % 3 == 0 {
            let neighbour = s.intensity(k + 1).max(s.intensity(k - 1));
            assert!(
                mag < 1e-20 * neighbour,
                "H{q} must vanish: {mag} vs {neighbour}"
            );
        } else {
            let h = helicity(&s.total[k]);
            assert!(h.abs() > 1.0 - 1e-9, "H{q} circular: helicity {h}");
            signs.push((q % 3, h.signum()));
        }
    }
    // 3n+1 harmonics share one helicity, 3n+2 the opposite one.
    let one: Vec<f64> = signs.iter().filter(|s| s.0 == 1).map(|s| s.1).collect();
    let two: Vec<f64> = signs.iter().filter(|s| s.0 == 2).map(|s| s.1).collect();
    assert!(one.iter().all(|&x| x == one[0]) && two.iter().all(|&x| x == -one[0]));
}

#[test]
fn pulse_sums_every_half_cycle_and_builds_odd_harmonics() {
    // A many-cycle pulse approaches the periodic field: successive half cycles interfere and the
    // spectrum shows harmonic peaks spaced by 2ω (common practice, no source). The peaks need not
    // sit exactly on odd orders: the intensity-dependent dipole phase shifts them within a pulse.
    let spec = laser(
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1.5e14}],
            "envelope": {"kind": "sin2", "fwhm_fs": 12}}"#,
    );
    let field = spec.to_field().unwrap();
    let w = field.omega();
    let orders: Vec<f64> = (0..=120).map(|k| 14.0 + 0.1 * f64::from(k)).collect();
    let energies: Vec<f64> = orders.iter().map(|q| q * w).collect();
    let s = run(&field, &atom(0.5), &energies);
    assert!(s.complete.iter().all(|c| *c));
    let windows = field.birth_windows(0.3).len();
    assert!(
        windows >= 9,
        "{windows} half cycles above 30% of the peak field"
    );
    assert_eq!(s.pairs[0].families.len(), 2 * windows);
    // Short-trajectory emission (summed over all half cycles) has a small intensity-dependent
    // phase, so it builds clean peaks spaced by two orders.
    let short: Vec<f64> = (0..orders.len())
        .map(|k| {
            s.pairs[0]
                .families
                .iter()
                .filter(|c| c.label.branch == holecast::orbits::Branch::Short)
                .filter_map(|c| c.dipole[k])
                .fold(CVec3::zeros(), |a, b| a + b)
                .norm_squared()
        })
        .collect();
    let top = short.iter().copied().fold(0.0, f64::max);
    let mut peaks = Vec::new();
    for k in 1..orders.len() - 1 {
        if short[k] > short[k - 1] && short[k] > short[k + 1] && short[k] > 0.05 * top {
            peaks.push(orders[k]);
        }
    }
    let maxima = peaks.len();
    for w in peaks.windows(2) {
        assert!((w[1] - w[0] - 2.0).abs() < 0.35, "peaks {peaks:?}");
    }
    assert!(maxima >= 4, "{maxima} harmonic peaks found");
}

#[test]
fn higher_returns_are_continued_without_failure() {
    // Three returns per crest: six families per crest over the plateau of the first return
    // (common practice: the longer orbits coalesce at their own, lower cutoffs).
    let field = LaserSpec::monochromatic(1e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let mut settings = OrbitSettings::default();
    settings.discovery.max_returns = 3;
    let energies: Vec<f64> = (13..=31).map(|q| f64::from(q) * w).collect();
    let t = solve_orbits(&field, ChannelPair::single(0.58), &energies, &settings).unwrap();
    assert_eq!(t.families.len(), 12);
    assert_eq!(t.failed_points(), 0);
    let labels: std::collections::BTreeSet<String> =
        t.families.iter().map(|f| f.label.to_string()).collect();
    for l in [
        "short",
        "long",
        "return2-short",
        "return2-long",
        "return3-short",
        "return3-long",
    ] {
        assert!(labels.contains(l), "{l}");
    }
    // Longer returns have longer excursions.
    let tau = |label: &str| {
        t.families
            .iter()
            .find(|f| f.half_cycle == 0 && f.label.to_string() == label)
            .and_then(|f| f.points[2].saddle())
            .map(|s| s.tau.re)
            .unwrap()
    };
    assert!(tau("short") < tau("long") && tau("long") < tau("return2-short"));
    assert!(tau("return2-long") < tau("return3-short"));
}
