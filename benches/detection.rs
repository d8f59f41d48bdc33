//! Speed of the detection layer on the three-channel demo (channels/demo-linear-triatomic.json,
//! 800 nm, 1.5×10¹⁴ W/cm², the default grid H9–H39): today's single-intensity spectrum (the
//! `spectrum` command's settings, group delays included) against the focal-averaged spectrum
//! with 16 intensity samples (incoherent volume average over a jet, and the on-axis build-up of
//! the shipped demo setup). The detection runs skip group delays, which nothing downstream
//! uses. `python3 scripts/bench_figures.py` or criterion's report prints the times.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::detection::{SetupSpec, detect};
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, spectrum};
use holecast::target::TargetSpec;

fn benches(c: &mut Criterion) {
    let root = env!("CARGO_MANIFEST_DIR");
    let target = TargetSpec::from_json(
        &std::fs::read_to_string(format!("{root}/channels/demo-linear-triatomic.json")).unwrap(),
    )
    .unwrap()
    .validate()
    .unwrap();
    let field = LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap();
    let energies: Vec<f64> = (9..=39).map(|q| q as f64 * field.omega()).collect();
    let single = MultichannelSettings::default();
    let detection = MultichannelSettings {
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let demo = SetupSpec::from_json(
        &std::fs::read_to_string(format!("{root}/setups/demo-jet-after-focus.json")).unwrap(),
    )
    .unwrap()
    .validate()
    .unwrap();
    let volume = SetupSpec::from_json(
        r#"{"beam": {"waist_um": 50},
            "medium": {"geometry": {"kind": "slab", "position_mm": 3, "length_mm": 1},
                       "combination": "incoherent-volume", "density_cm3": 1e17,
                       "intensity_samples": 16}}"#,
    )
    .unwrap()
    .validate()
    .unwrap();
    let mut group = c.benchmark_group("detection");
    group.sample_size(10);
    group.bench_function("single_intensity_demo_spectrum", |b| {
        b.iter(|| {
            black_box(
                spectrum(&field, &target, &energies, &single)
                    .unwrap()
                    .total
                    .len(),
            )
        })
    });
    group.bench_function("single_intensity_demo_spectrum_no_group_delay", |b| {
        b.iter(|| {
            black_box(
                spectrum(&field, &target, &energies, &detection)
                    .unwrap()
                    .total
                    .len(),
            )
        })
    });
    for (name, setup) in [
        ("volume_16_samples", &volume),
        ("axis_16_samples_demo_setup", &demo),
    ] {
        group.bench_function(format!("focal_averaged_demo_{name}"), |b| {
            b.iter(|| {
                black_box(
                    detect(&field, &target, &energies, &detection, setup, &|_, _| {})
                        .unwrap()
                        .source_total
                        .len(),
                )
            })
        });
    }
    group.finish();
}

criterion_group!(detection_benches, benches);
criterion_main!(detection_benches);
