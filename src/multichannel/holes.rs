//! The hole density matrix decoded by each harmonic.
//!
//! For harmonic Ω and family f of the reference channel r (the lowest Ip), the returning
//! electron left at the complex ionization time `t_i` and comes back at `t_r` of that family's
//! saddle; the delay `τ = Re(t_r − t_i)` is the clock that maps the harmonic to a time after
//! ionization. The hole is created with the amplitudes
//!
//! ```text
//! a_n = a_n^ion · e^{−iW_n},
//! ```
//!
//! the ionization factor of channel n at its own saddle (same family, same energy) times its
//! sub-barrier exponential `W_n` (physics notes §3.5), and is propagated to recombination,
//! `c = U_I(t_r, t_i) a`, with the hole propagator at the reference saddle's complex times
//! (default; the sub-barrier leg moves the hole while the electron tunnels) or at their real
//! parts ([`crate::hole::HoleContour::Real`]). At complex times `U_I` is not unitary, so `c` is
//! not normalised by the propagation: what is reported is the density matrix of the normalised
//! amplitude, `ρ = c c† / tr(c c†)` (DESIGN §4.8) — Hermitian, positive, unit trace, so the
//! populations lie in [0, 1] and `|ρ_mn|² ≤ ρ_mm ρ_nn`. Over orientations the unnormalised
//! `w_R c c†` are added (an incoherent ensemble of holes weighted by the ionization yield) and
//! normalised at the end. Coherences are in the interaction picture (without the fast Bohr
//! phases `e^{−i(Ip_m − Ip_n)t}`).
//!
//! Only saddles that contribute to the spectrum are listed: beyond a cutoff the growing member
//! of a pair is not a physical saddle (the Stokes rule of [`crate::orbits::OrbitTable`]) and has
//! no hole density — the same rule as the orbit tables and the plain sum.

use nalgebra::DMatrix;
use num_complex::Complex64;

use super::assemble::{HoleDensity, HoleSample};
use super::stage::TrajectoryStage;
use crate::field::Field;
use crate::orbits::Saddle;
use crate::orbits::subbarrier::sub_barrier_action;
use crate::target::Target;

/// Where to find the data of one (reference family, energy) point.
#[derive(Clone, Debug)]
struct HolePoint {
    /// Grid index of the point.
    index: usize,
    /// The reference saddle.
    saddle: Saddle,
    /// Per channel: `(pair index, family index, grid index, e^{−iW_n})`, None if missing.
    channels: Vec<Option<(usize, usize, usize, Complex64)>>,
}

/// Orientation-independent data of the hole output.
pub(super) struct HoleContext {
    /// Index of the reference channel.
    pub reference: usize,
    /// Index of the reference channel's diagonal pair, if solved.
    pair: Option<usize>,
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
        let pair = diag(reference);
        if let Some(pr) = pair {
            let ref_table = &stage.pairs[pr].table;
            for (f, fam) in ref_table.families.iter().enumerate() {
                let points = (0..stage.energies.len())
                    .map(|k| {
                        let i = stage.central(k);
                        let s = fam.points[i].saddle()?;
                        if !ref_table.is_physical(f, i) {
                            return None;
                        }
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
                            index: i,
                            saddle: *s,
                            channels,
                        })
                    })
                    .collect();
                families.push((fam.label, fam.half_cycle, points));
            }
        }
        HoleContext {
            reference,
            pair,
            families,
            channels: nch,
        }
    }

    /// The reference channel's diagonal pair (whose families the hole output follows).
    pub fn reference_pair(&self) -> Option<usize> {
        self.pair
    }

    /// The amplitudes `c = U a` of one orientation class per reference family and energy.
    /// `ionization(p, f, i)` is the ionization factor of the saddle of pair `p`, family `f`,
    /// grid point `i`; `propagator(f, i, m, n, s)` is `[U_I]_mn` at the reference saddle `s` of
    /// family `f`, grid point `i`.
    pub fn amplitudes(
        &self,
        ionization: &dyn Fn(usize, usize, usize) -> Complex64,
        propagator: &dyn Fn(usize, usize, usize, usize, &Saddle) -> Complex64,
    ) -> Vec<Vec<Option<Vec<Complex64>>>> {
        let n = self.channels;
        self.families
            .iter()
            .enumerate()
            .map(|(f, (_, _, points))| {
                points
                    .iter()
                    .map(|point| {
                        let point = point.as_ref()?;
                        let a: Vec<Complex64> = point
                            .channels
                            .iter()
                            .map(|ch| match ch {
                                Some((p, g, i, phase)) => ionization(*p, *g, *i) * phase,
                                None => Complex64::new(0.0, 0.0),
                            })
                            .collect();
                        let c = (0..n)
                            .map(|m| {
                                (0..n)
                                    .map(|k| propagator(f, point.index, m, k, &point.saddle) * a[k])
                                    .sum()
                            })
                            .collect();
                        Some(c)
                    })
                    .collect()
            })
            .collect()
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

    /// Adds the amplitudes of one class with total weight `weight`.
    pub fn add_class(
        &mut self,
        ctx: &HoleContext,
        amplitudes: &[Vec<Option<Vec<Complex64>>>],
        weight: f64,
    ) {
        let n = ctx.channels;
        for (fam, sums) in amplitudes.iter().zip(self.sums.iter_mut()) {
            for (c, sum) in fam.iter().zip(sums.iter_mut()) {
                let Some(c) = c else { continue };
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
                            t_ion: p.saddle.t_ion.re,
                            t_ret: p.saddle.t_ret.re,
                            rho: DMatrix::from_fn(n, n, |i, j| s[i * n + j] / trace),
                            yield_weight: trace,
                        })
                    })
                    .collect(),
            })
            .collect()
    }
}
