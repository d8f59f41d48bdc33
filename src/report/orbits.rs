//! The quantum-orbit table as rows.

use std::collections::BTreeMap;
use std::io;

use num_complex::Complex64;

use super::lattice::Lattice;
use super::{Cell, Row, RowSource};
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

/// The orbit rows: one per (channel pair, energy, family). Solved saddles that are not summed
/// ([`OrbitTable::exclusion`]: the growing member of a pair beyond its cutoff, a growing
/// amplitude, an orbit outside the pulse) are listed only if `include_excluded`, with their
/// reason in `status`. `omega` is the reference photon energy (a.u.) for the order column;
/// `grid` (if given) labels the energies exactly ([`super::lattice`]). `status` is the family's
/// [`FamilyStatus`] code (`summed`, `excluded-…`, `below-threshold`, …, `failed-…`).
pub struct OrbitRows<'a> {
    /// The tables.
    pub tables: &'a [LabelledTable<'a>],
    /// Reference photon energy (a.u.).
    pub omega: f64,
    /// Exact labels of the energy grid.
    pub grid: Option<&'a Lattice>,
    /// List the solved saddles that are not summed.
    pub include_excluded: bool,
}

/// The `order` and `energy_ev` cells of point `k` of energy `energy` (a.u.): the grid's own
/// unit exact, the other computed ([`super::lattice`]).
pub fn energy_cells(grid: Option<&Lattice>, k: usize, energy: f64, omega: f64) -> (Cell, Cell) {
    use super::lattice::GridUnit;
    let order = Cell::Real(Some(energy / omega));
    let ev = Cell::Real(Some(units::au_to_ev(energy)));
    match grid.and_then(|g| g.label(k).map(|l| (g.unit(), l))) {
        Some((GridUnit::Order, l)) => (Cell::Exact(l), ev),
        Some((GridUnit::ElectronVolt, l)) => (order, Cell::Exact(l)),
        None => (order, ev),
    }
}

/// Checks that a grid labels exactly `n` energies.
pub fn check_grid(grid: Option<&Lattice>, n: usize) -> io::Result<()> {
    match grid {
        Some(g) if g.len() != n => Err(io::Error::new(
            io::ErrorKind::InvalidInput,
            format!(
                "internal: the grid labels {} energies, the result has {n}",
                g.len()
            ),
        )),
        _ => Ok(()),
    }
}

impl OrbitRows<'_> {
    /// The status of family `f` at energy `k` of `t`, or None where the point is not listed
    /// (an excluded saddle without `include_excluded`).
    fn listed(&self, t: &OrbitTable, f: usize, k: usize) -> Option<FamilyStatus> {
        let exclusion = t.exclusion(f, k);
        if exclusion.is_some() && !self.include_excluded {
            return None;
        }
        let failure = match &t.families[f].points[k] {
            OrbitPoint::Failed(fl) => Some(fl.reason),
            OrbitPoint::Solved(_) => None,
        };
        Some(FamilyStatus::of(failure, exclusion, false))
    }

    /// Counts of the rows' `status` column, without building the rows (the same rule).
    pub fn status_counts(&self) -> BTreeMap<String, usize> {
        let mut out = BTreeMap::new();
        for lt in self.tables {
            let t = lt.table;
            for k in 0..t.energies.len() {
                for f in 0..t.families.len() {
                    if let Some(status) = self.listed(t, f, k) {
                        *out.entry(status.code()).or_insert(0) += 1;
                    }
                }
            }
        }
        out
    }
}

impl RowSource for OrbitRows<'_> {
    fn for_each_row(
        &self,
        r: &mut Row,
        visit: &mut dyn FnMut(&Row) -> io::Result<()>,
    ) -> io::Result<()> {
        for lt in self.tables {
            let t = lt.table;
            check_grid(self.grid, t.energies.len())?;
            for (k, &energy) in t.energies.iter().enumerate() {
                let (order, energy_ev) = energy_cells(self.grid, k, energy, self.omega);
                for (f, family) in t.families.iter().enumerate() {
                    let point = &family.points[k];
                    let Some(status) = self.listed(t, f, k) else {
                        continue;
                    };
                    let beyond = family
                        .pair
                        .and_then(|p| t.pairs[p].points[k])
                        .is_some_and(|pp| pp.beyond_cutoff());
                    r.clear();
                    r.push("ionized_channel", Cell::Text(lt.ionized.to_string()))
                        .push("recombined_channel", Cell::Text(lt.recombined.to_string()))
                        .push("order", order.clone())
                        .push("energy_ev", energy_ev.clone())
                        .push("family", Cell::Text(family.label.to_string()))
                        .push("half_cycle", Cell::Int(i64::from(family.half_cycle)))
                        .push(
                            "return_index",
                            Cell::Int(i64::from(family.label.return_index)),
                        );
                    let solved = match point {
                        OrbitPoint::Solved(s) => Some(s),
                        OrbitPoint::Failed(_) => None,
                    };
                    r.complex_named(("t_ion_fs_re", "t_ion_fs_im"), solved.map(|s| fs(s.t_ion)))
                        .complex_named(("t_ret_fs_re", "t_ret_fs_im"), solved.map(|s| fs(s.t_ret)))
                        .real("excursion_fs", solved.map(|s| units::au_to_fs(s.tau.re)))
                        .complex_named(("action_re", "action_im"), solved.map(|s| s.action))
                        .real(
                            "return_energy_ev",
                            solved.map(|s| units::au_to_ev(0.5 * bdot(&s.v_ret, &s.v_ret).re)),
                        )
                        .push("beyond_cutoff", Cell::Bool(beyond))
                        .push("converged", Cell::Bool(solved.is_some()))
                        .push("status", Cell::Text(status.code()));
                    match point {
                        OrbitPoint::Solved(s) => {
                            r.real("residual", Some(s.residual))
                                .push("iterations", Cell::Int(i64::from(s.iterations)))
                                .push("failure", Cell::Text(String::new()));
                        }
                        OrbitPoint::Failed(fl) => {
                            r.real("residual", Some(fl.residual))
                                .push("iterations", Cell::Int(i64::from(fl.iterations)))
                                .push("failure", Cell::Text(fl.reason.to_string()));
                        }
                    }
                    let bad = r.non_finite();
                    r.push("non_finite_columns", Cell::Text(bad.join(" ")));
                    visit(r)?;
                }
            }
        }
        Ok(())
    }
}
