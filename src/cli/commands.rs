//! The commands: parse → settings → validate → estimate → run → export.

use std::collections::BTreeMap;

use anyhow::{Context, Result, anyhow, bail};
use serde_json::{Map, Value, json};

use holecast::cutoff::{Cutoffs, cutoffs, try_cutoffs};
use holecast::dipole::SaddleSum;
use holecast::field::Field;
use holecast::laser::LaserSpec;
use holecast::multichannel::{
    HoleContour, HoleExpansion, MultichannelSettings, MultichannelSpectrum, StructurePlacement,
    assemble, trajectory_stage,
};
use holecast::orbits::{ChannelPair, OrbitSettings};
use holecast::report::{self, Cell, orbits::LabelledTable, svg::Marker};
use holecast::status::RowStatus;
use holecast::units;
use holecast::validity::{self, Warning, WarningKind};
use holecast::workload::Workload;

use super::args::{
    GridArgs, HoleExpansionArg, HoleTimesArg, HolesArgs, LaserArgs, MethodArg, ModelArgs,
    MomentumArg, OrbitsArgs, SpectrumArgs, StructureArg, SumArg, TargetArgs,
};
use super::describe::{ChannelSummary, metadata, reference};
use super::limits::{Limits, hint};
use super::output::{Written, write_atomic, write_set};
use super::progress::Progress;
use super::settings::{self, LoadedTarget};
use super::warnings::Warnings;

/// Options that apply to every command.
#[derive(Clone, Copy, Debug)]
pub struct Global {
    /// No progress output.
    pub quiet: bool,
    /// Work and memory limits.
    pub limits: Limits,
    /// `--work-limit-factor` as given.
    pub factor: f64,
}

impl Global {
    fn progress(&self) -> Progress {
        Progress::new(self.quiet)
    }
}

/// A validated target and laser.
pub struct Loaded {
    /// The target.
    pub target: LoadedTarget,
    /// The laser as given (after the command-line overrides).
    pub laser: LaserSpec,
    /// The field.
    pub field: Field,
    /// Trajectory-stage settings (returns, work limits).
    pub orbit: OrbitSettings,
}

/// `--returns` checked: 1 to 8 (default 1).
fn check_returns(n: Option<i64>) -> Result<u32> {
    match n {
        None => Ok(1),
        Some(n) if (1..=8).contains(&n) => Ok(n as u32),
        Some(n) => bail!("--returns {n}: must be between 1 and 8"),
    }
}

/// Reads and validates the target and the laser.
pub fn load(
    target: &TargetArgs,
    laser: &LaserArgs,
    returns: Option<i64>,
    global: &Global,
) -> Result<Loaded> {
    let target = settings::target(target)?;
    let (spec, field) = settings::laser(laser)?;
    validity::check_representable(&field, &validity::channels_of(&target.target))?;
    let mut orbit = OrbitSettings::default();
    orbit.discovery.max_returns = check_returns(returns)?;
    orbit.limits = global.limits.orbits;
    Ok(Loaded {
        target,
        laser: spec,
        field,
        orbit,
    })
}

/// Cutoffs and Keldysh parameter of every channel (a spinner per channel). A cutoff search over
/// the work limits is an error (`refuse`) or, for `check`, a warning with the cutoffs left out;
/// a search that fails otherwise falls back to the monochromatic formula, with a warning.
pub fn summarise<'a>(
    loaded: &'a Loaded,
    global: &Global,
    refuse: bool,
    warnings: &mut Warnings,
) -> Result<Vec<ChannelSummary<'a>>> {
    let field = &loaded.field;
    let up = field.ponderomotive_energy();
    let channels = &loaded.target.target.channels;
    let mut out = Vec::with_capacity(channels.len());
    for (k, c) in channels.iter().enumerate() {
        let spinner = global.progress().spinner(format!(
            "cutoff search, channel {} ({}/{})",
            c.label,
            k + 1,
            channels.len()
        ));
        let result = try_cutoffs(field, ChannelPair::single(c.ip), &loaded.orbit);
        spinner.finish_and_clear();
        let cut = match result {
            Ok(x) => Some(x),
            Err(e @ holecast::Error::WorkLimit { .. }) => {
                let e =
                    anyhow::Error::new(e).context(format!("cutoff search of channel {}", c.label));
                if refuse {
                    return Err(e);
                }
                warnings.push(
                    WarningKind::WorkLimit,
                    format!("{e:#}"),
                    hint(&e, global.factor).unwrap_or_default(),
                );
                None
            }
            Err(e) => {
                warnings.push(
                    WarningKind::CutoffNotFound,
                    format!(
                        "channel {}: no cutoff from the orbits ({e}); the classical cutoff is the \
                         formula Ip + 3.17 Up",
                        c.label
                    ),
                    "read the cutoff columns as an estimate",
                );
                Some(cutoffs(field, ChannelPair::single(c.ip), &loaded.orbit))
            }
        };
        out.push(ChannelSummary {
            channel: c,
            keldysh: units::keldysh(c.ip, up),
            cutoffs: cut,
        });
    }
    Ok(out)
}

/// The validity warnings of the field and target (and the unused Dyson orbitals).
pub fn field_warnings(loaded: &Loaded) -> Vec<Warning> {
    let channels = validity::channels_of(&loaded.target.target);
    let mut out = validity::field_warnings(&loaded.field, &channels);
    for label in &loaded.target.unused_orbitals {
        out.push(Warning::new(
            WarningKind::UnusedDysonOrbital,
            format!(
                "channel {label} gives a dyson_orbital that neither of its models uses (only \
                 ionization \"orbital\" and recombination \"lcao\" read it): it is ignored"
            ),
            format!(
                "set \"ionization\": {{\"model\": \"orbital\"}} and/or \"recombination\": \
                 {{\"model\": \"lcao\"}} for channel {label}, or remove the orbital"
            ),
        ));
    }
    out
}

/// Cutoffs of every channel, for the energy grid (all present when `summarise` refused).
fn all_cutoffs(summaries: &[ChannelSummary<'_>]) -> Vec<Cutoffs> {
    summaries.iter().filter_map(|s| s.cutoffs).collect()
}

/// Counts of a text column of a table.
fn counts(table: &report::Table, column: &str) -> BTreeMap<String, usize> {
    let mut out = BTreeMap::new();
    if let Some(i) = table.columns.iter().position(|c| c == column) {
        for r in &table.rows {
            if let Cell::Text(t) = &r[i] {
                *out.entry(t.clone()).or_insert(0) += 1;
            }
        }
    }
    out
}

fn count_text(c: &BTreeMap<String, usize>) -> String {
    c.iter()
        .map(|(k, v)| format!("{k} {v}"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// `holecast orbits`.
pub fn orbits(args: &OrbitsArgs, global: &Global) -> Result<()> {
    let loaded = load(&args.target, &args.laser, args.grid.returns, global)?;
    let mut warnings = Warnings::default();
    let summaries = summarise(&loaded, global, true, &mut warnings)?;
    warnings.extend(field_warnings(&loaded));
    let r = &summaries[reference(&summaries)];
    let field = &loaded.field;
    let energies = settings::energies(
        &args.grid,
        field,
        r.channel.ip,
        &all_cutoffs(&summaries),
        &global.limits.orbits,
    )?;
    let channels = validity::channels_of(&loaded.target.target);
    warnings.extend(validity::grid_warnings(field, &channels, &energies));
    let settings = MultichannelSettings {
        orbits: loaded.orbit,
        group_delay_step: None,
        ..MultichannelSettings::default()
    };
    let t = &loaded.target.target;
    let spinner = global.progress().spinner(format!(
        "solving quantum orbits at {} energies",
        energies.len()
    ));
    let stage = trajectory_stage(field, t, &energies, &settings);
    spinner.finish_and_clear();
    let stage = stage?;
    let tables: Vec<LabelledTable<'_>> = stage
        .pairs
        .iter()
        .map(|p| LabelledTable {
            ionized: &t.channels[p.ion].label,
            recombined: &t.channels[p.rec].label,
            table: &p.table,
        })
        .collect();
    let rows = report::orbits::rows(&tables, field.omega(), args.include_excluded)
        .map_err(|e| anyhow!(e))?;
    let status = counts(&rows, "status");
    let failed: usize = status
        .iter()
        .filter(|(k, _)| k.starts_with("failed"))
        .map(|(_, v)| v)
        .sum();
    if failed > 0 {
        warnings.push(
            WarningKind::IncompletePoints,
            format!(
                "{failed} orbit points did not converge ({}); they are listed with converged = \
                 false, the reason in failure and status",
                count_text(
                    &status
                        .iter()
                        .filter(|(k, _)| k.starts_with("failed"))
                        .map(|(k, v)| (k.clone(), *v))
                        .collect()
                )
            ),
            "look at the validity warnings; a finer --orders step helps the continuation",
        );
    }
    let text = match args.format {
        super::args::Format::Json => {
            let mut meta = metadata("orbits", &loaded.target, &loaded.laser, field, &summaries);
            meta.insert("warnings".into(), warnings.json());
            meta.insert(
                "summary".into(),
                json!({"rows": rows.rows.len(), "status": status}),
            );
            report::json::document(meta, "orbits", &rows)
        }
        super::args::Format::Csv => report::csv::document(&rows),
        super::args::Format::Table => orbit_text(&rows),
    };
    match &args.out {
        Some(path) => write_atomic(path, text.as_bytes())?,
        None => print!("{text}"),
    }
    warnings.print();
    Ok(())
}

/// Readable text of the orbit rows.
fn orbit_text(rows: &report::Table) -> String {
    let col = |name: &str| rows.columns.iter().position(|c| c == name);
    let pick = [
        "ionized_channel",
        "recombined_channel",
        "order",
        "family",
        "half_cycle",
        "t_ion_fs",
        "t_ret_fs",
        "action",
        "converged",
        "status",
    ];
    let idx: Vec<Option<usize>> = pick.iter().map(|n| col(n)).collect();
    let mut out = format!(
        "{:>6} {:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}  {}\n",
        "pair", "order", "family", "hc", "t_ion (fs)", "t_ret (fs)", "action Φ", "conv", "status"
    );
    for r in &rows.rows {
        let cell = |i: usize| idx[i].map(|j| &r[j]);
        let num = |c: Option<&Cell>| match c {
            Some(Cell::Real(Some(x))) => format!("{x:.2}"),
            Some(Cell::Int(i)) => i.to_string(),
            Some(Cell::Text(t)) => t.clone(),
            Some(Cell::Bool(b)) => {
                if *b {
                    "yes".into()
                } else {
                    "NO".into()
                }
            }
            Some(Cell::Complex(Some(z))) => format!("{:+.5} {:+.5}i", z.re, z.im),
            _ => "-".into(),
        };
        let pair = format!("{}→{}", num(cell(0)), num(cell(1)));
        out.push_str(&format!(
            "{:>6} {:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}  {}\n",
            pair,
            num(cell(2)),
            num(cell(3)),
            num(cell(4)),
            num(cell(5)),
            num(cell(6)),
            num(cell(7)),
            num(cell(8)),
            num(cell(9))
        ));
    }
    out
}

/// Everything a spectrum or holes run produced.
struct Run {
    target: LoadedTarget,
    /// The multichannel settings of the run (saddle method).
    settings: MultichannelSettings,
    meta: Map<String, Value>,
    field: Field,
    summaries_cutoff: Cutoffs,
    spectrum: MultichannelSpectrum,
    energies: Vec<f64>,
    warnings: Warnings,
}

/// The method-specific options of `spectrum`, checked against the method: an option of the
/// other method is an error, never silently ignored.
fn check_method_options(args: &SpectrumArgs) -> Result<()> {
    let saddle_only: [(&str, bool); 6] = [
        ("--sum", args.sum.is_some()),
        ("--returns", args.grid.returns.is_some()),
        ("--hole-times", args.model.hole_times.is_some()),
        ("--hole-expansion", args.model.hole_expansion.is_some()),
        (
            "--ionization-structure",
            args.model.ionization_structure.is_some(),
        ),
        (
            "--recombination-structure",
            args.model.recombination_structure.is_some(),
        ),
    ];
    let quadrature_only: [(&str, bool); 3] = [
        ("--excursion-cycles", args.excursion_cycles.is_some()),
        ("--window-fall-cycles", args.window_fall_cycles.is_some()),
        ("--momentum-integral", args.momentum_integral.is_some()),
    ];
    match args.method {
        MethodArg::Saddle => {
            if let Some((flag, _)) = quadrature_only.iter().find(|(_, given)| *given) {
                bail!(
                    "{flag} applies to --method quadrature only; the saddle method takes its \
                     excursions from the quantum orbits (use --returns for longer ones)"
                );
            }
        }
        MethodArg::Quadrature => {
            if let Some((flag, _)) = saddle_only.iter().find(|(_, given)| *given) {
                bail!(
                    "{flag} applies to the saddle method only; --method quadrature integrates \
                     the time-domain dipole without saddle points (its options: \
                     --excursion-cycles, --window-fall-cycles, --momentum-integral)"
                );
            }
        }
    }
    Ok(())
}

/// Quadrature settings from the command line (`None` for the saddle method).
fn quadrature_settings(
    method: MethodArg,
    excursion: Option<f64>,
    fall: Option<f64>,
    momentum: Option<MomentumArg>,
) -> Option<holecast::quadrature::QuadratureSettings> {
    let mut q = holecast::quadrature::QuadratureSettings {
        momentum: match momentum.unwrap_or(MomentumArg::Exact) {
            MomentumArg::Exact => holecast::quadrature::MomentumIntegral::Exact,
            MomentumArg::Stationary => holecast::quadrature::MomentumIntegral::Stationary,
        },
        ..holecast::quadrature::QuadratureSettings::default()
    };
    if let Some(x) = excursion {
        q.excursion_cycles = x;
    }
    if let Some(f) = fall {
        q.window.fall_cycles = f;
    }
    (method == MethodArg::Quadrature).then_some(q)
}

/// The structure placement chosen on the command line.
fn placement(arg: Option<StructureArg>, default: StructurePlacement) -> StructurePlacement {
    match arg {
        None => default,
        Some(StructureArg::Phase) => StructurePlacement::Phase,
        Some(StructureArg::Prefactor) => StructurePlacement::Prefactor,
        Some(StructureArg::Auto) => StructurePlacement::Auto,
    }
}

#[allow(clippy::too_many_arguments)]
fn run(
    command: &str,
    target: &TargetArgs,
    laser: &LaserArgs,
    grid: &GridArgs,
    model: &ModelArgs,
    sum: Option<SumArg>,
    global: &Global,
    quadrature: Option<holecast::quadrature::QuadratureSettings>,
) -> Result<Run> {
    let loaded = load(target, laser, grid.returns, global)?;
    let mut warnings = Warnings::default();
    let summaries = summarise(&loaded, global, true, &mut warnings)?;
    warnings.extend(field_warnings(&loaded));
    let r = &summaries[reference(&summaries)];
    let field = &loaded.field;
    let energies = settings::energies(
        grid,
        field,
        r.channel.ip,
        &all_cutoffs(&summaries),
        &global.limits.orbits,
    )?;
    let t = &loaded.target.target;
    warnings.extend(validity::grid_warnings(
        field,
        &validity::channels_of(t),
        &energies,
    ));
    let defaults = MultichannelSettings::default();
    let settings = MultichannelSettings {
        sum: match sum {
            None | Some(SumArg::Uniform) => SaddleSum::Uniform,
            Some(SumArg::Plain) => SaddleSum::Plain,
        },
        orbits: loaded.orbit,
        hole_contour: match model.hole_times {
            None | Some(HoleTimesArg::Complex) => HoleContour::Complex,
            Some(HoleTimesArg::Real) => HoleContour::Real,
        },
        ionization_structure: placement(model.ionization_structure, defaults.ionization_structure),
        recombination_structure: placement(
            model.recombination_structure,
            defaults.recombination_structure,
        ),
        hole_expansion: match model.hole_expansion {
            None | Some(HoleExpansionArg::NextOrder) => HoleExpansion::NextOrder,
            Some(HoleExpansionArg::Leading) => HoleExpansion::Leading,
        },
        ..defaults
    };
    if let (Some(q), holecast::field::TimeStructure::Pulse { start, end }) =
        (&quadrature, field.structure())
    {
        let cycles = (end - start) * field.omega() / (2.0 * std::f64::consts::PI);
        if q.excursion_cycles > cycles {
            bail!(
                "--excursion-cycles {}: the excursion window is longer than the pulse ({cycles:.2} \
                 cycles of the first colour): no electron can travel that long while the field \
                 lasts; use at most {:.2}",
                q.excursion_cycles,
                cycles.floor().max(0.5)
            );
        }
    }
    let workload = match &quadrature {
        None => {
            let w = Workload::estimate(field, t, energies.len(), &loaded.orbit)?;
            w.check(&global.limits.workload)?;
            Some(w)
        }
        Some(_) => None,
    };
    let progress = global.progress();
    let bar = progress.bar("summing orientations", "orientations");
    let report = |done: usize, total: usize| {
        bar.set_length(total as u64);
        bar.set_position(done as u64);
    };
    let spectrum = match &quadrature {
        None => {
            let spinner = progress.spinner(format!(
                "solving quantum orbits: {} energies",
                energies.len()
            ));
            let stage = trajectory_stage(field, t, &energies, &settings);
            spinner.finish_and_clear();
            let stage = stage?;
            assemble(field, t, &stage, true, &report)?
        }
        Some(q) => {
            bar.set_message("quadrature");
            holecast::quadrature::quadrature_spectrum(field, t, &energies, q, &report)?
        }
    };
    bar.finish_and_clear();
    let Some(cutoff) = r.cutoffs else {
        bail!("internal: the reference channel has no cutoff");
    };
    let mut meta = metadata(command, &loaded.target, &loaded.laser, field, &summaries);
    let approximations = match &quadrature {
        None => json!({
            "method": "saddle",
            "method_note": "saddle-point evaluation of the time integrals over complex quantum orbits (relative error of order ω/Up); plane-wave continuum (no Coulomb distortion); no ground-state depletion",
            "saddle_sum": settings.sum,
            "hole_times": settings.hole_contour,
            "hole_times_note": match settings.hole_contour {
                HoleContour::Complex => "hole propagator U_I(t_r, t_i) at the complex saddle times (the hole moves during tunnelling)",
                HoleContour::Real => "hole propagator U_I(Re t_r, Re t_i): hole frozen under the barrier (shortcut)",
            },
            "hole_expansion": settings.hole_expansion,
            "hole_expansion_note": match (settings.hole_contour, settings.hole_expansion) {
                (HoleContour::Complex, HoleExpansion::NextOrder) => "U_I with its next-order saddle-point terms (curvature across the saddle, slope against the skew of the phase, the spreading factor and the structure prefactor); near a caustic (|zeta| < 1) the next-order/leading ratio of each family is bridged in photon energy from outside",
                _ => "U_I at the saddle only (leading order)",
            },
            "ionization_structure": settings.ionization_structure,
            "recombination_structure": settings.recombination_structure,
            "structure_note": "phase: Gaussian and centre factors of gaussian/orbital/lcao models in the saddle equations, shell by shell, with the momentum integral exact; prefactor: structure factors evaluated at the saddle; other models always in the prefactor",
            "accuracy": "measured against the quadrature in docs/validation.md",
        }),
        Some(q) => {
            let steps = q.steps_per_cycle.unwrap_or_else(|| {
                holecast::quadrature::automatic_steps_per_cycle(field, t, &energies)
            });
            let mut v = serde_json::to_value(q).unwrap_or(Value::Null);
            if let Some(o) = v.as_object_mut() {
                o.insert("steps_per_cycle".into(), json!(steps));
                o.insert("method".into(), json!("quadrature"));
                o.insert(
                    "method_note".into(),
                    json!("time integrals done numerically on real times; hole propagated in real time inside the integral; momentum integral exact for Gaussian-type structure (momentum = exact), other models at the mean momentum; plane-wave continuum"),
                );
            }
            v
        }
    };
    meta.insert("approximations".into(), approximations);
    meta.insert("orientations_summed".into(), json!(spectrum.orientations));
    if let Some(w) = workload {
        meta.insert(
            "work_estimate".into(),
            json!({
                "energies": w.energies,
                "channel_pairs": w.channel_pairs,
                "families_per_pair": w.families_per_pair,
                "orientations": w.orientations,
                "terms": w.terms,
                "memory_mb": w.memory_bytes / 1e6,
            }),
        );
    }
    Ok(Run {
        target: loaded.target,
        settings,
        meta,
        field: loaded.field,
        summaries_cutoff: cutoff,
        spectrum,
        energies,
        warnings,
    })
}

/// Counts of the failed family points per reason, over every pair, family and energy.
fn failure_reasons(s: &MultichannelSpectrum) -> BTreeMap<String, usize> {
    let mut out = BTreeMap::new();
    for p in &s.pairs {
        for c in &p.families {
            for st in c.status.iter().filter(|st| st.is_failure()) {
                *out.entry(st.code()).or_insert(0) += 1;
            }
        }
    }
    out
}

/// The run summary, from the rows' `status` column (the one definition of a complete row) and
/// the families' statuses; warnings for incomplete, failed and non-finite rows.
fn summarise_rows(run: &mut Run, rows: &report::Table) -> Value {
    let status = counts(rows, "status");
    let reasons = failure_reasons(&run.spectrum);
    let get = |k: &str| status.get(k).copied().unwrap_or(0);
    let (partial, failed) = (
        get(RowStatus::Partial.code()),
        get(RowStatus::Failed.code()),
    );
    let non_finite = get(report::spectrum::NON_FINITE);
    let complete = get(RowStatus::Complete.code());
    if failed > 0 && partial == 0 && complete == 0 {
        run.warnings.push(
            WarningKind::AllSaddlesFailed,
            format!(
                "every orbit family that should contribute failed at every energy: the files \
                 hold no spectrum, only the failure reasons (failed family points: {})",
                count_text(&reasons)
            ),
            "read the validity warnings; holecast orbits lists each saddle with its reason",
        );
    } else if partial + failed > 0 {
        run.warnings.push(
            WarningKind::IncompletePoints,
            format!(
                "{} rows are incomplete ({partial} partial, {failed} failed; failed family \
                 points: {}): the family columns *_status say which",
                partial + failed,
                count_text(&reasons)
            ),
            "do not read those rows as spectra; a finer --orders step or fewer returns may help",
        );
    }
    if non_finite > 0 {
        run.warnings.push(
            WarningKind::NonFiniteValues,
            format!(
                "{non_finite} rows have non-finite values (status non-finite; the columns are \
                 named in non_finite_columns and written as null)"
            ),
            "this is a defect of holecast: please report the command line",
        );
    }
    json!({
        "rows": rows.rows.len(),
        "status": status,
        "failed_family_points": reasons,
    })
}

fn hole_files(run: &Run, rows: &report::Table, summary: &Value) -> Vec<(String, Vec<u8>)> {
    let mut meta = run.meta.clone();
    meta.insert("warnings".into(), run.warnings.json());
    meta.insert("summary".into(), summary.clone());
    meta.insert(
        "columns".into(),
        json!({
            "delay_fs": "Re(t_r − t_i) of the reference channel's saddle: the time after ionization that the harmonic samples",
            "population_*": "diagonal of the normalised hole density matrix at recombination",
            "coherence_*_abs/_phase_rad": "off-diagonal elements (interaction picture, without the Bohr phases)",
            "yield": "trace before normalisation: orientation-averaged ionization weight of the point",
            "status": "complete where the hole was decoded, else the reference family's status (below-threshold, failed-…): why the row's numbers are null",
        }),
    );
    vec![
        (
            "holes.json".into(),
            report::json::document(meta, "points", rows).into_bytes(),
        ),
        ("holes.csv".into(), report::csv::document(rows).into_bytes()),
    ]
}

/// The hole figure, or a warning if it cannot be drawn.
fn hole_svg(run: &mut Run) -> Option<(String, Vec<u8>)> {
    let title = format!(
        "{} — hole populations vs return delay",
        run.target.target.name
    );
    match report::svg::hole_figure(&run.spectrum, &title) {
        Ok(svg) => Some(("holes.svg".into(), svg.into_bytes())),
        Err(e) => {
            run.warnings.push(
                WarningKind::PlotNotDrawn,
                format!("holes.svg was not drawn: {e}"),
                "the data are in holes.json and holes.csv",
            );
            None
        }
    }
}

fn report_written(written: &Written, quiet: bool) {
    if !quiet {
        for p in &written.files {
            eprintln!("wrote {}", p.display());
        }
        for r in &written.removed {
            eprintln!("removed {r} (from an earlier run)");
        }
    }
}

fn summary_line(run: &Run, summary: &Value) {
    let omega = run.field.omega();
    let s = &run.spectrum;
    let families: usize = s.pairs.iter().map(|p| p.families.len()).sum();
    let status = summary["status"].as_object().cloned().unwrap_or_default();
    let count = |k: &str| status.get(k).and_then(Value::as_u64).unwrap_or(0);
    let incomplete = count("partial") + count("failed") + count(report::spectrum::NON_FINITE);
    let below = count("below-threshold");
    println!(
        "{} energies from H{:.2} to H{:.2}; {} channel pairs, {families} orbit families, {} \
         orientations; quantum cutoff {}; incomplete points: {incomplete}{}",
        run.energies.len(),
        run.energies.first().copied().unwrap_or(0.0) / omega,
        run.energies.last().copied().unwrap_or(0.0) / omega,
        s.pairs.len(),
        s.orientations,
        run.summaries_cutoff
            .quantum
            .map(|q| format!("H{:.2} ({:.2} eV)", q / omega, units::au_to_ev(q)))
            .unwrap_or_else(|| "not found".into()),
        if below > 0 {
            format!("; below every threshold: {below}")
        } else {
            String::new()
        }
    );
}

/// Output names `spectrum` and `holes` can write (for folders without a manifest).
const SPECTRUM_NAMES: [&str; 6] = [
    "spectrum.json",
    "spectrum.csv",
    "spectrum.svg",
    "holes.json",
    "holes.csv",
    "holes.svg",
];
const HOLES_NAMES: [&str; 3] = ["holes.json", "holes.csv", "holes.svg"];

/// `holecast spectrum`.
pub fn spectrum(args: &SpectrumArgs, global: &Global) -> Result<()> {
    check_method_options(args)?;
    // The detection layer's setup is read and checked before any work.
    let detection = if args.detection.any() {
        if args.method == MethodArg::Quadrature {
            bail!(
                "--setup and the detection flags use the saddle method (one trajectory stage per \
                 intensity sample); drop --method quadrature"
            );
        }
        Some(super::detected::setup(&args.detection)?)
    } else {
        None
    };
    let quadrature = quadrature_settings(
        args.method,
        args.excursion_cycles,
        args.window_fall_cycles,
        args.momentum_integral,
    );
    let mut run = run(
        "spectrum",
        &args.target,
        &args.laser,
        &args.grid,
        &args.model,
        args.sum,
        global,
        quadrature,
    )?;
    let rows = report::spectrum::rows(&run.spectrum).map_err(|e| anyhow!(e))?;
    let summary = summarise_rows(&mut run, &rows);
    let omega = run.field.omega();
    let mut markers = vec![Marker {
        label: "classical cutoff".into(),
        order: run.summaries_cutoff.classical / omega,
    }];
    if let Some(q) = run.summaries_cutoff.quantum {
        markers.push(Marker {
            label: "quantum cutoff".into(),
            order: q / omega,
        });
    }
    let title = format!(
        "{} — {:.0} nm, Up = {:.2} eV ({} sum)",
        run.target.target.name,
        units::omega_to_wavelength_nm(omega),
        units::au_to_ev(run.field.ponderomotive_energy()),
        match (args.method, args.sum) {
            (MethodArg::Quadrature, _) => "quadrature, no",
            (MethodArg::Saddle, None | Some(SumArg::Uniform)) => "uniform",
            (MethodArg::Saddle, Some(SumArg::Plain)) => "plain",
        }
    );
    let svg = match report::svg::spectrum_figure(&run.spectrum, &markers, &title) {
        Ok(svg) => Some(("spectrum.svg".to_string(), svg.into_bytes())),
        Err(e) => {
            run.warnings.push(
                WarningKind::PlotNotDrawn,
                format!("spectrum.svg was not drawn: {e}"),
                "the data are in spectrum.json and spectrum.csv",
            );
            None
        }
    };
    // The quadrature has no saddles, hence no hole density per orbit.
    let with_holes = run.target.target.channels.len() > 1 && args.method == MethodArg::Saddle;
    let (hole_rows, hole_svg) = if with_holes {
        let rows = report::spectrum::hole_rows(&run.spectrum).map_err(|e| anyhow!(e))?;
        (Some(rows), hole_svg(&mut run))
    } else {
        (None, None)
    };
    let mut meta = run.meta.clone();
    meta.insert("warnings".into(), run.warnings.json());
    meta.insert("summary".into(), summary.clone());
    meta.insert(
        "columns".into(),
        json!({
            "intensity": "|D|^2 = sum over x,y,z of |D_k|^2, D(Ω) = ∫ <r>(t) e^{iΩt} dt over one period (periodic field) or the pulse, coherent over orientations, a.u.",
            "power": "Ω^4 |D|^2, proportional to the emitted power (dipole form), arbitrary units",
            "phase_rad": "arg of the dipole component along the driving polarization axis; null where the emission is negligible",
            "group_delay_fs": "dφ/dΩ by central difference over Ω ± 0.001ω; for a periodic field only per family (*_group_delay_fs of a family is one half cycle's emission time; a sum over both half cycles has none: its dφ/dΩ is a half cycle's plus T/4), for pulses also for pairs and the total",
            "complete": "true when the row's status is complete",
            "status": "complete (every family that should contribute converged), partial (some failed), failed (all that should contribute failed), below-threshold (below every recombining channel's Ip: no harmonic in this model), no-orbits, non-finite (see non_finite_columns)",
            "non_finite_columns": "columns whose computed value was not finite (written as null)",
            "parallel/perpendicular": "dipole components along and across the driving polarization (in its plane)",
            "ellipticity/polarization_angle_deg": "polarization state of the harmonic from the Stokes parameters of (parallel, perpendicular); null where the emission is zero",
            "incoherent_pair_sum": "sum over channel pairs of |D_pair|^2: compare with intensity to see the channel interference",
            "recombined_<m>_share": "|ê·Σ_n D_(n→m)|² / Σ_m' |ê·Σ_n D_(n→m')|²: the share of the harmonic (along the driving polarization) emitted on recombination into channel m",
            "<ion>_to_<rec>_*": "contribution of ionization into channel <ion> and recombination into <rec>",
            "*_emission_time_fs": "Re t_r of the family's saddle, from the field crest at t = 0",
            "*_kernel": "uniform, plain, plain-fallback, excluded, failed, or none (the family is absent: see *_status)",
            "*_status": "summed, excluded-<why>, below-threshold, no-classical-return, returns-after-pulse, beyond-half-cycle-cutoff, failed-<why>: why a family's columns are null",
        }),
    );
    let mut files = vec![
        (
            "spectrum.json".to_string(),
            report::json::document(meta, "points", &rows).into_bytes(),
        ),
        (
            "spectrum.csv".to_string(),
            report::csv::document(&rows).into_bytes(),
        ),
    ];
    files.extend(svg);
    if let Some(rows) = &hole_rows {
        files.extend(hole_files(&run, rows, &summary));
        files.extend(hole_svg);
    }
    if let Some((spec, setup)) = &detection {
        let progress = global.progress();
        let bar = progress.bar("detection: single-molecule runs", "intensity samples");
        let report = |done: usize, total: usize| {
            bar.set_length(total as u64);
            bar.set_position(done as u64);
        };
        let settings = MultichannelSettings {
            group_delay_step: None,
            ..run.settings
        };
        let outcome = holecast::detection::detect(
            &run.field,
            &run.target.target,
            &run.energies,
            &settings,
            setup,
            &report,
        );
        bar.finish_and_clear();
        let outcome = outcome.context("detection layer")?;
        // The layer's own notes (their codes are in detected.json's "notes").
        for n in &outcome.notes {
            eprintln!(
                "warning [detection-{}]: {} (what to do: {})",
                n.code, n.message, n.advice
            );
        }
        let mut meta = run.meta.clone();
        meta.insert("warnings".into(), run.warnings.json());
        files.extend(super::detected::files(
            &outcome,
            spec,
            args.detection.setup.as_deref(),
            &meta,
            &run.spectrum,
            &format!("{title} — single molecule and detected"),
        )?);
    }
    let mut names: Vec<&str> = SPECTRUM_NAMES.to_vec();
    names.extend(super::detected::NAMES);
    let written = write_set(&args.out, "spectrum", &files, &names)
        .with_context(|| format!("writing the outputs into {}", args.out.display()))?;
    report_written(&written, global.quiet);
    run.warnings.print();
    summary_line(&run, &summary);
    Ok(())
}

/// `holecast holes`.
pub fn holes(args: &HolesArgs, global: &Global) -> Result<()> {
    let mut run = run(
        "holes",
        &args.target,
        &args.laser,
        &args.grid,
        &args.model,
        None,
        global,
        None,
    )?;
    let spectrum_rows = report::spectrum::rows(&run.spectrum).map_err(|e| anyhow!(e))?;
    let summary = summarise_rows(&mut run, &spectrum_rows);
    let rows = report::spectrum::hole_rows(&run.spectrum).map_err(|e| anyhow!(e))?;
    let svg = hole_svg(&mut run);
    let mut files = hole_files(&run, &rows, &summary);
    files.extend(svg);
    let written = write_set(&args.out, "holes", &files, &HOLES_NAMES)
        .with_context(|| format!("writing the outputs into {}", args.out.display()))?;
    report_written(&written, global.quiet);
    run.warnings.print();
    summary_line(&run, &summary);
    Ok(())
}
