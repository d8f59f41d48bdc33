//! Work and memory limits from the command line, and the hint that says how to raise them.
//!
//! Every limit of the library ([`holecast::orbits::WorkLimits`] for the trajectory stage and
//! the cutoff search, [`holecast::workload::WorkloadLimits`] for the amplitude stage, the
//! number of photon energies) is multiplied by `--work-limit-factor`; the memory limit is
//! `--max-memory-mb`. A refused run names the estimate, the limit and the flag that lets it run.

use anyhow::{Result, bail};

use holecast::Error;
use holecast::orbits::WorkLimits;
use holecast::workload::WorkloadLimits;

/// The limits of one run.
#[derive(Clone, Copy, Debug)]
pub struct Limits {
    /// Trajectory stage and cutoff search.
    pub orbits: WorkLimits,
    /// Amplitude stage and memory.
    pub workload: WorkloadLimits,
}

impl Limits {
    /// From `--work-limit-factor` and `--max-memory-mb`.
    pub fn new(factor: f64, memory_mb: f64) -> Result<Limits> {
        if !(factor.is_finite() && factor > 0.0) {
            bail!("--work-limit-factor {factor}: must be a finite positive number");
        }
        if !(memory_mb.is_finite() && memory_mb > 0.0) {
            bail!("--max-memory-mb {memory_mb}: must be a finite positive number");
        }
        let d = WorkLimits::default();
        Ok(Limits {
            orbits: WorkLimits {
                window_evaluations: d.window_evaluations * factor,
                classical_evaluations: d.classical_evaluations * factor,
                continuation_steps: d.continuation_steps * factor,
                energy_points: d.energy_points * factor,
            },
            workload: WorkloadLimits {
                terms: holecast::workload::MAX_TERMS * factor,
                memory_bytes: memory_mb * 1e6,
            },
        })
    }
}

/// The flag that would let a refused run go ahead, for an [`Error::WorkLimit`] in the chain of
/// `e` (`factor` is the `--work-limit-factor` in force); None for other errors.
pub fn hint(e: &anyhow::Error, factor: f64) -> Option<String> {
    let Error::WorkLimit {
        estimated,
        limit,
        unit,
        ..
    } = e.chain().find_map(|c| c.downcast_ref::<Error>())?
    else {
        return None;
    };
    if !(estimated.is_finite() && *limit > 0.0) {
        return Some(
            "the estimate is not a finite number: the input is outside what holecast can \
             compute (lower the intensity, the wavelength, the Ip or the pulse length)"
                .into(),
        );
    }
    if unit == "MB" {
        return Some(format!(
            "to run it anyway, pass --max-memory-mb {:.0} (or fewer energies, orientations or \
             channels)",
            estimated.ceil()
        ));
    }
    let needed = factor * estimated / limit;
    if needed > 1e4 {
        return Some(format!(
            "the request is {:.1e} times the default limit, far beyond what holecast can do in \
             reasonable time: check the input (intensity, wavelength, Ip, pulse length, grid)",
            needed
        ));
    }
    let factor = if needed < 10.0 {
        (needed * 10.0).ceil() / 10.0
    } else {
        needed.ceil()
    };
    Some(format!(
        "to run it anyway, pass --work-limit-factor {factor} (or reduce the request: fewer \
         energies, a coarser --orders step, a lower intensity or a shorter wavelength)"
    ))
}
