//! One orientation class in the molecular frame: every channel pair's saddle terms (plain, or one
//! per pair of shells with Gaussian structure in the phase), their hole propagators and
//! structure prefactors.

use std::sync::Arc;

use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

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

/// The molecular-frame result of one class (without the orientation weights).
pub(super) struct ClassResult {
    /// `[pair][family][grid point]`.
    pub dipoles: Vec<Vec<Vec<CVec3>>>,
    /// `[pair][family][grid point]`: a saddle with structure in the phase failed there.
    pub failed: Vec<Vec<Vec<bool>>>,
    /// Hole amplitudes `c` at recombination per reference family and requested energy.
    pub holes: Vec<Vec<Option<Vec<Complex64>>>>,
}

/// Which shells of a pair a term belongs to (indices into the sides' shell lists).
#[derive(Clone, Copy, Debug)]
enum Shells {
    /// No structure in the phase: the stage's own table and the models' plain prefactors.
    Plain,
    /// `(ionization shell, recombination shell)`; None for a side in the prefactor.
    Phase(Option<usize>, Option<usize>),
}

/// One sum of saddle contributions of a pair.
struct Term {
    table: Arc<OrbitTable>,
    kernels: Kernels,
    shells: Shells,
}

/// The hole propagators of one class.
struct Holes<'a> {
    real: Option<&'a HolePropagator>,
    complex: Option<ComplexHole<'a>>,
}

impl Holes<'_> {
    /// `[U_I(t_r, t_i)]` for every point of a family (None where no saddle), as a track.
    fn along(&self, plan: &Plan<'_>, table: &OrbitTable, f: usize) -> Result<Option<HoleTrack>> {
        let Some(complex) = &self.complex else {
            return Ok(None);
        };
        let pts = &table.families[f].points;
        let times: Vec<Option<(Complex64, Complex64)>> = pts
            .iter()
            .map(|p| p.saddle().map(|s| (s.t_ret, s.t_ion)))
            .collect();
        let err = |e: crate::hole::HoleError| Error::Numerical(format!("hole propagator: {e}"));
        if plan.direct_holes {
            let n = plan.target.channels.len();
            let mut out = Vec::new();
            for t in &times {
                match t {
                    Some((tr, ti)) => {
                        let m = complex.matrix(*tr, *ti).map_err(err)?;
                        out.push(Some(m));
                    }
                    None => out.push(None),
                }
            }
            return Ok(Some(HoleTrack::from_matrices(n, &out)));
        }
        let mut order: Vec<usize> = (0..times.len()).collect();
        order.sort_by(|&a, &b| table.energies[a].total_cmp(&table.energies[b]));
        complex.track(&times, &order).map(Some).map_err(err)
    }

    /// `[U_I]_mn` at a saddle: from the complex track if there is one, else at the real parts
    /// of the times (the shortcut), else δ_mn (no propagation needed).
    fn element(
        &self,
        track: Option<&HoleTrack>,
        i: usize,
        m: usize,
        n: usize,
        s: &Saddle,
    ) -> Complex64 {
        if let Some(t) = track {
            return t.element(i, m, n);
        }
        match self.real {
            Some(p) => p
                .element(m, n, s.t_ret.re, s.t_ion.re)
                .unwrap_or(Complex64::new(f64::NAN, f64::NAN)),
            None => Complex64::new(if m == n { 1.0 } else { 0.0 }, 0.0),
        }
    }
}

/// The lab-frame Gaussian term of a shell for a class with rotation `r`.
fn lab_term(shell: &GaussianShell, r: &Matrix3<f64>) -> GaussianTerm {
    GaussianTerm {
        quarter: 0.25 / shell.exponent,
        centre: r * shell.centre,
    }
}

/// The terms of pair `pair` for a class with rotation `r`.
fn terms(plan: &Plan<'_>, pair: &PairStage, r: &Matrix3<f64>) -> Result<Vec<Term>> {
    let stage = plan.stage;
    let ion_side = stage.structure[pair.ion].ion.as_ref();
    let rec_side = stage.structure[pair.rec].rec.as_ref();
    if ion_side.is_none() && rec_side.is_none() {
        return Ok(vec![Term {
            table: pair.table.clone(),
            kernels: pair.kernels.clone(),
            shells: Shells::Plain,
        }]);
    }
    let ion_list: Vec<Option<usize>> = match ion_side {
        Some(s) => (0..s.shells.len()).map(Some).collect(),
        None => vec![None],
    };
    let rec_list: Vec<Option<usize>> = match rec_side {
        Some(s) => (0..s.shells.len()).map(Some).collect(),
        None => vec![None],
    };
    let mut out = Vec::with_capacity(ion_list.len() * rec_list.len());
    for &j in &ion_list {
        for &l in &rec_list {
            let structure = PhaseStructure {
                ion: j.and_then(|j| ion_side.map(|s| lab_term(&s.shells[j], r))),
                rec: l.and_then(|l| rec_side.map(|s| lab_term(&s.shells[l], r))),
            };
            let problem = ChannelPair {
                structure,
                ..pair.table.pair
            };
            let table = solve_orbits_seeded(
                plan.field,
                problem,
                &stage.grid,
                &stage.orbit_settings,
                &stage.seeds,
            )?;
            let k = kernels(&table, stage.sum, stage.epsilon);
            out.push(Term {
                table: Arc::new(table),
                kernels: k,
                shells: Shells::Phase(j, l),
            });
        }
    }
    Ok(out)
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
fn phase_prefactor(
    plan: &Plan<'_>,
    rt: &Matrix3<f64>,
    pair: &PairStage,
    s: &Saddle,
    omega: f64,
    ion: Option<(&GaussianSide, usize)>,
    rec: Option<(&GaussianSide, usize)>,
) -> CVec3 {
    let k_i = to_mol(rt, &s.v_ion);
    let k_r = to_mol(rt, &s.v_ret);
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

/// Computes one class with rotation `r`.
pub(super) fn compute_class(plan: &Plan<'_>, r: &Matrix3<f64>) -> Result<ClassResult> {
    let stage = plan.stage;
    let target = plan.target;
    let rt = r.transpose();
    let real = match &stage.samples {
        Some(s) => Some(
            HolePropagator::new(&target.ion, r, s)
                .map_err(|e| Error::Numerical(format!("hole propagator: {e}")))?,
        ),
        None => None,
    };
    let complex = match (&real, stage.contour) {
        (Some(p), HoleContour::Complex) => Some(
            ComplexHole::new(&target.ion, r, plan.field, p)
                .map_err(|e| Error::Numerical(format!("hole propagator: {e}")))?,
        ),
        _ => None,
    };
    let holes = Holes {
        real: real.as_ref(),
        complex,
    };
    // Per-class caches of the linear fast path (molecular frame).
    let (rec_cache, ion_cache): (Vec<CVec3>, Vec<Complex64>) = match &plan.linear {
        Some(lin) => {
            let axis_mol = rt * lin.axis;
            let ax = axis_mol.map(|x| Complex64::new(x, 0.0));
            let rec = lin
                .rec_momenta
                .iter()
                .map(|&(m, i, k)| {
                    target.channels[m]
                        .recombination
                        .vector(&(ax * k), stage.grid[i])
                })
                .collect();
            let ion = lin
                .ion_keys
                .iter()
                .map(|&(n, vs, es)| {
                    let ch = &target.channels[n];
                    ch.ionization
                        .linear_angular(&axis_mol, vs, es, (2.0 * ch.ip).sqrt())
                })
                .collect();
            (rec, ion)
        }
        None => (Vec::new(), Vec::new()),
    };
    let ng = stage.grid.len();
    let mut dipoles = Vec::with_capacity(stage.pairs.len());
    let mut failed = Vec::with_capacity(stage.pairs.len());
    for (p, pair) in stage.pairs.iter().enumerate() {
        let nf = pair.table.families.len();
        let mut dip = vec![vec![CVec3::zeros(); ng]; nf];
        let mut fail = vec![vec![false; ng]; nf];
        for term in terms(plan, pair, r)? {
            for f in 0..nf {
                let family = &term.table.families[f];
                let track = holes.along(plan, &term.table, f)?;
                for (i, point) in family.points.iter().enumerate() {
                    let Some(s) = point.saddle() else {
                        if point.is_failure() && !matches!(term.shells, Shells::Plain) {
                            fail[f][i] = true;
                        }
                        continue;
                    };
                    let kernel = term.kernels.values[f][i];
                    if kernel.kind == KernelKind::Failed || kernel.value == Complex64::new(0.0, 0.0)
                    {
                        continue;
                    }
                    let u = holes.element(track.as_ref(), i, pair.rec, pair.ion, s);
                    let omega = stage.grid[i];
                    let pre = match term.shells {
                        Shells::Plain => match &plan.linear {
                            Some(lin) => match lin.saddles[p][f][i] {
                                Some(ls) => {
                                    rec_cache[ls.rec_slot] * (ion_cache[ls.ion_slot] * ls.scalar)
                                }
                                None => continue,
                            },
                            None => plain_prefactor(plan, &rt, pair, s, omega),
                        },
                        Shells::Phase(j, l) => {
                            let is = stage.structure[pair.ion].ion.as_ref();
                            let rs = stage.structure[pair.rec].rec.as_ref();
                            phase_prefactor(
                                plan,
                                &rt,
                                pair,
                                s,
                                omega,
                                j.and_then(|j| is.map(|x| (x, j))),
                                l.and_then(|l| rs.map(|x| (x, l))),
                            )
                        }
                    };
                    dip[f][i] += pre * (kernel.value * u);
                }
            }
        }
        dipoles.push(dip);
        failed.push(fail);
    }
    // Hole amplitudes decoded by each harmonic of the reference channel.
    let ionization = |p: usize, f: usize, i: usize| -> Complex64 {
        let pair = &stage.pairs[p];
        if let Some(lin) = &plan.linear {
            return match lin.saddles[p][f][i] {
                Some(ls) => ion_cache[ls.ion_slot] * ls.scalar,
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
    let hole_tracks: Vec<Option<HoleTrack>> = match plan.holes.reference_pair() {
        Some(pr) => {
            let table = &stage.pairs[pr].table;
            (0..table.families.len())
                .map(|f| holes.along(plan, table, f))
                .collect::<Result<_>>()?
        }
        None => Vec::new(),
    };
    let hole_amplitudes = plan.holes.amplitudes(&ionization, &|f, i, m, n, s| {
        holes.element(hole_tracks.get(f).and_then(|t| t.as_ref()), i, m, n, s)
    });
    Ok(ClassResult {
        dipoles,
        failed,
        holes: hole_amplitudes,
    })
}
