//! The spectrum as rows: totals and polarization, then every channel pair and every family.

use std::collections::BTreeMap;
use std::io;

use num_complex::Complex64;

use super::lattice::Lattice;
use super::orbits::{check_grid, energy_cells};
use super::{Cell, Row, RowSource};
use crate::dipole::KernelKind;
use crate::field::CVec3;
use crate::multichannel::MultichannelSpectrum;
use crate::spectrum::project;
use crate::status::FamilyStatus;
use crate::units;

fn kind_text(k: KernelKind) -> &'static str {
    match k {
        KernelKind::Uniform => "uniform",
        KernelKind::Plain => "plain",
        KernelKind::PlainFallback => "plain-fallback",
        KernelKind::Excluded => "excluded",
        KernelKind::Failed => "failed",
    }
}

/// The kernel column: `none` where the family is absent (below threshold, no return, …) rather
/// than failed.
fn kernel_text(k: KernelKind, status: FamilyStatus) -> &'static str {
    match (k, status) {
        (KernelKind::Failed, FamilyStatus::Absent(_)) => "none",
        (k, _) => kind_text(k),
    }
}

/// A row with non-finite numbers: `status` becomes `non-finite`, `complete` false, and
/// `non_finite_columns` names them (the writers write them as null).
fn mark_non_finite(r: &mut Row) {
    let bad = r.non_finite();
    if !bad.is_empty() {
        r.set("status", Cell::Text(NON_FINITE.into()))
            .set("complete", Cell::Bool(false))
            .set("non_finite_columns", Cell::Text(bad.join(" ")));
    }
}

/// Row status of a row with non-finite values (beside the codes of [`RowStatus`]).
pub const NON_FINITE: &str = "non-finite";

fn fs(x: Option<f64>) -> Option<f64> {
    x.map(units::au_to_fs)
}

fn norm2(v: &CVec3) -> f64 {
    v.iter().map(|c| c.norm_sqr()).sum()
}

/// Column prefix of a channel pair, e.g. `X_to_A` (ionized in X, recombined into A).
pub fn pair_key(s: &MultichannelSpectrum, p: usize) -> String {
    let pair = &s.pairs[p];
    format!("{}_to_{}", s.labels[pair.ion], s.labels[pair.rec])
}

/// Column prefix of a family, e.g. `short_hc0` (`hcm1` for half cycle −1).
pub fn family_key(label: &str, half_cycle: i32) -> String {
    if half_cycle < 0 {
        format!("{label}_hcm{}", -half_cycle)
    } else {
        format!("{label}_hc{half_cycle}")
    }
}

/// Dipole of each family label summed over channel pairs and half cycles, per energy.
pub fn label_sums(s: &MultichannelSpectrum) -> BTreeMap<String, Vec<Option<CVec3>>> {
    let mut out: BTreeMap<String, Vec<Option<CVec3>>> = BTreeMap::new();
    for pair in &s.pairs {
        for c in &pair.families {
            let entry = out
                .entry(c.label.to_string())
                .or_insert_with(|| vec![None; s.energies.len()]);
            for (e, d) in entry.iter_mut().zip(&c.dipole) {
                if let Some(d) = d {
                    *e = Some(e.unwrap_or_else(CVec3::zeros) + d);
                }
            }
        }
    }
    out
}

/// The spectrum rows: one per energy. `grid` (if given) labels the energies exactly
/// ([`super::lattice`]).
pub struct SpectrumRows<'a> {
    /// The spectrum.
    pub spectrum: &'a MultichannelSpectrum,
    /// Exact labels of the energy grid.
    pub grid: Option<&'a Lattice>,
}

impl RowSource for SpectrumRows<'_> {
    fn for_each_row(
        &self,
        r: &mut Row,
        visit: &mut dyn FnMut(&Row) -> io::Result<()>,
    ) -> io::Result<()> {
        let s = self.spectrum;
        check_grid(self.grid, s.energies.len())?;
        let phases = s.phases();
        let labels = label_sums(s);
        for (k, phase) in phases.iter().enumerate() {
            let d = s.total[k];
            let (par, perp) = s.polarization_components(k);
            let state = s.polarization_state(k);
            let (order, energy_ev) = energy_cells(self.grid, k, s.energies[k], s.omega);
            r.clear();
            r.push("order", order)
                .push("energy_ev", energy_ev)
                .real("intensity", Some(s.intensity(k)))
                .real("power", Some(s.power(k)))
                .real("phase_rad", *phase)
                .real("group_delay_fs", fs(s.group_delay[k]))
                .push("complete", Cell::Bool(s.complete[k]))
                .push("status", Cell::Text(s.status[k].code().into()))
                .push("non_finite_columns", Cell::Text(String::new()))
                .complex_named(("dipole_x_re", "dipole_x_im"), Some(d.x))
                .complex_named(("dipole_y_re", "dipole_y_im"), Some(d.y))
                .complex_named(("dipole_z_re", "dipole_z_im"), Some(d.z))
                .complex_named(("parallel_re", "parallel_im"), Some(par))
                .complex_named(("perpendicular_re", "perpendicular_im"), Some(perp))
                .real("ellipticity", state.map(|s| s.0))
                .real("polarization_angle_deg", state.map(|s| s.1.to_degrees()))
                .real(
                    "incoherent_pair_sum",
                    Some(s.pairs.iter().map(|p| norm2(&p.dipole[k])).sum()),
                );
            let shares = s.recombination_shares(k);
            if s.labels.len() > 1 {
                for (m, label) in s.labels.iter().enumerate() {
                    r.real(
                        format!("recombined_{label}_share"),
                        shares.as_ref().map(|v| v[m]),
                    );
                }
            }
            for (label, v) in &labels {
                r.real(format!("{label}_intensity"), v[k].map(|d| norm2(&d)));
            }
            for (p, pair) in s.pairs.iter().enumerate() {
                let key = pair_key(s, p);
                let dp = pair.dipole[k];
                r.real(format!("{key}_intensity"), Some(norm2(&dp)))
                    .real(
                        format!("{key}_phase_rad"),
                        Some(project(&s.axis, &dp).arg()),
                    )
                    .real(format!("{key}_group_delay_fs"), fs(pair.group_delay[k]));
            }
            for (p, pair) in s.pairs.iter().enumerate() {
                let pk = pair_key(s, p);
                for con in &pair.families {
                    let key = format!(
                        "{pk}_{}",
                        family_key(&con.label.to_string(), con.half_cycle)
                    );
                    let v = con.dipole[k];
                    let par: Option<Complex64> = v.map(|v| project(&s.axis, &v));
                    r.real(format!("{key}_intensity"), v.map(|v| norm2(&v)))
                        .real(format!("{key}_phase_rad"), par.map(|p| p.arg()))
                        .real(format!("{key}_emission_time_fs"), fs(con.emission_time[k]))
                        .real(format!("{key}_group_delay_fs"), fs(con.group_delay[k]))
                        .push(
                            format!("{key}_kernel"),
                            Cell::Text(kernel_text(con.kind[k], con.status[k]).into()),
                        )
                        .push(format!("{key}_status"), Cell::Text(con.status[k].code()));
                }
            }
            mark_non_finite(r);
            visit(r)?;
        }
        Ok(())
    }
}

/// The status of the reference channel's family behind a hole density, at energy index `k`.
fn reference_status(
    s: &MultichannelSpectrum,
    h: &crate::multichannel::HoleDensity,
    k: usize,
) -> Option<FamilyStatus> {
    s.pairs
        .iter()
        .filter(|p| p.ion == s.reference && p.rec == s.reference)
        .flat_map(|p| p.families.iter())
        .find(|c| c.label == h.label && c.half_cycle == h.half_cycle)
        .map(|c| c.status[k])
}

/// Hole-dynamics rows: one per (reference family, energy); `status` is `complete` where the
/// hole was decoded, else the reference family's status (`below-threshold`, `failed-…`, …).
/// `grid` (if given) labels the energies exactly ([`super::lattice`]).
pub struct HoleRows<'a> {
    /// The spectrum.
    pub spectrum: &'a MultichannelSpectrum,
    /// Exact labels of the energy grid.
    pub grid: Option<&'a Lattice>,
}

impl RowSource for HoleRows<'_> {
    fn for_each_row(
        &self,
        r: &mut Row,
        visit: &mut dyn FnMut(&Row) -> io::Result<()>,
    ) -> io::Result<()> {
        let s = self.spectrum;
        check_grid(self.grid, s.energies.len())?;
        let n = s.labels.len();
        for h in &s.holes {
            for (k, point) in h.points.iter().enumerate() {
                let (order, energy_ev) = energy_cells(self.grid, k, s.energies[k], s.omega);
                r.clear();
                r.push("order", order)
                    .push("energy_ev", energy_ev)
                    .push("family", Cell::Text(h.label.to_string()))
                    .push("half_cycle", Cell::Int(i64::from(h.half_cycle)))
                    .real("t_ion_fs", point.as_ref().map(|p| units::au_to_fs(p.t_ion)))
                    .real("t_ret_fs", point.as_ref().map(|p| units::au_to_fs(p.t_ret)))
                    .real(
                        "delay_fs",
                        point.as_ref().map(|p| units::au_to_fs(p.t_ret - p.t_ion)),
                    )
                    .real("yield", point.as_ref().map(|p| p.yield_weight))
                    .push(
                        "status",
                        Cell::Text(match (point, reference_status(s, h, k)) {
                            (Some(_), _) => "complete".into(),
                            (None, Some(st)) => st.code(),
                            (None, None) => "no-saddle".into(),
                        }),
                    )
                    .push("non_finite_columns", Cell::Text(String::new()));
                for (i, label) in s.labels.iter().enumerate() {
                    r.real(
                        format!("population_{label}"),
                        point.as_ref().map(|p| p.rho[(i, i)].re),
                    );
                }
                for i in 0..n {
                    for j in i + 1..n {
                        let c = point.as_ref().map(|p| p.rho[(i, j)]);
                        let key = format!("coherence_{}_{}", s.labels[i], s.labels[j]);
                        r.real(format!("{key}_abs"), c.map(|c| c.norm()))
                            .real(format!("{key}_phase_rad"), c.map(|c| c.arg()));
                    }
                }
                mark_non_finite(r);
                visit(r)?;
            }
        }
        Ok(())
    }
}
