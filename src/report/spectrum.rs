//! The spectrum as rows: totals, then every family contribution.

use std::collections::BTreeMap;

use num_complex::Complex64;

use super::{Cell, RowBuilder, Table};
use crate::dipole::KernelKind;
use crate::spectrum::{Spectrum, project};
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

fn fs(x: Option<f64>) -> Option<f64> {
    x.map(units::au_to_fs)
}

/// Column prefix of a contribution, e.g. `short_hc0`.
pub fn contribution_key(label: &str, half_cycle: i32) -> String {
    if half_cycle < 0 {
        format!("{label}_hcm{}", -half_cycle)
    } else {
        format!("{label}_hc{half_cycle}")
    }
}

/// Rows: one per energy.
pub fn rows(s: &Spectrum) -> Result<Table, String> {
    let mut out = Table::default();
    // Families with the same label summed over half cycles, in label order.
    let mut labels: BTreeMap<String, Vec<usize>> = BTreeMap::new();
    for (c, con) in s.contributions.iter().enumerate() {
        labels.entry(con.label.to_string()).or_default().push(c);
    }
    let phases = s.phases();
    for (k, phase) in phases.iter().enumerate() {
        let d = s.total[k];
        let mut r = RowBuilder::default();
        r.real("order", Some(s.energies[k] / s.omega))
            .real("energy_ev", Some(units::au_to_ev(s.energies[k])))
            .real("intensity", Some(s.intensity(k)))
            .real("power", Some(s.power(k)))
            .real("phase_rad", *phase)
            .real("group_delay_fs", fs(s.group_delay[k]))
            .push("complete", Cell::Bool(s.complete[k]))
            .complex("dipole_x", Some(d.x))
            .complex("dipole_y", Some(d.y))
            .complex("dipole_z", Some(d.z));
        for (label, members) in &labels {
            let mut sum = crate::field::CVec3::zeros();
            let mut any = false;
            for &c in members {
                if let Some(v) = s.contributions[c].dipole[k] {
                    sum += v;
                    any = true;
                }
            }
            let i = any.then(|| sum.iter().map(|c| c.norm_sqr()).sum::<f64>());
            r.real(format!("{label}_intensity"), i);
        }
        for con in &s.contributions {
            let key = contribution_key(&con.label.to_string(), con.half_cycle);
            let v = con.dipole[k];
            let par: Option<Complex64> = v.map(|v| project(&s.axis, &v));
            r.real(
                format!("{key}_intensity"),
                v.map(|v| v.iter().map(|c| c.norm_sqr()).sum()),
            )
            .real(format!("{key}_phase_rad"), par.map(|p| p.arg()))
            .real(format!("{key}_emission_time_fs"), fs(con.emission_time[k]))
            .real(format!("{key}_group_delay_fs"), fs(con.group_delay[k]))
            .push(
                format!("{key}_kernel"),
                Cell::Text(kind_text(con.kind[k]).into()),
            );
        }
        out.add(r)?;
    }
    Ok(out)
}
