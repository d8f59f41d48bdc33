//! The default photon-energy grid (`holecast::grid`): odd orders only where the selection rule
//! removes the even ones, a margin above the highest Ip, exact lattice values; the rule checked
//! against computed spectra of every shipped target. The CEP independence of the pulse grid is
//! a property of the binary's cutoff choice and is tested in `tests/cli_default_grid.rs`.

use holecast::cutoff::cutoffs;
use holecast::field::Field;
use holecast::grid::{DefaultGrid, default_grid, inversion_symmetric};
use holecast::laser::LaserSpec;
use holecast::multichannel::{
    MultichannelSettings, MultichannelSpectrum, assemble, trajectory_stage,
};
use holecast::orbits::{ChannelPair, OrbitSettings};
use holecast::target::{Target, TargetSpec};

fn load(name: &str) -> Target {
    let path = format!("{}/channels/{name}", env!("CARGO_MANIFEST_DIR"));
    TargetSpec::from_json(&std::fs::read_to_string(path).unwrap())
        .unwrap()
        .validate()
        .unwrap()
}

fn laser(text: &str) -> Field {
    serde_json::from_str::<LaserSpec>(text)
        .unwrap()
        .to_field()
        .unwrap()
}

fn grid_of(field: &Field, target: &Target) -> DefaultGrid {
    let top = target
        .channels
        .iter()
        .map(|c| {
            let cut = cutoffs(field, ChannelPair::single(c.ip), &OrbitSettings::default());
            cut.quantum.unwrap_or(cut.classical)
        })
        .fold(0.0, f64::max);
    default_grid(field, target, top).unwrap()
}

#[test]
fn argon_at_1800_nm_gets_odd_orders_from_a_quarter_up_above_ip() {
    // Up[eV] = 9.337e-14 · I[W/cm²] · λ²[µm] (common practice, 9.33e-14 in DESIGN §5) and
    // ħω = 1239.842 eV nm / λ (CODATA): at 1e14 W/cm², 1800 nm, Up ≈ 30.25 eV, ħω ≈ 0.6888 eV.
    // Argon's Ip 15.7596 eV (NIST ASD). The floor Ip + Up/4 ≈ 23.32 eV is H33.86: first odd
    // order H35.
    let field = LaserSpec::monochromatic(1e14, 1800.0).to_field().unwrap();
    let target = load("argon-like.json");
    assert!(inversion_symmetric(&target));
    let g = grid_of(&field, &target);
    assert!(g.odd_only);
    let orders = g.orders();
    assert_eq!(orders[0], 35.0);
    for q in &orders {
        assert_eq!(q.fract(), 0.0, "order {q} is not an exact integer");
        assert_eq!((*q as i64).rem_euclid(2), 1, "order {q} is even");
    }
    // The last is the last odd order at or below 1.2 × the quantum cutoff.
    let top = g.ceiling / field.omega();
    let last = *orders.last().unwrap();
    assert!(
        last <= top && last + 2.0 > top,
        "last {last}, 1.2 cutoff H{top}"
    );
    assert!(g.rule().contains("odd harmonic orders"));
}

#[test]
fn the_margin_is_at_least_one_photon_and_above_the_highest_ip() {
    // A weak field (Up/4 < ω): the floor is Ip_max + ω, and the highest Ip counts, not the
    // lowest: the demo triatomic's B channel (18.1 eV) at 800 nm, 2e13 W/cm² (Up ≈ 1.2 eV):
    // 18.1 + 1.5498 = 19.65 eV = H12.68 → H13.
    let field = LaserSpec::monochromatic(2e13, 800.0).to_field().unwrap();
    let target = load("demo-linear-triatomic.json");
    let g = default_grid(&field, &target, 3.0).unwrap();
    assert_eq!(g.orders()[0], 13.0);
    let ip_max = target.channels.iter().map(|c| c.ip).fold(0.0, f64::max);
    assert!((g.floor - ip_max - field.omega()).abs() < 1e-12);
}

#[test]
fn two_colour_and_polar_targets_keep_every_order() {
    // ω + 2ω is not half-wave symmetric: even harmonics are allowed.
    let two = laser(include_str!("../lasers/two-colour-orthogonal.json"));
    let g = grid_of(&two, &load("argon-like.json"));
    assert!(!g.odd_only);
    assert_eq!(g.stride, 1);
    assert_eq!(g.denominator, 1);
    // A polar molecule held fixed breaks inversion symmetry: even orders stay.
    let polar: TargetSpec = TargetSpec::from_json(HETERONUCLEAR).unwrap();
    let polar = polar.validate().unwrap();
    assert!(!inversion_symmetric(&polar));
    let mono = LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap();
    assert!(!default_grid(&mono, &polar, 1.5).unwrap().odd_only);
}

#[test]
fn incommensurate_periods_give_fractional_lines() {
    // ω + 1.5ω: period 2T₁, lines at multiples of ω₁/2. Not half-wave symmetric (ω₁ is an
    // even multiple of ω₁/2), so every half order is kept.
    let f = laser(
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1e14},
                        {"harmonic_of_first": 1.5, "intensity_ratio": 0.1}]}"#,
    );
    let g = default_grid(&f, &load("argon-like.json"), 1.8).unwrap();
    assert_eq!(g.denominator, 2);
    assert!(!g.odd_only);
    assert!(g.orders().iter().any(|q| q.fract() == 0.5));
}

#[test]
fn pulse_orders_are_exact_tenths() {
    let f = laser(include_str!("../lasers/few-cycle-pulse.json"));
    let g = default_grid(&f, &load("argon-like.json"), 1.8).unwrap();
    assert_eq!(g.denominator, 10);
    for q in g.orders() {
        // The nearest double to n/10, as the decimal literal would give.
        let text = format!("{q}");
        assert!(
            text.split('.').nth(1).is_none_or(|d| d.len() == 1),
            "{text}"
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

fn run(target: &Target, field: &Field, orders: &[f64]) -> MultichannelSpectrum {
    let settings = MultichannelSettings::default();
    let energies: Vec<f64> = orders.iter().map(|q| q * field.omega()).collect();
    let stage = trajectory_stage(field, target, &energies, &settings).unwrap();
    assemble(field, target, &stage, settings.linear_fast_path, &|_, _| {}).unwrap()
}

/// Largest even/odd intensity ratio of a spectrum at orders 20..=25.
fn even_to_odd(s: &MultichannelSpectrum) -> f64 {
    let odd = (0..s.energies.len())
        .filter(|k| k % 2 == 1)
        .map(|k| s.intensity(k))
        .fold(0.0, f64::max);
    (0..s.energies.len())
        .filter(|k| k % 2 == 0)
        .map(|k| s.intensity(k) / odd)
        .fold(0.0, f64::max)
}

#[test]
fn the_rule_drops_only_orders_whose_harmonics_vanish() {
    // Selection rule: a half-wave symmetric field and an inversion-symmetric ensemble give no
    // even harmonics (textbook; e.g. Ben-Tal, Moiseyev, Beswick, J. Phys. B 26, 3017 (1993),
    // from memory). Checked on every shipped target at 800 nm: where the rule says odd-only, the
    // computed even orders are rounding noise; the polar fixed molecule keeps real even ones.
    let field = LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap();
    let orders: Vec<f64> = (20..=25).map(f64::from).collect();
    let dir = format!("{}/channels", env!("CARGO_MANIFEST_DIR"));
    let mut names: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".json"))
        .collect();
    names.sort();
    let mut symmetric = 0;
    for name in &names {
        let target = load(name);
        if inversion_symmetric(&target) {
            symmetric += 1;
            let r = even_to_odd(&run(&target, &field, &orders));
            assert!(r < 1e-15, "{name}: even/odd intensity {r}");
        }
    }
    assert!(
        symmetric >= 5,
        "only {symmetric} shipped targets are symmetric"
    );
    let polar = TargetSpec::from_json(HETERONUCLEAR)
        .unwrap()
        .validate()
        .unwrap();
    let r = even_to_odd(&run(&polar, &field, &orders));
    assert!(r > 1e-3, "polar fixed molecule: even/odd {r}");
}
