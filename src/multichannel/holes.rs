//! The hole density matrix decoded by each harmonic.
//!
//! For harmonic Ω and family f of the reference channel r (the lowest Ip), the returning
//! electron left at `t₀ = Re t_i` and comes back at `t₁ = Re t_r` of that family's saddle (the
//! delay `τ = Re(t_r − t_i)` is the clock that maps the harmonic to a time after ionization).
//! The hole is created with the amplitudes
//!
//! ```text
//! a_n = a_n^ion · e^{−iW_n},
//! ```
//!
//! the ionization factor of channel n at its own saddle (same family, same energy) times its
//! sub-barrier exponential `W_n` (physics notes §3.5), and is propagated to recombination,
//! `c = U_I(t₁, t₀) a`. The density matrix is `ρ = c c† / tr(c c†)` (DESIGN §4.8); over
//! orientations the unnormalised `w_R c c†` are added (an incoherent ensemble of holes weighted by
//! the ionization yield) and normalised at the end. Coherences are in the interaction picture
//! (without the fast Bohr phases `e^{−i(Ip_m − Ip_n)t}`).

use nalgebra::DMatrix;
use num_complex::Complex64;

use super::assemble::{HoleDensity, HoleSample};
use super::stage::TrajectoryStage;
use crate::field::Field;
use crate::hole::{GridTime, HolePropagator};
use crate::orbits::subbarrier::sub_barrier_action;
use crate::target::Target;

/// Where to find the data of one (reference family, energy) point.
#[derive(Clone, Debug)]
struct HolePoint {
    /// `(Re t_i, Re t_r)` of the reference saddle.
    times: (f64, f64),
    /// Located times `(t_r, t_i)` on the propagation grid.
    located: Option<(GridTime, GridTime)>,
    /// Per channel: `(pair index, family index, grid index, e^{−iW_n})`, None if missing.
    channels: Vec<Option<(usize, usize, usize, Complex64)>>,
}

/// Orientation-independent data of the hole output.
pub(super) struct HoleContext {
    /// Index of the reference channel.
    pub reference: usize,
    /// Per reference family: label, half cycle and per requested energy the point data.
    families: Vec<(crate::orbits::FamilyLabel, i32, Vec<Option<HolePoint>>)>,
    channels: usize,
}

impl HoleContext {
    pub fn new(field: &Field, target: &Target, stage: &TrajectoryStage) -> Self {
        let reference = target
            .channels
            .iter()
            .enumerate()
            .min_by(|a, b| a.1.ip.total_cmp(&b.1.ip))
            .map_or(0, |(i, _)| i);
        let nch = target.channels.len();
        let diag = |n: usize| stage.pairs.iter().position(|p| p.ion == n && p.rec == n);
        let mut families = Vec::new();
        if let Some(pr) = diag(reference) {
            let ref_pair = &stage.pairs[pr];
            for (f, fam) in ref_pair.table.families.iter().enumerate() {
                let points = (0..stage.energies.len())
                    .map(|k| {
                        let i = stage.central(k);
                        let s = fam.points[i].saddle()?;
                        let located = ref_pair.times.get(f).and_then(|t| t[i]);
                        let channels = (0..nch)
                            .map(|n| {
                                let p = diag(n)?;
                                let table = &stage.pairs[p].table;
                                let fn_ = table.families.iter().position(|g| {
                                    g.label == fam.label && g.half_cycle == fam.half_cycle
                                })?;
                                let sn = table.families[fn_].points[i].saddle()?;
                                let drift = sn.v_ion - field.at(sn.t_ion).a;
                                let w = sub_barrier_action(
                                    field,
                                    &drift,
                                    target.channels[n].ip,
                                    sn.t_ion,
                                );
                                Some((p, fn_, i, (Complex64::new(0.0, -1.0) * w).exp()))
                            })
                            .collect();
                        Some(HolePoint {
                            times: (s.t_ion.re, s.t_ret.re),
                            located,
                            channels,
                        })
                    })
                    .collect();
                families.push((fam.label, fam.half_cycle, points));
            }
        }
        HoleContext {
            reference,
            families,
            channels: nch,
        }
    }
}

/// Accumulated `Σ_R w_R c c†` per reference family and energy.
pub(super) struct HoleAccumulator {
    /// `[family][energy]` → flat N×N (row-major).
    sums: Vec<Vec<Vec<Complex64>>>,
}

impl HoleAccumulator {
    pub fn new(ctx: &HoleContext) -> Self {
        let n2 = ctx.channels * ctx.channels;
        HoleAccumulator {
            sums: ctx
                .families
                .iter()
                .map(|(_, _, pts)| vec![vec![Complex64::new(0.0, 0.0); n2]; pts.len()])
                .collect(),
        }
    }

    pub fn add(&mut self, other: &HoleAccumulator) {
        for (a, b) in self.sums.iter_mut().zip(&other.sums) {
            for (x, y) in a.iter_mut().zip(b) {
                for (u, v) in x.iter_mut().zip(y) {
                    *u += v;
                }
            }
        }
    }

    /// Adds orientation `o` with weight `w`; `ionization(p, f, i)` gives the ionization factor
    /// of the saddle of pair `p`, family `f`, grid point `i` in this orientation.
    pub fn add_orientation(
        &mut self,
        ctx: &HoleContext,
        prop: Option<&HolePropagator>,
        weight: f64,
        ionization: &dyn Fn(usize, usize, usize) -> Complex64,
    ) {
        let n = ctx.channels;
        let mut a = vec![Complex64::new(0.0, 0.0); n];
        let mut c = vec![Complex64::new(0.0, 0.0); n];
        for (fam, sums) in ctx.families.iter().zip(self.sums.iter_mut()) {
            for (point, sum) in fam.2.iter().zip(sums.iter_mut()) {
                let Some(point) = point else { continue };
                for (slot, ch) in a.iter_mut().zip(&point.channels) {
                    *slot = match ch {
                        Some((p, f, i, phase)) => ionization(*p, *f, *i) * phase,
                        None => Complex64::new(0.0, 0.0),
                    };
                }
                match (prop, &point.located) {
                    (Some(pr), Some((tr, ti))) => {
                        for (m, cm) in c.iter_mut().enumerate() {
                            *cm = (0..n)
                                .map(|k| {
                                    pr.element_at(m, k, tr, ti)
                                        .unwrap_or(Complex64::new(f64::NAN, f64::NAN))
                                        * a[k]
                                })
                                .sum();
                        }
                    }
                    _ => c.copy_from_slice(&a),
                }
                for i in 0..n {
                    for j in 0..n {
                        sum[i * n + j] += c[i] * c[j].conj() * weight;
                    }
                }
            }
        }
    }

    /// Normalised density matrices.
    pub fn finish(&self, ctx: &HoleContext) -> Vec<HoleDensity> {
        let n = ctx.channels;
        ctx.families
            .iter()
            .zip(&self.sums)
            .map(|((label, hc, points), sums)| HoleDensity {
                label: *label,
                half_cycle: *hc,
                points: points
                    .iter()
                    .zip(sums)
                    .map(|(p, s)| {
                        let p = p.as_ref()?;
                        let trace: f64 = (0..n).map(|i| s[i * n + i].re).sum();
                        if !(trace > 0.0 && trace.is_finite()) {
                            return None;
                        }
                        Some(HoleSample {
                            t_ion: p.times.0,
                            t_ret: p.times.1,
                            rho: DMatrix::from_fn(n, n, |i, j| s[i * n + j] / trace),
                            yield_weight: trace,
                        })
                    })
                    .collect(),
            })
            .collect()
    }
}
