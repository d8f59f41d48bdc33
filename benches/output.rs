//! Speed of the output writers (rows streamed into a sink, no file system): the orbit table of
//! hydrogen at 800 nm, 2e14 W/cm², H11–H41 in steps of 0.001 (30,001 energies, about 100,000
//! rows: the size of `holecast orbits --orders 11:41:0.001`) as JSON and CSV; and the spectrum
//! and hole rows of the three-channel demo, H9–H39 in steps of 0.1 (301 rows each).
//!
//! `scripts/bench_figures.py` prints rows per second and bytes per row.

use std::hint::black_box;
use std::io::{self, Write};

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, assemble, trajectory_stage};
use holecast::report::lattice::{GridUnit, Lattice};
use holecast::report::orbits::{LabelledTable, OrbitRows};
use holecast::report::spectrum::{HoleRows, SpectrumRows};
use holecast::report::{self, csv, json};
use holecast::target::TargetSpec;

/// Counts the bytes written, keeps none.
#[derive(Default)]
struct Count(u64);

impl Write for Count {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        self.0 += buf.len() as u64;
        Ok(buf.len())
    }
    fn flush(&mut self) -> io::Result<()> {
        Ok(())
    }
}

fn target(name: &str) -> holecast::target::Target {
    let path = format!("{}/channels/{name}", env!("CARGO_MANIFEST_DIR"));
    TargetSpec::from_json(&std::fs::read_to_string(path).unwrap())
        .unwrap()
        .validate()
        .unwrap()
}

fn lattice(first: &str, step: &str, last: f64) -> Lattice {
    Lattice::from_text(
        GridUnit::Order,
        (first, first.parse().unwrap()),
        (step, step.parse().unwrap()),
        last,
        "bench",
    )
    .unwrap()
}

fn benches(c: &mut Criterion) {
    let mut group = c.benchmark_group("output");
    group.sample_size(20);

    // Orbits: about 100,000 rows.
    let field = LaserSpec::monochromatic(2e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let grid = lattice("11", "0.001", 41.0);
    let energies: Vec<f64> = grid.values().into_iter().map(|q| q * w).collect();
    let hydrogen = target("hydrogen.json");
    let settings = MultichannelSettings {
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let stage = trajectory_stage(&field, &hydrogen, &energies, &settings).unwrap();
    let tables: Vec<LabelledTable<'_>> = stage
        .pairs
        .iter()
        .map(|p| LabelledTable {
            ionized: "X",
            recombined: "X",
            table: &p.table,
        })
        .collect();
    let rows = OrbitRows {
        tables: &tables,
        omega: w,
        grid: Some(&grid),
        include_excluded: false,
    };
    let n = report::count_text(&rows, "status")
        .unwrap()
        .values()
        .sum::<usize>();
    // Criterion records the row count (benchmark.json), for rows per second.
    group.throughput(Throughput::Elements(n as u64));
    group.bench_function("orbits_rows_only", |b| {
        b.iter(|| {
            black_box(
                report::each_row(&rows, |_, r| {
                    black_box(r.cells().len());
                    Ok(())
                })
                .unwrap(),
            )
        })
    });
    group.bench_function("orbits_json", |b| {
        b.iter(|| {
            let mut sink = Count::default();
            json::write(&serde_json::Map::new(), "orbits", &rows, &mut sink).unwrap();
            black_box(sink.0)
        })
    });
    group.bench_function("orbits_csv", |b| {
        b.iter(|| {
            let mut sink = Count::default();
            csv::write(&rows, &mut sink).unwrap();
            black_box(sink.0)
        })
    });

    // Spectrum and holes of the three-channel demo.
    let field = LaserSpec::monochromatic(1.5e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let grid = lattice("9", "0.1", 39.0);
    let energies: Vec<f64> = grid.values().into_iter().map(|q| q * w).collect();
    let demo = target("demo-linear-triatomic.json");
    let settings = MultichannelSettings::default();
    let stage = trajectory_stage(&field, &demo, &energies, &settings).unwrap();
    let spectrum = assemble(&field, &demo, &stage, true, &|_, _| {}).unwrap();
    group.throughput(Throughput::Elements(energies.len() as u64));
    let rows = SpectrumRows {
        spectrum: &spectrum,
        grid: Some(&grid),
    };
    let holes = HoleRows {
        spectrum: &spectrum,
        grid: Some(&grid),
    };
    group.bench_function("spectrum_json_csv_demo_301_rows", |b| {
        b.iter(|| {
            let mut sink = Count::default();
            json::write(&serde_json::Map::new(), "points", &rows, &mut sink).unwrap();
            csv::write(&rows, &mut sink).unwrap();
            black_box(sink.0)
        })
    });
    group.bench_function("holes_json_csv_demo", |b| {
        b.iter(|| {
            let mut sink = Count::default();
            json::write(&serde_json::Map::new(), "points", &holes, &mut sink).unwrap();
            csv::write(&holes, &mut sink).unwrap();
            black_box(sink.0)
        })
    });
    group.finish();
}

criterion_group!(output, benches);
criterion_main!(output);
