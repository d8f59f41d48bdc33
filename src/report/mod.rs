//! Output writers: one flat table per result, streamed as JSON, CSV and text, and SVG figures.
//!
//! A result is described once, as a [`RowSource`]: a function that produces its rows one at a
//! time (named cells, the same names in the same order in every row). The writers stream those
//! rows through a [`std::io::Write`] (the binary gives them a buffered file): no document is
//! built in memory, so memory stays flat in the number of rows.
//!
//! **One column set.** A row's cells are scalars; a complex number is two columns `NAME_re`,
//! `NAME_im` ([`Row::complex`]). The JSON rows are objects whose keys are exactly the CSV
//! header, in the same order, and every number is printed the same way in both
//! ([`number`]). Missing or non-finite values are `null` in JSON and empty in CSV.

pub mod csv;
pub mod json;
pub mod lattice;
pub mod number;
pub mod orbits;
pub mod spectrum;
pub mod svg;

use std::borrow::Cow;
use std::io;

use num_complex::Complex64;

use lattice::Decimal;

/// One value of a table.
#[derive(Clone, Debug, PartialEq)]
pub enum Cell {
    /// A real number (None = missing, written as null / empty).
    Real(Option<f64>),
    /// An exact decimal (grid labels: [`lattice`]).
    Exact(Decimal),
    /// An integer.
    Int(i64),
    /// A boolean.
    Bool(bool),
    /// Text.
    Text(String),
}

/// One row under construction: named cells, reused from row to row by a [`RowSource`].
#[derive(Clone, Debug, Default)]
pub struct Row {
    names: Vec<Cow<'static, str>>,
    cells: Vec<Cell>,
}

impl Row {
    /// Empties the row (keeping its allocations).
    pub fn clear(&mut self) {
        self.names.clear();
        self.cells.clear();
    }

    /// Appends a cell.
    pub fn push(&mut self, name: impl Into<Cow<'static, str>>, cell: Cell) -> &mut Self {
        self.names.push(name.into());
        self.cells.push(cell);
        self
    }

    /// Appends a real cell.
    pub fn real(&mut self, name: impl Into<Cow<'static, str>>, v: Option<f64>) -> &mut Self {
        self.push(name, Cell::Real(v))
    }

    /// Appends a complex number as two real columns `NAME_re`, `NAME_im` (both missing if `v`
    /// is None).
    pub fn complex(&mut self, name: &str, v: Option<Complex64>) -> &mut Self {
        self.real(format!("{name}_re"), v.map(|z| z.re))
            .real(format!("{name}_im"), v.map(|z| z.im))
    }

    /// [`Row::complex`] with the two column names given (no formatting per row).
    pub fn complex_named(
        &mut self,
        (re, im): (&'static str, &'static str),
        v: Option<Complex64>,
    ) -> &mut Self {
        self.real(re, v.map(|z| z.re)).real(im, v.map(|z| z.im))
    }

    /// Replaces the cell of column `name` (no effect if there is none).
    pub fn set(&mut self, name: &str, cell: Cell) -> &mut Self {
        if let Some(i) = self.names.iter().position(|n| n == name) {
            self.cells[i] = cell;
        }
        self
    }

    /// Column names.
    pub fn names(&self) -> &[Cow<'static, str>] {
        &self.names
    }

    /// Cells, one per column.
    pub fn cells(&self) -> &[Cell] {
        &self.cells
    }

    /// The cell of column `name`.
    pub fn get(&self, name: &str) -> Option<&Cell> {
        self.names
            .iter()
            .position(|n| n == name)
            .map(|i| &self.cells[i])
    }

    /// Names of the columns whose value is a non-finite number (NaN or ±inf); the writers turn
    /// such values into null, so a row that has any must say why in its status.
    pub fn non_finite(&self) -> Vec<String> {
        self.names
            .iter()
            .zip(&self.cells)
            .filter(|(_, c)| matches!(c, Cell::Real(Some(x)) if !x.is_finite()))
            .map(|(n, _)| n.to_string())
            .collect()
    }
}

/// A result as rows, produced one at a time.
pub trait RowSource {
    /// Fills `row` with each row in turn (cleared before each) and calls `visit` with it.
    fn for_each_row(
        &self,
        row: &mut Row,
        visit: &mut dyn FnMut(&Row) -> io::Result<()>,
    ) -> io::Result<()>;
}

/// Visits every row of `source` with its index, checking that every row has the columns of the
/// first (an internal error otherwise). Returns the number of rows.
pub fn each_row(
    source: &dyn RowSource,
    mut visit: impl FnMut(usize, &Row) -> io::Result<()>,
) -> io::Result<usize> {
    let mut columns: Vec<Cow<'static, str>> = Vec::new();
    let mut n = 0usize;
    let mut row = Row::default();
    source.for_each_row(&mut row, &mut |r: &Row| {
        if n == 0 {
            columns = r.names.clone();
        } else if r.names != columns {
            return Err(io::Error::new(
                io::ErrorKind::InvalidData,
                format!("internal: row {n} does not have the columns of the first row"),
            ));
        }
        visit(n, r)?;
        n += 1;
        Ok(())
    })?;
    Ok(n)
}

/// Counts of the values of a text column over every row.
pub fn count_text(
    source: &dyn RowSource,
    column: &str,
) -> io::Result<std::collections::BTreeMap<String, usize>> {
    let mut out = std::collections::BTreeMap::new();
    let mut index = None;
    each_row(source, |n, r| {
        if n == 0 {
            index = r.names.iter().position(|c| c == column);
        }
        if let Some(Cell::Text(t)) = index.map(|i| &r.cells[i]) {
            match out.get_mut(t.as_str()) {
                Some(c) => *c += 1,
                None => {
                    out.insert(t.clone(), 1);
                }
            }
        }
        Ok(())
    })?;
    Ok(out)
}

/// A table held in memory: for tests and small results (the writers never build one).
#[derive(Clone, Debug, Default, PartialEq)]
pub struct Table {
    /// Column names (JSON keys, CSV header).
    pub columns: Vec<String>,
    /// Rows, each with one cell per column.
    pub rows: Vec<Vec<Cell>>,
}

impl Table {
    /// Collects every row of `source`.
    pub fn collect(source: &dyn RowSource) -> io::Result<Self> {
        let mut out = Self::default();
        each_row(source, |n, r| {
            if n == 0 {
                out.columns = r.names.iter().map(|c| c.to_string()).collect();
            }
            out.rows.push(r.cells.clone());
            Ok(())
        })?;
        Ok(out)
    }
}
