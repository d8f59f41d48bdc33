//! The commands: parse → settings → validate → run → export.

use std::fmt::Write as _;
use std::io::IsTerminal;
use std::path::Path;

use anyhow::{Result, anyhow, bail};
use indicatif::{ProgressBar, ProgressStyle};
use serde_json::{Map, Value, json};

use holecast::cutoff::{Cutoffs, cutoffs};
use holecast::dipole::SaddleSum;
use holecast::field::{Field, TimeStructure};
use holecast::laser::LaserSpec;
use holecast::multichannel::{
    HoleContour, HoleExpansion, MultichannelSettings, MultichannelSpectrum, StructurePlacement,
    assemble, coupling_components, trajectory_stage,
};
use holecast::orbits::{ChannelPair, OrbitSettings};
use holecast::report::{self, orbits::LabelledTable, svg::Marker};
use holecast::target::{Channel, OrientationGridSpec, Target};
use holecast::units;

use super::args::{
    CheckArgs, Format, GridArgs, HoleExpansionArg, HoleTimesArg, HolesArgs, LaserArgs, MethodArg,
    ModelArgs, MomentumArg, OrbitsArgs, SpectrumArgs, StructureArg, SumArg, TargetArgs,
};
use super::output::{write_all_atomic, write_atomic};
use super::settings::{self, LoadedTarget};

/// Derived quantities of one channel in the field.
struct ChannelSummary<'a> {
    channel: &'a Channel,
    keldysh: f64,
    cutoffs: Cutoffs,
}

fn summarise<'a>(
    target: &'a LoadedTarget,
    field: &Field,
    settings: &OrbitSettings,
) -> Vec<ChannelSummary<'a>> {
    let up = field.ponderomotive_energy();
    target
        .target
        .channels
        .iter()
        .map(|c| ChannelSummary {
            channel: c,
            keldysh: units::keldysh(c.ip, up),
            cutoffs: cutoffs(field, ChannelPair::single(c.ip), settings),
        })
        .collect()
}

/// Index of the lowest-Ip channel (the reference channel of top-level keys); channels are
/// ordered by Ip, so it is the first.
fn reference(summaries: &[ChannelSummary<'_>]) -> usize {
    summaries
        .iter()
        .enumerate()
        .min_by(|a, b| a.1.channel.ip.total_cmp(&b.1.channel.ip))
        .map_or(0, |(i, _)| i)
}

fn ev(x: f64) -> Value {
    json!(units::au_to_ev(x))
}

fn cutoff_json(c: &Cutoffs, omega: f64) -> Value {
    json!({
        "classical_ev": ev(c.classical),
        "classical_order": c.classical / omega,
        "quantum_ev": c.quantum.map(units::au_to_ev),
        "quantum_order": c.quantum.map(|q| q / omega),
        "quantum_imaginary_ev": c.coalescence.map(|z| units::au_to_ev(z.omega.im)),
        "lewenstein_formula_ev": ev(c.lewenstein),
    })
}

fn orientation_json(t: &Target) -> Value {
    let mean = t.alignment.mean_cos2();
    match t.orientations {
        OrientationGridSpec::Fixed(e) => json!({
            "grid": "fixed",
            "euler_deg": e.map(f64::to_degrees),
        }),
        OrientationGridSpec::Axis(n) => {
            json!({"grid": "axis", "beta_points": n, "mean_cos2": mean})
        }
        OrientationGridSpec::Full(b, a, g) => json!({
            "grid": "full", "beta_points": b, "alpha_points": a, "gamma_points": g, "mean_cos2": mean,
        }),
    }
}

fn couplings_json(t: &Target) -> Value {
    let n = t.channels.len();
    let mut out = Vec::new();
    for a in 0..n {
        for b in a..n {
            let mu: Vec<Value> = t
                .ion
                .dipole()
                .iter()
                .map(|m| json!([m[(a, b)].re, m[(a, b)].im]))
                .collect();
            let v = t.ion.coupling()[(a, b)];
            let nonzero = t.ion.dipole().iter().any(|m| m[(a, b)].norm() > 0.0) || v.norm() > 0.0;
            if nonzero {
                out.push(json!({
                    "channels": [t.channels[a].label, t.channels[b].label],
                    "dipole_au": mu,
                    "energy_ev": [v.re * units::HARTREE_EV, v.im * units::HARTREE_EV],
                }));
            }
        }
    }
    Value::Array(out)
}

/// Metadata shared by every JSON output.
fn metadata(
    command: &str,
    target: &LoadedTarget,
    laser: &LaserSpec,
    field: &Field,
    summaries: &[ChannelSummary<'_>],
) -> Map<String, Value> {
    let omega = field.omega();
    let up = field.ponderomotive_energy();
    let r = &summaries[reference(summaries)];
    let t = &target.target;
    let mut m = Map::new();
    m.insert("holecast_version".into(), json!(env!("CARGO_PKG_VERSION")));
    m.insert("command".into(), json!(command));
    m.insert(
        "target".into(),
        json!({
            "name": t.name,
            "file": target.file.as_ref().map(|p| p.display().to_string()),
            "invented": t.invented,
            "source": t.source,
        }),
    );
    m.insert(
        "laser".into(),
        serde_json::to_value(laser).unwrap_or(Value::Null),
    );
    m.insert("photon_ev".into(), ev(omega));
    let (kind, span) = match field.structure() {
        TimeStructure::Periodic { period } => ("periodic", units::au_to_fs(period)),
        TimeStructure::Pulse { start, end } => ("pulse", units::au_to_fs(end - start)),
    };
    m.insert("field_structure".into(), json!(kind));
    m.insert("field_duration_fs".into(), json!(span));
    m.insert("peak_field_au".into(), json!(field.peak_field()));
    m.insert("up_ev".into(), ev(up));
    m.insert("reference_channel".into(), json!(r.channel.label));
    m.insert("keldysh".into(), json!(r.keldysh));
    m.insert("cutoff".into(), cutoff_json(&r.cutoffs, omega));
    m.insert(
        "channels".into(),
        Value::Array(
            summaries
                .iter()
                .map(|s| {
                    json!({
                        "label": s.channel.label,
                        "ip_ev": ev(s.channel.ip),
                        "keldysh": s.keldysh,
                        "cutoff": cutoff_json(&s.cutoffs, omega),
                    })
                })
                .collect(),
        ),
    );
    m.insert("couplings".into(), couplings_json(t));
    m.insert("orientations".into(), orientation_json(t));
    m
}

fn loaded(
    target: &TargetArgs,
    laser: &LaserArgs,
    returns: u32,
) -> Result<(LoadedTarget, LaserSpec, Field, OrbitSettings)> {
    let target = settings::target(target)?;
    let (spec, field) = settings::laser(laser)?;
    let mut orbit = OrbitSettings::default();
    orbit.discovery.max_returns = check_returns(returns)?;
    Ok((target, spec, field, orbit))
}

/// `holecast check`.
pub fn check(args: &CheckArgs) -> Result<()> {
    let (target, laser, field, orbit_settings) = loaded(&args.target, &args.laser, 1)?;
    let summaries = summarise(&target, &field, &orbit_settings);
    let meta = metadata("check", &target, &laser, &field, &summaries);
    match args.format {
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&Value::Object(meta))?;
            s.push('\n');
            print!("{s}");
        }
        Format::Csv => bail!("check prints a table or json (--format table|json)"),
        Format::Table => print!("{}", check_text(&target.target, &field, &summaries)?),
    }
    Ok(())
}

fn check_text(t: &Target, field: &Field, summaries: &[ChannelSummary<'_>]) -> Result<String> {
    let omega = field.omega();
    let mut out = String::new();
    writeln!(
        out,
        "target   {} ({}){}",
        t.name,
        if t.invented {
            "invented demo data"
        } else {
            "reference data"
        },
        if t.source.is_empty() {
            String::new()
        } else {
            format!("; source: {}", t.source)
        }
    )?;
    let (kind, span) = match field.structure() {
        TimeStructure::Periodic { period } => ("periodic, period", period),
        TimeStructure::Pulse { start, end } => ("pulse, total duration", end - start),
    };
    writeln!(
        out,
        "laser    photon {:.4} eV ({:.1} nm), {kind} {:.3} fs, F0 = {:.5} a.u., Up = {:.3} eV",
        units::au_to_ev(omega),
        units::omega_to_wavelength_nm(omega),
        units::au_to_fs(span),
        field.peak_field(),
        units::au_to_ev(field.ponderomotive_energy())
    )?;
    writeln!(
        out,
        "\n{:<8} {:>9} {:>8}  {:>22}  {:>22}  {:>16}",
        "channel", "Ip (eV)", "Keldysh", "classical cutoff", "quantum cutoff", "3.17Up+1.32Ip"
    )?;
    for s in summaries {
        let c = &s.cutoffs;
        let q = match c.quantum {
            Some(q) => format!("{:.2} eV (H{:.2})", units::au_to_ev(q), q / omega),
            None => "not found".into(),
        };
        writeln!(
            out,
            "{:<8} {:>9.3} {:>8.4}  {:>22}  {:>22}  {:>13.2} eV",
            s.channel.label,
            units::au_to_ev(s.channel.ip),
            s.keldysh,
            format!(
                "{:.2} eV (H{:.2})",
                units::au_to_ev(c.classical),
                c.classical / omega
            ),
            q,
            units::au_to_ev(c.lewenstein)
        )?;
    }
    let n = t.channels.len();
    if n > 1 {
        writeln!(
            out,
            "\ncouplings (molecular frame; dipole in a.u., field-free coupling in eV)"
        )?;
        let mut any = false;
        for a in 0..n {
            for b in a..n {
                let mu: Vec<_> = t.ion.dipole().iter().map(|m| m[(a, b)]).collect();
                let v = t.ion.coupling()[(a, b)];
                if mu.iter().all(|x| x.norm() == 0.0) && v.norm() == 0.0 {
                    continue;
                }
                any = true;
                let fmt = |c: num_complex::Complex64| {
                    if c.im == 0.0 {
                        format!("{:.4}", c.re)
                    } else {
                        format!("{:.4}{:+.4}i", c.re, c.im)
                    }
                };
                writeln!(
                    out,
                    "  {:>4} – {:<4} μ = ({}, {}, {})  V = {}",
                    t.channels[a].label,
                    t.channels[b].label,
                    fmt(mu[0]),
                    fmt(mu[1]),
                    fmt(mu[2]),
                    fmt(v * units::HARTREE_EV)
                )?;
            }
        }
        if !any {
            writeln!(out, "  none: the channels are uncoupled")?;
        }
        let comp = coupling_components(t);
        let pairs: usize = (0..n)
            .map(|a| (0..n).filter(|&b| comp[a] == comp[b]).count())
            .sum();
        writeln!(out, "  channel pairs solved: {pairs} of {}", n * n)?;
    }
    let grid = match t.orientations {
        OrientationGridSpec::Fixed(e) => format!(
            "fixed orientation (Euler ZYZ {:.1}°, {:.1}°, {:.1}°)",
            e[0].to_degrees(),
            e[1].to_degrees(),
            e[2].to_degrees()
        ),
        OrientationGridSpec::Axis(b) => format!("β grid of {b} points"),
        OrientationGridSpec::Full(b, a, g) => {
            format!("full grid {b} × {a} × {g} = {} orientations", b * a * g)
        }
    };
    writeln!(
        out,
        "\norientations: {grid}; alignment ⟨cos²β⟩ = {:.4}",
        t.alignment.mean_cos2()
    )?;
    Ok(out)
}

fn check_returns(n: u32) -> Result<u32> {
    if !(1..=8).contains(&n) {
        bail!("--returns {n}: must be between 1 and 8");
    }
    Ok(n)
}

/// `holecast orbits`.
pub fn orbits(args: &OrbitsArgs) -> Result<()> {
    let (target, laser, field, orbit_settings) =
        loaded(&args.target, &args.laser, args.grid.returns)?;
    let summaries = summarise(&target, &field, &orbit_settings);
    let r = &summaries[reference(&summaries)];
    let all: Vec<Cutoffs> = summaries.iter().map(|s| s.cutoffs).collect();
    let energies = settings::energies(&args.grid, &field, r.channel.ip, &all)?;
    let settings = MultichannelSettings {
        orbits: orbit_settings,
        group_delay_step: None,
        ..MultichannelSettings::default()
    };
    let t = &target.target;
    let stage = trajectory_stage(&field, t, &energies, &settings)?;
    let tables: Vec<LabelledTable<'_>> = stage
        .pairs
        .iter()
        .map(|p| LabelledTable {
            ionized: &t.channels[p.ion].label,
            recombined: &t.channels[p.rec].label,
            table: &p.table,
        })
        .collect();
    let rows = report::orbits::rows(&tables, field.omega()).map_err(|e| anyhow!(e))?;
    let text = match args.format {
        Format::Json => {
            let meta = metadata("orbits", &target, &laser, &field, &summaries);
            report::json::document(meta, "orbits", &rows)
        }
        Format::Csv => report::csv::document(&rows),
        Format::Table => orbit_text(&rows),
    };
    match &args.out {
        Some(path) => write_atomic(path, text.as_bytes())?,
        None => print!("{text}"),
    }
    let failed: usize = stage.pairs.iter().map(|p| p.table.failed_points()).sum();
    if failed > 0 {
        eprintln!(
            "warning: {failed} orbit points did not converge; they are listed with converged = \
             false and the reason"
        );
    }
    Ok(())
}

/// Readable text of the orbit rows.
fn orbit_text(rows: &report::Table) -> String {
    use report::Cell;
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
    ];
    let idx: Vec<Option<usize>> = pick.iter().map(|n| col(n)).collect();
    let mut out = format!(
        "{:>6} {:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}\n",
        "pair", "order", "family", "hc", "t_ion (fs)", "t_ret (fs)", "action Φ", "conv"
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
            "{:>6} {:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}\n",
            pair,
            num(cell(2)),
            num(cell(3)),
            num(cell(4)),
            num(cell(5)),
            num(cell(6)),
            num(cell(7)),
            num(cell(8))
        ));
    }
    out
}

/// Everything a spectrum or holes run produced.
struct Run {
    target: LoadedTarget,
    meta: Map<String, Value>,
    field: Field,
    summaries_cutoff: Cutoffs,
    spectrum: MultichannelSpectrum,
    energies: Vec<f64>,
}

/// Quadrature settings from the command line (`None` for the saddle method).
fn quadrature_settings(
    method: MethodArg,
    excursion: Option<f64>,
    fall: Option<f64>,
    momentum: MomentumArg,
) -> Option<holecast::quadrature::QuadratureSettings> {
    let mut q = holecast::quadrature::QuadratureSettings {
        momentum: match momentum {
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
fn placement(arg: StructureArg) -> StructurePlacement {
    match arg {
        StructureArg::Phase => StructurePlacement::Phase,
        StructureArg::Prefactor => StructurePlacement::Prefactor,
        StructureArg::Auto => StructurePlacement::Auto,
    }
}

#[allow(clippy::too_many_arguments)]
fn run(
    command: &str,
    target: &TargetArgs,
    laser: &LaserArgs,
    grid: &GridArgs,
    model: &ModelArgs,
    sum: SumArg,
    quiet: bool,
    quadrature: Option<holecast::quadrature::QuadratureSettings>,
) -> Result<Run> {
    let (target, laser, field, orbit_settings) = loaded(target, laser, grid.returns)?;
    let summaries = summarise(&target, &field, &orbit_settings);
    let r = &summaries[reference(&summaries)];
    let all: Vec<Cutoffs> = summaries.iter().map(|s| s.cutoffs).collect();
    let energies = settings::energies(grid, &field, r.channel.ip, &all)?;
    let settings = MultichannelSettings {
        sum: match sum {
            SumArg::Uniform => SaddleSum::Uniform,
            SumArg::Plain => SaddleSum::Plain,
        },
        orbits: orbit_settings,
        hole_contour: match model.hole_times {
            HoleTimesArg::Complex => HoleContour::Complex,
            HoleTimesArg::Real => HoleContour::Real,
        },
        ionization_structure: placement(model.ionization_structure),
        recombination_structure: placement(model.recombination_structure),
        hole_expansion: match model.hole_expansion {
            HoleExpansionArg::NextOrder => HoleExpansion::NextOrder,
            HoleExpansionArg::Leading => HoleExpansion::Leading,
        },
        ..MultichannelSettings::default()
    };
    let t = &target.target;
    let bar = if quiet || !std::io::stderr().is_terminal() {
        ProgressBar::hidden()
    } else {
        let b = ProgressBar::new(0);
        b.set_style(
            ProgressStyle::with_template("{msg} [{bar:40}] {pos}/{len} orientations ({eta})")
                .unwrap_or_else(|_| ProgressStyle::default_bar()),
        );
        b.set_message("averaging");
        b
    };
    let progress = |done: usize, total: usize| {
        bar.set_length(total as u64);
        bar.set_position(done as u64);
    };
    let spectrum = match &quadrature {
        None => {
            let stage = trajectory_stage(&field, t, &energies, &settings)?;
            assemble(&field, t, &stage, true, &progress)?
        }
        Some(q) => {
            bar.set_message("quadrature");
            holecast::quadrature::quadrature_spectrum(&field, t, &energies, q, &progress)?
        }
    };
    bar.finish_and_clear();
    let cutoff = r.cutoffs;
    let mut meta = metadata(command, &target, &laser, &field, &summaries);
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
                (HoleContour::Complex, HoleExpansion::NextOrder) => "U_I with its next-order saddle-point terms (curvature across the saddle, slope against the skew of the phase, the spreading factor and the structure prefactor); off near caustics",
                _ => "U_I at the saddle only (leading order)",
            },
            "ionization_structure": settings.ionization_structure,
            "recombination_structure": settings.recombination_structure,
            "structure_note": "phase: Gaussian and centre factors of gaussian/orbital/lcao models in the saddle equations, shell by shell, with the momentum integral exact; prefactor: structure factors evaluated at the saddle; other models always in the prefactor",
            "accuracy": "measured against the quadrature in docs/validation.md",
        }),
        Some(q) => {
            let steps = q.steps_per_cycle.unwrap_or_else(|| {
                holecast::quadrature::automatic_steps_per_cycle(&field, t, &energies)
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
    Ok(Run {
        target,
        meta,
        field,
        summaries_cutoff: cutoff,
        spectrum,
        energies,
    })
}

fn hole_files(run: &Run, dir: &Path) -> Result<Vec<(std::path::PathBuf, Vec<u8>)>> {
    let rows = report::spectrum::hole_rows(&run.spectrum).map_err(|e| anyhow!(e))?;
    let mut meta = run.meta.clone();
    meta.insert(
        "columns".into(),
        json!({
            "delay_fs": "Re(t_r − t_i) of the reference channel's saddle: the time after ionization that the harmonic samples",
            "population_*": "diagonal of the normalised hole density matrix at recombination",
            "coherence_*_abs/_phase_rad": "off-diagonal elements (interaction picture, without the Bohr phases)",
            "yield": "trace before normalisation: orientation-averaged ionization weight of the point",
        }),
    );
    let title = format!(
        "{} — hole populations vs return delay",
        run.target.target.name
    );
    let svg = report::svg::hole_figure(&run.spectrum, &title).map_err(|e| anyhow!(e))?;
    Ok(vec![
        (
            dir.join("holes.json"),
            report::json::document(meta, "points", &rows).into_bytes(),
        ),
        (
            dir.join("holes.csv"),
            report::csv::document(&rows).into_bytes(),
        ),
        (dir.join("holes.svg"), svg.into_bytes()),
    ])
}

fn create_dir(dir: &Path) -> Result<()> {
    std::fs::create_dir_all(dir)
        .map_err(|e| anyhow!("cannot create output folder {}: {e}", dir.display()))
}

fn summary_line(run: &Run) {
    let omega = run.field.omega();
    let s = &run.spectrum;
    let failed = s.complete.iter().filter(|c| !**c).count();
    let families: usize = s.pairs.iter().map(|p| p.families.len()).sum();
    println!(
        "{} energies from H{:.2} to H{:.2}; {} channel pairs, {families} orbit families, {} \
         orientations; quantum cutoff {}; incomplete points: {failed}",
        run.energies.len(),
        run.energies.first().copied().unwrap_or(0.0) / omega,
        run.energies.last().copied().unwrap_or(0.0) / omega,
        s.pairs.len(),
        s.orientations,
        run.summaries_cutoff
            .quantum
            .map(|q| format!("H{:.2} ({:.2} eV)", q / omega, units::au_to_ev(q)))
            .unwrap_or_else(|| "not found".into()),
    );
    if failed > 0 {
        eprintln!(
            "warning: at {failed} energies some orbit family did not converge; those rows have \
             complete = false and the family columns are empty"
        );
    }
}

/// `holecast spectrum`.
pub fn spectrum(args: &SpectrumArgs, quiet: bool) -> Result<()> {
    let quadrature = quadrature_settings(
        args.method,
        args.excursion_cycles,
        args.window_fall_cycles,
        args.momentum_integral,
    );
    let run = run(
        "spectrum",
        &args.target,
        &args.laser,
        &args.grid,
        &args.model,
        args.sum,
        quiet,
        quadrature,
    )?;
    let rows = report::spectrum::rows(&run.spectrum).map_err(|e| anyhow!(e))?;
    let mut meta = run.meta.clone();
    meta.insert(
        "columns".into(),
        json!({
            "intensity": "|D|^2 = sum over x,y,z of |D_k|^2, D(Ω) = ∫ <r>(t) e^{iΩt} dt over one period (periodic field) or the pulse, coherent over orientations, a.u.",
            "power": "Ω^4 |D|^2, proportional to the emitted power (dipole form), arbitrary units",
            "phase_rad": "arg of the dipole component along the driving polarization axis",
            "group_delay_fs": "dφ/dΩ by central difference over Ω ± 0.001ω; for a periodic field only per family (*_group_delay_fs of a family is one half cycle's emission time; a sum over both half cycles has none: its dφ/dΩ is a half cycle's plus T/4), for pulses also for pairs and the total",
            "parallel/perpendicular": "dipole components along and across the driving polarization (in its plane)",
            "ellipticity/polarization_angle_deg": "polarization state of the harmonic from the Stokes parameters of (parallel, perpendicular)",
            "incoherent_pair_sum": "sum over channel pairs of |D_pair|^2: compare with intensity to see the channel interference",
            "recombined_<m>_share": "|ê·Σ_n D_(n→m)|² / Σ_m' |ê·Σ_n D_(n→m')|²: the share of the harmonic (along the driving polarization) emitted on recombination into channel m",
            "<ion>_to_<rec>_*": "contribution of ionization into channel <ion> and recombination into <rec>",
            "*_emission_time_fs": "Re t_r of the family's saddle, from the field crest at t = 0",
        }),
    );
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
            (MethodArg::Saddle, SumArg::Uniform) => "uniform",
            (MethodArg::Saddle, SumArg::Plain) => "plain",
        }
    );
    let svg =
        report::svg::spectrum_figure(&run.spectrum, &markers, &title).map_err(|e| anyhow!(e))?;
    let mut files = vec![
        (
            args.out.join("spectrum.json"),
            report::json::document(meta, "points", &rows).into_bytes(),
        ),
        (
            args.out.join("spectrum.csv"),
            report::csv::document(&rows).into_bytes(),
        ),
        (args.out.join("spectrum.svg"), svg.into_bytes()),
    ];
    // The quadrature has no saddles, hence no hole density per orbit.
    if run.target.target.channels.len() > 1 && args.method == MethodArg::Saddle {
        files.extend(hole_files(&run, &args.out)?);
    }
    create_dir(&args.out)?;
    write_all_atomic(&files)?;
    if !quiet {
        for (p, _) in &files {
            eprintln!("wrote {}", p.display());
        }
    }
    summary_line(&run);
    Ok(())
}

/// `holecast holes`.
pub fn holes(args: &HolesArgs, quiet: bool) -> Result<()> {
    let run = run(
        "holes",
        &args.target,
        &args.laser,
        &args.grid,
        &args.model,
        SumArg::Uniform,
        quiet,
        None,
    )?;
    let files = hole_files(&run, &args.out)?;
    create_dir(&args.out)?;
    write_all_atomic(&files)?;
    if !quiet {
        for (p, _) in &files {
            eprintln!("wrote {}", p.display());
        }
    }
    summary_line(&run);
    Ok(())
}
