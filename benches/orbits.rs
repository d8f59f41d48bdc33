//! Speed of the trajectory stage and of a whole single-channel spectrum.
//!
//! `scripts/bench_figures.py` turns the timings into saddle solutions per second.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::dipole::SaddleSum;
use holecast::ionization::IonizationModel;
use holecast::laser::LaserSpec;
use holecast::orbits::{ChannelPair, DiscoverySettings, OrbitSettings, families, solve_orbits};
use holecast::recombination::RecombinationModel;
use holecast::spectrum::{ChannelModels, SpectrumSettings, single_channel};

/// Hydrogen, 800 nm, 2e14 W/cm²: plateau from H11 to H41 (cutoff H35.8).
fn setup() -> (holecast::field::Field, f64) {
    let field = LaserSpec::monochromatic(2e14, 800.0).to_field().unwrap();
    let w = field.omega();
    (field, w)
}

fn benches(c: &mut Criterion) {
    let (field, w) = setup();
    let settings = OrbitSettings::default();
    // 3001 energies × 4 families = 12004 saddle solutions per call: discovery is amortised.
    let long_grid: Vec<f64> = (0..=3000).map(|k| (11.0 + 0.01 * k as f64) * w).collect();
    c.bench_function("orbits/continuation_12004_saddles", |b| {
        b.iter(|| {
            let t = solve_orbits(
                &field,
                ChannelPair::single(0.5),
                black_box(&long_grid),
                &settings,
            )
            .unwrap();
            black_box(t.failed_points())
        })
    });
    c.bench_function("orbits/family_discovery", |b| {
        b.iter(|| black_box(families::discover(&field, &DiscoverySettings::default()).len()))
    });
    let plateau: Vec<f64> = (0..=300).map(|k| (11.0 + 0.1 * k as f64) * w).collect();
    let models = ChannelModels {
        ip: 0.5,
        ionization: IonizationModel::Gaussian { exponent: 0.27095 },
        recombination: RecombinationModel::Hydrogenic { ip: 0.5 },
    };
    for (name, delay) in [("with_group_delay", Some(1e-3)), ("no_group_delay", None)] {
        let s = SpectrumSettings {
            sum: SaddleSum::Uniform,
            group_delay_step: delay,
            ..SpectrumSettings::default()
        };
        c.bench_function(&format!("spectrum/plateau_301_energies_{name}"), |b| {
            b.iter(|| {
                black_box(
                    single_channel(&field, &models, black_box(&plateau), &s)
                        .unwrap()
                        .total
                        .len(),
                )
            })
        });
    }
}

criterion_group!(orbit_benches, benches);
criterion_main!(orbit_benches);
