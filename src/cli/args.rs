//! Command-line arguments (clap derive): raw values only; `settings` validates them.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

/// holecast: high-harmonic dipoles of atoms and molecules from strong-field quantum orbits.
///
/// holecast is a calculator. Intense lasers are hazardous: laboratory work follows local
/// laser-safety rules and licensed practice.
#[derive(Debug, Parser)]
#[command(name = "holecast", version, about, long_about = None)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
    /// No progress output on stderr (warnings and errors are still printed).
    #[arg(long, global = true)]
    pub quiet: bool,
    /// Multiply every work limit by F (default 1). A run whose estimated work exceeds a limit
    /// is refused before it starts; the message gives the estimate and the factor that would
    /// let it run (README: warnings and limits).
    #[arg(
        long,
        global = true,
        value_name = "F",
        default_value_t = 1.0,
        allow_negative_numbers = true
    )]
    pub work_limit_factor: f64,
    /// Largest estimated memory of a spectrum (MB); larger runs are refused before they start.
    #[arg(
        long,
        global = true,
        value_name = "MB",
        default_value_t = 4000.0,
        allow_negative_numbers = true
    )]
    pub max_memory_mb: f64,
}

/// Subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Validate a target and laser and print derived quantities per channel
    /// (Up, Keldysh parameter, photon energy, cutoff estimates).
    Check(CheckArgs),
    /// Solve the quantum orbits (complex ionization and return times) on an energy grid.
    Orbits(OrbitsArgs),
    /// Compute the harmonic spectrum and write spectrum.json, spectrum.csv and spectrum.svg
    /// (and, for several channels, the hole dynamics as holes.json, holes.csv, holes.svg).
    Spectrum(SpectrumArgs),
    /// Compute the hole density matrix decoded by each harmonic and write holes.json,
    /// holes.csv and holes.svg (populations and coherences vs. return delay).
    Holes(HolesArgs),
    /// Compute the spectrum over a grid of parameters (a scan file or --axis flags) and write
    /// scan.npz, scan.csv and scan.svg; --shard K/N computes one part (see scan-merge).
    Scan(super::scan::ScanArgs),
    /// Merge the shard files of a scan into scan.npz, scan.csv and scan.svg (the same bytes a
    /// single run writes).
    ScanMerge(super::scan::MergeArgs),
    /// Write Slurm batch scripts for a sharded scan (array job + merge job) and print the sbatch
    /// lines that submit them.
    ScanSlurm(super::scan::SlurmArgs),
    /// Fit model spectra to measured ones (fit.json, fit.csv, fit.svg, fitted-target.json);
    /// with --expected-noise, the expected uncertainties of planned datasets instead.
    Fit(super::fit::FitArgs),
    /// Write synthetic line yields with seeded noise, in the format `fit` reads.
    Synthetic(super::fit::SyntheticArgs),
}

/// Which target.
#[derive(Debug, Args, Clone)]
pub struct TargetArgs {
    /// Target file (JSON, see docs/target-file.md).
    #[arg(value_name = "TARGET", required_unless_present = "ip")]
    pub target: Option<PathBuf>,
    /// Instead of a target file: a one-channel atom with this ionization potential (eV) and the
    /// default models.
    #[arg(
        long,
        value_name = "EV",
        conflicts_with = "target",
        allow_negative_numbers = true
    )]
    pub ip: Option<f64>,
}

/// Which laser.
#[derive(Debug, Args, Clone)]
pub struct LaserArgs {
    /// Laser file (JSON, see docs/laser-file.md) for anything beyond one linear colour.
    #[arg(long, value_name = "FILE")]
    pub laser: Option<PathBuf>,
    /// Cycle-averaged peak intensity (W/cm²); with --laser it overrides the first colour's.
    #[arg(long, value_name = "W/CM2", allow_negative_numbers = true)]
    pub intensity: Option<f64>,
    /// Wavelength (nm); with --laser it overrides the first colour's.
    #[arg(long, value_name = "NM", allow_negative_numbers = true)]
    pub wavelength: Option<f64>,
}

/// Which photon energies.
#[derive(Debug, Args, Clone)]
pub struct GridArgs {
    /// Harmonic orders FIRST:LAST:STEP (e.g. 11:45:1). Default: from the first order above Ip
    /// to 20% past the quantum cutoff, step 1 (0.1 for pulses).
    #[arg(
        long,
        value_name = "FIRST:LAST:STEP",
        conflicts_with = "energies",
        allow_hyphen_values = true
    )]
    pub orders: Option<String>,
    /// Photon energies in eV, FIRST:LAST:STEP.
    #[arg(long, value_name = "FIRST:LAST:STEP", allow_hyphen_values = true)]
    pub energies: Option<String>,
    /// Saddle method: highest return of the electron to include (1 = short and long
    /// first-return orbits; at most 8). Default 1.
    #[arg(long, value_name = "N", allow_negative_numbers = true)]
    pub returns: Option<i64>,
}

/// Output format of `check`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum CheckFormat {
    /// Aligned text for reading.
    Table,
    /// JSON document.
    Json,
}

/// Output format of a table.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// Aligned text for reading.
    Table,
    /// JSON document.
    Json,
    /// CSV.
    Csv,
}

/// How to sum the saddles of a pair.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SumArg {
    /// Uniform (Airy) approximation: finite through the cutoff.
    Uniform,
    /// Plain saddle-point sum (diverges at the cutoff; for comparison).
    Plain,
}

/// How the spectrum is computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MethodArg {
    /// Quantum-orbit saddle points (fast; the default).
    Saddle,
    /// Numerical quadrature of the time-domain dipole, no saddle points in time (an
    /// independent check; slower).
    Quadrature,
}

/// Where the hole propagator of a saddle is evaluated.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum HoleTimesArg {
    /// At the complex saddle times: the hole moves while the electron tunnels (default).
    Complex,
    /// At the real parts of the saddle times: the hole frozen under the barrier (the common
    /// shortcut; for comparison).
    Real,
}

/// Saddle-point order of the hole propagator.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum HoleExpansionArg {
    /// `U_I` at the saddle plus its next-order terms across the saddle (default; with
    /// `--hole-times complex`).
    NextOrder,
    /// `U_I` at the saddle only (the plain saddle-point treatment; for comparison).
    Leading,
}

/// How `spectrum` computes the group delays dφ/dΩ.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum GroupDelaysArg {
    /// Saddle method: from each saddle's own phase slope ∂Φ/∂Ω = t_r (exact) plus the slope of
    /// the prefactors across the energy grid, no extra saddles (saddle default); by difference
    /// where the grid does not resolve the prefactors, and on grids coarser than 0.25 orders.
    Tangent,
    /// Central difference over Ω ± 0.001ω, every saddle (or the quadrature's transform) computed
    /// again at both ends: three times the work (quadrature default).
    Difference,
    /// No group delays (their columns are null).
    Skip,
}

/// Where a side's Gaussian structure factors go.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StructureArg {
    /// Into the phase of the saddle problem, shell by shell (Gaussian-type models only).
    Phase,
    /// In the prefactor, evaluated at the saddle.
    Prefactor,
    /// Recombination side: in the phase where the ionization side of the pair is too (measured
    /// best, docs/validation.md), else in the prefactor. Ionization side: as `phase`.
    Auto,
}

/// How the quadrature does the drift-momentum integral.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MomentumArg {
    /// Exactly, as a Gaussian moment, for Gaussian-type structure (default).
    Exact,
    /// Structure factors at the stationary momentum (the shortcut).
    Stationary,
}

/// Approximations of the dipole (spectrum and holes; saddle method only).
#[derive(Debug, Args)]
pub struct ModelArgs {
    /// Saddle method: where the hole propagator is evaluated [default: complex].
    #[arg(long, value_enum)]
    pub hole_times: Option<HoleTimesArg>,
    /// Saddle method: the hole propagator at the saddle only, or with its next-order terms
    /// (its variation across the saddle) [default: next-order].
    #[arg(long, value_enum)]
    pub hole_expansion: Option<HoleExpansionArg>,
    /// Saddle method: Gaussian ionization structure (gaussian, orbital models) in the phase or
    /// in the prefactor [default: phase].
    #[arg(long, value_enum)]
    pub ionization_structure: Option<StructureArg>,
    /// Saddle method: Gaussian recombination structure (gaussian, lcao models) in the phase or
    /// in the prefactor [default: auto].
    #[arg(long, value_enum)]
    pub recombination_structure: Option<StructureArg>,
}

/// `holecast check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    #[command(flatten)]
    pub target: TargetArgs,
    #[command(flatten)]
    pub laser: LaserArgs,
    /// Output format.
    #[arg(long, value_enum, default_value_t = CheckFormat::Table)]
    pub format: CheckFormat,
}

/// `holecast orbits`.
#[derive(Debug, Args)]
pub struct OrbitsArgs {
    #[command(flatten)]
    pub target: TargetArgs,
    #[command(flatten)]
    pub laser: LaserArgs,
    #[command(flatten)]
    pub grid: GridArgs,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Write to this file instead of standard output.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// Also list the solved saddles that are not summed (the growing member of a pair beyond
    /// its cutoff, growing amplitudes, orbits outside the pulse), with the reason in `status`.
    #[arg(long)]
    pub include_excluded: bool,
}

/// `holecast spectrum`.
#[derive(Debug, Args)]
pub struct SpectrumArgs {
    #[command(flatten)]
    pub target: TargetArgs,
    #[command(flatten)]
    pub laser: LaserArgs,
    #[command(flatten)]
    pub grid: GridArgs,
    /// Saddle method: saddle summation [default: uniform].
    #[arg(long, value_enum)]
    pub sum: Option<SumArg>,
    /// How the group delays are computed, or skipped [default: tangent with the saddle method,
    /// difference with the quadrature].
    #[arg(long, value_enum)]
    pub group_delays: Option<GroupDelaysArg>,
    /// Method: saddle points or numerical quadrature. Options marked "saddle method" or
    /// "quadrature" are refused with the other method.
    #[arg(long, value_enum, default_value_t = MethodArg::Saddle)]
    pub method: MethodArg,
    /// Quadrature: largest excursion time τ_max (cycles), where the excursion window ends
    /// (default 0.97: first returns only).
    #[arg(long, value_name = "CYCLES", allow_negative_numbers = true)]
    pub excursion_cycles: Option<f64>,
    /// Quadrature: width of the window's falling ramp that ends at τ_max (cycles; default
    /// 0.03). Use a wide ramp between the short and long excursion times to keep short orbits.
    #[arg(long, value_name = "CYCLES", allow_negative_numbers = true)]
    pub window_fall_cycles: Option<f64>,
    /// Quadrature: how the drift-momentum integral is done [default: exact].
    #[arg(long, value_enum)]
    pub momentum_integral: Option<MomentumArg>,
    #[command(flatten)]
    pub model: ModelArgs,
    #[command(flatten)]
    pub detection: DetectionArgs,
    /// Output folder (created if missing).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}

/// The detection layer on `spectrum` (docs/setup-file.md): a setup file, and flags for the
/// common case of a gas jet added coherently along the axis. Any of them writes
/// detected.json, detected.csv, detected-lines.csv and detected.svg beside the spectrum.
#[derive(Debug, Args, Clone, Default)]
pub struct DetectionArgs {
    /// Setup file (JSON: beam, medium, detector; docs/setup-file.md).
    #[arg(long, value_name = "FILE")]
    pub setup: Option<PathBuf>,
    /// Gas jet centre relative to the focus (mm; > 0 after the focus). Without --setup: a slab
    /// added coherently along the axis, no dispersion, no detector.
    #[arg(long, value_name = "MM", allow_negative_numbers = true)]
    pub jet_position_mm: Option<f64>,
    /// Gas jet length (mm) [default without --setup: 1].
    #[arg(long, value_name = "MM", allow_negative_numbers = true)]
    pub jet_length_mm: Option<f64>,
    /// Beam waist at the focus (µm) [default without --setup: 50].
    #[arg(long, value_name = "UM", allow_negative_numbers = true)]
    pub waist_um: Option<f64>,
    /// Single-molecule runs (intensity samples) of the detection layer [default: 16].
    #[arg(long, value_name = "N")]
    pub intensity_samples: Option<usize>,
}

impl DetectionArgs {
    /// Whether any detection option was given.
    pub fn any(&self) -> bool {
        self.setup.is_some()
            || self.jet_position_mm.is_some()
            || self.jet_length_mm.is_some()
            || self.waist_um.is_some()
            || self.intensity_samples.is_some()
    }
}

/// `holecast holes`.
#[derive(Debug, Args)]
pub struct HolesArgs {
    #[command(flatten)]
    pub target: TargetArgs,
    #[command(flatten)]
    pub laser: LaserArgs,
    #[command(flatten)]
    pub grid: GridArgs,
    #[command(flatten)]
    pub model: ModelArgs,
    /// Output folder (created if missing).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}
