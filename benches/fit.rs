//! The demo fit's parts (examples/fits/demo-alignment.fit.json: 3 datasets × 12 lines, 16-point
//! β grid, 6 free parameters): one residual vector with the trajectory stages cached (what every
//! Jacobian column costs), the same with the stages solved afresh (what a change of field or
//! ionization potential costs), and a forward-difference Jacobian. The whole fit is timed by
//! scripts/fit_speed.py.

use criterion::{Criterion, criterion_group, criterion_main};

use holecast::fit::Residuals;
use holecast::fit::model::SingleMolecule;
use holecast::fit::objective::SpectrumFit;
use holecast::fit::problem::{Differences, jacobian};
use holecast::fit::spec::{Document, FitSpec};
use holecast::laser::LaserSpec;
use holecast::target::TargetSpec;

fn inputs() -> (FitSpec, TargetSpec, LaserSpec, Vec<String>) {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = root.join("examples/fits");
    let spec =
        FitSpec::from_json(&std::fs::read_to_string(dir.join("demo-alignment.fit.json")).unwrap())
            .unwrap();
    let target = TargetSpec::from_json(
        &std::fs::read_to_string(root.join("channels/demo-linear-triatomic.json")).unwrap(),
    )
    .unwrap();
    let laser = match &spec.laser {
        Document::Inline(l) => (**l).clone(),
        Document::Path(_) => panic!("the demo has its laser inline"),
    };
    let tables = spec
        .datasets
        .iter()
        .map(|d| std::fs::read_to_string(dir.join(&d.file)).unwrap())
        .collect();
    (spec, target, laser, tables)
}

fn bench(c: &mut Criterion) {
    let (spec, target, laser, tables) = inputs();
    let model = SingleMolecule::new();
    let fit = SpectrumFit::build(&spec, &target, &laser, &tables, &model).unwrap();
    let theta: Vec<f64> = fit.params.iter().map(|p| p.start).collect();
    let r0 = fit.residuals(&theta).unwrap();
    let mut g = c.benchmark_group("fit_demo");
    g.sample_size(10);
    g.bench_function("residuals_cached_stage", |b| {
        b.iter(|| fit.residuals(&theta).unwrap())
    });
    g.bench_function("residuals_fresh_stage", |b| {
        b.iter(|| {
            let m = SingleMolecule::new();
            let f = SpectrumFit::build(&spec, &target, &laser, &tables, &m).unwrap();
            f.residuals(&theta).unwrap()
        })
    });
    g.bench_function("jacobian_forward_6_parameters", |b| {
        b.iter(|| jacobian(&fit, &fit.params, &theta, &r0, Differences::Forward).unwrap())
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
