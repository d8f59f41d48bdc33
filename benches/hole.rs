//! Speed of the ionic (hole) propagator: building one orientation's grid and looking up one
//! element. Case of the task: N = 3 channels, window of 3 cycles at 800 nm, field 0.05 a.u.
//!
//! Run with `cargo bench --bench hole`.

use std::hint::black_box;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use holecast::hole::{DEFAULT_MAX_STEP, FieldSamples, HolePropagator, IonModel, MagnusScheme};
use nalgebra::{DMatrix, Matrix3, Vector3};
use num_complex::Complex64;

/// ω = 45.563352529 / 800 (a.u.), one optical cycle = 2π/ω.
const OMEGA: f64 = 45.563352529 / 800.0;
const FIELD: f64 = 0.05;

fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

fn ion() -> IonModel {
    let mu_x = DMatrix::from_row_slice(
        3,
        3,
        &[
            c(0.4, 0.0),
            c(0.9, -0.3),
            c(0.2, 0.5),
            c(0.9, 0.3),
            c(-0.6, 0.0),
            c(1.1, -0.2),
            c(0.2, -0.5),
            c(1.1, 0.2),
            c(0.1, 0.0),
        ],
    );
    let mu_y = DMatrix::from_row_slice(
        3,
        3,
        &[
            c(0.0, 0.0),
            c(0.3, 0.8),
            c(-0.7, 0.1),
            c(0.3, -0.8),
            c(0.2, 0.0),
            c(0.4, 0.4),
            c(-0.7, -0.1),
            c(0.4, -0.4),
            c(-0.3, 0.0),
        ],
    );
    let mu_z = DMatrix::from_row_slice(
        3,
        3,
        &[
            c(1.2, 0.0),
            c(1.5, 0.2),
            c(0.3, -0.6),
            c(1.5, -0.2),
            c(-0.9, 0.0),
            c(0.8, 0.7),
            c(0.3, 0.6),
            c(0.8, -0.7),
            c(0.5, 0.0),
        ],
    );
    let mut v = DMatrix::from_element(3, 3, c(0.0, 0.0));
    v[(0, 1)] = c(0.01, 0.004);
    v[(1, 0)] = c(0.01, -0.004);
    IonModel::new(vec![0.5, 0.55, 0.8], v, [mu_x, mu_y, mu_z]).expect("valid model")
}

fn rotation() -> Matrix3<f64> {
    let rz = |x: f64| Matrix3::new(x.cos(), -x.sin(), 0.0, x.sin(), x.cos(), 0.0, 0.0, 0.0, 1.0);
    let ry = |x: f64| Matrix3::new(x.cos(), 0.0, x.sin(), 0.0, 1.0, 0.0, -x.sin(), 0.0, x.cos());
    rz(0.3) * ry(1.1) * rz(-0.4)
}

fn samples() -> FieldSamples {
    let cycle = 2.0 * std::f64::consts::PI / OMEGA;
    let field = |t: f64| Vector3::new(0.0, 0.0, FIELD * (OMEGA * t).cos());
    FieldSamples::new(&field, 0.0, 3.0 * cycle, DEFAULT_MAX_STEP).expect("valid window")
}

/// Deterministic pseudo-random pairs t2 > t1 in the window (a 64-bit LCG, Knuth's MMIX constants).
fn time_pairs(count: usize, t_end: f64) -> Vec<(f64, f64)> {
    let mut state = 0x2545_f491_4f6c_dd1d_u64;
    let mut next = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    (0..count)
        .map(|_| {
            let a = next() * t_end;
            let b = next() * t_end;
            if a > b { (a, b) } else { (b, a) }
        })
        .collect()
}

fn bench(c: &mut Criterion) {
    let ion = ion();
    let r = rotation();
    let s = samples();
    let mut group = c.benchmark_group("hole");
    group.bench_function("field_samples_3_cycles", |b| {
        b.iter(|| black_box(samples()))
    });
    group.bench_function("build_orientation_sixth", |b| {
        b.iter(|| HolePropagator::new(black_box(&ion), black_box(&r), black_box(&s)))
    });
    group.bench_function("build_orientation_fourth", |b| {
        b.iter(|| {
            HolePropagator::with_scheme(
                black_box(&ion),
                black_box(&r),
                black_box(&s),
                MagnusScheme::Fourth,
            )
        })
    });
    let p = HolePropagator::new(&ion, &r, &s).expect("valid rotation");
    let pairs = time_pairs(1024, s.t_end());
    let mut sorted = pairs.clone();
    sorted.sort_by(|a, b| a.1.total_cmp(&b.1));
    group.throughput(Throughput::Elements(pairs.len() as u64));
    for (name, list) in [
        ("element_random_times", &pairs),
        ("element_sorted_times", &sorted),
    ] {
        group.bench_function(name, |b| {
            b.iter(|| {
                let mut acc = Complex64::new(0.0, 0.0);
                for (k, &(t2, t1)) in list.iter().enumerate() {
                    let m = k % 3;
                    let n = (k / 3) % 3;
                    acc += p
                        .element(m, n, black_box(t2), black_box(t1))
                        .unwrap_or_default();
                }
                acc
            })
        });
    }
    let located: Vec<_> = pairs
        .iter()
        .map(|&(t2, t1)| (s.locate(t2), s.locate(t1)))
        .filter_map(|(a, b)| Some((a.ok()?, b.ok()?)))
        .collect();
    group.bench_function("element_at_located_random_times", |b| {
        b.iter(|| {
            let mut acc = Complex64::new(0.0, 0.0);
            for (k, (t2, t1)) in located.iter().enumerate() {
                let m = k % 3;
                let n = (k / 3) % 3;
                acc += p
                    .element_at(m, n, black_box(t2), black_box(t1))
                    .unwrap_or_default();
            }
            acc
        })
    });
    group.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
