//! Measured spectra as text tables, and their conversion to photon energy.
//!
//! A table is comma-, tab- or whitespace-separated; `#` starts a comment (whole line or the rest
//! of one); blank lines are skipped. The first non-comment row is a header when any of its
//! fields is not a number: columns can then be chosen by name; otherwise by number (from 1).
//! Every value must be a finite number; the error names the source, row and column.
//!
//! The x axis is photon energy (eV), wavelength (nm) or harmonic order. A *spectral density*
//! (yield per unit of x) is converted to a density per unit of photon energy with the Jacobian
//! `|dx/dE|`: `1` for eV, `λ²/(hc)` for nm (`λ = hc/E`), `1/ħω` for orders (`q = E/ħω`).
//! Line yields (counts in a line) need no Jacobian.

use serde::{Deserialize, Serialize};

use super::FitError;
use crate::units;

/// Unit of the x column.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum XUnit {
    /// Photon energy (eV).
    Ev,
    /// Wavelength (nm).
    Nm,
    /// Harmonic order (multiples of the first colour's photon energy).
    Order,
}

/// A column chosen by header name or by number (from 1).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum Column {
    /// Column number, from 1.
    Number(usize),
    /// Header name.
    Name(String),
}

/// Which columns hold what.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Columns {
    /// The x column.
    pub x: Column,
    /// The yield column.
    #[serde(rename = "yield")]
    pub yield_: Column,
    /// Absolute uncertainty of the yield (optional).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub uncertainty: Option<Column>,
    /// Harmonic phase (rad) per line (optional; read and written out, not fitted).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub phase_rad: Option<Column>,
    /// Group delay (fs) per line (optional; read and written out, not fitted).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub group_delay_fs: Option<Column>,
}

/// A parsed table.
#[derive(Clone, Debug, PartialEq)]
pub struct Table {
    /// x values as given.
    pub x: Vec<f64>,
    /// Yields.
    pub y: Vec<f64>,
    /// Absolute uncertainties, if given.
    pub sigma: Option<Vec<f64>>,
    /// Phases, if given.
    pub phase: Option<Vec<f64>>,
    /// Group delays, if given.
    pub group_delay: Option<Vec<f64>>,
    /// Line number (from 1) of each row in the source.
    pub rows: Vec<usize>,
}

fn split(line: &str) -> Vec<&str> {
    if line.contains(',') {
        line.split(',').map(str::trim).collect()
    } else if line.contains('\t') {
        line.split('\t')
            .map(str::trim)
            .filter(|s| !s.is_empty())
            .collect()
    } else {
        line.split_whitespace().collect()
    }
}

/// Parses `text` (named `source` in errors) with the columns `columns`.
pub fn parse(text: &str, source: &str, columns: &Columns) -> Result<Table, FitError> {
    let err = |msg: String| FitError::Data(format!("{source}: {msg}"));
    let mut header: Option<Vec<String>> = None;
    let mut rows: Vec<(usize, Vec<&str>)> = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = raw.split('#').next().unwrap_or("").trim();
        if line.is_empty() {
            continue;
        }
        let fields = split(line);
        if header.is_none() && rows.is_empty() && fields.iter().any(|f| f.parse::<f64>().is_err()) {
            header = Some(fields.iter().map(|s| s.to_string()).collect());
            continue;
        }
        rows.push((i + 1, fields));
    }
    if rows.is_empty() {
        return Err(err("no data rows (the dataset is empty)".into()));
    }
    let index = |c: &Column, what: &str| -> Result<usize, FitError> {
        match c {
            Column::Number(n) => {
                if *n == 0 {
                    Err(err(format!(
                        "column {what} = 0: columns are numbered from 1"
                    )))
                } else {
                    Ok(n - 1)
                }
            }
            Column::Name(name) => match &header {
                Some(h) => h.iter().position(|x| x == name).ok_or_else(|| {
                    err(format!(
                        "no column named \"{name}\" for {what} (header: {})",
                        h.join(", ")
                    ))
                }),
                None => Err(err(format!(
                    "column \"{name}\" for {what} given by name, but the table has no header \
                     row: use column numbers (from 1)"
                ))),
            },
        }
    };
    let ix = index(&columns.x, "x")?;
    let iy = index(&columns.yield_, "yield")?;
    let optional = |c: &Option<Column>, what: &str| c.as_ref().map(|c| index(c, what)).transpose();
    let isig = optional(&columns.uncertainty, "uncertainty")?;
    let iph = optional(&columns.phase_rad, "phase_rad")?;
    let igd = optional(&columns.group_delay_fs, "group_delay_fs")?;
    let value = |row: usize, fields: &[&str], k: usize, what: &str| -> Result<f64, FitError> {
        let text = fields.get(k).ok_or_else(|| {
            err(format!(
                "row {row} has {} columns; {what} is column {}",
                fields.len(),
                k + 1
            ))
        })?;
        let v: f64 = text.parse().map_err(|_| {
            err(format!(
                "row {row}, {what} (column {}): \"{text}\" is not a number",
                k + 1
            ))
        })?;
        if !v.is_finite() {
            return Err(err(format!(
                "row {row}, {what} (column {}): {v} is not finite",
                k + 1
            )));
        }
        Ok(v)
    };
    let mut t = Table {
        x: Vec::new(),
        y: Vec::new(),
        sigma: isig.map(|_| Vec::new()),
        phase: iph.map(|_| Vec::new()),
        group_delay: igd.map(|_| Vec::new()),
        rows: Vec::new(),
    };
    for (row, fields) in &rows {
        t.x.push(value(*row, fields, ix, "x")?);
        t.y.push(value(*row, fields, iy, "yield")?);
        if let (Some(k), Some(v)) = (isig, t.sigma.as_mut()) {
            let s = value(*row, fields, k, "uncertainty")?;
            if s <= 0.0 {
                return Err(err(format!("row {row}, uncertainty {s}: must be positive")));
            }
            v.push(s);
        }
        if let (Some(k), Some(v)) = (iph, t.phase.as_mut()) {
            v.push(value(*row, fields, k, "phase_rad")?);
        }
        if let (Some(k), Some(v)) = (igd, t.group_delay.as_mut()) {
            v.push(value(*row, fields, k, "group_delay_fs")?);
        }
        t.rows.push(*row);
    }
    Ok(t)
}

/// Photon energy (a.u.) of `x` in `unit`, for a field whose first colour has photon energy
/// `omega` (a.u.).
pub fn energy(x: f64, unit: XUnit, omega: f64) -> f64 {
    match unit {
        XUnit::Ev => units::ev_to_au(x),
        XUnit::Nm => units::wavelength_nm_to_omega(x),
        XUnit::Order => x * omega,
    }
}

/// `|dx/dE|` (x per a.u. of photon energy) at `x`: multiply a density per unit of x by it to get
/// a density per a.u. of photon energy.
pub fn density_jacobian(x: f64, unit: XUnit, omega: f64) -> f64 {
    match unit {
        // x = E·(eV per a.u.)
        XUnit::Ev => units::au_to_ev(1.0),
        // x = C/E with C = ω·λ constant: |dx/dE| = C/E² = x²/C.
        XUnit::Nm => {
            let c = units::wavelength_nm_to_omega(1.0);
            x * x / c
        }
        // x = E/ω
        XUnit::Order => 1.0 / omega,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cols() -> Columns {
        Columns {
            x: Column::Name("order".into()),
            yield_: Column::Name("counts".into()),
            uncertainty: Some(Column::Number(3)),
            phase_rad: None,
            group_delay_fs: None,
        }
    }

    #[test]
    fn reads_comma_tab_and_space_tables_with_comments() {
        for text in [
            "# demo\norder,counts,err\n13,100,10 # first\n15,50,5\n",
            "order\tcounts\terr\n13\t100\t10\n\n15\t50\t5\n",
            "  order counts err\n 13 100 10\n15   50  5\n",
        ] {
            let t = parse(text, "demo.csv", &cols()).unwrap();
            assert_eq!(t.x, vec![13.0, 15.0]);
            assert_eq!(t.y, vec![100.0, 50.0]);
            assert_eq!(t.sigma, Some(vec![10.0, 5.0]));
        }
    }

    #[test]
    fn errors_name_the_source_row_and_column() {
        let e = parse("order counts err\n13 abc 1\n", "m.txt", &cols()).unwrap_err();
        assert!(e.to_string().contains("m.txt: row 2, yield"), "{e}");
        let e = parse("# nothing\n", "m.txt", &cols()).unwrap_err();
        assert!(e.to_string().contains("empty"), "{e}");
        let e = parse("a b c\n1 2 3\n", "m.txt", &cols()).unwrap_err();
        assert!(e.to_string().contains("no column named \"order\""), "{e}");
        let e = parse("order counts err\n13 1 0\n", "m.txt", &cols()).unwrap_err();
        assert!(e.to_string().contains("must be positive"), "{e}");
    }

    #[test]
    fn density_jacobians_integrate_to_the_same_yield() {
        // A flat density of 1 per eV over 20..30 eV holds 10; the same spectrum per nm must give
        // 10 too after the Jacobian (numerical quadrature over the nm axis).
        let omega = units::wavelength_nm_to_omega(800.0);
        let (e0, e1) = (units::ev_to_au(20.0), units::ev_to_au(30.0));
        let (l0, l1) = (
            units::wavelength_nm_to_omega(1.0) / e1,
            units::wavelength_nm_to_omega(1.0) / e0,
        );
        let n = 20000;
        let mut total = 0.0;
        for i in 0..n {
            let l = l0 + (i as f64 + 0.5) * (l1 - l0) / n as f64;
            // density per nm of a spectrum flat at 1 per eV, i.e. au_to_ev(1) per a.u.:
            // f_λ = f_E / |dλ/dE|
            let per_nm =
                density_jacobian(1.0, XUnit::Ev, omega) / density_jacobian(l, XUnit::Nm, omega);
            total += per_nm * (l1 - l0) / n as f64;
        }
        assert!((total - 10.0).abs() < 1e-6, "{total}");
    }
}
