//! Quantum orbits: complex ionization and return times of the strong-field harmonic amplitude.
//!
//! This is the trajectory stage of the pipeline (DESIGN §2): it depends only on the field and on
//! the two ionization potentials of a channel pair, and produces an [`OrbitTable`] that the
//! amplitude stage reads as often as it likes (orientations, couplings and fits never re-solve
//! saddle points).
//!
//! - [`equations`]: the problem (saddle equations, analytic Jacobian and Hessian);
//! - [`expansion`]: the next-order saddle-point terms of a prefactor that varies across a saddle;
//! - [`newton`]: the solver of one point;
//! - [`families`]: classical seeds and family labels;
//! - [`start`]: the first converged pair of each half cycle (classical seeds, the coalescence
//!   point, continuation in the transverse field);
//! - `track`: the driver that continues families along Ω with stable branches;
//! - [`coalescence`]: the complex cutoff where the short and long saddles merge, per half cycle;
//! - [`budget`]: explicit bounds on the work, checked before it starts.
//!
//! **Which saddles are summed** ([`OrbitTable::exclusion`]). A solved saddle is left out of the
//! dipole, with its reason, if it lies outside the pulse; if `Im Φ < 0` (its amplitude
//! `|e^{iΦ}| = e^{−Im Φ}` exceeds one: no tunnelling amplitude can); or, beyond the cutoff of
//! its half cycle, if it is the member of its pair whose amplitude grows — the smaller `Im Φ`
//! (the Stokes rule of physics notes §2.2: as for Ai(x) at x > 0 only the decaying saddle lies
//! on the steepest-descent path).
//!
//! Beyond the cutoff the two saddles separate from the coalescence point `t_c` as
//! `t_± ≈ t_c ± a u` with `a ∝ √(Ω − Ω_c)` ([`coalescence::split`]), and since
//! `d Im Φ/dΩ = Im t_r` at a saddle (Φ is stationary in the times and contains `Ω t_r`), the
//! decaying member is the one whose `Im t_r` rises above `Im t_r(t_c)` and the growing one falls
//! below it. More than `ω/2 + 2|Im Ω_c|` past the cutoff (where the second-order drift of
//! both members no longer matters) a member — paired or alone — whose `Im t_r` lies below the
//! coalescence value is therefore growing and left out, even if it has the larger `Im Φ` of
//! its pair: a pair that does not separate into a decaying and a growing member (met for weak
//! half cycles at the end of a pulse) contributes nothing beyond its cutoff.

pub mod airy_branch;
mod branches;
pub mod budget;
pub mod coalescence;
pub mod equations;
pub mod expansion;
pub mod families;
pub mod newton;
pub mod start;
pub mod subbarrier;
mod track;

use nalgebra::Vector3;
use num_complex::Complex64;
use serde::Serialize;

pub use budget::WorkLimits;
pub use coalescence::{Coalescence, HalfCycleCutoff};
pub use equations::{ChannelPair, GaussianTerm, PhaseStructure, SaddleEval, evaluate};
pub use families::{Branch, ClassicalPeak, DiscoverySettings, FamilyLabel};
pub use newton::{NewtonSettings, Termination};
pub use start::StartMethod;

use crate::error::{Error, Result};
use crate::field::{CVec3, Field, TimeStructure};
use start::StartContext;
use track::{Closest, TrackSettings};

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
    /// No classical trajectory of this branch returns (for this return index) while the field
    /// lasts — e.g. the long orbits of the last half cycle of a pulse, whose electrons would
    /// come back after it has ended — and no quantum partner was found from the coalescence
    /// point: the family does not exist here. Not a failure.
    NoClassicalReturn,
    /// The family's classical returns are cut by the end of the pulse — the return energy of
    /// its half cycle is still rising where the returns reach the last T/16 of the pulse — and
    /// no quantum orbit of it was found inside the pulse: its orbits return after the field has
    /// ended. Not a failure.
    ReturnsAfterPulse,
    /// The family could not be continued to this energy, which lies more than 20% past its own
    /// half cycle's cutoff ([`HalfCycleCutoff::estimate`]); there its contribution is
    /// exponentially small (the decaying member beyond the cutoff). Not a failure.
    BeyondHalfCycleCutoff,
}

impl FailureReason {
    /// Whether the reason is a genuine failure (as opposed to a point where the family does not
    /// exist or does not matter, which is labelled but not counted as failed).
    pub fn is_failure(&self) -> bool {
        !matches!(
            self,
            FailureReason::BelowThreshold
                | FailureReason::NoClassicalReturn
                | FailureReason::ReturnsAfterPulse
                | FailureReason::BeyondHalfCycleCutoff
        )
    }
}

/// Why a solved saddle is not summed into the dipole ([`OrbitTable::exclusion`]).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Exclusion {
    /// The orbit ionizes or returns where the pulse has ended (or not begun).
    OutsidePulse,
    /// `Im Φ < 0`: the amplitude `e^{−Im Φ}` exceeds one and grows.
    GrowingAmplitude,
    /// Beyond its half cycle's cutoff, the member of its pair with the smaller `Im Φ` (the
    /// growing one; Stokes rule, physics notes §2.2) — or, more than `ω/2 + 2|Im Ω_c|` past
    /// the cutoff, a member whose `Im t_r` lies below its value at the coalescence point (its
    /// amplitude grows relative to the pair's: both members of a pair that does not separate
    /// into a decaying and a growing one, as for a weak half cycle at the end of a pulse).
    GrowingBeyondCutoff,
    /// More than `ω/2 + 2|Im Ω_c|` past its half cycle's cutoff, with no partner at this
    /// energy, and `Im t_r` below its value at the coalescence point (0 if that is unknown).
    GrowingWithoutPartner,
}

impl std::fmt::Display for Exclusion {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            Exclusion::OutsidePulse => "ionizes or returns outside the pulse",
            Exclusion::GrowingAmplitude => "growing amplitude (Im action < 0)",
            Exclusion::GrowingBeyondCutoff => {
                "beyond the cutoff: the growing member of the pair (Stokes rule)"
            }
            Exclusion::GrowingWithoutPartner => {
                "beyond the cutoff without a partner, amplitude growing with energy"
            }
        })
    }
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
            FailureReason::NoClassicalReturn => {
                "no classical trajectory of this branch returns while the field lasts: \
                 no such family"
            }
            FailureReason::ReturnsAfterPulse => {
                "the family's returns are cut by the end of the pulse: no orbit inside it"
            }
            FailureReason::BeyondHalfCycleCutoff => {
                "more than 20% past this half cycle's own cutoff: not continued (negligible)"
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
    /// Whether the point is a genuine failure (not a point labelled as outside the family's
    /// existence: below threshold, no classical return, far past the half cycle's cutoff).
    pub fn is_failure(&self) -> bool {
        matches!(self, OrbitPoint::Failed(f) if f.reason.is_failure())
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
    /// The cutoff of the family's half cycle and return (shared by both members of a pair).
    pub cutoff: HalfCycleCutoff,
    /// How the family was started (None: it was not).
    pub start: Option<StartMethod>,
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
    /// Airy variable per energy (None where a member failed; where the continued ζ
    /// contradicts the pair's checked coalescence point — the side of the cutoff given by
    /// `Re ζ` and by `Re Ω_c` disagree more than `ω/2 + 4|Im Ω_c|` away from it; where the pair was started beyond its cutoff, so that ζ has no plateau to
    /// be continued from; or where both members grow).
    pub points: Vec<Option<PairPoint>>,
    /// The pair's complex coalescence point, when found and checked against the half cycle's
    /// classical cutoff ([`coalescence::plausible`]).
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
    /// Reference angular frequency ω of the field (a.u.).
    pub omega: f64,
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

    /// Whether family `f` at point `k` is a physical contribution: solved and not excluded
    /// ([`OrbitTable::exclusion`]).
    pub fn is_physical(&self, f: usize, k: usize) -> bool {
        self.families[f].points[k].saddle().is_some() && self.exclusion(f, k).is_none()
    }

    /// Why the solved saddle of family `f` at point `k` is not summed, or None if it is (or if
    /// the point is not solved: see [`Failure::reason`]). Rules in the module documentation.
    pub fn exclusion(&self, f: usize, k: usize) -> Option<Exclusion> {
        let family = &self.families[f];
        let s = family.points[k].saddle()?;
        if !self.inside_pulse(f, k) {
            return Some(Exclusion::OutsidePulse);
        }
        if s.action.im < 0.0 {
            return Some(Exclusion::GrowingAmplitude);
        }
        let partner = family.pair.and_then(|p| {
            let pair = &self.pairs[p];
            let other = if pair.minus == f {
                pair.plus
            } else {
                pair.minus
            };
            self.families[other].points[k].saddle().map(|o| (p, o))
        });
        let cutoff = &family.cutoff;
        let far_beyond = match cutoff.quantum {
            Some(c) => self.energies[k] > c.omega.re + 0.5 * self.omega + 2.0 * c.omega.im.abs(),
            None => cutoff
                .estimate(self.pair)
                .is_some_and(|e| self.energies[k] > e + self.omega),
        };
        let reference = cutoff.quantum.map_or(0.0, |c| c.t_ret.im);
        let falling = far_beyond && s.t_ret.im < reference;
        match partner {
            Some((p, o)) => ((self.beyond_cutoff(p, k) && s.action.im < o.action.im) || falling)
                .then_some(Exclusion::GrowingBeyondCutoff),
            None => falling.then_some(Exclusion::GrowingWithoutPartner),
        }
    }

    /// Whether point `k` lies beyond the cutoff of pair `p`: `Re ζ < 0` where the pair point
    /// is known (it agrees with the checked coalescence point by construction), else
    /// `Ω > Re Ω_c`, else Ω above the half cycle's estimated cutoff.
    pub fn beyond_cutoff(&self, p: usize, k: usize) -> bool {
        let pair = &self.pairs[p];
        let cutoff = &self.families[pair.minus].cutoff;
        match (pair.points[k], cutoff.quantum) {
            (Some(pp), _) => pp.beyond_cutoff(),
            (None, Some(c)) => self.energies[k] > c.omega.re,
            (None, None) => cutoff
                .estimate(self.pair)
                .is_some_and(|e| self.energies[k] > e),
        }
    }

    /// The cutoff of every half cycle (first and higher returns), one entry per seed group, in
    /// the order of the families: `(half cycle, return index, cutoff)`.
    pub fn half_cycle_cutoffs(&self) -> Vec<(i32, u32, HalfCycleCutoff)> {
        let mut out: Vec<(i32, u32, HalfCycleCutoff)> = Vec::new();
        for f in &self.families {
            let key = (f.half_cycle, f.label.return_index);
            if !out.iter().any(|e| (e.0, e.1) == key) {
                out.push((key.0, key.1, f.cutoff));
            }
        }
        out
    }

    /// The strongest half cycle: the first-return group with the highest classical cutoff.
    pub fn strongest_half_cycle(&self) -> Option<(i32, HalfCycleCutoff)> {
        self.half_cycle_cutoffs()
            .into_iter()
            .filter(|e| e.1 == 1)
            .filter_map(|e| e.2.classical_energy.map(|c| (e.0, e.2, c)))
            .max_by(|a, b| a.2.total_cmp(&b.2))
            .map(|e| (e.0, e.1))
    }

    /// The quantum cutoff of the field for this channel pair: `Re Ω_c` of the strongest half
    /// cycle (never the largest coalescence energy found anywhere, which may belong to a weak
    /// half cycle's artefact). None if that half cycle's coalescence was not found or not
    /// accepted.
    pub fn quantum_cutoff(&self) -> Option<f64> {
        self.strongest_half_cycle()
            .and_then(|(_, c)| c.quantum.map(|q| q.omega.re))
    }

    /// Number of solved saddles excluded from the sums, per reason, in the order of
    /// [`Exclusion`]'s variants.
    pub fn exclusion_counts(&self) -> [(Exclusion, usize); 4] {
        let mut out = [
            (Exclusion::OutsidePulse, 0),
            (Exclusion::GrowingAmplitude, 0),
            (Exclusion::GrowingBeyondCutoff, 0),
            (Exclusion::GrowingWithoutPartner, 0),
        ];
        for f in 0..self.families.len() {
            for k in 0..self.energies.len() {
                if let Some(e) = self.exclusion(f, k)
                    && let Some(slot) = out.iter_mut().find(|x| x.0 == e)
                {
                    slot.1 += 1;
                }
            }
        }
        out
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
            omega: self.omega,
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
    /// Bounds on the work ([`budget`]).
    pub limits: WorkLimits,
}

impl Default for OrbitSettings {
    fn default() -> Self {
        OrbitSettings {
            discovery: DiscoverySettings::default(),
            tolerance: 1e-11,
            step_iterations: 12,
            start_iterations: 60,
            max_step: 0.5,
            limits: WorkLimits::default(),
        }
    }
}

/// Fraction past a half cycle's own cutoff up to which every family must be continued; beyond
/// it a family that cannot be continued is labelled [`FailureReason::BeyondHalfCycleCutoff`].
pub const REQUIRED_REACH: f64 = 1.2;

/// Solves every family of quantum orbits of `field` for the channel pair at the photon
/// energies `energies` (a.u.).
pub fn solve_orbits(
    field: &Field,
    pair: ChannelPair,
    energies: &[f64],
    settings: &OrbitSettings,
) -> Result<OrbitTable> {
    let groups = families::try_discover(field, &settings.discovery, &settings.limits)?;
    solve_orbits_seeded(field, pair, energies, settings, &groups)
}

/// Checks the work of [`solve_orbits`] against `settings.limits` before doing any: the
/// birth-window search, the classical seeds and the continuation of every group over the
/// energies (module [`budget`]). [`crate::Error::WorkLimit`] states the estimate and the limit.
pub fn check_work(
    field: &Field,
    pair: ChannelPair,
    energies: &[f64],
    settings: &OrbitSettings,
) -> Result<()> {
    families::check_window_work(field, &settings.limits)?;
    // The number of windows is not known before the search; the half cycles of the reference
    // colour over the field's duration bound it for a linear field and estimate it otherwise.
    let (t0, t1) = field.time_span();
    let half_cycles = ((t1 - t0) * field.omega() / std::f64::consts::PI)
        .ceil()
        .max(1.0);
    let groups = half_cycles * f64::from(settings.discovery.max_returns);
    budget::check(
        "continuation of the quantum orbits",
        budget::continuation_steps(
            field,
            groups as usize,
            energies,
            pair.ip_rec,
            pair.ip_ion,
            settings.max_step,
        ),
        settings.limits.continuation_steps,
        "continuation steps",
        &format!(
            "{groups:.0} groups of orbits, each continued from the threshold to {:.4e} a.u. \
             (the higher of the last energy and the cutoff) in steps of at most {:.3e} a.u. \
             (Up = {:.4e} a.u., Ip = {:.4e} a.u., ω = {:.4e} a.u.)",
            energies
                .iter()
                .copied()
                .fold(f64::NEG_INFINITY, f64::max)
                .max(pair.ip_rec + 3.2 * field.ponderomotive_energy() + 0.4 * pair.ip_ion),
            settings.max_step * field.omega(),
            field.ponderomotive_energy(),
            pair.ip_ion.max(pair.ip_rec),
            field.omega()
        ),
    )
}

/// [`solve_orbits`] with the classical seeds already found ([`families::discover`] depends on
/// the field and the discovery settings only, so one discovery serves every channel pair).
///
/// Every seed group yields two families (long, then short) whether or not both were found:
/// points of a family that does not exist carry their reason ([`FailureReason`]).
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
    check_work(field, pair, energies, settings)?;
    budget::check(
        "photon energies",
        energies.len() as f64,
        settings.limits.energy_points,
        "points",
        "one row per energy",
    )?;
    if groups.is_empty() {
        // `families::discover` returns no group for a field beyond the work limits: surface
        // the error rather than an empty table.
        families::try_discover(field, &settings.discovery, &settings.limits)?;
    }
    budget::check(
        "continuation of the quantum orbits",
        budget::continuation_steps(
            field,
            groups.len(),
            energies,
            pair.ip_rec,
            pair.ip_ion,
            settings.max_step,
        ),
        settings.limits.continuation_steps,
        "continuation steps",
        &format!("{} groups of orbits", groups.len()),
    )?;
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
    let ctx = StartContext {
        field,
        pair,
        newton: NewtonSettings {
            max_iterations: settings.start_iterations,
            ..newton
        },
        scale,
    };
    // Energies at or below the recombination threshold are left out (FailureReason::BelowThreshold).
    let mut order: Vec<usize> = (0..energies.len())
        .filter(|&i| energies[i] > pair.ip_rec)
        .collect();
    order.sort_by(|&a, &b| energies[a].total_cmp(&energies[b]));
    let below = |i: usize| energies[i] <= pair.ip_rec;
    let max_energy = order.last().map(|&i| energies[i]).unwrap_or(0.0);
    let failed = |reason: FailureReason, residual: f64| {
        OrbitPoint::Failed(Failure {
            reason,
            iterations: 0,
            residual,
        })
    };

    let mut table = OrbitTable {
        pair,
        energies: energies.to_vec(),
        families: Vec::new(),
        pairs: Vec::new(),
        pulse: match field.structure() {
            TimeStructure::Pulse { start, end } => Some((start, end)),
            TimeStructure::Periodic { .. } => None,
        },
        omega,
    };
    for group in groups {
        let labels = group.labels();
        let n = energies.len();
        let started = if group.peak.is_some() || !group.branches.is_empty() {
            start::start(&ctx, group)
        } else {
            None
        };
        let cut_by_pulse_end = match (group.peak, table.pulse) {
            (Some(p), Some((_, end))) => {
                !p.interior && p.return_time >= end - std::f64::consts::PI / (8.0 * omega)
            }
            _ => false,
        };
        // Points per label slot (long, short); a slot the start did not fill keeps its reason:
        // a family with no classical trajectory on its branch (its electrons would return after
        // the field has ended, or none return at all) does not exist here; one whose branch
        // exists but could not be started is a failure.
        let missing: Vec<FailureReason> = labels
            .iter()
            .map(|label| {
                if !group.branches.iter().any(|b| b.label == *label) {
                    FailureReason::NoClassicalReturn
                } else if cut_by_pulse_end {
                    FailureReason::ReturnsAfterPulse
                } else {
                    FailureReason::NoStart
                }
            })
            .collect();
        // Results per energy, then the points of each slot pushed in energy order.
        let mut results: Vec<Option<track::TargetResult>> = (0..n).map(|_| None).collect();
        let mut slots: Vec<usize> = Vec::new();
        let mut closest: Option<Closest> = None;
        let mut reference: Option<branches::Reference> = None;
        if let Some(st) = &started {
            slots = st
                .labels
                .iter()
                .map(|l| labels.iter().position(|x| x == l).unwrap_or(0))
                .collect();
            let state = &st.state;
            // The plateau reference of the branch choices (module `branches`), visited by the
            // sweeps like a requested energy but not part of the table.
            let reference_energy = group
                .peak
                .filter(|_| st.state.members.len() == 2)
                .map(|p| pair.ip_rec + 0.5 * p.energy)
                .filter(|&e| e > pair.ip_rec);
            let mut targets: Vec<(usize, f64)> = order.iter().map(|&i| (i, energies[i])).collect();
            if let Some(e) = reference_energy {
                targets.push((usize::MAX, e));
                targets.sort_by(|a, b| a.1.total_cmp(&b.1));
            }
            let up_targets: Vec<(usize, f64)> = targets
                .iter()
                .filter(|t| t.1 >= state.omega)
                .copied()
                .collect();
            let down_targets: Vec<(usize, f64)> = targets
                .iter()
                .rev()
                .filter(|t| t.1 < state.omega)
                .copied()
                .collect();
            let mut ignored: Option<Closest> = None;
            let up = track::sweep(field, pair, state, &up_targets, &track, &mut closest);
            let down = track::sweep(field, pair, state, &down_targets, &track, &mut ignored);
            for r in up.into_iter().chain(down) {
                if r.index == usize::MAX {
                    if let [OrbitPoint::Solved(a), OrbitPoint::Solved(b)] = r.members.as_slice() {
                        let mut saddles = [*a, *b];
                        if slots[0] != 0 {
                            saddles.swap(0, 1);
                        }
                        reference = Some(branches::Reference {
                            saddles,
                            pair: r.pair,
                        });
                    }
                    continue;
                }
                let i = r.index;
                results[i] = Some(r);
            }
        }
        let mut points: Vec<Vec<OrbitPoint>> = vec![Vec::with_capacity(n); labels.len()];
        let mut pair_points: Vec<Option<PairPoint>> = Vec::with_capacity(n);
        for (k, r) in results.into_iter().enumerate() {
            let mut filled = [false; 2];
            if let Some(r) = r {
                pair_points.push(r.pair);
                let mut members: Vec<(usize, OrbitPoint)> =
                    slots.iter().copied().zip(r.members).collect();
                members.sort_by_key(|m| m.0);
                for (slot, p) in members {
                    points[slot].push(p);
                    filled[slot] = true;
                }
            } else {
                pair_points.push(None);
            }
            for (slot, done) in filled.iter().enumerate() {
                if !done {
                    let reason = if below(k) {
                        FailureReason::BelowThreshold
                    } else {
                        missing[slot]
                    };
                    points[slot].push(failed(reason, f64::NAN));
                }
            }
        }
        let mut minus_override: Option<usize> = None;
        if let (Some(st), Some(reference)) = (&started, reference) {
            let minus_slot = slots[st.state.minus];
            let new_minus =
                branches::normalise(&mut points, &mut pair_points, minus_slot, &reference);
            minus_override = Some(new_minus);
        }
        let paired = started.as_ref().is_some_and(|s| s.state.members.len() == 2);

        // The half cycle's cutoff: the coalescence point from the closest approach seen while
        // tracking, from the start, or from the classical cutoff trajectory, the first that
        // passes the check against the classical cutoff.
        let mut cutoff = HalfCycleCutoff {
            classical: group.peak,
            classical_energy: group.peak.map(|p| pair.ip_rec + p.energy),
            quantum: None,
            rejected: None,
        };
        let transverse = field.linear_axis().is_none();
        let continued = if paired && transverse {
            started
                .as_ref()
                .and_then(|s| s.coalescence)
                .filter(|_| started.as_ref().is_some_and(|s| s.from_transverse))
                .or_else(|| start::transverse_coalescence(&ctx, group))
        } else {
            None
        };
        if let Some(c) = continued {
            // Continued from the linear projection, where it was checked.
            cutoff.quantum = Some(c);
        } else if let (true, Some(peak)) = (paired, group.peak) {
            let mut candidates: Vec<Coalescence> = Vec::new();
            if let Some(c) = closest.filter(|c| c.omega < max_energy) {
                candidates.push(coalescence::solve(
                    field, pair, c.omega, c.t_ret, c.t_ion, scale,
                ));
            }
            if let Some(c) = started.as_ref().and_then(|s| s.coalescence) {
                candidates.push(c);
            }
            for c in candidates {
                if coalescence::plausible(&c, pair, &peak, &group.window, omega, table.pulse) {
                    cutoff.quantum = Some(c);
                    break;
                }
                if c.converged && cutoff.rejected.is_none() {
                    cutoff.rejected = Some(c);
                }
            }
            if cutoff.quantum.is_none() {
                let (found, rejected) = start::find_coalescence(&ctx, group, &peak);
                cutoff.quantum = found;
                cutoff.rejected = cutoff.rejected.or(rejected);
            }
        }
        // Far past the half cycle's own cutoff a family that could not be continued is
        // labelled, not counted as failed.
        if let Some(top) = cutoff.estimate(pair) {
            for (k, &e) in energies.iter().enumerate() {
                if e > REQUIRED_REACH * top {
                    for slot in points.iter_mut() {
                        if let OrbitPoint::Failed(f) = &mut slot[k]
                            && f.reason.is_failure()
                        {
                            f.reason = FailureReason::BeyondHalfCycleCutoff;
                        }
                    }
                }
            }
        }
        // ζ continued along the sweep must agree with the checked coalescence point about the
        // side of the cutoff, except close to it: near Ω_c, ζ ≈ c·(Ω_c − Ω) changes the sign of
        // its real part where arg(Ω_c − Ω) = π/2 − arg c, within a few |Im Ω_c| of Re Ω_c; a
        // disagreement deep in the plateau or far beyond is a ζ on a wrong cube root.
        if let Some(c) = cutoff.quantum {
            let margin = 0.5 * omega + 4.0 * c.omega.im.abs();
            for (k, pp) in pair_points.iter_mut().enumerate() {
                if let Some(z) = pp {
                    let side_zeta = z.beyond_cutoff();
                    let side_omega = energies[k] > c.omega.re;
                    if side_zeta != side_omega && (energies[k] - c.omega.re).abs() > margin {
                        *pp = None;
                    }
                }
            }
        }
        let first = table.families.len();
        let pair_index = paired.then_some(table.pairs.len());
        let method = started.as_ref().map(|s| s.method);
        let filled: Vec<bool> = labels
            .iter()
            .map(|l| started.as_ref().is_some_and(|s| s.labels.contains(l)))
            .collect();
        for ((label, pts), has) in labels.iter().zip(points).zip(filled) {
            table.families.push(Family {
                label: *label,
                half_cycle: group.half_cycle,
                crest: group.crest,
                points: pts,
                pair: pair_index,
                cutoff,
                start: if has { method } else { None },
            });
        }
        if let Some(st) = started.as_ref().filter(|_| paired) {
            // Set below once the families are in the table.
            // Slot order is (long, short) = (first, first + 1); "−" is the member with the
            // larger Re Φ at the start.
            let minus_label = st.labels[st.state.minus];
            let minus = first
                + minus_override
                    .unwrap_or_else(|| labels.iter().position(|l| *l == minus_label).unwrap_or(0));
            let plus = if minus == first { first + 1 } else { first };
            table.pairs.push(FamilyPair {
                minus,
                plus,
                points: pair_points,
                coalescence: cutoff.quantum,
            });
            // Where neither member may be summed (both growing), the uniform formula has no
            // decaying saddle to approach: the pair point is dropped so that the plain sum with
            // these exclusions is used.
            let p = table.pairs.len() - 1;
            for k in 0..n {
                let growing = |f: usize| {
                    matches!(
                        table.exclusion(f, k),
                        Some(Exclusion::GrowingAmplitude | Exclusion::GrowingBeyondCutoff)
                    )
                };
                if growing(minus) && growing(plus) {
                    table.pairs[p].points[k] = None;
                }
            }
        }
    }
    Ok(table)
}
