//! holecast: multichannel high-harmonic dipoles of molecules from strong-field quantum orbits.
#![warn(missing_docs)]

pub mod address;
pub mod classical;
pub mod cmath;
pub mod cutoff;
pub mod detection;
pub mod dipole;
pub mod error;
pub mod field;
pub mod fit;
pub mod grid;
pub mod hole;
pub mod ionization;
pub mod laser;
pub mod momentum;
pub mod multichannel;
pub mod orbital;
pub mod orbits;
pub mod orientation;
pub mod quadrature;
pub mod recombination;
pub mod report;
pub mod scan;
pub mod special;
pub mod spectrum;
pub mod status;
pub mod target;
pub mod tunnelling;
pub mod units;
pub mod validity;
pub mod workload;

pub use error::{Error, Result};
