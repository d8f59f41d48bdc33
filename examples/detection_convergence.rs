//! Convergence of the detection layer's intensity rule on the three-channel demo
//! (channels/demo-linear-triatomic.json, 800 nm, 1.5×10¹⁴ W/cm², odd orders H11–H29): the
//! focal-volume average (unbounded medium, and a 1 mm jet 3 mm after the focus of a 50 µm
//! waist) and the on-axis build-up of the shipped demo setup, for 2–32 intensity samples
//! against 48. Prints the largest and the rms relative change of the combined Ω⁴|D|² over
//! the odd orders, the order where it is largest and the largest below the cutoff harmonic
//! H29; the figures are quoted in docs/detection.md. An argument selects the cases whose name
//! contains it (`coherent`, `unbounded`, `jet`).
//!
//! `cargo run --release --example detection_convergence`

use holecast::detection::{SetupSpec, detect};
use holecast::laser::LaserSpec;
use holecast::multichannel::MultichannelSettings;
use holecast::target::TargetSpec;

fn main() {
    let root = env!("CARGO_MANIFEST_DIR");
    let target = TargetSpec::from_json(
        &std::fs::read_to_string(format!("{root}/channels/demo-linear-triatomic.json")).unwrap(),
    )
    .unwrap()
    .validate()
    .unwrap();
    let field = LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap();
    let energies: Vec<f64> = (11..=29)
        .step_by(2)
        .map(|q| q as f64 * field.omega())
        .collect();
    let settings = MultichannelSettings {
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let media = [
        (
            "incoherent, unbounded medium, lowest fraction 0.05",
            r#""geometry": {"kind": "unbounded"}, "combination": "incoherent-volume", "lowest_intensity_fraction": 0.05"#,
        ),
        (
            "incoherent, 1 mm jet at +3 mm, lowest fraction 0.1",
            r#""geometry": {"kind": "slab", "position_mm": 3, "length_mm": 1}, "combination": "incoherent-volume""#,
        ),
        (
            "coherent on-axis, demo setup (1 mm jet at +3 mm)",
            r#""geometry": {"kind": "slab", "position_mm": 3, "length_mm": 1}, "combination": "coherent-axis", "ir_refractivity": 3e-5"#,
        ),
    ];
    let only: Option<String> = std::env::args().nth(1);
    for (name, medium) in media {
        if only.as_ref().is_some_and(|o| !name.contains(o.as_str())) {
            continue;
        }
        let run = |n: usize| -> Vec<f64> {
            let text = format!(
                r#"{{"beam": {{"waist_um": 50}}, "medium": {{{medium}, "density_cm3": 2.7e18, "intensity_samples": {n}}}}}"#
            );
            let setup = SetupSpec::from_json(&text).unwrap().validate().unwrap();
            detect(&field, &target, &energies, &settings, &setup, &|_, _| {})
                .unwrap()
                .source_total
        };
        let reference = run(48);
        println!("{name}");
        for n in [2usize, 4, 8, 12, 16, 24, 32] {
            let v = run(n);
            let errs: Vec<f64> = v
                .iter()
                .zip(&reference)
                .map(|(a, b)| (a - b).abs() / b.abs())
                .collect();
            let (worst, max) = errs
                .iter()
                .enumerate()
                .fold((0, 0.0_f64), |a, (i, &b)| if b > a.1 { (i, b) } else { a });
            let rms = (errs.iter().map(|e| e * e).sum::<f64>() / errs.len() as f64).sqrt();
            let plateau = errs[..errs.len() - 1]
                .iter()
                .fold(0.0_f64, |a, &b| a.max(b));
            println!(
                "  {n:>3} samples: largest relative change {max:.2e} (H{}), rms {rms:.2e}, \
                 largest below H29 {plateau:.2e}",
                11 + 2 * worst
            );
        }
    }
}
