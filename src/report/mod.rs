//! Output writers: one flat table per result, written as JSON, CSV and SVG.
//!
//! A result is first turned into a [`Table`] (named columns, one row per point) by a single
//! function; the JSON writer emits each row as an object with exactly those keys and the CSV
//! writer emits the same columns, so the two cannot drift (complex cells become `[re, im]` in
//! JSON and `name_re`, `name_im` columns in CSV). Writers return text; the binary writes it to
//! files atomically.

pub mod csv;
pub mod json;
pub mod orbits;
pub mod spectrum;
pub mod svg;

use num_complex::Complex64;

/// One value of a table.
#[derive(Clone, Debug, PartialEq)]
pub enum Cell {
    /// A real number (None = missing, written as null / empty).
    Real(Option<f64>),
    /// An integer.
    Int(i64),
    /// A complex number (None = missing).
    Complex(Option<Complex64>),
    /// A boolean.
    Bool(bool),
    /// Text.
    Text(String),
}

/// Named columns and rows of cells.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Table {
    /// Column names (JSON keys).
    pub columns: Vec<String>,
    /// Rows, each with one cell per column.
    pub rows: Vec<Vec<Cell>>,
}

/// Builds one row at a time, checking that every row has the same columns in the same order.
#[derive(Default)]
pub struct RowBuilder {
    names: Vec<String>,
    cells: Vec<Cell>,
}

impl RowBuilder {
    /// Appends a cell.
    pub fn push(&mut self, name: impl Into<String>, cell: Cell) -> &mut Self {
        self.names.push(name.into());
        self.cells.push(cell);
        self
    }

    /// Appends a real cell.
    pub fn real(&mut self, name: impl Into<String>, v: Option<f64>) -> &mut Self {
        self.push(name, Cell::Real(v))
    }

    /// Appends a complex cell.
    pub fn complex(&mut self, name: impl Into<String>, v: Option<Complex64>) -> &mut Self {
        self.push(name, Cell::Complex(v))
    }

    /// Replaces the cell of column `name` (no effect if there is none).
    pub fn set(&mut self, name: &str, cell: Cell) -> &mut Self {
        if let Some(i) = self.names.iter().position(|n| n == name) {
            self.cells[i] = cell;
        }
        self
    }

    /// Names of the columns whose value is a non-finite number (NaN or ±inf); the writers turn
    /// such values into null, so a row that has any must say why in its status.
    pub fn non_finite(&self) -> Vec<String> {
        self.names
            .iter()
            .zip(&self.cells)
            .filter(|(_, c)| match c {
                Cell::Real(Some(x)) => !x.is_finite(),
                Cell::Complex(Some(z)) => !(z.re.is_finite() && z.im.is_finite()),
                _ => false,
            })
            .map(|(n, _)| n.clone())
            .collect()
    }
}

impl Table {
    /// Adds a finished row; the first row fixes the columns.
    pub fn add(&mut self, row: RowBuilder) -> Result<(), String> {
        if self.rows.is_empty() {
            self.columns = row.names;
        } else if self.columns != row.names {
            return Err("internal: rows of one table must have identical columns".into());
        }
        self.rows.push(row.cells);
        Ok(())
    }
}
