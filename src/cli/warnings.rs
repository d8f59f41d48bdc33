//! Warnings of a run: collected from the library's rules ([`holecast::validity`]) and the
//! run's own findings, printed on standard error and written into every JSON output.

use serde_json::Value;

use holecast::validity::{Warning, WarningKind};

/// The warnings of one run, in the order they were found (duplicates dropped).
#[derive(Clone, Debug, Default)]
pub struct Warnings {
    list: Vec<Warning>,
}

impl Warnings {
    /// Adds warnings.
    pub fn extend(&mut self, more: impl IntoIterator<Item = Warning>) {
        for w in more {
            if !self.list.contains(&w) {
                self.list.push(w);
            }
        }
    }

    /// Adds one warning.
    pub fn push(
        &mut self,
        kind: WarningKind,
        message: impl Into<String>,
        advice: impl Into<String>,
    ) {
        self.extend([Warning::new(kind, message, advice)]);
    }

    /// The JSON list (`[{code, message, advice}]`).
    pub fn json(&self) -> Value {
        serde_json::to_value(&self.list).unwrap_or(Value::Array(Vec::new()))
    }

    /// Prints every warning on standard error.
    pub fn print(&self) {
        for w in &self.list {
            let code = serde_json::to_value(w.code)
                .ok()
                .and_then(|v| v.as_str().map(str::to_string))
                .unwrap_or_default();
            eprintln!("warning [{code}]: {w}");
        }
    }
}
