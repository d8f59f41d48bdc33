//! One addressing scheme for every numeric input value: the free parameters of `fit` and the
//! axes of `scan` name the value they change the same way.
//!
//! An address is the input document followed by a path into its JSON form:
//!
//! ```text
//! target.channels[A].ip_ev            the ionization potential of the channel labelled A
//! target.channels[1].ip_ev            the same channel by position (from 0)
//! target.couplings[0].dipole_au[2]    the z component of the first coupling's dipole
//! target.couplings[0].energy_au       a field-free coupling
//! laser.colours[0].intensity_wcm2     the first colour's intensity
//! laser.colours[1].phase_deg          the second colour's phase
//! laser.envelope.fwhm_fs              a pulse's FWHM
//! setup.medium.position_mm            any number of a setup file
//! ```
//!
//! A segment `[n]` is a position in an array; `[LABEL]` picks the element of an array of
//! objects whose `"label"` equals `LABEL`. Keys are the file keys as documented; the address is
//! applied to the library's serialisation of the document, which writes most defaults out but
//! leaves unset optional values out. The addressed value must exist and be a number: an address
//! never creates a key, so a typo cannot silently add an unused value (the error lists the keys
//! that exist at that point). To address an optional value a file leaves out (a field-free
//! coupling, say), write it in the file, at its default.

use std::fmt;
use std::str::FromStr;

use serde::Serialize;
use serde::de::DeserializeOwned;
use serde_json::Value;

/// The input document an address points into.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Document {
    /// The target (channels, couplings, structure models, alignment).
    Target,
    /// The laser (colours, envelope).
    Laser,
    /// The setup (beam, medium, detector).
    Setup,
}

impl Document {
    /// The name used in addresses.
    pub fn name(self) -> &'static str {
        match self {
            Document::Target => "target",
            Document::Laser => "laser",
            Document::Setup => "setup",
        }
    }
}

/// One step of a path.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub enum Segment {
    /// An object key.
    Key(String),
    /// A position in an array (from 0).
    Index(usize),
    /// The element of an array of objects whose `"label"` is this.
    Label(String),
}

/// A parsed address (see the module documentation).
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
pub struct Address {
    /// The document.
    pub document: Document,
    /// The path inside it (at least one segment).
    pub path: Vec<Segment>,
    text: String,
}

/// Why an address could not be parsed or applied.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum AddressError {
    /// The text is not an address.
    #[error("address \"{text}\": {reason}")]
    Syntax {
        /// The text as given.
        text: String,
        /// What is wrong with it.
        reason: String,
    },
    /// The path leads nowhere in the document.
    #[error("address \"{address}\": {reason}")]
    Missing {
        /// The address.
        address: String,
        /// Which segment failed and what exists there.
        reason: String,
    },
    /// The addressed value is not a number.
    #[error("address \"{address}\" holds {found}, not a number")]
    NotNumber {
        /// The address.
        address: String,
        /// A short description of what is there.
        found: String,
    },
    /// The document is not the one the address names.
    #[error("address \"{address}\" points into the {expected} document, not the {given} document")]
    WrongDocument {
        /// The address.
        address: String,
        /// The document it names.
        expected: &'static str,
        /// The document it was applied to.
        given: &'static str,
    },
    /// The changed document no longer reads as its type.
    #[error("address \"{address}\" = {value}: the changed {document} does not read back: {reason}")]
    Rejected {
        /// The address.
        address: String,
        /// The value that was set.
        value: f64,
        /// The document.
        document: &'static str,
        /// The deserialisation error.
        reason: String,
    },
}

impl fmt::Display for Address {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.text)
    }
}

fn is_key_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '_' || c == '-'
}

impl FromStr for Address {
    type Err = AddressError;

    fn from_str(text: &str) -> Result<Self, AddressError> {
        let err = |reason: &str| AddressError::Syntax {
            text: text.to_string(),
            reason: reason.to_string(),
        };
        let (head, rest) = match text.find(['.', '[']) {
            Some(i) => (&text[..i], &text[i..]),
            None => (text, ""),
        };
        let document = match head {
            "target" => Document::Target,
            "laser" => Document::Laser,
            "setup" => Document::Setup,
            _ => {
                return Err(err(
                    "must start with \"target.\", \"laser.\" or \"setup.\" (e.g. target.channels[A].ip_ev)",
                ));
            }
        };
        let mut path = Vec::new();
        let mut chars = rest.char_indices().peekable();
        while let Some((i, c)) = chars.next() {
            match c {
                '.' => {
                    let start = i + 1;
                    let mut end = start;
                    while let Some(&(j, d)) = chars.peek() {
                        if !is_key_char(d) {
                            break;
                        }
                        end = j + d.len_utf8();
                        chars.next();
                    }
                    if end == start {
                        return Err(err(&format!("empty key at character {start}")));
                    }
                    path.push(Segment::Key(rest[start..end].to_string()));
                }
                '[' => {
                    let start = i + 1;
                    let mut end = None;
                    for (j, d) in chars.by_ref() {
                        if d == ']' {
                            end = Some(j);
                            break;
                        }
                    }
                    let Some(end) = end else {
                        return Err(err("an opening \"[\" without \"]\""));
                    };
                    let inner = rest[start..end].trim();
                    if inner.is_empty() {
                        return Err(err("empty brackets \"[]\""));
                    }
                    path.push(match inner.parse::<usize>() {
                        Ok(n) => Segment::Index(n),
                        Err(_) => Segment::Label(inner.to_string()),
                    });
                }
                _ => {
                    return Err(err(&format!(
                        "unexpected \"{c}\" at character {}: keys are joined by \".\" and \
                         positions or labels written in brackets",
                        head.len() + i
                    )));
                }
            }
        }
        if path.is_empty() {
            return Err(err("names a document but no value in it"));
        }
        Ok(Address {
            document,
            path,
            text: text.to_string(),
        })
    }
}

fn describe(v: &Value) -> String {
    match v {
        Value::Null => "null (the key is unset)".into(),
        Value::Bool(b) => format!("the boolean {b}"),
        Value::Number(n) => format!("the number {n}"),
        Value::String(s) => format!("the text \"{s}\""),
        Value::Array(a) => format!("a list of {}", a.len()),
        Value::Object(_) => "an object".into(),
    }
}

impl Address {
    fn missing(&self, reason: String) -> AddressError {
        AddressError::Missing {
            address: self.text.clone(),
            reason,
        }
    }

    /// The addressed slot of `doc` (which must be this address's document in JSON form).
    fn slot<'a>(&self, mut doc: &'a mut Value) -> Result<&'a mut Value, AddressError> {
        let mut walked = self.document.name().to_string();
        for seg in &self.path {
            doc = match seg {
                Segment::Key(k) => match doc {
                    Value::Object(map) => {
                        if !map.contains_key(k) {
                            let keys: Vec<&str> = map.keys().map(String::as_str).collect();
                            return Err(self.missing(format!(
                                "{walked} has no key \"{k}\" (keys there: {})",
                                keys.join(", ")
                            )));
                        }
                        map.get_mut(k).expect("checked")
                    }
                    other => {
                        return Err(self.missing(format!(
                            "{walked} is {}, so it has no key \"{k}\"",
                            describe(other)
                        )));
                    }
                },
                Segment::Index(n) => match doc {
                    Value::Array(list) => {
                        let len = list.len();
                        list.get_mut(*n).ok_or_else(|| {
                            self.missing(format!(
                                "{walked} has {len} entries, so there is no [{n}] (positions start at 0)"
                            ))
                        })?
                    }
                    other => {
                        return Err(
                            self.missing(format!("{walked} is {}, not a list", describe(other)))
                        );
                    }
                },
                Segment::Label(l) => match doc {
                    Value::Array(list) => {
                        let labels: Vec<String> = list
                            .iter()
                            .filter_map(|e| e.get("label").and_then(Value::as_str))
                            .map(str::to_string)
                            .collect();
                        let pos = list
                            .iter()
                            .position(|e| e.get("label").and_then(Value::as_str) == Some(l));
                        match pos {
                            Some(p) => &mut list[p],
                            None => {
                                return Err(self.missing(format!(
                                    "{walked} has no entry labelled \"{l}\" (labels there: {})",
                                    if labels.is_empty() {
                                        "none; use a position such as [0]".to_string()
                                    } else {
                                        labels.join(", ")
                                    }
                                )));
                            }
                        }
                    }
                    other => {
                        return Err(
                            self.missing(format!("{walked} is {}, not a list", describe(other)))
                        );
                    }
                },
            };
            walked.push_str(&match seg {
                Segment::Key(k) => format!(".{k}"),
                Segment::Index(n) => format!("[{n}]"),
                Segment::Label(l) => format!("[{l}]"),
            });
        }
        Ok(doc)
    }

    /// The number at this address in `doc` (the document in JSON form).
    pub fn get(&self, doc: &Value) -> Result<f64, AddressError> {
        let mut copy = doc.clone();
        let slot = self.slot(&mut copy)?;
        slot.as_f64().ok_or_else(|| AddressError::NotNumber {
            address: self.text.clone(),
            found: describe(slot),
        })
    }

    /// Sets the number at this address in `doc` (the slot must hold a number already).
    pub fn set(&self, doc: &mut Value, value: f64) -> Result<(), AddressError> {
        let address = self.text.clone();
        let slot = self.slot(doc)?;
        if !slot.is_number() {
            return Err(AddressError::NotNumber {
                address,
                found: describe(slot),
            });
        }
        *slot = serde_json::Number::from_f64(value)
            .map(Value::Number)
            .ok_or_else(|| AddressError::Rejected {
                address: address.clone(),
                value,
                document: self.document.name(),
                reason: "not a finite number".into(),
            })?;
        Ok(())
    }

    /// A copy of `spec` (the document `document` as its library type) with the addressed value
    /// set to `value`. The copy is not validated beyond reading back; the caller validates it as
    /// it would a file.
    pub fn apply<T: Serialize + DeserializeOwned>(
        &self,
        document: Document,
        spec: &T,
        value: f64,
    ) -> Result<T, AddressError> {
        if document != self.document {
            return Err(AddressError::WrongDocument {
                address: self.text.clone(),
                expected: self.document.name(),
                given: document.name(),
            });
        }
        let rejected = |reason: String| AddressError::Rejected {
            address: self.text.clone(),
            value,
            document: self.document.name(),
            reason,
        };
        let mut doc = serde_json::to_value(spec).map_err(|e| rejected(e.to_string()))?;
        self.set(&mut doc, value)?;
        serde_json::from_value(doc).map_err(|e| rejected(e.to_string()))
    }

    /// The number at this address in `spec` (the document as its library type).
    pub fn read<T: Serialize>(&self, document: Document, spec: &T) -> Result<f64, AddressError> {
        if document != self.document {
            return Err(AddressError::WrongDocument {
                address: self.text.clone(),
                expected: self.document.name(),
                given: document.name(),
            });
        }
        let doc = serde_json::to_value(spec).map_err(|e| AddressError::Rejected {
            address: self.text.clone(),
            value: f64::NAN,
            document: self.document.name(),
            reason: e.to_string(),
        })?;
        self.get(&doc)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn doc() -> Value {
        json!({
            "channels": [
                {"label": "X", "ip_ev": 13.8},
                {"label": "A", "ip_ev": 17.6}
            ],
            "couplings": [{"channels": ["X", "A"], "dipole_au": [0.0, 0.0, 1.8]}],
            "name": "demo"
        })
    }

    #[test]
    fn parses_keys_positions_and_labels() {
        let a: Address = "target.channels[A].ip_ev".parse().unwrap();
        assert_eq!(a.document, Document::Target);
        assert_eq!(
            a.path,
            vec![
                Segment::Key("channels".into()),
                Segment::Label("A".into()),
                Segment::Key("ip_ev".into())
            ]
        );
        let b: Address = "laser.colours[0].intensity_wcm2".parse().unwrap();
        assert_eq!(b.path[1], Segment::Index(0));
        assert_eq!(b.to_string(), "laser.colours[0].intensity_wcm2");
    }

    #[test]
    fn rejects_malformed_addresses_with_the_reason() {
        for bad in [
            "channels[0].ip_ev",
            "target",
            "target.",
            "target.channels[0",
            "target.channels[].ip_ev",
            "target.channels[0]ip_ev",
        ] {
            let e = bad.parse::<Address>().unwrap_err();
            assert!(matches!(e, AddressError::Syntax { .. }), "{bad}: {e}");
            assert!(e.to_string().contains(bad), "{e}");
        }
    }

    #[test]
    fn gets_and_sets_by_label_and_position() {
        let mut d = doc();
        let by_label: Address = "target.channels[A].ip_ev".parse().unwrap();
        let by_pos: Address = "target.channels[1].ip_ev".parse().unwrap();
        assert_eq!(by_label.get(&d).unwrap(), 17.6);
        by_label.set(&mut d, 18.0).unwrap();
        assert_eq!(by_pos.get(&d).unwrap(), 18.0);
        let z: Address = "target.couplings[0].dipole_au[2]".parse().unwrap();
        z.set(&mut d, -0.5).unwrap();
        assert_eq!(d["couplings"][0]["dipole_au"][2], json!(-0.5));
        // Nothing else moved.
        assert_eq!(d["channels"][0]["ip_ev"], json!(13.8));
    }

    #[test]
    fn never_creates_keys_and_says_what_exists() {
        let mut d = doc();
        let typo: Address = "target.channels[A].ip_eV".parse().unwrap();
        let e = typo.set(&mut d, 1.0).unwrap_err();
        assert!(e.to_string().contains("keys there: label, ip_ev"), "{e}");
        let label: Address = "target.channels[B].ip_ev".parse().unwrap();
        let e = label.get(&d).unwrap_err();
        assert!(e.to_string().contains("labels there: X, A"), "{e}");
        let range: Address = "target.channels[2].ip_ev".parse().unwrap();
        assert!(range.get(&d).unwrap_err().to_string().contains("2 entries"));
        let text: Address = "target.name".parse().unwrap();
        assert!(matches!(
            text.set(&mut d, 1.0).unwrap_err(),
            AddressError::NotNumber { .. }
        ));
        assert_eq!(d, doc());
    }

    #[test]
    fn applies_to_library_documents_and_refuses_the_wrong_one() {
        let laser = crate::laser::LaserSpec::monochromatic(1e14, 800.0);
        let a: Address = "laser.colours[0].intensity_wcm2".parse().unwrap();
        let changed = a.apply(Document::Laser, &laser, 2e14).unwrap();
        assert_eq!(changed.colours[0].intensity_wcm2, Some(2e14));
        assert_eq!(a.read(Document::Laser, &changed).unwrap(), 2e14);
        assert!(matches!(
            a.apply(Document::Target, &laser, 2e14).unwrap_err(),
            AddressError::WrongDocument { .. }
        ));
        let phase: Address = "laser.colours[0].phase_deg".parse().unwrap();
        assert_eq!(
            phase.apply(Document::Laser, &laser, 90.0).unwrap().colours[0].phase_deg,
            90.0
        );
    }
}
