//! The Levenberg–Marquardt step as an argmin [`Solver`]: argmin's [`Executor`] runs the loop,
//! calls the observers after every iteration and records why it stopped
//! ([`TerminationReason`]).
//!
//! One iteration (Levenberg, Q. Appl. Math. 2, 164 (1944); Marquardt, J. SIAM 11, 431 (1963);
//! the damping update of Nielsen, IMM-REP-1999-05, and the diagonal scaling of Moré, Lecture
//! Notes in Mathematics 630, 105 (1978)):
//!
//! 1. the Jacobian `J` at the current point by finite differences ([`super::problem::jacobian`]),
//!    the gradient `g = Jᵀr` and `A = JᵀJ`;
//! 2. parameters on a bound whose descent direction `−g_j` points out of the box are held for
//!    this iteration (the active set of the projected method);
//! 3. the step solves `(A + λ D²) δ = −g` over the other parameters, `D² = diag(A)` kept at its
//!    running maximum; the trial point is projected onto the box (periodic values wrapped);
//! 4. the gain ratio `ρ = (χ² − χ²_trial) / (−2sᵀg − sᵀAs)` of the actual step `s` decides:
//!    accept and shrink λ by `max(1/3, 1 − (2ρ − 1)³)`, or reject and grow λ by ν (doubling ν).
//!
//! It stops (converged) when an accepted step changes χ² by less than `ftol·χ²` with a predicted
//! change as small, when no parameter moves by more than `xtol` of its magnitude, or when the
//! gradient is orthogonal to the residuals to `gtol` (`max_j |g_j| / (‖J_j‖ ‖r‖)`); it stops
//! (not converged) when λ grows past 1e20 without an accepted step and the gradient test fails,
//! or when the iteration limit is reached. With forward differences, the first time no step is
//! accepted the solver switches to central differences instead of stopping.

use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};

use argmin::core::{
    Error as ArgminError, IterState, KV, KvValue, Problem, Solver, State, TerminationReason,
    TerminationStatus,
};
use nalgebra::{DMatrix, DVector};

use super::FitError;
use super::parameters::FreeParameter;
use super::problem::{Differences, Residuals, chi2, jacobian};

/// The argmin state used by the solver: parameters `Vec<f64>`, gradient `Vec<f64>`, Jacobian
/// `DMatrix<f64>`, residuals `Vec<f64>`, cost χ².
pub type LmState = IterState<Vec<f64>, Vec<f64>, DMatrix<f64>, (), Vec<f64>, f64>;

/// A least-squares problem with its free parameters, as argmin's problem type.
pub struct BoundedProblem<'a, R: Residuals + ?Sized> {
    /// The residuals.
    pub residuals: &'a R,
    /// The free parameters (bounds, periods, start values).
    pub params: &'a [FreeParameter],
    /// Jacobian differences.
    pub differences: Differences,
}

/// Tolerances and limits of the solver.
#[derive(Clone, Copy, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LmSettings {
    /// Relative change of χ² below which an accepted step ends the fit.
    pub ftol: f64,
    /// Relative parameter change below which an accepted step ends the fit.
    pub xtol: f64,
    /// Gradient–residual cosine below which the fit ends.
    pub gtol: f64,
    /// Largest number of iterations (each one Jacobian).
    pub max_iterations: u64,
    /// Initial damping λ (relative to the diagonal of JᵀJ).
    pub initial_lambda: f64,
    /// Jacobian differences.
    pub differences: Differences,
}

impl Default for LmSettings {
    fn default() -> Self {
        LmSettings {
            ftol: 1e-14,
            xtol: 1e-11,
            gtol: 1e-12,
            max_iterations: 500,
            initial_lambda: 1e-3,
            differences: Differences::Central,
        }
    }
}

/// The solver's own state between iterations.
pub struct LevenbergMarquardt {
    settings: LmSettings,
    lambda: f64,
    nu: f64,
    scale: Vec<f64>,
    residuals: Vec<f64>,
    chi2: f64,
    /// Residual evaluations so far (including those of the Jacobians).
    pub evaluations: usize,
    done: Option<TerminationReason>,
    stop: Option<Arc<AtomicBool>>,
    /// Set once forward differences were replaced by central ones (see `next_iter`).
    central_from_now: bool,
}

impl LevenbergMarquardt {
    /// A solver with these settings; `stop`, when set, ends the run at the next iteration
    /// (reported as [`TerminationReason::Interrupt`]).
    pub fn new(settings: LmSettings, stop: Option<Arc<AtomicBool>>) -> Self {
        LevenbergMarquardt {
            settings,
            lambda: settings.initial_lambda,
            nu: 2.0,
            scale: Vec::new(),
            residuals: Vec::new(),
            chi2: f64::INFINITY,
            evaluations: 0,
            done: None,
            stop,
            central_from_now: false,
        }
    }

    /// The residuals at the current point.
    pub fn residuals(&self) -> &[f64] {
        &self.residuals
    }
}

fn to_argmin(e: FitError) -> ArgminError {
    ArgminError::new(e)
}

impl<R: Residuals + ?Sized> Solver<BoundedProblem<'_, R>, LmState> for LevenbergMarquardt {
    fn name(&self) -> &str {
        "Levenberg-Marquardt (projected, finite-difference Jacobian)"
    }

    fn init(
        &mut self,
        problem: &mut Problem<BoundedProblem<'_, R>>,
        mut state: LmState,
    ) -> Result<(LmState, Option<KV>), ArgminError> {
        let Some(p) = problem.problem.as_ref() else {
            return Err(to_argmin(FitError::Setup("no problem".into())));
        };
        let x0: Vec<f64> = match state.take_param() {
            Some(x) => x,
            None => p.params.iter().map(|q| q.start).collect(),
        };
        let x0: Vec<f64> = x0
            .iter()
            .zip(p.params)
            .map(|(x, q)| q.project(*x))
            .collect();
        let r = p.residuals.residuals(&x0).map_err(|e| {
            to_argmin(FitError::Model(format!(
                "the model cannot be evaluated at the start point: {e}"
            )))
        })?;
        if r.iter().any(|v| !v.is_finite()) {
            return Err(to_argmin(FitError::Model(
                "a residual at the start point is not a finite number".into(),
            )));
        }
        self.evaluations += 1;
        self.chi2 = chi2(&r);
        self.residuals = r;
        self.scale = vec![0.0; x0.len()];
        Ok((state.param(x0).cost(self.chi2), None))
    }

    fn next_iter(
        &mut self,
        problem: &mut Problem<BoundedProblem<'_, R>>,
        state: LmState,
    ) -> Result<(LmState, Option<KV>), ArgminError> {
        let Some(p) = problem.problem.as_ref() else {
            return Err(to_argmin(FitError::Setup("no problem".into())));
        };
        let s = &self.settings;
        let x = state
            .get_param()
            .cloned()
            .ok_or_else(|| to_argmin(FitError::Setup("no parameters in the state".into())))?;
        let n = x.len();
        let differences = if self.central_from_now {
            Differences::Central
        } else {
            p.differences
        };
        let (jac, used) =
            jacobian(p.residuals, p.params, &x, &self.residuals, differences).map_err(to_argmin)?;
        self.evaluations += used;
        let r = DVector::from_column_slice(&self.residuals);
        let g = jac.tr_mul(&r);
        let a = jac.tr_mul(&jac);
        // Active set: held parameters sit on a bound with the descent direction outwards.
        let free: Vec<usize> = (0..n)
            .filter(|&j| match p.params[j].at_bound(x[j]) {
                Some(super::parameters::Side::Lower) => g[j] <= 0.0,
                Some(super::parameters::Side::Upper) => g[j] >= 0.0,
                None => true,
            })
            .collect();
        for j in 0..n {
            self.scale[j] = self.scale[j].max(a[(j, j)].sqrt());
        }
        let norm_r = self.chi2.sqrt();
        let cosine = free
            .iter()
            .map(|&j| {
                let d = a[(j, j)].sqrt();
                if d > 0.0 && norm_r > 0.0 {
                    g[j].abs() / (d * norm_r)
                } else {
                    0.0
                }
            })
            .fold(0.0, f64::max);
        let mut kv = KV::new();
        kv.insert("evaluations", KvValue::Uint(self.evaluations as u64));
        if self.chi2 == 0.0 || cosine <= s.gtol || free.is_empty() {
            self.done = Some(TerminationReason::SolverConverged);
            kv.insert("stop", KvValue::Str("gradient".into()));
            return Ok((
                state
                    .param(x)
                    .cost(self.chi2)
                    .jacobian(jac)
                    .gradient(g.as_slice().to_vec()),
                Some(kv),
            ));
        }
        let k = free.len();
        let gf = DVector::from_iterator(k, free.iter().map(|&j| g[j]));
        let af = DMatrix::from_fn(k, k, |i, l| a[(free[i], free[l])]);
        let mut next = None;
        while self.lambda <= 1e20 {
            let mut m = af.clone();
            for i in 0..k {
                let d = self.scale[free[i]].max(f64::MIN_POSITIVE.sqrt());
                m[(i, i)] += self.lambda * d * d;
            }
            let Some(chol) = m.cholesky() else {
                self.lambda *= self.nu;
                self.nu *= 2.0;
                continue;
            };
            let delta = chol.solve(&(-&gf));
            let mut trial = x.clone();
            for (i, &j) in free.iter().enumerate() {
                trial[j] = p.params[j].project(x[j] + delta[i]);
            }
            let step =
                DVector::from_iterator(n, (0..n).map(|j| p.params[j].difference(trial[j], x[j])));
            let predicted = -(2.0 * step.dot(&g) + (&a * &step).dot(&step));
            self.evaluations += 1;
            let outcome = p
                .residuals
                .residuals(&trial)
                .ok()
                .filter(|rt| rt.iter().all(|v| v.is_finite()));
            let accepted = match outcome {
                Some(rt) => {
                    let c = chi2(&rt);
                    let actual = self.chi2 - c;
                    let rho = if predicted > 0.0 {
                        actual / predicted
                    } else {
                        -1.0
                    };
                    (rho > 1e-4).then_some((rt, c, actual, predicted, rho, step))
                }
                None => None,
            };
            match accepted {
                Some((rt, c, actual, predicted, rho, step)) => {
                    self.lambda *= (1.0 - (2.0 * rho - 1.0).powi(3)).max(1.0 / 3.0);
                    self.nu = 2.0;
                    let small_change = actual <= s.ftol * c && predicted <= s.ftol * c;
                    let small_step = (0..n).all(|j| {
                        let scale = trial[j].abs().max(super::problem::STEP_FLOOR);
                        step[j].abs() <= s.xtol * scale
                    });
                    if small_change || small_step {
                        self.done = Some(TerminationReason::SolverConverged);
                        kv.insert(
                            "stop",
                            KvValue::Str(if small_change { "chi2" } else { "step" }.into()),
                        );
                    }
                    self.residuals = rt;
                    self.chi2 = c;
                    next = Some(trial);
                    break;
                }
                None => {
                    self.lambda *= self.nu;
                    self.nu *= 2.0;
                }
            }
        }
        kv.insert("lambda", KvValue::Float(self.lambda));
        kv.insert("evaluations", KvValue::Uint(self.evaluations as u64));
        let gradient = g.as_slice().to_vec();
        match next {
            Some(t) => Ok((
                state
                    .param(t)
                    .cost(self.chi2)
                    .jacobian(jac)
                    .gradient(gradient),
                Some(kv),
            )),
            None if differences == Differences::Forward => {
                // No step reduces χ² along a forward-difference Jacobian, whose O(h) error
                // limits how far down the gradient can be followed: go on with central
                // differences from here (the common remedy; Nocedal and Wright §8.1).
                self.central_from_now = true;
                self.lambda = self.settings.initial_lambda;
                self.nu = 2.0;
                kv.insert("switch", KvValue::Str("central differences".into()));
                Ok((
                    state
                        .param(x)
                        .cost(self.chi2)
                        .jacobian(jac)
                        .gradient(gradient),
                    Some(kv),
                ))
            }
            None => {
                // No step reduces χ²: at a minimum to the precision of the residuals, or stuck.
                self.done = Some(if cosine <= 1e-6 {
                    TerminationReason::SolverConverged
                } else {
                    TerminationReason::SolverExit(format!(
                        "no step reduces chi2 (damping above 1e20) while the gradient cosine is \
                         {cosine:.2e}"
                    ))
                });
                Ok((
                    state
                        .param(x)
                        .cost(self.chi2)
                        .jacobian(jac)
                        .gradient(gradient),
                    Some(kv),
                ))
            }
        }
    }

    fn terminate(&mut self, _state: &LmState) -> TerminationStatus {
        if let Some(stop) = &self.stop {
            if stop.load(Ordering::SeqCst) {
                return TerminationStatus::Terminated(TerminationReason::Interrupt);
            }
        }
        match &self.done {
            Some(r) => TerminationStatus::Terminated(r.clone()),
            None => TerminationStatus::NotTerminated,
        }
    }
}
