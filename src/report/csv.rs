//! CSV writer with the same columns as the JSON rows (complex cells split into `_re`, `_im`).

use super::{Cell, Table};

/// Shortest round-trip decimal, in exponent notation for very small or large magnitudes.
fn real(x: Option<f64>) -> String {
    match x {
        Some(v) if v.is_finite() => {
            let a = v.abs();
            if a != 0.0 && !(1e-4..1e15).contains(&a) {
                format!("{v:e}")
            } else {
                format!("{v}")
            }
        }
        _ => String::new(),
    }
}

fn quote(s: &str) -> String {
    if s.contains([',', '"', '\n']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// CSV text of a table, header first.
pub fn document(table: &Table) -> String {
    let mut header = Vec::with_capacity(table.columns.len());
    if let Some(first) = table.rows.first() {
        for (name, cell) in table.columns.iter().zip(first) {
            match cell {
                Cell::Complex(_) => {
                    header.push(format!("{name}_re"));
                    header.push(format!("{name}_im"));
                }
                _ => header.push(name.clone()),
            }
        }
    } else {
        header.extend(table.columns.iter().cloned());
    }
    let mut out = header.join(",");
    out.push('\n');
    for row in &table.rows {
        let mut fields = Vec::with_capacity(header.len());
        for c in row {
            match c {
                Cell::Real(x) => fields.push(real(*x)),
                Cell::Int(i) => fields.push(i.to_string()),
                Cell::Complex(z) => {
                    fields.push(real(z.map(|z| z.re)));
                    fields.push(real(z.map(|z| z.im)));
                }
                Cell::Bool(b) => fields.push(b.to_string()),
                Cell::Text(s) => fields.push(quote(s)),
            }
        }
        out.push_str(&fields.join(","));
        out.push('\n');
    }
    out
}
