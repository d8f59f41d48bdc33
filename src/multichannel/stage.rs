//! The trajectory stage of a molecule: one orbit table per coupled channel pair, solved once.

use std::collections::HashMap;
use std::sync::Arc;

use nalgebra::Vector3;
use rayon::prelude::*;

use super::{MultichannelSettings, StructurePlacement};
use crate::dipole::{Kernels, kernels};
use crate::error::{Error, Result};
use crate::field::Field;
use crate::hole::{FieldSamples, GridTime, HoleContour};
use crate::momentum::GaussianSide;
use crate::orbits::{ChannelPair, OrbitSettings, OrbitTable, families, solve_orbits_seeded};
use crate::target::Target;

/// The Gaussian structure of one channel that may go into the phase: the shells of its
/// ionization and recombination sides (molecular frame), or None for a side that stays in the
/// prefactor (by choice, or because its model has no Gaussian form). With
/// [`StructurePlacement::Auto`] a pair uses its recombination shells only when its ionizing
/// channel's shells are in the phase too ([`TrajectoryStage::recombination_side`]).
#[derive(Clone, Debug, Default)]
pub struct ChannelStructure {
    /// Ionization side in the phase.
    pub ion: Option<GaussianSide>,
    /// Recombination side in the phase.
    pub rec: Option<GaussianSide>,
}

/// One channel pair `n → m` (ionize into `ion`, recombine into `rec`).
#[derive(Clone, Debug)]
pub struct PairStage {
    /// Index of the channel the electron leaves.
    pub ion: usize,
    /// Index of the channel it recombines into.
    pub rec: usize,
    /// Orbits on the stage's grid (shared between pairs with the same two Ip).
    pub table: Arc<OrbitTable>,
    /// Continuum kernels of every family.
    pub kernels: Kernels,
    /// `(Re t_r, Re t_i)` of every solved saddle located on the hole-propagation grid, per
    /// family and grid point (None where the saddle failed or no propagation is needed).
    pub times: Vec<Vec<Option<(GridTime, GridTime)>>>,
}

/// Everything that depends on the field and the channel energies only.
#[derive(Clone, Debug)]
pub struct TrajectoryStage {
    /// The photon energies requested (a.u.).
    pub energies: Vec<f64>,
    /// The solved grid: `energies`, or `Ω − δ, Ω, Ω + δ` triples for group delays.
    pub grid: Vec<f64>,
    /// Stride of the requested energies in the grid (1 or 3).
    pub stride: usize,
    /// δ of the group-delay triples (a.u.), if any.
    pub delta: Option<f64>,
    /// How group delays are computed on this grid
    /// ([`crate::spectrum::effective_group_delays`]).
    pub group_delays: crate::spectrum::GroupDelays,
    /// Channel pairs, diagonal ones first in channel order, then the others in (ion, rec) order.
    pub pairs: Vec<PairStage>,
    /// Field samples for the hole propagator, when the ion is not trivially uncoupled.
    pub samples: Option<FieldSamples>,
    /// The field's polarization axis, when the field is linearly polarised.
    pub linear_axis: Option<Vector3<f64>>,
    /// Number of distinct orbit tables solved (pairs with equal energies share one).
    pub tables_solved: usize,
    /// The saddle summation of the kernels.
    pub sum: crate::dipole::SaddleSum,
    /// Regulator ε of the spreading factor.
    pub epsilon: f64,
    /// Where the hole propagator is evaluated.
    pub contour: HoleContour,
    /// Saddle-point order of the hole propagator.
    pub hole_expansion: super::HoleExpansion,
    /// Per channel, the Gaussian structure that may go into the phase.
    pub structure: Vec<ChannelStructure>,
    /// Whether a pair's recombination shells go into the phase only when its ionization side
    /// does ([`StructurePlacement::Auto`]).
    pub recombination_with_ionization: bool,
    /// Trajectory-stage settings (for the saddles with structure in the phase).
    pub orbit_settings: OrbitSettings,
    /// Classical seeds of the field (shared by every saddle problem).
    pub seeds: Vec<families::SeedGroup>,
}

impl TrajectoryStage {
    /// Index into the grid of requested energy `k`.
    pub fn central(&self, k: usize) -> usize {
        k * self.stride + self.stride / 2
    }

    /// The recombination shells of the pair `ion → rec` in the phase, if any (module rule of
    /// [`StructurePlacement::Auto`]).
    pub fn recombination_side(&self, ion: usize, rec: usize) -> Option<&GaussianSide> {
        if self.recombination_with_ionization && self.structure[ion].ion.is_none() {
            return None;
        }
        self.structure[rec].rec.as_ref()
    }

    /// The pair stage of `(ion, rec)`, if that pair is coupled.
    pub fn pair(&self, ion: usize, rec: usize) -> Option<&PairStage> {
        self.pairs.iter().find(|p| p.ion == ion && p.rec == rec)
    }
}

/// Channels connected through couplings (field-free or dipole), as a component index each.
pub fn coupling_components(target: &Target) -> Vec<usize> {
    let n = target.channels.len();
    let mut component: Vec<usize> = (0..n).collect();
    let linked = |a: usize, b: usize| {
        target.ion.coupling()[(a, b)].norm() > 0.0
            || target.ion.dipole().iter().any(|m| m[(a, b)].norm() > 0.0)
    };
    // Union by relabelling (n is small).
    for a in 0..n {
        for b in 0..n {
            if a != b && linked(a, b) {
                let (from, to) = (component[b], component[a]);
                if from != to {
                    for c in component.iter_mut() {
                        if *c == from {
                            *c = to;
                        }
                    }
                }
            }
        }
    }
    component
}

/// Whether the interaction-picture propagator is the identity (no couplings, no permanent
/// dipoles), so that the hole propagator can be skipped.
pub fn propagation_needed(target: &Target) -> bool {
    let ion = &target.ion;
    !ion.is_uncoupled()
        || ion
            .dipole()
            .iter()
            .any(|m| (0..m.nrows()).any(|i| m[(i, i)].norm() > 0.0))
}

/// Solves the trajectory stage for `target` in `field` at photon energies `energies` (a.u.).
pub fn trajectory_stage(
    field: &Field,
    target: &Target,
    energies: &[f64],
    settings: &MultichannelSettings,
) -> Result<TrajectoryStage> {
    let group_delays =
        crate::spectrum::effective_group_delays(energies, settings.group_delays, field.omega());
    let (stride, delta, grid) =
        crate::spectrum::group_delay_grid(energies, group_delays, field.omega())?;
    for (k, c) in target.channels.iter().enumerate() {
        if let Some((lo, hi)) = c.recombination.energy_range() {
            let (glo, ghi) = grid
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &e| {
                    (a.min(e), b.max(e))
                });
            if glo < lo || ghi > hi {
                return Err(Error::invalid(
                    &format!("channels[{k}].recombination.energy_ev"),
                    format!(
                        "{:.3}..{:.3} eV",
                        crate::units::au_to_ev(lo),
                        crate::units::au_to_ev(hi)
                    ),
                    &format!(
                        "the table must cover the photon energies {:.3}..{:.3} eV",
                        crate::units::au_to_ev(glo),
                        crate::units::au_to_ev(ghi)
                    ),
                ));
            }
        }
    }
    let components = coupling_components(target);
    let n = target.channels.len();
    let mut list: Vec<(usize, usize)> = (0..n).map(|i| (i, i)).collect();
    for a in 0..n {
        for b in 0..n {
            if a != b && components[a] == components[b] {
                list.push((a, b));
            }
        }
    }
    // The classical seeds depend on the field only: found once for all pairs.
    let seeds = families::discover(field, &settings.orbits.discovery);
    // One table per distinct pair of energies, in order of first appearance, solved in
    // parallel (each table is independent and deterministic; errors reported in list order).
    let key_of = |ion: usize, rec: usize| {
        (
            target.channels[ion].ip.to_bits(),
            target.channels[rec].ip.to_bits(),
        )
    };
    let mut keys: Vec<(usize, usize)> = Vec::new();
    for &(ion, rec) in &list {
        if !keys.iter().any(|&(a, b)| key_of(a, b) == key_of(ion, rec)) {
            keys.push((ion, rec));
        }
    }
    let solved: Vec<Result<OrbitTable>> = keys
        .par_iter()
        .map(|&(ion, rec)| {
            let pair = ChannelPair::new(target.channels[ion].ip, target.channels[rec].ip);
            solve_orbits_seeded(field, pair, &grid, &settings.orbits, &seeds)
        })
        .collect();
    let mut cache: HashMap<(u64, u64), Arc<OrbitTable>> = HashMap::new();
    for (&(ion, rec), table) in keys.iter().zip(solved) {
        cache.insert(key_of(ion, rec), Arc::new(table?));
    }
    // Kernels per pair, in parallel too (pure functions of the tables).
    let mut pairs: Vec<PairStage> = list
        .par_iter()
        .map(|&(ion, rec)| {
            let table = cache[&key_of(ion, rec)].clone();
            let kernels = kernels(&table, settings.sum, settings.epsilon);
            PairStage {
                ion,
                rec,
                table,
                kernels,
                times: Vec::new(),
            }
        })
        .collect();
    let structure: Vec<ChannelStructure> = target
        .channels
        .iter()
        .map(|c| ChannelStructure {
            ion: match settings.ionization_structure {
                StructurePlacement::Phase | StructurePlacement::Auto => {
                    GaussianSide::ionization(&c.ionization)
                }
                StructurePlacement::Prefactor => None,
            },
            rec: match settings.recombination_structure {
                StructurePlacement::Phase | StructurePlacement::Auto => {
                    GaussianSide::recombination(&c.recombination)
                }
                StructurePlacement::Prefactor => None,
            },
        })
        .collect();
    let samples = if propagation_needed(target) {
        let (mut lo, mut hi) = (f64::INFINITY, f64::NEG_INFINITY);
        for p in &pairs {
            for f in &p.table.families {
                for s in f.points.iter().filter_map(|p| p.saddle()) {
                    lo = lo.min(s.t_ion.re);
                    hi = hi.max(s.t_ret.re);
                }
            }
        }
        if !(lo.is_finite() && hi.is_finite()) {
            return Err(Error::Numerical(
                "no saddle converged: nothing to propagate the hole over".into(),
            ));
        }
        // Saddles with structure in the phase move by a fraction of a cycle at most: a margin of
        // 0.1 cycle keeps their real parts inside the grid.
        let margin = 1.0_f64.max(0.1 * 2.0 * std::f64::consts::PI / field.omega());
        let field_at = |t: f64| field.electric_real(t);
        let s = FieldSamples::new(&field_at, lo - margin, hi + margin, settings.hole_step)
            .map_err(|e| Error::Numerical(format!("hole propagator grid: {e}")))?;
        for p in &mut pairs {
            p.times = p
                .table
                .families
                .iter()
                .map(|f| {
                    f.points
                        .iter()
                        .map(|pt| {
                            let sd = pt.saddle()?;
                            Some((s.locate(sd.t_ret.re).ok()?, s.locate(sd.t_ion.re).ok()?))
                        })
                        .collect()
                })
                .collect();
        }
        Some(s)
    } else {
        None
    };
    Ok(TrajectoryStage {
        energies: energies.to_vec(),
        grid,
        stride,
        delta,
        group_delays,
        pairs,
        samples,
        linear_axis: field.linear_axis(),
        tables_solved: cache.len(),
        sum: settings.sum,
        epsilon: settings.epsilon,
        contour: settings.hole_contour,
        hole_expansion: settings.hole_expansion,
        structure,
        recombination_with_ionization: settings.recombination_structure == StructurePlacement::Auto,
        orbit_settings: settings.orbits,
        seeds,
    })
}
