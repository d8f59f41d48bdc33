//! The least-squares problem: residuals of a parameter vector, and their Jacobian by finite
//! differences in parallel over the parameters.
//!
//! The cost is `χ² = Σ_i r_i(θ)²`; a weighted problem divides its residuals by the standard
//! deviations itself. The Jacobian column of parameter `j` is a central difference
//! `(r(θ + h e_j) − r(θ − h e_j)) / 2h` with `h = ε^{1/3} max(|θ_j|, |θ_j⁰|, h_min)` (the step
//! that balances truncation against rounding for a central difference: Nocedal and Wright,
//! *Numerical Optimization*, 2nd ed., §8.1), or a forward difference with `h = ε^{1/2}·…`.
//! A step that would leave the box is taken on the other side only (a one-sided difference).
//! Columns are computed in parallel (rayon) and assembled in parameter order, so the result does
//! not depend on the number of threads.

use nalgebra::DMatrix;
use rayon::prelude::*;

use super::FitError;
use super::parameters::FreeParameter;

/// Residuals `r(θ)` of a least-squares problem (already divided by their uncertainties).
pub trait Residuals: Sync {
    /// Number of residuals.
    fn len(&self) -> usize;
    /// Whether there are no residuals.
    fn is_empty(&self) -> bool {
        self.len() == 0
    }
    /// The residual vector at `theta`. A model that cannot be evaluated there returns an error;
    /// the solver treats such a point as a rejected step.
    fn residuals(&self, theta: &[f64]) -> Result<Vec<f64>, FitError>;
}

/// How the Jacobian columns are differenced.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Differences {
    /// Central differences (two evaluations per parameter; error O(h²)).
    Central,
    /// Forward differences (one evaluation per parameter; error O(h)).
    Forward,
}

/// The smallest magnitude a parameter's step is scaled by (for a parameter at zero whose start
/// is zero too).
pub const STEP_FLOOR: f64 = 1e-8;

/// The finite-difference step of parameter `p` at `x`.
pub fn step(p: &FreeParameter, x: f64, differences: Differences) -> f64 {
    let rel = match differences {
        Differences::Central => f64::EPSILON.cbrt(),
        Differences::Forward => f64::EPSILON.sqrt(),
    };
    let mut scale = x.abs().max(p.start.abs()).max(STEP_FLOOR);
    if let Some(period) = p.period() {
        scale = scale.max(1e-6 * period);
    }
    rel * scale
}

/// The Jacobian `∂r_i/∂θ_j` at `theta` (whose residuals `r0` are given), computed column by
/// column in parallel. Returns the matrix and the number of residual evaluations it took.
pub fn jacobian<R: Residuals + ?Sized>(
    problem: &R,
    params: &[FreeParameter],
    theta: &[f64],
    r0: &[f64],
    differences: Differences,
) -> Result<(DMatrix<f64>, usize), FitError> {
    let m = r0.len();
    let columns: Vec<Result<(Vec<f64>, usize), FitError>> = (0..params.len())
        .into_par_iter()
        .map(|j| column(problem, params, theta, r0, differences, j))
        .collect();
    let mut jac = DMatrix::zeros(m, params.len());
    let mut evaluations = 0;
    for (j, c) in columns.into_iter().enumerate() {
        let (col, n) = c?;
        evaluations += n;
        for i in 0..m {
            jac[(i, j)] = col[i];
        }
    }
    Ok((jac, evaluations))
}

fn column<R: Residuals + ?Sized>(
    problem: &R,
    params: &[FreeParameter],
    theta: &[f64],
    r0: &[f64],
    differences: Differences,
    j: usize,
) -> Result<(Vec<f64>, usize), FitError> {
    let p = &params[j];
    let h = step(p, theta[j], differences);
    let at = |x: f64| -> Result<Vec<f64>, FitError> {
        let mut t = theta.to_vec();
        t[j] = x;
        let r = problem.residuals(&t)?;
        if r.len() != r0.len() {
            return Err(FitError::Setup(format!(
                "the residual vector changed length from {} to {} when {} moved",
                r0.len(),
                r.len(),
                p.name
            )));
        }
        Ok(r)
    };
    // Periodic parameters are never blocked by their "bounds".
    let up_ok = p.periodic || theta[j] + h <= p.upper;
    let down_ok = p.periodic || theta[j] - h >= p.lower;
    let (col, n) = match differences {
        Differences::Central if up_ok && down_ok => {
            let a = at(theta[j] + h)?;
            let b = at(theta[j] - h)?;
            (
                a.iter().zip(&b).map(|(x, y)| (x - y) / (2.0 * h)).collect(),
                2,
            )
        }
        _ if up_ok => {
            let a = at(theta[j] + h)?;
            (a.iter().zip(r0).map(|(x, y)| (x - y) / h).collect(), 1)
        }
        _ if down_ok => {
            let b = at(theta[j] - h)?;
            (r0.iter().zip(&b).map(|(x, y)| (x - y) / h).collect(), 1)
        }
        _ => {
            return Err(FitError::Parameter {
                name: p.name.clone(),
                reason: format!(
                    "the bounds [{}, {}] are narrower than the difference step {h:.3e}",
                    p.lower, p.upper
                ),
            });
        }
    };
    Ok((col, n))
}

/// `χ² = Σ r²`.
pub fn chi2(r: &[f64]) -> f64 {
    r.iter().map(|x| x * x).sum()
}

#[cfg(test)]
mod tests {
    use super::*;

    struct Quadratic;
    impl Residuals for Quadratic {
        fn len(&self) -> usize {
            3
        }
        fn residuals(&self, t: &[f64]) -> Result<Vec<f64>, FitError> {
            Ok(vec![t[0] * t[1], t[0].powi(3), t[1].sin()])
        }
    }

    #[test]
    fn central_differences_match_the_analytic_jacobian() {
        // Analytic derivatives by hand (mathematics).
        let params = vec![
            FreeParameter::unbounded("a", 1.3),
            FreeParameter::unbounded("b", 0.7),
        ];
        let t = [1.3, 0.7];
        let r0 = Quadratic.residuals(&t).unwrap();
        let (j, n) = jacobian(&Quadratic, &params, &t, &r0, Differences::Central).unwrap();
        assert_eq!(n, 4);
        let exact = [[0.7, 1.3], [3.0 * 1.3 * 1.3, 0.0], [0.0, 0.7f64.cos()]];
        for i in 0..3 {
            for k in 0..2 {
                assert!((j[(i, k)] - exact[i][k]).abs() < 1e-9, "{i} {k}");
            }
        }
    }
}
