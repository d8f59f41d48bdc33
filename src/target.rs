//! Target files: the molecule (or atom), its ionic channels and their structure models.
//!
//! A target file is JSON (schema in `docs/target-file.md`). It is read in two stages: serde
//! parses the raw description with every unknown key rejected by name, then
//! [`TargetSpec::validate`] converts lab units to atomic units and checks everything that
//! involves several keys (duplicate labels, couplings that name unknown channels, …).

use nalgebra::Vector3;
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

use crate::error::{Error, Result, require_finite, require_positive};
use crate::ionization::{IonizationModel, sto1g_exponent};
use crate::recombination::RecombinationModel;
use crate::units;

/// A complex number written as `[re, im]`.
pub type ComplexSpec = [f64; 2];

fn complex(key: &str, c: ComplexSpec) -> Result<Complex64> {
    require_finite(&format!("{key}[0]"), c[0])?;
    require_finite(&format!("{key}[1]"), c[1])?;
    Ok(Complex64::new(c[0], c[1]))
}

/// Ionization model as written in a target file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(tag = "model", rename_all = "kebab-case", deny_unknown_fields)]
pub enum IonizationSpec {
    /// A fixed complex amplitude `[re, im]`.
    Constant {
        /// Amplitude (a.u.).
        amplitude: ComplexSpec,
    },
    /// Plane-wave SFA with an s-Gaussian; default exponent: STO-1G fit to a 1s function with
    /// `ζ = sqrt(2 Ip)`.
    Gaussian {
        /// Exponent (bohr⁻²).
        #[serde(default, skip_serializing_if = "Option::is_none")]
        exponent_au: Option<f64>,
    },
}

impl Default for IonizationSpec {
    fn default() -> Self {
        IonizationSpec::Gaussian { exponent_au: None }
    }
}

/// Recombination model as written in a target file.
///
/// Every variant is a struct variant: serde's internally tagged enums let unit variants accept
/// unknown keys silently even with `deny_unknown_fields`.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(tag = "model", rename_all = "kebab-case", deny_unknown_fields)]
pub enum RecombinationSpec {
    /// Hydrogen-like 1s state with the channel's ionization potential.
    Hydrogenic {},
    /// s-Gaussian; default exponent as for ionization.
    Gaussian {
        /// Exponent (bohr⁻²).
        #[serde(default, skip_serializing_if = "Option::is_none")]
        exponent_au: Option<f64>,
    },
    /// A fixed complex dipole vector `[[re, im], [re, im], [re, im]]` (x, y, z; a.u.).
    Constant {
        /// The vector (a.u.).
        dipole_au: [ComplexSpec; 3],
    },
}

impl Default for RecombinationSpec {
    fn default() -> Self {
        RecombinationSpec::Hydrogenic {}
    }
}

/// One ionic channel as written in a target file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ChannelSpec {
    /// Unique label (e.g. "X", "A", "B").
    pub label: String,
    /// Ionization potential (eV): energy of this ionic state above the neutral ground state.
    pub ip_ev: f64,
    /// Ionization model (default: s-Gaussian SFA).
    #[serde(default)]
    pub ionization: IonizationSpec,
    /// Recombination model (default: hydrogenic).
    #[serde(default)]
    pub recombination: RecombinationSpec,
}

/// An atom of the molecule: exactly one of the two position keys.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct AtomSpec {
    /// Element symbol.
    pub element: String,
    /// Position in ångström (molecular frame).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub position_angstrom: Option<[f64; 3]>,
    /// Position in bohr (molecular frame).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub position_bohr: Option<[f64; 3]>,
}

/// A target file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct TargetSpec {
    /// Short name.
    pub name: String,
    /// What the target is and, for invented targets, the scenario it illustrates.
    #[serde(default)]
    pub description: String,
    /// Whether the data are invented (demos) rather than taken from a source.
    pub invented: bool,
    /// Where the numbers come from.
    #[serde(default)]
    pub source: String,
    /// Atoms of the molecule (empty for an atom at the origin).
    #[serde(default)]
    pub atoms: Vec<AtomSpec>,
    /// Ionic channels (at least one).
    pub channels: Vec<ChannelSpec>,
}

/// A validated channel, in atomic units.
#[derive(Clone, Debug, PartialEq)]
pub struct Channel {
    /// Label.
    pub label: String,
    /// Ionization potential (a.u.).
    pub ip: f64,
    /// Ionization model.
    pub ionization: IonizationModel,
    /// Recombination model.
    pub recombination: RecombinationModel,
}

/// A validated atom position (bohr).
#[derive(Clone, Debug, PartialEq)]
pub struct Atom {
    /// Element symbol.
    pub element: String,
    /// Position in the molecular frame (bohr).
    pub position: Vector3<f64>,
}

/// A validated target.
#[derive(Clone, Debug, PartialEq)]
pub struct Target {
    /// Name.
    pub name: String,
    /// Description.
    pub description: String,
    /// Invented (demo) data?
    pub invented: bool,
    /// Source of the data.
    pub source: String,
    /// Atoms.
    pub atoms: Vec<Atom>,
    /// Channels in file order.
    pub channels: Vec<Channel>,
}

impl TargetSpec {
    /// Parses JSON text; the error names the unknown or malformed key.
    pub fn from_json(text: &str) -> Result<TargetSpec> {
        serde_json::from_str(text).map_err(|e| Error::Inconsistent(e.to_string()))
    }

    /// Checks the description and converts it to atomic units.
    pub fn validate(&self) -> Result<Target> {
        if self.channels.is_empty() {
            return Err(Error::invalid(
                "channels",
                "[]",
                "at least one channel is required",
            ));
        }
        let mut channels = Vec::with_capacity(self.channels.len());
        for (k, c) in self.channels.iter().enumerate() {
            let key = |name: &str| format!("channels[{k}].{name}");
            if c.label.trim().is_empty() {
                return Err(Error::invalid(&key("label"), "\"\"", "must not be empty"));
            }
            if let Some(j) = self.channels[..k].iter().position(|o| o.label == c.label) {
                return Err(Error::invalid(
                    &key("label"),
                    format!("{:?}", c.label),
                    &format!("duplicates the label of channels[{j}]"),
                ));
            }
            let ip = units::ev_to_au(require_positive(&key("ip_ev"), c.ip_ev)?);
            let ionization = match &c.ionization {
                IonizationSpec::Constant { amplitude } => IonizationModel::Constant {
                    amplitude: complex(&key("ionization.amplitude"), *amplitude)?,
                },
                IonizationSpec::Gaussian { exponent_au } => IonizationModel::Gaussian {
                    exponent: match exponent_au {
                        Some(a) => require_positive(&key("ionization.exponent_au"), *a)?,
                        None => sto1g_exponent(ip),
                    },
                },
            };
            let recombination = match &c.recombination {
                RecombinationSpec::Hydrogenic {} => RecombinationModel::Hydrogenic { ip },
                RecombinationSpec::Gaussian { exponent_au } => RecombinationModel::Gaussian {
                    exponent: match exponent_au {
                        Some(a) => require_positive(&key("recombination.exponent_au"), *a)?,
                        None => sto1g_exponent(ip),
                    },
                },
                RecombinationSpec::Constant { dipole_au } => {
                    let mut v = [Complex64::new(0.0, 0.0); 3];
                    for (i, c) in dipole_au.iter().enumerate() {
                        v[i] = complex(&key(&format!("recombination.dipole_au[{i}]")), *c)?;
                    }
                    RecombinationModel::Constant {
                        vector: Vector3::new(v[0], v[1], v[2]),
                    }
                }
            };
            channels.push(Channel {
                label: c.label.clone(),
                ip,
                ionization,
                recombination,
            });
        }
        let mut atoms = Vec::with_capacity(self.atoms.len());
        for (k, a) in self.atoms.iter().enumerate() {
            let key = |name: &str| format!("atoms[{k}].{name}");
            let position = match (a.position_angstrom, a.position_bohr) {
                (Some(p), None) => p.map(units::angstrom_to_au),
                (None, Some(p)) => p,
                (Some(_), Some(_)) => {
                    return Err(Error::invalid(
                        &key("position_angstrom"),
                        "given with position_bohr",
                        "give exactly one of position_angstrom and position_bohr",
                    ));
                }
                (None, None) => {
                    return Err(Error::invalid(
                        &key("position_angstrom"),
                        "missing",
                        "give position_angstrom or position_bohr (the unit must be stated)",
                    ));
                }
            };
            for (i, x) in position.iter().enumerate() {
                require_finite(&key(&format!("position[{i}]")), *x)?;
            }
            atoms.push(Atom {
                element: a.element.clone(),
                position: Vector3::from(position),
            });
        }
        Ok(Target {
            name: self.name.clone(),
            description: self.description.clone(),
            invented: self.invented,
            source: self.source.clone(),
            atoms,
            channels,
        })
    }
}

impl Target {
    /// A one-channel atom with the default models, for quick what-if checks (`--ip`).
    pub fn atom(ip_ev: f64) -> Result<Target> {
        TargetSpec {
            name: format!("atom with Ip = {ip_ev} eV"),
            description: "one-channel atom with default models (command-line --ip)".into(),
            invented: true,
            source: String::new(),
            atoms: Vec::new(),
            channels: vec![ChannelSpec {
                label: "X".into(),
                ip_ev,
                ionization: IonizationSpec::default(),
                recombination: RecombinationSpec::default(),
            }],
        }
        .validate()
        .map_err(|e| match e {
            Error::InvalidParameter { value, reason, .. } => Error::InvalidParameter {
                name: "--ip".into(),
                value,
                reason,
            },
            other => other,
        })
    }
}
