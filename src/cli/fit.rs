//! `holecast fit` (fit measured spectra, or with `--expected-noise` the expected uncertainties
//! of planned datasets) and `holecast synthetic` (measured-format data from the model with
//! seeded noise).

use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};

use anyhow::{Context, Result, anyhow, bail};
use clap::Args;
use plotters::prelude::*;
use serde_json::{Value, json};

use holecast::address::Address;
use holecast::fit::levenberg::LmSettings;
use holecast::fit::model::{SingleMolecule, SpectrumModel};
use holecast::fit::objective::{SpectrumFit, documents_at};
use holecast::fit::outcome::{FitOutcome, RunSettings, run};
use holecast::fit::spec::{Document, FitSpec, ResidualMode};
use holecast::fit::synthetic::{Noise, draw, table};
use holecast::fit::uncertainty::{DEFAULT_RCOND, NoiseScale, analyse};
use holecast::fit::{IterationReport, Observer};
use holecast::laser::LaserSpec;
use holecast::report::svg::canvas::superscript;
use holecast::report::svg::palette::COLOURS;
use holecast::target::TargetSpec;
use holecast::units;

use super::commands::Global;
use super::output::write_set;

/// Arguments of `holecast fit`.
#[derive(Debug, Args)]
pub struct FitArgs {
    /// Fit file (JSON; see docs/fit-file.md and examples/fits/).
    #[arg(value_name = "FITFILE")]
    pub fit_file: PathBuf,
    /// Output folder (fit.json, fit.csv, fit.svg, fitted-target.json).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Number of starts (overrides the fit file's `fitter.starts`).
    #[arg(long, value_name = "N")]
    pub starts: Option<usize>,
    /// Experiment design: no fit; the expected standard errors and correlations at the start
    /// values for this relative noise of every line yield (inverse Fisher information), and
    /// which parameters the planned datasets determine. The tables only give the line positions.
    #[arg(long, value_name = "FRACTION")]
    pub expected_noise: Option<f64>,
}

/// Arguments of `holecast synthetic`.
#[derive(Debug, Args)]
pub struct SyntheticArgs {
    /// Fit file whose target, laser and datasets (conditions, `orders`) define the data.
    #[arg(value_name = "FITFILE")]
    pub fit_file: PathBuf,
    /// Folder the dataset files are written into (each at its `file` path below it).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Noise seed.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Poisson counts: expected counts of each dataset's strongest line.
    #[arg(long, value_name = "COUNTS", conflicts_with = "relative_noise")]
    pub poisson_peak: Option<f64>,
    /// Relative Gaussian noise of every line yield (e.g. 0.05).
    #[arg(long, value_name = "FRACTION")]
    pub relative_noise: Option<f64>,
    /// Set a value of the target or laser before generating (repeatable), e.g.
    /// `--set target.couplings[0].dipole_au[2]=1.5`.
    #[arg(long = "set", value_name = "ADDRESS=VALUE")]
    pub set: Vec<String>,
}

/// The fit file with its documents resolved.
struct Loaded {
    spec: FitSpec,
    target: TargetSpec,
    laser: LaserSpec,
    dir: PathBuf,
    path: PathBuf,
}

fn load(path: &Path) -> Result<Loaded> {
    let text = std::fs::read_to_string(path)
        .with_context(|| format!("cannot read fit file {}", path.display()))?;
    let spec =
        FitSpec::from_json(&text).map_err(|e| anyhow!("fit file {}: {e}", path.display()))?;
    let dir = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let target = match &spec.target {
        Document::Inline(t) => (**t).clone(),
        Document::Path(p) => {
            let f = dir.join(p);
            let t = std::fs::read_to_string(&f).with_context(|| {
                format!(
                    "fit file {}: target: cannot read {}",
                    path.display(),
                    f.display()
                )
            })?;
            TargetSpec::from_json(&t).map_err(|e| anyhow!("target file {}: {e}", f.display()))?
        }
    };
    let laser = match &spec.laser {
        Document::Inline(l) => (**l).clone(),
        Document::Path(p) => {
            let f = dir.join(p);
            let t = std::fs::read_to_string(&f).with_context(|| {
                format!(
                    "fit file {}: laser: cannot read {}",
                    path.display(),
                    f.display()
                )
            })?;
            serde_json::from_str(&t).map_err(|e| anyhow!("laser file {}: {e}", f.display()))?
        }
    };
    Ok(Loaded {
        spec,
        target,
        laser,
        dir,
        path: path.to_path_buf(),
    })
}

fn tables(l: &Loaded) -> Result<Vec<String>> {
    l.spec
        .datasets
        .iter()
        .map(|d| {
            let f = l.dir.join(&d.file);
            std::fs::read_to_string(&f).with_context(|| {
                format!(
                    "fit file {}: dataset {}: cannot read {}",
                    l.path.display(),
                    d.label,
                    f.display()
                )
            })
        })
        .collect()
}

static STOP: AtomicBool = AtomicBool::new(false);

/// First Ctrl-C: stop after the current iteration and write the best so far; second: exit.
fn install_stop(flag: Arc<AtomicBool>) {
    let _ = ctrlc::set_handler(move || {
        if STOP.swap(true, Ordering::SeqCst) {
            eprintln!("interrupted twice: exiting without writing");
            std::process::exit(i32::from(super::interrupt::EXIT_INTERRUPTED));
        }
        flag.store(true, Ordering::SeqCst);
        eprintln!("interrupt: stopping after this iteration; the best result so far is written");
    });
}

/// `holecast fit`.
pub fn fit(args: &FitArgs, global: &Global) -> Result<()> {
    let l = load(&args.fit_file)?;
    let model = SingleMolecule::new();
    if let Some(noise) = args.expected_noise {
        return expected(args, &l, &model, noise, global);
    }
    let texts = tables(&l)?;
    let problem = SpectrumFit::build(&l.spec, &l.target, &l.laser, &texts, &model)
        .map_err(|e| anyhow!("fit file {}: {e}", l.path.display()))?;
    let f = &l.spec.fitter;
    let profile = f
        .profile
        .iter()
        .map(|name| {
            problem
                .params
                .iter()
                .position(|p| p.name == *name)
                .ok_or_else(|| anyhow!("fitter.profile: \"{name}\" is not a free parameter"))
        })
        .collect::<Result<Vec<_>>>()?;
    let settings = RunSettings {
        // Spectra are fitted to the precision their noise allows, not to machine precision:
        // χ² to 1e-10 relative, parameters to 1e-8.
        lm: LmSettings {
            max_iterations: f.max_iterations,
            differences: f.differences,
            ftol: 1e-10,
            xtol: 1e-8,
            gtol: 1e-8,
            ..LmSettings::default()
        },
        starts: args.starts.unwrap_or(f.starts).max(1),
        minima_delta_chi2: f.minima_delta_chi2,
        profile,
        rcond: DEFAULT_RCOND,
    };
    let stop = Arc::new(AtomicBool::new(false));
    install_stop(stop.clone());
    let progress = super::progress::Progress::new(global.quiet);
    let spinner = progress.spinner("fitting");
    let best = Arc::new(AtomicU64::new(f64::INFINITY.to_bits()));
    let start_no = Arc::new(AtomicU64::new(0));
    let total = settings.starts;
    let (sp, b2, s2) = (spinner.clone(), best.clone(), start_no.clone());
    let observer: Observer = Arc::new(move |r: IterationReport| {
        let b = f64::from_bits(b2.load(Ordering::Relaxed)).min(r.chi2);
        b2.store(b.to_bits(), Ordering::Relaxed);
        sp.set_message(format!(
            "start {}/{total}, iteration {}, {} evaluations, chi2 {:.4e}, best {:.4e}",
            s2.load(Ordering::Relaxed) + 1,
            r.iteration + 1,
            r.evaluations,
            r.chi2,
            b
        ));
    });
    let on_start = |k: usize| start_no.store(k as u64, Ordering::Relaxed);
    let (outcome, bestmin) = run(
        &problem,
        &problem.params,
        problem.profiled(),
        &settings,
        Some(observer),
        &on_start,
        Some(stop.clone()),
    )
    .map_err(|e| anyhow!("fit file {}: {e}", l.path.display()))?;
    spinner.finish_and_clear();
    let evaluated = problem
        .evaluate(&bestmin.theta)
        .map_err(|e| anyhow!("the model at the best point: {e}"))?;
    let mut doc = serde_json::to_value(&outcome)?;
    if let Some(o) = doc.as_object_mut() {
        o.insert("fit_file".into(), json!(l.path.display().to_string()));
        o.insert("model".into(), json!(model.describe()));
        o.insert("residuals".into(), json!(l.spec.fitter.residuals));
        o.insert(
            "trajectory_stages_solved".into(),
            json!(model.stages_solved.load(Ordering::Relaxed)),
        );
        o.insert(
            "datasets".into(),
            json!(problem.datasets.iter().zip(&evaluated).map(|(d, e)| json!({
                "label": d.label, "file": d.file, "lines": d.y.len(),
                "scale": e.scale, "scale_profiled": matches!(d.scale, holecast::fit::spec::ScaleSpec::Profiled),
                "chi2": e.residuals.iter().map(|r| r * r).sum::<f64>(),
            })).collect::<Vec<_>>()),
        );
    }
    let csv = csv_rows(&problem, &evaluated);
    let svg = figure(&problem, &evaluated, &l.spec.fitter.residuals)
        .map_err(|e| anyhow!("fit.svg: {e}"))?;
    let fitted = fitted_target(&problem, &outcome, &bestmin.theta)?;
    let files = vec![
        ("fit.json".to_string(), serde_json::to_vec_pretty(&doc)?),
        ("fit.csv".to_string(), csv.into_bytes()),
        ("fit.svg".to_string(), svg.into_bytes()),
        ("fitted-target.json".to_string(), fitted),
    ];
    write_set(
        &args.out,
        "fit",
        super::output::in_memory(files),
        &["fit.json", "fit.csv", "fit.svg", "fitted-target.json"],
    )
    .with_context(|| format!("writing the outputs into {}", args.out.display()))?;
    print_summary(&outcome, &args.out, global.quiet);
    if outcome.interrupted {
        eprintln!("interrupted: the best result so far is written (marked \"interrupted\": true)");
        std::process::exit(i32::from(super::interrupt::EXIT_INTERRUPTED));
    }
    Ok(())
}

fn print_summary(o: &FitOutcome, out: &Path, quiet: bool) {
    if quiet {
        return;
    }
    eprintln!(
        "chi2 {:.4e}, reduced {:.3} ({} dof), {} ({}), {} evaluations, {} minima within dchi2 {}",
        o.chi2,
        o.reduced_chi2,
        o.dof,
        if o.converged {
            "converged"
        } else {
            "NOT converged"
        },
        o.termination,
        o.evaluations,
        o.minima.len(),
        o.minima_delta_chi2
    );
    for p in &o.parameters {
        match p.std_error {
            Some(s) => eprintln!("  {:<40} {:>14.6e} ± {:.2e}", p.name, p.value, s),
            None => eprintln!(
                "  {:<40} {:>14.6e}   undetermined: {}",
                p.name,
                p.value,
                p.note.as_deref().unwrap_or("")
            ),
        }
    }
    eprintln!("written to {}", out.display());
}

fn csv_rows(p: &SpectrumFit<'_>, e: &[holecast::fit::objective::Evaluated]) -> String {
    let mut s = String::from("dataset,file,row,order,energy_ev,yield,uncertainty,model,residual\n");
    for (d, ev) in p.datasets.iter().zip(e) {
        for i in 0..d.y.len() {
            s.push_str(&format!(
                "{},{},{},{:.6},{:.6},{:.10e},{},{:.10e},{:.6e}\n",
                d.label,
                d.file,
                d.rows[i],
                d.orders[i],
                units::au_to_ev(d.energies[i]),
                d.y[i],
                d.sigma
                    .as_ref()
                    .map(|v| format!("{:.6e}", v[i]))
                    .unwrap_or_default(),
                ev.model[i],
                ev.residuals[i]
            ));
        }
    }
    s
}

fn fitted_target(p: &SpectrumFit<'_>, o: &FitOutcome, theta: &[f64]) -> Result<Vec<u8>> {
    let mut t = p.target.clone();
    for (slot, v) in p.slots.iter().zip(theta) {
        if let holecast::fit::objective::Slot::Address(a) = slot {
            if a.document == holecast::address::Document::Target {
                a.set(&mut t, *v)?;
            }
        }
    }
    if let Some(obj) = t.as_object_mut() {
        let note = format!(
            "{} Best fit (holecast fit): {}.",
            obj.get("description").and_then(Value::as_str).unwrap_or(""),
            o.parameters
                .iter()
                .map(|p| format!(
                    "{} = {:.6e}{}",
                    p.name,
                    p.value,
                    p.std_error
                        .map(|s| format!(" ± {s:.2e}"))
                        .unwrap_or(" (undetermined)".into())
                ))
                .collect::<Vec<_>>()
                .join("; ")
        );
        obj.insert("description".into(), json!(note.trim()));
    }
    Ok(serde_json::to_vec_pretty(&t)?)
}

fn figure(
    p: &SpectrumFit<'_>,
    e: &[holecast::fit::objective::Evaluated],
    mode: &ResidualMode,
) -> Result<String, String> {
    let n = p.datasets.len();
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (900, 380 * n as u32)).into_drawing_area();
        root.fill(&WHITE).map_err(|e| format!("{e:?}"))?;
        let rows = root.split_evenly((n, 1));
        for (k, area) in rows.iter().enumerate() {
            let d = &p.datasets[k];
            let (top, bottom) = area.split_vertically(260);
            let x0 = d.orders.iter().cloned().fold(f64::INFINITY, f64::min) - 1.0;
            let x1 = d.orders.iter().cloned().fold(f64::NEG_INFINITY, f64::max) + 1.0;
            let all = d.y.iter().chain(&e[k].model).filter(|v| **v > 0.0);
            let ymin = all.clone().cloned().fold(f64::INFINITY, f64::min) / 3.0;
            let ymax = all.cloned().fold(0.0, f64::max) * 3.0;
            let mut c = ChartBuilder::on(&top)
                .caption(
                    format!("{} ({}): data and model", d.label, d.file),
                    ("sans-serif", 16),
                )
                .margin(8)
                .x_label_area_size(20)
                .y_label_area_size(70)
                .build_cartesian_2d(x0..x1, (ymin..ymax).log_scale())
                .map_err(|e| format!("{e:?}"))?;
            c.configure_mesh()
                .y_desc("line yield")
                .x_label_formatter(&|q| format!("{q:.0}"))
                .y_label_formatter(&decade_label)
                .draw()
                .map_err(|e| format!("{e:?}"))?;
            let data: Vec<(f64, f64)> = d.orders.iter().cloned().zip(d.y.iter().cloned()).collect();
            let model: Vec<(f64, f64)> = d
                .orders
                .iter()
                .cloned()
                .zip(e[k].model.iter().cloned())
                .collect();
            if let Some(s) = &d.sigma {
                c.draw_series(d.orders.iter().enumerate().map(|(i, &q)| {
                    PathElement::new(
                        vec![(q, (d.y[i] - s[i]).max(ymin)), (q, d.y[i] + s[i])],
                        BLACK,
                    )
                }))
                .map_err(|e| format!("{e:?}"))?;
            }
            c.draw_series(
                data.iter()
                    .map(|&(x, y)| Circle::new((x, y), 3, BLACK.filled())),
            )
            .map_err(|e| format!("{e:?}"))?
            .label("data")
            .legend(|(x, y)| Circle::new((x, y), 3, BLACK.filled()));
            // The tool's Okabe–Ito colours (src/report/svg/palette.rs).
            let (model_colour, residual_colour) = (COLOURS[1], COLOURS[0]);
            c.draw_series(LineSeries::new(model.clone(), model_colour.stroke_width(2)))
                .map_err(|e| format!("{e:?}"))?
                .label("model (scaled)")
                .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 16, y)], model_colour));
            c.configure_series_labels()
                .position(SeriesLabelPosition::UpperRight)
                .border_style(BLACK)
                .background_style(WHITE)
                .draw()
                .map_err(|e| format!("{e:?}"))?;
            let r = &e[k].residuals;
            let rmax = r.iter().map(|v| v.abs()).fold(1.0, f64::max) * 1.2;
            let mut c2 = ChartBuilder::on(&bottom)
                .margin(8)
                .x_label_area_size(30)
                .y_label_area_size(70)
                .build_cartesian_2d(x0..x1, -rmax..rmax)
                .map_err(|e| format!("{e:?}"))?;
            c2.configure_mesh()
                .x_desc("harmonic order")
                .x_label_formatter(&|q| format!("{q:.0}"))
                .y_desc(match mode {
                    ResidualMode::Log => "log residual / σ",
                    ResidualMode::Linear => "residual / σ",
                })
                .draw()
                .map_err(|e| format!("{e:?}"))?;
            c2.draw_series(LineSeries::new(vec![(x0, 0.0), (x1, 0.0)], BLACK))
                .map_err(|e| format!("{e:?}"))?;
            c2.draw_series(
                d.orders
                    .iter()
                    .zip(r)
                    .map(|(&q, &v)| Circle::new((q, v), 3, residual_colour.filled())),
            )
            .map_err(|e| format!("{e:?}"))?;
        }
        root.present().map_err(|e| format!("{e:?}"))?;
    }
    Ok(svg)
}

/// `--expected-noise`: the Fisher information at the start values.
fn expected(
    args: &FitArgs,
    l: &Loaded,
    model: &SingleMolecule,
    noise: f64,
    global: &Global,
) -> Result<()> {
    if !(noise > 0.0 && noise < 1.0) {
        bail!("--expected-noise {noise}: must lie in (0, 1)");
    }
    // Noise-free tables at the start values, at the planned lines.
    let mut spec = l.spec.clone();
    let base = tables(l).ok();
    let mut texts = Vec::new();
    let starts_problem_tdoc = serde_json::to_value(&l.target)?;
    let ldoc = serde_json::to_value(&l.laser)?;
    let mut start_sets: Vec<(Address, f64)> = Vec::new();
    for p in &spec.parameters {
        if let Some(s) = p.start {
            start_sets.push((p.address.parse()?, s));
        }
    }
    for (k, d) in spec.datasets.iter_mut().enumerate() {
        let conditions: Vec<(Address, f64)> = d
            .conditions
            .iter()
            .map(|(a, v)| Ok((a.parse::<Address>()?, *v)))
            .collect::<Result<_>>()?;
        let mut all = conditions.clone();
        all.extend(start_sets.iter().cloned());
        let (t, la) = documents_at(&starts_problem_tdoc, &ldoc, &all, &[], &[])
            .map_err(|e| anyhow!("dataset {}: {e}", d.label))?;
        let omega = la.to_field().map_err(|e| anyhow!("{e}"))?.omega();
        let orders = planned_orders(d, base.as_ref().map(|b| b[k].as_str()))?;
        let e: Vec<f64> = orders.iter().map(|q| q * omega).collect();
        let y = model
            .yields(&t, &la, &e)
            .map_err(|e| anyhow!("dataset {}: {e}", d.label))?;
        let s: Vec<f64> = y.iter().map(|v| noise * v).collect();
        texts.push(table(&[], &orders, &y, &s));
        d.columns = serde_json::from_value(
            json!({"x": "order", "yield": "yield", "uncertainty": "uncertainty"}),
        )?;
        d.x_unit = holecast::fit::measured::XUnit::Order;
        d.kind = holecast::fit::spec::DataKind::Lines;
        d.relative_uncertainty = None;
    }
    spec.fitter.residuals = ResidualMode::Log;
    let problem = SpectrumFit::build(&spec, &l.target, &l.laser, &texts, model)
        .map_err(|e| anyhow!("fit file {}: {e}", l.path.display()))?;
    let theta: Vec<f64> = problem.params.iter().map(|p| p.start).collect();
    let r = holecast::fit::Residuals::residuals(&problem, &theta).map_err(|e| anyhow!("{e}"))?;
    let u = analyse(
        &problem,
        &problem.params,
        &theta,
        &r,
        problem.profiled(),
        spec.fitter.differences,
        NoiseScale::Known,
        DEFAULT_RCOND,
    )
    .map_err(|e| anyhow!("{e}"))?;
    let parameters: Vec<Value> = problem
        .params
        .iter()
        .enumerate()
        .map(|(j, p)| {
            json!({"name": p.name, "value": theta[j], "std_error": u.std_errors[j],
                   "initial": p.start, "lower": p.lower.is_finite().then_some(p.lower),
                   "upper": p.upper.is_finite().then_some(p.upper),
                   "determined": u.determined[j], "note": u.notes[j]})
        })
        .collect();
    let doc = json!({
        "mode": "expected uncertainties (inverse Fisher information at the start values)",
        "relative_noise": noise,
        "parameters": parameters,
        "correlation": u.correlation,
        "dof": u.dof,
        "eigenvalue_ratio": u.eigenvalue_ratio,
        "model": model.describe(),
    });
    write_set(
        &args.out,
        "fit-expected",
        super::output::in_memory(vec![(
            "expected.json".to_string(),
            serde_json::to_vec_pretty(&doc)?,
        )]),
        &["expected.json"],
    )?;
    if !global.quiet {
        for (j, p) in problem.params.iter().enumerate() {
            match u.std_errors[j] {
                Some(s) => eprintln!("  {:<40} {:>12.4e} expected ± {:.2e}", p.name, theta[j], s),
                None => eprintln!(
                    "  {:<40} {:>12.4e} not determined: {}",
                    p.name,
                    theta[j],
                    u.notes[j].as_deref().unwrap_or("")
                ),
            }
        }
        eprintln!("written to {}", args.out.join("expected.json").display());
    }
    Ok(())
}

fn planned_orders(d: &holecast::fit::spec::DatasetSpec, text: Option<&str>) -> Result<Vec<f64>> {
    if let Some(o) = &d.orders {
        return Ok(o.clone());
    }
    if let (Some(t), holecast::fit::measured::XUnit::Order) = (text, d.x_unit) {
        let tab = holecast::fit::measured::parse(t, &d.file, &d.columns)?;
        return Ok(tab.x);
    }
    bail!(
        "dataset {}: give the planned lines as \"orders\" (a list of harmonic orders)",
        d.label
    )
}

/// `holecast synthetic`.
pub fn synthetic(args: &SyntheticArgs, global: &Global) -> Result<()> {
    let l = load(&args.fit_file)?;
    let model = SingleMolecule::new();
    let noise = match (args.poisson_peak, args.relative_noise) {
        (Some(p), None) => Noise::Poisson { peak_counts: p },
        (None, Some(f)) => Noise::RelativeGaussian { fraction: f },
        (None, None) => {
            bail!("choose the noise: --poisson-peak COUNTS or --relative-noise FRACTION")
        }
        _ => unreachable!("clap keeps the two apart"),
    };
    let mut sets: Vec<(Address, f64)> = Vec::new();
    for s in &args.set {
        let (a, v) = s
            .split_once('=')
            .ok_or_else(|| anyhow!("--set {s}: write ADDRESS=VALUE"))?;
        let v: f64 = v
            .trim()
            .parse()
            .map_err(|_| anyhow!("--set {s}: \"{v}\" is not a number"))?;
        sets.push((a.trim().parse()?, v));
    }
    let tdoc = serde_json::to_value(&l.target)?;
    let ldoc = serde_json::to_value(&l.laser)?;
    let mut models = Vec::new();
    let mut orders_all = Vec::new();
    for d in &l.spec.datasets {
        let mut all: Vec<(Address, f64)> = d
            .conditions
            .iter()
            .map(|(a, v)| Ok((a.parse::<Address>()?, *v)))
            .collect::<Result<_>>()?;
        all.extend(sets.iter().cloned());
        let (t, la) = documents_at(&tdoc, &ldoc, &all, &[], &[])
            .map_err(|e| anyhow!("dataset {}: {e}", d.label))?;
        let omega = la.to_field().map_err(|e| anyhow!("{e}"))?.omega();
        let orders = d.orders.clone().ok_or_else(|| {
            anyhow!(
                "dataset {}: \"orders\" (the harmonic orders to generate) is missing",
                d.label
            )
        })?;
        let e: Vec<f64> = orders.iter().map(|q| q * omega).collect();
        models.push(
            model
                .yields(&t, &la, &e)
                .map_err(|e| anyhow!("dataset {}: {e}", d.label))?,
        );
        orders_all.push(orders);
    }
    let drawn = draw(&models, noise, args.seed)?;
    let mut files = Vec::new();
    for (k, d) in l.spec.datasets.iter().enumerate() {
        let mut comments = vec![
            "INVENTED synthetic data written by holecast synthetic (not a measurement)".to_string(),
            format!("fit file: {}", args.fit_file.display()),
            format!(
                "dataset: {}; seed {}; noise {:?}",
                d.label, args.seed, noise
            ),
        ];
        for (a, v) in &d.conditions {
            comments.push(format!("condition {a} = {v}"));
        }
        for s in &args.set {
            comments.push(format!("set {s}"));
        }
        comments.push(format!("model: {}", model.describe()));
        let text = table(&comments, &orders_all[k], &drawn[k].0, &drawn[k].1);
        files.push((args.out.join(&d.file), text));
    }
    for (path, text) in &files {
        if let Some(dir) = path.parent() {
            std::fs::create_dir_all(dir)
                .with_context(|| format!("cannot create {}", dir.display()))?;
        }
        super::output::write_atomic(
            path,
            super::output::bytes_producer(text.clone().into_bytes()),
        )?;
        if !global.quiet {
            eprintln!("wrote {}", path.display());
        }
    }
    Ok(())
}

/// A log-axis label: `10ⁿ` at decades (the other figures' labels), else the plain value.
fn decade_label(v: &f64) -> String {
    let l = v.log10();
    if (l - l.round()).abs() < 1e-9 {
        format!("10{}", superscript(l.round() as i64))
    } else {
        format!("{v:e}")
    }
}
