//! The sweep cases and an audit of one orbit table, shared by `examples/orbit_sweep` and
//! `tests/pulse_and_ellipticity_sweep.rs`.
//!
//! The audit counts, independently of the library's own labels where it can:
//! - **failed**: points that are failures ([`OrbitPoint::is_failure`]);
//! - **growing**: saddles summed as physical although their amplitude grows — `Im Φ < 0`, or,
//!   more than ω past their own half cycle's cutoff, `Im Φ` decreasing from one grid energy to
//!   the next (the definition of a growing member beyond the cutoff, physics notes §2.2), or
//!   smaller than the partner's there;
//! - the points labelled as not existing (by reason) and the saddles excluded (by reason).
#![allow(dead_code)]

use holecast::cutoff::half_cycle_cutoffs;
use holecast::dipole::{SaddleSum, continuum_kernel, kernels};
use holecast::field::{Colour, Envelope, Field, Polarization};
use holecast::orbits::{
    ChannelPair, FailureReason, OrbitPoint, OrbitSettings, OrbitTable, StartMethod, solve_orbits,
};
use holecast::units::{ev_to_au, intensity_to_peak_field, wavelength_nm_to_omega};

/// Channel energies (eV): hydrogen and the demo targets' channels (channels/*.json).
pub const HYDROGEN: f64 = 13.6;
/// Linear triatomic demo (X, A, B; all coupled).
pub const TRIATOMIC: [f64; 3] = [13.8, 17.6, 18.1];
/// Bent triatomic demo (X, A; coupled).
pub const BENT: [f64; 2] = [12.6, 14.7];

/// Every channel pair (ionize, recombine) of hydrogen and the two coupled demo targets, in eV.
pub fn all_pairs() -> Vec<(f64, f64)> {
    let mut out = vec![(HYDROGEN, HYDROGEN)];
    for set in [&TRIATOMIC[..], &BENT[..]] {
        for &a in set {
            for &b in set {
                out.push((a, b));
            }
        }
    }
    out
}

/// A sin² pulse, linear along z.
pub fn pulse(fwhm_fs: f64, cep_deg: f64, intensity: f64, wavelength: f64) -> Field {
    Field::new(
        &[Colour {
            omega: wavelength_nm_to_omega(wavelength),
            peak_field: intensity_to_peak_field(intensity),
            phase: cep_deg.to_radians(),
            polarization: Polarization::Linear { angle: 0.0 },
        }],
        Envelope::Sin2 {
            fwhm: holecast::units::fs_to_au(fwhm_fs),
        },
    )
    .expect("valid pulse")
}

/// A continuous elliptical field (ε = 0 is linear).
pub fn elliptical(eps: f64, intensity: f64, wavelength: f64) -> Field {
    Field::new(
        &[Colour {
            omega: wavelength_nm_to_omega(wavelength),
            peak_field: intensity_to_peak_field(intensity),
            phase: 0.0,
            polarization: if eps == 0.0 {
                Polarization::Linear { angle: 0.0 }
            } else {
                Polarization::Elliptical {
                    ellipticity: eps,
                    major_axis: 0.0,
                }
            },
        }],
        Envelope::Continuous,
    )
    .expect("valid field")
}

/// What the audit of one table found.
#[derive(Clone, Debug, Default)]
pub struct Audit {
    /// (family, energy) points.
    pub points: usize,
    /// Failures.
    pub failed: usize,
    /// Growing saddles summed as physical.
    pub growing: usize,
    /// Points beyond a pair's cutoff where the uniform (Airy) pair sum exceeds three times the
    /// plain contribution of the decaying member (the uniform sum growing instead of decaying).
    pub uniform_growing: usize,
    /// Points labelled as not existing: below threshold, no classical return, far past the
    /// half cycle's cutoff.
    pub labelled: [usize; 4],
    /// Solved saddles excluded from the sums (outside the pulse, growing).
    pub excluded: usize,
    /// First problems, for the report.
    pub notes: Vec<String>,
    /// Strongest half cycle: classical and quantum cutoff (a.u.).
    pub classical: f64,
    /// Quantum cutoff of the strongest half cycle, if found.
    pub quantum: Option<f64>,
    /// Families per start method: classical pair, coalescence, transverse continuation, lone,
    /// not started.
    pub starts: [usize; 5],
}

impl Audit {
    /// Adds another audit's counts.
    pub fn add(&mut self, o: &Audit) {
        self.points += o.points;
        self.failed += o.failed;
        self.growing += o.growing;
        self.uniform_growing += o.uniform_growing;
        for i in 0..4 {
            self.labelled[i] += o.labelled[i];
        }
        self.excluded += o.excluded;
        for i in 0..5 {
            self.starts[i] += o.starts[i];
        }
        for n in &o.notes {
            if self.notes.len() < 3 {
                self.notes.push(n.clone());
            }
        }
    }
}

/// Audits one table (see the module documentation).
pub fn audit_table(t: &OrbitTable) -> Audit {
    let mut a = Audit {
        points: t.families.len() * t.energies.len(),
        failed: t.failed_points(),
        ..Audit::default()
    };
    let w = t.omega;
    let mut order: Vec<usize> = (0..t.energies.len()).collect();
    order.sort_by(|&x, &y| t.energies[x].total_cmp(&t.energies[y]));
    let partner_of = |f: usize| {
        t.families[f].pair.map(|p| {
            let pr = &t.pairs[p];
            if pr.minus == f { pr.plus } else { pr.minus }
        })
    };
    for fam in &t.families {
        let slot = match fam.start {
            Some(StartMethod::ClassicalPair) => 0,
            Some(StartMethod::Coalescence) => 1,
            Some(StartMethod::TransverseContinuation) => 2,
            Some(StartMethod::Lone) => 3,
            None => 4,
        };
        a.starts[slot] += 1;
    }
    for (f, fam) in t.families.iter().enumerate() {
        let own = fam.cutoff.estimate(t.pair);
        let margin = fam.cutoff.quantum.map_or(w, |c| w + 2.0 * c.omega.im.abs());
        let other = partner_of(f);
        // Im Φ of this member and the pair's mean (or None) at the previous summed energy.
        let mut previous: Option<(f64, f64, Option<f64>)> = None;
        for &k in &order {
            let e = t.energies[k];
            let s = match &fam.points[k] {
                OrbitPoint::Failed(fl) => {
                    match fl.reason {
                        FailureReason::BelowThreshold => a.labelled[0] += 1,
                        FailureReason::NoClassicalReturn => a.labelled[1] += 1,
                        FailureReason::BeyondHalfCycleCutoff => a.labelled[2] += 1,
                        FailureReason::ReturnsAfterPulse => a.labelled[3] += 1,
                        _ => {
                            if a.notes.len() < 3 {
                                a.notes.push(format!(
                                    "{} hc{} failed at {:.3} eV: {}",
                                    fam.label,
                                    fam.half_cycle,
                                    holecast::units::au_to_ev(e),
                                    fl.reason
                                ));
                            }
                        }
                    }
                    previous = None;
                    continue;
                }
                OrbitPoint::Solved(s) => s,
            };
            if !t.is_physical(f, k) {
                a.excluded += 1;
                previous = None;
                continue;
            }
            let partner = other.and_then(|o| t.families[o].points[k].saddle().map(|p| (o, p)));
            let mean = partner.map(|(_, p)| 0.5 * (p.action.im + s.action.im));
            let beyond = own.is_some_and(|c| e > c + margin);
            let mut why = None;
            if s.action.im < 0.0 {
                why = Some("Im Φ < 0");
            } else if beyond {
                if let Some((o, p)) = partner {
                    if t.is_physical(o, k) {
                        why = Some("both members summed beyond the cutoff");
                    } else if t.inside_pulse(o, k) && p.action.im > s.action.im {
                        why = Some("smaller Im Φ than its partner beyond the cutoff");
                    }
                }
                if let Some((pe, pim, pmean)) = previous
                    && why.is_none()
                {
                    let rise = s.action.im - pim;
                    let reference = match (pmean, mean) {
                        (Some(m0), Some(m1)) => Some(m1 - m0),
                        _ => fam.cutoff.quantum.map(|c| c.t_ret.im * (e - pe)),
                    };
                    if reference.is_some_and(|r| rise < r - 1e-9) {
                        why = Some("Im Φ falls relative to the pair's mean beyond the cutoff");
                    }
                }
            }
            if let Some(why) = why {
                a.growing += 1;
                if a.notes.len() < 3 {
                    a.notes.push(format!(
                        "{} hc{} summed at {:.3} eV: {why} (Im Φ {:.3})",
                        fam.label,
                        fam.half_cycle,
                        holecast::units::au_to_ev(e),
                        s.action.im
                    ));
                }
            }
            previous = beyond.then_some((e, s.action.im, mean));
        }
    }
    // The uniform pair sum beyond the cutoff: it must approach the decaying member's plain
    // contribution (DLMF §9.7: Ai(x) ~ e^{−(2/3)x^{3/2}}/(2√π x^{1/4})), never grow past it.
    let kern = kernels(t, SaddleSum::Uniform, 0.0);
    for (p, pr) in t.pairs.iter().enumerate() {
        let own = t.families[pr.minus].cutoff.estimate(t.pair);
        let margin = pr.coalescence.map_or(w, |c| w + 2.0 * c.omega.im.abs());
        for k in 0..t.energies.len() {
            let (Some(m), Some(pl)) = (
                t.families[pr.minus].points[k].saddle(),
                t.families[pr.plus].points[k].saddle(),
            ) else {
                continue;
            };
            if pr.points[k].is_none()
                || !own.is_some_and(|c| t.energies[k] > c + margin)
                || !(t.inside_pulse(pr.minus, k) && t.inside_pulse(pr.plus, k))
            {
                continue;
            }
            let kept = if m.action.im >= pl.action.im { m } else { pl };
            let plain = continuum_kernel(kept, 0.0).norm();
            let uniform = (kern.values[pr.minus][k].value + kern.values[pr.plus][k].value).norm();
            if uniform > 3.0 * plain {
                a.uniform_growing += 1;
                if a.notes.len() < 3 {
                    a.notes.push(format!(
                        "pair {p} hc{}: uniform sum {uniform:.3e} vs decaying member {plain:.3e} \
                         at {:.3} eV",
                        t.families[pr.minus].half_cycle,
                        holecast::units::au_to_ev(t.energies[k])
                    ));
                }
            }
        }
    }
    a
}

/// Solves the channel pair `(ip_ion, ip_rec)` (eV) in `field` on `n + 1` energies from just
/// above the recombination threshold to 20% past the field's cutoff (that of its strongest
/// half cycle) and audits the table.
pub fn audit_case(field: &Field, ip_ion_ev: f64, ip_rec_ev: f64, n: usize) -> Audit {
    let pair = ChannelPair::new(ev_to_au(ip_ion_ev), ev_to_au(ip_rec_ev));
    let settings = OrbitSettings::default();
    let report = match half_cycle_cutoffs(field, pair, &settings) {
        Ok(r) => r,
        Err(e) => {
            return Audit {
                points: 1,
                failed: 1,
                notes: vec![format!("cutoffs: {e}")],
                ..Audit::default()
            };
        }
    };
    let c = report.cutoffs;
    let top = 1.2 * c.quantum.unwrap_or(c.classical + 0.32 * pair.ip_ion);
    let lo = pair.ip_rec + 0.02 * field.omega();
    let grid: Vec<f64> = (0..=n)
        .map(|k| lo + (top - lo) * k as f64 / n as f64)
        .collect();
    let table = match solve_orbits(field, pair, &grid, &settings) {
        Ok(t) => t,
        Err(e) => {
            return Audit {
                points: 1,
                failed: 1,
                notes: vec![format!("orbits: {e}")],
                ..Audit::default()
            };
        }
    };
    let mut a = audit_table(&table);
    for note in a.notes.iter_mut() {
        *note = format!("({ip_ion_ev}→{ip_rec_ev} eV) {note}");
    }
    a.classical = c.classical;
    a.quantum = c.quantum;
    if c.quantum.is_none() {
        a.notes
            .push("no quantum cutoff for the strongest half cycle".into());
    }
    a
}
