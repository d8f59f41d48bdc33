//! What happened at each point of a spectrum: the status of every family and the one
//! definition of a complete row that every output and the run summary use.
//!
//! A family at one photon energy is
//! - **summed**: its saddle converged and contributes;
//! - **excluded**: its saddle converged but is not summed ([`Exclusion`]: outside the pulse, a
//!   growing amplitude, the growing member of a pair beyond the cutoff);
//! - **absent**: the family does not exist or does not matter there, which is no failure
//!   (below the recombining channel's threshold, no classical return, returns after the
//!   pulse, far past its half cycle's cutoff; [`FailureReason::is_failure`] is false);
//! - **failed**: it should contribute and did not converge ([`FailureReason`]), or its saddle
//!   with Gaussian structure in the phase did not.
//!
//! A row (one photon energy) is **complete** when no family failed and at least one family
//! exists there; **partial** when some failed and others were summed; **failed** when every
//! family that should contribute failed; **below-threshold** when every family is absent
//! because the photon energy lies below every recombining channel's ionization potential (the
//! strong-field model has no harmonic there: the intensity is not a result); **no-orbits**
//! when the field has no orbit family at all (no classical electron returns).

use serde::Serialize;

use crate::orbits::{Exclusion, FailureReason};

/// The status of one family at one photon energy (module documentation).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum FamilyStatus {
    /// Converged and summed.
    Summed,
    /// Converged, not summed, for this reason.
    Excluded(Exclusion),
    /// Not there, no failure (a reason with `is_failure() == false`).
    Absent(FailureReason),
    /// Should contribute and failed.
    Failed(FailureReason),
    /// The plain saddle converged but its version with Gaussian structure in the phase failed.
    StructuredFailed,
}

impl FamilyStatus {
    /// The status of a point from its orbit outcome: `failure` (None if solved), whether the
    /// solved saddle is summed (`exclusion` None) and whether its structured saddle failed.
    pub fn of(
        failure: Option<FailureReason>,
        exclusion: Option<Exclusion>,
        structured_failed: bool,
    ) -> FamilyStatus {
        match failure {
            Some(r) if r.is_failure() => FamilyStatus::Failed(r),
            Some(r) => FamilyStatus::Absent(r),
            None if structured_failed => FamilyStatus::StructuredFailed,
            None => match exclusion {
                Some(e) => FamilyStatus::Excluded(e),
                None => FamilyStatus::Summed,
            },
        }
    }

    /// Whether the family should have contributed and did not.
    pub fn is_failure(&self) -> bool {
        matches!(
            self,
            FamilyStatus::Failed(_) | FamilyStatus::StructuredFailed
        )
    }

    /// A stable kebab-case code: `summed`, `excluded-<why>`, the absence reason
    /// (`below-threshold`, `no-classical-return`, `returns-after-pulse`,
    /// `beyond-half-cycle-cutoff`), or `failed-<why>`.
    pub fn code(&self) -> String {
        match self {
            FamilyStatus::Summed => "summed".into(),
            FamilyStatus::Excluded(e) => format!("excluded-{}", exclusion_code(*e)),
            FamilyStatus::Absent(r) => failure_code(*r).into(),
            FamilyStatus::Failed(r) => format!("failed-{}", failure_code(*r)),
            FamilyStatus::StructuredFailed => "failed-structured-saddle".into(),
        }
    }
}

/// Kebab-case code of an exclusion.
pub fn exclusion_code(e: Exclusion) -> &'static str {
    match e {
        Exclusion::OutsidePulse => "outside-pulse",
        Exclusion::GrowingAmplitude => "growing-amplitude",
        Exclusion::GrowingBeyondCutoff => "growing-beyond-cutoff",
        Exclusion::GrowingWithoutPartner => "growing-without-partner",
    }
}

/// Kebab-case code of a failure reason.
pub fn failure_code(r: FailureReason) -> &'static str {
    use crate::orbits::newton::Termination;
    match r {
        FailureReason::NoStart => "no-start",
        FailureReason::Newton(Termination::IterationLimit) => "newton-iteration-limit",
        FailureReason::Newton(Termination::SingularJacobian) => "newton-singular-jacobian",
        FailureReason::Newton(Termination::NonFinite) => "newton-non-finite",
        FailureReason::Newton(Termination::Converged) => "newton-converged",
        FailureReason::BranchCollision => "branch-collision",
        FailureReason::AmbiguousAiryBranch => "ambiguous-airy-branch",
        FailureReason::PredictorTooLong => "predictor-too-long",
        FailureReason::Unphysical => "unphysical",
        FailureReason::BelowThreshold => "below-threshold",
        FailureReason::NoClassicalReturn => "no-classical-return",
        FailureReason::ReturnsAfterPulse => "returns-after-pulse",
        FailureReason::BeyondHalfCycleCutoff => "beyond-half-cycle-cutoff",
    }
}

/// The status of one row (photon energy); module documentation.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum RowStatus {
    /// Every family that should contribute converged.
    Complete,
    /// Some families failed, others were summed.
    Partial,
    /// Every family that should contribute failed.
    Failed,
    /// Below every recombining channel's threshold: no harmonic in this model.
    BelowThreshold,
    /// The field has no orbit family.
    NoOrbits,
}

impl RowStatus {
    /// The row status from the statuses of every family (of every channel pair) at the energy.
    pub fn of<'a>(families: impl IntoIterator<Item = &'a FamilyStatus>) -> RowStatus {
        let (mut any, mut failed, mut summed, mut all_below) = (false, 0, 0, true);
        for f in families {
            any = true;
            if f.is_failure() {
                failed += 1;
            }
            if *f == FamilyStatus::Summed {
                summed += 1;
            }
            if *f != FamilyStatus::Absent(FailureReason::BelowThreshold) {
                all_below = false;
            }
        }
        match (any, failed, summed) {
            (false, _, _) => RowStatus::NoOrbits,
            (true, 0, _) if all_below => RowStatus::BelowThreshold,
            (true, 0, _) => RowStatus::Complete,
            (true, _, 0) => RowStatus::Failed,
            _ => RowStatus::Partial,
        }
    }

    /// Stable kebab-case code.
    pub fn code(&self) -> &'static str {
        match self {
            RowStatus::Complete => "complete",
            RowStatus::Partial => "partial",
            RowStatus::Failed => "failed",
            RowStatus::BelowThreshold => "below-threshold",
            RowStatus::NoOrbits => "no-orbits",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_row_below_every_threshold_is_not_complete() {
        let below = FamilyStatus::Absent(FailureReason::BelowThreshold);
        assert_eq!(RowStatus::of(&[below, below]), RowStatus::BelowThreshold);
        // One channel below its threshold, another summed: complete.
        assert_eq!(
            RowStatus::of(&[below, FamilyStatus::Summed]),
            RowStatus::Complete
        );
    }

    #[test]
    fn failures_make_a_row_partial_or_failed() {
        let fail = FamilyStatus::Failed(FailureReason::NoStart);
        assert_eq!(
            RowStatus::of(&[fail, FamilyStatus::Summed]),
            RowStatus::Partial
        );
        assert_eq!(
            RowStatus::of(&[fail, FamilyStatus::StructuredFailed]),
            RowStatus::Failed
        );
        assert_eq!(RowStatus::of(&[]), RowStatus::NoOrbits);
        // Excluded and absent families are no failures.
        let excluded = FamilyStatus::Excluded(Exclusion::GrowingAmplitude);
        let absent = FamilyStatus::Absent(FailureReason::ReturnsAfterPulse);
        assert_eq!(
            RowStatus::of(&[excluded, absent, FamilyStatus::Summed]),
            RowStatus::Complete
        );
    }
}
