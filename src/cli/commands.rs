//! The commands: parse → settings → validate → estimate → run → export.

use std::collections::BTreeMap;

use anyhow::{Context, Result, anyhow, bail};
use serde_json::{Map, Value, json};

use holecast::cutoff::{Cutoffs, cutoffs, try_cutoffs};
use holecast::dipole::SaddleSum;
use holecast::field::Field;
use holecast::laser::LaserSpec;
use holecast::multichannel::{
    GroupDelays, HoleContour, HoleExpansion, MultichannelSettings, MultichannelSpectrum,
    StructurePlacement, assemble, refine_group_delays, trajectory_stage,
};
use holecast::orbits::{ChannelPair, OrbitSettings};
use holecast::report::lattice::Lattice;
use holecast::report::orbits::{LabelledTable, OrbitRows};
use holecast::report::spectrum::{HoleRows, SpectrumRows};
use holecast::report::{self, Cell, RowSource};
use holecast::status::RowStatus;
use holecast::units;
use holecast::validity::{self, Warning, WarningKind};
use holecast::workload::Workload;

use super::args::{
    GridArgs, GroupDelaysArg, HoleExpansionArg, HoleTimesArg, HolesArgs, LaserArgs, MethodArg,
    ModelArgs, MomentumArg, OrbitsArgs, SpectrumArgs, StructureArg, SumArg, TargetArgs,
};
use super::describe::{ChannelSummary, metadata, reference};
use super::figures::{RunDescription, context};
use super::limits::{Limits, hint};
use super::output::{Producer, Written, write_atomic, write_set, write_stdout};
use super::progress::Progress;
use super::provenance::provenance;
use super::settings::{self, InputFile, LoadedTarget};
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
    /// The laser file's record (None for a laser from the command line).
    pub laser_input: Option<InputFile>,
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
    let (spec, field, laser_input) = settings::laser(laser)?;
    validity::check_representable(&field, &validity::channels_of(&target.target))?;
    let mut orbit = OrbitSettings::default();
    orbit.discovery.max_returns = check_returns(returns)?;
    orbit.limits = global.limits.orbits;
    Ok(Loaded {
        target,
        laser: spec,
        laser_input,
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

/// Counts of a text column over the rows (a pass that builds each row and keeps none).
fn counts(rows: &dyn RowSource, column: &str) -> Result<BTreeMap<String, usize>> {
    report::count_text(rows, column).map_err(|e| anyhow!(e))
}

/// Writes a file or standard output (`None`), streamed.
fn write_out(out: Option<&std::path::Path>, produce: Producer<'_>) -> Result<()> {
    match out {
        Some(path) => write_atomic(path, produce),
        None => write_stdout(produce),
    }
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
    let field = &loaded.field;
    let grid = settings::energies(
        &args.grid,
        field,
        &loaded.laser,
        &loaded.target.target,
        &all_cutoffs(&summaries),
        &loaded.orbit,
    )?;
    let energies = &grid.energies;
    let channels = validity::channels_of(&loaded.target.target);
    warnings.extend(validity::grid_warnings(field, &channels, energies));
    let settings = MultichannelSettings {
        orbits: loaded.orbit,
        group_delays: GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    let t = &loaded.target.target;
    let spinner = global.progress().spinner(format!(
        "solving quantum orbits at {} energies",
        energies.len()
    ));
    let stage = trajectory_stage(field, t, energies, &settings);
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
    let rows = OrbitRows {
        tables: &tables,
        omega: field.omega(),
        grid: Some(&grid.lattice),
        include_excluded: args.include_excluded,
    };
    let status = rows.status_counts();
    let row_count: usize = status.values().sum();
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
    let produce: Producer<'_> = match args.format {
        super::args::Format::Json => {
            let mut meta = metadata("orbits", &loaded.target, &loaded.laser, field, &summaries);
            meta.insert(
                "provenance".into(),
                provenance(
                    &loaded,
                    Some(&grid.lattice),
                    json!({
                        "method": "saddle",
                        "method_note": "quantum orbits only: the saddle points (complex ionization and return times) of each channel pair, found by Newton's method with continuation along the photon energy; no dipole is computed",
                        "returns": loaded.orbit.discovery.max_returns,
                    }),
                ),
            );
            meta.insert("warnings".into(), warnings.json());
            meta.insert(
                "summary".into(),
                json!({"rows": row_count, "status": status}),
            );
            Box::new(move |w| report::json::write(&meta, "orbits", &rows, w).map(|_| ()))
        }
        super::args::Format::Csv => Box::new(|w| report::csv::write(&rows, w).map(|_| ())),
        super::args::Format::Table => Box::new(|w| orbit_text(&rows, w)),
    };
    write_out(args.out.as_deref(), produce)?;
    warnings.print();
    Ok(())
}

/// Readable text of the orbit rows, streamed.
fn orbit_text(rows: &dyn RowSource, w: &mut dyn std::io::Write) -> std::io::Result<()> {
    let header = format!(
        "{:>6} {:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}  {}",
        "pair", "order", "family", "hc", "t_ion (fs)", "t_ret (fs)", "action Φ", "conv", "status"
    );
    writeln!(w, "{header}")?;
    let num = |c: Option<&Cell>| match c {
        Some(Cell::Real(Some(x))) => format!("{x:.2}"),
        Some(Cell::Exact(d)) => d.to_string(),
        Some(Cell::Int(i)) => i.to_string(),
        Some(Cell::Text(t)) => t.clone(),
        Some(Cell::Bool(b)) => {
            if *b {
                "yes".into()
            } else {
                "NO".into()
            }
        }
        _ => "-".into(),
    };
    let complex = |r: &report::Row, name: &str| match (
        r.get(&format!("{name}_re")),
        r.get(&format!("{name}_im")),
    ) {
        (Some(Cell::Real(Some(re))), Some(Cell::Real(Some(im)))) => {
            format!("{re:+.5} {im:+.5}i")
        }
        _ => "-".into(),
    };
    report::each_row(rows, |_, r| {
        let pair = format!(
            "{}→{}",
            num(r.get("ionized_channel")),
            num(r.get("recombined_channel"))
        );
        writeln!(
            w,
            "{:>6} {:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}  {}",
            pair,
            num(r.get("order")),
            num(r.get("family")),
            num(r.get("half_cycle")),
            complex(r, "t_ion_fs"),
            complex(r, "t_ret_fs"),
            complex(r, "action"),
            num(r.get("converged")),
            num(r.get("status"))
        )
    })
    .map(|_| ())
}

/// Everything a spectrum or holes run produced.
struct Run {
    target: LoadedTarget,
    /// The multichannel settings of the run (saddle method).
    settings: MultichannelSettings,
    meta: Map<String, Value>,
    laser: LaserSpec,
    orbit: OrbitSettings,
    field: Field,
    summaries_cutoff: Cutoffs,
    spectrum: MultichannelSpectrum,
    energies: Vec<f64>,
    grid: Lattice,
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
    group_delays: Option<GroupDelaysArg>,
) -> Result<Option<holecast::quadrature::QuadratureSettings>> {
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
    match group_delays {
        None | Some(GroupDelaysArg::Difference) => {}
        Some(GroupDelaysArg::Skip) => q.group_delay_step = None,
        Some(GroupDelaysArg::Tangent) if method == MethodArg::Quadrature => bail!(
            "--group-delays tangent needs saddle points; the quadrature has none: use \
             --group-delays difference (its default) or skip"
        ),
        Some(GroupDelaysArg::Tangent) => {}
    }
    Ok((method == MethodArg::Quadrature).then_some(q))
}

/// The saddle method's group delays chosen on the command line.
fn group_delays(arg: Option<GroupDelaysArg>) -> GroupDelays {
    match arg {
        None | Some(GroupDelaysArg::Tangent) => GroupDelays::Tangent,
        Some(GroupDelaysArg::Difference) => GroupDelays::Difference { step: 1e-3 },
        Some(GroupDelaysArg::Skip) => GroupDelays::Skip,
    }
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
    delays: GroupDelays,
) -> Result<Run> {
    let loaded = load(target, laser, grid.returns, global)?;
    let mut warnings = Warnings::default();
    let summaries = summarise(&loaded, global, true, &mut warnings)?;
    warnings.extend(field_warnings(&loaded));
    let r = &summaries[reference(&summaries)];
    let field = &loaded.field;
    let settings::Grid { energies, lattice } = settings::energies(
        grid,
        field,
        &loaded.laser,
        &loaded.target.target,
        &all_cutoffs(&summaries),
        &loaded.orbit,
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
        group_delays: delays,
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
            let mut s = assemble(field, t, &stage, true, &report)?;
            if !s.unresolved_group_delays.is_empty() {
                let spinner = progress.spinner(format!(
                    "group delays by difference at {} energies the grid does not resolve",
                    s.unresolved_group_delays.len()
                ));
                let refined = refine_group_delays(field, t, &settings, true, &mut s);
                spinner.finish_and_clear();
                refined?;
            }
            s
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
            "group_delays": settings.group_delays,
            "group_delays_note": match settings.group_delays {
                GroupDelays::Tangent => "dφ/dΩ = Im d ln D/dΩ with each saddle's phase slope ∂Φ/∂Ω = t_r exact and the slope of the remaining prefactors (spreading, Airy, structure, hole) by a three-point difference across the energy grid; where the grid does not resolve the prefactors (|Δ ln| > 0.2 between neighbours), and on grids coarser than 0.25 harmonic orders throughout, by central difference over Ω ± 0.001ω with every saddle solved again",
                GroupDelays::Difference { .. } => "dφ/dΩ by central difference over Ω ± 0.001ω, every saddle solved again at both ends",
                GroupDelays::Skip => "not computed",
            },
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
    meta.insert(
        "provenance".into(),
        provenance(&loaded, Some(&lattice), approximations),
    );
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
        laser: loaded.laser,
        orbit: loaded.orbit,
        field: loaded.field,
        summaries_cutoff: cutoff,
        spectrum,
        energies,
        grid: lattice,
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
fn summarise_rows(
    spectrum: &MultichannelSpectrum,
    grid: &Lattice,
    warnings: &mut Warnings,
) -> Result<Value> {
    let rows = SpectrumRows {
        spectrum,
        grid: Some(grid),
    };
    let status = counts(&rows, "status")?;
    let row_count: usize = status.values().sum();
    let reasons = failure_reasons(spectrum);
    let get = |k: &str| status.get(k).copied().unwrap_or(0);
    let (partial, failed) = (
        get(RowStatus::Partial.code()),
        get(RowStatus::Failed.code()),
    );
    let non_finite = get(report::spectrum::NON_FINITE);
    let complete = get(RowStatus::Complete.code());
    if failed > 0 && partial == 0 && complete == 0 {
        warnings.push(
            WarningKind::AllSaddlesFailed,
            format!(
                "every orbit family that should contribute failed at every energy: the files \
                 hold no spectrum, only the failure reasons (failed family points: {})",
                count_text(&reasons)
            ),
            "read the validity warnings; holecast orbits lists each saddle with its reason",
        );
    } else if partial + failed > 0 {
        warnings.push(
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
        warnings.push(
            WarningKind::NonFiniteValues,
            format!(
                "{non_finite} rows have non-finite values (status non-finite; the columns are \
                 named in non_finite_columns and written as null)"
            ),
            "this is a defect of holecast: please report the command line",
        );
    }
    Ok(json!({
        "rows": row_count,
        "status": status,
        "failed_family_points": reasons,
    }))
}

fn hole_files<'a>(
    run: &Run,
    rows: &'a HoleRows<'a>,
    summary: &Value,
) -> Vec<(String, Producer<'a>)> {
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
    let json: Producer<'a> =
        Box::new(move |w| report::json::write(&meta, "points", rows, w).map(|_| ()));
    let csv: Producer<'a> = Box::new(move |w| report::csv::write(rows, w).map(|_| ()));
    vec![("holes.json".into(), json), ("holes.csv".into(), csv)]
}

/// The figure context of a run (title block, axes, cutoffs).
fn figure_context(run: &Run, what: &str) -> report::svg::FigureContext {
    context(
        &RunDescription {
            target: &run.target.target,
            laser: &run.laser,
            field: &run.field,
            orbit: &run.orbit,
            cutoff: &run.summaries_cutoff,
            reference: run.spectrum.reference,
            approximations: run
                .meta
                .get("provenance")
                .and_then(|p| p.get("approximations"))
                .unwrap_or(&Value::Null),
        },
        what,
    )
}

/// The hole figure, or a warning if it cannot be drawn.
fn hole_svg<'a>(run: &mut Run) -> Option<(String, Producer<'a>)> {
    let ctx = figure_context(run, "hole density decoded by each harmonic");
    match report::svg::hole_figure(&run.spectrum, &ctx) {
        Ok(svg) => Some(("holes.svg".into(), bytes(svg))),
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

/// A producer that writes text already built (the SVG figures, which are small).
fn bytes<'a>(text: String) -> Producer<'a> {
    Box::new(move |w| w.write_all(text.as_bytes()))
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
        args.group_delays,
    )?;
    let mut run = run(
        "spectrum",
        &args.target,
        &args.laser,
        &args.grid,
        &args.model,
        args.sum,
        global,
        quadrature,
        group_delays(args.group_delays),
    )?;
    let summary = summarise_rows(&run.spectrum, &run.grid, &mut run.warnings)?;
    let ctx = figure_context(&run, "harmonic spectrum");
    let svg = match report::svg::spectrum_figure(&run.spectrum, &ctx) {
        Ok(svg) => Some(("spectrum.svg".to_string(), bytes(svg))),
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
    let hole_svg = if with_holes { hole_svg(&mut run) } else { None };
    let run = run;
    let rows = SpectrumRows {
        spectrum: &run.spectrum,
        grid: Some(&run.grid),
    };
    let hole_rows = with_holes.then_some(HoleRows {
        spectrum: &run.spectrum,
        grid: Some(&run.grid),
    });
    let mut meta = run.meta.clone();
    meta.insert("warnings".into(), run.warnings.json());
    meta.insert("summary".into(), summary.clone());
    meta.insert(
        "columns".into(),
        json!({
            "intensity": "|D|^2 = sum over x,y,z of |D_k|^2, D(Ω) = ∫ <r>(t) e^{iΩt} dt over one period (periodic field) or the pulse, coherent over orientations, a.u.",
            "power": "Ω^4 |D|^2, proportional to the emitted power (dipole form), arbitrary units",
            "phase_rad": "arg of the dipole component along the driving polarization axis; null where the emission is negligible",
            "group_delay_fs": "dφ/dΩ (how: approximations.group_delays); for a periodic field only per family (*_group_delay_fs of a family is one half cycle's emission time; a sum over both half cycles has none: its dφ/dΩ is a half cycle's plus T/4), for pulses also for pairs and the total",
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
    let rows = &rows;
    let json: Producer<'_> =
        Box::new(move |w| report::json::write(&meta, "points", rows, w).map(|_| ()));
    let csv: Producer<'_> = Box::new(move |w| report::csv::write(rows, w).map(|_| ()));
    let mut files = vec![
        ("spectrum.json".to_string(), json),
        ("spectrum.csv".to_string(), csv),
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
            group_delays: GroupDelays::Skip,
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
        let detected = super::detected::files(
            &outcome,
            spec,
            args.detection.setup.as_deref(),
            &meta,
            &run.spectrum,
            &format!("{} — single molecule and detected", run.target.target.name),
        )?;
        for (name, bytes) in detected {
            let produce: Producer<'_> = Box::new(move |w| w.write_all(&bytes));
            files.push((name, produce));
        }
    }
    let mut names: Vec<&str> = SPECTRUM_NAMES.to_vec();
    names.extend(super::detected::NAMES);
    let written = write_set(&args.out, "spectrum", files, &names)
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
        // The same method as `spectrum`'s default, so that both write the same hole table (on
        // a grid coarser than 0.25 orders the difference's triples Ω ± δ change the energies
        // between which the next-order hole terms are bridged near a caustic).
        GroupDelays::Tangent,
    )?;
    let summary = summarise_rows(&run.spectrum, &run.grid, &mut run.warnings)?;
    let svg = hole_svg(&mut run);
    let run = run;
    let rows = HoleRows {
        spectrum: &run.spectrum,
        grid: Some(&run.grid),
    };
    let mut files = hole_files(&run, &rows, &summary);
    files.extend(svg);
    let written = write_set(&args.out, "holes", files, &HOLES_NAMES)
        .with_context(|| format!("writing the outputs into {}", args.out.display()))?;
    report_written(&written, global.quiet);
    run.warnings.print();
    summary_line(&run, &summary);
    Ok(())
}
