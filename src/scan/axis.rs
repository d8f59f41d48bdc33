//! Scan axes: a parameter (short name or address) and its values — a linear range with a count
//! or a step, a logarithmic range, or an explicit list.

use serde::{Deserialize, Serialize};

use super::alias;
use super::error::ScanError;
use crate::address::Address;

/// Largest number of values of one axis (and of points of a scan).
pub const MAX_POINTS: usize = 1_000_000;

/// A linear range: `from`, `to` and exactly one of `count` (both ends included) or `step`
/// (from `from` while not past `to`).
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct LinearRange {
    /// First value.
    pub from: f64,
    /// Last value (included with `count`; included with `step` when it falls on the grid).
    pub to: f64,
    /// Number of values, both ends included.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub count: Option<usize>,
    /// Distance between neighbouring values (positive).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub step: Option<f64>,
}

/// A logarithmic range: `count` values from `from` to `to` (both positive, both included)
/// with a constant ratio between neighbours.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct LogRange {
    /// First value (positive).
    pub from: f64,
    /// Last value (positive).
    pub to: f64,
    /// Number of values (at least 2).
    pub count: usize,
}

/// One axis as written in a scan file: the parameter and exactly one of `range`, `log_range`,
/// `values`.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct AxisSpec {
    /// A short name ([`alias::ALIASES`]) or an address (`target.channels[A].ip_ev`).
    pub parameter: String,
    /// Linear range.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub range: Option<LinearRange>,
    /// Logarithmic range.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub log_range: Option<LogRange>,
    /// Explicit values.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub values: Option<Vec<f64>>,
}

/// A resolved axis: its address, unit and values.
#[derive(Clone, Debug, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct Axis {
    /// The parameter as given (short name or address).
    pub parameter: String,
    /// The address it stands for.
    pub address: String,
    /// Unit of the values (from the address's key).
    pub unit: String,
    /// The values, in the order they are scanned.
    pub values: Vec<f64>,
}

impl Axis {
    /// The parsed address.
    pub fn parsed_address(&self) -> Result<Address, ScanError> {
        self.address.parse().map_err(|source| ScanError::Address {
            axis: self.parameter.clone(),
            source,
        })
    }

    /// A short name for column headers and array names: the short name, else the address's
    /// last key.
    pub fn column_name(&self) -> String {
        match self.parsed_address() {
            Ok(a) => alias::short_name(&a)
                .map(str::to_string)
                .unwrap_or_else(|| sanitize(&self.address)),
            Err(_) => sanitize(&self.parameter),
        }
    }
}

/// A name made of letters, digits and underscores (for array names and CSV headers).
pub fn sanitize(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        if c.is_ascii_alphanumeric() {
            out.push(c);
        } else if !out.ends_with('_') {
            out.push('_');
        }
    }
    out.trim_matches('_').to_string()
}

fn finite(key: &str, v: f64) -> Result<f64, ScanError> {
    if v.is_finite() {
        Ok(v)
    } else {
        Err(ScanError::invalid(key, v, "must be a finite number"))
    }
}

impl AxisSpec {
    /// The values of the axis at position `index` of the file's `axes`.
    ///
    /// # Errors
    /// None or more than one of `range`, `log_range`, `values`; a count of 0 or over
    /// [`MAX_POINTS`]; a step that is not positive or runs the wrong way; a log range that does
    /// not stay positive; non-finite or repeated values.
    pub fn resolve(&self, index: usize) -> Result<Axis, ScanError> {
        let key = |k: &str| format!("axes[{index}].{k}");
        let address = alias::resolve(&self.parameter).map_err(|source| ScanError::Address {
            axis: format!("axes[{index}] ({})", self.parameter),
            source,
        })?;
        let given = [
            self.range.is_some(),
            self.log_range.is_some(),
            self.values.is_some(),
        ];
        if given.iter().filter(|g| **g).count() != 1 {
            return Err(ScanError::invalid(
                format!("axes[{index}]"),
                &self.parameter,
                "give exactly one of \"range\", \"log_range\", \"values\"",
            ));
        }
        let values = if let Some(r) = &self.range {
            let from = finite(&key("range.from"), r.from)?;
            let to = finite(&key("range.to"), r.to)?;
            match (r.count, r.step) {
                (Some(n), None) => {
                    check_count(&key("range.count"), n)?;
                    if n == 1 && from != to {
                        return Err(ScanError::invalid(
                            key("range.count"),
                            1,
                            "one value needs from = to (or use \"values\")",
                        ));
                    }
                    (0..n)
                        .map(|k| {
                            if n == 1 {
                                from
                            } else if k + 1 == n {
                                to
                            } else {
                                from + (to - from) * k as f64 / (n - 1) as f64
                            }
                        })
                        .collect()
                }
                (None, Some(s)) => {
                    let s = finite(&key("range.step"), s)?;
                    if s <= 0.0 {
                        return Err(ScanError::invalid(
                            key("range.step"),
                            s,
                            "must be positive (the range runs from \"from\" up to \"to\")",
                        ));
                    }
                    if to < from {
                        return Err(ScanError::invalid(
                            key("range.to"),
                            to,
                            "must not be below \"from\" with a step (use \"count\" to run downwards)",
                        ));
                    }
                    let n = ((to - from) / s * (1.0 + 1e-12) + 1e-9).floor() + 1.0;
                    if n > MAX_POINTS as f64 {
                        return Err(ScanError::invalid(
                            key("range.step"),
                            s,
                            format!("gives {n:e} values, more than {MAX_POINTS}"),
                        ));
                    }
                    (0..n as usize).map(|k| from + s * k as f64).collect()
                }
                _ => {
                    return Err(ScanError::invalid(
                        key("range"),
                        "count and step",
                        "give exactly one of \"count\" and \"step\"",
                    ));
                }
            }
        } else if let Some(r) = &self.log_range {
            let from = finite(&key("log_range.from"), r.from)?;
            let to = finite(&key("log_range.to"), r.to)?;
            check_count(&key("log_range.count"), r.count)?;
            if from <= 0.0 || to <= 0.0 {
                return Err(ScanError::invalid(
                    key("log_range"),
                    format!("from {from:e} to {to:e}"),
                    "both ends of a logarithmic range must be positive",
                ));
            }
            if r.count < 2 {
                return Err(ScanError::invalid(
                    key("log_range.count"),
                    r.count,
                    "a logarithmic range needs at least 2 values",
                ));
            }
            let n = r.count;
            let ratio = (to / from).ln();
            (0..n)
                .map(|k| {
                    if k == 0 {
                        from
                    } else if k + 1 == n {
                        to
                    } else {
                        from * (ratio * k as f64 / (n - 1) as f64).exp()
                    }
                })
                .collect()
        } else {
            let list = self.values.clone().unwrap_or_default();
            check_count(&key("values"), list.len())?;
            for (k, v) in list.iter().enumerate() {
                finite(&key(&format!("values[{k}]")), *v)?;
            }
            list
        };
        let mut sorted: Vec<f64> = values.clone();
        sorted.sort_by(f64::total_cmp);
        if let Some(w) = sorted.windows(2).find(|w| w[0] == w[1]) {
            return Err(ScanError::invalid(
                format!("axes[{index}]"),
                w[0],
                "appears twice: every value of an axis must be different",
            ));
        }
        Ok(Axis {
            parameter: self.parameter.trim().to_string(),
            unit: alias::unit(&address).to_string(),
            address: address.to_string(),
            values,
        })
    }

    /// Parses the command-line form `NAME=FROM:TO:COUNT`, `NAME=FROM:TO:+STEP`,
    /// `NAME=log:FROM:TO:COUNT` or `NAME=V1,V2,…`.
    ///
    /// # Errors
    /// The form is not one of these (the message shows them).
    pub fn from_flag(text: &str) -> Result<AxisSpec, ScanError> {
        let bad = |reason: &str| {
            ScanError::invalid(
                "--axis",
                text,
                format!(
                    "{reason}; write NAME=FROM:TO:COUNT, NAME=FROM:TO:+STEP, \
                     NAME=log:FROM:TO:COUNT or NAME=V1,V2,... (NAME a short name such as \
                     intensity or an address such as target.channels[A].ip_ev)"
                ),
            )
        };
        let Some((name, spec)) = text.split_once('=') else {
            return Err(bad("no \"=\""));
        };
        let num = |s: &str| -> Result<f64, ScanError> {
            s.trim()
                .parse::<f64>()
                .map_err(|_| bad(&format!("\"{s}\" is not a number")))
        };
        let int = |s: &str| -> Result<usize, ScanError> {
            s.trim()
                .parse::<usize>()
                .map_err(|_| bad(&format!("\"{s}\" is not a whole number of values")))
        };
        let parts: Vec<&str> = spec.split(':').collect();
        let mut axis = AxisSpec {
            parameter: name.trim().to_string(),
            range: None,
            log_range: None,
            values: None,
        };
        match parts.as_slice() {
            [single] => {
                axis.values = Some(single.split(',').map(num).collect::<Result<_, _>>()?);
            }
            ["log", a, b, n] => {
                axis.log_range = Some(LogRange {
                    from: num(a)?,
                    to: num(b)?,
                    count: int(n)?,
                })
            }
            [a, b, n] => {
                let (count, step) = match n.trim().strip_prefix('+') {
                    Some(s) => (None, Some(num(s)?)),
                    None => (Some(int(n)?), None),
                };
                axis.range = Some(LinearRange {
                    from: num(a)?,
                    to: num(b)?,
                    count,
                    step,
                });
            }
            _ => return Err(bad("unrecognised form")),
        }
        Ok(axis)
    }
}

fn check_count(key: &str, n: usize) -> Result<(), ScanError> {
    if n == 0 {
        return Err(ScanError::invalid(
            key,
            n,
            "an axis needs at least one value",
        ));
    }
    if n > MAX_POINTS {
        return Err(ScanError::invalid(
            key,
            n,
            format!("more than {MAX_POINTS} values"),
        ));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn values(flag: &str) -> Vec<f64> {
        AxisSpec::from_flag(flag)
            .unwrap()
            .resolve(0)
            .unwrap()
            .values
    }

    #[test]
    fn ranges_lists_and_log_ranges() {
        assert_eq!(values("intensity=1e14:3e14:3"), vec![1e14, 2e14, 3e14]);
        assert_eq!(values("cep=0:90:+30"), vec![0.0, 30.0, 60.0, 90.0]);
        assert_eq!(values("cep=0:100:+30"), vec![0.0, 30.0, 60.0, 90.0]);
        assert_eq!(values("wavelength=800,1200"), vec![800.0, 1200.0]);
        let log = values("intensity=log:1e13:1e15:3");
        assert_eq!(log[0], 1e13);
        assert!((log[1] / 1e14 - 1.0).abs() < 1e-14);
        assert_eq!(log[2], 1e15);
        // Downwards with a count.
        assert_eq!(values("cep=90:0:4"), vec![90.0, 60.0, 30.0, 0.0]);
    }

    #[test]
    fn bad_axes_name_the_key() {
        let bad = |flag: &str| {
            AxisSpec::from_flag(flag)
                .and_then(|a| a.resolve(2))
                .unwrap_err()
                .to_string()
        };
        assert!(bad("intensity=1:2:0").contains("axes[2].range.count"));
        assert!(bad("cep=0:90:+0").contains("axes[2].range.step"));
        assert!(bad("intensity=log:0:1:3").contains("axes[2].log_range"));
        assert!(bad("cep=1,1").contains("appears twice"));
        assert!(bad("cep").contains("--axis"));
        let both = AxisSpec {
            parameter: "cep".into(),
            range: None,
            log_range: None,
            values: None,
        };
        assert!(
            both.resolve(0)
                .unwrap_err()
                .to_string()
                .contains("exactly one")
        );
    }

    #[test]
    fn column_names_use_the_short_name() {
        let a = AxisSpec::from_flag("target.channels[A].ip_ev=10,11")
            .unwrap()
            .resolve(0)
            .unwrap();
        assert_eq!(a.column_name(), "target_channels_A_ip_ev");
        assert_eq!(a.unit, "eV");
        let b = AxisSpec::from_flag("cep=0,1").unwrap().resolve(0).unwrap();
        assert_eq!(b.column_name(), "cep");
    }
}
