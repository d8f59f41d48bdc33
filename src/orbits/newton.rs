//! Newton's method for the two complex saddle-point equations.
//!
//! The problem is [`evaluate`](super::equations::evaluate) (residuals and analytic Jacobian);
//! this file owns one solve: iterate `t ← t − J⁻¹ f` with a limited step until the relative
//! residual is below the tolerance. Non-convergence is a value in the result, never a panic.

use num_complex::Complex64;

use super::equations::{ChannelPair, SaddleEval, evaluate};
use crate::cmath::modulus;
use crate::field::Field;

/// How a Newton solve ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Termination {
    /// The relative residual fell below the tolerance.
    Converged,
    /// The iteration limit was reached first.
    IterationLimit,
    /// The Jacobian was singular (the saddles coalesce here).
    SingularJacobian,
    /// A non-finite number appeared.
    NonFinite,
}

/// Tolerances of one Newton solve.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct NewtonSettings {
    /// Converged when `max(|f₁|, |f₂|) ≤ tolerance · energy_scale`.
    pub tolerance: f64,
    /// Iteration limit.
    pub max_iterations: u32,
    /// Energy scale of the residual (a.u.), e.g. `Up + Ip`.
    pub energy_scale: f64,
    /// Largest change of either time in one iteration (a.u.).
    pub max_step: f64,
}

/// Result of one Newton solve.
#[derive(Clone, Copy, Debug)]
pub struct NewtonOutcome {
    /// Return time reached.
    pub t_ret: Complex64,
    /// Ionization time reached.
    pub t_ion: Complex64,
    /// Everything evaluated at the final point.
    pub eval: SaddleEval,
    /// Iterations used.
    pub iterations: u32,
    /// Final relative residual `max(|f₁|, |f₂|)/energy_scale`.
    pub residual: f64,
    /// Why the iteration stopped.
    pub termination: Termination,
}

impl NewtonOutcome {
    /// Whether the solve converged.
    pub fn converged(&self) -> bool {
        self.termination == Termination::Converged
    }
}

/// Relative residual of an evaluation.
pub fn relative_residual(eval: &SaddleEval, scale: f64) -> f64 {
    modulus(eval.residual[0]).max(modulus(eval.residual[1])) / scale
}

/// Solves the saddle equations from the starting point `(t_ret, t_ion)`.
pub fn solve(
    field: &Field,
    pair: ChannelPair,
    omega: f64,
    mut t_ret: Complex64,
    mut t_ion: Complex64,
    settings: &NewtonSettings,
) -> NewtonOutcome {
    let mut eval = evaluate(field, pair, omega, t_ret, t_ion);
    let mut residual = relative_residual(&eval, settings.energy_scale);
    let mut iterations = 0;
    let termination = loop {
        if !residual.is_finite() {
            break Termination::NonFinite;
        }
        if residual <= settings.tolerance {
            break Termination::Converged;
        }
        if iterations >= settings.max_iterations {
            break Termination::IterationLimit;
        }
        let [[a, b], [c, d]] = eval.jacobian();
        let det = a * d - b * c;
        if modulus(det) == 0.0 || !det.is_finite() {
            break Termination::SingularJacobian;
        }
        let [f1, f2] = eval.residual;
        let mut d_ret = (d * f1 - b * f2) / det;
        let mut d_ion = (a * f2 - c * f1) / det;
        let largest = modulus(d_ret).max(modulus(d_ion));
        if largest > settings.max_step {
            let s = settings.max_step / largest;
            d_ret *= s;
            d_ion *= s;
        }
        t_ret -= d_ret;
        t_ion -= d_ion;
        iterations += 1;
        eval = evaluate(field, pair, omega, t_ret, t_ion);
        residual = relative_residual(&eval, settings.energy_scale);
    };
    NewtonOutcome {
        t_ret,
        t_ion,
        eval,
        iterations,
        residual,
        termination,
    }
}
