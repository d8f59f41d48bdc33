//! Speed of one plane-wave dipole evaluation (called once per saddle point and orientation).
use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::orbital::{
    CartesianSpec, Orbital, PlaneWaveProjection, Rotated, TermSpec, hydrogenic_dipole,
};
use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

/// The two-centre orbital of tests/data/orbital_reference.json: 4 primitives (contracted s of
/// two exponents and dxz on one centre, pz on the other), complex coefficients.
fn four_primitive_orbital() -> Orbital {
    let term =
        |centre: [f64; 3], exps: Vec<f64>, contraction: Vec<f64>, label: &str, c: [f64; 2]| {
            TermSpec {
                centre_bohr: centre,
                exponents_inv_bohr2: exps,
                contraction,
                cartesian: CartesianSpec::Label(label.to_owned()),
                coefficient: c,
            }
        };
    Orbital::new(
        "bench",
        &[
            term(
                [0.0, 0.0, -0.7],
                vec![1.3, 0.35],
                vec![0.4, 0.7],
                "s",
                [0.8, 0.1],
            ),
            term([0.0, 0.0, -0.7], vec![0.9], vec![], "dxz", [0.2, -0.1]),
            term([0.1, 0.2, 0.7], vec![0.6], vec![], "pz", [-0.5, 0.3]),
        ],
    )
    .expect("valid orbital")
}

fn bench(c: &mut Criterion) {
    let orbital = four_primitive_orbital();
    assert_eq!(orbital.primitive_count(), 4);
    let k = Vector3::new(
        Complex64::new(0.4, 0.3),
        Complex64::new(-0.2, 0.1),
        Complex64::new(0.9, -0.4),
    );
    let rotation = Matrix3::new(0.0, -1.0, 0.0, 1.0, 0.0, 0.0, 0.0, 0.0, 1.0);
    let rotated = Rotated::new(&orbital, &rotation).expect("orthogonal");
    c.bench_function("transform, 4 primitives", |b| {
        b.iter(|| orbital.transform(black_box(&k)))
    });
    c.bench_function("dipole_length, 4 primitives", |b| {
        b.iter(|| orbital.dipole_length(black_box(&k)))
    });
    c.bench_function("dipole_length_recombination, 4 primitives", |b| {
        b.iter(|| orbital.dipole_length_recombination(black_box(&k)))
    });
    c.bench_function("dipole_length rotated, 4 primitives", |b| {
        b.iter(|| rotated.dipole_length(black_box(&k)))
    });
    // Baseline to read the figures against on a loaded machine: one complex exponential.
    c.bench_function("baseline: one Complex64::exp", |b| {
        b.iter(|| black_box(k.z).exp())
    });
    c.bench_function("hydrogenic_dipole", |b| {
        b.iter(|| hydrogenic_dipole(black_box(&k), 0.5))
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
