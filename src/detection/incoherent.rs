//! The incoherent focal-volume average `S(Ω) = n ∫ |dV/dI| |D(Ω; I)|² dI` (physics notes §6.1).
//!
//! Every emitter adds its intensity, so the average ignores the phases: it is the right model
//! when the harmonic fields from different parts of the focus do not interfere on the detector
//! (e.g. an integrating detector behind a thin, dilute target), and the standard first estimate
//! otherwise. Its intensity rule is [`super::intensity_rule`].

use std::collections::BTreeMap;

use super::families::{FamilyDipoles, strength};
use super::intensity_rule::IntensitySample;
use crate::error::{Error, Result};
use crate::orbits::FamilyLabel;

/// The focal-volume average of |D|², total and per family.
#[derive(Clone, Debug, PartialEq)]
pub struct VolumeAverage {
    /// `Σ_i w_i |D(x_i)|²` per energy: the volume integral per unit density (bohr³ × a.u.).
    pub total: Vec<f64>,
    /// The same per family label (no interference between families).
    pub families: BTreeMap<FamilyLabel, Vec<f64>>,
    /// `Σ_i w_i`: the sampled volume between the lowest and the highest intensity (bohr³).
    pub volume: f64,
    /// Number of samples whose row is incomplete, per energy.
    pub incomplete_samples: Vec<usize>,
    /// Share of the lowest-intensity sample in the total, per energy (large values mean the
    /// lower end of the intensity range is not negligible: lower `lowest_fraction`).
    pub lowest_sample_share: Vec<Option<f64>>,
}

impl VolumeAverage {
    /// The mean `|D|²` over the sampled volume, `total/volume` (None for a zero volume, e.g.
    /// one sample of the unbounded medium, whose density vanishes at the peak).
    pub fn mean(&self) -> Option<Vec<f64>> {
        (self.volume > 0.0).then(|| self.total.iter().map(|t| t / self.volume).collect())
    }

    /// The mean per family (see [`VolumeAverage::mean`]).
    pub fn family_mean(&self) -> Option<BTreeMap<FamilyLabel, Vec<f64>>> {
        (self.volume > 0.0).then(|| {
            self.families
                .iter()
                .map(|(k, v)| (*k, v.iter().map(|t| t / self.volume).collect()))
                .collect()
        })
    }
}

/// Averages the dipoles of the samples (same order as `samples`).
///
/// # Errors
/// Different numbers of samples and dipole sets, or of energies between samples.
pub fn volume_average(
    samples: &[IntensitySample],
    dipoles: &[FamilyDipoles],
) -> Result<VolumeAverage> {
    if samples.len() != dipoles.len() || samples.is_empty() {
        return Err(Error::Inconsistent(format!(
            "volume average: {} intensity samples but {} dipole sets",
            samples.len(),
            dipoles.len()
        )));
    }
    let n = dipoles[0].len();
    if dipoles.iter().any(|d| d.len() != n) {
        return Err(Error::Inconsistent(
            "volume average: the samples have different energy grids".into(),
        ));
    }
    let mut total = vec![0.0; n];
    let mut families: BTreeMap<FamilyLabel, Vec<f64>> = BTreeMap::new();
    let mut incomplete = vec![0usize; n];
    for (s, d) in samples.iter().zip(dipoles) {
        for k in 0..n {
            total[k] += s.weight * strength(&d.total[k]);
            if !d.complete[k] {
                incomplete[k] += 1;
            }
        }
        for (label, values) in &d.families {
            let acc = families.entry(*label).or_insert_with(|| vec![0.0; n]);
            for (a, v) in acc.iter_mut().zip(values) {
                *a += s.weight * strength(v);
            }
        }
    }
    // The lowest intensity is the last sample (the rule lists the peak first).
    let lowest = samples
        .iter()
        .enumerate()
        .min_by(|a, b| a.1.relative.total_cmp(&b.1.relative))
        .map(|(i, _)| i)
        .unwrap_or(0);
    let lowest_sample_share = (0..n)
        .map(|k| {
            let part = samples[lowest].weight * strength(&dipoles[lowest].total[k]);
            (total[k] > 0.0).then(|| part / total[k])
        })
        .collect();
    Ok(VolumeAverage {
        total,
        families,
        volume: samples.iter().map(|s| s.weight).sum(),
        incomplete_samples: incomplete,
        lowest_sample_share,
    })
}
