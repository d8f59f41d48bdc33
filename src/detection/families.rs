//! The dipole of one intensity sample, grouped by quantum-orbit family.
//!
//! A family label (`short`, `long`, `return2-short`, …) collects the contributions of every
//! channel pair and every half cycle that carry it, added coherently: the half cycles of one
//! family interfere into the harmonic lines, and the channel pairs of one family share the
//! excursion and hence the intensity-dependent phase that phase matching acts on. The sum over
//! the labels is the total dipole of the sample.

use std::collections::BTreeMap;

use nalgebra::Vector3;

use crate::field::CVec3;
use crate::multichannel::MultichannelSpectrum;
use crate::orbits::FamilyLabel;

/// Key of one contribution: family label, ionized channel, recombined channel, half cycle.
pub type PieceKey = (FamilyLabel, usize, usize, i32);

/// The dipole of one sample per energy, total, per family label, and per contribution.
#[derive(Clone, Debug, PartialEq)]
pub struct FamilyDipoles {
    /// Driving polarization axis ê.
    pub axis: Vector3<f64>,
    /// Total dipole per energy.
    pub total: Vec<CVec3>,
    /// Per family label, the coherent sum over channel pairs and half cycles (failed points
    /// count as zero and make the row incomplete).
    pub families: BTreeMap<FamilyLabel, Vec<CVec3>>,
    /// Per contribution (one family of one channel pair on one half cycle): the pieces whose
    /// dipole phase varies smoothly with the intensity, which the axis build-up interpolates
    /// one by one (a family label's sum can pass near zero as its pieces interfere). Empty:
    /// the build-up interpolates the labels' sums.
    pub pieces: BTreeMap<PieceKey, Vec<CVec3>>,
    /// Whether every family that should contribute converged, per energy.
    pub complete: Vec<bool>,
}

impl FamilyDipoles {
    /// Groups a single-molecule spectrum.
    pub fn of(spectrum: &MultichannelSpectrum) -> Self {
        let n = spectrum.energies.len();
        let mut families: BTreeMap<FamilyLabel, Vec<CVec3>> = BTreeMap::new();
        let mut pieces: BTreeMap<PieceKey, Vec<CVec3>> = BTreeMap::new();
        for pair in &spectrum.pairs {
            for c in &pair.families {
                let piece = pieces
                    .entry((c.label, pair.ion, pair.rec, c.half_cycle))
                    .or_insert_with(|| vec![CVec3::zeros(); n]);
                for (a, d) in piece.iter_mut().zip(&c.dipole) {
                    if let Some(d) = d {
                        *a += d;
                    }
                }
                let acc = families
                    .entry(c.label)
                    .or_insert_with(|| vec![CVec3::zeros(); n]);
                for (a, d) in acc.iter_mut().zip(&c.dipole) {
                    if let Some(d) = d {
                        *a += d;
                    }
                }
            }
        }
        FamilyDipoles {
            axis: spectrum.axis,
            total: spectrum.total.clone(),
            families,
            pieces,
            complete: spectrum.complete.clone(),
        }
    }

    /// Number of energies.
    pub fn len(&self) -> usize {
        self.total.len()
    }

    /// Whether there are no energies.
    pub fn is_empty(&self) -> bool {
        self.total.is_empty()
    }
}

/// `|D|² = Σ_k |D_k|²` of a dipole vector.
pub fn strength(d: &CVec3) -> f64 {
    d.iter().map(|c| c.norm_sqr()).sum()
}
