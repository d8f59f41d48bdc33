//! `holecast check`: validates a target and a laser and prints what follows from them — the
//! full laser, the structure models in use, Up, the Keldysh parameter and the cutoffs of every
//! channel, the couplings and the orientations — with the validity warnings.

use std::fmt::Write as _;

use anyhow::Result;
use serde_json::Value;

use holecast::cutoff::{half_cycle_cutoffs, lewenstein_applies};
use holecast::field::{Field, TimeStructure};
use holecast::multichannel::coupling_components;
use holecast::orbits::ChannelPair;
use holecast::target::Target;
use holecast::units;

use super::args::{CheckArgs, CheckFormat};
use super::commands::{Global, field_warnings, load, summarise};
use super::describe::{
    ChannelSummary, ionization_text, laser_lines, metadata, num, orientation_text,
    recombination_text,
};
use super::warnings::Warnings;

/// `holecast check`.
pub fn check(args: &CheckArgs, global: &Global) -> Result<()> {
    let loaded = load(&args.target, &args.laser, None, global)?;
    let mut warnings = Warnings::default();
    // `check` reports a cutoff search refused by a work limit as a warning (the other commands
    // stop with the error).
    let summaries = summarise(&loaded, global, false, &mut warnings)?;
    warnings.extend(field_warnings(&loaded));
    let mut meta = metadata(
        "check",
        &loaded.target,
        &loaded.laser,
        &loaded.field,
        &summaries,
    );
    meta.insert(
        "provenance".into(),
        super::provenance::provenance(&loaded, None, Value::Null),
    );
    meta.insert("warnings".into(), warnings.json());
    match args.format {
        CheckFormat::Json => {
            let mut s = serde_json::to_string_pretty(&Value::Object(meta))?;
            s.push('\n');
            print!("{s}");
        }
        CheckFormat::Table => print!(
            "{}",
            check_text(&loaded.target.target, &loaded, &summaries)?
        ),
    }
    warnings.print();
    Ok(())
}

fn check_text(
    t: &Target,
    loaded: &super::commands::Loaded,
    summaries: &[ChannelSummary<'_>],
) -> Result<String> {
    let field: &Field = &loaded.field;
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
        "laser    photon {} eV ({} nm), {kind} {} fs, F0 = {} a.u., Up = {} eV",
        num(units::au_to_ev(omega), 4),
        num(units::omega_to_wavelength_nm(omega), 1),
        num(units::au_to_fs(span), 3),
        num(field.peak_field(), 5),
        num(units::au_to_ev(field.ponderomotive_energy()), 3)
    )?;
    for line in laser_lines(&loaded.laser) {
        writeln!(out, "         {line}")?;
    }
    // The formula column only where the formula holds (one linear continuous colour).
    let formula_applies = lewenstein_applies(field);
    let mut header = String::new();
    write!(
        header,
        "\n{:<8} {:>9} {:>8}  {:>22}  {:>22}  {:>16}",
        "channel",
        "Ip (eV)",
        "Keldysh",
        "classical cutoff",
        "quantum cutoff",
        if formula_applies { "3.17Up+1.32Ip" } else { "" }
    )?;
    writeln!(out, "{}", header.trim_end())?;
    for s in summaries {
        let (classical, quantum, formula) = match &s.cutoffs {
            Some(c) => (
                format!(
                    "{} eV (H{})",
                    num(units::au_to_ev(c.classical), 2),
                    num(c.classical / omega, 2)
                ),
                match c.quantum {
                    Some(q) => {
                        format!("{} eV (H{})", num(units::au_to_ev(q), 2), num(q / omega, 2))
                    }
                    None => "not found".into(),
                },
                c.lewenstein
                    .map(|l| format!("{} eV", num(units::au_to_ev(l), 2)))
                    .unwrap_or_default(),
            ),
            None => (
                "over the work limit".into(),
                "over the work limit".into(),
                if formula_applies {
                    "-".into()
                } else {
                    String::new()
                },
            ),
        };
        let row = format!(
            "{:<8} {:>9} {:>8}  {:>22}  {:>22}  {:>16}",
            s.channel.label,
            num(units::au_to_ev(s.channel.ip), 3),
            num(s.keldysh, 4),
            classical,
            quantum,
            formula
        );
        writeln!(out, "{}", row.trim_end())?;
    }
    if !formula_applies {
        writeln!(
            out,
            "(3.17Up+1.32Ip, Lewenstein et al. 1994, is not shown: it holds for one linearly \
             polarised continuous colour only)"
        )?;
    }
    if !field.half_wave_symmetric() {
        // The half cycles differ: each has its own cutoff.
        for s in summaries.iter().filter(|s| s.cutoffs.is_some()) {
            let pair = ChannelPair::single(s.channel.ip);
            if let Ok(r) = half_cycle_cutoffs(field, pair, &loaded.orbit) {
                let parts: Vec<String> = r
                    .half_cycles
                    .iter()
                    .filter_map(|(h, c)| {
                        c.estimate(pair).map(|e| {
                            format!(
                                "{h}: {} eV (H{}{})",
                                num(units::au_to_ev(e), 2),
                                num(e / omega, 2),
                                if c.quantum.is_some() {
                                    ""
                                } else {
                                    ", estimate"
                                }
                            )
                        })
                    })
                    .collect();
                writeln!(
                    out,
                    "quantum cutoff per half cycle, channel {}: {}",
                    s.channel.label,
                    parts.join("; ")
                )?;
            }
        }
    }
    writeln!(out, "\nstructure models")?;
    for s in summaries {
        let unused = if loaded.target.unused_orbitals.contains(&s.channel.label) {
            "; its Dyson orbital is given but no model uses it"
        } else {
            ""
        };
        writeln!(
            out,
            "  {:<6} ionization: {}; recombination: {}{unused}",
            s.channel.label,
            ionization_text(&s.channel.ionization),
            recombination_text(&s.channel.recombination)
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
    writeln!(
        out,
        "\norientations: {}; alignment ⟨cos²β⟩ = {:.4}",
        orientation_text(t),
        t.alignment.mean_cos2()
    )?;
    Ok(out)
}
