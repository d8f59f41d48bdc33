//! The commands: parse → settings → validate → run → export.

use std::fmt::Write as _;

use anyhow::{Result, anyhow, bail};
use serde_json::{Map, Value, json};

use holecast::cutoff::{Cutoffs, cutoffs};
use holecast::dipole::SaddleSum;
use holecast::field::{Field, TimeStructure};
use holecast::laser::LaserSpec;
use holecast::orbits::{ChannelPair, OrbitSettings, solve_orbits};
use holecast::report::{self, orbits::LabelledTable, svg::Marker};
use holecast::spectrum::{ChannelModels, SpectrumSettings, single_channel};
use holecast::target::Channel;
use holecast::units;

use super::args::{CheckArgs, Format, OrbitsArgs, SpectrumArgs, SumArg};
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

/// Index of the lowest-Ip channel (the reference channel of top-level keys).
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
    let mut m = Map::new();
    m.insert("holecast_version".into(), json!(env!("CARGO_PKG_VERSION")));
    m.insert("command".into(), json!(command));
    m.insert(
        "target".into(),
        json!({
            "name": target.target.name,
            "file": target.file.as_ref().map(|p| p.display().to_string()),
            "invented": target.target.invented,
            "source": target.target.source,
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
    m
}

fn single<'a>(target: &'a LoadedTarget, what: &str) -> Result<&'a Channel> {
    match target.target.channels.as_slice() {
        [c] => Ok(c),
        cs => bail!(
            "{what} handles one channel; the target has {} ({})",
            cs.len(),
            cs.iter()
                .map(|c| c.label.as_str())
                .collect::<Vec<_>>()
                .join(", ")
        ),
    }
}

/// `holecast check`.
pub fn check(args: &CheckArgs) -> Result<()> {
    let target = settings::target(&args.target)?;
    let (laser, field) = settings::laser(&args.laser)?;
    let orbit_settings = OrbitSettings::default();
    let summaries = summarise(&target, &field, &orbit_settings);
    let meta = metadata("check", &target, &laser, &field, &summaries);
    match args.format {
        Format::Json => {
            let mut s = serde_json::to_string_pretty(&Value::Object(meta))?;
            s.push('\n');
            print!("{s}");
        }
        Format::Table | Format::Csv => {
            if args.format == Format::Csv {
                bail!("check prints a table or json (--format table|json)");
            }
            let omega = field.omega();
            let mut out = String::new();
            let t = &target.target;
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
                "channel",
                "Ip (eV)",
                "Keldysh",
                "classical cutoff",
                "quantum cutoff",
                "3.17Up+1.32Ip"
            )?;
            for s in &summaries {
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
            print!("{out}");
        }
    }
    Ok(())
}

/// `holecast orbits`.
pub fn orbits(args: &OrbitsArgs) -> Result<()> {
    let target = settings::target(&args.target)?;
    let (laser, field) = settings::laser(&args.laser)?;
    let mut orbit_settings = OrbitSettings::default();
    orbit_settings.discovery.max_returns = returns(args.grid.returns)?;
    let summaries = summarise(&target, &field, &orbit_settings);
    let channel = single(&target, "orbits")?;
    let r = &summaries[reference(&summaries)];
    let energies = settings::energies(&args.grid, &field, channel.ip, &r.cutoffs)?;
    let table = solve_orbits(
        &field,
        ChannelPair::single(channel.ip),
        &energies,
        &orbit_settings,
    )?;
    let rows = report::orbits::rows(
        &[LabelledTable {
            ionized: &channel.label,
            recombined: &channel.label,
            table: &table,
        }],
        field.omega(),
    )
    .map_err(|e| anyhow!(e))?;
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
    if table.failed_points() > 0 {
        eprintln!(
            "warning: {} orbit points did not converge; they are listed with converged = false \
             and the reason",
            table.failed_points()
        );
    }
    Ok(())
}

fn returns(n: u32) -> Result<u32> {
    if !(1..=8).contains(&n) {
        bail!("--returns {n}: must be between 1 and 8");
    }
    Ok(n)
}

/// Readable text of the orbit rows.
fn orbit_text(rows: &report::Table) -> String {
    use report::Cell;
    let col = |name: &str| rows.columns.iter().position(|c| c == name);
    let pick = [
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
        "{:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}\n",
        "order", "family", "hc", "t_ion (fs)", "t_ret (fs)", "action Φ", "conv"
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
        out.push_str(&format!(
            "{:>8} {:<16} {:>4} {:>26} {:>26} {:>28} {:>5}\n",
            num(cell(0)),
            num(cell(1)),
            num(cell(2)),
            num(cell(3)),
            num(cell(4)),
            num(cell(5)),
            num(cell(6))
        ));
    }
    out
}

/// `holecast spectrum`.
pub fn spectrum(args: &SpectrumArgs, quiet: bool) -> Result<()> {
    let target = settings::target(&args.target)?;
    let (laser, field) = settings::laser(&args.laser)?;
    let mut spectrum_settings = SpectrumSettings {
        sum: match args.sum {
            SumArg::Uniform => SaddleSum::Uniform,
            SumArg::Plain => SaddleSum::Plain,
        },
        ..SpectrumSettings::default()
    };
    spectrum_settings.orbits.discovery.max_returns = returns(args.grid.returns)?;
    let summaries = summarise(&target, &field, &spectrum_settings.orbits);
    let channel = single(&target, "spectrum")?;
    let r = &summaries[reference(&summaries)];
    let energies = settings::energies(&args.grid, &field, channel.ip, &r.cutoffs)?;
    let models = ChannelModels {
        ip: channel.ip,
        ionization: channel.ionization.clone(),
        recombination: channel.recombination.clone(),
    };
    let spectrum = single_channel(&field, &models, &energies, &spectrum_settings)?;
    let rows = report::spectrum::rows(&spectrum).map_err(|e| anyhow!(e))?;
    let mut meta = metadata("spectrum", &target, &laser, &field, &summaries);
    meta.insert(
        "saddle_sum".into(),
        serde_json::to_value(spectrum.sum).unwrap_or(Value::Null),
    );
    meta.insert(
        "columns".into(),
        json!({
            "intensity": "|D|^2 = sum over x,y,z of |D_k|^2, D(Ω) = ∫ <r>(t) e^{iΩt} dt over one period (periodic field) or the pulse, a.u.",
            "power": "Ω^4 |D|^2, proportional to the emitted power (dipole form), arbitrary units",
            "phase_rad": "arg of the dipole component along the driving polarization axis",
            "group_delay_fs": "dφ/dΩ of the total by central difference over Ω ± 0.001ω",
            "emission_time_fs": "Re t_r of the family's saddle, from the field crest at t = 0",
        }),
    );
    let omega = field.omega();
    let mut markers = vec![Marker {
        label: "classical cutoff".into(),
        order: r.cutoffs.classical / omega,
    }];
    if let Some(q) = r.cutoffs.quantum {
        markers.push(Marker {
            label: "quantum cutoff".into(),
            order: q / omega,
        });
    }
    let title = format!(
        "{} — {:.0} nm, Up = {:.2} eV ({} sum)",
        target.target.name,
        units::omega_to_wavelength_nm(omega),
        units::au_to_ev(field.ponderomotive_energy()),
        match spectrum.sum {
            SaddleSum::Uniform => "uniform",
            SaddleSum::Plain => "plain",
        }
    );
    let svg = report::svg::spectrum_figure(&spectrum, &markers, &title).map_err(|e| anyhow!(e))?;
    std::fs::create_dir_all(&args.out)
        .map_err(|e| anyhow!("cannot create output folder {}: {e}", args.out.display()))?;
    let files = vec![
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
    write_all_atomic(&files)?;
    let failed = spectrum.complete.iter().filter(|c| !**c).count();
    if !quiet {
        for (p, _) in &files {
            eprintln!("wrote {}", p.display());
        }
    }
    println!(
        "{} energies from H{:.2} to H{:.2}; {} orbit families; quantum cutoff {}; \
         incomplete points: {failed}",
        energies.len(),
        energies.first().copied().unwrap_or(0.0) / omega,
        energies.last().copied().unwrap_or(0.0) / omega,
        spectrum.contributions.len(),
        r.cutoffs
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
    Ok(())
}
