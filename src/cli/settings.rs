//! Validated settings built from the raw arguments: files read, units converted, every error
//! naming the file, the key, the value and the reason.

use std::path::{Path, PathBuf};

use anyhow::{Context, Result, anyhow, bail};

use holecast::cutoff::Cutoffs;
use holecast::cutoff::try_cutoffs;
use holecast::field::{Field, TimeStructure};
use holecast::grid::default_grid;
use holecast::laser::{EnvelopeSpec, LaserSpec};
use holecast::orbits::{ChannelPair, OrbitSettings, WorkLimits, budget};
use holecast::report::lattice::{GridUnit, Lattice};
use holecast::target::{Target, TargetSpec};
use holecast::units;

use super::args::{GridArgs, LaserArgs, TargetArgs};

/// A target with where it came from.
pub struct LoadedTarget {
    /// The validated target.
    pub target: Target,
    /// The file it was read from (None for `--ip`).
    pub file: Option<PathBuf>,
    /// The file's record for the provenance (size and SHA-256 of the bytes read).
    pub input: Option<InputFile>,
    /// Channels whose Dyson orbital no model uses.
    pub unused_orbitals: Vec<String>,
}

fn read_text(path: &Path, what: &str) -> Result<String> {
    std::fs::read_to_string(path)
        .with_context(|| format!("cannot read {what} file {}", path.display()))
}

/// An input file as read: its role, path as given, size and SHA-256 of the bytes parsed.
#[derive(Clone, Debug)]
pub struct InputFile {
    /// `target` or `laser`.
    pub role: &'static str,
    /// The path as given on the command line.
    pub path: PathBuf,
    /// Size in bytes.
    pub bytes: usize,
    /// SHA-256 of the contents, lower-case hexadecimal.
    pub sha256: String,
}

impl InputFile {
    fn of(role: &'static str, path: &Path, text: &str) -> Self {
        use sha2::{Digest, Sha256};
        let digest = Sha256::digest(text.as_bytes());
        Self {
            role,
            path: path.to_path_buf(),
            bytes: text.len(),
            sha256: digest.iter().map(|b| format!("{b:02x}")).collect(),
        }
    }
}

/// Reads and validates the target.
pub fn target(args: &TargetArgs) -> Result<LoadedTarget> {
    match (&args.target, args.ip) {
        (Some(path), None) => {
            let text = read_text(path, "target")?;
            let spec = TargetSpec::from_json(&text)
                .map_err(|e| anyhow!("target file {}: {e}", path.display()))?;
            let target = spec
                .validate()
                .map_err(|e| anyhow!("target file {}: {e}", path.display()))?;
            Ok(LoadedTarget {
                target,
                file: Some(path.clone()),
                input: Some(InputFile::of("target", path, &text)),
                unused_orbitals: spec.unused_orbitals(),
            })
        }
        (None, Some(ip)) => Ok(LoadedTarget {
            target: Target::atom(ip)?,
            file: None,
            input: None,
            unused_orbitals: Vec::new(),
        }),
        _ => bail!("give a target file or --ip EV (not both)"),
    }
}

/// The laser description after applying the shorthands, with the laser file's record.
pub fn laser(args: &LaserArgs) -> Result<(LaserSpec, Field, Option<InputFile>)> {
    let mut input = None;
    let (mut spec, origin) = match &args.laser {
        Some(path) => {
            let text = read_text(path, "laser")?;
            let spec: LaserSpec = serde_json::from_str(&text)
                .map_err(|e| anyhow!("laser file {}: {e}", path.display()))?;
            input = Some(InputFile::of("laser", path, &text));
            (spec, format!("laser file {}", path.display()))
        }
        None => {
            let (Some(i), Some(l)) = (args.intensity, args.wavelength) else {
                bail!(
                    "the laser is not specified: give --intensity W/CM2 and --wavelength NM, \
                     or --laser FILE"
                );
            };
            (LaserSpec::monochromatic(i, l), "command line".to_string())
        }
    };
    if args.laser.is_some() {
        if let Some(first) = spec.colours.first_mut() {
            if let Some(i) = args.intensity {
                first.intensity_wcm2 = Some(i);
            }
            if let Some(l) = args.wavelength {
                first.wavelength_nm = Some(l);
            }
        }
    }
    let field = spec.to_field().map_err(|e| {
        let e = e.to_string();
        let e = e
            .replace(
                "colours[0].intensity_wcm2",
                "intensity (--intensity or colours[0].intensity_wcm2)",
            )
            .replace(
                "colours[0].wavelength_nm",
                "wavelength (--wavelength or colours[0].wavelength_nm)",
            );
        anyhow!("{origin}: {e}")
    })?;
    Ok((spec, field, input))
}

/// Smallest harmonic order of a grid: the group delay needs `Ω ± 0.001ω > 0`, and nothing in
/// the model describes photons far below the driver's.
pub const MIN_ORDER: f64 = 0.01;

/// Parses `FIRST:LAST:STEP` (in the option's unit; `to_order` converts it to harmonic orders of
/// the field's `omega` for the lower bound) and checks the number of points against the limits before any grid is
/// built.
fn parse_range(
    text: &str,
    option: &str,
    to_order: f64,
    omega: f64,
    limits: &WorkLimits,
) -> Result<(f64, f64, f64)> {
    let parts: Vec<&str> = text.split(':').collect();
    if parts.len() != 3 {
        bail!("{option} {text:?}: expected FIRST:LAST:STEP, e.g. 11:45:1");
    }
    let num = |s: &str, what: &str| -> Result<f64> {
        let v: f64 = s
            .trim()
            .parse()
            .map_err(|_| anyhow!("{option} {text:?}: {what} {s:?} is not a number"))?;
        if !v.is_finite() {
            bail!("{option} {text:?}: {what} must be finite");
        }
        Ok(v)
    };
    let (a, b, s) = (
        num(parts[0], "FIRST")?,
        num(parts[1], "LAST")?,
        num(parts[2], "STEP")?,
    );
    if a <= 0.0 {
        bail!("{option} {text:?}: FIRST must be positive");
    }
    if a * to_order < MIN_ORDER {
        bail!(
            "{option} {text:?}: FIRST = {a:e} is below the smallest harmonic order allowed, \
             {MIN_ORDER} (a photon energy of {:.4} eV in this field): such low photon energies \
             are outside the model",
            units::au_to_ev(MIN_ORDER * omega)
        );
    }
    if b < a {
        bail!("{option} {text:?}: LAST must not be below FIRST");
    }
    if s <= 0.0 {
        bail!("{option} {text:?}: STEP must be positive");
    }
    budget::check_grid(a, b, s, limits)
        .map_err(|e| anyhow::Error::new(e).context(format!("{option} {text:?}")))?;
    Ok((a, b, s))
}

/// A photon-energy grid: the energies (a.u.) and their exact labels.
pub struct Grid {
    /// Photon energies (a.u.), computed as `FIRST + k·STEP` in the grid's unit.
    pub energies: Vec<f64>,
    /// The exact labels and the rule that chose the grid.
    pub lattice: Lattice,
}

/// The exact lattice of a `FIRST:LAST:STEP` range already checked by [`parse_range`].
fn typed_lattice(
    unit: GridUnit,
    option: &str,
    text: &str,
    (a, b, s): (f64, f64, f64),
) -> Result<Lattice> {
    let parts: Vec<&str> = text.split(':').collect();
    let what = match unit {
        GridUnit::Order => "harmonic orders",
        GridUnit::ElectronVolt => "photon energies (eV)",
    };
    Lattice::from_text(
        unit,
        (parts[0], a),
        (parts[2], s),
        b,
        format!("{option} {text}: {what} FIRST + k·STEP up to LAST, as given"),
    )
    .map_err(|e| anyhow!("{option} {text:?}: {e}"))
}

/// The photon energies (a.u.) requested, or the default grid of [`holecast::grid`]: odd orders
/// for a half-wave symmetric field and an inversion-symmetric target, from a margin above the
/// highest Ip to 20% past the highest cutoff (for a pulse, that of the continuous field with the
/// same colours, so that the grid does not depend on the CEP). The number of points is checked
/// against `limits` before the grid is built.
pub fn energies(
    args: &GridArgs,
    field: &Field,
    laser: &LaserSpec,
    target: &Target,
    cutoffs: &[Cutoffs],
    orbit: &OrbitSettings,
) -> Result<Grid> {
    let limits = &orbit.limits;
    let omega = field.omega();
    if let Some(text) = &args.orders {
        let range = parse_range(text, "--orders", 1.0, omega, limits)?;
        let lattice = typed_lattice(GridUnit::Order, "--orders", text, range)?;
        let energies = lattice.values().into_iter().map(|q| q * omega).collect();
        return Ok(Grid { energies, lattice });
    }
    if let Some(text) = &args.energies {
        let per_ev = units::ev_to_au(1.0) / omega;
        let range = parse_range(text, "--energies", per_ev, omega, limits)?;
        let lattice = typed_lattice(GridUnit::ElectronVolt, "--energies", text, range)?;
        let energies = lattice.values().into_iter().map(units::ev_to_au).collect();
        return Ok(Grid { energies, lattice });
    }
    let top = grid_cutoff(field, laser, target, cutoffs, orbit);
    let grid = default_grid(field, target, top)?;
    let (first, last, step) = grid.bounds();
    budget::check_grid(first, last, step, limits).map_err(|e| {
        anyhow::Error::new(e).context(format!(
            "default grid (orders H{first:.1} to H{last:.4e}: {}; choose one with --orders \
             FIRST:LAST:STEP)",
            grid.rule()
        ))
    })?;
    let lattice = Lattice::rational(
        GridUnit::Order,
        grid.first,
        grid.stride,
        grid.len(),
        grid.denominator,
        format!("default: {}", grid.rule()),
    )
    .map_err(|e| anyhow!("default grid: {e}"))?;
    let energies = lattice.values().into_iter().map(|q| q * omega).collect();
    Ok(Grid { energies, lattice })
}

/// The cutoff (a.u.) the default grid reaches 20% past: the highest channel cutoff of the
/// field (quantum where found, else classical); for a pulse, that of the continuous field with
/// the same colours and phases, whose cutoff does not depend on the carrier-envelope phase (a
/// CEP only shifts a continuous one-colour field in time). Where the continuous field cannot be
/// built (incommensurate colours) or its cutoff search fails, the monochromatic estimate
/// `3.17 Up + 1.32 Ip_max` (Lewenstein et al., PRA 49, 2117 (1994)) of the pulse's peak Up,
/// also independent of the CEP.
fn grid_cutoff(
    field: &Field,
    laser: &LaserSpec,
    target: &Target,
    cutoffs: &[Cutoffs],
    orbit: &OrbitSettings,
) -> f64 {
    let best = |cs: &[Cutoffs]| {
        cs.iter()
            .map(|c| c.quantum.unwrap_or(c.classical))
            .fold(0.0, f64::max)
    };
    match field.structure() {
        TimeStructure::Periodic { .. } => best(cutoffs),
        TimeStructure::Pulse { .. } => {
            let ip_max = target.channels.iter().map(|c| c.ip).fold(0.0, f64::max);
            let estimate = 3.17 * field.ponderomotive_energy() + 1.32 * ip_max;
            let mut continuous = laser.clone();
            continuous.envelope = EnvelopeSpec::Continuous {};
            let Ok(cw) = continuous.to_field() else {
                return estimate;
            };
            let found: Option<Vec<Cutoffs>> = target
                .channels
                .iter()
                .map(|c| try_cutoffs(&cw, ChannelPair::single(c.ip), orbit).ok())
                .collect();
            found.map_or(estimate, |cs| best(&cs))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn input_hash_is_sha256() {
        // FIPS 180-2, Appendix B.1: SHA-256("abc").
        let f = InputFile::of("target", Path::new("x.json"), "abc");
        assert_eq!(
            f.sha256,
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        assert_eq!(f.bytes, 3);
    }
}
