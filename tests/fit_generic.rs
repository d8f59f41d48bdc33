//! The generic fitter on problems with known answers: a degenerate pair, a sign ambiguity found
//! by multi-start, profile intervals and Fisher-information errors of a straight line (closed
//! forms of linear least squares: e.g. Bevington and Robinson, *Data Reduction and Error
//! Analysis*, 3rd ed., §6.3), bounds and periodic parameters.

use holecast::fit::multistart::{distinct, run};
use holecast::fit::profile::interval;
use holecast::fit::uncertainty::{DEFAULT_RCOND, NoiseScale, analyse};
use holecast::fit::{Differences, FitError, FreeParameter, LmSettings, Residuals, minimise};

/// Deterministic scatter in [-1, 1] (a fixed list, so the data are reproducible).
fn scatter(i: usize) -> f64 {
    ((i as f64 * 12.9898).sin() * 43758.5453).fract() * 2.0 - 1.0
}

struct Closure<F: Fn(&[f64]) -> Vec<f64> + Sync> {
    n: usize,
    f: F,
}
impl<F: Fn(&[f64]) -> Vec<f64> + Sync> Residuals for Closure<F> {
    fn len(&self) -> usize {
        self.n
    }
    fn residuals(&self, t: &[f64]) -> Result<Vec<f64>, FitError> {
        Ok((self.f)(t))
    }
}

fn free(names: &[(&str, f64)]) -> Vec<FreeParameter> {
    names
        .iter()
        .map(|(n, s)| FreeParameter::unbounded(n, *s))
        .collect()
}

#[test]
fn a_product_pair_is_flagged_and_the_rest_keeps_its_error() {
    // y = a·b·exp(−c x): a and b enter only as their product (mathematics).
    let x: Vec<f64> = (0..20).map(|i| i as f64 * 0.2).collect();
    let y: Vec<f64> = x
        .iter()
        .enumerate()
        .map(|(i, &x)| 6.0 * (-0.7 * x).exp() + 0.01 * scatter(i))
        .collect();
    let p = Closure {
        n: x.len(),
        f: |t: &[f64]| {
            x.iter()
                .zip(&y)
                .map(|(&x, &y)| y - t[0] * t[1] * (-t[2] * x).exp())
                .collect()
        },
    };
    let params = free(&[("a", 2.0), ("b", 2.0), ("c", 1.0)]);
    let m = minimise(&p, &params, None, &LmSettings::default(), None, None).unwrap();
    let u = analyse(
        &p,
        &params,
        &m.theta,
        &m.residuals,
        0,
        Differences::Central,
        NoiseScale::FromResiduals,
        DEFAULT_RCOND,
    )
    .unwrap();
    assert_eq!(u.determined, vec![false, false, true], "{:?}", u.notes);
    assert!(u.std_errors[0].is_none() && u.std_errors[1].is_none());
    assert!(
        u.notes[0].as_ref().unwrap().contains("a and b"),
        "{:?}",
        u.notes
    );
    assert!(u.std_errors[2].unwrap() > 0.0);
    assert!((m.theta[0] * m.theta[1] - 6.0).abs() < 0.05);
}

#[test]
fn straight_line_profile_and_fisher_errors_match_the_closed_forms() {
    // y = b0 + b1 x with noise σ = 0.1: σ(b1) = σ / sqrt(Σ(x − x̄)²) (linear least squares);
    // for a linear model the profile interval at Δχ² = s² is exactly θ̂ ± σ_lin.
    let sigma = 0.1;
    let x: Vec<f64> = (0..15).map(|i| i as f64).collect();
    let y: Vec<f64> = x
        .iter()
        .enumerate()
        .map(|(i, &x)| 1.0 + 0.5 * x + sigma * scatter(i))
        .collect();
    let p = Closure {
        n: x.len(),
        f: |t: &[f64]| {
            x.iter()
                .zip(&y)
                .map(|(&x, &y)| (y - t[0] - t[1] * x) / sigma)
                .collect()
        },
    };
    let params = free(&[("b0", 0.0), ("b1", 1.0)]);
    let settings = LmSettings::default();
    let m = minimise(&p, &params, None, &settings, None, None).unwrap();
    let fisher = analyse(
        &p,
        &params,
        &m.theta,
        &m.residuals,
        0,
        Differences::Central,
        NoiseScale::Known,
        DEFAULT_RCOND,
    )
    .unwrap();
    let mean = x.iter().sum::<f64>() / x.len() as f64;
    let sxx: f64 = x.iter().map(|v| (v - mean).powi(2)).sum();
    let expected = sigma / sxx.sqrt();
    let got = fisher.std_errors[1].unwrap();
    assert!((got / expected - 1.0).abs() < 1e-8, "{got} vs {expected}");
    let fitted = analyse(
        &p,
        &params,
        &m.theta,
        &m.residuals,
        0,
        Differences::Central,
        NoiseScale::FromResiduals,
        DEFAULT_RCOND,
    )
    .unwrap();
    let s = fitted.std_errors[1].unwrap();
    let iv = interval(&p, &params, &m.theta, m.chi2, 1, s, fitted.s2, &settings).unwrap();
    let lo = iv.lower.value.unwrap();
    let hi = iv.upper.value.unwrap();
    assert!(
        (m.theta[1] - lo - s).abs() < 0.02 * s,
        "{lo} {} {s}",
        m.theta[1]
    );
    assert!(
        (hi - m.theta[1] - s).abs() < 0.02 * s,
        "{hi} {} {s}",
        m.theta[1]
    );
}

#[test]
fn multistart_reports_both_signs_of_a_sign_ambiguous_parameter() {
    // y = (a sin x)² + c: a and −a fit equally well.
    let x: Vec<f64> = (0..30).map(|i| 0.1 + i as f64 * 0.1).collect();
    let y: Vec<f64> = x
        .iter()
        .enumerate()
        .map(|(i, &x)| (1.5 * x.sin()).powi(2) + 0.2 + 0.01 * scatter(i))
        .collect();
    let p = Closure {
        n: x.len(),
        f: |t: &[f64]| {
            x.iter()
                .zip(&y)
                .map(|(&x, &y)| y - (t[0] * x.sin()).powi(2) - t[1])
                .collect()
        },
    };
    let params = vec![
        FreeParameter {
            name: "a".into(),
            start: 1.0,
            lower: -3.0,
            upper: 3.0,
            periodic: false,
        },
        FreeParameter {
            name: "c".into(),
            start: 0.0,
            lower: -1.0,
            upper: 1.0,
            periodic: false,
        },
    ];
    let starts = run(&p, &params, 8, &LmSettings::default(), None, &|_| {}, None);
    let ok: Vec<_> = starts
        .runs
        .iter()
        .filter_map(|(_, m)| m.as_ref().ok())
        .collect();
    let best = ok.iter().min_by(|a, b| a.chi2.total_cmp(&b.chi2)).unwrap();
    let u = analyse(
        &p,
        &params,
        &best.theta,
        &best.residuals,
        0,
        Differences::Central,
        NoiseScale::FromResiduals,
        DEFAULT_RCOND,
    )
    .unwrap();
    let minima = distinct(&params, &ok, &u.std_errors, 1e-6 * best.chi2.max(1e-12));
    assert_eq!(
        minima.len(),
        2,
        "{:?}",
        minima.iter().map(|m| &m.theta).collect::<Vec<_>>()
    );
    assert!((minima[0].theta[0] + minima[1].theta[0]).abs() < 1e-5);
}

#[test]
fn bounds_hold_a_parameter_and_flag_it() {
    // y = b x with true b = 2, but b ≤ 1.5: the fit ends on the bound, flagged.
    let x: Vec<f64> = (1..10).map(f64::from).collect();
    let p = Closure {
        n: x.len(),
        f: |t: &[f64]| {
            x.iter()
                .map(|&x| 2.0 * x - t[0] * x + 0.01 * t[1])
                .collect()
        },
    };
    let params = vec![
        FreeParameter {
            name: "b".into(),
            start: 1.0,
            lower: 0.0,
            upper: 1.5,
            periodic: false,
        },
        FreeParameter::unbounded("d", 0.0),
    ];
    let m = minimise(&p, &params, None, &LmSettings::default(), None, None).unwrap();
    assert_eq!(m.theta[0], 1.5);
    let u = analyse(
        &p,
        &params,
        &m.theta,
        &m.residuals,
        0,
        Differences::Central,
        NoiseScale::FromResiduals,
        DEFAULT_RCOND,
    )
    .unwrap();
    assert!(!u.determined[0] && u.std_errors[0].is_none());
    assert!(u.notes[0].as_ref().unwrap().contains("upper bound"));
}

#[test]
fn a_periodic_phase_is_fitted_across_the_wrap() {
    // y = cos(x + φ) with φ = 170°, started at −170°: the short way is across ±180°.
    let x: Vec<f64> = (0..40).map(|i| i as f64 * 0.2).collect();
    let phi = 170f64.to_radians();
    let p = Closure {
        n: x.len(),
        f: |t: &[f64]| {
            x.iter()
                .map(|&x| (x + phi).cos() - (x + t[0].to_radians()).cos())
                .collect()
        },
    };
    let params = vec![FreeParameter {
        name: "phase_deg".into(),
        start: -170.0,
        lower: -180.0,
        upper: 180.0,
        periodic: true,
    }];
    let m = minimise(&p, &params, None, &LmSettings::default(), None, None).unwrap();
    assert!((m.theta[0] - 170.0).abs() < 1e-6, "{:?}", m.theta);
}
