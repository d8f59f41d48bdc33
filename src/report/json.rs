//! JSON writer: the metadata object (pretty, two-space indent) with the rows of a
//! [`RowSource`] streamed under one key, one compact object per line:
//!
//! ```text
//! {
//!   "holecast_version": "…",
//!   …,
//!   "points": [
//!     {"order":11,"energy_ev":17.05…,…},
//!     …
//!   ]
//! }
//! ```
//!
//! The keys of every row object are the CSV header, in the same order.

use std::io::{self, Write};

use serde_json::{Map, Value};

use super::number::push_scalar;
use super::{Cell, RowSource, each_row};

/// Appends a JSON string literal (escaped by serde_json).
fn push_string(line: &mut Vec<u8>, s: &str) -> io::Result<()> {
    serde_json::to_writer(line, s).map_err(io::Error::other)
}

/// Streams `meta` with the rows of `source` added under `key` (the last key) into `w`.
/// Returns the number of rows.
pub fn write(
    meta: &Map<String, Value>,
    key: &str,
    source: &dyn RowSource,
    w: &mut dyn Write,
) -> io::Result<usize> {
    let head = serde_json::to_string_pretty(meta).map_err(io::Error::other)?;
    // `head` is `{` … `}`; reopen it to append the rows' key.
    let body = head.strip_suffix('}').unwrap_or("{\n").trim_end();
    w.write_all(body.as_bytes())?;
    let mut line: Vec<u8> = Vec::with_capacity(2048);
    line.extend_from_slice(if meta.is_empty() { b"\n  " } else { b",\n  " });
    push_string(&mut line, key)?;
    line.extend_from_slice(b": [");
    w.write_all(&line)?;
    let mut keys: Vec<Vec<u8>> = Vec::new();
    let mut buffer = zmij::Buffer::new();
    let n = each_row(source, |n, r| {
        line.clear();
        if n == 0 {
            keys = r
                .names()
                .iter()
                .map(|name| {
                    let mut k = serde_json::to_vec::<str>(name).map_err(io::Error::other)?;
                    k.push(b':');
                    Ok(k)
                })
                .collect::<io::Result<_>>()?;
            line.extend_from_slice(b"\n    {");
        } else {
            line.extend_from_slice(b",\n    {");
        }
        for (i, (k, c)) in keys.iter().zip(r.cells()).enumerate() {
            if i > 0 {
                line.push(b',');
            }
            line.extend_from_slice(k);
            if !push_scalar(&mut line, c, b"null", &mut buffer)
                && let Cell::Text(s) = c
            {
                push_string(&mut line, s)?;
            }
        }
        line.push(b'}');
        w.write_all(&line)
    })?;
    w.write_all(if n == 0 { b"]\n}\n" } else { b"\n  ]\n}\n" })?;
    Ok(n)
}

/// The JSON text of `meta` with the rows under `key`, in memory (for small results and tests;
/// the binary streams with [`write`]).
pub fn document(
    meta: &Map<String, Value>,
    key: &str,
    source: &dyn RowSource,
) -> io::Result<String> {
    let mut out = Vec::new();
    write(meta, key, source, &mut out)?;
    String::from_utf8(out).map_err(io::Error::other)
}
