//! The typed error of the scan layer: every message names the key, the value and the reason.

use crate::address::AddressError;

/// Why a scan could not be defined, run, recorded or merged.
#[derive(Debug, thiserror::Error)]
pub enum ScanError {
    /// A key of the scan definition holds a value it cannot take.
    #[error("scan definition, {key} = {value}: {reason}")]
    Invalid {
        /// The key (e.g. `axes[0].range.count`).
        key: String,
        /// The value as given.
        value: String,
        /// What is wrong with it.
        reason: String,
    },
    /// An axis address could not be parsed or applied.
    #[error("scan axis {axis}: {source}")]
    Address {
        /// Which axis (position and parameter).
        axis: String,
        /// The address error.
        #[source]
        source: AddressError,
    },
    /// A shard or point log could not be read.
    #[error("{file}: {reason}")]
    Record {
        /// The file (as the caller names it).
        file: String,
        /// What is wrong.
        reason: String,
    },
    /// Shards that do not belong together.
    #[error("shards do not combine: {0}")]
    Mismatch(String),
    /// Shards or points missing or given twice.
    #[error("shards incomplete: {0}")]
    Incomplete(String),
    /// An output could not be encoded.
    #[error("writing {what}: {reason}")]
    Encode {
        /// Which output.
        what: String,
        /// Why.
        reason: String,
    },
}

impl ScanError {
    /// An invalid value of a key.
    pub fn invalid(
        key: impl Into<String>,
        value: impl ToString,
        reason: impl Into<String>,
    ) -> Self {
        ScanError::Invalid {
            key: key.into(),
            value: value.to_string(),
            reason: reason.into(),
        }
    }
}
