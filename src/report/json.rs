//! JSON writer: metadata object plus the rows of a [`Table`] under one key.

use serde_json::{Map, Value, json};

use super::{Cell, Table};

/// JSON value of a cell (complex as `[re, im]`, missing as null).
pub fn cell_value(c: &Cell) -> Value {
    match c {
        Cell::Real(Some(x)) if x.is_finite() => json!(x),
        Cell::Real(_) => Value::Null,
        Cell::Int(i) => json!(i),
        Cell::Complex(Some(z)) if z.re.is_finite() && z.im.is_finite() => json!([z.re, z.im]),
        Cell::Complex(_) => Value::Null,
        Cell::Bool(b) => json!(b),
        Cell::Text(s) => json!(s),
    }
}

/// Rows of a table as an array of objects with the table's column names as keys.
pub fn rows(table: &Table) -> Value {
    Value::Array(
        table
            .rows
            .iter()
            .map(|r| {
                let mut m = Map::new();
                for (name, c) in table.columns.iter().zip(r) {
                    m.insert(name.clone(), cell_value(c));
                }
                Value::Object(m)
            })
            .collect(),
    )
}

/// Pretty JSON text of `meta` with the table's rows added under `key`.
pub fn document(mut meta: Map<String, Value>, key: &str, table: &Table) -> String {
    meta.insert(key.to_string(), rows(table));
    let mut s = serde_json::to_string_pretty(&Value::Object(meta)).unwrap_or_default();
    s.push('\n');
    s
}
