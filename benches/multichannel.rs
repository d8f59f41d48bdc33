//! Speed of the multichannel path: three channels (nine pairs), plateau at Δq = 0.1, full 3D
//! orientation grid of 192 orientations; and the two-channel bent triatomic on its own
//! 192-orientation grid with structure in the phase. `scripts/bench_figures.py` prints the figures.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::laser::LaserSpec;
use holecast::multichannel::{GroupDelays, MultichannelSettings, assemble, trajectory_stage};
use holecast::target::{OrientationSpec, TargetSpec};

fn benches(c: &mut Criterion) {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/channels/demo-linear-triatomic.json"
    );
    let mut spec = TargetSpec::from_json(&std::fs::read_to_string(path).unwrap()).unwrap();
    spec.orientations = Some(OrientationSpec::Full {
        beta_points: 8,
        alpha_points: 8,
        gamma_points: 3,
    });
    let target = spec.validate().unwrap();
    let field = LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let energies: Vec<f64> = (0..=250).map(|k| (9.0 + 0.1 * k as f64) * w).collect();
    let mut group = c.benchmark_group("multichannel");
    group.sample_size(10);
    for (name, step) in [
        ("with_group_delay", GroupDelays::Tangent),
        ("no_group_delay", GroupDelays::Skip),
    ] {
        let settings = MultichannelSettings {
            group_delays: step,
            ..MultichannelSettings::default()
        };
        group.bench_function(format!("trajectory_stage_9_pairs_{name}"), |b| {
            b.iter(|| {
                black_box(
                    trajectory_stage(&field, &target, &energies, &settings)
                        .unwrap()
                        .pairs
                        .len(),
                )
            })
        });
        let stage = trajectory_stage(&field, &target, &energies, &settings).unwrap();
        group.bench_function(format!("assemble_192_orientations_{name}"), |b| {
            b.iter(|| {
                black_box(
                    assemble(&field, &target, &stage, true, &|_, _| {})
                        .unwrap()
                        .total
                        .len(),
                )
            })
        });
        group.bench_function(format!("whole_spectrum_{name}"), |b| {
            b.iter(|| {
                let stage = trajectory_stage(&field, &target, &energies, &settings).unwrap();
                black_box(
                    assemble(&field, &target, &stage, true, &|_, _| {})
                        .unwrap()
                        .total
                        .len(),
                )
            })
        });
    }
    // The bent triatomic on its own 192-orientation grid: orbital ionization and lcao
    // recombination (structure in the phase by default), two coupled channels.
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/channels/demo-bent-triatomic.json"
    );
    let bent = TargetSpec::from_json(&std::fs::read_to_string(path).unwrap())
        .unwrap()
        .validate()
        .unwrap();
    let settings = MultichannelSettings::default();
    group.bench_function("whole_spectrum_bent_triatomic_192_orientations", |b| {
        b.iter(|| {
            let stage = trajectory_stage(&field, &bent, &energies, &settings).unwrap();
            black_box(
                assemble(&field, &bent, &stage, true, &|_, _| {})
                    .unwrap()
                    .total
                    .len(),
            )
        })
    });
    group.finish();
}

criterion_group!(multichannel_benches, benches);
criterion_main!(multichannel_benches);
