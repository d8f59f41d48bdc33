//! Scans: the single-molecule spectrum over a grid of parameters, addressed the same way as
//! every numeric input ([`crate::address`]), with results as N-D arrays.
//!
//! - [`definition`]: the scan file, the resolved definition and its hash;
//!   [`axis`]: axes (ranges, log ranges, lists); [`alias`]: short names of the common axes;
//!   [`grid`]: the common photon-energy grid.
//! - [`point`]: [`point::evaluate_point`], the one function that computes a point (the
//!   detection layer can take its place).
//! - [`record`]: point logs, shards, resume and merge.
//! - [`arrays`] (`scan.npz`), [`table`] (`scan.csv`), [`map`] (`scan.svg`): the writers, each
//!   returning bytes built from a [`record::ScanResult`].
//! - [`slurm`]: batch scripts for an array job and its merge job.
//!
//! The library does no file I/O: the binary reads and writes the logs and outputs.

pub mod alias;
pub mod arrays;
pub mod axis;
pub mod definition;
pub mod error;
pub mod grid;
pub mod map;
pub mod point;
pub mod record;
pub mod slurm;
pub mod table;

pub use definition::{Combine, ScanDefinition, ScanFile};
pub use error::ScanError;
pub use point::{PointLimits, PointOutcome, evaluate_point};
pub use record::{PointRecord, ScanResult, Shard};

/// Output files as `(name, bytes)`.
pub type Files = Vec<(String, Vec<u8>)>;

/// The three output files of a complete scan, `(name, bytes)`: `scan.npz`, `scan.csv` and,
/// unless the map cannot be drawn (the reason is returned), `scan.svg`.
///
/// # Errors
/// The archive cannot be encoded.
pub fn outputs(result: &ScanResult) -> Result<(Files, Option<String>), ScanError> {
    let mut files = vec![
        (
            "scan.npz".to_string(),
            arrays::npz(&arrays::arrays(result))?,
        ),
        ("scan.csv".to_string(), table::csv(result).into_bytes()),
    ];
    let mut problem = None;
    match map::map(result) {
        Ok(svg) => files.push(("scan.svg".to_string(), svg.into_bytes())),
        Err(e) => problem = Some(e),
    }
    Ok((files, problem))
}
