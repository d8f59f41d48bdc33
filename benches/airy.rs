//! Calls per second of `airy` in each evaluation region (criterion reports elements/s).
//!
//! Run with `cargo bench --bench airy`. Each benchmark evaluates a fixed set of 64 points
//! spread over the phases of one region, so the figures are averages over that region.

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use holecast::special::airy::airy;
use num_complex::Complex64;
use std::hint::black_box;

const POINTS: usize = 64;

/// 64 points with moduli in [r_min, r_max] and phases in [θ_min, θ_max] (deterministic).
fn points(r_min: f64, r_max: f64, theta_min: f64, theta_max: f64) -> Vec<Complex64> {
    (0..POINTS)
        .map(|i| {
            let u = (i as f64 + 0.5) / POINTS as f64;
            let v = ((i as f64) * 0.618_033_988_749_895).fract();
            Complex64::from_polar(
                r_min + (r_max - r_min) * v,
                theta_min + (theta_max - theta_min) * u,
            )
        })
        .collect()
}

fn regions(c: &mut Criterion) {
    use std::f64::consts::PI;
    // Build the node table before timing.
    black_box(airy(Complex64::new(3.0, 1.0)));
    let cases = [
        ("maclaurin |z|<=1", points(0.0, 1.0, -PI, PI)),
        ("taylor-node 1<|z|<9.5", points(1.0, 9.5, -PI, PI)),
        (
            "asymptotic 9.5<=|z|<=20 |ph z|<=2pi/3",
            points(9.5, 20.0, -2.0 * PI / 3.0, 2.0 * PI / 3.0),
        ),
        (
            "asymptotic 9.5<=|z|<=20 |ph z|>2pi/3",
            points(9.5, 20.0, 2.0 * PI / 3.0 + 1e-3, PI),
        ),
        (
            "asymptotic 50<=|z|<=200 near anti-Stokes lines",
            points(50.0, 200.0, PI / 3.0 - 0.05, PI / 3.0 + 0.05),
        ),
        (
            "asymptotic 50<=|z|<=200 near negative axis",
            points(50.0, 200.0, PI - 0.05, PI),
        ),
    ];
    let mut group = c.benchmark_group("airy");
    group.throughput(Throughput::Elements(POINTS as u64));
    for (name, zs) in &cases {
        group.bench_function(*name, |b| {
            b.iter(|| {
                let mut acc = Complex64::new(0.0, 0.0);
                for &z in zs {
                    let (ai, aip) = airy(black_box(z));
                    acc += ai + aip;
                }
                black_box(acc)
            })
        });
    }
    group.finish();
}

criterion_group!(benches, regions);
criterion_main!(benches);
