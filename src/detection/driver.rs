//! The detection driver: single-molecule runs at the intensity samples, then the medium and the
//! detector.
//!
//! For each intensity sample the field is scaled (every colour's amplitude by `sqrt(x)`, so the
//! intensity ratios, phases and envelope are kept) and the library's single-molecule path runs
//! once: [`crate::multichannel::trajectory_stage`] (the quantum orbits of that intensity) and
//! [`crate::multichannel::assemble`] (orientation sums). Everything downstream — the volume
//! average or the axis build-up, every family, the detector chain — reuses those results. The
//! samples run in parallel (rayon) and are collected in sample order, so the output does not
//! depend on the thread count.

use std::collections::BTreeMap;

use rayon::prelude::*;

use super::buildup::{AxisBuildUp, AxisBuildUpInput, PHASE_CHECK_LIMIT, Propagation};
use super::families::FamilyDipoles;
use super::incoherent::{VolumeAverage, volume_average};
use super::instrument::{Detected, SourceKind};
use super::plasma::ionized_fraction_at_centre;
use super::setup::{Combination, Setup};
use crate::error::{Error, Result};
use crate::field::{Field, Mode, TimeStructure};
use crate::multichannel::{MultichannelSettings, MultichannelSpectrum, assemble, trajectory_stage};
use crate::orbits::FamilyLabel;
use crate::target::Target;
use crate::units;

/// The field with every amplitude scaled by `sqrt(x)` (intensity × x).
///
/// # Errors
/// `x` not positive and finite.
pub fn scaled_field(field: &Field, x: f64) -> Result<Field> {
    crate::error::require_positive("relative intensity", x)?;
    if x == 1.0 {
        return Ok(field.clone());
    }
    let s = x.sqrt();
    let modes: Vec<Mode> = field
        .modes()
        .iter()
        .map(|m| Mode {
            frequency: m.frequency,
            amplitude: m.amplitude * num_complex::Complex64::new(s, 0.0),
        })
        .collect();
    Field::from_modes(
        modes,
        field.omega(),
        field.structure(),
        field.axis(),
        field.ponderomotive_energy() * x,
        field.peak_field() * s,
    )
}

/// A condition the user should know about (the library never prints).
#[derive(Clone, Debug, PartialEq)]
pub struct DetectionNote {
    /// Short stable code.
    pub code: &'static str,
    /// What happened.
    pub message: String,
    /// What to do.
    pub advice: String,
}

/// The detected spectra, total and per family.
#[derive(Clone, Debug, PartialEq)]
pub struct DetectedSet {
    /// The total.
    pub total: Detected,
    /// Per family label.
    pub families: BTreeMap<FamilyLabel, Detected>,
}

/// Everything the detection layer produced.
#[derive(Clone, Debug)]
pub struct DetectionOutcome {
    /// How the emitters were added.
    pub combination: Combination,
    /// Photon energies Ω (a.u.).
    pub energies: Vec<f64>,
    /// Driver angular frequency (a.u.).
    pub omega: f64,
    /// Peak intensity of the beam (W/cm²; from the field's reference peak field).
    pub peak_intensity_wcm2: f64,
    /// The beam used.
    pub beam: super::beam::GaussianBeam,
    /// Relative intensities of the samples, in the order run.
    pub intensities: Vec<f64>,
    /// Quadrature weights (volume average only; bohr³).
    pub weights: Option<Vec<f64>>,
    /// Single-molecule spectrum at each sample.
    pub samples: Vec<MultichannelSpectrum>,
    /// Ionized fraction at each sample (free electrons only).
    pub ionized_fraction: Option<Vec<f64>>,
    /// Volume average (incoherent-volume).
    pub average: Option<VolumeAverage>,
    /// On-axis build-up (coherent-axis).
    pub build_up: Option<AxisBuildUp>,
    /// The source spectrum `Ω⁴ ×` (mean |D|² over the volume, or `|B|²`), total.
    pub source_total: Vec<f64>,
    /// The same per family.
    pub source_families: BTreeMap<FamilyLabel, Vec<f64>>,
    /// Whether lines (periodic driver) or a density (pulse) was detected.
    pub source_kind: SourceKind,
    /// The detector's view (None without a detector section).
    pub detected: Option<DetectedSet>,
    /// Conditions to report.
    pub notes: Vec<DetectionNote>,
}

/// Runs the single-molecule path at every sample, then the medium and the detector.
///
/// `progress(done, total)` is called after each sample (from worker threads).
///
/// # Errors
/// Those of the single-molecule path at any sample (with the sample's intensity), of the setup
/// (beam, tables out of range), and a periodic field with free electrons.
pub fn detect(
    field: &Field,
    target: &Target,
    energies: &[f64],
    settings: &MultichannelSettings,
    setup: &Setup,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<DetectionOutcome> {
    let omega = field.omega();
    let beam = setup.beam(omega)?;
    let peak = units::peak_field_to_intensity(field.peak_field());
    let (intensities, weights) = match setup.combination {
        Combination::IncoherentVolume => {
            let s = super::intensity_rule::intensity_samples(&beam, &setup.medium, &setup.rule)?;
            (
                s.iter().map(|x| x.relative).collect::<Vec<_>>(),
                Some(s.iter().map(|x| x.weight).collect::<Vec<_>>()),
            )
        }
        Combination::CoherentAxis => (
            super::buildup::axis_intensities(&beam, &setup.medium, setup.rule.samples)?,
            None,
        ),
    };
    let fields: Vec<Field> = intensities
        .iter()
        .map(|&x| scaled_field(field, x))
        .collect::<Result<_>>()?;
    let done = std::sync::atomic::AtomicUsize::new(0);
    let total = fields.len();
    let samples: Vec<MultichannelSpectrum> = fields
        .par_iter()
        .zip(&intensities)
        .map(|(f, &x)| {
            let stage = trajectory_stage(f, target, energies, settings)?;
            let out = assemble(f, target, &stage, settings.linear_fast_path, &|_, _| {});
            progress(
                done.fetch_add(1, std::sync::atomic::Ordering::SeqCst) + 1,
                total,
            );
            out.map_err(|e| {
                Error::Numerical(format!(
                    "intensity sample {:.4e} W/cm² ({x:.4} of the peak): {e}",
                    x * peak
                ))
            })
        })
        .collect::<Result<_>>()?;
    let dipoles: Vec<FamilyDipoles> = samples.iter().map(FamilyDipoles::of).collect();
    let mut notes = Vec::new();
    let ionized_fraction = if setup.free_electrons {
        let channels = crate::validity::channels_of(target);
        Some(
            fields
                .iter()
                .map(|f| ionized_fraction_at_centre(f, &channels))
                .collect::<Result<Vec<f64>>>()?,
        )
    } else {
        None
    };
    let power =
        |v: &[f64]| -> Vec<f64> { v.iter().zip(energies).map(|(x, e)| x * e.powi(4)).collect() };
    let (average, build_up, source_total, source_families) = match setup.combination {
        Combination::IncoherentVolume => {
            let Some(w) = &weights else {
                unreachable!("weights exist for the volume average")
            };
            let s: Vec<super::intensity_rule::IntensitySample> = intensities
                .iter()
                .zip(w)
                .map(
                    |(&relative, &weight)| super::intensity_rule::IntensitySample {
                        relative,
                        weight,
                    },
                )
                .collect();
            let avg = volume_average(&s, &dipoles)?;
            let (Some(mean), Some(fam)) = (avg.mean(), avg.family_mean()) else {
                return Err(Error::Inconsistent(
                    "the sampled volume is zero (one sample of the unbounded medium): use more \
                     intensity samples"
                        .into(),
                ));
            };
            let share = avg
                .lowest_sample_share
                .iter()
                .flatten()
                .fold(0.0_f64, |a, &b| a.max(b));
            if share > 0.05 && s.len() > 1 {
                notes.push(DetectionNote {
                    code: "intensity-range-truncated",
                    message: format!(
                        "the lowest intensity sample carries up to {:.0} % of the averaged yield \
                         at some energy: the part below the lowest intensity is not negligible",
                        100.0 * share
                    ),
                    advice: "lower medium.lowest_intensity_fraction".into(),
                });
            }
            let fam: BTreeMap<FamilyLabel, Vec<f64>> =
                fam.into_iter().map(|(k, v)| (k, power(&v))).collect();
            (Some(avg), None, power(&mean), fam)
        }
        Combination::CoherentAxis => {
            let propagation = Propagation {
                ir_refractivity: setup.ir_refractivity,
                xuv_refractivity: setup.xuv_refractivity,
                ionized_fraction: ionized_fraction.clone(),
                cross_section: match &setup.absorption {
                    None => None,
                    Some(t) => Some(
                        energies
                            .iter()
                            .map(|&e| t.require(units::au_to_ev(e), "eV"))
                            .collect::<Result<Vec<f64>>>()?,
                    ),
                },
            };
            let b = super::buildup::axis_build_up(&AxisBuildUpInput {
                beam,
                medium: setup.medium,
                density: setup.density,
                omega,
                energies,
                intensities: &intensities,
                dipoles: &dipoles,
                axis_points: setup.axis_points,
                propagation: &propagation,
            })?;
            for (label, (check, order)) in &b.phase_check {
                if *check > PHASE_CHECK_LIMIT {
                    notes.push(DetectionNote {
                        code: "dipole-phase-jump",
                        message: format!(
                            "at H{order:.2} the {label} family's dipole phase moves by up to \
                             {check:.2} rad more than predicted from the neighbouring intensity \
                             samples: either the samples do not resolve its intensity dependence \
                             or the single-molecule dipole jumps with the intensity (near a \
                             cutoff, where families switch on and off); the build-up there is \
                             uncertain"
                        ),
                        advice: "raise medium.intensity_samples; if the jump stays, read that \
                                 harmonic's build-up as uncertain"
                            .into(),
                    });
                }
            }
            if b.axis_phase_step > PHASE_CHECK_LIMIT {
                notes.push(DetectionNote {
                    code: "axis-phase-under-resolved",
                    message: format!(
                        "the phase of a family changes by up to {:.2} rad between neighbouring \
                         axis points",
                        b.axis_phase_step
                    ),
                    advice: "raise medium.axis_points".into(),
                });
            }
            let fam: BTreeMap<FamilyLabel, Vec<f64>> =
                b.families.iter().map(|(k, v)| (*k, power(v))).collect();
            let t = power(&b.total);
            (None, Some(b), t, fam)
        }
    };
    let incomplete: usize = samples
        .iter()
        .map(|s| s.complete.iter().filter(|c| !**c).count())
        .sum();
    if incomplete > 0 {
        notes.push(DetectionNote {
            code: "incomplete-samples",
            message: format!(
                "{incomplete} (sample, energy) rows are incomplete (a family failed); they \
                 count with the failed family as zero"
            ),
            advice: "see the single-molecule statuses; a finer energy grid may help".into(),
        });
    }
    let source_kind = match field.structure() {
        TimeStructure::Periodic { .. } => SourceKind::Lines,
        TimeStructure::Pulse { .. } => SourceKind::Density,
    };
    let detected = match &setup.detector {
        None => None,
        Some(d) => {
            let e_ev: Vec<f64> = energies.iter().map(|&e| units::au_to_ev(e)).collect();
            let w_ev = units::au_to_ev(omega);
            let total = d.apply(&e_ev, &source_total, source_kind, w_ev)?;
            let families = source_families
                .iter()
                .map(|(k, v)| Ok((*k, d.apply(&e_ev, v, source_kind, w_ev)?)))
                .collect::<Result<_>>()?;
            Some(DetectedSet { total, families })
        }
    };
    Ok(DetectionOutcome {
        combination: setup.combination,
        energies: energies.to_vec(),
        omega,
        peak_intensity_wcm2: peak,
        beam,
        intensities,
        weights,
        samples,
        ionized_fraction,
        average,
        build_up,
        source_total,
        source_families,
        source_kind,
        detected,
        notes,
    })
}
