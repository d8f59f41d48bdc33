//! The quantum-orbit table as rows.

use num_complex::Complex64;

use super::{Cell, RowBuilder, Table};
use crate::field::bdot;
use crate::orbits::{OrbitPoint, OrbitTable};
use crate::status::FamilyStatus;
use crate::units;

/// One channel pair's orbits with the labels of its channels.
pub struct LabelledTable<'a> {
    /// Label of the channel the electron leaves.
    pub ionized: &'a str,
    /// Label of the channel it recombines into.
    pub recombined: &'a str,
    /// The orbits.
    pub table: &'a OrbitTable,
}

fn fs(z: Complex64) -> Complex64 {
    Complex64::new(units::au_to_fs(z.re), units::au_to_fs(z.im))
}

/// Rows: one per (channel pair, family, energy). Solved saddles that are not summed
/// ([`OrbitTable::exclusion`]: the growing member of a pair beyond its cutoff, a growing
/// amplitude, an orbit outside the pulse) are listed only if `include_excluded`, with their
/// reason in `status`. `omega` is the reference photon energy (a.u.) for the order column.
/// `status` is the family's [`FamilyStatus`] code (`summed`, `excluded-…`, `below-threshold`,
/// …, `failed-…`).
pub fn rows(
    tables: &[LabelledTable<'_>],
    omega: f64,
    include_excluded: bool,
) -> Result<Table, String> {
    let mut out = Table::default();
    for lt in tables {
        let t = lt.table;
        for (k, &energy) in t.energies.iter().enumerate() {
            for (f, family) in t.families.iter().enumerate() {
                let point = &family.points[k];
                let beyond = family
                    .pair
                    .and_then(|p| t.pairs[p].points[k])
                    .is_some_and(|pp| pp.beyond_cutoff());
                let exclusion = t.exclusion(f, k);
                if exclusion.is_some() && !include_excluded {
                    continue;
                }
                let failure = match point {
                    OrbitPoint::Failed(fl) => Some(fl.reason),
                    OrbitPoint::Solved(_) => None,
                };
                let status = FamilyStatus::of(failure, exclusion, false);
                let mut r = RowBuilder::default();
                r.push("ionized_channel", Cell::Text(lt.ionized.to_string()))
                    .push("recombined_channel", Cell::Text(lt.recombined.to_string()))
                    .real("order", Some(energy / omega))
                    .real("energy_ev", Some(units::au_to_ev(energy)))
                    .push("family", Cell::Text(family.label.to_string()))
                    .push("half_cycle", Cell::Int(i64::from(family.half_cycle)))
                    .push(
                        "return_index",
                        Cell::Int(i64::from(family.label.return_index)),
                    );
                match point {
                    OrbitPoint::Solved(s) => {
                        r.complex("t_ion_fs", Some(fs(s.t_ion)))
                            .complex("t_ret_fs", Some(fs(s.t_ret)))
                            .real("excursion_fs", Some(units::au_to_fs(s.tau.re)))
                            .complex("action", Some(s.action))
                            .real(
                                "return_energy_ev",
                                Some(units::au_to_ev(0.5 * bdot(&s.v_ret, &s.v_ret).re)),
                            )
                            .push("beyond_cutoff", Cell::Bool(beyond))
                            .push("converged", Cell::Bool(true))
                            .push("status", Cell::Text(status.code()))
                            .real("residual", Some(s.residual))
                            .push("iterations", Cell::Int(i64::from(s.iterations)))
                            .push("failure", Cell::Text(String::new()));
                    }
                    OrbitPoint::Failed(fl) => {
                        r.complex("t_ion_fs", None)
                            .complex("t_ret_fs", None)
                            .real("excursion_fs", None)
                            .complex("action", None)
                            .real("return_energy_ev", None)
                            .push("beyond_cutoff", Cell::Bool(beyond))
                            .push("converged", Cell::Bool(false))
                            .push("status", Cell::Text(status.code()))
                            .real("residual", Some(fl.residual))
                            .push("iterations", Cell::Int(i64::from(fl.iterations)))
                            .push("failure", Cell::Text(fl.reason.to_string()));
                    }
                }
                let bad = r.non_finite();
                r.push("non_finite_columns", Cell::Text(bad.join(" ")));
                out.add(r)?;
            }
        }
    }
    Ok(out)
}
