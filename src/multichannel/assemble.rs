//! The amplitude stage of a molecule: the orientation loop and the coherent sums.

use std::sync::atomic::{AtomicUsize, Ordering};

use nalgebra::{DMatrix, Matrix3, Vector3};
use num_complex::Complex64;
use rayon::prelude::*;

use super::holes::{HoleAccumulator, HoleContext};
use super::stage::{PairStage, TrajectoryStage};
use crate::dipole::{KernelKind, SaddleSum};
use crate::error::{Error, Result};
use crate::field::{CVec3, Field, bdot};
use crate::hole::HolePropagator;
use crate::orbits::{FamilyLabel, Saddle};
use crate::orientation::{AlignmentGrid, Orientation, full_grid, linear_molecule_grid};
use crate::spectrum::{Contribution, NEGLIGIBLE, project};
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
    /// `dφ/dΩ` of the pair's contribution (a.u.).
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
    /// `dφ/dΩ` of the total (a.u.).
    pub group_delay: Vec<Option<f64>>,
    /// Whether every saddle of every pair converged at the energy.
    pub complete: Vec<bool>,
    /// Channel-pair contributions.
    pub pairs: Vec<PairSpectrum>,
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

/// Rotates a complex vector by a real matrix.
#[inline]
fn rotate(r: &Matrix3<f64>, v: &CVec3) -> CVec3 {
    CVec3::new(
        v.x * r[(0, 0)] + v.y * r[(0, 1)] + v.z * r[(0, 2)],
        v.x * r[(1, 0)] + v.y * r[(1, 1)] + v.z * r[(1, 2)],
        v.x * r[(2, 0)] + v.y * r[(2, 1)] + v.z * r[(2, 2)],
    )
}

/// Orientation-independent data of one saddle for the linear-field fast path.
#[derive(Clone, Copy, Debug)]
struct LinearSaddle {
    /// Index of `(channel, energy, sign)` into the recombination cache.
    rec_slot: usize,
    /// Index of `(channel, v sign, E sign)` into the ionization cache.
    ion_slot: usize,
    /// Orientation-independent ionization scalar.
    scalar: Complex64,
}

/// Everything the orientation loop reads.
struct Context<'a> {
    field: &'a Field,
    target: &'a Target,
    stage: &'a TrajectoryStage,
    /// Linear fast path: per pair, family and grid point.
    linear: Option<Vec<Vec<Vec<Option<LinearSaddle>>>>>,
    /// Exact return momenta `k` (scalar along ê) per recombination slot, with the channel.
    rec_momenta: Vec<(usize, usize, Complex64)>,
    /// `(channel, v sign, E sign)` per ionization slot.
    ion_keys: Vec<(usize, f64, f64)>,
    holes: HoleContext,
}

impl<'a> Context<'a> {
    fn new(field: &'a Field, target: &'a Target, stage: &'a TrajectoryStage, fast: bool) -> Self {
        let mut rec_momenta = Vec::new();
        let mut ion_keys: Vec<(usize, f64, f64)> = Vec::new();
        let linear = match (fast, stage.linear_axis) {
            (true, Some(axis)) => {
                let nch = target.channels.len();
                let ng = stage.grid.len();
                // Slot of (channel, grid point, sign): 2 per (channel, point).
                let mut rec_index = vec![usize::MAX; nch * ng * 2];
                let ax = axis.map(|x| Complex64::new(x, 0.0));
                let per_pair = stage
                    .pairs
                    .iter()
                    .map(|p| {
                        let ch = &target.channels[p.ion];
                        p.table
                            .families
                            .iter()
                            .map(|f| {
                                f.points
                                    .iter()
                                    .enumerate()
                                    .map(|(i, pt)| {
                                        let s = pt.saddle()?;
                                        let kr = bdot(&ax, &s.v_ret);
                                        let exact = crate::cmath::sqrt(Complex64::new(
                                            2.0 * (stage.grid[i] - target.channels[p.rec].ip),
                                            0.0,
                                        ));
                                        let sr = if (kr - exact).norm() <= (kr + exact).norm() {
                                            0
                                        } else {
                                            1
                                        };
                                        let key = (p.rec * ng + i) * 2 + sr;
                                        if rec_index[key] == usize::MAX {
                                            rec_index[key] = rec_momenta.len();
                                            let k = if sr == 0 { exact } else { -exact };
                                            rec_momenta.push((p.rec, i, k));
                                        }
                                        let kv = bdot(&ax, &s.v_ion);
                                        let v_sign = if kv.im >= 0.0 { 1.0 } else { -1.0 };
                                        let e_exit = axis.dot(&s.e_exit);
                                        let e_sign = if e_exit >= 0.0 { 1.0 } else { -1.0 };
                                        let ikey = (p.ion, v_sign, e_sign);
                                        let ion_slot =
                                            match ion_keys.iter().position(|k| *k == ikey) {
                                                Some(j) => j,
                                                None => {
                                                    ion_keys.push(ikey);
                                                    ion_keys.len() - 1
                                                }
                                            };
                                        Some(LinearSaddle {
                                            rec_slot: rec_index[key],
                                            ion_slot,
                                            scalar: ch
                                                .ionization
                                                .linear_scalar(bdot(&ax, &s.e_ion), e_exit.abs()),
                                        })
                                    })
                                    .collect()
                            })
                            .collect()
                    })
                    .collect();
                Some(per_pair)
            }
            _ => None,
        };
        Context {
            field,
            target,
            stage,
            linear,
            rec_momenta,
            ion_keys,
            holes: HoleContext::new(field, target, stage),
        }
    }
}

/// Accumulated sums of one chunk of orientations.
struct Accumulator {
    /// `[pair][family][grid point]`.
    dipoles: Vec<Vec<Vec<CVec3>>>,
    holes: HoleAccumulator,
}

impl Accumulator {
    fn new(ctx: &Context<'_>) -> Self {
        Accumulator {
            dipoles: ctx
                .stage
                .pairs
                .iter()
                .map(|p| vec![vec![CVec3::zeros(); ctx.stage.grid.len()]; p.table.families.len()])
                .collect(),
            holes: HoleAccumulator::new(&ctx.holes),
        }
    }

    fn add(&mut self, other: &Accumulator) {
        for (a, b) in self.dipoles.iter_mut().zip(&other.dipoles) {
            for (fa, fb) in a.iter_mut().zip(b) {
                for (x, y) in fa.iter_mut().zip(fb) {
                    *x += y;
                }
            }
        }
        self.holes.add(&other.holes);
    }
}

/// Hole propagator of one orientation (None when the ion needs no propagation).
fn propagator(ctx: &Context<'_>, o: &Orientation) -> Result<Option<HolePropagator>> {
    match &ctx.stage.samples {
        Some(s) => HolePropagator::new(&ctx.target.ion, &o.rotation, s)
            .map(Some)
            .map_err(|e| Error::Numerical(format!("hole propagator: {e}"))),
        None => Ok(None),
    }
}

/// `[U_I]_mn` at a saddle of `pair`, family `f`, grid point `i`.
fn hole_element(prop: Option<&HolePropagator>, pair: &PairStage, f: usize, i: usize) -> Complex64 {
    match prop {
        None => Complex64::new(if pair.ion == pair.rec { 1.0 } else { 0.0 }, 0.0),
        Some(p) => match pair.times.get(f).and_then(|t| t[i].as_ref()) {
            Some((tr, ti)) => p
                .element_at(pair.rec, pair.ion, tr, ti)
                .unwrap_or(Complex64::new(f64::NAN, f64::NAN)),
            None => Complex64::new(f64::NAN, f64::NAN),
        },
    }
}

/// Structure prefactor of one saddle by direct evaluation (the reference path).
fn structure_direct(
    ctx: &Context<'_>,
    o: &Orientation,
    pair: &PairStage,
    s: &Saddle,
    omega: f64,
) -> CVec3 {
    let r = &o.rotation;
    let rt = r.transpose();
    let rec = &ctx.target.channels[pair.rec].recombination;
    let ion = &ctx.target.channels[pair.ion].ionization;
    let d = rotate(r, &rec.vector(&rotate(&rt, &s.v_ret), omega));
    let a = ion.factor(
        &rotate(&rt, &s.v_ion),
        &rotate(&rt, &s.e_ion),
        &(rt * s.e_exit),
    );
    d * a
}

/// Adds `weight ×` the contributions of orientation `o` to `acc`.
fn add_orientation(
    ctx: &Context<'_>,
    o: &Orientation,
    weight: f64,
    acc: &mut Accumulator,
) -> Result<()> {
    let prop = propagator(ctx, o)?;
    let r = &o.rotation;
    let rt = r.transpose();
    // Per-orientation caches of the linear fast path.
    let (rec_cache, ion_cache): (Vec<CVec3>, Vec<Complex64>) =
        match (&ctx.linear, ctx.stage.linear_axis) {
            (Some(_), Some(axis)) => {
                let axis_mol = rt * axis;
                let ax = axis_mol.map(|x| Complex64::new(x, 0.0));
                let rec = ctx
                    .rec_momenta
                    .iter()
                    .map(|&(m, i, k)| {
                        let model = &ctx.target.channels[m].recombination;
                        rotate(r, &model.vector(&(ax * k), ctx.stage.grid[i]))
                    })
                    .collect();
                let ion = ctx
                    .ion_keys
                    .iter()
                    .map(|&(n, vs, es)| {
                        let ch = &ctx.target.channels[n];
                        ch.ionization
                            .linear_angular(&axis_mol, vs, es, (2.0 * ch.ip).sqrt())
                    })
                    .collect();
                (rec, ion)
            }
            _ => (Vec::new(), Vec::new()),
        };
    for (p, pair) in ctx.stage.pairs.iter().enumerate() {
        for (f, family) in pair.table.families.iter().enumerate() {
            let out = &mut acc.dipoles[p][f];
            for (i, point) in family.points.iter().enumerate() {
                let kernel = pair.kernels.values[f][i];
                let Some(s) = point.saddle() else { continue };
                if kernel.value == Complex64::new(0.0, 0.0) {
                    continue;
                }
                let u = hole_element(prop.as_ref(), pair, f, i);
                let structure = match &ctx.linear {
                    Some(lin) => match lin[p][f][i] {
                        Some(ls) => rec_cache[ls.rec_slot] * (ion_cache[ls.ion_slot] * ls.scalar),
                        None => continue,
                    },
                    None => structure_direct(ctx, o, pair, s, ctx.stage.grid[i]),
                };
                out[i] += structure * (kernel.value * u * weight);
            }
        }
    }
    let ionization = |p: usize, f: usize, i: usize| -> Complex64 {
        let pair = &ctx.stage.pairs[p];
        if let Some(lin) = &ctx.linear {
            return match lin[p][f][i] {
                Some(ls) => ion_cache[ls.ion_slot] * ls.scalar,
                None => Complex64::new(0.0, 0.0),
            };
        }
        match pair.table.families[f].points[i].saddle() {
            Some(s) => ctx.target.channels[pair.ion].ionization.factor(
                &rotate(&rt, &s.v_ion),
                &rotate(&rt, &s.e_ion),
                &(rt * s.e_exit),
            ),
            None => Complex64::new(0.0, 0.0),
        }
    };
    acc.holes
        .add_orientation(&ctx.holes, prop.as_ref(), weight, &ionization);
    Ok(())
}

/// Assembles the orientation-averaged multichannel spectrum (parallel over orientations;
/// `progress` is called with the number of orientations done).
pub fn assemble(
    field: &Field,
    target: &Target,
    stage: &TrajectoryStage,
    linear_fast_path: bool,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<MultichannelSpectrum> {
    let ctx = Context::new(field, target, stage, linear_fast_path);
    let list = orientations(target, field)?;
    let total = list.len();
    let chunk = total.div_ceil(8).max(1);
    let done = AtomicUsize::new(0);
    let partial: Vec<Result<Accumulator>> = list
        .par_chunks(chunk)
        .map(|os| {
            let mut acc = Accumulator::new(&ctx);
            for o in os {
                add_orientation(&ctx, o, o.weight, &mut acc)?;
                progress(done.fetch_add(1, Ordering::Relaxed) + 1, total);
            }
            Ok(acc)
        })
        .collect();
    let mut acc = Accumulator::new(&ctx);
    for p in partial {
        acc.add(&p?);
    }
    finish(&ctx, acc, total)
}

/// The same sum, serially and with every structure factor evaluated per saddle: the plain
/// reference path that [`assemble`] is tested against.
pub fn assemble_serial(
    field: &Field,
    target: &Target,
    stage: &TrajectoryStage,
) -> Result<MultichannelSpectrum> {
    let ctx = Context::new(field, target, stage, false);
    let list = orientations(target, field)?;
    let mut acc = Accumulator::new(&ctx);
    for o in &list {
        add_orientation(&ctx, o, o.weight, &mut acc)?;
    }
    finish(&ctx, acc, list.len())
}

/// Turns the accumulated sums into the spectrum.
fn finish(ctx: &Context<'_>, mut acc: Accumulator, count: usize) -> Result<MultichannelSpectrum> {
    let stage = ctx.stage;
    let field = ctx.field;
    let axis = field.axis();
    let transverse = Vector3::new(axis.z, 0.0, -axis.x);
    // A β-only grid samples α = 0 only: the components across the lab z axis average to zero
    // over α and are removed.
    if matches!(ctx.target.orientations, OrientationGridSpec::Axis(_)) {
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
    let delay = |v: &[CVec3], k: usize| -> Option<f64> {
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
    let mut complete = vec![true; n];
    let mut pairs = Vec::with_capacity(stage.pairs.len());
    for (p, pair) in stage.pairs.iter().enumerate() {
        let mut pair_grid = vec![CVec3::zeros(); stage.grid.len()];
        let mut families = Vec::with_capacity(pair.table.families.len());
        for (f, family) in pair.table.families.iter().enumerate() {
            let values = &acc.dipoles[p][f];
            for (t, d) in pair_grid.iter_mut().zip(values) {
                *t += d;
            }
            for (k, c) in complete.iter_mut().enumerate() {
                if family.points[central(k)].is_failure() {
                    *c = false;
                }
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
                group_delay: (0..n).map(|k| delay(values, k)).collect(),
                emission_time: (0..n)
                    .map(|k| family.points[central(k)].saddle().map(|s| s.t_ret.re))
                    .collect(),
            });
        }
        pairs.push(PairSpectrum {
            ion: pair.ion,
            rec: pair.rec,
            dipole: (0..n).map(|k| pair_grid[central(k)]).collect(),
            group_delay: (0..n).map(|k| delay(&pair_grid, k)).collect(),
            families,
        });
    }
    let holes = acc.holes.finish(&ctx.holes);
    Ok(MultichannelSpectrum {
        omega: field.omega(),
        energies: stage.energies.clone(),
        axis,
        transverse,
        sum: stage.sum,
        labels: ctx
            .target
            .channels
            .iter()
            .map(|c| c.label.clone())
            .collect(),
        total: (0..n).map(|k| total_grid[central(k)]).collect(),
        group_delay: (0..n).map(|k| delay(&total_grid, k)).collect(),
        complete,
        pairs,
        orientations: count,
        holes,
        reference: ctx.holes.reference,
    })
}
