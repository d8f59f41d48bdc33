//! The common photon-energy grid of a scan: every point is computed on the same grid so that
//! the points line up in the arrays.
//!
//! The grid is in harmonic orders of the first colour (`order`, the default) or in photon
//! energies (`energy_ev`; the natural choice when the wavelength is scanned). The default grid
//! runs from the first step above the lowest ionization potential of any point to 20% past the
//! highest cutoff estimate of any point, `E_max + 1.32 Ip` with `E_max` the largest classical
//! return energy of the point's field (3.17 Up for one linear colour: Corkum, PRL 71, 1994
//! (1993)) and `1.32 Ip` the quantum correction of Lewenstein et al., PRA 49, 2117 (1994). The
//! `spectrum` command searches the quantum cutoff instead; the scan uses the formula so that
//! the grid is known before any point runs. Steps: 1 order for periodic fields, 0.1 for pulses
//! (as `spectrum`), 0.5 eV for energy grids; odd orders only (step 2) when every point's field
//! is half-wave symmetric and its target inversion-symmetric (the even orders vanish there; the
//! rule of [`crate::grid`]).

use serde::{Deserialize, Serialize};

use super::definition::ScanDefinition;
use super::error::ScanError;
use crate::field::TimeStructure;
use crate::orbits::{OrbitSettings, WorkLimits, budget};
use crate::units;

/// Unit of the grid.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum GridKind {
    /// Harmonic orders Ω/ω of the first colour at each point.
    Order,
    /// Photon energies (eV).
    EnergyEv,
}

impl GridKind {
    /// The unit's name in outputs.
    pub fn name(self) -> &'static str {
        match self {
            GridKind::Order => "order",
            GridKind::EnergyEv => "energy_ev",
        }
    }
}

/// The grid as written in a scan file: `{"unit": "order", "from": 9, "to": 41, "step": 2}`.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct GridFile {
    /// `order` or `energy_ev`.
    pub unit: GridKind,
    /// First value.
    pub from: f64,
    /// Last value (included when it falls on the grid).
    pub to: f64,
    /// Step (positive).
    pub step: f64,
}

/// A resolved grid.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
pub struct GridSpec {
    /// Unit.
    pub kind: GridKind,
    /// Values.
    pub values: Vec<f64>,
}

fn points(from: f64, to: f64, step: f64) -> Vec<f64> {
    let n = ((to - from) / step + 1e-9).floor() as usize;
    (0..=n).map(|k| from + step * k as f64).collect()
}

/// The grid of a definition: the file's (checked) or the default one (module documentation).
///
/// # Errors
/// A grid that is empty, runs backwards, starts at or below zero or has more points than the
/// work limits allow; a default grid when no point's field can be built.
pub fn resolve(
    definition: &ScanDefinition,
    given: Option<&GridFile>,
    limits: &WorkLimits,
) -> Result<GridSpec, ScanError> {
    if let Some(g) = given {
        for (k, v) in [("from", g.from), ("to", g.to), ("step", g.step)] {
            if !v.is_finite() || v <= 0.0 {
                return Err(ScanError::invalid(
                    format!("grid.{k}"),
                    v,
                    "must be a positive finite number",
                ));
            }
        }
        if g.to < g.from {
            return Err(ScanError::invalid(
                "grid.to",
                g.to,
                "must not be below grid.from",
            ));
        }
        if g.unit == GridKind::Order && g.from < 0.01 {
            return Err(ScanError::invalid(
                "grid.from",
                g.from,
                "harmonic orders below 0.01 are outside the model",
            ));
        }
        budget::check_grid(g.from, g.to, g.step, limits)
            .map_err(|e| ScanError::invalid("grid", format!("{g:?}"), e.to_string()))?;
        return Ok(GridSpec {
            kind: g.unit,
            values: points(g.from, g.to, g.step),
        });
    }
    let varies_wavelength = definition
        .axes
        .iter()
        .any(|a| a.address.ends_with("wavelength_nm") || a.address.ends_with("harmonic_of_first"));
    let kind = if varies_wavelength {
        GridKind::EnergyEv
    } else {
        GridKind::Order
    };
    let settings = OrbitSettings {
        limits: *limits,
        ..OrbitSettings::default()
    };
    let (mut lowest, mut highest, mut pulse) = (f64::INFINITY, 0.0_f64, false);
    // Odd orders only when every point's field is half-wave symmetric with period T₁ and its
    // target inversion-symmetric: the rule of the `spectrum` default grid ([`crate::grid`]).
    let mut odd_only = true;
    for index in 0..definition.point_count() {
        let Ok((target, laser)) = definition.point_documents(index) else {
            continue;
        };
        let (Ok(target), Ok(field)) = (target.validate(), laser.to_field()) else {
            continue;
        };
        let ips = target.channels.iter().map(|c| c.ip);
        let (ip_min, ip_max) = ips.fold((f64::INFINITY, 0.0_f64), |(a, b), ip| {
            (a.min(ip), b.max(ip))
        });
        let returns = crate::cutoff::classical_return_maximum(&field, &settings)
            .unwrap_or(3.17 * field.ponderomotive_energy());
        let top = 1.2 * (returns + 1.32 * ip_max);
        let scale = match kind {
            GridKind::Order => field.omega(),
            GridKind::EnergyEv => units::ev_to_au(1.0),
        };
        lowest = lowest.min(ip_min / scale);
        highest = highest.max(top / scale);
        pulse |= matches!(field.structure(), TimeStructure::Pulse { .. });
        let one_period = match field.structure() {
            TimeStructure::Periodic { period } => {
                (period * field.omega() / (2.0 * std::f64::consts::PI) - 1.0).abs() < 1e-9
            }
            TimeStructure::Pulse { .. } => false,
        };
        odd_only &=
            one_period && field.half_wave_symmetric() && crate::grid::inversion_symmetric(&target);
    }
    if !lowest.is_finite() {
        return Err(ScanError::invalid(
            "grid",
            "default",
            "no point of the scan has a valid target and laser, so no default grid: give \
             \"grid\" (or --orders/--energies) or fix the documents",
        ));
    }
    let step = match (kind, pulse) {
        (GridKind::Order, false) => 1.0,
        (GridKind::Order, true) => 0.1,
        (GridKind::EnergyEv, _) => 0.5,
    };
    let mut first = (lowest / step).floor() * step + step;
    let odd = odd_only && kind == GridKind::Order;
    let step = if odd {
        if first % 2.0 == 0.0 {
            first += 1.0;
        }
        2.0
    } else {
        step
    };
    let last = highest.max(first + step);
    budget::check_grid(first, last, step, limits).map_err(|e| {
        ScanError::invalid(
            "grid",
            format!("default {} {first}..{last} step {step}", kind.name()),
            format!("{e}; choose a grid"),
        )
    })?;
    Ok(GridSpec {
        kind,
        values: points(first, last, step),
    })
}

/// Parses the command-line grid `FIRST:LAST:STEP`.
///
/// # Errors
/// Not three numbers.
pub fn from_flag(kind: GridKind, option: &str, text: &str) -> Result<GridFile, ScanError> {
    let parts: Vec<&str> = text.split(':').collect();
    let bad = || ScanError::invalid(option, text, "expected FIRST:LAST:STEP, e.g. 11:45:1");
    if parts.len() != 3 {
        return Err(bad());
    }
    let n = |s: &str| s.trim().parse::<f64>().map_err(|_| bad());
    Ok(GridFile {
        unit: kind,
        from: n(parts[0])?,
        to: n(parts[1])?,
        step: n(parts[2])?,
    })
}
