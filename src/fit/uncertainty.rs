//! Standard errors, correlations and undetermined parameters at a least-squares optimum.
//!
//! With the Jacobian `J` of the residuals at the optimum `θ̂`, the covariance is
//! `C = s² (JᵀJ)⁻¹` with `s² = χ²/ν`, `ν = N − p` (residuals minus free and profiled
//! parameters): the linearised estimate used by the NIST StRD certified values (NIST/ITL
//! StRD nonlinear regression background documentation; Bates and Watts, *Nonlinear Regression
//! Analysis and Its Applications*, Wiley 1988, §2.3). With [`NoiseScale::Known`] the residuals are
//! taken as already normalised by the true noise and `s² = 1`: the inverse Fisher information
//! (experiment design at nominal parameters).
//!
//! A parameter the data do not determine gets no standard error, never a small number:
//! - one on a bound (the quadratic model of χ² does not hold there);
//! - one the residuals do not depend on (zero Jacobian column);
//! - one that takes part (component ≥ 0.1 of the unit eigenvector) in a near-null direction of
//!   the correlation-scaled `JᵀJ` (eigenvalue below `rcond` times the largest): a combination of
//!   parameters the data cannot separate, such as two that enter only as a product.
//!
//! The covariance of the others is that of the fit with the flagged ones held at their values
//! (the inverse of the sub-matrix of `JᵀJ`), and says so in the notes.

use nalgebra::{DMatrix, DVector, SymmetricEigen};
use serde::Serialize;

use super::FitError;
use super::parameters::{FreeParameter, Side};
use super::problem::{Differences, Residuals, chi2, jacobian};

/// Default relative eigenvalue below which a direction of the correlation-scaled `JᵀJ` counts as
/// undetermined: well above the noise of a central-difference Jacobian of a smooth model
/// (relative error ~1e-10, squared 1e-20) and far below any direction a fit can resolve
/// (its standard error would be 10⁵ times that of the best-determined combination).
pub const DEFAULT_RCOND: f64 = 1e-10;

/// Where the noise level comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum NoiseScale {
    /// `s² = χ²/ν` from the residuals at the optimum.
    FromResiduals,
    /// Residuals are normalised by the known noise: `s² = 1` (Fisher information).
    Known,
}

/// The uncertainty analysis of an optimum.
#[derive(Clone, Debug, Serialize)]
pub struct Uncertainties {
    /// Degrees of freedom ν = N − p − profiled.
    pub dof: i64,
    /// χ² at the point.
    pub chi2: f64,
    /// s² used for the covariance.
    pub s2: f64,
    /// Per parameter: determined by the data.
    pub determined: Vec<bool>,
    /// Per parameter: why it is undetermined (None when determined).
    pub notes: Vec<Option<String>>,
    /// Standard errors (None when undetermined).
    pub std_errors: Vec<Option<f64>>,
    /// Covariance matrix in parameter order (None in rows/columns of undetermined parameters).
    pub covariance: Vec<Vec<Option<f64>>>,
    /// Correlation matrix in parameter order (None likewise).
    pub correlation: Vec<Vec<Option<f64>>>,
    /// Smallest over largest eigenvalue of the correlation-scaled JᵀJ of all free parameters
    /// that do not sit on a bound.
    pub eigenvalue_ratio: f64,
    /// Residual evaluations spent on the Jacobian.
    pub evaluations: usize,
}

/// The analysis at `theta` (whose residuals `r` are given). `profiled` counts parameters that
/// the residuals eliminate internally (per-dataset scales), for ν.
#[allow(clippy::too_many_arguments)]
pub fn analyse<R: Residuals + ?Sized>(
    problem: &R,
    params: &[FreeParameter],
    theta: &[f64],
    r: &[f64],
    profiled: usize,
    differences: Differences,
    noise: NoiseScale,
    rcond: f64,
) -> Result<Uncertainties, FitError> {
    let (jac, evaluations) = jacobian(problem, params, theta, r, differences)?;
    let c2 = chi2(r);
    let dof = r.len() as i64 - params.len() as i64 - profiled as i64;
    let s2 = match noise {
        NoiseScale::Known => 1.0,
        NoiseScale::FromResiduals => {
            if dof <= 0 {
                return Err(FitError::Setup(format!(
                    "{} residuals, {} free and {profiled} profiled parameters leave {dof} \
                     degrees of freedom: no noise estimate, no standard errors",
                    r.len(),
                    params.len()
                )));
            }
            c2 / dof as f64
        }
    };
    Ok(from_jacobian(
        &jac,
        params,
        theta,
        c2,
        s2,
        dof,
        rcond,
        evaluations,
    ))
}

/// The analysis from a Jacobian already at hand.
#[allow(clippy::too_many_arguments)]
pub fn from_jacobian(
    jac: &DMatrix<f64>,
    params: &[FreeParameter],
    theta: &[f64],
    chi2: f64,
    s2: f64,
    dof: i64,
    rcond: f64,
    evaluations: usize,
) -> Uncertainties {
    let n = params.len();
    let a = jac.tr_mul(jac);
    let mut notes: Vec<Option<String>> = vec![None; n];
    for j in 0..n {
        if let Some(side) = params[j].at_bound(theta[j]) {
            notes[j] = Some(format!(
                "at its {} bound: the data push it out of the allowed range",
                match side {
                    Side::Lower => "lower",
                    Side::Upper => "upper",
                }
            ));
        } else if a[(j, j)] == 0.0 || !a[(j, j)].is_finite() {
            notes[j] = Some("the residuals do not depend on it".into());
        }
    }
    let mut eigenvalue_ratio = f64::NAN;
    let mut first = true;
    loop {
        let set: Vec<usize> = (0..n).filter(|&j| notes[j].is_none()).collect();
        if set.is_empty() {
            break;
        }
        let k = set.len();
        let d: Vec<f64> = set.iter().map(|&j| 1.0 / a[(j, j)].sqrt()).collect();
        let c = DMatrix::from_fn(k, k, |i, l| a[(set[i], set[l])] * d[i] * d[l]);
        let eig = SymmetricEigen::new(c);
        let max = eig.eigenvalues.iter().cloned().fold(0.0, f64::max);
        let min = eig
            .eigenvalues
            .iter()
            .cloned()
            .fold(f64::INFINITY, f64::min);
        if first {
            eigenvalue_ratio = min / max;
            first = false;
        }
        let mut flagged = false;
        for (e, &lambda) in eig.eigenvalues.iter().enumerate() {
            if lambda < rcond * max {
                let v = eig.eigenvectors.column(e);
                let members: Vec<usize> = (0..k).filter(|&i| v[i].abs() >= 0.1).collect();
                let names: Vec<&str> = members
                    .iter()
                    .map(|&i| params[set[i]].name.as_str())
                    .collect();
                for &i in &members {
                    if notes[set[i]].is_none() {
                        notes[set[i]] = Some(format!(
                            "the data do not separate {} (near-singular JᵀJ: relative \
                             eigenvalue {:.1e})",
                            names.join(" and "),
                            (lambda / max).max(0.0)
                        ));
                        flagged = true;
                    }
                }
            }
        }
        if !flagged {
            break;
        }
    }
    let set: Vec<usize> = (0..n).filter(|&j| notes[j].is_none()).collect();
    let k = set.len();
    let mut cov = vec![vec![None; n]; n];
    let mut determined = vec![false; n];
    if k > 0 {
        let d: Vec<f64> = set.iter().map(|&j| 1.0 / a[(j, j)].sqrt()).collect();
        let c = DMatrix::from_fn(k, k, |i, l| a[(set[i], set[l])] * d[i] * d[l]);
        // Pseudo-inverse by eigen-decomposition of the scaled matrix (all eigenvalues are above
        // rcond·max here, so this is the inverse).
        let eig = SymmetricEigen::new(c);
        let mut inv = DMatrix::zeros(k, k);
        for (e, &lambda) in eig.eigenvalues.iter().enumerate() {
            let v: DVector<f64> = eig.eigenvectors.column(e).into_owned();
            inv += (&v * v.transpose()) / lambda;
        }
        for i in 0..k {
            determined[set[i]] = true;
            for l in 0..k {
                cov[set[i]][set[l]] = Some(s2 * inv[(i, l)] * d[i] * d[l]);
            }
        }
    }
    let std_errors: Vec<Option<f64>> = (0..n).map(|j| cov[j][j].map(f64::sqrt)).collect();
    let correlation = (0..n)
        .map(|i| {
            (0..n)
                .map(|l| match (cov[i][l], std_errors[i], std_errors[l]) {
                    (Some(c), Some(a), Some(b)) => Some(c / (a * b)),
                    _ => None,
                })
                .collect()
        })
        .collect();
    Uncertainties {
        dof,
        chi2,
        s2,
        determined,
        notes,
        std_errors,
        covariance: cov,
        correlation,
        eigenvalue_ratio,
        evaluations,
    }
}
