//! CSV writer: a header with the row's column names, then one line per row (RFC 4180 quoting
//! of text; numbers as in [`super::number`]; missing values empty). Each line is assembled in
//! a reused buffer and written with one call.

use std::io::{self, Write};

use super::number::push_scalar;
use super::{Cell, RowSource, each_row};

fn push_text(line: &mut Vec<u8>, s: &str) {
    if s.contains([',', '"', '\n', '\r']) {
        line.push(b'"');
        line.extend_from_slice(s.replace('"', "\"\"").as_bytes());
        line.push(b'"');
    } else {
        line.extend_from_slice(s.as_bytes());
    }
}

/// Streams the rows of `source` as CSV into `w`, header first (an empty header line when there
/// are no rows). Returns the number of rows.
pub fn write(source: &dyn RowSource, w: &mut dyn Write) -> io::Result<usize> {
    let mut buffer = zmij::Buffer::new();
    let mut line: Vec<u8> = Vec::with_capacity(1024);
    let n = each_row(source, |n, r| {
        line.clear();
        if n == 0 {
            for (i, name) in r.names().iter().enumerate() {
                if i > 0 {
                    line.push(b',');
                }
                push_text(&mut line, name);
            }
            line.push(b'\n');
        }
        for (i, c) in r.cells().iter().enumerate() {
            if i > 0 {
                line.push(b',');
            }
            if !push_scalar(&mut line, c, b"", &mut buffer)
                && let Cell::Text(s) = c
            {
                push_text(&mut line, s);
            }
        }
        line.push(b'\n');
        w.write_all(&line)
    })?;
    if n == 0 {
        w.write_all(b"\n")?;
    }
    Ok(n)
}
