//! Adaptive Gauss–Legendre panel quadrature for the normalisation and moments of alignment
//! distributions (set-up work, not a hot path).
//!
//! Each panel is integrated with the 15-point Gauss–Legendre rule and compared with the sum over
//! its two halves; a panel is accepted (with the finer value) when the two agree to the requested
//! fraction of the whole integral, and bisected otherwise (common practice, e.g. the adaptive
//! schemes of Davis & Rabinowitz, *Methods of Numerical Integration*, §6, from memory). Callers
//! pass break points at the features of the integrand (peaks, table nodes), so the first
//! estimates already see every feature.

use crate::special::gauss_legendre::gauss_legendre;

/// Points of the panel rule.
const RULE_ORDER: usize = 15;
/// Bisections allowed below one starting panel (`2⁻⁶⁰` of its width).
const MAX_DEPTH: u32 = 60;
/// Panels evaluated in one integral at most (bounds the work for pathological integrands).
const MAX_PANELS: usize = 50_000;

/// `[∫ f₀, ∫ f₁]` over `[breakpoints[0], breakpoints[last]]`, with panels starting at the
/// (ascending) break points, to relative accuracy `relative_tolerance` of each component.
///
/// Returns NaN components if the panel rule cannot be built (it always can: `RULE_ORDER` is a
/// fixed small order).
pub(super) fn integrate_pair(
    f: impl Fn(f64) -> [f64; 2],
    breakpoints: &[f64],
    relative_tolerance: f64,
) -> [f64; 2] {
    let Ok((nodes, weights)) = gauss_legendre(RULE_ORDER) else {
        return [f64::NAN; 2];
    };
    let panel = |a: f64, b: f64| -> [f64; 2] {
        let mid = 0.5 * (a + b);
        let half = 0.5 * (b - a);
        let mut sum = [0.0; 2];
        for (x, w) in nodes.iter().zip(&weights) {
            let value = f(mid + half * x);
            sum[0] += w * value[0];
            sum[1] += w * value[1];
        }
        [sum[0] * half, sum[1] * half]
    };

    let mut stack = Vec::with_capacity(64);
    let mut scale = [0.0f64; 2];
    for pair in breakpoints.windows(2) {
        let (a, b) = (pair[0], pair[1]);
        if b > a {
            let estimate = panel(a, b);
            scale[0] += estimate[0].abs();
            scale[1] += estimate[1].abs();
            stack.push((a, b, estimate, 0u32));
        }
    }
    let mut total = [0.0; 2];
    let mut panels = 0usize;
    while let Some((a, b, estimate, depth)) = stack.pop() {
        let mid = 0.5 * (a + b);
        let left = panel(a, mid);
        let right = panel(mid, b);
        panels += 2;
        let refined = [left[0] + right[0], left[1] + right[1]];
        let within = (0..2).all(|c| {
            (refined[c] - estimate[c]).abs() <= relative_tolerance * scale[c].max(f64::MIN_POSITIVE)
        });
        if within || depth >= MAX_DEPTH || panels >= MAX_PANELS {
            total[0] += refined[0];
            total[1] += refined[1];
        } else {
            stack.push((mid, b, right, depth + 1));
            stack.push((a, mid, left, depth + 1));
        }
    }
    total
}
