//! The provenance written into every JSON output: what produced the file, from what, and how.
//!
//! ```text
//! "provenance": {
//!   "holecast_version": "0.1.0",
//!   "git_commit": "<40 hex digits, or unknown>",
//!   "git_tree": "clean | modified | unknown",     (tracked files vs the commit, at build time)
//!   "command_line": ["holecast", "spectrum", …],   (as given; the program name without its folder)
//!   "inputs": [{"role": "target", "path": …, "bytes": …, "sha256": …}, …],
//!   "grid": {"unit": "order", "first": "11", "step": "0.001", "points": …, "rule": "…"},
//!   "models": {"channels": [{label, ionization, recombination}], "alignment": …,
//!              "orientation_grid": …, "returns": …},
//!   "approximations": {…}
//! }
//! ```
//!
//! Nothing in it depends on the time, the machine or the thread count, so the same inputs give
//! the same bytes.

use serde_json::{Value, json};

use holecast::report::lattice::{GridUnit, Lattice};

use super::commands::Loaded;
use super::describe::{ionization_text, orientation_text, recombination_text};

/// The git commit the binary was built from (build.rs), or "unknown".
pub const GIT_COMMIT: &str = env!("HOLECAST_GIT_COMMIT");

/// Whether tracked files differed from [`GIT_COMMIT`] when the binary was built.
pub const GIT_TREE: &str = env!("HOLECAST_GIT_TREE");

/// The command line as given, the program's path reduced to its file name.
pub fn command_line() -> Vec<String> {
    let mut args: Vec<String> = std::env::args_os()
        .map(|a| a.to_string_lossy().into_owned())
        .collect();
    if let Some(first) = args.first_mut() {
        let name = std::path::Path::new(first.as_str())
            .file_name()
            .map(|n| n.to_string_lossy().into_owned());
        if let Some(name) = name {
            *first = name;
        }
    }
    args
}

/// The grid record: unit, exact first label and step, number of points, and the rule.
pub fn grid_json(lattice: &Lattice) -> Value {
    json!({
        "unit": match lattice.unit() {
            GridUnit::Order => "order",
            GridUnit::ElectronVolt => "energy_ev",
        },
        "first": lattice.first().to_string(),
        "step": lattice.step().to_string(),
        "points": lattice.len(),
        "rule": lattice.rule(),
    })
}

/// The provenance object of a run (`grid` None for `check`, `approximations` Null where the
/// command computes no dipole).
pub fn provenance(loaded: &Loaded, grid: Option<&Lattice>, approximations: Value) -> Value {
    let t = &loaded.target.target;
    let inputs: Vec<Value> = [&loaded.target.input, &loaded.laser_input]
        .into_iter()
        .flatten()
        .map(|f| {
            json!({
                "role": f.role,
                "path": f.path.display().to_string(),
                "bytes": f.bytes,
                "sha256": f.sha256,
            })
        })
        .collect();
    let channels: Vec<Value> = t
        .channels
        .iter()
        .map(|c| {
            json!({
                "label": c.label,
                "ionization": ionization_text(&c.ionization),
                "recombination": recombination_text(&c.recombination),
            })
        })
        .collect();
    json!({
        "holecast_version": env!("CARGO_PKG_VERSION"),
        "git_commit": GIT_COMMIT,
        "git_tree": GIT_TREE,
        "command_line": command_line(),
        "inputs": inputs,
        "grid": grid.map_or(Value::Null, grid_json),
        "models": {
            "target": if loaded.target.file.is_some() {
                "target file (see inputs)"
            } else {
                "one-channel atom from --ip with the default models"
            },
            "channels": channels,
            "alignment": t.alignment.describe(),
            "orientation_grid": orientation_text(t),
            "returns": loaded.orbit.discovery.max_returns,
        },
        "approximations": approximations,
    })
}
