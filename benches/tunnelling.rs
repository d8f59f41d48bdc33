//! Speed of the tunnelling inner functions (called once per ionization saddle and orientation).
//! Run with `cargo bench --bench tunnelling`.

use std::hint::black_box;

use criterion::{Criterion, criterion_group, criterion_main};
use holecast::tunnelling::{
    AsymptoticOrbital, AsymptoticTerm, EulerZyz, adk_static_rate, gamma_function, ppt_g,
};
use nalgebra::Vector3;
use num_complex::Complex64;

fn sigma_orbital() -> AsymptoticOrbital {
    let terms = [(0, 2.0), (2, 0.8), (4, 0.04)]
        .into_iter()
        .map(|(l, c)| AsymptoticTerm::new(l, 0, Complex64::new(c, 0.0)))
        .collect();
    AsymptoticOrbital::new(0.5726, 1.0, terms).expect("valid orbital")
}

fn bench(c: &mut Criterion) {
    let orbital = sigma_orbital();
    let dir = Vector3::new(0.3, -0.5, 0.8);
    let frame = EulerZyz::new(0.3, 0.9, -1.4).expect("finite angles");
    c.bench_function("ppt_g(0.1)", |b| b.iter(|| ppt_g(black_box(0.1))));
    c.bench_function("ppt_g(1.3)", |b| b.iter(|| ppt_g(black_box(1.3))));
    c.bench_function("gamma_function(1.86)", |b| {
        b.iter(|| gamma_function(black_box(1.86)))
    });
    c.bench_function("adk_static_rate", |b| {
        b.iter(|| adk_static_rate(black_box(0.579), 1.0, 1, 0, black_box(0.0534)))
    });
    c.bench_function("leading_amplitude_for_field (l = 0,2,4)", |b| {
        b.iter(|| orbital.leading_amplitude_for_field(black_box(dir)))
    });
    c.bench_function("amplitudes_for_field (l = 0,2,4)", |b| {
        b.iter(|| orbital.amplitudes_for_field(black_box(dir)))
    });
    c.bench_function("structure_factor_in_frame (l = 0,2,4)", |b| {
        b.iter(|| orbital.structure_factor_in_frame(black_box(&frame)))
    });
    c.bench_function("static_rate_for_field (l = 0,2,4)", |b| {
        b.iter(|| orbital.static_rate_for_field(black_box(0.05), black_box(dir)))
    });
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(30).measurement_time(std::time::Duration::from_secs(2));
    targets = bench
}
criterion_main!(benches);
