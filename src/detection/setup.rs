//! The setup file: the beam, the medium and the detector (JSON; schema in docs/setup-file.md,
//! annotated example in `setups/demo-jet-after-focus.json`).
//!
//! Every key carries its unit; unknown keys are rejected with their name (serde
//! `deny_unknown_fields`); every value is checked and an error names the key path
//! (`medium.geometry.length_mm`), the value and the reason. Options that do not apply to the
//! chosen combination are errors, never silently ignored. Lab units become atomic units here.

use serde::{Deserialize, Serialize};

use super::beam::GaussianBeam;
use super::instrument::{Detector, Filter, Quantity, Resolution, Table};
use super::intensity_rule::{IntensityRule, MAX_SAMPLES};
use super::volume::Medium;
use crate::error::{Error, Result, require_finite, require_positive};
use crate::units::BOHR_M;

/// Default number of intensity samples.
pub const DEFAULT_SAMPLES: usize = 16;
/// Default number of Gauss–Legendre points along the axis.
pub const DEFAULT_AXIS_POINTS: usize = 64;
/// Default lowest intensity of the volume average, as a fraction of the medium's peak.
pub const DEFAULT_LOWEST_FRACTION: f64 = 0.1;
/// 1 Mb = 1e−18 cm².
const MEGABARN_CM2: f64 = 1e-18;

/// The beam section. Give `waist_um`, `rayleigh_length_mm` or `f_number` (diffraction-limited
/// beam at the laser's first wavelength), or both `waist_um` and `rayleigh_length_mm` (a beam
/// whose Rayleigh length is not that of a perfect TEM₀₀ mode).
#[derive(Clone, Debug, Default, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct BeamSpec {
    /// Free text for the reader.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub about: Option<String>,
    /// 1/e² intensity radius at the focus (µm).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub waist_um: Option<f64>,
    /// Rayleigh length (mm).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub rayleigh_length_mm: Option<f64>,
    /// Focusing f-number f/D (D: 1/e² diameter on the lens).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub f_number: Option<f64>,
}

/// Where the medium is (struct variants only: see [`crate::laser::PolarizationSpec`]).
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case", deny_unknown_fields)]
pub enum GeometrySpec {
    /// The whole focus filled with gas.
    Unbounded {},
    /// A slab (jet, cell) of given length centred at `position_mm` (> 0: after the focus).
    Slab {
        /// Centre relative to the focus (mm).
        position_mm: f64,
        /// Length along the beam (mm).
        length_mm: f64,
    },
    /// A slab thin against the Rayleigh length.
    ThinSlab {
        /// Centre relative to the focus (mm).
        position_mm: f64,
        /// Thickness (mm).
        thickness_mm: f64,
    },
}

/// How the emitters add up.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Combination {
    /// `n ∫ |dV/dI| |D|² dI` ([`super::incoherent`]).
    IncoherentVolume,
    /// The 1-D on-axis coherent sum ([`super::buildup`]).
    CoherentAxis,
}

/// A cross-section table.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct AbsorptionSpec {
    /// Free text (the source of the numbers).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub about: Option<String>,
    /// Photon energies (eV), ascending.
    pub energy_ev: Vec<f64>,
    /// Photoabsorption cross-sections (Mb = 1e−18 cm²).
    pub cross_section_mb: Vec<f64>,
}

/// The medium section.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct MediumSpec {
    /// Free text.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub about: Option<String>,
    /// Where the medium is.
    pub geometry: GeometrySpec,
    /// How the emitters add up.
    pub combination: Combination,
    /// Number density (cm⁻³).
    pub density_cm3: f64,
    /// Single-molecule runs (intensity samples).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub intensity_samples: Option<usize>,
    /// Lowest sampled intensity over the medium's peak (incoherent-volume only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub lowest_intensity_fraction: Option<f64>,
    /// Gauss–Legendre points along the axis (coherent-axis only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub axis_points: Option<usize>,
    /// `n − 1` of the neutral gas at the driver, at `density_cm3` (coherent-axis only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ir_refractivity: Option<f64>,
    /// `n − 1` of the neutral gas at the harmonics, at `density_cm3` (coherent-axis only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub xuv_refractivity: Option<f64>,
    /// Free-electron dispersion from the ADK rates over the pulse (coherent-axis only; needs a
    /// pulse envelope).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub free_electrons: Option<bool>,
    /// XUV absorption by the gas (coherent-axis only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub absorption: Option<AbsorptionSpec>,
}

/// A filter in the setup file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct FilterSpec {
    /// Name (used in messages and outputs).
    pub name: String,
    /// Free text (the source of the table).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub about: Option<String>,
    /// Photon energies (eV), ascending.
    pub energy_ev: Vec<f64>,
    /// Transmission of a foil of `table_thickness_nm` at those energies (0–1).
    pub transmission: Vec<f64>,
    /// Thickness of the tabulated foil (nm).
    pub table_thickness_nm: f64,
    /// Thickness in the beam (nm).
    pub thickness_nm: f64,
}

/// A response table.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ResponseSpec {
    /// Free text.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub about: Option<String>,
    /// Photon energies (eV), ascending.
    pub energy_ev: Vec<f64>,
    /// Relative efficiency at those energies.
    pub efficiency: Vec<f64>,
}

/// The resolution: exactly one of the two widths.
#[derive(Clone, Debug, Default, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ResolutionSpec {
    /// FWHM in photon energy (eV).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fwhm_ev: Option<f64>,
    /// FWHM in wavelength (nm).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fwhm_nm: Option<f64>,
}

/// What the detector counts.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum QuantitySpec {
    /// Photons.
    Photons,
    /// Energy.
    Energy,
}

/// The detector section.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct DetectorSpec {
    /// Free text.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub about: Option<String>,
    /// Filters in the beam.
    #[serde(default)]
    pub filters: Vec<FilterSpec>,
    /// Spectrometer efficiency.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub response: Option<ResponseSpec>,
    /// Spectral resolution.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub resolution: Option<ResolutionSpec>,
    /// What is counted (default photons).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub quantity: Option<QuantitySpec>,
    /// Line window in harmonic orders (default 1).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub line_window_orders: Option<f64>,
    /// Output grid step (eV; default a tenth of the resolution).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub output_step_ev: Option<f64>,
}

/// A setup file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct SetupSpec {
    /// Free text.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub about: Option<String>,
    /// The driving beam.
    pub beam: BeamSpec,
    /// The medium.
    pub medium: MediumSpec,
    /// The detector (None: the source spectrum only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub detector: Option<DetectorSpec>,
}

/// How the beam is given (lengths in bohr), resolved once the wavelength is known.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum BeamChoice {
    /// Diffraction-limited from the waist.
    Waist(f64),
    /// Diffraction-limited from the Rayleigh length.
    Rayleigh(f64),
    /// Diffraction-limited from the f-number.
    FNumber(f64),
    /// Waist and Rayleigh length given independently.
    Both(f64, f64),
}

/// A validated setup (atomic units).
#[derive(Clone, Debug, PartialEq)]
pub struct Setup {
    /// The beam.
    pub beam: BeamChoice,
    /// The medium's geometry (bohr).
    pub medium: Medium,
    /// How the emitters add up.
    pub combination: Combination,
    /// Number density (bohr⁻³).
    pub density: f64,
    /// Intensity samples (and, for the volume average, the lowest fraction).
    pub rule: IntensityRule,
    /// Points along the axis.
    pub axis_points: usize,
    /// Neutral refractivity at the driver.
    pub ir_refractivity: f64,
    /// Neutral refractivity at the harmonics.
    pub xuv_refractivity: f64,
    /// Whether free electrons disperse the driver.
    pub free_electrons: bool,
    /// Cross-section vs photon energy (eV → bohr²).
    pub absorption: Option<Table>,
    /// The detector chain.
    pub detector: Option<Detector>,
}

impl Setup {
    /// The beam at driver frequency `omega` (a.u.).
    ///
    /// # Errors
    /// Those of [`GaussianBeam`].
    pub fn beam(&self, omega: f64) -> Result<GaussianBeam> {
        match self.beam {
            BeamChoice::Waist(w) => GaussianBeam::from_waist(w, omega),
            BeamChoice::Rayleigh(z) => GaussianBeam::from_rayleigh(z, omega),
            BeamChoice::FNumber(n) => GaussianBeam::from_f_number(n, omega),
            BeamChoice::Both(w, z) => GaussianBeam::new(w, z),
        }
    }
}

fn mm(x: f64) -> f64 {
    x * 1e-3 / BOHR_M
}

fn um(x: f64) -> f64 {
    x * 1e-6 / BOHR_M
}

/// cm⁻³ → bohr⁻³.
pub fn per_cm3_to_au(n: f64) -> f64 {
    let bohr_cm = BOHR_M * 100.0;
    n * bohr_cm * bohr_cm * bohr_cm
}

/// cm² → bohr².
fn cm2_to_au(s: f64) -> f64 {
    let bohr_cm = BOHR_M * 100.0;
    s / (bohr_cm * bohr_cm)
}

fn not_for(key: &str, combination: &str) -> Error {
    Error::invalid(
        key,
        "given",
        &format!(
            "applies to the combination \"{combination}\" only; remove it or change medium.combination"
        ),
    )
}

impl SetupSpec {
    /// Parses a setup file's text (unknown keys are errors naming the key).
    ///
    /// # Errors
    /// The JSON error with its line and column.
    pub fn from_json(text: &str) -> Result<Self> {
        serde_json::from_str(text)
            .map_err(|e| Error::invalid("setup file", "the JSON", &e.to_string()))
    }

    /// Validates and converts to atomic units.
    ///
    /// # Errors
    /// Names the key path, the value and the reason.
    pub fn validate(&self) -> Result<Setup> {
        let b = &self.beam;
        let beam = match (b.waist_um, b.rayleigh_length_mm, b.f_number) {
            (Some(w), None, None) => BeamChoice::Waist(um(require_positive("beam.waist_um", w)?)),
            (None, Some(z), None) => {
                BeamChoice::Rayleigh(mm(require_positive("beam.rayleigh_length_mm", z)?))
            }
            (None, None, Some(n)) => BeamChoice::FNumber(require_positive("beam.f_number", n)?),
            (Some(w), Some(z), None) => BeamChoice::Both(
                um(require_positive("beam.waist_um", w)?),
                mm(require_positive("beam.rayleigh_length_mm", z)?),
            ),
            (None, None, None) => {
                return Err(Error::invalid(
                    "beam",
                    "{}",
                    "give waist_um, rayleigh_length_mm or f_number (or waist_um with \
                     rayleigh_length_mm)",
                ));
            }
            _ => {
                return Err(Error::invalid(
                    "beam.f_number",
                    "given with waist_um or rayleigh_length_mm",
                    "the f-number fixes the waist and the Rayleigh length: give it alone",
                ));
            }
        };
        let m = &self.medium;
        let medium = match m.geometry {
            GeometrySpec::Unbounded {} => Medium::Unbounded,
            GeometrySpec::Slab {
                position_mm,
                length_mm,
            } => {
                let p = require_finite("medium.geometry.position_mm", position_mm)?;
                let l = require_positive("medium.geometry.length_mm", length_mm)?;
                Medium::slab(mm(p), mm(l))?
            }
            GeometrySpec::ThinSlab {
                position_mm,
                thickness_mm,
            } => Medium::ThinSlab {
                position: mm(require_finite("medium.geometry.position_mm", position_mm)?),
                thickness: mm(require_positive(
                    "medium.geometry.thickness_mm",
                    thickness_mm,
                )?),
            },
        };
        let density = per_cm3_to_au(require_positive("medium.density_cm3", m.density_cm3)?);
        let samples = m.intensity_samples.unwrap_or(DEFAULT_SAMPLES);
        if samples == 0 || samples > MAX_SAMPLES {
            return Err(Error::invalid(
                "medium.intensity_samples",
                samples,
                &format!(
                    "must be between 1 and {MAX_SAMPLES} (each sample is a full single-molecule run)"
                ),
            ));
        }
        let coherent = m.combination == Combination::CoherentAxis;
        if coherent {
            if m.lowest_intensity_fraction.is_some() {
                return Err(not_for(
                    "medium.lowest_intensity_fraction",
                    "incoherent-volume",
                ));
            }
            if medium == Medium::Unbounded {
                return Err(Error::invalid(
                    "medium.geometry.kind",
                    "unbounded",
                    "the coherent-axis build-up needs a slab or a thin slab",
                ));
            }
        } else {
            for (key, given) in [
                ("medium.axis_points", m.axis_points.is_some()),
                ("medium.ir_refractivity", m.ir_refractivity.is_some()),
                ("medium.xuv_refractivity", m.xuv_refractivity.is_some()),
                ("medium.free_electrons", m.free_electrons.is_some()),
                ("medium.absorption", m.absorption.is_some()),
            ] {
                if given {
                    return Err(not_for(key, "coherent-axis"));
                }
            }
            if medium == Medium::Unbounded && samples < 2 {
                return Err(Error::invalid(
                    "medium.intensity_samples",
                    samples,
                    "the unbounded medium has no volume at the peak intensity itself: use at \
                     least 2 samples",
                ));
            }
        }
        let lowest = m
            .lowest_intensity_fraction
            .unwrap_or(DEFAULT_LOWEST_FRACTION);
        if !(lowest > 0.0 && lowest < 1.0) {
            return Err(Error::invalid(
                "medium.lowest_intensity_fraction",
                lowest,
                "must lie strictly between 0 and 1",
            ));
        }
        let axis_points = m.axis_points.unwrap_or(DEFAULT_AXIS_POINTS);
        if axis_points == 0 || axis_points > super::buildup::MAX_AXIS_POINTS {
            return Err(Error::invalid(
                "medium.axis_points",
                axis_points,
                &format!("must be between 1 and {}", super::buildup::MAX_AXIS_POINTS),
            ));
        }
        let ir = require_finite("medium.ir_refractivity", m.ir_refractivity.unwrap_or(0.0))?;
        let xuv = require_finite("medium.xuv_refractivity", m.xuv_refractivity.unwrap_or(0.0))?;
        for (key, v) in [
            ("medium.ir_refractivity", ir),
            ("medium.xuv_refractivity", xuv),
        ] {
            if v.abs() >= 0.1 {
                return Err(Error::invalid(
                    key,
                    v,
                    "|n − 1| of a gas is far below 0.1 (about 3e−4 for air at 1 bar)",
                ));
            }
        }
        let absorption = match &m.absorption {
            None => None,
            Some(a) => Some(Table::new(
                "medium.absorption",
                a.energy_ev.clone(),
                a.cross_section_mb
                    .iter()
                    .map(|s| cm2_to_au(s * MEGABARN_CM2))
                    .collect(),
            )?),
        };
        let detector = match &self.detector {
            None => None,
            Some(d) => Some(detector(d)?),
        };
        Ok(Setup {
            beam,
            medium,
            combination: m.combination,
            density,
            rule: IntensityRule {
                samples,
                lowest_fraction: lowest,
            },
            axis_points,
            ir_refractivity: ir,
            xuv_refractivity: xuv,
            free_electrons: m.free_electrons.unwrap_or(false),
            absorption,
            detector,
        })
    }
}

fn detector(d: &DetectorSpec) -> Result<Detector> {
    let mut filters = Vec::with_capacity(d.filters.len());
    for (i, f) in d.filters.iter().enumerate() {
        let key = format!("detector.filters[{i}] ({})", f.name);
        if let Some((j, t)) = f.transmission.iter().enumerate().find(|(_, t)| **t > 1.0) {
            return Err(Error::invalid(
                &format!("{key}.transmission[{j}]"),
                t,
                "a transmission cannot exceed 1",
            ));
        }
        filters.push(Filter {
            table: Table::new(
                &format!("{key}.transmission"),
                f.energy_ev.clone(),
                f.transmission.clone(),
            )?,
            table_thickness: require_positive(
                &format!("{key}.table_thickness_nm"),
                f.table_thickness_nm,
            )?,
            thickness: require_positive(&format!("{key}.thickness_nm"), f.thickness_nm)?,
        });
    }
    let response = match &d.response {
        None => None,
        Some(r) => Some(Table::new(
            "detector.response.efficiency",
            r.energy_ev.clone(),
            r.efficiency.clone(),
        )?),
    };
    let resolution = match &d.resolution {
        None => None,
        Some(ResolutionSpec {
            fwhm_ev: Some(e),
            fwhm_nm: None,
        }) => Some(Resolution::EnergyFwhm(require_positive(
            "detector.resolution.fwhm_ev",
            *e,
        )?)),
        Some(ResolutionSpec {
            fwhm_ev: None,
            fwhm_nm: Some(l),
        }) => Some(Resolution::WavelengthFwhm(require_positive(
            "detector.resolution.fwhm_nm",
            *l,
        )?)),
        Some(_) => {
            return Err(Error::invalid(
                "detector.resolution",
                "both or neither of fwhm_ev and fwhm_nm",
                "give exactly one width",
            ));
        }
    };
    let out = Detector {
        filters,
        response,
        resolution,
        quantity: match d.quantity.unwrap_or(QuantitySpec::Photons) {
            QuantitySpec::Photons => Quantity::Photons,
            QuantitySpec::Energy => Quantity::Energy,
        },
        line_window: require_positive(
            "detector.line_window_orders",
            d.line_window_orders.unwrap_or(1.0),
        )?,
        output_step: match d.output_step_ev {
            None => None,
            Some(s) => Some(require_positive("detector.output_step_ev", s)?),
        },
    };
    if out.line_window > 2.0 {
        return Err(Error::invalid(
            "detector.line_window_orders",
            out.line_window,
            "windows wider than two orders would count neighbouring lines",
        ));
    }
    Ok(out)
}
