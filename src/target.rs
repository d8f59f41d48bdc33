//! Target files: the molecule (or atom), its ionic channels, the couplings between them, their
//! structure models and the orientation distribution.
//!
//! A target file is JSON (schema in `docs/target-file.md`). It is read in two stages: serde
//! parses the raw description with every unknown key rejected by name, then
//! [`TargetSpec::validate`] converts lab units to atomic units and checks everything that
//! involves several keys (duplicate labels, couplings that name unknown channels, a coupling
//! matrix that would not be Hermitian, models that need a Dyson orbital the channel lacks, …).

use std::sync::Arc;

use nalgebra::{DMatrix, Vector3};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

use crate::error::{Error, Result, require_finite, require_positive};
use crate::hole::IonModel;
use crate::ionization::{IonizationModel, sto1g_exponent};
use crate::orbital::{Orbital, OrbitalSpec};
use crate::orientation::{AlignmentDescription, AlignmentDistribution};
use crate::recombination::{DipoleForm, RecombinationModel, ReturnMomentum};
use crate::tunnelling::{AsymptoticOrbital, AsymptoticTerm};
use crate::units;

/// A complex number written as `[re, im]`.
pub type ComplexSpec = [f64; 2];

fn complex(key: &str, c: ComplexSpec) -> Result<Complex64> {
    require_finite(&format!("{key}[0]"), c[0])?;
    require_finite(&format!("{key}[1]"), c[1])?;
    Ok(Complex64::new(c[0], c[1]))
}

/// A real or complex number (`1.5` or `[1.5, 0.2]`).
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(untagged)]
pub enum NumberSpec {
    /// A real number.
    Real(f64),
    /// `[re, im]`.
    Complex(ComplexSpec),
}

impl NumberSpec {
    fn value(&self, key: &str) -> Result<Complex64> {
        match self {
            NumberSpec::Real(x) => Ok(Complex64::new(require_finite(key, *x)?, 0.0)),
            NumberSpec::Complex(c) => complex(key, *c),
        }
    }
}

/// A real or complex 3-vector (`[x, y, z]` or `[[re, im], [re, im], [re, im]]`).
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(untagged)]
pub enum VectorSpec {
    /// Real components.
    Real([f64; 3]),
    /// Complex components.
    Complex([ComplexSpec; 3]),
}

impl VectorSpec {
    fn value(&self, key: &str) -> Result<[Complex64; 3]> {
        let mut v = [Complex64::new(0.0, 0.0); 3];
        for (i, slot) in v.iter_mut().enumerate() {
            let k = format!("{key}[{i}]");
            *slot = match self {
                VectorSpec::Real(r) => Complex64::new(require_finite(&k, r[i])?, 0.0),
                VectorSpec::Complex(c) => complex(&k, c[i])?,
            };
        }
        Ok(v)
    }
}

/// One asymptotic coefficient `C_l` of projection `m` on the molecular axis.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct AsymptoticSpec {
    /// Angular momentum l.
    pub l: u32,
    /// Projection m' on the molecular z axis.
    pub m: i32,
    /// Coefficient `C_l` (real or `[re, im]`).
    pub c: NumberSpec,
}

/// Ionization model as written in a target file.
///
/// Every variant is a struct variant: serde's internally tagged enums let unit variants accept
/// unknown keys silently even with `deny_unknown_fields`.
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
    /// Plane-wave SFA with the channel's `dyson_orbital`.
    Orbital {},
    /// Molecular tunnelling theory from asymptotic coefficients.
    Asymptotic {
        /// Charge of the residual ion seen by the electron (default 1).
        #[serde(default = "one")]
        charge: f64,
        /// Asymptotic coefficients `C_l` (at least one).
        coefficients: Vec<AsymptoticSpec>,
    },
    /// Amplitude against the angle between the molecular axis and the field.
    Table {
        /// Angles (degrees), from 0 to 180, increasing.
        beta_deg: Vec<f64>,
        /// Complex amplitudes `[re, im]`, one per angle.
        amplitude: Vec<ComplexSpec>,
    },
}

fn one() -> f64 {
    1.0
}

impl Default for IonizationSpec {
    fn default() -> Self {
        IonizationSpec::Gaussian { exponent_au: None }
    }
}

/// Recombination model as written in a target file (struct variants only, see
/// [`IonizationSpec`]).
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
    /// A fixed complex dipole vector `[[re, im], [re, im], [re, im]]` (x, y, z; a.u.;
    /// molecular frame).
    Constant {
        /// The vector (a.u.).
        dipole_au: [ComplexSpec; 3],
    },
    /// The channel's `dyson_orbital` as a linear combination of atomic Gaussians.
    Lcao {
        /// `length` (default) or `velocity`.
        #[serde(default)]
        form: DipoleForm,
        /// `saddle` (default, k²/2 = Ω − Ip) or `photon` (k²/2 = Ω).
        #[serde(default)]
        momentum: ReturnMomentum,
    },
    /// Tabulated dipole against photon energy and angle.
    Table {
        /// Photon energies (eV), increasing.
        energy_ev: Vec<f64>,
        /// Angles between the return direction and the molecular axis (degrees), 0 to 180.
        theta_deg: Vec<f64>,
        /// Component along the return direction: one row per energy, one `[re, im]` per angle.
        parallel_au: Vec<Vec<ComplexSpec>>,
        /// Perpendicular component in the plane of k̂ and the axis, same layout.
        perpendicular_au: Vec<Vec<ComplexSpec>>,
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
    /// Unique label (letters, digits, `+`, `-`, `_`; e.g. "X", "A", "B").
    pub label: String,
    /// Ionization potential (eV): energy of this ionic state above the neutral ground state.
    pub ip_ev: f64,
    /// Ionization model (default: s-Gaussian SFA).
    #[serde(default)]
    pub ionization: IonizationSpec,
    /// Recombination model (default: hydrogenic).
    #[serde(default)]
    pub recombination: RecombinationSpec,
    /// Dyson orbital as atom-centred Cartesian Gaussians (bohr, molecular frame).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dyson_orbital: Option<OrbitalSpec>,
}

/// A coupling between two channels (or a permanent dipole of one).
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct CouplingSpec {
    /// The two channel labels `[m, n]`; the entry sets the (m, n) element and, by Hermiticity,
    /// the (n, m) element. `[m, m]` sets a permanent dipole of state m (relative to the neutral).
    pub channels: [String; 2],
    /// Transition dipole ⟨m|μ|n⟩ in the molecular frame, a.u. (e·bohr).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dipole_au: Option<VectorSpec>,
    /// The same in debye (give one of the two).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dipole_debye: Option<VectorSpec>,
    /// Field-free coupling ⟨m|V|n⟩ (eV; off-diagonal only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub energy_ev: Option<NumberSpec>,
}

/// Orientation grid as written in a target file.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(tag = "grid", rename_all = "kebab-case", deny_unknown_fields)]
pub enum OrientationSpec {
    /// One orientation, ZYZ Euler angles (degrees) of the molecular → lab rotation.
    Fixed {
        /// `[α, β, γ]` in degrees.
        euler_deg: [f64; 3],
    },
    /// Gauss–Legendre grid in β only (α = γ = 0): for molecules symmetric about their z axis in
    /// a field linearly polarised along lab z.
    Axis {
        /// Number of β nodes.
        beta_points: usize,
    },
    /// Gauss–Legendre in cos β × uniform α and γ.
    Full {
        /// Number of β nodes.
        beta_points: usize,
        /// Number of α nodes.
        alpha_points: usize,
        /// Number of γ nodes (1 for molecules symmetric about their z axis).
        gamma_points: usize,
    },
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
    /// Couplings between channels (none: uncoupled).
    #[serde(default)]
    pub couplings: Vec<CouplingSpec>,
    /// Alignment distribution of the molecular z axis about the lab z axis.
    #[serde(default)]
    pub alignment: AlignmentDescription,
    /// Orientation grid (default: one orientation for an atom, the full grid otherwise).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub orientations: Option<OrientationSpec>,
}

/// A validated channel, in atomic units.
#[derive(Clone, Debug)]
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

/// Orientation grid of a validated target.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum OrientationGridSpec {
    /// One orientation (Euler angles in rad).
    Fixed([f64; 3]),
    /// β-only grid.
    Axis(usize),
    /// Full grid (β, α, γ nodes).
    Full(usize, usize, usize),
}

/// A validated target.
#[derive(Clone, Debug)]
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
    /// Channels ordered by ionization potential, then label (not file order).
    pub channels: Vec<Channel>,
    /// The ion in the basis of its channels: Ip, V, μ (molecular frame).
    pub ion: IonModel,
    /// Alignment distribution.
    pub alignment: AlignmentDistribution,
    /// Orientation grid.
    pub orientations: OrientationGridSpec,
}

/// Largest ionization potential accepted (eV): a little above the most strongly bound
/// electron of any element, the 1s electron of hydrogen-like uranium (about 132 keV; Dirac
/// energy of Z = 92, from memory). Larger values are input errors (e.g. a unit slip), and they
/// would make the trajectory stage's work grow like Ip/ω.
pub const MAX_IP_EV: f64 = 2.0e5;

/// Largest coupling dipole accepted (a.u., norm of the vector): 50 a.u. = 127 D, far above
/// any transition or permanent dipole of a molecular ion (a few a.u.). The hole propagator's
/// work grows like |μ|·F (measured: 0.3 s at 3 a.u., 18 s at 1000 a.u. for the bent demo).
pub const MAX_COUPLING_DIPOLE_AU: f64 = 50.0;
/// Largest field-free coupling energy accepted (eV, magnitude).
pub const MAX_COUPLING_ENERGY_EV: f64 = 100.0;
/// Largest Ip difference of two coupled channels (eV): the hole propagator's work grows with
/// it (measured: 0.8 s at 500 eV, 17 s at 10⁴ eV for the coupled demo diatomic).
pub const MAX_COUPLED_GAP_EV: f64 = 100.0;

/// Largest distance from the origin of an atom or an orbital centre (bohr): far larger than
/// any molecule; absurd values make the structure factors overflow.
pub const MAX_DISTANCE_BOHR: f64 = 1.0e3;
/// Largest Gaussian exponent (bohr⁻²): tighter than the tightest s functions of standard basis
/// sets for heavy atoms (~10⁷); absurd values make the structure factors overflow.
pub const MAX_EXPONENT_INV_BOHR2: f64 = 1.0e8;

fn ionization_exponent(spec: &IonizationSpec) -> Option<f64> {
    match spec {
        IonizationSpec::Gaussian { exponent_au } => *exponent_au,
        _ => None,
    }
}

fn recombination_exponent(spec: &RecombinationSpec) -> Option<f64> {
    match spec {
        RecombinationSpec::Gaussian { exponent_au } => *exponent_au,
        _ => None,
    }
}

fn valid_label(label: &str) -> bool {
    !label.is_empty()
        && label
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || c == '+' || c == '-' || c == '_')
        && !label.contains("_to_")
}

impl TargetSpec {
    /// Parses JSON text; the error names the unknown or malformed key.
    pub fn from_json(text: &str) -> Result<TargetSpec> {
        serde_json::from_str(text).map_err(|e| Error::Inconsistent(e.to_string()))
    }

    /// Labels of the channels that give a `dyson_orbital` that neither of their models uses
    /// (only the `orbital` ionization model and the `lcao` recombination model read it): the
    /// orbital is then ignored, which a user should be told.
    pub fn unused_orbitals(&self) -> Vec<String> {
        self.channels
            .iter()
            .filter(|c| {
                c.dyson_orbital.is_some()
                    && !matches!(c.ionization, IonizationSpec::Orbital {})
                    && !matches!(c.recombination, RecombinationSpec::Lcao { .. })
            })
            .map(|c| c.label.clone())
            .collect()
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
        if self.channels.len() > crate::hole::MAX_CHANNELS {
            return Err(Error::invalid(
                "channels",
                format!("{} channels", self.channels.len()),
                &format!(
                    "at most {} channels are supported: the hole propagator's kernels are \
                     specialised per number of channels up to {} (docs/target-file.md says why \
                     that is enough for tunnelling; keep the channels that the laser reaches)",
                    crate::hole::MAX_CHANNELS,
                    crate::hole::MAX_CHANNELS
                ),
            ));
        }
        let mut channels = Vec::with_capacity(self.channels.len());
        for (k, c) in self.channels.iter().enumerate() {
            channels.push(self.channel(k, c)?);
        }
        // Canonical order (Ip, then label): the file's order of channels changes no result.
        channels.sort_by(|a, b| a.ip.total_cmp(&b.ip).then_with(|| a.label.cmp(&b.label)));
        let atoms = self.atoms()?;
        let ion = self.ion(&channels)?;
        let alignment = self
            .alignment
            .build()
            .map_err(|e| Error::Inconsistent(format!("alignment: {e}")))?;
        let orientations = match &self.orientations {
            Some(OrientationSpec::Fixed { euler_deg }) => {
                for (i, a) in euler_deg.iter().enumerate() {
                    require_finite(&format!("orientations.euler_deg[{i}]"), *a)?;
                }
                OrientationGridSpec::Fixed(euler_deg.map(f64::to_radians))
            }
            Some(OrientationSpec::Axis { beta_points }) => {
                count("orientations.beta_points", *beta_points)?;
                if let Some(reason) = axial_symmetry_breaker(&channels, &ion) {
                    return Err(Error::invalid(
                        "orientations.grid",
                        "axis",
                        &format!(
                            "a β-only grid needs a molecule symmetric about its z axis (the \
                             average over the angle about that axis is then trivial), but {reason}; \
                             use \"full\""
                        ),
                    ));
                }
                OrientationGridSpec::Axis(*beta_points)
            }
            Some(OrientationSpec::Full {
                beta_points,
                alpha_points,
                gamma_points,
            }) => {
                count("orientations.beta_points", *beta_points)?;
                count("orientations.alpha_points", *alpha_points)?;
                count("orientations.gamma_points", *gamma_points)?;
                OrientationGridSpec::Full(*beta_points, *alpha_points, *gamma_points)
            }
            None if atoms.len() <= 1 && channels.iter().all(is_isotropic_channel) => {
                OrientationGridSpec::Fixed([0.0; 3])
            }
            None => OrientationGridSpec::Full(8, 8, 3),
        };
        Ok(Target {
            name: self.name.clone(),
            description: self.description.clone(),
            invented: self.invented,
            source: self.source.clone(),
            atoms,
            channels,
            ion,
            alignment,
            orientations,
        })
    }

    fn channel(&self, k: usize, c: &ChannelSpec) -> Result<Channel> {
        let key = |name: &str| format!("channels[{k}].{name}");
        if !valid_label(&c.label) {
            return Err(Error::invalid(
                &key("label"),
                format!("{:?}", c.label),
                "must be non-empty, made of letters, digits, '+', '-', '_', without \"_to_\"",
            ));
        }
        if let Some(j) = self.channels[..k].iter().position(|o| o.label == c.label) {
            return Err(Error::invalid(
                &key("label"),
                format!("{:?}", c.label),
                &format!("duplicates the label of channels[{j}]"),
            ));
        }
        let ip = units::ev_to_au(require_positive(&key("ip_ev"), c.ip_ev)?);
        if c.ip_ev > MAX_IP_EV {
            return Err(Error::invalid(
                &key("ip_ev"),
                format!("{:e}", c.ip_ev),
                &format!(
                    "above {MAX_IP_EV:e} eV: no ionic state of any element is bound that strongly \
                     (the 1s electron of U⁹¹⁺ is bound by about 1.32e5 eV)"
                ),
            ));
        }
        if let Some(spec) = &c.dyson_orbital {
            for (t, term) in spec.terms.iter().enumerate() {
                let at = |name: &str| key(&format!("dyson_orbital.terms[{t}].{name}"));
                let r = term.centre_bohr.iter().map(|x| x * x).sum::<f64>().sqrt();
                if r > MAX_DISTANCE_BOHR {
                    return Err(Error::invalid(
                        &at("centre_bohr"),
                        format!("|centre| = {r:e} bohr"),
                        &format!("must lie within {MAX_DISTANCE_BOHR} bohr of the origin"),
                    ));
                }
                for (i, a) in term.exponents_inv_bohr2.iter().enumerate() {
                    if *a > MAX_EXPONENT_INV_BOHR2 {
                        return Err(Error::invalid(
                            &at(&format!("exponents_inv_bohr2[{i}]")),
                            format!("{a:e}"),
                            &format!(
                                "above {MAX_EXPONENT_INV_BOHR2:e} bohr⁻², tighter than any atomic \
                                 basis function"
                            ),
                        ));
                    }
                }
            }
        }
        for (model, exponent) in [
            ("ionization.exponent_au", ionization_exponent(&c.ionization)),
            (
                "recombination.exponent_au",
                recombination_exponent(&c.recombination),
            ),
        ] {
            if let Some(a) = exponent
                && a > MAX_EXPONENT_INV_BOHR2
            {
                return Err(Error::invalid(
                    &key(model),
                    format!("{a:e}"),
                    &format!(
                        "above {MAX_EXPONENT_INV_BOHR2:e} bohr⁻², tighter than any atomic basis \
                         function"
                    ),
                ));
            }
        }
        let orbital = match &c.dyson_orbital {
            Some(spec) => Some(Arc::new(Orbital::from_spec(spec).map_err(|e| {
                Error::Inconsistent(format!("{}: {e}", key("dyson_orbital")))
            })?)),
            None => None,
        };
        let need_orbital = |what: &str| {
            orbital.clone().ok_or_else(|| {
                Error::invalid(
                    &key(what),
                    "needs a Dyson orbital",
                    "add dyson_orbital to the channel",
                )
            })
        };
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
            IonizationSpec::Orbital {} => IonizationModel::Orbital {
                orbital: need_orbital("ionization")?,
            },
            IonizationSpec::Asymptotic {
                charge,
                coefficients,
            } => {
                let mut terms = Vec::with_capacity(coefficients.len());
                for (i, t) in coefficients.iter().enumerate() {
                    let c =
                        t.c.value(&key(&format!("ionization.coefficients[{i}].c")))?;
                    terms.push(AsymptoticTerm::new(t.l, t.m, c));
                }
                IonizationModel::Asymptotic {
                    orbital: AsymptoticOrbital::new(ip, *charge, terms)
                        .map_err(|e| Error::Inconsistent(format!("{}: {e}", key("ionization"))))?,
                }
            }
            IonizationSpec::Table {
                beta_deg,
                amplitude,
            } => {
                let mut values = Vec::with_capacity(amplitude.len());
                for (i, a) in amplitude.iter().enumerate() {
                    values.push(complex(&key(&format!("ionization.amplitude[{i}]")), *a)?);
                }
                IonizationModel::Table {
                    beta: beta_deg.iter().map(|b| b.to_radians()).collect(),
                    amplitude: values,
                }
            }
        };
        ionization.validate(&key("ionization"))?;
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
            RecombinationSpec::Lcao { form, momentum } => RecombinationModel::Lcao {
                orbital: need_orbital("recombination")?,
                form: *form,
                momentum: *momentum,
            },
            RecombinationSpec::Table {
                energy_ev,
                theta_deg,
                parallel_au,
                perpendicular_au,
            } => {
                let flat = |rows: &[Vec<ComplexSpec>], name: &str| -> Result<Vec<Complex64>> {
                    if rows.len() != energy_ev.len() {
                        return Err(Error::invalid(
                            &key(&format!("recombination.{name}")),
                            format!("{} rows", rows.len()),
                            &format!("needs one row per energy ({})", energy_ev.len()),
                        ));
                    }
                    let mut out = Vec::new();
                    for (r, row) in rows.iter().enumerate() {
                        if row.len() != theta_deg.len() {
                            return Err(Error::invalid(
                                &key(&format!("recombination.{name}[{r}]")),
                                format!("{} values", row.len()),
                                &format!("needs one value per angle ({})", theta_deg.len()),
                            ));
                        }
                        for (j, c) in row.iter().enumerate() {
                            out.push(complex(
                                &key(&format!("recombination.{name}[{r}][{j}]")),
                                *c,
                            )?);
                        }
                    }
                    Ok(out)
                };
                RecombinationModel::Table {
                    energies: energy_ev.iter().map(|e| units::ev_to_au(*e)).collect(),
                    angles: theta_deg.iter().map(|t| t.to_radians()).collect(),
                    parallel: flat(parallel_au, "parallel_au")?,
                    perpendicular: flat(perpendicular_au, "perpendicular_au")?,
                }
            }
        };
        recombination.validate(&key("recombination"))?;
        Ok(Channel {
            label: c.label.clone(),
            ip,
            ionization,
            recombination,
        })
    }

    fn atoms(&self) -> Result<Vec<Atom>> {
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
            let r = position.iter().map(|x| x * x).sum::<f64>().sqrt();
            if r > MAX_DISTANCE_BOHR {
                return Err(Error::invalid(
                    &key("position"),
                    format!("{r:e} bohr from the origin"),
                    &format!("must lie within {MAX_DISTANCE_BOHR} bohr of the origin"),
                ));
            }
            atoms.push(Atom {
                element: a.element.clone(),
                position: Vector3::from(position),
            });
        }
        Ok(atoms)
    }

    /// The ion's Hamiltonian data from the channels and couplings.
    fn ion(&self, channels: &[Channel]) -> Result<IonModel> {
        let n = channels.len();
        let zero = Complex64::new(0.0, 0.0);
        let mut v = DMatrix::from_element(n, n, zero);
        let mut mu = [
            DMatrix::from_element(n, n, zero),
            DMatrix::from_element(n, n, zero),
            DMatrix::from_element(n, n, zero),
        ];
        let mut seen: Vec<(usize, usize)> = Vec::new();
        for (k, c) in self.couplings.iter().enumerate() {
            let key = |name: &str| format!("couplings[{k}].{name}");
            let find = |label: &str, i: usize| {
                channels
                    .iter()
                    .position(|c| c.label == label)
                    .ok_or_else(|| {
                        Error::invalid(
                            &key(&format!("channels[{i}]")),
                            format!("{label:?}"),
                            "names no channel of the target",
                        )
                    })
            };
            let (a, b) = (find(&c.channels[0], 0)?, find(&c.channels[1], 1)?);
            if let Some(j) = seen.iter().position(|&(x, y)| (x, y) == (a, b)) {
                return Err(Error::invalid(
                    &key("channels"),
                    format!("{:?}", c.channels),
                    &format!("repeats couplings[{j}]"),
                ));
            }
            let dipole = match (&c.dipole_au, &c.dipole_debye) {
                (Some(d), None) => Some(d.value(&key("dipole_au"))?),
                (None, Some(d)) => Some(
                    d.value(&key("dipole_debye"))?
                        .map(|x| x * units::debye_to_au(1.0)),
                ),
                (Some(_), Some(_)) => {
                    return Err(Error::invalid(
                        &key("dipole_au"),
                        "given with dipole_debye",
                        "give the dipole in one unit only",
                    ));
                }
                (None, None) => None,
            };
            let energy = match &c.energy_ev {
                Some(e) if a == b => {
                    return Err(Error::invalid(
                        &key("energy_ev"),
                        format!("{e:?}"),
                        "a diagonal energy belongs in the channel's ip_ev",
                    ));
                }
                Some(e) => Some(e.value(&key("energy_ev"))? / units::HARTREE_EV),
                None => None,
            };
            if let Some(d) = dipole {
                let norm = d.iter().map(|x| x.norm_sqr()).sum::<f64>().sqrt();
                if norm > MAX_COUPLING_DIPOLE_AU {
                    return Err(Error::invalid(
                        &key(if c.dipole_au.is_some() {
                            "dipole_au"
                        } else {
                            "dipole_debye"
                        }),
                        format!("|μ| = {norm:e} a.u."),
                        &format!(
                            "above {MAX_COUPLING_DIPOLE_AU} a.u. (127 D): no ionic transition or \
                             permanent dipole is that large, and the hole propagator's work grows \
                             with |μ|·F"
                        ),
                    ));
                }
            }
            if let Some(e) = energy
                && e.norm() * units::HARTREE_EV > MAX_COUPLING_ENERGY_EV
            {
                return Err(Error::invalid(
                    &key("energy_ev"),
                    format!("{:e} eV", e.norm() * units::HARTREE_EV),
                    &format!(
                        "above {MAX_COUPLING_ENERGY_EV} eV in magnitude: a field-free coupling \
                         that large means the channels are not the ionic states (diagonalise \
                         first), and the hole propagator's work grows with it"
                    ),
                ));
            }
            if a != b {
                let gap = (channels[a].ip - channels[b].ip).abs() * units::HARTREE_EV;
                if gap > MAX_COUPLED_GAP_EV {
                    return Err(Error::invalid(
                        &key("channels"),
                        format!("{:?} ({gap:.4e} eV apart)", c.channels),
                        &format!(
                            "channels more than {MAX_COUPLED_GAP_EV} eV apart cannot be coupled: \
                             the hole propagator's work grows with the gap, and the laser does \
                             not couple states that far apart (leave the coupling out)"
                        ),
                    ));
                }
            }
            if dipole.is_none() && energy.is_none() {
                return Err(Error::invalid(
                    &key("channels"),
                    format!("{:?}", c.channels),
                    "give dipole_au, dipole_debye or energy_ev",
                ));
            }
            // A reverse entry already given must be the Hermitian conjugate of this one.
            let reverse = seen.iter().position(|&(x, y)| (x, y) == (b, a));
            if let Some(j) = reverse {
                let tol = 1e-12;
                let bad_mu = dipole.is_some_and(|d| {
                    (0..3).any(|i| (d[i] - mu[i][(b, a)].conj()).norm() > tol * (1.0 + d[i].norm()))
                });
                let bad_v =
                    energy.is_some_and(|e| (e - v[(b, a)].conj()).norm() > tol * (1.0 + e.norm()));
                if bad_mu || bad_v {
                    return Err(Error::invalid(
                        &key("channels"),
                        format!("{:?}", c.channels),
                        &format!(
                            "is not the complex conjugate of couplings[{j}]: the coupling matrix \
                             would not be Hermitian (give each pair once)"
                        ),
                    ));
                }
            }
            if a == b
                && let Some(d) = dipole
                && d.iter().any(|x| x.im != 0.0)
            {
                return Err(Error::invalid(
                    &key("dipole_au"),
                    format!("{d:?}"),
                    "a permanent dipole must be real (Hermitian diagonal)",
                ));
            }
            if let Some(d) = dipole {
                for i in 0..3 {
                    mu[i][(a, b)] = d[i];
                    mu[i][(b, a)] = d[i].conj();
                }
            }
            if let Some(e) = energy {
                v[(a, b)] = e;
                v[(b, a)] = e.conj();
            }
            seen.push((a, b));
        }
        IonModel::new(channels.iter().map(|c| c.ip).collect(), v, mu)
            .map_err(|e| Error::Inconsistent(format!("couplings: {e}")))
    }
}

fn count(key: &str, n: usize) -> Result<()> {
    if n == 0 || n > 1000 {
        return Err(Error::invalid(key, n, "must be between 1 and 1000"));
    }
    Ok(())
}

/// The first feature of the channels or couplings that is not symmetric under rotations about
/// the molecular z axis (None if all are): transverse transition dipoles, Dyson orbitals that
/// change under such a rotation (checked numerically on their transforms at a few momenta, with
/// an irrational angle, to 1e-10 relative), asymptotic terms with m' ≠ 0, constant
/// recombination vectors off the axis. The tabulated models depend on the angle to the axis
/// only and the atom-centred s models sit at the origin: they are symmetric by construction.
fn axial_symmetry_breaker(channels: &[Channel], ion: &IonModel) -> Option<String> {
    let n = channels.len();
    for (a, name) in [(0, "x"), (1, "y")] {
        let m = &ion.dipole()[a];
        for r in 0..n {
            for c in 0..n {
                if m[(r, c)].norm() > 0.0 {
                    return Some(format!(
                        "the dipole between channels {} and {} has a {name} component",
                        channels[r].label, channels[c].label
                    ));
                }
            }
        }
    }
    let orbital_breaks = |o: &Orbital| -> bool {
        use crate::orbital::PlaneWaveProjection;
        let (s, c) = 1.0_f64.sin_cos();
        let ks = [
            [0.3, -0.7, 0.4],
            [1.1, 0.2, -0.5],
            [-0.4, 0.9, 1.3],
            [0.0, 0.6, 0.0],
        ];
        ks.iter().any(|k| {
            let v = Vector3::new(k[0], k[1], k[2]).map(|x| Complex64::new(x, 0.0));
            let w = Vector3::new(c * k[0] - s * k[1], s * k[0] + c * k[1], k[2])
                .map(|x| Complex64::new(x, 0.0));
            let (a, b) = (o.transform(&v), o.transform(&w));
            (a - b).norm() > 1e-10 * a.norm().max(b.norm()).max(1e-300)
        })
    };
    for ch in channels {
        match &ch.ionization {
            IonizationModel::Orbital { orbital } if orbital_breaks(orbital) => {
                return Some(format!(
                    "the Dyson orbital of channel {} (ionization) changes under a rotation about z",
                    ch.label
                ));
            }
            IonizationModel::Asymptotic { orbital } => {
                if let Some(t) = orbital.terms().iter().find(|t| t.m_prime != 0) {
                    return Some(format!(
                        "the asymptotic ionization model of channel {} has a term with m' = {}",
                        ch.label, t.m_prime
                    ));
                }
            }
            _ => {}
        }
        match &ch.recombination {
            RecombinationModel::Lcao { orbital, .. } if orbital_breaks(orbital) => {
                return Some(format!(
                    "the Dyson orbital of channel {} (recombination) changes under a rotation \
                     about z",
                    ch.label
                ));
            }
            RecombinationModel::Constant { vector } if vector.x.norm() + vector.y.norm() > 0.0 => {
                return Some(format!(
                    "the constant recombination vector of channel {} is not along z",
                    ch.label
                ));
            }
            _ => {}
        }
    }
    None
}

fn is_isotropic_channel(c: &Channel) -> bool {
    c.ionization.is_isotropic() && c.recombination.is_isotropic()
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
                dyson_orbital: None,
            }],
            couplings: Vec::new(),
            alignment: AlignmentDescription::default(),
            orientations: None,
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

    /// A one-channel target with the given models (ionization potential `ip` in a.u.), fixed
    /// in the lab frame (one orientation, Euler angles 0): an atom, or a molecule held fixed.
    /// This is how the library computes the spectrum of one channel: through the same
    /// multichannel path as every molecule ([`crate::multichannel::spectrum`]).
    ///
    /// # Errors
    /// An ionization potential that is not positive and finite, or invalid model parameters
    /// (named as `ionization` / `recombination`).
    pub fn one_channel(
        ip: f64,
        ionization: IonizationModel,
        recombination: RecombinationModel,
    ) -> Result<Target> {
        require_positive("ionization potential (a.u.)", ip)?;
        ionization.validate("ionization")?;
        recombination.validate("recombination")?;
        let zero = DMatrix::from_element(1, 1, Complex64::new(0.0, 0.0));
        let ion = IonModel::new(vec![ip], zero.clone(), [zero.clone(), zero.clone(), zero])
            .map_err(|e| Error::invalid("ionization potential (a.u.)", ip, &e.to_string()))?;
        Ok(Target {
            name: "one channel".into(),
            description: "one-channel target built in code".into(),
            invented: true,
            source: String::new(),
            atoms: Vec::new(),
            channels: vec![Channel {
                label: "X".into(),
                ip,
                ionization,
                recombination,
            }],
            ion,
            alignment: AlignmentDistribution::isotropic(),
            orientations: OrientationGridSpec::Fixed([0.0; 3]),
        })
    }

    /// Whether every channel's models are independent of orientation and there is at most one
    /// atom: orientation averaging then changes nothing.
    pub fn is_isotropic(&self) -> bool {
        self.atoms.len() <= 1 && self.channels.iter().all(is_isotropic_channel)
    }
}
