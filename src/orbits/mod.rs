//! Quantum orbits: complex ionization and return times of the strong-field harmonic amplitude.
//!
//! This is the trajectory stage of the pipeline (DESIGN §2): it depends only on the field and on
//! the two ionization potentials of a channel pair, and produces an [`OrbitTable`] that the
//! amplitude stage reads as often as it likes (orientations, couplings and fits never re-solve
//! saddle points).
//!
//! - [`equations`]: the problem (saddle equations, analytic Jacobian and Hessian);
//! - [`newton`]: the solver of one point;
//! - [`families`]: classical seeds and family labels;
//! - `track`: the driver that continues families along Ω with stable branches;
//! - [`coalescence`]: the complex cutoff where the short and long saddles merge.

pub mod airy_branch;
pub mod coalescence;
pub mod equations;
pub mod families;
pub mod newton;
pub mod subbarrier;
mod track;

use nalgebra::Vector3;
use num_complex::Complex64;
use serde::Serialize;

pub use coalescence::Coalescence;
pub use equations::{ChannelPair, GaussianTerm, PhaseStructure, SaddleEval, evaluate};
pub use families::{Branch, DiscoverySettings, FamilyLabel};
pub use newton::{NewtonSettings, Termination};

use crate::error::{Error, Result};
use crate::field::{CVec3, Field, TimeStructure};
use airy_branch::ZetaBranch;
use track::{Closest, GroupState, Member, TrackSettings};

/// A converged saddle point with everything the amplitude stage needs.
#[derive(Clone, Copy, Debug)]
pub struct Saddle {
    /// Complex return (recombination) time `t_r` (a.u., from the field crest at t = 0).
    pub t_ret: Complex64,
    /// Complex ionization time `t_i` (a.u.).
    pub t_ion: Complex64,
    /// Phase Φ at the saddle; the amplitude carries `e^{iΦ}`.
    pub action: Complex64,
    /// Excursion time `τ = t_r − t_i`.
    pub tau: Complex64,
    /// Kinetic momentum at recombination.
    pub v_ret: CVec3,
    /// Kinetic momentum at ionization (`v_i² = −2 Ip_n`).
    pub v_ion: CVec3,
    /// Electric field at `t_r`.
    pub e_ret: CVec3,
    /// Electric field at `t_i`.
    pub e_ion: CVec3,
    /// Real electric field at the exit time `Re t_i`.
    pub e_exit: Vector3<f64>,
    /// Determinant of the Hessian of Φ in `(t_r, t_i)`.
    pub det_hessian: Complex64,
    /// `sqrt(−det Φ'')` on the branch continued along the family.
    pub hessian_root: Complex64,
    /// Newton iterations of the last correction.
    pub iterations: u32,
    /// Relative residual `max(|f₁|, |f₂|)/(Up + Ip)`.
    pub residual: f64,
    /// Width `w` of the Gaussian structure in the phase (0 without): the spreading factor is
    /// `(2π/(ε + iτ + w))^{3/2}` ([`equations`]).
    pub width: f64,
}

/// Why a point has no saddle.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum FailureReason {
    /// No classical seed led to a converged physical saddle for this family.
    NoStart,
    /// The Newton corrector did not converge even at the smallest continuation step.
    Newton(Termination),
    /// The two members of a pair came too close to be told apart.
    BranchCollision,
    /// The cube root for the Airy variable ζ could not be chosen unambiguously.
    AmbiguousAiryBranch,
    /// The predicted move stayed too long compared with the saddle spacing.
    PredictorTooLong,
    /// The solution has Im t_i ≤ 0 or Re τ ≤ 0.
    Unphysical,
    /// The photon energy is below the recombining channel's ionization potential: no classical
    /// return has that energy, the families pass a branch point at Ω = Ip and the
    /// strong-field description does not hold. Not a failure: the point is left out.
    BelowThreshold,
}

impl std::fmt::Display for FailureReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let s = match self {
            FailureReason::NoStart => "no converged physical start from classical seeds",
            FailureReason::Newton(Termination::IterationLimit) => {
                "Newton corrector hit the iteration limit"
            }
            FailureReason::Newton(Termination::SingularJacobian) => {
                "Newton corrector met a singular Jacobian"
            }
            FailureReason::Newton(Termination::NonFinite) => "Newton corrector produced NaN/inf",
            FailureReason::Newton(Termination::Converged) => "converged",
            FailureReason::BranchCollision => "short and long saddles collided",
            FailureReason::AmbiguousAiryBranch => "Airy-variable branch ambiguous",
            FailureReason::PredictorTooLong => "continuation step could not be made small enough",
            FailureReason::Unphysical => "solution has Im t_ion <= 0 or Re tau <= 0",
            FailureReason::BelowThreshold => {
                "photon energy below the recombining channel's ionization potential"
            }
        };
        f.write_str(s)
    }
}

/// A point that failed, with diagnostics.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Failure {
    /// What went wrong.
    pub reason: FailureReason,
    /// Iterations spent in the last attempt.
    pub iterations: u32,
    /// Last relative residual known.
    pub residual: f64,
}

/// The outcome at one energy for one family.
///
/// Saddles are stored inline (not boxed): tables hold them contiguously and the amplitude stage
/// reads them in tight loops, so the size difference between the variants is accepted.
#[derive(Clone, Copy, Debug)]
#[allow(clippy::large_enum_variant)]
pub enum OrbitPoint {
    /// A converged saddle.
    Solved(Saddle),
    /// No saddle; reported, never dropped.
    Failed(Failure),
}

impl OrbitPoint {
    /// Whether the point is a genuine failure (not a point left out below threshold).
    pub fn is_failure(&self) -> bool {
        matches!(self, OrbitPoint::Failed(f) if f.reason != FailureReason::BelowThreshold)
    }

    /// The saddle, if solved.
    pub fn saddle(&self) -> Option<&Saddle> {
        match self {
            OrbitPoint::Solved(s) => Some(s),
            OrbitPoint::Failed(_) => None,
        }
    }
}

/// One family of quantum orbits, on the table's energy grid.
#[derive(Clone, Debug)]
pub struct Family {
    /// Stable label (short, long, return2-short, …).
    pub label: FamilyLabel,
    /// Index of the crest (half cycle) of ionization.
    pub half_cycle: i32,
    /// Time of that crest (a.u.).
    pub crest: f64,
    /// One point per energy of the table.
    pub points: Vec<OrbitPoint>,
    /// Index into [`OrbitTable::pairs`] if the family has a partner.
    pub pair: Option<usize>,
}

/// The Airy variable of a pair at one energy (physics notes §2.3).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PairPoint {
    /// ζ with `(2/3) ζ^{3/2} = Δ = (Φ₋ − Φ₊)/2`.
    pub zeta: Complex64,
    /// `√ζ`, the sign with `(2/3)(√ζ)³ = Δ`.
    pub zeta_sqrt: Complex64,
    /// `ζ^{1/4}` continued from the plateau.
    pub zeta_quarter: Complex64,
}

impl PairPoint {
    /// Beyond the pair's cutoff: Re ζ < 0 (physics notes §2.3).
    pub fn beyond_cutoff(&self) -> bool {
        self.zeta.re < 0.0
    }
}

/// Two families that coalesce at a cutoff.
#[derive(Clone, Debug)]
pub struct FamilyPair {
    /// Family with the larger Re Φ in the plateau ("−" of the uniform formula; short for HHG).
    pub minus: usize,
    /// The other family ("+"; long for HHG).
    pub plus: usize,
    /// Airy variable per energy (None where a member failed).
    pub points: Vec<Option<PairPoint>>,
    /// Complex coalescence point, if the grid reached past the closest approach.
    pub coalescence: Option<Coalescence>,
}

/// Result of the trajectory stage for one channel pair.
#[derive(Clone, Debug)]
pub struct OrbitTable {
    /// The two ionization potentials.
    pub pair: ChannelPair,
    /// Photon energies Ω (a.u.) of the points, as requested.
    pub energies: Vec<f64>,
    /// The families found.
    pub families: Vec<Family>,
    /// The coalescing pairs among them.
    pub pairs: Vec<FamilyPair>,
    /// For a pulse, the interval `[start, end]` (a.u.) where the field is non-zero.
    pub pulse: Option<(f64, f64)>,
}

impl OrbitTable {
    /// Whether the saddle of family `f` at point `k` lies inside the pulse (always true for a
    /// periodic field). An orbit that would ionize or return where the field has ended is no
    /// quantum orbit of the pulse: it is not counted, but it is no failure either.
    pub fn inside_pulse(&self, f: usize, k: usize) -> bool {
        match (self.pulse, self.families[f].points[k].saddle()) {
            (Some((a, b)), Some(s)) => {
                let inside = |t: f64| t >= a && t <= b;
                inside(s.t_ion.re) && inside(s.t_ret.re)
            }
            _ => true,
        }
    }

    /// Whether family `f` at point `k` is a physical contribution: inside the pulse, and always
    /// below the cutoff; beyond it (Re ζ < 0) only the member that decays (larger Im Φ) of a pair
    /// is kept.
    pub fn is_physical(&self, f: usize, k: usize) -> bool {
        let family = &self.families[f];
        let Some(s) = family.points[k].saddle() else {
            return false;
        };
        if !self.inside_pulse(f, k) {
            return false;
        }
        let Some(p) = family.pair else {
            return true;
        };
        let pair = &self.pairs[p];
        match pair.points[k] {
            Some(pp) if pp.beyond_cutoff() => {
                let other = if pair.minus == f {
                    pair.plus
                } else {
                    pair.minus
                };
                match self.families[other].points[k].saddle() {
                    Some(o) => s.action.im >= o.action.im,
                    None => true,
                }
            }
            _ => true,
        }
    }

    /// The table restricted to the points `k·stride + offset` (e.g. the central points of
    /// `Ω − δ, Ω, Ω + δ` triples).
    pub fn subsample(&self, stride: usize, offset: usize) -> OrbitTable {
        let n = self.energies.len();
        let pick = || (0..n / stride).map(|k| k * stride + offset);
        OrbitTable {
            pair: self.pair,
            energies: pick().map(|i| self.energies[i]).collect(),
            families: self
                .families
                .iter()
                .map(|f| Family {
                    points: pick().map(|i| f.points[i]).collect(),
                    ..f.clone()
                })
                .collect(),
            pairs: self
                .pairs
                .iter()
                .map(|p| FamilyPair {
                    points: pick().map(|i| p.points[i]).collect(),
                    ..p.clone()
                })
                .collect(),
            pulse: self.pulse,
        }
    }

    /// Number of failed (family, energy) points.
    pub fn failed_points(&self) -> usize {
        self.families
            .iter()
            .flat_map(|f| f.points.iter())
            .filter(|p| p.is_failure())
            .count()
    }

    /// Energy (a.u.) where Re ζ of pair `p` changes sign on the grid (linear interpolation):
    /// the pair's cutoff as seen on real Ω.
    pub fn cutoff_crossing(&self, p: usize) -> Option<f64> {
        let pts = &self.pairs[p].points;
        let mut order: Vec<usize> = (0..self.energies.len()).collect();
        order.sort_by(|&a, &b| self.energies[a].total_cmp(&self.energies[b]));
        for w in order.windows(2) {
            let (a, b) = (w[0], w[1]);
            if let (Some(za), Some(zb)) = (pts[a], pts[b])
                && za.zeta.re >= 0.0
                && zb.zeta.re < 0.0
            {
                let (ea, eb) = (self.energies[a], self.energies[b]);
                return Some(ea + (eb - ea) * za.zeta.re / (za.zeta.re - zb.zeta.re));
            }
        }
        None
    }
}

/// Settings of the trajectory stage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OrbitSettings {
    /// Family discovery (returns, crest threshold, …).
    pub discovery: DiscoverySettings,
    /// Relative residual at which a saddle counts as converged.
    pub tolerance: f64,
    /// Iteration limit of a continuation step's corrector.
    pub step_iterations: u32,
    /// Iteration limit of a start from a classical seed.
    pub start_iterations: u32,
    /// Largest continuation step in Ω, as a fraction of the reference photon energy ω.
    pub max_step: f64,
}

impl Default for OrbitSettings {
    fn default() -> Self {
        OrbitSettings {
            discovery: DiscoverySettings::default(),
            tolerance: 1e-11,
            step_iterations: 12,
            start_iterations: 60,
            max_step: 0.5,
        }
    }
}

/// Energy fractions of the branch maximum tried as start points, in order.
const START_FRACTIONS: [f64; 8] = [0.5, 0.4, 0.6, 0.3, 0.7, 0.25, 0.8, 0.15];

/// Solves every family of quantum orbits of `field` for the channel pair at the photon
/// energies `energies` (a.u.).
pub fn solve_orbits(
    field: &Field,
    pair: ChannelPair,
    energies: &[f64],
    settings: &OrbitSettings,
) -> Result<OrbitTable> {
    let groups = families::discover(field, &settings.discovery);
    solve_orbits_seeded(field, pair, energies, settings, &groups)
}

/// [`solve_orbits`] with the classical seeds already found ([`families::discover`] depends on
/// the field and the discovery settings only, so one discovery serves every channel pair).
pub fn solve_orbits_seeded(
    field: &Field,
    pair: ChannelPair,
    energies: &[f64],
    settings: &OrbitSettings,
    groups: &[families::SeedGroup],
) -> Result<OrbitTable> {
    crate::error::require_positive("ionization potential (ionizing channel)", pair.ip_ion)?;
    crate::error::require_positive("ionization potential (recombining channel)", pair.ip_rec)?;
    if energies.is_empty() {
        return Err(Error::invalid(
            "photon energies",
            "[]",
            "at least one is required",
        ));
    }
    for &e in energies {
        crate::error::require_positive("photon energy", e)?;
    }
    let omega = field.omega();
    let up = field.ponderomotive_energy();
    let scale = up + pair.ip_ion.max(pair.ip_rec);
    let newton = NewtonSettings {
        tolerance: settings.tolerance,
        max_iterations: settings.step_iterations,
        energy_scale: scale,
        max_step: 0.5 / omega,
    };
    let track = TrackSettings {
        newton,
        max_step: settings.max_step * omega,
        min_step: 1e-9 * omega,
        lone_correction: 0.3 / omega,
    };
    let start_newton = NewtonSettings {
        max_iterations: settings.start_iterations,
        ..newton
    };
    // Energies at or below the recombination threshold are left out (FailureReason::BelowThreshold).
    let mut order: Vec<usize> = (0..energies.len())
        .filter(|&i| energies[i] > pair.ip_rec)
        .collect();
    order.sort_by(|&a, &b| energies[a].total_cmp(&energies[b]));
    let below = |i: usize| energies[i] <= pair.ip_rec;

    let mut table = OrbitTable {
        pair,
        energies: energies.to_vec(),
        families: Vec::new(),
        pairs: Vec::new(),
        pulse: match field.structure() {
            TimeStructure::Pulse { start, end } => Some((start, end)),
            TimeStructure::Periodic { .. } => None,
        },
    };
    for group in groups {
        let labels: Vec<FamilyLabel> = group.branches.iter().map(|b| b.label).collect();
        let start = start_group(field, pair, group, &start_newton);
        let first = table.families.len();
        let n = energies.len();
        let mut points: Vec<Vec<OrbitPoint>> = vec![Vec::with_capacity(n); labels.len()];
        let mut pair_points: Vec<Option<PairPoint>> = vec![None; n];
        let mut closest = None;
        match &start {
            Some(state) => {
                let mut results: Vec<Option<track::TargetResult>> = (0..n).map(|_| None).collect();
                let up_targets: Vec<(usize, f64)> = order
                    .iter()
                    .filter(|&&i| energies[i] >= state.omega)
                    .map(|&i| (i, energies[i]))
                    .collect();
                let down_targets: Vec<(usize, f64)> = order
                    .iter()
                    .rev()
                    .filter(|&&i| energies[i] < state.omega)
                    .map(|&i| (i, energies[i]))
                    .collect();
                let mut ignored: Option<Closest> = None;
                for r in track::sweep(field, pair, state, &up_targets, &track, &mut closest) {
                    let i = r.index;
                    results[i] = Some(r);
                }
                for r in track::sweep(field, pair, state, &down_targets, &track, &mut ignored) {
                    let i = r.index;
                    results[i] = Some(r);
                }
                for (k, r) in results.into_iter().enumerate() {
                    if below(k) {
                        for p in points.iter_mut() {
                            p.push(OrbitPoint::Failed(Failure {
                                reason: FailureReason::BelowThreshold,
                                iterations: 0,
                                residual: f64::NAN,
                            }));
                        }
                        continue;
                    }
                    let r = r.ok_or_else(|| {
                        Error::Numerical(format!("energy point {k} was not visited"))
                    })?;
                    for (m, p) in r.members.into_iter().enumerate() {
                        points[m].push(p);
                    }
                    pair_points[k] = r.pair;
                }
            }
            None => {
                for p in points.iter_mut() {
                    p.extend((0..n).map(|k| {
                        OrbitPoint::Failed(Failure {
                            reason: if below(k) {
                                FailureReason::BelowThreshold
                            } else {
                                FailureReason::NoStart
                            },
                            iterations: settings.start_iterations,
                            residual: f64::NAN,
                        })
                    }));
                }
            }
        }
        let pair_index = if labels.len() == 2 && start.is_some() {
            Some(table.pairs.len())
        } else {
            None
        };
        for (label, pts) in labels.iter().zip(points) {
            table.families.push(Family {
                label: *label,
                half_cycle: group.half_cycle,
                crest: group.crest,
                points: pts,
                pair: pair_index,
            });
        }
        if let (Some(state), Some(_)) = (&start, pair_index) {
            let max_energy = order.last().map(|&i| energies[i]).unwrap_or(0.0);
            let coalescence = closest
                .filter(|c| c.omega < max_energy)
                .map(|c| coalescence::solve(field, pair, c.omega, c.t_ret, c.t_ion, scale));
            table.pairs.push(FamilyPair {
                minus: first + state.minus,
                plus: first + 1 - state.minus,
                points: pair_points,
                coalescence,
            });
        }
    }
    Ok(table)
}

/// Finds a converged physical start for every member of a group from classical seeds.
fn start_group(
    field: &Field,
    pair: ChannelPair,
    group: &families::SeedGroup,
    newton_settings: &NewtonSettings,
) -> Option<GroupState> {
    let e_max = group
        .branches
        .iter()
        .map(|b| b.max_energy())
        .fold(0.0, f64::max);
    let omega_ref = field.omega();
    'fractions: for frac in START_FRACTIONS {
        let kinetic = frac * e_max;
        let omega = pair.ip_rec + kinetic;
        let mut members = Vec::new();
        for b in &group.branches {
            let Some((t0, t1)) = b.at_energy(kinetic) else {
                continue 'fractions;
            };
            let (a0, e0, b0) = field.real_at(t0);
            let (_, _, b1) = field.real_at(t1);
            let drift = -(b1 - b0) / (t1 - t0);
            let v0 = drift + a0;
            let local = e0.norm().max(1e-300);
            let gamma = omega_ref * (2.0 * pair.ip_ion + v0.norm_squared()).sqrt() / local;
            let t_ion = Complex64::new(t0, gamma.asinh() / omega_ref);
            let t_ret = Complex64::new(t1, 0.0);
            let out = newton::solve(field, pair, omega, t_ret, t_ion, newton_settings);
            if track::physical_start(&out).is_err() {
                continue 'fractions;
            }
            members.push(Member::new(
                out.t_ret,
                out.t_ion,
                out.eval,
                out.iterations,
                out.residual,
            ));
        }
        if members.len() == 2 && members[0].distance(&members[1]) < 1e-3 / omega_ref {
            continue;
        }
        let (minus, zeta) = if members.len() == 2 {
            let minus = if members[0].eval.action.re >= members[1].eval.action.re {
                0
            } else {
                1
            };
            let z = ZetaBranch::start(
                track::half_difference(&members[minus], &members[1 - minus]),
                omega,
            );
            (minus, Some(z))
        } else {
            (0, None)
        };
        return Some(GroupState {
            omega,
            members,
            minus,
            zeta,
        });
    }
    None
}
