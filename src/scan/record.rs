//! Point logs and shards: how finished points are recorded, resumed and merged.
//!
//! A run appends one JSON line per finished point to its log, after a header line with the
//! scan definition and its hash. A killed run leaves at most a partial last line, which reading
//! drops; the rerun computes only the points that are missing. A shard `K/N` computes the points
//! whose index `i` has `i mod N = K − 1` (deterministic; neighbouring points, which cost about
//! the same, go to different shards) and writes the log `shard-K-of-N.jsonl`. The unsharded run
//! is the shard `1/1` and writes `points.jsonl`. The outputs are always built from logs read back, so a
//! merge of shards writes the same bytes as a single run.

use std::collections::{BTreeMap, BTreeSet};

use serde::{Deserialize, Serialize};

use super::definition::ScanDefinition;
use super::error::ScanError;
use super::point::PointOutcome;

/// The format tag of a log's header line.
pub const FORMAT: &str = "holecast-scan-points/1";

/// The log of an unsharded run (the shard `1/1`).
pub const WHOLE_LOG: &str = "points.jsonl";

/// A log's first line.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct LogHeader {
    /// [`FORMAT`].
    pub format: String,
    /// [`ScanDefinition::hash`].
    pub hash: String,
    /// Shard number K (from 1).
    pub shard: usize,
    /// Number of shards N.
    pub shards: usize,
    /// Points in the whole scan.
    pub points: usize,
    /// The definition.
    pub definition: ScanDefinition,
}

/// One finished point.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct PointRecord {
    /// Index of the point (C order over the scan shape).
    pub index: usize,
    /// Its axis values.
    pub values: Vec<f64>,
    /// What came out.
    pub outcome: PointOutcome,
}

/// A shard `K/N` (from 1).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Shard {
    /// K.
    pub number: usize,
    /// N.
    pub count: usize,
}

impl Shard {
    /// The whole scan as one shard.
    pub const WHOLE: Shard = Shard {
        number: 1,
        count: 1,
    };

    /// Parses `K/N`.
    ///
    /// # Errors
    /// Not two whole numbers with `1 ≤ K ≤ N`.
    pub fn parse(text: &str) -> Result<Shard, ScanError> {
        let bad = |reason: &str| ScanError::invalid("--shard", text, reason);
        let (k, n) = text
            .split_once('/')
            .ok_or_else(|| bad("expected K/N, e.g. 3/8"))?;
        let k: usize = k
            .trim()
            .parse()
            .map_err(|_| bad("K is not a whole number"))?;
        let n: usize = n
            .trim()
            .parse()
            .map_err(|_| bad("N is not a whole number"))?;
        if n == 0 || k == 0 || k > n {
            return Err(bad("need 1 ≤ K ≤ N"));
        }
        Ok(Shard {
            number: k,
            count: n,
        })
    }

    /// The points of this shard, in increasing order.
    pub fn indices(&self, total: usize) -> Vec<usize> {
        (self.number - 1..total).step_by(self.count).collect()
    }

    /// The log's file name of a shard run: `shard-K-of-N.jsonl` (an unsharded run writes
    /// [`WHOLE_LOG`]).
    pub fn file_name(&self) -> String {
        format!("shard-{}-of-{}.jsonl", self.number, self.count)
    }
}

/// The header line (with its newline).
pub fn header_line(definition: &ScanDefinition, shard: Shard) -> String {
    let header = LogHeader {
        format: FORMAT.into(),
        hash: definition.hash(),
        shard: shard.number,
        shards: shard.count,
        points: definition.point_count(),
        definition: definition.clone(),
    };
    format!("{}\n", serde_json::to_string(&header).unwrap_or_default())
}

/// A point's line (with its newline).
pub fn record_line(record: &PointRecord) -> String {
    format!("{}\n", serde_json::to_string(record).unwrap_or_default())
}

/// A log read back.
#[derive(Clone, Debug)]
pub struct Log {
    /// Its header.
    pub header: LogHeader,
    /// Finished points by index.
    pub records: BTreeMap<usize, PointRecord>,
    /// Bytes of complete lines (a partial last line from a killed run is not counted: a
    /// resumed run truncates the file to this length before appending).
    pub complete_bytes: usize,
}

/// Reads a log. A last line without its newline (a killed run) is dropped.
///
/// # Errors
/// No header, a header of another format, a malformed complete line, a point outside the shard
/// or recorded twice with different results (each named with the file and line).
pub fn read_log(text: &str, file: &str) -> Result<Log, ScanError> {
    let err = |line: usize, reason: String| ScanError::Record {
        file: file.to_string(),
        reason: format!("line {line}: {reason}"),
    };
    let complete_bytes = text.rfind('\n').map_or(0, |i| i + 1);
    let mut lines = text[..complete_bytes].lines().enumerate();
    let Some((_, first)) = lines.next() else {
        return Err(ScanError::Record {
            file: file.into(),
            reason: "empty (no header line): not a scan point log".into(),
        });
    };
    let header: LogHeader = serde_json::from_str(first)
        .map_err(|e| err(1, format!("not a scan point log header: {e}")))?;
    if header.format != FORMAT {
        return Err(err(
            1,
            format!("format {} (this holecast reads {FORMAT})", header.format),
        ));
    }
    if header.definition.hash() != header.hash {
        return Err(err(
            1,
            "the header's hash does not match its definition (the file was edited)".into(),
        ));
    }
    let shard = Shard {
        number: header.shard,
        count: header.shards,
    };
    if shard.count == 0 || shard.number == 0 || shard.number > shard.count {
        return Err(err(
            1,
            format!("shard {}/{} is not a shard", shard.number, shard.count),
        ));
    }
    let total = header.definition.point_count();
    let mut records = BTreeMap::new();
    for (k, line) in lines {
        if line.trim().is_empty() {
            continue;
        }
        let r: PointRecord =
            serde_json::from_str(line).map_err(|e| err(k + 1, format!("malformed point: {e}")))?;
        if r.index >= total || r.index % shard.count != shard.number - 1 {
            return Err(err(
                k + 1,
                format!(
                    "point {} does not belong to shard {}/{} of a {total}-point scan",
                    r.index, shard.number, shard.count
                ),
            ));
        }
        if let Some(old) = records.get(&r.index) {
            if *old != r {
                return Err(err(
                    k + 1,
                    format!("point {} is recorded twice with different results", r.index),
                ));
            }
            continue;
        }
        records.insert(r.index, r);
    }
    Ok(Log {
        header,
        records,
        complete_bytes,
    })
}

/// A complete scan: the definition and every point in order.
#[derive(Clone, Debug)]
pub struct ScanResult {
    /// The definition.
    pub definition: ScanDefinition,
    /// Every point, by index.
    pub points: Vec<PointRecord>,
}

fn list(numbers: &BTreeSet<usize>) -> String {
    let shown: Vec<String> = numbers.iter().take(20).map(usize::to_string).collect();
    let more = numbers.len().saturating_sub(20);
    if more > 0 {
        format!("{} and {more} more", shown.join(", "))
    } else {
        shown.join(", ")
    }
}

/// Combines logs (named for messages) into the complete scan.
///
/// # Errors
/// No logs; logs of different scans (the hash: scan file values, target, laser, setup, holecast
/// version) or different shard counts; shards missing or given twice (by number); points
/// missing from a shard (by index).
pub fn merge(logs: &[(String, Log)]) -> Result<ScanResult, ScanError> {
    let Some((first_name, first)) = logs.first() else {
        return Err(ScanError::Incomplete("no shard files given".into()));
    };
    let n = first.header.shards;
    let mut by_shard: BTreeMap<usize, Vec<&str>> = BTreeMap::new();
    for (name, log) in logs {
        if log.header.hash != first.header.hash {
            return Err(ScanError::Mismatch(format!(
                "{name} belongs to scan {} but {first_name} to scan {}: the scan file, target, \
                 laser, setup or holecast version differ (holecast {} and {})",
                &log.header.hash[..12],
                &first.header.hash[..12],
                log.header.definition.holecast_version,
                first.header.definition.holecast_version
            )));
        }
        if log.header.shards != n {
            return Err(ScanError::Mismatch(format!(
                "{name} is shard {}/{} but {first_name} is shard {}/{n}: every shard of a merge \
                 must come from the same split",
                log.header.shard, log.header.shards, first.header.shard
            )));
        }
        by_shard.entry(log.header.shard).or_default().push(name);
    }
    let duplicates: Vec<String> = by_shard
        .iter()
        .filter(|(_, files)| files.len() > 1)
        .map(|(k, files)| format!("shard {k} ({})", files.join(", ")))
        .collect();
    if !duplicates.is_empty() {
        return Err(ScanError::Incomplete(format!(
            "given twice: {}",
            duplicates.join("; ")
        )));
    }
    let missing: BTreeSet<usize> = (1..=n).filter(|k| !by_shard.contains_key(k)).collect();
    if !missing.is_empty() {
        return Err(ScanError::Incomplete(format!(
            "missing shards {} of {n}",
            list(&missing)
        )));
    }
    let definition = first.header.definition.clone();
    let total = definition.point_count();
    let mut points: Vec<Option<PointRecord>> = vec![None; total];
    for (_, log) in logs {
        for (i, r) in &log.records {
            points[*i] = Some(r.clone());
        }
    }
    let absent: BTreeSet<usize> = (0..total).filter(|i| points[*i].is_none()).collect();
    if !absent.is_empty() {
        let shards: BTreeSet<usize> = absent.iter().map(|i| i % n + 1).collect();
        return Err(ScanError::Incomplete(format!(
            "{} of {total} points not finished (points {}) in shards {}: rerun those shards \
             (they resume from their finished points)",
            absent.len(),
            list(&absent),
            list(&shards)
        )));
    }
    Ok(ScanResult {
        definition,
        points: points.into_iter().flatten().collect(),
    })
}
