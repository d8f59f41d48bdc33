//! Group delays that the energy grid does not resolve, recomputed by difference.
//!
//! [`crate::spectrum::GroupDelays::Tangent`] takes the prefactors' phase slope across the grid;
//! where the grid is too coarse for it (near a zero of an orientation-averaged family amplitude,
//! whose phase turns fast), [`super::assemble`] lists the energy in
//! [`MultichannelSpectrum::unresolved_group_delays`]. [`refine_group_delays`] solves those
//! energies again with the difference over `Ω ± δ` (every saddle re-solved at both ends) and
//! puts those delays in their place, so that a coarse grid costs at most the difference's work.

use super::{GroupDelays, MultichannelSettings, MultichannelSpectrum, assemble, trajectory_stage};
use crate::error::Result;
use crate::field::Field;
use crate::spectrum::{NEGLIGIBLE, project};
use crate::target::Target;

/// Half-width δ/ω of the difference used for unresolved energies (as
/// [`GroupDelays::Difference`] on the command line).
pub const REFINE_STEP: f64 = 1e-3;

/// Recomputes the group delays of the energies in `spectrum.unresolved_group_delays` by
/// difference (module documentation) and clears the list. `settings` and `linear_fast_path` must
/// be those `spectrum` was computed with. A delay stays None where the spectrum itself reports
/// none (a negligible amplitude, a sum over both half cycles of a periodic field).
///
/// # Errors
/// Those of [`trajectory_stage`] and [`assemble`] on the unresolved energies.
pub fn refine_group_delays(
    field: &Field,
    target: &Target,
    settings: &MultichannelSettings,
    linear_fast_path: bool,
    spectrum: &mut MultichannelSpectrum,
) -> Result<()> {
    if spectrum.unresolved_group_delays.is_empty() {
        return Ok(());
    }
    let ks = std::mem::take(&mut spectrum.unresolved_group_delays);
    let sub: Vec<f64> = ks.iter().map(|&k| spectrum.energies[k]).collect();
    let s = MultichannelSettings {
        group_delays: GroupDelays::Difference { step: REFINE_STEP },
        ..*settings
    };
    let stage = trajectory_stage(field, target, &sub, &s)?;
    let fine = assemble(field, target, &stage, linear_fast_path, &|_, _| {})?;
    // The negligible floor of the whole spectrum, not of the few energies solved again.
    let axis = spectrum.axis;
    let largest = spectrum
        .total
        .iter()
        .map(|d| project(&axis, d).norm())
        .fold(0.0, f64::max);
    let floor = NEGLIGIBLE * largest;
    let above =
        |d: Option<&crate::field::CVec3>| d.is_some_and(|d| project(&axis, d).norm() > floor);
    for (j, &k) in ks.iter().enumerate() {
        spectrum.group_delay[k] = fine.group_delay[j].filter(|_| above(Some(&spectrum.total[k])));
        for (pa, pb) in spectrum.pairs.iter_mut().zip(&fine.pairs) {
            pa.group_delay[k] = pb.group_delay[j].filter(|_| above(Some(&pa.dipole[k])));
            for fa in pa.families.iter_mut() {
                let delay = pb
                    .families
                    .iter()
                    .find(|fb| fb.label == fa.label && fb.half_cycle == fa.half_cycle)
                    .and_then(|fb| fb.group_delay[j]);
                fa.group_delay[k] = delay.filter(|_| above(fa.dipole[k].as_ref()));
            }
        }
    }
    Ok(())
}
