//! One point of a scan: the documents of the point → the single-molecule spectrum on the
//! common grid → the numbers the scan keeps. [`evaluate_point`] is the one place a point is
//! computed, so that a detection layer (focal averaging, filters) can take its place.

use serde::{Deserialize, Serialize};

use super::definition::ScanDefinition;
use super::grid::GridKind;
use crate::multichannel::{self, MultichannelSettings, MultichannelSpectrum};
use crate::orbits::{OrbitSettings, WorkLimits};
use crate::report::spectrum::{family_key, pair_key};
use crate::units;
use crate::validity;
use crate::workload::{Workload, WorkloadLimits};

/// The limits a point runs under.
#[derive(Clone, Copy, Debug, Default)]
pub struct PointLimits {
    /// Trajectory stage.
    pub orbits: WorkLimits,
    /// Amplitude stage and memory.
    pub workload: WorkloadLimits,
}

/// One family's series at a point.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct FamilySeries {
    /// Channel pair, e.g. `X_to_A`.
    pub pair: String,
    /// Family and half cycle, e.g. `short_hc0`.
    pub family: String,
    /// `|D_family|²` per grid value (a.u.; None where the family has no value).
    pub yield_au: Vec<Option<f64>>,
    /// `Re t_r` (fs) per grid value.
    pub emission_time_fs: Vec<Option<f64>>,
    /// `dφ/dΩ` of the family (fs), when group delays are computed.
    pub group_delay_fs: Vec<Option<f64>>,
    /// The family's status code per grid value.
    pub status: Vec<String>,
}

/// A channel pair's series at a point.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct PairSeries {
    /// e.g. `X_to_A`.
    pub pair: String,
    /// `|D_pair|²` per grid value (a.u.).
    pub yield_au: Vec<Option<f64>>,
}

/// The spectrum of a point, reduced to what the scan keeps.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct PointSpectrum {
    /// Photon energy of the first colour (eV).
    pub omega_ev: f64,
    /// Photon energies of the grid at this point (eV).
    pub energy_ev: Vec<f64>,
    /// `|D|²` (a.u.) per grid value.
    pub yield_au: Vec<Option<f64>>,
    /// `Ω⁴|D|²` (arbitrary units).
    pub power: Vec<Option<f64>>,
    /// `arg(ê·D)` (rad), None where negligible.
    pub phase_rad: Vec<Option<f64>>,
    /// Row status per grid value (complete, partial, failed, below-threshold, no-orbits).
    pub row_status: Vec<String>,
    /// Channel pairs.
    pub pairs: Vec<PairSeries>,
    /// Families.
    pub families: Vec<FamilySeries>,
}

/// The outcome of a point: its spectrum, or why there is none.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(tag = "status", rename_all = "kebab-case", deny_unknown_fields)]
pub enum PointOutcome {
    /// Computed (rows may still be partial: see `row_status`).
    Computed {
        /// The spectrum.
        spectrum: PointSpectrum,
        /// Validity warning codes of the point (model outside its range), sorted, unique.
        warnings: Vec<String>,
    },
    /// Not computed: the documents are invalid or the work is over the limits.
    Failed {
        /// The error, as the single-spectrum command would print it.
        reason: String,
    },
}

impl PointOutcome {
    /// `computed` or `failed`.
    pub fn code(&self) -> &'static str {
        match self {
            PointOutcome::Computed { .. } => "computed",
            PointOutcome::Failed { .. } => "failed",
        }
    }
}

fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

fn norm2(v: &crate::field::CVec3) -> f64 {
    v.iter().map(|c| c.norm_sqr()).sum()
}

/// The multichannel settings of a scan (library defaults; the definition's returns and group
/// delays; the work limits).
pub fn settings(definition: &ScanDefinition, limits: &PointLimits) -> MultichannelSettings {
    let mut orbits = OrbitSettings::default();
    orbits.discovery.max_returns = definition.returns;
    orbits.limits = limits.orbits;
    MultichannelSettings {
        orbits,
        group_delays: if definition.group_delay {
            crate::spectrum::GroupDelays::Tangent
        } else {
            crate::spectrum::GroupDelays::Skip
        },
        ..MultichannelSettings::default()
    }
}

/// Computes point `index` of `definition`: applies its axis values to the documents, builds the
/// target and the field, estimates the work against `limits`, and runs the single-molecule
/// spectrum ([`multichannel::spectrum`]) on the common grid. Every error becomes
/// [`PointOutcome::Failed`] with its message: a point never disappears.
pub fn evaluate_point(
    definition: &ScanDefinition,
    index: usize,
    limits: &PointLimits,
) -> PointOutcome {
    match try_point(definition, index, limits) {
        Ok(o) => o,
        Err(reason) => PointOutcome::Failed { reason },
    }
}

fn try_point(
    definition: &ScanDefinition,
    index: usize,
    limits: &PointLimits,
) -> Result<PointOutcome, String> {
    let (target_spec, laser) = definition
        .point_documents(index)
        .map_err(|e| e.to_string())?;
    let target = target_spec.validate().map_err(|e| format!("target: {e}"))?;
    let field = laser.to_field().map_err(|e| format!("laser: {e}"))?;
    let channels = validity::channels_of(&target);
    validity::check_representable(&field, &channels).map_err(|e| e.to_string())?;
    let omega = field.omega();
    let energies: Vec<f64> = match definition.grid {
        GridKind::Order => definition.grid_values.iter().map(|q| q * omega).collect(),
        GridKind::EnergyEv => definition
            .grid_values
            .iter()
            .map(|e| units::ev_to_au(*e))
            .collect(),
    };
    let settings = settings(definition, limits);
    let work = Workload::estimate(&field, &target, energies.len(), &settings.orbits)
        .map_err(|e| e.to_string())?;
    work.check(&limits.workload).map_err(|e| e.to_string())?;
    let spectrum =
        multichannel::spectrum(&field, &target, &energies, &settings).map_err(|e| e.to_string())?;
    let mut warnings: Vec<String> = validity::field_warnings(&field, &channels)
        .into_iter()
        .chain(validity::grid_warnings(&field, &channels, &energies))
        .map(|w| {
            serde_json::to_value(w.code)
                .ok()
                .and_then(|v| v.as_str().map(str::to_string))
                .unwrap_or_default()
        })
        .collect();
    warnings.sort();
    warnings.dedup();
    Ok(PointOutcome::Computed {
        spectrum: reduce(&spectrum),
        warnings,
    })
}

/// The numbers the scan keeps of a spectrum.
pub fn reduce(s: &MultichannelSpectrum) -> PointSpectrum {
    let n = s.energies.len();
    let phases = s.phases();
    let pairs = (0..s.pairs.len())
        .map(|p| PairSeries {
            pair: pair_key(s, p),
            yield_au: s.pairs[p].dipole.iter().map(|d| finite(norm2(d))).collect(),
        })
        .collect();
    let mut families = Vec::new();
    for (p, pair) in s.pairs.iter().enumerate() {
        for c in &pair.families {
            families.push(FamilySeries {
                pair: pair_key(s, p),
                family: family_key(&c.label.to_string(), c.half_cycle),
                yield_au: c
                    .dipole
                    .iter()
                    .map(|d| d.as_ref().and_then(|d| finite(norm2(d))))
                    .collect(),
                emission_time_fs: c
                    .emission_time
                    .iter()
                    .map(|t| t.and_then(|t| finite(units::au_to_fs(t))))
                    .collect(),
                group_delay_fs: c
                    .group_delay
                    .iter()
                    .map(|t| t.and_then(|t| finite(units::au_to_fs(t))))
                    .collect(),
                status: c.status.iter().map(|st| st.code()).collect(),
            });
        }
    }
    PointSpectrum {
        omega_ev: units::au_to_ev(s.omega),
        energy_ev: s.energies.iter().map(|e| units::au_to_ev(*e)).collect(),
        yield_au: (0..n).map(|k| finite(s.intensity(k))).collect(),
        power: (0..n).map(|k| finite(s.power(k))).collect(),
        phase_rad: phases.into_iter().map(|p| p.and_then(finite)).collect(),
        row_status: s.status.iter().map(|r| r.code().to_string()).collect(),
        pairs,
        families,
    }
}
