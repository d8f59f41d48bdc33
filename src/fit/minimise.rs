//! One least-squares fit from one start: argmin's executor driving [`LevenbergMarquardt`], with
//! an observer that reports every iteration.

use std::sync::Arc;
use std::sync::atomic::AtomicBool;

use argmin::core::observers::{Observe, ObserverMode};
use argmin::core::{
    Error as ArgminError, Executor, KV, State, TerminationReason, TerminationStatus,
};
use serde::Serialize;

use super::FitError;
use super::levenberg::{BoundedProblem, LevenbergMarquardt, LmSettings, LmState};
use super::parameters::{FreeParameter, validate_all};
use super::problem::Residuals;

/// What an observer sees after every iteration.
#[derive(Clone, Copy, Debug)]
pub struct IterationReport {
    /// Iteration number (from 0).
    pub iteration: u64,
    /// χ² at the current point.
    pub chi2: f64,
    /// Residual evaluations so far in this fit.
    pub evaluations: u64,
}

/// A callback for iteration reports (progress bars, logs).
pub type Observer = Arc<dyn Fn(IterationReport) + Send + Sync>;

struct Forward(Observer);

impl Observe<LmState> for Forward {
    fn observe_iter(&mut self, state: &LmState, kv: &KV) -> Result<(), ArgminError> {
        let evaluations = kv
            .get("evaluations")
            .and_then(|v| v.get_uint())
            .unwrap_or(0);
        (self.0)(IterationReport {
            iteration: state.get_iter(),
            chi2: state.get_cost(),
            evaluations,
        });
        Ok(())
    }
}

/// How a fit ended.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Termination {
    /// Whether the solver reports convergence.
    pub converged: bool,
    /// Interrupted by the user (the point is the best so far).
    pub interrupted: bool,
    /// argmin's termination text.
    pub reason: String,
}

impl Termination {
    fn from_status(status: &TerminationStatus) -> Self {
        match status {
            TerminationStatus::Terminated(r) => Termination {
                converged: matches!(r, TerminationReason::SolverConverged),
                interrupted: matches!(r, TerminationReason::Interrupt),
                reason: match r {
                    TerminationReason::SolverExit(s) => s.clone(),
                    r => r.text().to_string(),
                },
            },
            TerminationStatus::NotTerminated => Termination {
                converged: false,
                interrupted: false,
                reason: "not terminated".into(),
            },
        }
    }
}

/// The end point of one fit.
#[derive(Clone, Debug)]
pub struct Minimum {
    /// Parameter values.
    pub theta: Vec<f64>,
    /// χ² there.
    pub chi2: f64,
    /// Residuals there.
    pub residuals: Vec<f64>,
    /// Iterations.
    pub iterations: u64,
    /// Residual evaluations (Jacobians included).
    pub evaluations: usize,
    /// How it ended.
    pub termination: Termination,
}

/// Fits from `start` (the parameters' start values when `None`). Errors: invalid parameters,
/// a residual vector of the wrong length, a model that cannot be evaluated at the start.
pub fn minimise<R: Residuals + ?Sized>(
    residuals: &R,
    params: &[FreeParameter],
    start: Option<&[f64]>,
    settings: &LmSettings,
    observer: Option<Observer>,
    stop: Option<Arc<AtomicBool>>,
) -> Result<Minimum, FitError> {
    validate_all(params)?;
    if residuals.len() < params.len() {
        return Err(FitError::Setup(format!(
            "{} residuals for {} free parameters: the problem is underdetermined",
            residuals.len(),
            params.len()
        )));
    }
    let problem = BoundedProblem {
        residuals,
        params,
        differences: settings.differences,
    };
    let solver = LevenbergMarquardt::new(*settings, stop);
    let x0: Vec<f64> = match start {
        Some(s) => s.to_vec(),
        None => params.iter().map(|p| p.start).collect(),
    };
    let mut exec = Executor::new(problem, solver)
        .configure(|s| s.param(x0).max_iters(settings.max_iterations));
    if let Some(obs) = observer {
        exec = exec.add_observer(Forward(obs), ObserverMode::Always);
    }
    let result = exec.run().map_err(|e| match e.downcast::<FitError>() {
        Ok(f) => f,
        Err(e) => FitError::Model(e.to_string()),
    })?;
    let state = result.state();
    let solver = result.solver();
    let theta = state
        .get_best_param()
        .or(state.get_param())
        .cloned()
        .ok_or_else(|| FitError::Setup("the solver returned no parameters".into()))?;
    // The solver's residuals belong to its current point, which is the best one (it only
    // accepts steps that lower χ²).
    Ok(Minimum {
        theta,
        chi2: state.get_best_cost(),
        residuals: solver.residuals().to_vec(),
        iterations: state.get_iter(),
        evaluations: solver.evaluations,
        termination: Termination::from_status(&state.termination_status),
    })
}
