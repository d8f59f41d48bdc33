//! Thread scaling of the whole spectrum pipeline (trajectory stage and orientation loop) with
//! the default settings: the same work in a rayon pool of one and of two threads.
//! `scripts/bench_figures.py` prints the speed-ups. On a shared machine the two-thread figure
//! is only meaningful when the other core is idle.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, assemble, trajectory_stage};
use holecast::target::{OrientationSpec, Target, TargetSpec};

fn load(name: &str, full_grid: bool) -> Target {
    let path = format!("{}/channels/{name}", env!("CARGO_MANIFEST_DIR"));
    let mut spec = TargetSpec::from_json(&std::fs::read_to_string(path).unwrap()).unwrap();
    if full_grid {
        spec.orientations = Some(OrientationSpec::Full {
            beta_points: 8,
            alpha_points: 8,
            gamma_points: 3,
        });
    }
    spec.validate().unwrap()
}

fn benches(c: &mut Criterion) {
    let field = LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap();
    let w = field.omega();
    // The multichannel bench's plateau: H9–H34 at Δq = 0.1.
    let energies: Vec<f64> = (0..=250).map(|k| (9.0 + 0.1 * k as f64) * w).collect();
    let settings = MultichannelSettings::default();
    let targets = [
        ("linear_triatomic", load("demo-linear-triatomic.json", true)),
        ("bent_triatomic", load("demo-bent-triatomic.json", false)),
    ];
    let mut group = c.benchmark_group("threads");
    group.sample_size(10);
    for (name, target) in &targets {
        for threads in [1, 2] {
            let pool = rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap();
            group.bench_function(format!("whole_spectrum_{name}_{threads}_threads"), |b| {
                b.iter(|| {
                    pool.install(|| {
                        let stage = trajectory_stage(&field, target, &energies, &settings).unwrap();
                        black_box(
                            assemble(&field, target, &stage, true, &|_, _| {})
                                .unwrap()
                                .total
                                .len(),
                        )
                    })
                })
            });
        }
    }
    group.finish();
}

criterion_group!(thread_benches, benches);
criterion_main!(thread_benches);
