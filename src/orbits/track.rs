//! Continuation of quantum-orbit families along the photon energy Ω.
//!
//! A family is carried from one energy to the next by a tangent predictor,
//! `d(t_r, t_i)/dΩ = J⁻¹(0, 1)ᵀ = (−Φ_ii, Φ_ri)/det Φ''`, and a Newton corrector. The short and
//! long members of a pair are stepped together: a step is accepted only if both converge, the
//! predicted move and the correction are small compared with the distance between the two
//! saddles, and the Airy variable ζ of the pair is unambiguous; otherwise the step is halved.
//! This keeps every family on its own branch through the near-coalescence at the cutoff.
//!
//! Branches chosen by continuity (DESIGN §4.3, physics notes §2.3):
//! - `sqrt(−det Φ'')`: principal value at the family's start (mid-plateau), then the root
//!   nearest the previous one at each step.
//! - `ζ`, `√ζ`, `ζ^{1/4}` of a pair: see [`super::airy_branch`]; "−" is the member with the
//!   larger Re Φ at the start (the short orbit for HHG).

use num_complex::Complex64;

use super::airy_branch::ZetaBranch;
use super::equations::{ChannelPair, SaddleEval};
use super::newton::{self, NewtonSettings};
use super::{Failure, FailureReason, OrbitPoint, PairPoint, Saddle};
use crate::cmath::modulus;
use crate::field::Field;

/// One member of a group being continued.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Member {
    pub t_ret: Complex64,
    pub t_ion: Complex64,
    pub eval: SaddleEval,
    pub root: Complex64,
    pub iterations: u32,
    pub residual: f64,
}

impl Member {
    pub fn new(
        t_ret: Complex64,
        t_ion: Complex64,
        eval: SaddleEval,
        iterations: u32,
        residual: f64,
    ) -> Self {
        let root = crate::cmath::sqrt(-eval.det_hessian());
        Member {
            t_ret,
            t_ion,
            eval,
            root,
            iterations,
            residual,
        }
    }

    fn tangent(&self) -> (Complex64, Complex64) {
        let d = self.eval.det_hessian();
        let [_, ri, ii] = self.eval.hessian;
        (-ii / d, ri / d)
    }

    pub fn distance(&self, other: &Member) -> f64 {
        modulus(self.t_ret - other.t_ret).max(modulus(self.t_ion - other.t_ion))
    }

    pub fn saddle(&self, field: &Field) -> Saddle {
        Saddle {
            e_exit: field.electric_at_real(self.t_ion.re),
            t_ret: self.t_ret,
            t_ion: self.t_ion,
            action: self.eval.action,
            tau: self.eval.tau,
            v_ret: self.eval.v_ret,
            v_ion: self.eval.v_ion,
            e_ret: self.eval.e_ret,
            e_ion: self.eval.e_ion,
            det_hessian: self.eval.det_hessian(),
            hessian_root: self.root,
            iterations: self.iterations,
            residual: self.residual,
            width: self.eval.width,
        }
    }
}

/// `Δ = (Φ₋ − Φ₊)/2` of a pair.
pub(crate) fn half_difference(minus: &Member, plus: &Member) -> Complex64 {
    0.5 * (minus.eval.action - plus.eval.action)
}

/// A group (one family, or the two members of a pair) at one photon energy.
#[derive(Clone, Debug)]
pub(crate) struct GroupState {
    pub omega: f64,
    pub members: Vec<Member>,
    /// Index of the "−" member (larger Re Φ at the start) when the group is a pair.
    pub minus: usize,
    pub zeta: Option<ZetaBranch>,
}

/// Settings of the continuation.
#[derive(Clone, Copy, Debug)]
pub(crate) struct TrackSettings {
    pub newton: NewtonSettings,
    pub max_step: f64,
    pub min_step: f64,
    /// Largest tolerable correction for a lone family (a.u. of time).
    pub lone_correction: f64,
}

/// Closest approach of the two members of a pair seen during a sweep.
#[derive(Clone, Copy, Debug)]
pub(crate) struct Closest {
    pub omega: f64,
    pub separation: f64,
    pub t_ret: Complex64,
    pub t_ion: Complex64,
}

/// One continuation step of `state` by `h`: the members at `state.omega + h` are written into
/// `next` (cleared first; a buffer reused across steps, so that a step allocates nothing), and
/// the pair's new Airy branch is returned.
fn try_step(
    field: &Field,
    pair: ChannelPair,
    state: &GroupState,
    h: f64,
    settings: &TrackSettings,
    next: &mut Vec<Member>,
) -> Result<Option<ZetaBranch>, FailureReason> {
    let omega = state.omega + h;
    let sep_old = if state.members.len() == 2 {
        state.members[0].distance(&state.members[1])
    } else {
        f64::INFINITY
    };
    next.clear();
    let mut corrections = [0.0_f64; 2];
    for (slot, m) in state.members.iter().enumerate() {
        let (dr, di) = m.tangent();
        let (pr, pi) = (m.t_ret + dr * h, m.t_ion + di * h);
        let predicted_move = h.abs() * modulus(dr).max(modulus(di));
        if predicted_move > 0.5 * sep_old {
            return Err(FailureReason::PredictorTooLong);
        }
        let out = newton::solve(field, pair, omega, pr, pi, &settings.newton);
        if !out.converged() {
            return Err(FailureReason::Newton(out.termination));
        }
        let correction = modulus(out.t_ret - pr).max(modulus(out.t_ion - pi));
        if let Some(c) = corrections.get_mut(slot) {
            *c = correction;
        }
        let mut member = Member::new(out.t_ret, out.t_ion, out.eval, out.iterations, out.residual);
        let r = member.root;
        member.root = if modulus(r - m.root) <= modulus(-r - m.root) {
            r
        } else {
            -r
        };
        next.push(member);
    }
    let corrections = &corrections[..state.members.len().min(2)];
    if next.len() == 2 {
        let sep_new = next[0].distance(&next[1]);
        let limit = 0.25 * sep_old.min(sep_new);
        if sep_new == 0.0 || corrections.iter().any(|&c| c > limit) {
            return Err(FailureReason::BranchCollision);
        }
        let minus = &next[state.minus];
        let plus = &next[1 - state.minus];
        match state.zeta {
            Some(z) => Ok(Some(
                z.advance(half_difference(minus, plus), omega)
                    .ok_or(FailureReason::AmbiguousAiryBranch)?,
            )),
            None => Ok(None),
        }
    } else {
        if corrections.iter().any(|&c| c > settings.lone_correction) {
            return Err(FailureReason::PredictorTooLong);
        }
        Ok(None)
    }
}

/// Result of one sweep at one target: the members' points and the pair point.
pub(crate) struct TargetResult {
    pub index: usize,
    pub members: Vec<OrbitPoint>,
    pub pair: Option<PairPoint>,
}

/// Continues `start` through `targets` (pairs of output index and energy, in travel order).
pub(crate) fn sweep(
    field: &Field,
    pair: ChannelPair,
    start: &GroupState,
    targets: &[(usize, f64)],
    settings: &TrackSettings,
    closest: &mut Option<Closest>,
) -> Vec<TargetResult> {
    let mut state = start.clone();
    let mut spare: Vec<Member> = Vec::with_capacity(state.members.len());
    let mut h_cur = settings.max_step;
    let mut out = Vec::with_capacity(targets.len());
    for &(index, target) in targets {
        let mut reason = None;
        let mut tries = 0u32;
        while state.omega != target {
            let remaining = target - state.omega;
            let h = remaining.signum() * remaining.abs().min(h_cur);
            match try_step(field, pair, &state, h, settings, &mut spare) {
                Ok(zeta) => {
                    let omega = state.omega + h;
                    if spare.len() == 2 {
                        let sep = spare[0].distance(&spare[1]);
                        if closest.is_none_or(|c| sep < c.separation) {
                            let (a, b) = (&spare[0], &spare[1]);
                            *closest = Some(Closest {
                                omega,
                                separation: sep,
                                t_ret: 0.5 * (a.t_ret + b.t_ret),
                                t_ion: 0.5 * (a.t_ion + b.t_ion),
                            });
                        }
                    }
                    std::mem::swap(&mut state.members, &mut spare);
                    state.omega = omega;
                    state.zeta = zeta;
                    if h.abs() == remaining.abs() {
                        state.omega = target;
                    }
                    h_cur = (h_cur * 1.5).min(settings.max_step);
                }
                Err(r) => {
                    h_cur *= 0.5;
                    tries += 1;
                    if h_cur < settings.min_step || tries > 200 {
                        reason = Some(r);
                        break;
                    }
                }
            }
        }
        match reason {
            None => out.push(TargetResult {
                index,
                members: state
                    .members
                    .iter()
                    .map(|m| OrbitPoint::Solved(m.saddle(field)))
                    .collect(),
                pair: state.zeta.map(|z| PairPoint {
                    zeta: z.zeta,
                    zeta_sqrt: z.sqrt,
                    zeta_quarter: z.quarter,
                }),
            }),
            Some(r) => {
                let fail = |m: &Member| {
                    OrbitPoint::Failed(Failure {
                        reason: r,
                        iterations: settings.newton.max_iterations,
                        residual: m.residual,
                    })
                };
                out.push(TargetResult {
                    index,
                    members: state.members.iter().map(fail).collect(),
                    pair: None,
                });
                h_cur = settings.max_step;
            }
        }
    }
    out
}

/// Whether a Newton outcome counts as a physical start: converged, Im t_i > 0, Re τ > 0.
pub(crate) fn physical_start(out: &newton::NewtonOutcome) -> Result<(), FailureReason> {
    if !out.converged() {
        return Err(FailureReason::Newton(out.termination));
    }
    if out.t_ion.im <= 0.0 || out.eval.tau.re <= 0.0 {
        return Err(FailureReason::Unphysical);
    }
    Ok(())
}
