//! Speed of the trajectory stage and of a whole one-channel spectrum (through the
//! multichannel path, with the ionization Gaussian in the phase or in the prefactor).
//!
//! `scripts/bench_figures.py` turns the timings into saddle solutions per second.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::dipole::SaddleSum;
use holecast::ionization::IonizationModel;
use holecast::laser::LaserSpec;
use holecast::multichannel::{GroupDelays, MultichannelSettings, StructurePlacement, spectrum};
use holecast::orbits::{ChannelPair, DiscoverySettings, OrbitSettings, families, solve_orbits};
use holecast::recombination::RecombinationModel;
use holecast::target::Target;

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
    let target = Target::one_channel(
        0.5,
        IonizationModel::Gaussian { exponent: 0.27095 },
        RecombinationModel::Hydrogenic { ip: 0.5 },
    )
    .unwrap();
    for (placement, tag) in [
        (StructurePlacement::Prefactor, "prefactor"),
        (StructurePlacement::Phase, "phase"),
    ] {
        for (name, delay) in [
            ("with_group_delay", GroupDelays::Tangent),
            ("no_group_delay", GroupDelays::Skip),
        ] {
            let s = MultichannelSettings {
                sum: SaddleSum::Uniform,
                group_delays: delay,
                ionization_structure: placement,
                ..MultichannelSettings::default()
            };
            c.bench_function(
                &format!("spectrum/plateau_301_energies_{name}_structure_{tag}"),
                |b| {
                    b.iter(|| {
                        black_box(
                            spectrum(&field, &target, black_box(&plateau), &s)
                                .unwrap()
                                .total
                                .len(),
                        )
                    })
                },
            );
        }
    }
}

criterion_group!(orbit_benches, benches);
criterion_main!(orbit_benches);
