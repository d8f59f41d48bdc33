//! `spectrum` with a setup: the detection layer's run and its output files (detected.json,
//! detected.csv, detected-spectrum.csv, detected-lines.csv, detected.svg).

use std::path::Path;

use anyhow::{Result, anyhow, bail};
use serde_json::{Map, Value, json};

use holecast::detection::families::{FamilyDipoles, strength};
use holecast::detection::figure::{Curve, detection_figure};
use holecast::detection::setup::{BeamSpec, GeometrySpec, MediumSpec};
use holecast::detection::{Combination, DetectionOutcome, Setup, SetupSpec};
use holecast::multichannel::MultichannelSpectrum;
use holecast::units;

use super::args::DetectionArgs;

/// Names the detection layer can write (for the leftover cleanup of an output folder).
pub const NAMES: [&str; 5] = [
    "detected.json",
    "detected.csv",
    "detected-spectrum.csv",
    "detected-lines.csv",
    "detected.svg",
];

/// The setup from the file and the flags (flags override the file).
pub fn setup(args: &DetectionArgs) -> Result<(SetupSpec, Setup)> {
    let mut spec = match &args.setup {
        Some(path) => {
            let text = std::fs::read_to_string(path)
                .map_err(|e| anyhow!("cannot read setup file {}: {e}", path.display()))?;
            SetupSpec::from_json(&text)
                .map_err(|e| anyhow!("setup file {}: {e}", path.display()))?
        }
        None => {
            let Some(position) = args.jet_position_mm else {
                bail!(
                    "--jet-length-mm, --waist-um and --intensity-samples need --jet-position-mm \
                     or a --setup file"
                );
            };
            SetupSpec {
                about: None,
                beam: BeamSpec {
                    waist_um: Some(50.0),
                    ..BeamSpec::default()
                },
                medium: MediumSpec {
                    about: None,
                    geometry: GeometrySpec::Slab {
                        position_mm: position,
                        length_mm: 1.0,
                    },
                    combination: Combination::CoherentAxis,
                    density_cm3: 1e17,
                    intensity_samples: None,
                    lowest_intensity_fraction: None,
                    axis_points: None,
                    ir_refractivity: None,
                    xuv_refractivity: None,
                    free_electrons: None,
                    absorption: None,
                },
                detector: None,
            }
        }
    };
    if args.jet_position_mm.is_some() || args.jet_length_mm.is_some() {
        let (p0, l0) = match spec.medium.geometry {
            GeometrySpec::Slab {
                position_mm,
                length_mm,
            } => (Some(position_mm), length_mm),
            GeometrySpec::ThinSlab { position_mm, .. } => (Some(position_mm), 1.0),
            GeometrySpec::Unbounded {} => (None, 1.0),
        };
        let Some(position) = args.jet_position_mm.or(p0) else {
            bail!("--jet-length-mm on an unbounded medium needs --jet-position-mm");
        };
        spec.medium.geometry = GeometrySpec::Slab {
            position_mm: position,
            length_mm: args.jet_length_mm.unwrap_or(l0),
        };
    }
    if let Some(w) = args.waist_um {
        spec.beam = BeamSpec {
            waist_um: Some(w),
            ..BeamSpec::default()
        };
    }
    if let Some(n) = args.intensity_samples {
        spec.medium.intensity_samples = Some(n);
    }
    let where_from = match &args.setup {
        Some(p) => format!("setup file {} (with the command-line flags)", p.display()),
        None => "detection flags".to_string(),
    };
    let setup = spec.validate().map_err(|e| anyhow!("{where_from}: {e}"))?;
    Ok((spec, setup))
}

fn colour(label: &str) -> &'static str {
    match label {
        // Okabe–Ito, as every figure of the tool (src/report/svg/palette.rs): long orbits
        // blue, short orbits vermillion.
        "short" => "#D55E00",
        "long" => "#0072B2",
        l if l.ends_with("short") => "#009E73",
        _ => "#CC79A7",
    }
}

fn num(x: f64) -> Value {
    if x.is_finite() { json!(x) } else { Value::Null }
}

/// The files of a detection run. `single` is the single-molecule spectrum at the laser's
/// intensity (the run's spectrum.json).
pub fn files(
    outcome: &DetectionOutcome,
    spec: &SetupSpec,
    setup_file: Option<&Path>,
    meta: &Map<String, Value>,
    single: &MultichannelSpectrum,
    title: &str,
) -> Result<Vec<(String, Vec<u8>)>> {
    let omega = outcome.omega;
    let e_ev: Vec<f64> = outcome
        .energies
        .iter()
        .map(|&e| units::au_to_ev(e))
        .collect();
    let single_families = FamilyDipoles::of(single);
    let labels: Vec<String> = outcome
        .source_families
        .keys()
        .map(|l| l.to_string())
        .collect();
    // Per model energy: single-molecule and combined, total and per family.
    let mut csv = String::from("energy_ev,order,single_molecule_power,combined_power");
    for l in &labels {
        csv.push_str(&format!(",single_{l}_power,combined_{l}_power"));
    }
    csv.push('\n');
    let mut rows = Vec::new();
    for (k, &e) in outcome.energies.iter().enumerate() {
        let mut row = Map::new();
        row.insert("energy_ev".into(), num(e_ev[k]));
        row.insert("order".into(), num(e / omega));
        row.insert("single_molecule_power".into(), num(single.power(k)));
        row.insert("combined_power".into(), num(outcome.source_total[k]));
        csv.push_str(&format!(
            "{},{},{:e},{:e}",
            e_ev[k],
            e / omega,
            single.power(k),
            outcome.source_total[k]
        ));
        for (label, v) in &outcome.source_families {
            let s = single_families
                .families
                .get(label)
                .map_or(0.0, |d| strength(&d[k]) * e.powi(4));
            row.insert(format!("single_{label}_power"), num(s));
            row.insert(format!("combined_{label}_power"), num(v[k]));
            csv.push_str(&format!(",{s:e},{:e}", v[k]));
        }
        csv.push('\n');
        rows.push(Value::Object(row));
    }
    let mut doc = meta.clone();
    doc.insert("command".into(), json!("spectrum --setup"));
    doc.insert("setup".into(), serde_json::to_value(spec)?);
    doc.insert(
        "setup_file".into(),
        json!(setup_file.map(|p| p.display().to_string())),
    );
    doc.insert(
        "beam".into(),
        json!({
            "waist_um": outcome.beam.waist() * units::BOHR_M * 1e6,
            "rayleigh_length_mm": outcome.beam.rayleigh() * units::BOHR_M * 1e3,
            "peak_intensity_wcm2": outcome.peak_intensity_wcm2,
        }),
    );
    doc.insert(
        "intensity_samples".into(),
        Value::Array(
            outcome
                .intensities
                .iter()
                .enumerate()
                .map(|(i, &x)| {
                    json!({
                        "relative": x,
                        "intensity_wcm2": x * outcome.peak_intensity_wcm2,
                        "weight_bohr3": outcome.weights.as_ref().map(|w| w[i]),
                        "ionized_fraction": outcome.ionized_fraction.as_ref().map(|f| f[i]),
                    })
                })
                .collect(),
        ),
    );
    doc.insert(
        "notes".into(),
        Value::Array(
            outcome
                .notes
                .iter()
                .map(|n| json!({"code": n.code, "message": n.message, "advice": n.advice}))
                .collect(),
        ),
    );
    if let Some(b) = &outcome.build_up {
        doc.insert(
            "build_up_checks".into(),
            json!({
                "phase_check_rad": b.phase_check.iter().map(|(k, v)| (k.to_string(), json!({"rad": v.0, "order": v.1}))).collect::<Map<_, _>>(),
                "axis_phase_step_rad": b.axis_phase_step,
                "length_mm": b.length * units::BOHR_M * 1e3,
            }),
        );
    }
    doc.insert(
        "model_note".into(),
        json!(match outcome.combination {
            Combination::CoherentAxis => "combined = Ω⁴|B|², B the 1-D on-axis coherent sum of the dipoles along the medium (Gouy phase, each family's intensity-dependent phase, dispersion, absorption), normalised so that a phase-matched medium gives Ω⁴|D|²; the absolute on-axis yield is (n L)² times it. A 1-D phase-matching estimate, not a 3-D propagation.",
            Combination::IncoherentVolume => "combined = Ω⁴ × mean |D|² over the sampled volume, Σ w_i |D(I_i)|² / Σ w_i with w_i the focal-volume weights of the intensity samples; the volume integral is the mean times the sampled volume (weights in intensity_samples), the yield n times that.",
        }),
    );
    doc.insert(
        "columns".into(),
        json!({
            "single_molecule_power": "Ω⁴|D|² of one molecule at the laser's peak intensity (as spectrum.json power)",
            "combined_power": "the medium's combination (model_note), total",
            "single_<family>_power / combined_<family>_power": "the same for one family label (short, long, …): every channel pair and half cycle of that family added coherently",
            "detected": "after filters (T^(d/d0)), response, counting (photons: divided by Ω) and the Gaussian resolution, on a uniform energy grid: per_ev and per_nm densities (per_nm = per_ev · E²/hc)",
            "lines": "detected spectrum integrated over [(q − w/2)ω, (q + w/2)ω], w = line_window_orders",
        }),
    );
    doc.insert("points".into(), Value::Array(rows));
    let mut out = vec![("detected.csv".to_string(), csv.into_bytes())];
    let mut curves = vec![Curve {
        label: "single molecule".into(),
        x: e_ev.clone(),
        y: (0..e_ev.len()).map(|k| single.power(k)).collect(),
        colour: "#777777",
        dashed: true,
        scale_with: 0,
    }];
    for label in outcome.source_families.keys() {
        if let Some(d) = single_families.families.get(label) {
            curves.push(Curve {
                label: format!("single, {label}"),
                x: e_ev.clone(),
                y: d.iter()
                    .zip(&outcome.energies)
                    .map(|(v, e)| strength(v) * e.powi(4))
                    .collect(),
                colour: colour(&label.to_string()),
                dashed: true,
                scale_with: 0,
            });
        }
    }
    match &outcome.detected {
        Some(set) => {
            let mut spectrum_csv = String::from("energy_ev,wavelength_nm,per_ev,per_nm");
            for l in &labels {
                spectrum_csv.push_str(&format!(",{l}_per_ev"));
            }
            spectrum_csv.push('\n');
            let mut detected_rows = Vec::new();
            for (i, (&e, &d)) in set
                .total
                .energy_ev
                .iter()
                .zip(&set.total.per_ev)
                .enumerate()
            {
                let l = holecast::detection::instrument::photon_wavelength_nm(e);
                let per_nm = holecast::detection::instrument::per_ev_to_per_nm(e, d);
                spectrum_csv.push_str(&format!("{e},{l},{d:e},{per_nm:e}"));
                let mut row = Map::new();
                row.insert("energy_ev".into(), num(e));
                row.insert("wavelength_nm".into(), num(l));
                row.insert("per_ev".into(), num(d));
                row.insert("per_nm".into(), num(per_nm));
                for (label, f) in &set.families {
                    let v = f.per_ev.get(i).copied().unwrap_or(f64::NAN);
                    spectrum_csv.push_str(&format!(",{v:e}"));
                    row.insert(format!("{label}_per_ev"), num(v));
                }
                spectrum_csv.push('\n');
                detected_rows.push(Value::Object(row));
            }
            let mut lines_csv = String::from("order,energy_ev,line_yield");
            for l in &labels {
                lines_csv.push_str(&format!(",{l}_line_yield"));
            }
            lines_csv.push('\n');
            let mut line_rows = Vec::new();
            for (i, line) in set.total.lines.iter().enumerate() {
                lines_csv.push_str(&format!(
                    "{},{},{:e}",
                    line.order, line.energy_ev, line.value
                ));
                let mut row = Map::new();
                row.insert("order".into(), json!(line.order));
                row.insert("energy_ev".into(), num(line.energy_ev));
                row.insert("line_yield".into(), num(line.value));
                for (label, f) in &set.families {
                    let v = f.lines.get(i).map_or(f64::NAN, |l| l.value);
                    lines_csv.push_str(&format!(",{v:e}"));
                    row.insert(format!("{label}_line_yield"), num(v));
                }
                lines_csv.push('\n');
                line_rows.push(Value::Object(row));
            }
            doc.insert("detected".into(), Value::Array(detected_rows));
            doc.insert("lines".into(), Value::Array(line_rows));
            out.push(("detected-spectrum.csv".into(), spectrum_csv.into_bytes()));
            out.push(("detected-lines.csv".into(), lines_csv.into_bytes()));
            let (x, y) = if set.total.energy_ev.is_empty() {
                (
                    set.total.lines.iter().map(|l| l.energy_ev).collect(),
                    set.total.lines.iter().map(|l| l.value).collect(),
                )
            } else {
                (set.total.energy_ev.clone(), set.total.per_ev.clone())
            };
            let total = curves.len();
            curves.push(Curve {
                label: "detected".into(),
                x,
                y,
                colour: "#000000",
                dashed: false,
                scale_with: total,
            });
            for (label, f) in &set.families {
                curves.push(Curve {
                    label: format!("detected, {label}"),
                    x: f.energy_ev.clone(),
                    y: f.per_ev.clone(),
                    colour: colour(&label.to_string()),
                    dashed: false,
                    scale_with: total,
                });
            }
        }
        None => {
            let total = curves.len();
            curves.push(Curve {
                label: "medium".into(),
                x: e_ev.clone(),
                y: outcome.source_total.clone(),
                colour: "#000000",
                dashed: false,
                scale_with: total,
            });
            for (label, v) in &outcome.source_families {
                curves.push(Curve {
                    label: format!("medium, {label}"),
                    x: e_ev.clone(),
                    y: v.clone(),
                    colour: colour(&label.to_string()),
                    dashed: false,
                    scale_with: total,
                });
            }
        }
    }
    let mut json_text = serde_json::to_string_pretty(&Value::Object(doc))?;
    json_text.push('\n');
    out.insert(0, ("detected.json".into(), json_text.into_bytes()));
    out.push((
        "detected.svg".into(),
        detection_figure(title, &curves).into_bytes(),
    ));
    Ok(out)
}
