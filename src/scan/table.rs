//! The long-form table of a scan (`scan.csv`): one row per point and grid value, the axis
//! values in their own columns, every quantity of [`super::arrays`] as a column; numbers in
//! shortest round-trip form, missing numbers empty. Read it with `pandas.read_csv`.

use super::arrays::members;
use super::point::{PointOutcome, PointSpectrum};
use super::record::ScanResult;

fn quote(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

fn num(x: Option<f64>) -> String {
    match x {
        Some(v) if v.is_finite() => format!("{v:e}"),
        _ => String::new(),
    }
}

/// The CSV text of a complete scan.
pub fn csv(result: &ScanResult) -> String {
    let d = &result.definition;
    let m = members(result);
    let mut header: Vec<String> = vec!["point".into()];
    for a in &d.axes {
        header.push(format!("{}_{}", a.column_name(), unit_tag(&a.unit)));
    }
    header.push(d.grid.name().into());
    for c in [
        "energy_ev_at_point",
        "point_status",
        "yield",
        "power",
        "phase_rad",
        "row_status",
    ] {
        header.push(c.into());
    }
    for p in &m.pairs {
        header.push(format!("pair_{p}_yield"));
    }
    for (p, f) in &m.families {
        let base = format!("family_{p}_{f}");
        header.push(format!("{base}_yield"));
        header.push(format!("{base}_emission_time_fs"));
        if d.group_delay {
            header.push(format!("{base}_group_delay_fs"));
        }
        header.push(format!("{base}_status"));
    }
    header.push("point_warnings".into());
    header.push("point_reason".into());
    let mut out = header.join(",");
    out.push('\n');
    for p in &result.points {
        for (k, grid) in d.grid_values.iter().enumerate() {
            let mut row: Vec<String> = vec![p.index.to_string()];
            row.extend(p.values.iter().map(|v| num(Some(*v))));
            row.push(num(Some(*grid)));
            match &p.outcome {
                PointOutcome::Computed {
                    spectrum: s,
                    warnings,
                } => {
                    row.push(num(s.energy_ev.get(k).copied()));
                    row.push("computed".into());
                    let at = |v: &[Option<f64>]| num(v.get(k).copied().flatten());
                    row.push(at(&s.yield_au));
                    row.push(at(&s.power));
                    row.push(at(&s.phase_rad));
                    row.push(s.row_status.get(k).cloned().unwrap_or_default());
                    for pair in &m.pairs {
                        row.push(
                            s.pairs
                                .iter()
                                .find(|x| &x.pair == pair)
                                .map(|x| at(&x.yield_au))
                                .unwrap_or_default(),
                        );
                    }
                    family_cells(s, &m.families, k, d.group_delay, &mut row);
                    row.push(quote(&warnings.join(";")));
                    row.push(String::new());
                }
                PointOutcome::Failed { reason } => {
                    row.push(String::new());
                    row.push("failed".into());
                    row.extend(["", "", ""].map(String::from));
                    row.push("point-failed".into());
                    row.extend(m.pairs.iter().map(|_| String::new()));
                    for _ in &m.families {
                        row.extend(["", ""].map(String::from));
                        if d.group_delay {
                            row.push(String::new());
                        }
                        row.push("point-failed".into());
                    }
                    row.push(String::new());
                    row.push(quote(reason));
                }
            }
            out.push_str(&row.join(","));
            out.push('\n');
        }
    }
    out
}

fn family_cells(
    s: &PointSpectrum,
    families: &[(String, String)],
    k: usize,
    group_delay: bool,
    row: &mut Vec<String>,
) {
    for (pair, fam) in families {
        match s
            .families
            .iter()
            .find(|f| &f.pair == pair && &f.family == fam)
        {
            Some(f) => {
                row.push(num(f.yield_au.get(k).copied().flatten()));
                row.push(num(f.emission_time_fs.get(k).copied().flatten()));
                if group_delay {
                    row.push(num(f.group_delay_fs.get(k).copied().flatten()));
                }
                row.push(f.status.get(k).cloned().unwrap_or_default());
            }
            None => {
                row.extend(["", ""].map(String::from));
                if group_delay {
                    row.push(String::new());
                }
                row.push("absent".into());
            }
        }
    }
}

/// The unit as a column-name suffix (`W/cm2` → `wcm2`).
fn unit_tag(unit: &str) -> String {
    match unit {
        "1" => "value".into(),
        u => u
            .chars()
            .filter(|c| c.is_ascii_alphanumeric())
            .collect::<String>()
            .to_lowercase(),
    }
}
