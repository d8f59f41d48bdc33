//! What a run is about, in words and JSON: the laser as given (every colour, polarization,
//! envelope, CEP, FWHM), the structure models of each channel, the cutoffs, the couplings and
//! the orientations. Shared by `check` and the metadata of every JSON output.

use serde_json::{Map, Value, json};

use holecast::cutoff::Cutoffs;
use holecast::field::{Field, TimeStructure};
use holecast::ionization::IonizationModel;
use holecast::laser::{EnvelopeSpec, LaserSpec, PolarizationSpec};
use holecast::recombination::{DipoleForm, RecombinationModel, ReturnMomentum};
use holecast::target::{Channel, OrientationGridSpec, Target};
use holecast::units;

use super::settings::LoadedTarget;

/// Derived quantities of one channel in the field.
pub struct ChannelSummary<'a> {
    /// The channel.
    pub channel: &'a Channel,
    /// Keldysh parameter.
    pub keldysh: f64,
    /// Cutoffs (None where the search was refused by a work limit: `check` only).
    pub cutoffs: Option<Cutoffs>,
}

/// Index of the lowest-Ip channel (channels are ordered by Ip, so the first).
pub fn reference(summaries: &[ChannelSummary<'_>]) -> usize {
    summaries
        .iter()
        .enumerate()
        .min_by(|a, b| a.1.channel.ip.total_cmp(&b.1.channel.ip))
        .map_or(0, |(i, _)| i)
}

/// A number with `prec` decimals, in exponent notation when it is very large or very small
/// (so that absurd inputs do not print hundreds of digits).
pub fn num(x: f64, prec: usize) -> String {
    if x.is_finite() && (x.abs() >= 1e7 || (x != 0.0 && x.abs() < 1e-4)) {
        format!("{x:.prec$e}")
    } else {
        format!("{x:.prec$}")
    }
}

fn ev(x: f64) -> Value {
    json!(units::au_to_ev(x))
}

/// JSON of a channel's cutoffs (null where not computed).
pub fn cutoff_json(c: Option<&Cutoffs>, omega: f64) -> Value {
    let Some(c) = c else {
        return Value::Null;
    };
    json!({
        "classical_ev": ev(c.classical),
        "classical_order": c.classical / omega,
        "quantum_ev": c.quantum.map(units::au_to_ev),
        "quantum_order": c.quantum.map(|q| q / omega),
        "quantum_imaginary_ev": c.coalescence.map(|z| units::au_to_ev(z.omega.im)),
        "lewenstein_formula_ev": c.lewenstein.map(units::au_to_ev),
        "strongest_half_cycle": c.strongest_half_cycle,
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

/// The orientation grid in words.
pub fn orientation_text(t: &Target) -> String {
    match t.orientations {
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

/// The ionization model of a channel in words.
pub fn ionization_text(m: &IonizationModel) -> String {
    match m {
        IonizationModel::Constant { amplitude } => {
            format!(
                "constant amplitude {:.4}{:+.4}i",
                amplitude.re, amplitude.im
            )
        }
        IonizationModel::Gaussian { exponent } => {
            format!(
                "gaussian (s-Gaussian SFA, exponent {} bohr⁻²)",
                num(*exponent, 4)
            )
        }
        IonizationModel::Orbital { orbital } => {
            format!(
                "orbital (SFA with the Dyson orbital \"{}\")",
                orbital.name()
            )
        }
        IonizationModel::Asymptotic { orbital } => format!(
            "asymptotic (MO-ADK, charge {}, {} coefficients)",
            orbital.charge(),
            orbital.terms().len()
        ),
        IonizationModel::Table { beta, .. } => {
            format!("table ({} angles)", beta.len())
        }
    }
}

/// The recombination model of a channel in words.
pub fn recombination_text(m: &RecombinationModel) -> String {
    match m {
        RecombinationModel::Hydrogenic { ip } => {
            format!(
                "hydrogenic (1s with Ip {} eV)",
                num(units::au_to_ev(*ip), 3)
            )
        }
        RecombinationModel::Gaussian { exponent } => {
            format!(
                "gaussian (s-Gaussian, exponent {} bohr⁻²)",
                num(*exponent, 4)
            )
        }
        RecombinationModel::Constant { .. } => "constant dipole vector".into(),
        RecombinationModel::Lcao {
            orbital,
            form,
            momentum,
        } => format!(
            "lcao (Dyson orbital \"{}\", {} form, {} momentum)",
            orbital.name(),
            match form {
                DipoleForm::Length => "length",
                DipoleForm::Velocity => "velocity",
            },
            match momentum {
                ReturnMomentum::Saddle => "saddle",
                ReturnMomentum::Photon => "photon",
            }
        ),
        RecombinationModel::Table {
            energies, angles, ..
        } => format!(
            "table ({} energies × {} angles)",
            energies.len(),
            angles.len()
        ),
    }
}

fn polarization_text(p: &PolarizationSpec) -> String {
    match p {
        PolarizationSpec::Linear { angle_deg } => format!("linear at {angle_deg}° from z"),
        PolarizationSpec::Elliptical {
            ellipticity,
            major_axis_deg,
        } => format!("elliptical ε = {ellipticity}, major axis at {major_axis_deg}° from z"),
        PolarizationSpec::Circular { helicity } => format!("circular, helicity {helicity:+}"),
    }
}

/// The laser as given, one line per colour plus the envelope (after the command-line
/// overrides of the first colour).
pub fn laser_lines(laser: &LaserSpec) -> Vec<String> {
    let mut out = Vec::new();
    let (i1, l1) = (laser.first_intensity(), laser.first_wavelength());
    for (k, c) in laser.colours.iter().enumerate() {
        let wavelength = match (c.wavelength_nm, c.harmonic_of_first) {
            (Some(l), _) => format!("{l} nm"),
            (None, Some(h)) => match l1 {
                Some(l1) => format!("{h} × ω₁ ({:.2} nm)", l1 / h),
                None => format!("{h} × ω₁"),
            },
            (None, None) => "no wavelength".into(),
        };
        let intensity = match (c.intensity_wcm2, c.intensity_ratio) {
            (Some(i), _) => format!("{i:.3e} W/cm²"),
            (None, Some(r)) => match i1 {
                Some(i1) => format!("{:.3e} W/cm² ({r} × I₁)", i1 * r),
                None => format!("{r} × I₁"),
            },
            (None, None) => "no intensity".into(),
        };
        out.push(format!(
            "colour {}: {wavelength}, {intensity}, phase {}°, {}",
            k + 1,
            c.phase_deg,
            polarization_text(&c.polarization)
        ));
    }
    out.push(match laser.envelope {
        EnvelopeSpec::Continuous {} => "envelope: continuous (periodic field)".into(),
        EnvelopeSpec::Sin2 { fwhm_fs } => format!(
            "envelope: sin² pulse, intensity FWHM {fwhm_fs} fs (total {:.2} fs), CEP {}° (the \
             first colour's phase)",
            2.7468 * fwhm_fs,
            laser.colours.first().map_or(0.0, |c| c.phase_deg)
        ),
    });
    out
}

/// Metadata shared by every JSON output.
pub fn metadata(
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
    m.insert("laser_description".into(), json!(laser_lines(laser)));
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
    m.insert("cutoff".into(), cutoff_json(r.cutoffs.as_ref(), omega));
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
                        "ionization_model": ionization_text(&s.channel.ionization),
                        "recombination_model": recombination_text(&s.channel.recombination),
                        "dyson_orbital_unused": target.unused_orbitals.contains(&s.channel.label),
                        "cutoff": cutoff_json(s.cutoffs.as_ref(), omega),
                    })
                })
                .collect(),
        ),
    );
    m.insert("couplings".into(), couplings_json(t));
    m.insert("orientations".into(), orientation_json(t));
    m
}
