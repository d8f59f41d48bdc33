//! Typed errors of the library.
//!
//! Every message names the parameter, the offending value and the reason, so that the binary
//! can show it to a user unchanged (prefixed by the file and key it came from).

use thiserror::Error;

/// Errors raised by the physics core.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum Error {
    /// A parameter has a value the model cannot use.
    #[error("{name} = {value}: {reason}")]
    InvalidParameter {
        /// Name of the parameter (a file key or an option, as the user wrote it where known).
        name: String,
        /// The offending value, formatted.
        value: String,
        /// Why the value is rejected.
        reason: String,
    },
    /// A combination of otherwise valid parameters is inconsistent.
    #[error("{0}")]
    Inconsistent(String),
    /// A numerical procedure could not deliver a result (reported, never hidden).
    #[error("{0}")]
    Numerical(String),
    /// A computation would exceed an explicit bound on its work (see
    /// [`crate::orbits::budget`]); the estimate is made before the work starts.
    #[error("{task}: estimated {estimated:.3e} {unit}, above the limit of {limit:.3e} ({reason})")]
    WorkLimit {
        /// What would have been computed.
        task: String,
        /// Estimated amount of work.
        estimated: f64,
        /// The limit it exceeds.
        limit: f64,
        /// Unit of both numbers (e.g. "continuation steps").
        unit: String,
        /// Where the work comes from and what would reduce it.
        reason: String,
    },
}

impl Error {
    /// Shorthand for [`Error::InvalidParameter`].
    pub fn invalid(name: &str, value: impl std::fmt::Display, reason: &str) -> Self {
        Error::InvalidParameter {
            name: name.to_string(),
            value: value.to_string(),
            reason: reason.to_string(),
        }
    }
}

/// Result alias used across the library.
pub type Result<T, E = Error> = std::result::Result<T, E>;

/// Rejects non-finite or non-positive values of a named parameter.
pub fn require_positive(name: &str, value: f64) -> Result<f64> {
    if !value.is_finite() {
        return Err(Error::invalid(name, value, "must be a finite number"));
    }
    if value <= 0.0 {
        return Err(Error::invalid(name, value, "must be positive"));
    }
    Ok(value)
}

/// Rejects non-finite values of a named parameter.
pub fn require_finite(name: &str, value: f64) -> Result<f64> {
    if !value.is_finite() {
        return Err(Error::invalid(name, value, "must be a finite number"));
    }
    Ok(value)
}
