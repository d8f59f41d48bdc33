//! Multi-start fits from quasi-random points, and the distinct minima they find.
//!
//! The first start is the user's; the others are Halton points ([`super::halton`]) mapped into
//! each parameter's range: `[lower, upper]` where both bounds are finite (one period for a
//! periodic parameter), otherwise `start ± max(|start|, 1)` clipped to the one finite bound.
//! Two end points are the same minimum when every parameter agrees within a tenth of its
//! standard error at the better one, or, where that is unknown, within 1e-4 of its magnitude
//! (periodic parameters the short way round). Sign and phase ambiguities therefore come out as
//! separate minima with (nearly) equal χ².

use std::sync::Arc;
use std::sync::atomic::{AtomicBool, Ordering};

use super::FitError;
use super::halton;
use super::levenberg::LmSettings;
use super::minimise::{Minimum, Observer, minimise};
use super::parameters::FreeParameter;
use super::problem::Residuals;

/// Start point number `k` (0 is the user's start).
pub fn start_point(params: &[FreeParameter], k: usize) -> Vec<f64> {
    if k == 0 {
        return params.iter().map(|p| p.start).collect();
    }
    let u = halton::point(k as u64, params.len().min(halton::MAX_DIMENSION));
    params
        .iter()
        .enumerate()
        .map(|(j, p)| {
            let t = u.get(j).copied().unwrap_or(0.5);
            let half = p.start.abs().max(1.0);
            let lo = if p.lower.is_finite() {
                p.lower
            } else {
                (p.start - half).min(p.upper - 2.0 * half)
            };
            let hi = if p.upper.is_finite() {
                p.upper
            } else {
                (p.start + half).max(p.lower + 2.0 * half)
            };
            p.project(lo + t * (hi - lo))
        })
        .collect()
}

/// Every end point of a multi-start run, in start order, with its start.
#[derive(Clone, Debug)]
pub struct Starts {
    /// (start, end point or the error that stopped that start).
    pub runs: Vec<(Vec<f64>, Result<Minimum, FitError>)>,
}

/// Runs `count` fits (at least 1); `on_start` is told the start number before each.
#[allow(clippy::too_many_arguments)]
pub fn run<R: Residuals + ?Sized>(
    residuals: &R,
    params: &[FreeParameter],
    count: usize,
    settings: &LmSettings,
    observer: Option<Observer>,
    on_start: &dyn Fn(usize),
    stop: Option<Arc<AtomicBool>>,
) -> Starts {
    let mut runs = Vec::new();
    for k in 0..count.max(1) {
        if stop.as_ref().is_some_and(|s| s.load(Ordering::SeqCst)) {
            break;
        }
        on_start(k);
        let x0 = start_point(params, k);
        let m = minimise(
            residuals,
            params,
            Some(&x0),
            settings,
            observer.clone(),
            stop.clone(),
        );
        runs.push((x0, m));
    }
    Starts { runs }
}

/// Whether two points are the same minimum (module rule); `sigma` are the standard errors at
/// `a` (None where unknown).
pub fn same_minimum(params: &[FreeParameter], a: &[f64], b: &[f64], sigma: &[Option<f64>]) -> bool {
    params.iter().enumerate().all(|(j, p)| {
        let d = p.difference(a[j], b[j]).abs();
        let tol = match sigma.get(j).copied().flatten() {
            Some(s) => 0.1 * s,
            None => 1e-4 * a[j].abs().max(b[j].abs()).max(1e-12),
        };
        d <= tol
    })
}

/// The distinct minima within `delta_chi2` of the best, best first (ties in start order).
pub fn distinct<'a>(
    params: &[FreeParameter],
    minima: &[&'a Minimum],
    sigma_at_best: &[Option<f64>],
    delta_chi2: f64,
) -> Vec<&'a Minimum> {
    let mut order: Vec<&Minimum> = minima.to_vec();
    order.sort_by(|a, b| a.chi2.total_cmp(&b.chi2));
    let Some(best) = order.first().map(|m| m.chi2) else {
        return Vec::new();
    };
    let mut out: Vec<&Minimum> = Vec::new();
    for m in order {
        if m.chi2 > best + delta_chi2 {
            break;
        }
        if !out
            .iter()
            .any(|o| same_minimum(params, &o.theta, &m.theta, sigma_at_best))
        {
            out.push(m);
        }
    }
    out
}
