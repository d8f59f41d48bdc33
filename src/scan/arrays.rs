//! The scan as N-D arrays (one per quantity, shape = scan shape × grid) and their NumPy
//! archive (`scan.npz`).
//!
//! Array names (all documented in `docs/scan-file.md`):
//!
//! | name | shape | content |
//! |---|---|---|
//! | `yield` | S × G | `|D|²` (a.u.), the `intensity` of `spectrum` outputs |
//! | `power` | S × G | `Ω⁴|D|²` (arbitrary units) |
//! | `phase_rad` | S × G | `arg(ê·D)`, NaN where negligible |
//! | `row_status` | S × G | complete, partial, failed, below-threshold, no-orbits; `point-failed` |
//! | `energy_ev_at_point` | S × G | photon energy of each grid value at each point (eV) |
//! | `pair_<ion>_to_<rec>_yield` | S × G | `|D_pair|²` |
//! | `family_<ion>_to_<rec>_<family>_hc<k>_yield` | S × G | `|D_family|²` |
//! | `family_…_emission_time_fs` | S × G | `Re t_r` (fs) |
//! | `family_…_group_delay_fs` | S × G | `dφ/dΩ` (fs; only with group delays) |
//! | `family_…_status` | S × G | the family's status (absent: the family does not exist at that point) |
//! | `point_status`, `point_reason`, `point_warnings` | S | computed/failed, why, validity warning codes (`;`-joined) |
//! | `omega_ev` | S | photon energy of the first colour |
//! | `order` or `energy_ev` | G | the grid (see `grid_unit`) |
//! | `axis<i>_values`, `_parameter`, `_address`, `_unit`, `_dimension` | n_i, 0-d | each axis |
//! | `dims` | ndim | names of the dimensions of the S × G arrays |
//! | `scan_hash`, `holecast_version`, `definition_json` | 0-d | provenance |
//!
//! S is the scan shape (one dimension per axis for a product, one for a zip), G the grid.
//! Missing numbers are NaN. The archive is written with fixed entry times and no compression,
//! so the same scan always gives the same bytes.

use std::collections::BTreeMap;
use std::io::{Cursor, Write};

use npyz::WriterBuilder;

use super::definition::{Combine, ScanDefinition};
use super::error::ScanError;
use super::point::PointOutcome;
use super::record::ScanResult;

/// The content of one array.
#[derive(Clone, Debug, PartialEq)]
pub enum Data {
    /// Float64 values.
    Real(Vec<f64>),
    /// Int64 values.
    Int(Vec<i64>),
    /// Unicode strings.
    Text(Vec<String>),
}

/// One named N-D array in C order.
#[derive(Clone, Debug, PartialEq)]
pub struct Array {
    /// Name in the archive (without `.npy`).
    pub name: String,
    /// Shape (empty for 0-d).
    pub shape: Vec<usize>,
    /// Values.
    pub data: Data,
}

/// Family and pair names present at any point, in a fixed order.
pub struct Members {
    /// Pair keys.
    pub pairs: Vec<String>,
    /// `(pair, family)` keys.
    pub families: Vec<(String, String)>,
}

/// The pairs and families of every computed point (sorted).
pub fn members(result: &ScanResult) -> Members {
    let mut pairs = std::collections::BTreeSet::new();
    let mut families = std::collections::BTreeSet::new();
    for p in &result.points {
        if let PointOutcome::Computed { spectrum, .. } = &p.outcome {
            for s in &spectrum.pairs {
                pairs.insert(s.pair.clone());
            }
            for f in &spectrum.families {
                families.insert((f.pair.clone(), f.family.clone()));
            }
        }
    }
    Members {
        pairs: pairs.into_iter().collect(),
        families: families.into_iter().collect(),
    }
}

fn nan(x: Option<f64>) -> f64 {
    x.unwrap_or(f64::NAN)
}

/// The names of the scan dimensions (axis column names for a product, `point` for a zip).
pub fn dimension_names(d: &ScanDefinition) -> Vec<String> {
    match d.combine {
        Combine::Product => d.axes.iter().map(|a| a.column_name()).collect(),
        Combine::Zip => vec!["point".into()],
    }
}

/// Every array of a complete scan.
pub fn arrays(result: &ScanResult) -> Vec<Array> {
    let d = &result.definition;
    let shape = d.shape().unwrap_or_default();
    let g = d.grid_values.len();
    let mut full = shape.clone();
    full.push(g);
    let np = result.points.len();
    let members = members(result);
    let per_point = |f: &dyn Fn(&super::point::PointSpectrum) -> Vec<Option<f64>>| -> Vec<f64> {
        let mut out = Vec::with_capacity(np * g);
        for p in &result.points {
            match &p.outcome {
                PointOutcome::Computed { spectrum, .. } => {
                    let v = f(spectrum);
                    out.extend((0..g).map(|k| nan(v.get(k).copied().flatten())));
                }
                PointOutcome::Failed { .. } => out.extend(std::iter::repeat_n(f64::NAN, g)),
            }
        }
        out
    };
    let text_per_point = |f: &dyn Fn(&super::point::PointSpectrum) -> Option<Vec<String>>,
                          failed: &str,
                          absent: &str|
     -> Vec<String> {
        let mut out = Vec::with_capacity(np * g);
        for p in &result.points {
            match &p.outcome {
                PointOutcome::Computed { spectrum, .. } => match f(spectrum) {
                    Some(v) => out.extend((0..g).map(|k| v.get(k).cloned().unwrap_or_default())),
                    None => out.extend(std::iter::repeat_n(absent.to_string(), g)),
                },
                PointOutcome::Failed { .. } => {
                    out.extend(std::iter::repeat_n(failed.to_string(), g))
                }
            }
        }
        out
    };
    let nd = |name: String, data: Data| Array {
        name,
        shape: full.clone(),
        data,
    };
    let scalar_text = |name: &str, v: String| Array {
        name: name.into(),
        shape: Vec::new(),
        data: Data::Text(vec![v]),
    };
    let mut out = vec![
        nd(
            "yield".into(),
            Data::Real(per_point(&|s| s.yield_au.clone())),
        ),
        nd("power".into(), Data::Real(per_point(&|s| s.power.clone()))),
        nd(
            "phase_rad".into(),
            Data::Real(per_point(&|s| s.phase_rad.clone())),
        ),
        nd(
            "row_status".into(),
            Data::Text(text_per_point(
                &|s| Some(s.row_status.clone()),
                "point-failed",
                "",
            )),
        ),
        nd(
            "energy_ev_at_point".into(),
            Data::Real(per_point(&|s| {
                s.energy_ev.iter().map(|e| Some(*e)).collect()
            })),
        ),
    ];
    for pair in &members.pairs {
        out.push(nd(
            format!("pair_{pair}_yield"),
            Data::Real(per_point(&|s| {
                s.pairs
                    .iter()
                    .find(|p| &p.pair == pair)
                    .map(|p| p.yield_au.clone())
                    .unwrap_or_default()
            })),
        ));
    }
    for (pair, fam) in &members.families {
        let find = |s: &super::point::PointSpectrum| {
            s.families
                .iter()
                .find(|f| &f.pair == pair && &f.family == fam)
                .cloned()
        };
        let base = format!("family_{pair}_{fam}");
        out.push(nd(
            format!("{base}_yield"),
            Data::Real(per_point(&|s| {
                find(s).map(|f| f.yield_au).unwrap_or_default()
            })),
        ));
        out.push(nd(
            format!("{base}_emission_time_fs"),
            Data::Real(per_point(&|s| {
                find(s).map(|f| f.emission_time_fs).unwrap_or_default()
            })),
        ));
        if d.group_delay {
            out.push(nd(
                format!("{base}_group_delay_fs"),
                Data::Real(per_point(&|s| {
                    find(s).map(|f| f.group_delay_fs).unwrap_or_default()
                })),
            ));
        }
        out.push(nd(
            format!("{base}_status"),
            Data::Text(text_per_point(
                &|s| find(s).map(|f| f.status),
                "point-failed",
                "absent",
            )),
        ));
    }
    let point_text = |f: &dyn Fn(&PointOutcome) -> String| -> Vec<String> {
        result.points.iter().map(|p| f(&p.outcome)).collect()
    };
    out.push(Array {
        name: "point_status".into(),
        shape: shape.clone(),
        data: Data::Text(point_text(&|o| o.code().to_string())),
    });
    out.push(Array {
        name: "point_reason".into(),
        shape: shape.clone(),
        data: Data::Text(point_text(&|o| match o {
            PointOutcome::Failed { reason } => reason.clone(),
            _ => String::new(),
        })),
    });
    out.push(Array {
        name: "point_warnings".into(),
        shape: shape.clone(),
        data: Data::Text(point_text(&|o| match o {
            PointOutcome::Computed { warnings, .. } => warnings.join(";"),
            _ => String::new(),
        })),
    });
    out.push(Array {
        name: "omega_ev".into(),
        shape: shape.clone(),
        data: Data::Real(
            result
                .points
                .iter()
                .map(|p| match &p.outcome {
                    PointOutcome::Computed { spectrum, .. } => spectrum.omega_ev,
                    PointOutcome::Failed { .. } => f64::NAN,
                })
                .collect(),
        ),
    });
    out.push(Array {
        name: d.grid.name().into(),
        shape: vec![g],
        data: Data::Real(d.grid_values.clone()),
    });
    out.push(scalar_text("grid_unit", d.grid.name().into()));
    for (i, a) in d.axes.iter().enumerate() {
        out.push(Array {
            name: format!("axis{i}_values"),
            shape: vec![a.values.len()],
            data: Data::Real(a.values.clone()),
        });
        out.push(scalar_text(
            &format!("axis{i}_parameter"),
            a.parameter.clone(),
        ));
        out.push(scalar_text(&format!("axis{i}_address"), a.address.clone()));
        out.push(scalar_text(&format!("axis{i}_unit"), a.unit.clone()));
        out.push(Array {
            name: format!("axis{i}_dimension"),
            shape: Vec::new(),
            data: Data::Int(vec![d.axis_dimension(i) as i64]),
        });
    }
    let mut dims = dimension_names(d);
    dims.push(d.grid.name().into());
    out.push(Array {
        name: "dims".into(),
        shape: vec![dims.len()],
        data: Data::Text(dims),
    });
    out.push(scalar_text("scan_hash", d.hash()));
    out.push(scalar_text("holecast_version", d.holecast_version.clone()));
    out.push(scalar_text("definition_json", d.canonical()));
    out
}

fn npy_bytes(a: &Array) -> std::io::Result<Vec<u8>> {
    let shape: Vec<u64> = a.shape.iter().map(|n| *n as u64).collect();
    let mut cursor = Cursor::new(Vec::new());
    match &a.data {
        Data::Real(v) => {
            let mut w = npyz::WriteOptions::<f64>::new()
                .default_dtype()
                .shape(&shape)
                .writer(&mut cursor)
                .begin_nd()?;
            w.extend(v.iter().copied())?;
            w.finish()?;
        }
        Data::Int(v) => {
            let mut w = npyz::WriteOptions::<i64>::new()
                .default_dtype()
                .shape(&shape)
                .writer(&mut cursor)
                .begin_nd()?;
            w.extend(v.iter().copied())?;
            w.finish()?;
        }
        Data::Text(v) => {
            let width = v
                .iter()
                .map(|s| s.chars().count())
                .max()
                .unwrap_or(0)
                .max(1);
            let dtype = npyz::DType::Plain(
                format!("<U{width}")
                    .parse::<npyz::TypeStr>()
                    .map_err(|e| std::io::Error::other(e.to_string()))?,
            );
            let mut w = npyz::WriteOptions::<str>::new()
                .dtype(dtype)
                .shape(&shape)
                .writer(&mut cursor)
                .begin_nd()?;
            for s in v {
                w.push(s.as_str())?;
            }
            w.finish()?;
        }
    }
    Ok(cursor.into_inner())
}

/// The NumPy archive of the arrays: one `NAME.npy` per array, stored (no compression) with a
/// fixed time stamp (1980-01-01, the ZIP epoch) so that the bytes depend on the data only.
///
/// # Errors
/// An array the writers refuse (reported with its name).
pub fn npz(arrays: &[Array]) -> Result<Vec<u8>, ScanError> {
    let enc = |what: &str, e: &dyn std::fmt::Display| ScanError::Encode {
        what: format!("scan.npz ({what})"),
        reason: e.to_string(),
    };
    let mut zip = zip::ZipWriter::new(Cursor::new(Vec::new()));
    let options = zip::write::SimpleFileOptions::default()
        .compression_method(zip::CompressionMethod::Stored)
        .last_modified_time(zip::DateTime::default())
        .unix_permissions(0o644)
        .large_file(false);
    let mut seen = BTreeMap::new();
    for a in arrays {
        if seen.insert(a.name.clone(), ()).is_some() {
            return Err(enc(&a.name, &"two arrays with this name"));
        }
        let bytes = npy_bytes(a).map_err(|e| enc(&a.name, &e))?;
        zip.start_file(format!("{}.npy", a.name), options)
            .map_err(|e| enc(&a.name, &e))?;
        zip.write_all(&bytes).map_err(|e| enc(&a.name, &e))?;
    }
    let cursor = zip.finish().map_err(|e| enc("archive", &e))?;
    Ok(cursor.into_inner())
}
