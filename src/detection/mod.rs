//! From the single-molecule dipole to what a spectrometer records: the focal volume, the
//! position of the gas in the focus, filters, the spectrometer and line yields (DESIGN §4.9).
//!
//! The layer sits between the dipole and the report. Its input is a setup ([`setup`]: beam,
//! medium, detector); its driver ([`detect`]) runs the single-molecule path once per intensity
//! sample and reuses the result everywhere downstream.
//!
//! * [`beam`]: the Gaussian driving beam (intensity profile, Gouy phase).
//! * [`volume`]: analytic volume densities `|dV/dI|` of the unbounded medium, a thin slab and a
//!   slab of given length (physics notes §6.1).
//! * [`intensity_rule`]: the intensity samples of the volume average (Gauss–Radau in `ln I`,
//!   node at the peak; convergence measured in docs/detection.md).
//! * [`incoherent`]: `S(Ω) = n ∫ |dV/dI| |D(Ω; I)|² dI`, total and per family.
//! * [`buildup`]: the coherent sum along the beam axis with the Gouy phase, each family's
//!   intensity-dependent dipole phase, optional neutral and free-electron dispersion
//!   ([`plasma`]) and XUV absorption. **It is a 1-D phase-matching estimate, not a 3-D
//!   propagation** (no radial structure, no divergence, no driver reshaping).
//! * [`families`]: the dipole of a sample grouped by family label (short, long, …).
//! * [`instrument`]: filters (`T^{d/d₀}`), response, Gaussian resolution in eV or nm, the
//!   wavelength ↔ energy Jacobian, line yields.

pub mod beam;
pub mod buildup;
pub mod driver;
pub mod families;
pub mod figure;
pub mod incoherent;
pub mod instrument;
pub mod intensity_rule;
pub mod plasma;
pub mod setup;
pub mod volume;

pub use driver::{DetectedSet, DetectionNote, DetectionOutcome, detect, scaled_field};
pub use setup::{Combination, Setup, SetupSpec};
