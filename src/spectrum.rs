//! Harmonic spectra of one channel: dipole, power, phase, emission times and group delays,
//! resolved by quantum-orbit family.
//!
//! For a periodic field the saddles of one full period (every crest, so both half cycles of a
//! linear field) are summed; at `Ω = qω` this is the amplitude of harmonic line `q` per cycle,
//! and between lines it is the single-cycle transform (DESIGN §4.8). For a pulse every crest
//! above the discovery threshold is summed, giving a continuous `D(Ω)`.
//!
//! Per energy the spectrum reports `|D|²`, the emitted power `Ω⁴|D|²` (dipole form, arbitrary
//! overall constant), the harmonic phase `arg(ê·D)` of the component along the driving
//! polarization `ê`, and the group delay `dφ/dΩ` computed by a central difference over
//! `Ω ± δ` with freshly solved saddles at both ends. For one saddle the stationary-phase identity
//! gives `dφ/dΩ ≈ Re t_r` (physics notes §6.3); the two are reported separately so that a user
//! can see where the prefactors move the emission time.

use nalgebra::Vector3;
use num_complex::Complex64;

use crate::dipole::{KernelKind, SaddleSum, kernels};
use crate::error::{Error, Result};
use crate::field::{CVec3, Field};
use crate::ionization::IonizationModel;
use crate::orbits::{
    ChannelPair, FamilyLabel, OrbitPoint, OrbitSettings, OrbitTable, solve_orbits,
};
use crate::recombination::RecombinationModel;

/// Structure models of one channel.
#[derive(Clone, Debug)]
pub struct ChannelModels {
    /// Ionization potential (a.u.).
    pub ip: f64,
    /// Ionization model.
    pub ionization: IonizationModel,
    /// Recombination model.
    pub recombination: RecombinationModel,
}

/// Settings of a spectrum calculation.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SpectrumSettings {
    /// Uniform or plain saddle sum.
    pub sum: SaddleSum,
    /// Regulator ε of the spreading factor (0 for saddle-point work).
    pub epsilon: f64,
    /// Trajectory-stage settings.
    pub orbits: OrbitSettings,
    /// Half-width δ of the group-delay difference, as a fraction of ω; `None` skips group delays.
    pub group_delay_step: Option<f64>,
}

impl Default for SpectrumSettings {
    fn default() -> Self {
        SpectrumSettings {
            sum: SaddleSum::Uniform,
            epsilon: 0.0,
            orbits: OrbitSettings::default(),
            group_delay_step: Some(1e-3),
        }
    }
}

/// The contribution of one quantum-orbit family.
#[derive(Clone, Debug)]
pub struct Contribution {
    /// Family label.
    pub label: FamilyLabel,
    /// Crest (half cycle) index.
    pub half_cycle: i32,
    /// Dipole vector per energy (None where the saddle failed).
    pub dipole: Vec<Option<CVec3>>,
    /// How its kernel was obtained, per energy.
    pub kind: Vec<KernelKind>,
    /// `dφ/dΩ` of this contribution alone (a.u.), where available.
    pub group_delay: Vec<Option<f64>>,
    /// `Re t_r` of the saddle (a.u.), where solved.
    pub emission_time: Vec<Option<f64>>,
}

/// A harmonic spectrum with its family contributions.
#[derive(Clone, Debug)]
pub struct Spectrum {
    /// Reference angular frequency ω (a.u.): order = Ω/ω.
    pub omega: f64,
    /// Photon energies Ω (a.u.).
    pub energies: Vec<f64>,
    /// Driving polarization axis ê (phase reference).
    pub axis: Vector3<f64>,
    /// How saddles were summed.
    pub sum: SaddleSum,
    /// Total dipole `D(Ω)` per energy.
    pub total: Vec<CVec3>,
    /// `dφ/dΩ` of the total (a.u.).
    pub group_delay: Vec<Option<f64>>,
    /// Whether every family contributed at the energy (no failed saddle).
    pub complete: Vec<bool>,
    /// Family contributions.
    pub contributions: Vec<Contribution>,
    /// The trajectory stage on the energy grid (for orbit tables and diagnostics).
    pub orbits: OrbitTable,
}

impl Spectrum {
    /// `|D|²` at energy index `k`.
    pub fn intensity(&self, k: usize) -> f64 {
        self.total[k].iter().map(|c| c.norm_sqr()).sum()
    }

    /// Largest `|D|²` over the energies.
    pub fn intensity_max(&self) -> f64 {
        (0..self.energies.len())
            .map(|k| self.intensity(k))
            .fold(0.0, f64::max)
    }

    /// Emitted power `Ω⁴|D|²` at energy index `k` (arbitrary units).
    pub fn power(&self, k: usize) -> f64 {
        self.energies[k].powi(4) * self.intensity(k)
    }

    /// Harmonic phases `arg(ê·D)` (rad) at every energy (see [`phases`]).
    pub fn phases(&self) -> Vec<Option<f64>> {
        phases(&self.total, &self.axis)
    }
}

/// Harmonic phases `arg(ê·D)` (rad) of a dipole series; `None` where `|ê·D|` is below
/// [`NEGLIGIBLE`] times the series' largest (the phase of rounding noise is meaningless, e.g. at
/// the even harmonics of a centrosymmetric target).
pub fn phases(total: &[CVec3], axis: &Vector3<f64>) -> Vec<Option<f64>> {
    let values: Vec<Complex64> = total.iter().map(|d| project(axis, d)).collect();
    let largest = values.iter().map(|d| d.norm()).fold(0.0, f64::max);
    values
        .iter()
        .map(|d| (largest > 0.0 && d.norm() >= NEGLIGIBLE * largest).then(|| d.arg()))
        .collect()
}

/// The solved grid for group delays: `Ω − δ, Ω, Ω + δ` for every requested energy with
/// `δ = step·ω`, or the energies themselves when `step` is None. Returns (stride, δ, grid).
pub fn group_delay_grid(
    energies: &[f64],
    step: Option<f64>,
    omega: f64,
) -> Result<(usize, Option<f64>, Vec<f64>)> {
    match step {
        Some(step) => {
            if !(step.is_finite() && step > 0.0 && step < 0.5) {
                return Err(Error::invalid(
                    "group-delay step",
                    step,
                    "must lie in (0, 0.5) harmonic orders",
                ));
            }
            let d = step * omega;
            let mut g = Vec::with_capacity(3 * energies.len());
            for &e in energies {
                g.extend([e - d, e, e + d]);
            }
            Ok((3, Some(d), g))
        }
        None => Ok((1, None, energies.to_vec())),
    }
}

/// Below this fraction of the spectrum's largest `|ê·D|` a phase is not meaningful (e.g. the
/// even harmonics of a centrosymmetric target, which cancel to rounding); group delays are then
/// not reported.
pub const NEGLIGIBLE: f64 = 1e-9;

/// `ê·D` for a real unit vector ê.
pub fn project(axis: &Vector3<f64>, d: &CVec3) -> Complex64 {
    d.x * axis.x + d.y * axis.y + d.z * axis.z
}

/// `dφ/dΩ` by a central difference of the phase from values at `Ω − δ`, `Ω` and `Ω + δ`;
/// None when any modulus is at or below `floor` (a phase of noise) or a value is not finite.
pub fn phase_derivative(
    lo: Complex64,
    hi: Complex64,
    centre: Complex64,
    delta: f64,
    floor: f64,
) -> Option<f64> {
    if lo.norm().min(hi.norm()).min(centre.norm()) <= floor || !lo.is_finite() || !hi.is_finite() {
        return None;
    }
    Some((hi / lo).arg() / (2.0 * delta))
}

/// The single-channel spectrum at photon energies `energies` (a.u.).
pub fn single_channel(
    field: &Field,
    channel: &ChannelModels,
    energies: &[f64],
    settings: &SpectrumSettings,
) -> Result<Spectrum> {
    channel.ionization.validate("ionization")?;
    channel.recombination.validate("recombination")?;
    let omega = field.omega();
    let (stride, _, grid) = group_delay_grid(energies, settings.group_delay_step, omega)?;
    let offset = stride / 2;
    let table = solve_orbits(
        field,
        ChannelPair::single(channel.ip),
        &grid,
        &settings.orbits,
    )?;
    let kern = kernels(&table, settings.sum, settings.epsilon);
    let axis = field.axis();
    let n = energies.len();
    let mut total = vec![CVec3::zeros(); grid.len()];
    let mut complete = vec![true; n];
    let mut contributions = Vec::with_capacity(table.families.len());
    for (f, family) in table.families.iter().enumerate() {
        let mut dipole = vec![None; grid.len()];
        for (i, p) in family.points.iter().enumerate() {
            let kv = kern.values[f][i];
            if let OrbitPoint::Solved(s) = p {
                let pre = channel.recombination.vector(&s.v_ret, table.energies[i])
                    * channel.ionization.factor(&s.v_ion, &s.e_ion, &s.e_exit);
                let d = pre * kv.value;
                total[i] += d;
                dipole[i] = Some(d);
            } else if i % stride == offset && p.is_failure() {
                complete[i / stride] = false;
            }
        }
        let central = |i: usize| i * stride + offset;
        let group_delay = (0..n)
            .map(|k| {
                let step = settings.group_delay_step?;
                let (lo, hi) = (dipole[central(k) - 1]?, dipole[central(k) + 1]?);
                let (lo, hi) = (project(&axis, &lo), project(&axis, &hi));
                phase_derivative(lo, hi, lo, step * omega, 0.0)
            })
            .collect();
        contributions.push(Contribution {
            label: family.label,
            half_cycle: family.half_cycle,
            dipole: (0..n).map(|k| dipole[central(k)]).collect(),
            kind: (0..n).map(|k| kern.values[f][central(k)].kind).collect(),
            group_delay,
            emission_time: (0..n)
                .map(|k| family.points[central(k)].saddle().map(|s| s.t_ret.re))
                .collect(),
        });
    }
    let largest = total
        .iter()
        .map(|d| project(&axis, d).norm())
        .fold(0.0, f64::max);
    let group_delay = (0..n)
        .map(|k| {
            let step = settings.group_delay_step?;
            let i = k * stride + offset;
            let (lo, hi) = (project(&axis, &total[i - 1]), project(&axis, &total[i + 1]));
            let centre = project(&axis, &total[i]);
            phase_derivative(lo, hi, centre, step * omega, NEGLIGIBLE * largest)
        })
        .collect();
    Ok(Spectrum {
        omega,
        energies: energies.to_vec(),
        axis,
        sum: settings.sum,
        total: (0..n).map(|k| total[k * stride + offset]).collect(),
        group_delay,
        complete,
        contributions,
        orbits: table.subsample(stride, offset),
    })
}
