//! The work and memory of a saddle-point spectrum, estimated before it starts.
//!
//! The trajectory stage bounds its own work ([`crate::orbits::budget`]). The amplitude stage
//! ([`crate::multichannel::assemble`]) does one term per photon energy, orbit family and
//! orientation, and keeps per energy and family the orbit points, the kernels and the
//! orientation sums. Both grow with the request, so a driver estimates them first:
//!
//! - **families** per channel pair: `2 × returns × crests` (a short and a long family per return
//!   and birth window, [`Field::birth_windows`]); the channel pairs are those that a coupling
//!   connects ([`crate::multichannel::coupling_components`]);
//! - **terms**: `energies × families (all pairs) × orientations`; measured with `holecast
//!   spectrum` on one core of the development machine, trajectory stage included: linearly
//!   polarised fields 3–40 µs per term (3001 energies: demo-linear-triatomic 4.3 µs,
//!   demo-bent-triatomic 3.3 µs, demo-coupled-diatomic 25 µs; eight coupled channels 39 µs),
//!   elliptical and two-colour fields, whose orientations share less work, 50–135 µs
//!   (demo-bent-triatomic with the shipped `lasers/*.json`);
//! - **memory**: `energies × families × (4.5 kB + 200 B × min(orientations, 32))` — measured
//!   peak resident memory per energy and family 4.0 kB (hydrogen, one orientation) to 10 kB
//!   (bent triatomic, 192 orientations computed 32 classes at a time).
//!
//! [`WorkloadLimits`] holds the limits (defaults: [`MAX_TERMS`], [`MAX_MEMORY_BYTES`]);
//! [`Workload::check`] returns [`Error::WorkLimit`] with the estimate, the limit and where
//! they come from.

use crate::error::{Error, Result};
use crate::field::Field;
use crate::multichannel::{coupling_components, orientations};
use crate::orbits::OrbitSettings;
use crate::orbits::families::check_window_work;
use crate::target::Target;

/// Default limit on the terms of the amplitude stage: at most about 7 minutes on one core for a
/// linearly polarised field (≤ 40 µs per term), 23 minutes for other fields (≤ 135 µs).
pub const MAX_TERMS: f64 = 1.0e7;
/// Default limit on the estimated memory (4 GB).
pub const MAX_MEMORY_BYTES: f64 = 4.0e9;
/// Estimated bytes per (energy, family), without the orientation chunk.
const BYTES_PER_POINT: f64 = 4500.0;
/// Estimated bytes per (energy, family, orientation class of a chunk).
const BYTES_PER_CLASS: f64 = 200.0;
/// Orientation classes computed together ([`crate::multichannel::assemble`]).
const CHUNK: f64 = 32.0;

/// Limits on the amplitude stage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct WorkloadLimits {
    /// Terms (energies × families × orientations).
    pub terms: f64,
    /// Memory (bytes).
    pub memory_bytes: f64,
}

impl Default for WorkloadLimits {
    fn default() -> Self {
        WorkloadLimits {
            terms: MAX_TERMS,
            memory_bytes: MAX_MEMORY_BYTES,
        }
    }
}

/// The estimate of one spectrum.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Workload {
    /// Photon energies requested.
    pub energies: usize,
    /// Channel pairs solved (those a coupling connects).
    pub channel_pairs: usize,
    /// Orbit families per channel pair (estimated).
    pub families_per_pair: usize,
    /// Orientations summed.
    pub orientations: usize,
    /// `energies × families × orientations`.
    pub terms: f64,
    /// Estimated peak memory (bytes).
    pub memory_bytes: f64,
}

impl Workload {
    /// Estimates the work of a spectrum of `target` in `field` at `energies` photon energies.
    ///
    /// # Errors
    /// [`Error::WorkLimit`] if even counting the birth windows exceeds the trajectory-stage
    /// limits of `settings`; the errors of [`orientations`].
    pub fn estimate(
        field: &Field,
        target: &Target,
        energies: usize,
        settings: &OrbitSettings,
    ) -> Result<Workload> {
        check_window_work(field, &settings.limits)?;
        let crests = field
            .birth_windows(settings.discovery.crest_threshold)
            .len()
            .max(1);
        let families_per_pair = 2 * settings.discovery.max_returns.max(1) as usize * crests;
        let components = coupling_components(target);
        let n = target.channels.len();
        let channel_pairs = (0..n)
            .map(|a| (0..n).filter(|&b| components[a] == components[b]).count())
            .sum::<usize>();
        let orientations = orientations(target, field)?.len();
        let families = (channel_pairs * families_per_pair) as f64;
        let e = energies as f64;
        Ok(Workload {
            energies,
            channel_pairs,
            families_per_pair,
            orientations,
            terms: e * families * orientations as f64,
            memory_bytes: e
                * families
                * (BYTES_PER_POINT + BYTES_PER_CLASS * (orientations as f64).min(CHUNK)),
        })
    }

    fn origin(&self) -> String {
        format!(
            "{} energies × {} orbit families ({} channel pairs × {} per pair) × {} orientations",
            self.energies,
            self.channel_pairs * self.families_per_pair,
            self.channel_pairs,
            self.families_per_pair,
            self.orientations
        )
    }

    /// [`Error::WorkLimit`] if the terms or the memory exceed `limits`.
    pub fn check(&self, limits: &WorkloadLimits) -> Result<()> {
        if self.memory_bytes.is_nan() || self.memory_bytes > limits.memory_bytes {
            return Err(Error::WorkLimit {
                task: "memory of the spectrum".into(),
                estimated: self.memory_bytes / 1e6,
                limit: limits.memory_bytes / 1e6,
                unit: "MB".into(),
                reason: format!(
                    "{}; about 4.5 kB per energy and family plus 200 B per orientation computed \
                     together",
                    self.origin()
                ),
            });
        }
        if self.terms.is_nan() || self.terms > limits.terms {
            return Err(Error::WorkLimit {
                task: "amplitude stage".into(),
                estimated: self.terms,
                limit: limits.terms,
                unit: "saddle terms".into(),
                reason: format!(
                    "{}; 3–40 µs per term on one core for a linearly polarised field, up to \
                     135 µs for others",
                    self.origin()
                ),
            });
        }
        Ok(())
    }
}
