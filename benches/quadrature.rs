//! Speed of the quadrature path against the saddle path on the same work.
//!
//! Hydrogen (`channels/hydrogen.json`), 800 nm, 2×10¹⁴ W/cm², the plateau H11–H41 (31 harmonic
//! lines, no group delays). "Equal plateau accuracy": the saddle path's error on this plateau is
//! set by the saddle-point approximation (rms 39% in |D| against the converged quadrature, the
//! STO-1G ionization prefactor varies fast at the complex ionization time), and it cannot be
//! traded for speed; the quadrature's error is set by its step. Its coarsest step that resolves
//! the plateau is 64 per cycle (rms 2% against the converged value; at 48 the Nyquist frequency
//! falls below H41 and the result aliases), so that is the quadrature run at (at least) the saddle
//! path's accuracy; the default automatic step (192 per cycle, rms 6e-5) is timed as well. The
//! same pair of runs for the multichannel demo copy (16 orientations, 9 channel pairs) shows how
//! the ratio grows with orientations and pairs. `scripts/bench_figures.py` prints the ratios.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::dipole::SaddleSum;
use holecast::field::Field;
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, assemble, trajectory_stage};
use holecast::quadrature::{QuadratureSettings, quadrature_spectrum};
use holecast::target::{Target, TargetSpec};

fn target(path: &str) -> Target {
    let path = format!("{}/{path}", env!("CARGO_MANIFEST_DIR"));
    TargetSpec::from_json(&std::fs::read_to_string(path).unwrap())
        .unwrap()
        .validate()
        .unwrap()
}

fn saddle(field: &Field, t: &Target, e: &[f64]) -> usize {
    let s = MultichannelSettings {
        sum: SaddleSum::Uniform,
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let stage = trajectory_stage(field, t, e, &s).unwrap();
    assemble(field, t, &stage, true, &|_, _| {})
        .unwrap()
        .total
        .len()
}

fn quadrature(field: &Field, t: &Target, e: &[f64], steps: Option<usize>) -> usize {
    let s = QuadratureSettings {
        steps_per_cycle: steps,
        group_delay_step: None,
        ..QuadratureSettings::default()
    };
    quadrature_spectrum(field, t, e, &s, &|_, _| {})
        .unwrap()
        .total
        .len()
}

fn benches(c: &mut Criterion) {
    let field = LaserSpec::monochromatic(2e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let plateau: Vec<f64> = (11..=41).map(|q| f64::from(q) * w).collect();
    let hydrogen = target("channels/hydrogen.json");
    c.bench_function("quadrature/saddle_hydrogen_800nm_H11_H41", |b| {
        b.iter(|| black_box(saddle(&field, &hydrogen, black_box(&plateau))))
    });
    c.bench_function(
        "quadrature/quadrature_hydrogen_800nm_H11_H41_64_steps",
        |b| b.iter(|| black_box(quadrature(&field, &hydrogen, black_box(&plateau), Some(64)))),
    );
    c.bench_function(
        "quadrature/quadrature_hydrogen_800nm_H11_H41_auto_steps",
        |b| b.iter(|| black_box(quadrature(&field, &hydrogen, black_box(&plateau), None))),
    );
    let demo = target("tests/data/demo-linear-triatomic-orbital.json");
    let mut group = c.benchmark_group("quadrature");
    group.sample_size(10);
    group.bench_function("saddle_demo_800nm_H11_H41", |b| {
        b.iter(|| black_box(saddle(&field, &demo, black_box(&plateau))))
    });
    group.bench_function("quadrature_demo_800nm_H11_H41_64_steps", |b| {
        b.iter(|| black_box(quadrature(&field, &demo, black_box(&plateau), Some(64))))
    });
    group.finish();
}

criterion_group!(quadrature_benches, benches);
criterion_main!(quadrature_benches);
