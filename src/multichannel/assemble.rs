//! The amplitude stage of a molecule: the orientation loop and the coherent sums.

use nalgebra::{DMatrix, Vector3};
use num_complex::Complex64;

use super::classes::{OrientationClass, classes};
use super::holes::HoleAccumulator;
use super::stage::TrajectoryStage;
use super::terms::{ChunkResult, Plan, compute_chunk};
use crate::dipole::{KernelKind, SaddleSum};
use crate::error::{Error, Result};
use crate::field::{CVec3, Field};
use crate::momentum::rotate;
use crate::orbits::FamilyLabel;
use crate::orientation::{AlignmentGrid, Orientation, full_grid, linear_molecule_grid};
use crate::spectrum::{Contribution, NEGLIGIBLE, project};
use crate::status::{FamilyStatus, RowStatus};
use crate::target::{OrientationGridSpec, Target};

/// The contribution of one channel pair, with its families.
#[derive(Clone, Debug)]
pub struct PairSpectrum {
    /// Index of the channel the electron leaves.
    pub ion: usize,
    /// Index of the channel it recombines into.
    pub rec: usize,
    /// Orientation-averaged dipole of the pair per energy.
    pub dipole: Vec<CVec3>,
    /// `dφ/dΩ` of the pair's contribution (a.u.); None for periodic fields, where a sum over
    /// both half cycles has no emission time (its dφ/dΩ is a half cycle's plus T/4).
    pub group_delay: Vec<Option<f64>>,
    /// Family contributions (orientation averaged).
    pub families: Vec<Contribution>,
}

/// The normalised hole density matrix of one family of the reference channel, per energy.
#[derive(Clone, Debug)]
pub struct HoleDensity {
    /// Family label.
    pub label: FamilyLabel,
    /// Crest index.
    pub half_cycle: i32,
    /// Per energy (None where a saddle failed).
    pub points: Vec<Option<HoleSample>>,
}

/// The hole at one energy of one family.
#[derive(Clone, Debug)]
pub struct HoleSample {
    /// `Re t_i` of the reference saddle (a.u.).
    pub t_ion: f64,
    /// `Re t_r` of the reference saddle (a.u.).
    pub t_ret: f64,
    /// Orientation-averaged density matrix at recombination, unit trace, interaction picture.
    pub rho: DMatrix<Complex64>,
    /// Trace before normalisation: the orientation-averaged ionization weight.
    pub yield_weight: f64,
}

/// A molecular harmonic spectrum resolved by channel pair and family.
#[derive(Clone, Debug)]
pub struct MultichannelSpectrum {
    /// Reference angular frequency ω (a.u.): order = Ω/ω.
    pub omega: f64,
    /// Photon energies Ω (a.u.).
    pub energies: Vec<f64>,
    /// Driving polarization axis ê.
    pub axis: Vector3<f64>,
    /// The in-plane direction across the driving polarization (ê rotated by +90° about +y).
    pub transverse: Vector3<f64>,
    /// Saddle summation.
    pub sum: SaddleSum,
    /// Channel labels.
    pub labels: Vec<String>,
    /// Total dipole per energy.
    pub total: Vec<CVec3>,
    /// `dφ/dΩ` of the total (a.u.); None for periodic fields (see [`PairSpectrum::group_delay`];
    /// the families carry their own).
    pub group_delay: Vec<Option<f64>>,
    /// Whether the row is complete: every family that should contribute converged
    /// ([`RowStatus::Complete`]; the one definition used by every output).
    pub complete: Vec<bool>,
    /// The status of each row ([`crate::status`]).
    pub status: Vec<RowStatus>,
    /// Channel-pair contributions.
    pub pairs: Vec<PairSpectrum>,
    /// Indices of the energies whose group delays from the saddles' own phase
    /// ([`crate::spectrum::GroupDelays::Tangent`]) the grid did not resolve: their delays are
    /// None until [`super::refine_group_delays`] recomputes them by difference.
    pub unresolved_group_delays: Vec<usize>,
    /// Number of orientations summed.
    pub orientations: usize,
    /// Hole density matrices, one per family of the reference (lowest-Ip) channel.
    pub holes: Vec<HoleDensity>,
    /// Index of the reference channel.
    pub reference: usize,
}

impl MultichannelSpectrum {
    /// `|D|²` at energy index `k`.
    pub fn intensity(&self, k: usize) -> f64 {
        self.total[k].iter().map(|c| c.norm_sqr()).sum()
    }

    /// Emitted power `Ω⁴|D|²` at energy index `k` (arbitrary units).
    pub fn power(&self, k: usize) -> f64 {
        self.energies[k].powi(4) * self.intensity(k)
    }

    /// Components along and across the driving polarization, `(ê·D, ê⊥·D)`.
    pub fn polarization_components(&self, k: usize) -> (Complex64, Complex64) {
        (
            project(&self.axis, &self.total[k]),
            project(&self.transverse, &self.total[k]),
        )
    }

    /// Ellipticity (signed, |ε| ≤ 1; positive turns from ê towards ê⊥) and polarization angle
    /// (rad, from ê towards ê⊥) of the harmonic at energy index `k`, from the Stokes parameters
    /// of `(ê·D, ê⊥·D)` (textbook optics).
    pub fn polarization_state(&self, k: usize) -> Option<(f64, f64)> {
        let (a, b) = self.polarization_components(k);
        let s0 = a.norm_sqr() + b.norm_sqr();
        if s0 == 0.0 || !s0.is_finite() {
            return None;
        }
        let s1 = a.norm_sqr() - b.norm_sqr();
        let s2 = 2.0 * (a * b.conj()).re;
        let s3 = -2.0 * (a * b.conj()).im;
        let chi = 0.5 * (s3 / s0).clamp(-1.0, 1.0).asin();
        Some((chi.tan(), 0.5 * s2.atan2(s1)))
    }

    /// The share of each recombination channel in the harmonic at energy index `k`:
    /// `|ê·Σ_n D_mn|² / Σ_m' |ê·Σ_n D_m'n|²` (which ionic state the electron recombined with,
    /// as the emission along the driving polarization sees it; coherent over ionization
    /// channels and orientations). None where the emission vanishes. Both the saddle path and
    /// the quadrature give it (the quadrature has no saddle times and hence no hole density of
    /// its own), so it is the hole-related observable they are compared on (docs/validation.md).
    pub fn recombination_shares(&self, k: usize) -> Option<Vec<f64>> {
        let n = self.labels.len();
        let mut e = vec![Complex64::new(0.0, 0.0); n];
        for p in &self.pairs {
            e[p.rec] += project(&self.axis, &p.dipole[k]);
        }
        let total: f64 = e.iter().map(|x| x.norm_sqr()).sum();
        (total > 0.0 && total.is_finite()).then(|| e.iter().map(|x| x.norm_sqr() / total).collect())
    }

    /// Harmonic phases `arg(ê·D)`, None where negligible (see [`crate::spectrum::phases`]).
    pub fn phases(&self) -> Vec<Option<f64>> {
        crate::spectrum::phases(&self.total, &self.axis)
    }
}

/// The orientations (with weights) of a target in a field.
pub fn orientations(target: &Target, field: &Field) -> Result<Vec<Orientation>> {
    let err =
        |e: crate::orientation::OrientationError| Error::Inconsistent(format!("orientations: {e}"));
    match target.orientations {
        OrientationGridSpec::Fixed([a, b, g]) => Ok(vec![Orientation::new(a, b, g, 1.0)]),
        OrientationGridSpec::Axis(n) => {
            let along_z = field
                .linear_axis()
                .is_some_and(|a| (a.z.abs() - 1.0).abs() < 1e-12);
            if !along_z {
                return Err(Error::invalid(
                    "orientations.grid",
                    "axis",
                    "a β-only grid needs a field linearly polarised along lab z; use \"full\"",
                ));
            }
            let grid = linear_molecule_grid(n).map_err(err)?;
            Ok(AlignmentGrid::weighted(&grid, &target.alignment)
                .map_err(err)?
                .orientations()
                .to_vec())
        }
        OrientationGridSpec::Full(nb, na, ng) => {
            let grid = full_grid(nb, na, ng).map_err(err)?;
            Ok(AlignmentGrid::weighted(&grid, &target.alignment)
                .map_err(err)?
                .orientations()
                .to_vec())
        }
    }
}

/// Accumulated sums of one chunk of orientation classes (lab frame).
struct Accumulator {
    /// `[pair][family][grid point]`.
    dipoles: Vec<Vec<Vec<CVec3>>>,
    /// `[pair][family][grid point]`: a saddle with structure in the phase failed there.
    failed: Vec<Vec<Vec<bool>>>,
    holes: HoleAccumulator,
}

impl Accumulator {
    fn new(plan: &Plan<'_>) -> Self {
        let stage = plan.stage;
        let ng = stage.grid.len();
        Accumulator {
            dipoles: stage
                .pairs
                .iter()
                .map(|p| vec![vec![CVec3::zeros(); ng]; p.table.families.len()])
                .collect(),
            failed: stage
                .pairs
                .iter()
                .map(|p| vec![vec![false; ng]; p.table.families.len()])
                .collect(),
            holes: HoleAccumulator::new(&plan.holes),
        }
    }

    /// Adds the results of a chunk of classes, each for every one of its members, rotated to
    /// the lab (in class order, members in list order).
    fn add_chunk(
        &mut self,
        plan: &Plan<'_>,
        classes: &[OrientationClass],
        list: &[Orientation],
        result: &ChunkResult,
    ) {
        for (c, class) in classes.iter().enumerate() {
            for &o in &class.members {
                let r = &list[o].rotation;
                let w = Complex64::new(list[o].weight, 0.0);
                for (a, b) in self.dipoles.iter_mut().zip(&result.dipoles[c]) {
                    for (fa, fb) in a.iter_mut().zip(b) {
                        for (x, y) in fa.iter_mut().zip(fb) {
                            *x += rotate(r, y) * w;
                        }
                    }
                }
            }
            for (a, b) in self.failed.iter_mut().zip(&result.failed[c]) {
                for (fa, fb) in a.iter_mut().zip(b) {
                    for (x, y) in fa.iter_mut().zip(fb) {
                        *x |= *y;
                    }
                }
            }
            self.holes
                .add_class(&plan.holes, &result.holes[c], class.weight);
        }
    }
}

/// A sum of family contributions whose modulus is below this fraction of the sum of their
/// moduli cancels too strongly for the tangent group delay ([`crate::spectrum::GroupDelays`]):
/// its delays are recomputed by difference.
const CANCELLATION: f64 = 0.1;

/// Classes computed together (their hole propagators and structured saddles are shared within
/// a chunk; memory grows with the chunk).
const CHUNK_CLASSES: usize = 32;

/// Assembles the orientation-averaged multichannel spectrum (classes in parallel;
/// `progress` is called with the number of orientations done).
pub fn assemble(
    field: &Field,
    target: &Target,
    stage: &TrajectoryStage,
    linear_fast_path: bool,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<MultichannelSpectrum> {
    let plan = Plan::new(field, target, stage, linear_fast_path, false);
    let list = orientations(target, field)?;
    let groups = classes(&list, stage.linear_axis);
    let total = list.len();
    let mut done = 0;
    let mut acc = Accumulator::new(&plan);
    // Chunks in order; inside a chunk the channel pairs run in parallel, each into its own
    // storage, so the sums do not depend on the number of threads.
    for chunk in groups.chunks(CHUNK_CLASSES) {
        let rotations: Vec<_> = chunk.iter().map(|c| c.rotation).collect();
        let result = compute_chunk(&plan, &rotations)?;
        acc.add_chunk(&plan, chunk, &list, &result);
        done += chunk.iter().map(|c| c.members.len()).sum::<usize>();
        progress(done, total);
    }
    finish(&plan, acc, total)
}

/// The same sum, serially, one orientation at a time (no classes), with every structure factor
/// evaluated per saddle and every complex-time hole propagator integrated directly from the real
/// axis: the plain reference path that [`assemble`] is tested against.
pub fn assemble_serial(
    field: &Field,
    target: &Target,
    stage: &TrajectoryStage,
) -> Result<MultichannelSpectrum> {
    let plan = Plan::new(field, target, stage, false, true);
    let list = orientations(target, field)?;
    let mut acc = Accumulator::new(&plan);
    for (i, o) in list.iter().enumerate() {
        let class = OrientationClass {
            rotation: o.rotation,
            members: vec![i],
            weight: o.weight,
        };
        let result = compute_chunk(&plan, &[o.rotation])?;
        acc.add_chunk(&plan, std::slice::from_ref(&class), &list, &result);
    }
    finish(&plan, acc, list.len())
}

/// Turns the accumulated sums into the spectrum.
fn finish(plan: &Plan<'_>, mut acc: Accumulator, count: usize) -> Result<MultichannelSpectrum> {
    let stage = plan.stage;
    let field = plan.field;
    let axis = field.axis();
    let transverse = Vector3::new(axis.z, 0.0, -axis.x);
    // A β-only grid samples α = 0 only: the components across the lab z axis average to zero
    // over α and are removed.
    if matches!(plan.target.orientations, OrientationGridSpec::Axis(_)) {
        for pair in &mut acc.dipoles {
            for fam in pair.iter_mut() {
                for d in fam.iter_mut() {
                    d.x = Complex64::new(0.0, 0.0);
                    d.y = Complex64::new(0.0, 0.0);
                }
            }
        }
    }
    let n = stage.energies.len();
    let central = |k: usize| stage.central(k);
    let mut total_grid = vec![CVec3::zeros(); stage.grid.len()];
    for pair in &acc.dipoles {
        for fam in pair {
            for (t, d) in total_grid.iter_mut().zip(fam) {
                *t += d;
            }
        }
    }
    let largest = total_grid
        .iter()
        .map(|d| project(&axis, d).norm())
        .fold(0.0, f64::max);
    let floor = NEGLIGIBLE * largest;
    // For a periodic field the lines sum both half cycles, D = D₁(1 ± e^{iΩT/2}), so dφ/dΩ of a
    // sum over half cycles is a half cycle's group delay plus T/4 and no emission time: only
    // the families (one half cycle each) get group delays there (pulses: every sum).
    let periodic = matches!(
        field.structure(),
        crate::field::TimeStructure::Periodic { .. }
    );
    let tangent = stage.group_delays == crate::spectrum::GroupDelays::Tangent;
    // Difference: central differences over the Ω ± δ triples of the grid.
    let family_delay = |v: &[CVec3], k: usize| -> Option<f64> {
        let d = stage.delta?;
        let i = central(k);
        crate::spectrum::phase_derivative(
            project(&axis, &v[i - 1]),
            project(&axis, &v[i + 1]),
            project(&axis, &v[i]),
            d,
            floor,
        )
    };
    // Tangent: complex log-derivatives of every family's projected dipole
    // (crate::spectrum::tangent_log_derivatives), `[pair][family][energy]`.
    let slopes: Vec<Vec<Vec<crate::spectrum::LogDerivative>>> = if tangent {
        stage
            .pairs
            .iter()
            .enumerate()
            .map(|(p, pair)| {
                pair.table
                    .families
                    .iter()
                    .enumerate()
                    .map(|(f, family)| {
                        let values: Vec<Complex64> = acc.dipoles[p][f]
                            .iter()
                            .map(|d| project(&axis, d))
                            .collect();
                        let saddles: Vec<Option<(Complex64, Complex64)>> = family
                            .points
                            .iter()
                            .map(|pt| pt.saddle().map(|s| (s.t_ret, s.action)))
                            .collect();
                        // Periodic fields report family delays only: the phase alone matters.
                        crate::spectrum::tangent_log_derivatives(
                            &stage.grid,
                            &values,
                            &saddles,
                            periodic,
                        )
                    })
                    .collect()
            })
            .collect()
    } else {
        Vec::new()
    };
    // Energies where a contributing family's tangent derivative is not resolved by the grid.
    // For pulses also where a sum cancels strongly (|Σ v_f| below CANCELLATION × Σ|v_f|): its
    // phase slope then amplifies the members' small errors.
    let cancels = |pairs: &[usize], k: usize| -> bool {
        let (mut sum, mut moduli) = (Complex64::new(0.0, 0.0), 0.0);
        for &p in pairs {
            for fam in &acc.dipoles[p] {
                let v = project(&axis, &fam[k]);
                sum += v;
                moduli += v.norm();
            }
        }
        moduli > 0.0 && sum.norm() < CANCELLATION * moduli
    };
    let every_pair: Vec<usize> = (0..stage.pairs.len()).collect();
    let unresolved: Vec<usize> = if tangent {
        (0..n)
            .filter(|&k| {
                !periodic
                    && (cancels(&every_pair, k) || (0..stage.pairs.len()).any(|p| cancels(&[p], k)))
                    || {
                        slopes.iter().enumerate().any(|(p, pair)| {
                            pair.iter().enumerate().any(|(f, fam)| {
                                // Periodic fields: only the families' own (non-negligible) delays;
                                // pulses: every member of a sum.
                                let v = project(&axis, &acc.dipoles[p][f][k]).norm();
                                fam[k] == crate::spectrum::LogDerivative::Unresolved
                                    && if periodic { v > floor } else { v > 0.0 }
                            })
                        })
                    }
            })
            .collect()
    } else {
        Vec::new()
    };
    let one_family_delay = |p: usize, f: usize, k: usize| -> Option<f64> {
        if tangent && unresolved.binary_search(&k).is_ok() {
            return None;
        }
        if tangent {
            let v = project(&axis, &acc.dipoles[p][f][k]);
            (v.norm() > floor).then_some(())?;
            slopes[p][f][k].value().map(|l| l.im)
        } else {
            family_delay(&acc.dipoles[p][f], k)
        }
    };
    // The delay of a sum of families (`pairs`: indices of the pairs summed); None for periodic
    // fields.
    let sum_delay = |pairs: &[usize], v: &[CVec3], k: usize| -> Option<f64> {
        if periodic {
            return None;
        }
        if !tangent {
            return family_delay(v, k);
        }
        if unresolved.binary_search(&k).is_ok() {
            return None;
        }
        let dipoles = &acc.dipoles;
        let slopes = &slopes;
        let mut parts: Vec<(Complex64, Option<Complex64>)> = Vec::new();
        for &p in pairs {
            for f in 0..dipoles[p].len() {
                parts.push((project(&axis, &dipoles[p][f][k]), slopes[p][f][k].value()));
            }
        }
        crate::spectrum::sum_delay(&parts, floor)
    };
    // Every family's status at every energy; a row's status follows from them (the one
    // definition of a complete row, crate::status).
    let mut row_families: Vec<Vec<FamilyStatus>> = vec![Vec::new(); n];
    let mut pairs = Vec::with_capacity(stage.pairs.len());
    for (p, pair) in stage.pairs.iter().enumerate() {
        let mut pair_grid = vec![CVec3::zeros(); stage.grid.len()];
        let mut families = Vec::with_capacity(pair.table.families.len());
        for (f, family) in pair.table.families.iter().enumerate() {
            let values = &acc.dipoles[p][f];
            for (t, d) in pair_grid.iter_mut().zip(values) {
                *t += d;
            }
            let status: Vec<FamilyStatus> = (0..n)
                .map(|k| {
                    let i = central(k);
                    let failure = match family.points[i] {
                        crate::orbits::OrbitPoint::Failed(fl) => Some(fl.reason),
                        crate::orbits::OrbitPoint::Solved(_) => None,
                    };
                    let exclusion = match pair.kernels.values[f][i].kind {
                        KernelKind::Excluded => pair.table.exclusion(f, i),
                        _ => None,
                    };
                    FamilyStatus::of(failure, exclusion, acc.failed[p][f][i])
                })
                .collect();
            for (row, s) in row_families.iter_mut().zip(&status) {
                row.push(*s);
            }
            families.push(Contribution {
                label: family.label,
                half_cycle: family.half_cycle,
                dipole: (0..n)
                    .map(|k| {
                        let i = central(k);
                        (pair.kernels.values[f][i].kind != KernelKind::Failed).then(|| values[i])
                    })
                    .collect(),
                kind: (0..n)
                    .map(|k| pair.kernels.values[f][central(k)].kind)
                    .collect(),
                group_delay: (0..n).map(|k| one_family_delay(p, f, k)).collect(),
                emission_time: (0..n)
                    .map(|k| family.points[central(k)].saddle().map(|s| s.t_ret.re))
                    .collect(),
                status,
            });
        }
        pairs.push(PairSpectrum {
            ion: pair.ion,
            rec: pair.rec,
            dipole: (0..n).map(|k| pair_grid[central(k)]).collect(),
            group_delay: (0..n).map(|k| sum_delay(&[p], &pair_grid, k)).collect(),
            families,
        });
    }
    let all_pairs: Vec<usize> = (0..stage.pairs.len()).collect();
    let status: Vec<RowStatus> = row_families.iter().map(RowStatus::of).collect();
    let complete = status.iter().map(|s| *s == RowStatus::Complete).collect();
    let holes = acc.holes.finish(&plan.holes);
    Ok(MultichannelSpectrum {
        omega: field.omega(),
        energies: stage.energies.clone(),
        axis,
        transverse,
        sum: stage.sum,
        labels: plan
            .target
            .channels
            .iter()
            .map(|c| c.label.clone())
            .collect(),
        total: (0..n).map(|k| total_grid[central(k)]).collect(),
        group_delay: (0..n)
            .map(|k| sum_delay(&all_pairs, &total_grid, k))
            .collect(),
        complete,
        status,
        pairs,
        unresolved_group_delays: unresolved,
        orientations: count,
        holes,
        reference: plan.holes.reference,
    })
}
