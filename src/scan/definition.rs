//! The scan file (JSON; schema in `docs/scan-file.md`, annotated example in `scans/`) and the
//! resolved scan definition that every shard carries.
//!
//! The file names the target and the laser (a path, or the laser inline), lists the axes and
//! says how they combine: `product` (every combination, the last axis fastest) or `zip` (the
//! n-th value of every axis together; all axes of the same length). Unknown keys are refused
//! with the key's name.
//!
//! The resolved [`ScanDefinition`] holds everything a point depends on — the axes with their
//! addresses and values, the common photon-energy grid, the model options, the target and laser
//! documents (after the preparation described at [`ScanDefinition::new`]) and the holecast
//! version — and its SHA-256 ([`ScanDefinition::hash`]) identifies the scan in every shard.

use serde::{Deserialize, Serialize};
use serde_json::Value;
use sha2::{Digest, Sha256};

use super::axis::{Axis, AxisSpec, MAX_POINTS};
use super::error::ScanError;
use super::grid::{GridFile, GridKind, GridSpec};
use crate::address::{Address, Document, Segment};
use crate::laser::{LaserSpec, PolarizationSpec};
use crate::orientation::AlignmentDescription;
use crate::target::TargetSpec;

/// How the axes combine into points.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Deserialize, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Combine {
    /// Every combination of the axes' values (C order: the last axis varies fastest).
    #[default]
    Product,
    /// The n-th values of all axes together (all axes equally long).
    Zip,
}

/// A scan file as written.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ScanFile {
    /// Free text.
    #[serde(default)]
    pub description: String,
    /// Target file, relative to the scan file.
    pub target: String,
    /// Laser: a laser-file path (relative to the scan file) or a laser document inline.
    pub laser: Value,
    /// The axes (at least one).
    pub axes: Vec<AxisSpec>,
    /// `product` (default) or `zip`.
    #[serde(default)]
    pub combine: Combine,
    /// The common photon-energy grid (default: harmonic orders from the first above the
    /// lowest Ip to 20% past the highest cutoff of any point).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub grid: Option<GridFile>,
    /// Highest return of the electron (1 to 8, default 1).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub returns: Option<u32>,
    /// Also compute each family's group delay dφ/dΩ (three solves per energy; default false:
    /// the emission times Re t_r are always reported).
    #[serde(default)]
    pub group_delay: bool,
}

impl ScanFile {
    /// Reads a scan file's text.
    ///
    /// # Errors
    /// JSON errors and unknown keys, with the key's name, line and column.
    pub fn from_json(text: &str) -> Result<ScanFile, ScanError> {
        serde_json::from_str(text).map_err(|e| ScanError::invalid("scan file", "", e.to_string()))
    }
}

/// The resolved scan: everything a point's result depends on.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct ScanDefinition {
    /// Resolved axes.
    pub axes: Vec<Axis>,
    /// How they combine.
    pub combine: Combine,
    /// The common grid: its kind and values (harmonic orders of the first colour, or photon
    /// energies in eV).
    pub grid: GridKind,
    /// Grid values.
    pub grid_values: Vec<f64>,
    /// Highest return.
    pub returns: u32,
    /// Whether group delays are computed.
    pub group_delay: bool,
    /// The target document every point starts from.
    pub target: TargetSpec,
    /// The laser document every point starts from.
    pub laser: LaserSpec,
    /// The detection setup (none: single-molecule spectra).
    pub setup: Option<Value>,
    /// holecast version that defined the scan.
    pub holecast_version: String,
}

/// The holecast version recorded in every scan.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");

impl ScanDefinition {
    /// Resolves the axes and prepares the base documents: an axis on a colour's
    /// `polarization.ellipticity` turns a linear colour into an elliptical one of ellipticity 0
    /// with the same axis (the same field), and an axis on `target.alignment.mean_cos2` turns an
    /// isotropic target into the `exp_cos2` distribution with ⟨cos²β⟩ = 1/3 (isotropic), so that
    /// the addressed number exists. Every address is then checked on the base documents, so a
    /// typo is refused before any point runs. The grid is set by the caller
    /// ([`super::grid::resolve`]).
    ///
    /// # Errors
    /// Axis errors (named by position), a zip of unequal axes, too many points, an address that
    /// leads nowhere.
    pub fn new(
        axes: &[AxisSpec],
        combine: Combine,
        returns: Option<u32>,
        group_delay: bool,
        mut target: TargetSpec,
        mut laser: LaserSpec,
    ) -> Result<ScanDefinition, ScanError> {
        if axes.is_empty() {
            return Err(ScanError::invalid(
                "axes",
                "[]",
                "a scan needs at least one axis",
            ));
        }
        let axes: Vec<Axis> = axes
            .iter()
            .enumerate()
            .map(|(k, a)| a.resolve(k))
            .collect::<Result<_, _>>()?;
        let mut seen = std::collections::BTreeSet::new();
        for a in &axes {
            if !seen.insert(a.address.clone()) {
                return Err(ScanError::invalid(
                    "axes",
                    &a.address,
                    "appears on two axes: scan each value on one axis",
                ));
            }
        }
        let returns = returns.unwrap_or(1);
        if !(1..=8).contains(&returns) {
            return Err(ScanError::invalid(
                "returns",
                returns,
                "must be between 1 and 8",
            ));
        }
        for a in &axes {
            let address = a.parsed_address()?;
            prepare(&address, &mut target, &mut laser);
        }
        let definition = ScanDefinition {
            axes,
            combine,
            grid: GridKind::Order,
            grid_values: Vec::new(),
            returns,
            group_delay,
            target,
            laser,
            setup: None,
            holecast_version: VERSION.to_string(),
        };
        definition.shape()?;
        for a in &definition.axes {
            let address = a.parsed_address()?;
            let err = |source| ScanError::Address {
                axis: a.parameter.clone(),
                source,
            };
            match address.document {
                Document::Target => address
                    .read(Document::Target, &definition.target)
                    .map_err(err)?,
                Document::Laser => address
                    .read(Document::Laser, &definition.laser)
                    .map_err(err)?,
                Document::Setup => {
                    return Err(ScanError::invalid(
                        format!("axis {}", a.parameter),
                        &a.address,
                        "setup values need a detection setup, which this scan has not got (the \
                         scan computes single-molecule spectra)",
                    ));
                }
            };
        }
        Ok(definition)
    }

    /// The shape of the scan: one length per axis for a product, one length for a zip.
    ///
    /// # Errors
    /// Zipped axes of different lengths; more than [`MAX_POINTS`] points.
    pub fn shape(&self) -> Result<Vec<usize>, ScanError> {
        let shape: Vec<usize> = match self.combine {
            Combine::Product => self.axes.iter().map(|a| a.values.len()).collect(),
            Combine::Zip => {
                let n = self.axes[0].values.len();
                if let Some(a) = self.axes.iter().find(|a| a.values.len() != n) {
                    return Err(ScanError::invalid(
                        "combine",
                        "zip",
                        format!(
                            "zipped axes must be equally long: {} has {} values, {} has {n}",
                            a.parameter,
                            a.values.len(),
                            self.axes[0].parameter
                        ),
                    ));
                }
                vec![n]
            }
        };
        let total = shape.iter().try_fold(1usize, |acc, n| acc.checked_mul(*n));
        match total {
            Some(t) if t <= MAX_POINTS => Ok(shape),
            _ => Err(ScanError::invalid(
                "axes",
                format!("{shape:?}"),
                format!("more than {MAX_POINTS} points"),
            )),
        }
    }

    /// The dimension of the scan shape each axis runs along.
    pub fn axis_dimension(&self, axis: usize) -> usize {
        match self.combine {
            Combine::Product => axis,
            Combine::Zip => 0,
        }
    }

    /// Number of points.
    pub fn point_count(&self) -> usize {
        self.shape().map(|s| s.iter().product()).unwrap_or(0)
    }

    /// The axis values of point `index` (C order for a product).
    pub fn point_values(&self, index: usize) -> Vec<f64> {
        match self.combine {
            Combine::Zip => self.axes.iter().map(|a| a.values[index]).collect(),
            Combine::Product => {
                let mut rest = index;
                let mut out = vec![0.0; self.axes.len()];
                for (k, a) in self.axes.iter().enumerate().rev() {
                    let n = a.values.len();
                    out[k] = a.values[rest % n];
                    rest /= n;
                }
                out
            }
        }
    }

    /// The target and laser documents of point `index`.
    ///
    /// # Errors
    /// A value the documents cannot hold (the address error names the axis and value).
    pub fn point_documents(&self, index: usize) -> Result<(TargetSpec, LaserSpec), ScanError> {
        let mut target = self.target.clone();
        let mut laser = self.laser.clone();
        for (a, v) in self.axes.iter().zip(self.point_values(index)) {
            let address = a.parsed_address()?;
            let err = |source| ScanError::Address {
                axis: a.parameter.clone(),
                source,
            };
            match address.document {
                Document::Target => {
                    target = address.apply(Document::Target, &target, v).map_err(err)?
                }
                Document::Laser => {
                    laser = address.apply(Document::Laser, &laser, v).map_err(err)?
                }
                Document::Setup => {
                    return Err(ScanError::invalid(
                        format!("axis {}", a.parameter),
                        &a.address,
                        "no detection setup",
                    ));
                }
            }
        }
        Ok((target, laser))
    }

    /// The canonical text of the definition (serde order, shortest round-trip numbers).
    pub fn canonical(&self) -> String {
        serde_json::to_string(self).unwrap_or_default()
    }

    /// SHA-256 (hex) of [`Self::canonical`]: the scan file's values, the target, the laser,
    /// the setup and the holecast version.
    pub fn hash(&self) -> String {
        let digest = Sha256::digest(self.canonical().as_bytes());
        digest.iter().map(|b| format!("{b:02x}")).collect()
    }

    /// Sets the grid.
    pub fn with_grid(mut self, spec: &GridSpec) -> Self {
        self.grid = spec.kind;
        self.grid_values = spec.values.clone();
        self
    }
}

/// Makes the addressed value exist where the file's form leaves it out but an equivalent form
/// has it (see [`ScanDefinition::new`]).
fn prepare(address: &Address, target: &mut TargetSpec, laser: &mut LaserSpec) {
    let keys: Vec<&Segment> = address.path.iter().collect();
    match (address.document, keys.as_slice()) {
        (
            Document::Laser,
            [
                Segment::Key(c),
                Segment::Index(k),
                Segment::Key(p),
                Segment::Key(e),
            ],
        ) if c == "colours" && p == "polarization" && e == "ellipticity" => {
            if let Some(colour) = laser.colours.get_mut(*k)
                && let PolarizationSpec::Linear { angle_deg } = colour.polarization
            {
                colour.polarization = PolarizationSpec::Elliptical {
                    ellipticity: 0.0,
                    major_axis_deg: angle_deg,
                };
            }
        }
        (Document::Target, [Segment::Key(a), Segment::Key(m)])
            if a == "alignment" && m == "mean_cos2" =>
        {
            if matches!(target.alignment, AlignmentDescription::Isotropic {}) {
                target.alignment = AlignmentDescription::ExpCos2 {
                    mean_cos2: 1.0 / 3.0,
                };
            }
        }
        _ => {}
    }
}
