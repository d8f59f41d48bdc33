//! Nonlinear least-squares fitting: the generic fitter (problem, Levenberg–Marquardt solver on
//! argmin's executor, uncertainties, profile likelihood, multi-start) and, on top of it, the fit
//! of model spectra to measured ones.
//!
//! The generic part knows nothing of physics: a [`Residuals`] implementation gives `r(θ)`, the
//! free parameters carry start, bounds and the periodic flag, and [`minimise`] returns the end
//! point with argmin's termination reason. [`uncertainty::analyse`] turns the Jacobian at the
//! optimum into standard errors, correlations and flags for parameters the data do not
//! determine. It is checked against the NIST Statistical Reference Datasets for nonlinear
//! regression (tests/nist_strd.rs).

pub mod halton;
pub mod levenberg;
pub mod lines;
pub mod measured;
pub mod minimise;
pub mod model;
pub mod multistart;
pub mod objective;
pub mod outcome;
pub mod parameters;
pub mod problem;
pub mod profile;
pub mod spec;
pub mod synthetic;
pub mod uncertainty;

pub use levenberg::{LevenbergMarquardt, LmSettings};
pub use minimise::{IterationReport, Minimum, Observer, Termination, minimise};
pub use parameters::FreeParameter;
pub use problem::{Differences, Residuals};

/// Errors of the fitter.
#[derive(Debug, thiserror::Error, Clone, PartialEq)]
pub enum FitError {
    /// A free parameter is unusable (start, bounds, name).
    #[error("parameter {name}: {reason}")]
    Parameter {
        /// Its name.
        name: String,
        /// Why.
        reason: String,
    },
    /// The problem is set up inconsistently.
    #[error("{0}")]
    Setup(String),
    /// The model could not be evaluated.
    #[error("{0}")]
    Model(String),
    /// Input data are unusable (the message names file, row or key).
    #[error("{0}")]
    Data(String),
}
