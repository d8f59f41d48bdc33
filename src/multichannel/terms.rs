//! Orientation classes in the molecular frame: every channel pair's saddle terms (plain, or one
//! per pair of shells with Gaussian structure in the phase), their hole propagators and
//! structure prefactors.
//!
//! Work is shared between classes wherever the physics allows:
//! - **hole propagators** depend on the orientation only through the coupling to the field,
//!   `E(t)·μ_lab`; classes with the same rotated dipole matrices (for a linear field along ê,
//!   the same `Σ_b (Rᵀê)_b μ_b`) share one propagator and its tracks;
//! - **saddles with structure in the phase** depend on the orientation only through the
//!   shells' lab-frame centres, and for a linear field only through `ê·C_i`, `ê·C_r` and
//!   `|C_i − C_r|²` (the transverse part of the shift of the stationary momentum,
//!   `−i(C_i − C_r)_⊥/(iτ + w)`, is added back per class: it moves no saddle); one table per
//!   distinct key;
//! - **prefactors** are evaluated per class.
//!
//! **The hole propagator beyond leading order** ([`super::HoleExpansion::NextOrder`]). Each
//! saddle's `U_I` gets its next-order terms and the cross term of its slope with the structure
//! prefactor's ([`crate::orbits::expansion`]; the prefactor differentiated by forward
//! differences per class). In the zone about a pair's caustic (`|ζ| < 1`) the expansion fails;
//! there each family's contribution is its leading-order value times the ratio
//! next-order/leading-order bridged linearly in Ω from the nearest points outside the zone on
//! either side ([`bridge`]). The bridge is a measured choice, not an asymptotic result: near the
//! cutoffs of six coupled cases it brings the spectrum from up to 0.35 decade off the exact
//! quadrature (terms switched off in the zone) to within 0.13 decade (documented at
//! [`crate::orbits::expansion::CAUSTIC_ZONE`]).

use std::sync::Arc;

use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

use rayon::prelude::*;

use super::HoleExpansion;
use super::holes::HoleContext;
use super::stage::{PairStage, TrajectoryStage};
use crate::dipole::{KernelKind, Kernels, kernels};
use crate::error::{Error, Result};
use crate::field::{CVec3, Field, bdot};
use crate::hole::{ComplexHole, HoleContour, HolePropagator, HoleTrack};
use crate::momentum::{
    GaussianShell, GaussianSide, ion_shell_prefactor, rec_shell_prefactor, rotate,
    shell_pair_prefactor,
};
use crate::orbits::expansion::{
    Neighbour, STEP, SaddleExpansion, near_caustic, spreading_log_gradient,
};
use crate::orbits::{
    ChannelPair, GaussianTerm, OrbitTable, PhaseStructure, Saddle, solve_orbits_seeded,
};
use crate::target::Target;

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

/// The factorised evaluation of the plain structure prefactors in a linearly polarised field
/// (one evaluation per channel, energy and sign instead of per saddle): in such a field
/// `v_r = k ê`, `v_i = ±iκ ê` and `E(Re t_i) = ±F ê`, so every model factorises into an
/// orientation-dependent part evaluated once per class and a scalar per saddle
/// ([`crate::ionization::IonizationModel::linear_angular`]).
struct LinearPlan {
    axis: Vector3<f64>,
    /// Per pair, family and grid point.
    saddles: Vec<Vec<Vec<Option<LinearSaddle>>>>,
    /// Exact return momenta `k` (scalar along ê) per recombination slot, with channel and point.
    rec_momenta: Vec<(usize, usize, Complex64)>,
    /// `(channel, v sign, E sign)` per ionization slot.
    ion_keys: Vec<(usize, f64, f64)>,
}

impl LinearPlan {
    fn new(target: &Target, stage: &TrajectoryStage, axis: Vector3<f64>) -> Self {
        let mut rec_momenta = Vec::new();
        let mut ion_keys: Vec<(usize, f64, f64)> = Vec::new();
        let nch = target.channels.len();
        let ng = stage.grid.len();
        // Slot of (channel, grid point, sign): 2 per (channel, point).
        let mut rec_index = vec![usize::MAX; nch * ng * 2];
        let ax = axis.map(|x| Complex64::new(x, 0.0));
        let saddles = stage
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
                                let sr = usize::from((kr - exact).norm() > (kr + exact).norm());
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
                                let ion_slot = match ion_keys.iter().position(|k| *k == ikey) {
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
        LinearPlan {
            axis,
            saddles,
            rec_momenta,
            ion_keys,
        }
    }
}

/// Everything a class computation reads that does not depend on the orientation.
pub(super) struct Plan<'a> {
    pub field: &'a Field,
    pub target: &'a Target,
    pub stage: &'a TrajectoryStage,
    linear: Option<LinearPlan>,
    pub holes: HoleContext,
    /// Evaluate the complex-time hole propagator of every saddle directly from the real axis
    /// (the plain reference path) instead of continuing it along each family.
    direct_holes: bool,
}

impl<'a> Plan<'a> {
    /// `fast`: use the linear-field factorisation where it applies; `direct_holes`: see the field.
    pub fn new(
        field: &'a Field,
        target: &'a Target,
        stage: &'a TrajectoryStage,
        fast: bool,
        direct_holes: bool,
    ) -> Self {
        let linear = match (fast, stage.linear_axis) {
            (true, Some(axis)) => Some(LinearPlan::new(target, stage, axis)),
            _ => None,
        };
        Plan {
            field,
            target,
            stage,
            linear,
            holes: HoleContext::new(field, target, stage),
            direct_holes,
        }
    }
}

/// The molecular-frame result of a chunk of classes (without the orientation weights).
pub(super) struct ChunkResult {
    /// `[class][pair][family][grid point]`.
    pub dipoles: Vec<Vec<Vec<Vec<CVec3>>>>,
    /// `[class][pair][family][grid point]`: a saddle with structure in the phase failed there.
    pub failed: Vec<Vec<Vec<Vec<bool>>>>,
    /// `[class]`: hole amplitudes `c` at recombination per reference family and energy.
    pub holes: Vec<Vec<Vec<Option<Vec<Complex64>>>>>,
}

/// Which shells of a pair a term belongs to (indices into the sides' shell lists).
#[derive(Clone, Copy, Debug)]
enum Shells {
    /// No structure in the phase: the stage's own table and the models' plain prefactors.
    Plain,
    /// `(ionization shell, recombination shell)`; None for a side in the prefactor.
    Phase(Option<usize>, Option<usize>),
}

/// The hole propagators of one hole class.
struct HoleClass<'a> {
    real: &'a HolePropagator,
    complex: Option<ComplexHole<'a>>,
}

/// Bits of the field coupling of an orientation: the rotated dipoles that enter `E·μ_lab`
/// (for a linear field only `Σ_b (Rᵀê)_b μ_b`).
fn hole_key(target: &Target, r: &Matrix3<f64>, linear: Option<Vector3<f64>>) -> Vec<u64> {
    let mu = target.ion.dipole();
    let n = target.channels.len();
    let mut key = Vec::new();
    let mut push = |w: [f64; 3]| {
        for i in 0..n {
            for j in 0..n {
                let v = mu[0][(i, j)] * w[0] + mu[1][(i, j)] * w[1] + mu[2][(i, j)] * w[2];
                key.push((v.re + 0.0).to_bits());
                key.push((v.im + 0.0).to_bits());
            }
        }
    };
    match linear {
        Some(axis) => {
            let e = r.transpose() * axis;
            push([e.x, e.y, e.z]);
        }
        None => {
            for a in 0..3 {
                push([r[(a, 0)], r[(a, 1)], r[(a, 2)]]);
            }
        }
    }
    key
}

/// The lab-frame Gaussian term of a shell for a class with rotation `r`.
fn lab_term(shell: &GaussianShell, r: &Matrix3<f64>) -> GaussianTerm {
    GaussianTerm {
        quarter: 0.25 / shell.exponent,
        centre: r * shell.centre,
    }
}

/// The bits that decide the saddles of a structure problem (module documentation).
fn structure_key(s: &PhaseStructure, linear: Option<Vector3<f64>>) -> Vec<u64> {
    let zero = Vector3::zeros();
    let (qi, ci) = s.ion.map_or((0.0, zero), |g| (g.quarter, g.centre));
    let (qr, cr) = s.rec.map_or((0.0, zero), |g| (g.quarter, g.centre));
    let mut key = vec![qi.to_bits(), qr.to_bits()];
    match linear {
        Some(axis) => {
            key.push((axis.dot(&ci) + 0.0).to_bits());
            key.push((axis.dot(&cr) + 0.0).to_bits());
            key.push(((ci - cr).norm_squared() + 0.0).to_bits());
        }
        None => key.extend(ci.iter().chain(cr.iter()).map(|x| (x + 0.0).to_bits())),
    }
    key
}

/// `ΔC = C_i − C_r` (lab frame) of a structure problem.
fn centre_difference(s: &PhaseStructure) -> Vector3<f64> {
    let zero = Vector3::zeros();
    s.ion.map_or(zero, |g| g.centre) - s.rec.map_or(zero, |g| g.centre)
}

/// Rotates a complex lab vector to the molecular frame, `Rᵀ v`.
#[inline]
fn to_mol(rt: &Matrix3<f64>, v: &CVec3) -> CVec3 {
    rotate(rt, v)
}

/// The plain structure prefactor of one saddle in the molecular frame (direct evaluation).
fn plain_prefactor(
    plan: &Plan<'_>,
    rt: &Matrix3<f64>,
    pair: &PairStage,
    s: &Saddle,
    omega: f64,
) -> CVec3 {
    let rec = &plan.target.channels[pair.rec].recombination;
    let ion = &plan.target.channels[pair.ion].ionization;
    let d = rec.vector(&to_mol(rt, &s.v_ret), omega);
    let a = ion.factor(
        &to_mol(rt, &s.v_ion),
        &to_mol(rt, &s.e_ion),
        &(rt * s.e_exit),
    );
    d * a
}

/// The prefactor of a saddle whose Gaussian structure is (partly) in the phase, molecular frame.
/// `shift` is the difference `−i(ΔC_class − ΔC_solved)/(iτ + w)` between the stationary
/// momentum of this class and that of the class the table was solved for (lab frame).
#[allow(clippy::too_many_arguments)]
fn phase_prefactor(
    plan: &Plan<'_>,
    rt: &Matrix3<f64>,
    pair: &PairStage,
    s: &Saddle,
    shift: &CVec3,
    omega: f64,
    ion: Option<(&GaussianSide, usize)>,
    rec: Option<(&GaussianSide, usize)>,
) -> CVec3 {
    let k_i = to_mol(rt, &(s.v_ion + shift));
    let k_r = to_mol(rt, &(s.v_ret + shift));
    let e_i = to_mol(rt, &s.e_ion);
    // σ² = 1/(iτ + w): the variance of the momentum about its stationary value (ε → 0).
    let sigma2 = 1.0 / (Complex64::i() * s.tau + s.width);
    match (ion, rec) {
        (Some((is, j)), Some((rs, l))) => shell_pair_prefactor(
            &is.shells[j],
            &rs.shells[l],
            rs.form,
            &k_i,
            &k_r,
            &e_i,
            sigma2,
        ),
        (Some((is, j)), None) => {
            let model = &plan.target.channels[pair.rec].recombination;
            model.vector(&k_r, omega) * ion_shell_prefactor(&is.shells[j], &k_i, &e_i, sigma2)
        }
        (None, Some((rs, l))) => {
            let model = &plan.target.channels[pair.ion].ionization;
            let a = model.factor(&k_i, &e_i, &(rt * s.e_exit));
            rec_shell_prefactor(&rs.shells[l], rs.form, &k_r, sigma2) * a
        }
        (None, None) => plain_prefactor(plan, rt, pair, s, omega),
    }
}

/// Per-class caches of the linear fast path (molecular frame).
struct LinearCaches {
    rec: Vec<CVec3>,
    ion: Vec<Complex64>,
}

fn linear_caches(plan: &Plan<'_>, rt: &Matrix3<f64>) -> Option<LinearCaches> {
    let lin = plan.linear.as_ref()?;
    let stage = plan.stage;
    let target = plan.target;
    let axis_mol = rt * lin.axis;
    let ax = axis_mol.map(|x| Complex64::new(x, 0.0));
    Some(LinearCaches {
        rec: lin
            .rec_momenta
            .iter()
            .map(|&(m, i, k)| {
                target.channels[m]
                    .recombination
                    .vector(&(ax * k), stage.grid[i])
            })
            .collect(),
        ion: lin
            .ion_keys
            .iter()
            .map(|&(n, vs, es)| {
                let ch = &target.channels[n];
                ch.ionization
                    .linear_angular(&axis_mol, vs, es, (2.0 * ch.ip).sqrt())
            })
            .collect(),
    })
}

/// `[U_I(t_r, t_i)]` along every family of a table for one hole class (None where no saddle):
/// a track per family (complex contour), or None when the real-time shortcut or no
/// propagation applies.
fn tracks(
    plan: &Plan<'_>,
    hole: Option<&HoleClass<'_>>,
    table: &OrbitTable,
) -> Result<Vec<Option<HoleTrack>>> {
    let Some(complex) = hole.and_then(|h| h.complex.as_ref()) else {
        return Ok(vec![None; table.families.len()]);
    };
    let err = |e: crate::hole::HoleError| Error::Numerical(format!("hole propagator: {e}"));
    let n = plan.target.channels.len();
    let mut order: Vec<usize> = (0..table.energies.len()).collect();
    order.sort_by(|&a, &b| table.energies[a].total_cmp(&table.energies[b]));
    table
        .families
        .iter()
        .map(|family| {
            let times: Vec<Option<(Complex64, Complex64)>> = family
                .points
                .iter()
                .map(|p| p.saddle().map(|s| (s.t_ret, s.t_ion)))
                .collect();
            if plan.direct_holes {
                let mut out = Vec::with_capacity(times.len());
                for t in &times {
                    out.push(match t {
                        Some((tr, ti)) => Some(complex.matrix(*tr, *ti).map_err(err)?),
                        None => None,
                    });
                }
                Ok(Some(HoleTrack::from_matrices(n, &out)))
            } else {
                complex.track(&times, &order).map(Some).map_err(err)
            }
        })
        .collect()
}

/// `[U_I]_mn` at a saddle: from the complex track if there is one, else at the real parts of the
/// times (the shortcut), else δ_mn (no propagation needed).
fn hole_element(
    hole: Option<&HoleClass<'_>>,
    track: Option<&HoleTrack>,
    i: usize,
    m: usize,
    n: usize,
    s: &Saddle,
) -> Complex64 {
    if let Some(t) = track {
        return t.element(i, m, n);
    }
    match hole {
        Some(h) => h
            .real
            .element(m, n, s.t_ret.re, s.t_ion.re)
            .unwrap_or(Complex64::new(f64::NAN, f64::NAN)),
        None => Complex64::new(if m == n { 1.0 } else { 0.0 }, 0.0),
    }
}

/// The next-order expansion of one saddle and its neighbours.
struct Local {
    expansion: SaddleExpansion,
    neighbours: [Neighbour; 2],
}

/// What the next order does at one point of a family.
enum Expansion {
    /// No saddle is summed there.
    Absent,
    /// The saddle is near its pair's caustic: its next-order factor is bridged from the points
    /// outside the zone ([`bridge`]).
    Bridged,
    /// The expansion applies.
    Local(Box<Local>),
}

impl Expansion {
    fn local(&self) -> Option<&Local> {
        match self {
            Expansion::Local(l) => Some(l),
            _ => None,
        }
    }
}

/// The next-order expansion of every summed saddle of a table (`[family][grid point]`).
fn expansions(plan: &Plan<'_>, table: &OrbitTable, kern: &Kernels) -> Vec<Vec<Expansion>> {
    table
        .families
        .iter()
        .enumerate()
        .map(|(f, family)| {
            family
                .points
                .iter()
                .enumerate()
                .map(|(i, point)| {
                    let Some(s) = point.saddle() else {
                        return Expansion::Absent;
                    };
                    let kernel = kern.values[f][i];
                    if kernel.kind == KernelKind::Failed || kernel.value == Complex64::new(0.0, 0.0)
                    {
                        return Expansion::Absent;
                    }
                    // A partner without an Airy variable here: no way to tell the distance to
                    // the caustic, so bridged.
                    let near = match family.pair {
                        None => false,
                        Some(q) => table.pairs[q].points[i].is_none_or(|pp| near_caustic(pp.zeta)),
                    };
                    if near {
                        return Expansion::Bridged;
                    }
                    let (expansion, neighbours) = SaddleExpansion::with_neighbours(
                        plan.field,
                        table.pair,
                        table.energies[i],
                        s.t_ret,
                        s.t_ion,
                    );
                    Expansion::Local(Box::new(Local {
                        expansion,
                        neighbours,
                    }))
                })
                .collect()
        })
        .collect()
}

/// `[U_I]_mn` of one saddle with its next-order terms, and `Σ_a A_ab ∂_a U_mn`, the weight of
/// the derivatives of the rest of the prefactor in the cross term.
#[derive(Clone, Copy, Debug)]
struct ExpandedHole {
    value: Complex64,
    slope: [Complex64; 2],
}

/// The next-order contributions of one family near its caustic, `[U_I]` there at leading order
/// times a factor bridged from outside the zone: `r = ⟨D₀, D₁⟩/⟨D₀, D₀⟩` (the next-order
/// contribution `D₁` over the leading-order `D₀`, as a complex scalar) at the nearest points
/// outside on either side in Ω, interpolated linearly in Ω (held constant from one side, 1
/// with none). `points[i] = (D₀, Some(D₁) outside the zone | None inside)`; `energies` of the
/// points; returns the contributions to add.
fn bridge(energies: &[f64], points: &[Option<(CVec3, Option<CVec3>)>]) -> Vec<CVec3> {
    let mut order: Vec<usize> = (0..points.len()).filter(|&i| points[i].is_some()).collect();
    order.sort_by(|&a, &b| energies[a].total_cmp(&energies[b]));
    let ratio = |i: usize| -> Option<Complex64> {
        let (lead, next) = points[i]?;
        let next = next?;
        let norm: f64 = lead.iter().map(|z| z.norm_sqr()).sum();
        let r = lead
            .iter()
            .zip(next.iter())
            .map(|(a, b)| a.conj() * b)
            .sum::<Complex64>()
            / norm;
        (norm > 0.0 && r.is_finite()).then_some(r)
    };
    let mut out = vec![CVec3::zeros(); points.len()];
    for (pos, &i) in order.iter().enumerate() {
        let Some((lead, next)) = points[i] else {
            continue;
        };
        if let Some(next) = next {
            out[i] = next;
            continue;
        }
        let below = order[..pos]
            .iter()
            .rev()
            .find_map(|&j| ratio(j).map(|r| (j, r)));
        let above = order[pos + 1..]
            .iter()
            .find_map(|&j| ratio(j).map(|r| (j, r)));
        let r = match (below, above) {
            (Some((a, ra)), Some((b, rb))) => {
                let x = (energies[i] - energies[a]) / (energies[b] - energies[a]);
                ra + (rb - ra) * x
            }
            (Some((_, r)), None) | (None, Some((_, r))) => r,
            (None, None) => Complex64::new(1.0, 0.0),
        };
        out[i] = lead * r;
    }
    out
}

/// `[U_I]_mn` of every saddle of a table with its next-order terms
/// ([`crate::orbits::expansion`]), from the complex-time tracks (`[family][grid point]`; None
/// where the leading order stands).
#[allow(clippy::too_many_arguments)]
fn expanded_holes(
    complex: &ComplexHole<'_>,
    tracks: &[Option<HoleTrack>],
    table: &OrbitTable,
    expansions: &[Vec<Expansion>],
    epsilon: f64,
    m: usize,
    n: usize,
) -> Vec<Vec<Option<ExpandedHole>>> {
    table
        .families
        .iter()
        .enumerate()
        .map(|(f, family)| {
            family
                .points
                .iter()
                .enumerate()
                .map(|(i, point)| {
                    let s = point.saddle()?;
                    let e = &expansions[f][i].local()?.expansion;
                    let track = tracks[f].as_ref()?;
                    let d = complex.derivatives(track, i, m, n, s.t_ret, s.t_ion);
                    let companion = spreading_log_gradient(s.tau, s.width, epsilon);
                    let extra = e.prefactor_terms(&d.first, &d.second, &companion);
                    let a = &e.covariance;
                    let slope = [
                        a[0][0] * d.first[0] + a[1][0] * d.first[1],
                        a[0][1] * d.first[0] + a[1][1] * d.first[1],
                    ];
                    Some(ExpandedHole {
                        value: d.value + extra,
                        slope,
                    })
                })
                .collect()
        })
        .collect()
}

/// One channel pair for every class of a chunk: `([class][family][grid], failed flags)`.
#[allow(clippy::type_complexity)]
fn pair_chunk(
    plan: &Plan<'_>,
    p: usize,
    rotations: &[Matrix3<f64>],
    hole_of: &[Option<usize>],
    holes: &[HoleClass<'_>],
    caches: &[Option<LinearCaches>],
) -> Result<(Vec<Vec<Vec<CVec3>>>, Vec<Vec<Vec<bool>>>)> {
    let stage = plan.stage;
    let pair = &stage.pairs[p];
    let nf = pair.table.families.len();
    let ng = stage.grid.len();
    let nc = rotations.len();
    let mut dip = vec![vec![vec![CVec3::zeros(); ng]; nf]; nc];
    let mut fail = vec![vec![vec![false; ng]; nf]; nc];
    let ion_side = stage.structure[pair.ion].ion.as_ref();
    let rec_side = stage.recombination_side(pair.ion, pair.rec);
    let shells: Vec<Shells> = if ion_side.is_none() && rec_side.is_none() {
        vec![Shells::Plain]
    } else {
        let ion_list: Vec<Option<usize>> = match ion_side {
            Some(s) => (0..s.shells.len()).map(Some).collect(),
            None => vec![None],
        };
        let rec_list: Vec<Option<usize>> = match rec_side {
            Some(s) => (0..s.shells.len()).map(Some).collect(),
            None => vec![None],
        };
        ion_list
            .iter()
            .flat_map(|&j| rec_list.iter().map(move |&l| Shells::Phase(j, l)))
            .collect()
    };
    for term in shells {
        // The structure problem of every class, grouped by its key (first appearance order).
        let problems: Vec<PhaseStructure> = rotations
            .iter()
            .map(|r| match term {
                Shells::Plain => PhaseStructure::default(),
                Shells::Phase(j, l) => PhaseStructure {
                    ion: j.and_then(|j| ion_side.map(|s| lab_term(&s.shells[j], r))),
                    rec: l.and_then(|l| rec_side.map(|s| lab_term(&s.shells[l], r))),
                },
            })
            .collect();
        let mut groups: Vec<(Vec<u64>, Vec<usize>)> = Vec::new();
        for (c, prob) in problems.iter().enumerate() {
            let key = structure_key(prob, stage.linear_axis);
            match groups.iter_mut().find(|g| g.0 == key) {
                Some(g) => g.1.push(c),
                None => groups.push((key, vec![c])),
            }
        }
        for (_, members) in groups {
            let solved = &problems[members[0]];
            let (table, kern): (Arc<OrbitTable>, Kernels) = match term {
                Shells::Plain => (pair.table.clone(), pair.kernels.clone()),
                Shells::Phase(..) => {
                    let problem = ChannelPair {
                        structure: *solved,
                        ..pair.table.pair
                    };
                    let t = solve_orbits_seeded(
                        plan.field,
                        problem,
                        &stage.grid,
                        &stage.orbit_settings,
                        &stage.seeds,
                    )?;
                    let k = kernels(&t, stage.sum, stage.epsilon);
                    (Arc::new(t), k)
                }
            };
            let solved_dc = centre_difference(solved);
            let next_order = stage.hole_expansion == HoleExpansion::NextOrder;
            let mut table_expansions: Option<Vec<Vec<Expansion>>> = None;
            // Hole classes among the members, in order of first appearance.
            let mut hole_groups: Vec<(Option<usize>, Vec<usize>)> = Vec::new();
            for &c in &members {
                match hole_groups.iter_mut().find(|g| g.0 == hole_of[c]) {
                    Some(g) => g.1.push(c),
                    None => hole_groups.push((hole_of[c], vec![c])),
                }
            }
            for (h, classes) in hole_groups {
                let hole = h.map(|h| &holes[h]);
                let family_tracks = tracks(plan, hole, &table)?;
                let expanded = match hole.and_then(|h| h.complex.as_ref()) {
                    Some(complex) if next_order => {
                        let e =
                            table_expansions.get_or_insert_with(|| expansions(plan, &table, &kern));
                        Some(expanded_holes(
                            complex,
                            &family_tracks,
                            &table,
                            e,
                            stage.epsilon,
                            pair.rec,
                            pair.ion,
                        ))
                    }
                    _ => None,
                };
                for &c in &classes {
                    let r = &rotations[c];
                    let rt = r.transpose();
                    let dc = centre_difference(&problems[c]) - solved_dc;
                    let dc = dc.map(|x| Complex64::new(x, 0.0));
                    for f in 0..nf {
                        let family = &table.families[f];
                        let track = family_tracks[f].as_ref();
                        // With the next order: (leading, next order outside the zone) per point.
                        let mut bridged: Vec<Option<(CVec3, Option<CVec3>)>> =
                            vec![None; if expanded.is_some() { ng } else { 0 }];
                        for (i, point) in family.points.iter().enumerate() {
                            let Some(s) = point.saddle() else {
                                if point.is_failure() && !matches!(term, Shells::Plain) {
                                    fail[c][f][i] = true;
                                }
                                continue;
                            };
                            let kernel = kern.values[f][i];
                            if kernel.kind == KernelKind::Failed
                                || kernel.value == Complex64::new(0.0, 0.0)
                            {
                                continue;
                            }
                            let xh = expanded.as_ref().and_then(|x| x[f][i]);
                            let u = hole_element(hole, track, i, pair.rec, pair.ion, s);
                            let omega = stage.grid[i];
                            // The structure prefactor of this class at saddle `q` (the
                            // factorised linear path only at the saddle itself).
                            let prefactor = |q: &Saddle, at_saddle: bool| -> Option<CVec3> {
                                Some(match term {
                                    Shells::Plain => match (&plan.linear, &caches[c]) {
                                        (Some(lin), Some(cache)) if at_saddle => {
                                            let ls = lin.saddles[p][f][i]?;
                                            cache.rec[ls.rec_slot]
                                                * (cache.ion[ls.ion_slot] * ls.scalar)
                                        }
                                        _ => plain_prefactor(plan, &rt, pair, q, omega),
                                    },
                                    Shells::Phase(j, l) => {
                                        // μ_class − μ_solved = −i(ΔC_class − ΔC_solved)/(iτ + w).
                                        let shift = dc
                                            * (Complex64::new(0.0, -1.0)
                                                / (Complex64::i() * q.tau + q.width));
                                        phase_prefactor(
                                            plan,
                                            &rt,
                                            pair,
                                            q,
                                            &shift,
                                            omega,
                                            j.and_then(|j| ion_side.map(|x| (x, j))),
                                            l.and_then(|l| rec_side.map(|x| (x, l))),
                                        )
                                    }
                                })
                            };
                            let Some(pre) = prefactor(s, true) else {
                                continue;
                            };
                            let lead = pre * (u * kernel.value);
                            if expanded.is_none() {
                                dip[c][f][i] += lead;
                                continue;
                            }
                            // The next order: U_I's own terms, and the cross term of its slope
                            // with the structure's, Σ_ab A_ab ∂_a U ∂_b P (∂_b P by forward
                            // differences).
                            let local = table_expansions.as_ref().and_then(|e| e[f][i].local());
                            let next = match (xh, local) {
                                (Some(xh), Some(local)) => {
                                    // P at the saddle by the same function as at the neighbours
                                    // (the factorised linear path uses the exact return momentum).
                                    let base = match term {
                                        Shells::Plain if caches[c].is_some() => prefactor(s, false),
                                        _ => Some(pre),
                                    };
                                    let at =
                                        |k: usize| prefactor(&local.neighbours[k].saddle(s), false);
                                    let mut v = pre * xh.value;
                                    if let (Some(p0), Some(pr), Some(pi)) = (base, at(0), at(1)) {
                                        let d = Complex64::new(1.0 / STEP, 0.0);
                                        v +=
                                            ((pr - p0) * xh.slope[0] + (pi - p0) * xh.slope[1]) * d;
                                    }
                                    Some(v * kernel.value)
                                }
                                _ => None,
                            };
                            bridged[i] = Some((lead, next));
                        }
                        if expanded.is_some() {
                            for (d, b) in dip[c][f].iter_mut().zip(bridge(&stage.grid, &bridged)) {
                                *d += b;
                            }
                        }
                    }
                }
            }
        }
    }
    Ok((dip, fail))
}

/// Computes a chunk of classes (rotations `rotations`) in the molecular frame.
pub(super) fn compute_chunk(plan: &Plan<'_>, rotations: &[Matrix3<f64>]) -> Result<ChunkResult> {
    let stage = plan.stage;
    let target = plan.target;
    let nc = rotations.len();
    // Hole classes: one propagator per distinct field coupling.
    let mut hole_of: Vec<Option<usize>> = vec![None; nc];
    let mut hole_rotations: Vec<Matrix3<f64>> = Vec::new();
    if stage.samples.is_some() {
        let mut keys: Vec<Vec<u64>> = Vec::new();
        for (c, r) in rotations.iter().enumerate() {
            let key = hole_key(target, r, stage.linear_axis);
            let h = match keys.iter().position(|k| *k == key) {
                Some(h) => h,
                None => {
                    keys.push(key);
                    hole_rotations.push(*r);
                    keys.len() - 1
                }
            };
            hole_of[c] = Some(h);
        }
    }
    let reals: Vec<HolePropagator> = match &stage.samples {
        Some(samples) => hole_rotations
            .par_iter()
            .map(|r| {
                HolePropagator::new(&target.ion, r, samples)
                    .map_err(|e| Error::Numerical(format!("hole propagator: {e}")))
            })
            .collect::<Result<_>>()?,
        None => Vec::new(),
    };
    let holes: Vec<HoleClass<'_>> = reals
        .iter()
        .zip(&hole_rotations)
        .map(|(real, r)| {
            let complex = match stage.contour {
                HoleContour::Complex => Some(
                    ComplexHole::new(&target.ion, r, plan.field, real)
                        .map_err(|e| Error::Numerical(format!("hole propagator: {e}")))?,
                ),
                HoleContour::Real => None,
            };
            Ok(HoleClass { real, complex })
        })
        .collect::<Result<_>>()?;
    let caches: Vec<Option<LinearCaches>> = rotations
        .iter()
        .map(|r| linear_caches(plan, &r.transpose()))
        .collect();
    let per_pair: Vec<Result<_>> = (0..stage.pairs.len())
        .into_par_iter()
        .map(|p| pair_chunk(plan, p, rotations, &hole_of, &holes, &caches))
        .collect();
    let mut dipoles = vec![Vec::with_capacity(stage.pairs.len()); nc];
    let mut failed = vec![Vec::with_capacity(stage.pairs.len()); nc];
    for r in per_pair {
        let (d, f) = r?;
        for (c, (dc, fc)) in d.into_iter().zip(f).enumerate() {
            dipoles[c].push(dc);
            failed[c].push(fc);
        }
    }
    // Hole amplitudes decoded by each harmonic of the reference channel: the full propagator
    // along the reference families, once per hole class.
    let reference_tracks: Vec<Vec<Option<HoleTrack>>> = match plan.holes.reference_pair() {
        Some(pr) => holes
            .iter()
            .map(|h| tracks(plan, Some(h), &stage.pairs[pr].table))
            .collect::<Result<_>>()?,
        None => Vec::new(),
    };
    let hole_amplitudes = (0..nc)
        .map(|c| {
            let rt = rotations[c].transpose();
            let hole = hole_of[c].map(|h| &holes[h]);
            let ref_tracks = hole_of[c].and_then(|h| reference_tracks.get(h));
            let ionization = |p: usize, f: usize, i: usize| -> Complex64 {
                let pair = &stage.pairs[p];
                if let (Some(lin), Some(cache)) = (&plan.linear, &caches[c]) {
                    return match lin.saddles[p][f][i] {
                        Some(ls) => cache.ion[ls.ion_slot] * ls.scalar,
                        None => Complex64::new(0.0, 0.0),
                    };
                }
                match pair.table.families[f].points[i].saddle() {
                    Some(s) => target.channels[pair.ion].ionization.factor(
                        &to_mol(&rt, &s.v_ion),
                        &to_mol(&rt, &s.e_ion),
                        &(rt * s.e_exit),
                    ),
                    None => Complex64::new(0.0, 0.0),
                }
            };
            plan.holes.amplitudes(&ionization, &|f, i, m, n, s| {
                let track = ref_tracks.and_then(|t| t.get(f)).and_then(|t| t.as_ref());
                hole_element(hole, track, i, m, n, s)
            })
        })
        .collect();
    Ok(ChunkResult {
        dipoles,
        failed,
        holes: hole_amplitudes,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn along_x(z: Complex64) -> CVec3 {
        CVec3::new(z, Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0))
    }

    #[test]
    fn bridge_interpolates_the_ratio_linearly_and_keeps_points_outside() {
        // Ratio r(Ω) = 1 + (0.2 − 0.1i)Ω outside the zone (points 0, 1, 4, 5; unsorted energies),
        // leading-order value 2 + i everywhere: inside (points 2, 3) the bridge must give exactly
        // the linear ratio times the leading value (common practice: linear interpolation).
        let energies = [1.0, 2.0, 3.0, 3.5, 5.0, 4.0];
        let r = |w: f64| Complex64::new(1.0 + 0.2 * w, -0.1 * w);
        let lead = Complex64::new(2.0, 1.0);
        let points: Vec<Option<(CVec3, Option<CVec3>)>> = energies
            .iter()
            .enumerate()
            .map(|(i, &w)| {
                let next = (i != 2 && i != 3).then(|| along_x(lead * r(w)));
                Some((along_x(lead), next))
            })
            .collect();
        let out = bridge(&energies, &points);
        for (i, &w) in energies.iter().enumerate() {
            assert!(
                (out[i].x - lead * r(w)).norm() < 1e-14,
                "point {i}: {}",
                out[i].x
            );
        }
    }

    #[test]
    fn bridge_holds_the_ratio_from_one_side_and_is_one_without_any() {
        let energies = [1.0, 2.0, 3.0];
        let lead = along_x(Complex64::new(1.0, 0.0));
        let one_side = [
            Some((lead, Some(lead * Complex64::new(0.5, 0.5)))),
            Some((lead, None)),
            None,
        ];
        let out = bridge(&energies, &one_side);
        assert_eq!(out[1].x, Complex64::new(0.5, 0.5));
        assert_eq!(out[2].x, Complex64::new(0.0, 0.0));
        let none = [Some((lead, None)), None, Some((lead, None))];
        let out = bridge(&energies, &none);
        assert_eq!(out[0].x, Complex64::new(1.0, 0.0));
        assert_eq!(out[2].x, Complex64::new(1.0, 0.0));
    }
}
