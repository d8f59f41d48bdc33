//! The laser description file and its conversion to a [`Field`].
//!
//! A laser file is JSON (schema documented in `docs/laser-file.md`): a list of colours under a
//! common envelope. Every key carries its unit. Lab units are converted to atomic units here and
//! nowhere else.
//!
//! ```json
//! {
//!   "colours": [
//!     { "wavelength_nm": 800, "intensity_wcm2": 2e14,
//!       "polarization": { "kind": "linear", "angle_deg": 0 } },
//!     { "harmonic_of_first": 2, "intensity_ratio": 0.1, "phase_deg": 90,
//!       "polarization": { "kind": "linear", "angle_deg": 0 } }
//!   ],
//!   "envelope": { "kind": "continuous" }
//! }
//! ```

use serde::{Deserialize, Serialize};

use crate::error::{Error, Result, require_finite, require_positive};
use crate::field::{Colour, Envelope, Field, Polarization};
use crate::units;

/// Shortest driving wavelength accepted (nm): photons of 1.24 keV, far above any valence Ip.
pub const MIN_WAVELENGTH_NM: f64 = 1.0;
/// Longest driving wavelength accepted (nm): 1 mm (terahertz). Longer ones make the excursion
/// and Up/ω — hence the work of the trajectory stage — grow without use.
pub const MAX_WAVELENGTH_NM: f64 = 1.0e6;

/// Polarization of one colour as written in a laser file.
///
/// Every variant is a struct variant: serde's internally tagged enums let unit variants accept
/// unknown keys silently even with `deny_unknown_fields`.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case", deny_unknown_fields)]
pub enum PolarizationSpec {
    /// Linear, at `angle_deg` from the lab z axis towards x.
    Linear {
        /// Polarization angle (degrees), default 0.
        #[serde(default)]
        angle_deg: f64,
    },
    /// Elliptical with signed ellipticity (|ε| ≤ 1) and major axis at `major_axis_deg`.
    Elliptical {
        /// Ellipticity E_minor/E_major; the sign is the helicity.
        ellipticity: f64,
        /// Major-axis angle (degrees), default 0.
        #[serde(default)]
        major_axis_deg: f64,
    },
    /// Circular; `helicity` +1 turns from z towards x, −1 the other way.
    Circular {
        /// +1 or −1.
        helicity: i32,
    },
}

impl Default for EnvelopeSpec {
    fn default() -> Self {
        EnvelopeSpec::Continuous {}
    }
}

impl Default for PolarizationSpec {
    fn default() -> Self {
        PolarizationSpec::Linear { angle_deg: 0.0 }
    }
}

/// One colour as written in a laser file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize, Default)]
#[serde(deny_unknown_fields)]
pub struct ColourSpec {
    /// Vacuum wavelength (nm). Exactly one of this and `harmonic_of_first`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wavelength_nm: Option<f64>,
    /// Frequency as a multiple of the first colour's (e.g. 2 for the second harmonic).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub harmonic_of_first: Option<f64>,
    /// Cycle-averaged intensity (W/cm²). Exactly one of this and `intensity_ratio`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub intensity_wcm2: Option<f64>,
    /// Intensity relative to the first colour.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub intensity_ratio: Option<f64>,
    /// Phase φ (degrees): the major-axis field is ∝ cos(ωt + φ). For a pulse, the first
    /// colour's phase is the carrier-envelope phase.
    #[serde(default)]
    pub phase_deg: f64,
    /// Polarization (default linear along z).
    #[serde(default)]
    pub polarization: PolarizationSpec,
}

/// The envelope as written in a laser file (struct variants only: see [`PolarizationSpec`]'s
/// note on serde's internally tagged enums).
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case", deny_unknown_fields)]
pub enum EnvelopeSpec {
    /// Infinitely long, periodic field.
    Continuous {},
    /// cos² envelope of the vector potential (sin² pulse) with the given FWHM of the intensity.
    Sin2 {
        /// FWHM of the intensity envelope (fs).
        fwhm_fs: f64,
    },
}

/// A laser file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct LaserSpec {
    /// Colours; the first is the reference (harmonic orders, time origin).
    pub colours: Vec<ColourSpec>,
    /// Envelope shared by all colours.
    #[serde(default)]
    pub envelope: EnvelopeSpec,
}

impl LaserSpec {
    /// A single linearly polarised continuous colour (the `--intensity/--wavelength` shorthand).
    pub fn monochromatic(intensity_wcm2: f64, wavelength_nm: f64) -> Self {
        LaserSpec {
            colours: vec![ColourSpec {
                wavelength_nm: Some(wavelength_nm),
                intensity_wcm2: Some(intensity_wcm2),
                ..ColourSpec::default()
            }],
            envelope: EnvelopeSpec::Continuous {},
        }
    }

    /// Peak intensity (W/cm²) of the first colour, if given absolutely.
    pub fn first_intensity(&self) -> Option<f64> {
        self.colours.first().and_then(|c| c.intensity_wcm2)
    }

    /// Wavelength (nm) of the first colour, if given.
    pub fn first_wavelength(&self) -> Option<f64> {
        self.colours.first().and_then(|c| c.wavelength_nm)
    }

    /// Builds the field (atomic units inside).
    pub fn to_field(&self) -> Result<Field> {
        if self.colours.is_empty() {
            return Err(Error::invalid(
                "colours",
                "[]",
                "at least one colour is required",
            ));
        }
        let mut colours = Vec::with_capacity(self.colours.len());
        let (mut omega1, mut i1) = (0.0, 0.0);
        for (k, c) in self.colours.iter().enumerate() {
            let key = |name: &str| format!("colours[{k}].{name}");
            let omega = match (c.wavelength_nm, c.harmonic_of_first, k) {
                (Some(l), None, _) => {
                    let l = require_positive(&key("wavelength_nm"), l)?;
                    if !(MIN_WAVELENGTH_NM..=MAX_WAVELENGTH_NM).contains(&l) {
                        return Err(Error::invalid(
                            &key("wavelength_nm"),
                            format!("{l:e}"),
                            &format!(
                                "must lie between {MIN_WAVELENGTH_NM} nm and {MAX_WAVELENGTH_NM:e} \
                                 nm (1 mm): the quantum-orbit model is for optical and infrared \
                                 drivers"
                            ),
                        ));
                    }
                    units::wavelength_nm_to_omega(l)
                }
                (None, Some(h), k) if k > 0 => {
                    omega1 * require_positive(&key("harmonic_of_first"), h)?
                }
                (None, Some(_), _) => {
                    return Err(Error::invalid(
                        &key("harmonic_of_first"),
                        "given",
                        "the first colour needs wavelength_nm",
                    ));
                }
                (Some(_), Some(_), _) => {
                    return Err(Error::invalid(
                        &key("wavelength_nm"),
                        "given with harmonic_of_first",
                        "give exactly one of wavelength_nm and harmonic_of_first",
                    ));
                }
                (None, None, _) => {
                    return Err(Error::invalid(
                        &key("wavelength_nm"),
                        "missing",
                        "give wavelength_nm (or harmonic_of_first for later colours)",
                    ));
                }
            };
            let intensity = match (c.intensity_wcm2, c.intensity_ratio, k) {
                (Some(i), None, _) => require_positive(&key("intensity_wcm2"), i)?,
                (None, Some(r), k) if k > 0 => i1 * require_positive(&key("intensity_ratio"), r)?,
                (None, Some(_), _) => {
                    return Err(Error::invalid(
                        &key("intensity_ratio"),
                        "given",
                        "the first colour needs intensity_wcm2",
                    ));
                }
                (Some(_), Some(_), _) => {
                    return Err(Error::invalid(
                        &key("intensity_wcm2"),
                        "given with intensity_ratio",
                        "give exactly one of intensity_wcm2 and intensity_ratio",
                    ));
                }
                (None, None, _) => {
                    return Err(Error::invalid(
                        &key("intensity_wcm2"),
                        "missing",
                        "give intensity_wcm2 (or intensity_ratio for later colours)",
                    ));
                }
            };
            if k == 0 {
                omega1 = omega;
                i1 = intensity;
            }
            let phase = require_finite(&key("phase_deg"), c.phase_deg)?.to_radians();
            let polarization = match c.polarization {
                PolarizationSpec::Linear { angle_deg } => Polarization::Linear {
                    angle: require_finite(&key("polarization.angle_deg"), angle_deg)?.to_radians(),
                },
                PolarizationSpec::Elliptical {
                    ellipticity,
                    major_axis_deg,
                } => {
                    if !ellipticity.is_finite() || ellipticity.abs() > 1.0 {
                        return Err(Error::invalid(
                            &key("polarization.ellipticity"),
                            ellipticity,
                            "must lie in [-1, 1]",
                        ));
                    }
                    Polarization::Elliptical {
                        ellipticity,
                        major_axis: require_finite(
                            &key("polarization.major_axis_deg"),
                            major_axis_deg,
                        )?
                        .to_radians(),
                    }
                }
                PolarizationSpec::Circular { helicity } => {
                    if helicity != 1 && helicity != -1 {
                        return Err(Error::invalid(
                            &key("polarization.helicity"),
                            helicity,
                            "must be +1 or -1",
                        ));
                    }
                    Polarization::Elliptical {
                        ellipticity: f64::from(helicity),
                        major_axis: 0.0,
                    }
                }
            };
            colours.push(Colour {
                omega,
                peak_field: units::intensity_to_peak_field(intensity),
                phase,
                polarization,
            });
        }
        let envelope = match self.envelope {
            EnvelopeSpec::Continuous {} => Envelope::Continuous,
            EnvelopeSpec::Sin2 { fwhm_fs } => Envelope::Sin2 {
                fwhm: units::fs_to_au(require_positive("envelope.fwhm_fs", fwhm_fs)?),
            },
        };
        Field::new(&colours, envelope)
    }
}
