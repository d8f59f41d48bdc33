//! Numbers as text: one format for JSON and CSV, so that the two files hold the same digits.
//!
//! - Reals: the shortest decimal that reads back as the same `f64` (Żmij algorithm, crate
//!   `zmij`): fixed notation for decimal exponents −5 to 15 (`0.25`, `23.0`), exponent notation
//!   outside (`1.5e-7`, `3e+20`). Both are valid JSON numbers and read by every CSV reader.
//! - Exact decimals (grid labels, [`super::lattice`]): plain decimal, no trailing zeros, no point
//!   for integers (`23`, `11.001`).
//! - Integers: decimal; booleans: `true` / `false`.
//! - Missing or non-finite values: `null` in JSON, an empty field in CSV.

use super::Cell;

/// Appends a cell's number to a line, or `missing` for a missing or non-finite number; text
/// cells are left to the caller (returns false for them).
#[inline]
pub fn push_scalar(
    line: &mut Vec<u8>,
    cell: &Cell,
    missing: &[u8],
    buffer: &mut zmij::Buffer,
) -> bool {
    match cell {
        Cell::Real(Some(x)) if x.is_finite() => {
            line.extend_from_slice(buffer.format_finite(*x).as_bytes());
        }
        Cell::Real(_) => line.extend_from_slice(missing),
        Cell::Exact(d) => d.write_to(line),
        Cell::Int(i) => line.extend_from_slice(itoa::Buffer::new().format(*i).as_bytes()),
        Cell::Bool(b) => line.extend_from_slice(if *b { b"true" } else { b"false" }),
        Cell::Text(_) => return false,
    }
    true
}

#[cfg(test)]
mod tests {
    use super::*;

    fn text(cell: Cell) -> String {
        let mut out = Vec::new();
        assert!(push_scalar(
            &mut out,
            &cell,
            b"null",
            &mut zmij::Buffer::new()
        ));
        String::from_utf8(out).unwrap()
    }

    #[test]
    fn reals_round_trip_and_read_as_json() {
        for x in [
            0.25,
            23.0,
            1.5e-7,
            -3e20,
            1.0 / 3.0,
            23.000000000000004,
            5e-324,
        ] {
            let t = text(Cell::Real(Some(x)));
            assert_eq!(t.parse::<f64>().unwrap(), x, "{t}");
            let v: serde_json::Value = serde_json::from_str(&t).unwrap();
            assert_eq!(v.as_f64().unwrap(), x, "{t}");
        }
        assert_eq!(text(Cell::Real(Some(f64::NAN))), "null");
        assert_eq!(text(Cell::Real(None)), "null");
        assert_eq!(text(Cell::Int(-7)), "-7");
    }
}
