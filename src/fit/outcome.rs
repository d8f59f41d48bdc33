//! A complete fit: multi-start minimisation, the uncertainty analysis at the best minimum, the
//! distinct minima and optional profile intervals, as one result type that every writer reads.

use std::sync::Arc;
use std::sync::atomic::AtomicBool;

use serde::Serialize;

use super::FitError;
use super::levenberg::LmSettings;
use super::minimise::{Minimum, Observer};
use super::multistart;
use super::parameters::FreeParameter;
use super::problem::Residuals;
use super::profile::{Interval, interval};
use super::uncertainty::{NoiseScale, Uncertainties, analyse};

/// Settings of a complete fit.
#[derive(Clone, Debug)]
pub struct RunSettings {
    /// Solver settings.
    pub lm: LmSettings,
    /// Number of starts (≥ 1).
    pub starts: usize,
    /// Minima within this Δχ² of the best are reported.
    pub minima_delta_chi2: f64,
    /// Indices of parameters that get profile intervals.
    pub profile: Vec<usize>,
    /// Relative eigenvalue threshold for undetermined directions.
    pub rcond: f64,
}

/// One parameter of the result (the keys scripts read).
#[derive(Clone, Debug, Serialize)]
pub struct ParameterResult {
    /// Name (address or nuisance name).
    pub name: String,
    /// Best value.
    pub value: f64,
    /// Standard error (null when undetermined).
    pub std_error: Option<f64>,
    /// Start value.
    pub initial: f64,
    /// Lower bound (null: none).
    pub lower: Option<f64>,
    /// Upper bound (null: none).
    pub upper: Option<f64>,
    /// Whether the data determine it.
    pub determined: bool,
    /// Why not, when undetermined.
    pub note: Option<String>,
    /// Periodic.
    pub periodic: bool,
    /// Profile-likelihood interval, when asked for.
    pub profile: Option<Interval>,
}

/// A distinct minimum.
#[derive(Clone, Debug, Serialize)]
pub struct MinimumResult {
    /// χ² there.
    pub chi2: f64,
    /// Parameter values in parameter order.
    pub parameters: Vec<f64>,
    /// The start it came from (0: the given start).
    pub start: usize,
}

/// One start.
#[derive(Clone, Debug, Serialize)]
pub struct StartResult {
    /// Start values.
    pub from: Vec<f64>,
    /// χ² at the end (null if the start failed).
    pub chi2: Option<f64>,
    /// Termination text or the error.
    pub termination: String,
    /// Residual evaluations.
    pub evaluations: usize,
}

/// The result of a complete fit.
#[derive(Clone, Debug, Serialize)]
pub struct FitOutcome {
    /// Parameters.
    pub parameters: Vec<ParameterResult>,
    /// χ² at the best minimum.
    pub chi2: f64,
    /// χ²/ν.
    pub reduced_chi2: f64,
    /// ν = residuals − free − profiled parameters.
    pub dof: i64,
    /// Correlation matrix in parameter order (null for undetermined parameters).
    pub correlation: Vec<Vec<Option<f64>>>,
    /// Whether the best start converged.
    pub converged: bool,
    /// Why the best start stopped (argmin's termination reason).
    pub termination: String,
    /// Whether the run was interrupted (the result is the best so far).
    pub interrupted: bool,
    /// Residual evaluations over all starts, the analysis and the profiles.
    pub evaluations: usize,
    /// Distinct minima within the Δχ² of the best, best first.
    pub minima: Vec<MinimumResult>,
    /// Δχ² used for `minima`.
    pub minima_delta_chi2: f64,
    /// Every start.
    pub starts: Vec<StartResult>,
    /// Smallest/largest eigenvalue of the correlation-scaled JᵀJ.
    pub eigenvalue_ratio: f64,
    /// s² used in the covariance.
    pub s2: f64,
}

fn bound(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

/// Runs the fit. Returns the result and the best minimum (with its residuals).
#[allow(clippy::too_many_arguments)]
pub fn run<R: Residuals + ?Sized>(
    problem: &R,
    params: &[FreeParameter],
    profiled: usize,
    settings: &RunSettings,
    observer: Option<Observer>,
    on_start: &dyn Fn(usize),
    stop: Option<Arc<AtomicBool>>,
) -> Result<(FitOutcome, Minimum), FitError> {
    let starts = multistart::run(
        problem,
        params,
        settings.starts,
        &settings.lm,
        observer,
        on_start,
        stop,
    );
    let mut evaluations = 0;
    let mut start_results = Vec::new();
    let mut ok: Vec<(usize, &Minimum)> = Vec::new();
    let mut first_error = None;
    for (k, (from, m)) in starts.runs.iter().enumerate() {
        match m {
            Ok(m) => {
                evaluations += m.evaluations;
                start_results.push(StartResult {
                    from: from.clone(),
                    chi2: Some(m.chi2),
                    termination: m.termination.reason.clone(),
                    evaluations: m.evaluations,
                });
                ok.push((k, m));
            }
            Err(e) => {
                start_results.push(StartResult {
                    from: from.clone(),
                    chi2: None,
                    termination: format!("failed: {e}"),
                    evaluations: 0,
                });
                first_error.get_or_insert_with(|| e.clone());
            }
        }
    }
    let Some(&(_, best)) = ok.iter().min_by(|a, b| a.1.chi2.total_cmp(&b.1.chi2)) else {
        return Err(first_error.unwrap_or_else(|| FitError::Setup("no start was run".into())));
    };
    let u: Uncertainties = analyse(
        problem,
        params,
        &best.theta,
        &best.residuals,
        profiled,
        settings.lm.differences,
        NoiseScale::FromResiduals,
        settings.rcond,
    )?;
    evaluations += u.evaluations;
    let minima_refs: Vec<&Minimum> = ok.iter().map(|(_, m)| *m).collect();
    let distinct = multistart::distinct(
        params,
        &minima_refs,
        &u.std_errors,
        settings.minima_delta_chi2,
    );
    let minima = distinct
        .iter()
        .map(|m| MinimumResult {
            chi2: m.chi2,
            parameters: m.theta.clone(),
            start: ok
                .iter()
                .find(|(_, o)| std::ptr::eq(*o, *m))
                .map(|(k, _)| *k)
                .unwrap_or(0),
        })
        .collect();
    let interrupted = best.termination.interrupted || starts.runs.len() < settings.starts.max(1);
    let mut parameters: Vec<ParameterResult> = params
        .iter()
        .enumerate()
        .map(|(j, p)| ParameterResult {
            name: p.name.clone(),
            value: best.theta[j],
            std_error: u.std_errors[j],
            initial: p.start,
            lower: bound(p.lower),
            upper: bound(p.upper),
            determined: u.determined[j],
            note: u.notes[j].clone(),
            periodic: p.periodic,
            profile: None,
        })
        .collect();
    if !interrupted {
        for &k in &settings.profile {
            let Some(sigma) = u.std_errors.get(k).copied().flatten() else {
                continue;
            };
            let iv = interval(
                problem,
                params,
                &best.theta,
                best.chi2,
                k,
                sigma,
                u.s2,
                &settings.lm,
            )?;
            parameters[k].profile = Some(iv);
        }
    }
    Ok((
        FitOutcome {
            parameters,
            chi2: best.chi2,
            reduced_chi2: if u.dof > 0 {
                best.chi2 / u.dof as f64
            } else {
                f64::NAN
            },
            dof: u.dof,
            correlation: u.correlation.clone(),
            converged: best.termination.converged,
            termination: best.termination.reason.clone(),
            interrupted,
            evaluations,
            minima,
            minima_delta_chi2: settings.minima_delta_chi2,
            starts: start_results,
            eigenvalue_ratio: u.eigenvalue_ratio,
            s2: u.s2,
        },
        best.clone(),
    ))
}
