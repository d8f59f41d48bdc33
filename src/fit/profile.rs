//! Profile-likelihood intervals: for one parameter `θ_k`, the values where
//! `χ²_prof(θ_k) = min_{others} χ²` rises by `Δ = s²` above the optimum (Δχ² = 1 in units of
//! the noise variance; for normalised residuals and a good fit s² ≈ 1). The interval is
//! asymmetric where the model is nonlinear (Venzon and Moolgavkar, J. R. Stat. Soc. C 37, 87
//! (1988); Bates and Watts 1988, §6.1).
//!
//! Each side is found by stepping out from the optimum in steps of the linearised standard error
//! (doubling until χ²_prof crosses the threshold or a bound is reached), then by bisection to a
//! hundredth of the standard error. Every profile point is a full fit of the other parameters,
//! warm-started from the previous one. A side that reaches a bound is reported open.

use serde::Serialize;

use super::FitError;
use super::levenberg::LmSettings;
use super::minimise::minimise;
use super::parameters::FreeParameter;
use super::problem::Residuals;

struct Fixed<'a, R: Residuals + ?Sized> {
    inner: &'a R,
    k: usize,
    value: f64,
}

impl<R: Residuals + ?Sized> Residuals for Fixed<'_, R> {
    fn len(&self) -> usize {
        self.inner.len()
    }
    fn residuals(&self, theta: &[f64]) -> Result<Vec<f64>, FitError> {
        let mut full = theta.to_vec();
        full.insert(self.k, self.value);
        self.inner.residuals(&full)
    }
}

/// One side of an interval.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Edge {
    /// The value where χ²_prof crosses the threshold (None: not crossed before the bound).
    pub value: Option<f64>,
    /// Profile fits used.
    pub fits: usize,
}

/// A profile-likelihood interval.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct Interval {
    /// Parameter name.
    pub name: String,
    /// Best value.
    pub best: f64,
    /// Lower edge.
    pub lower: Edge,
    /// Upper edge.
    pub upper: Edge,
    /// Δχ² threshold used.
    pub delta_chi2: f64,
}

/// The profile χ² at `θ_k = value`, fitted from `warm` (the other parameters).
fn profile_chi2<R: Residuals + ?Sized>(
    residuals: &R,
    params: &[FreeParameter],
    k: usize,
    value: f64,
    warm: &mut Vec<f64>,
    settings: &LmSettings,
) -> Result<f64, FitError> {
    let fixed = Fixed {
        inner: residuals,
        k,
        value,
    };
    let others: Vec<FreeParameter> = params
        .iter()
        .enumerate()
        .filter(|(j, _)| *j != k)
        .map(|(_, p)| p.clone())
        .collect();
    if others.is_empty() {
        let mut t = vec![value];
        t.truncate(1);
        let r = residuals.residuals(&t)?;
        return Ok(super::problem::chi2(&r));
    }
    let m = minimise(&fixed, &others, Some(warm), settings, None, None)?;
    *warm = m.theta.clone();
    Ok(m.chi2)
}

/// The interval of parameter `k` around the optimum `theta` (χ² `chi2_min`), with linearised
/// standard error `sigma` and threshold `delta`.
#[allow(clippy::too_many_arguments)]
pub fn interval<R: Residuals + ?Sized>(
    residuals: &R,
    params: &[FreeParameter],
    theta: &[f64],
    chi2_min: f64,
    k: usize,
    sigma: f64,
    delta: f64,
    settings: &LmSettings,
) -> Result<Interval, FitError> {
    let p = &params[k];
    if p.periodic {
        return Err(FitError::Parameter {
            name: p.name.clone(),
            reason: "no profile interval for a periodic parameter".into(),
        });
    }
    if !(sigma.is_finite() && sigma > 0.0) {
        return Err(FitError::Parameter {
            name: p.name.clone(),
            reason: "no profile interval without a standard error to set the step (the \
                     parameter is undetermined)"
                .into(),
        });
    }
    let rest: Vec<f64> = theta
        .iter()
        .enumerate()
        .filter(|(j, _)| *j != k)
        .map(|(_, v)| *v)
        .collect();
    let side = |dir: f64| -> Result<Edge, FitError> {
        let mut warm = rest.clone();
        let mut fits = 0;
        let mut inside = theta[k];
        let mut step = sigma;
        let bound = if dir > 0.0 { p.upper } else { p.lower };
        let mut outside = None;
        for _ in 0..30 {
            let v = (theta[k] + dir * step).clamp(p.lower, p.upper);
            fits += 1;
            let c = profile_chi2(residuals, params, k, v, &mut warm, settings)?;
            if c - chi2_min >= delta {
                outside = Some(v);
                break;
            }
            inside = v;
            if v == bound {
                return Ok(Edge { value: None, fits });
            }
            step *= 2.0;
        }
        let Some(mut out) = outside else {
            return Ok(Edge { value: None, fits });
        };
        let mut warm = rest.clone();
        while (out - inside).abs() > 0.01 * sigma && fits < 200 {
            let mid = 0.5 * (out + inside);
            fits += 1;
            let c = profile_chi2(residuals, params, k, mid, &mut warm, settings)?;
            if c - chi2_min >= delta {
                out = mid;
            } else {
                inside = mid;
            }
        }
        Ok(Edge {
            value: Some(0.5 * (out + inside)),
            fits,
        })
    };
    let lower = side(-1.0)?;
    let upper = side(1.0)?;
    Ok(Interval {
        name: p.name.clone(),
        best: theta[k],
        lower,
        upper,
        delta_chi2: delta,
    })
}
