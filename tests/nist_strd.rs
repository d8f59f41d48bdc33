//! The fitter against the NIST Statistical Reference Datasets for nonlinear regression
//! (NIST/ITL StRD, certified values computed by NIST in 128-bit precision; public-domain data).
//! The four .dat files are copied unchanged from the source distribution of lmfit 1.3.4
//! (directory NIST_STRD/); tests/data/nist_strd/README.md records their provenance.
//!
//! For each dataset and each of the two certified start points the fit must reproduce the
//! certified parameters to 6 significant digits and the certified standard deviations
//! (s²(JᵀJ)⁻¹) to 3, and the residual sum of squares to 6. The one start known to fail is
//! checked for what it does instead (see `mgh09_start_1`).

use holecast::fit::uncertainty::{DEFAULT_RCOND, NoiseScale, analyse};
use holecast::fit::{Differences, FitError, FreeParameter, LmSettings, Residuals, minimise};

/// A dataset parsed from a StRD file.
struct Strd {
    name: String,
    starts: [Vec<f64>; 2],
    certified: Vec<f64>,
    certified_sd: Vec<f64>,
    rss: f64,
    x: Vec<f64>,
    y: Vec<f64>,
}

/// Parses the StRD format: the lines `  bK =   start1   start2   value   sd`, the line
/// `Residual Sum of Squares:   v`, and the data block after the line beginning `Data:   y`
/// (two columns y, x).
fn parse(name: &str) -> Strd {
    let path = format!(
        "{}/tests/data/nist_strd/{name}.dat",
        env!("CARGO_MANIFEST_DIR")
    );
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    let mut starts = [Vec::new(), Vec::new()];
    let (mut certified, mut certified_sd) = (Vec::new(), Vec::new());
    let mut rss = f64::NAN;
    let (mut x, mut y) = (Vec::new(), Vec::new());
    let mut in_data = false;
    for line in text.lines() {
        let t = line.trim();
        if in_data {
            let cols: Vec<f64> = t
                .split_whitespace()
                .map(|c| {
                    c.parse()
                        .unwrap_or_else(|_| panic!("{path}: data row {t:?}"))
                })
                .collect();
            if cols.len() == 2 {
                y.push(cols[0]);
                x.push(cols[1]);
            }
            continue;
        }
        if t.starts_with('b') && t.contains('=') {
            let (_, rest) = t.split_once('=').unwrap();
            let v: Vec<f64> = rest
                .split_whitespace()
                .map(|c| c.parse().unwrap())
                .collect();
            assert_eq!(v.len(), 4, "{path}: {t}");
            starts[0].push(v[0]);
            starts[1].push(v[1]);
            certified.push(v[2]);
            certified_sd.push(v[3]);
        } else if let Some(v) = t.strip_prefix("Residual Sum of Squares:") {
            rss = v.trim().parse().unwrap();
        } else if t.starts_with("Data:") && t.contains(" y") && t.contains(" x") {
            in_data = true;
        }
    }
    Strd {
        name: name.into(),
        starts,
        certified,
        certified_sd,
        rss,
        x,
        y,
    }
}

type Model = fn(&[f64], f64) -> f64;

struct Problem<'a> {
    data: &'a Strd,
    model: Model,
}

impl Residuals for Problem<'_> {
    fn len(&self) -> usize {
        self.data.y.len()
    }
    fn residuals(&self, b: &[f64]) -> Result<Vec<f64>, FitError> {
        Ok(self
            .data
            .x
            .iter()
            .zip(&self.data.y)
            .map(|(&x, &y)| y - (self.model)(b, x))
            .collect())
    }
}

// The model formulas as printed in each .dat file.
fn misra1a(b: &[f64], x: f64) -> f64 {
    b[0] * (1.0 - (-b[1] * x).exp())
}
fn thurber(b: &[f64], x: f64) -> f64 {
    (b[0] + b[1] * x + b[2] * x * x + b[3] * x.powi(3))
        / (1.0 + b[4] * x + b[5] * x * x + b[6] * x.powi(3))
}
fn mgh09(b: &[f64], x: f64) -> f64 {
    b[0] * (x * x + x * b[1]) / (x * x + x * b[2] + b[3])
}
fn boxbod(b: &[f64], x: f64) -> f64 {
    b[0] * (1.0 - (-b[1] * x).exp())
}

/// Significant digits of agreement, -log10(|a-b|/|b|).
fn digits(a: f64, b: f64) -> f64 {
    if a == b {
        return 16.0;
    }
    -((a - b).abs() / b.abs()).log10()
}

struct Outcome {
    theta: Vec<f64>,
    chi2: f64,
    sd: Vec<Option<f64>>,
    converged: bool,
    reason: String,
}

fn fit(d: &Strd, model: Model, start: usize, settings: &LmSettings) -> Outcome {
    let params: Vec<FreeParameter> = d.starts[start]
        .iter()
        .enumerate()
        .map(|(i, &s)| FreeParameter::unbounded(&format!("b{}", i + 1), s))
        .collect();
    let p = Problem { data: d, model };
    let m = minimise(&p, &params, None, settings, None, None).unwrap();
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
    Outcome {
        theta: m.theta,
        chi2: m.chi2,
        sd: u.std_errors,
        converged: m.termination.converged,
        reason: m.termination.reason,
    }
}

fn check(name: &str, model: Model, start: usize) {
    check_with(name, model, start, &LmSettings::default());
}

fn check_with(name: &str, model: Model, start: usize, settings: &LmSettings) {
    let d = parse(name);
    assert!(!d.x.is_empty() && d.rss.is_finite(), "{name}: parse");
    let o = fit(&d, model, start, settings);
    assert!(o.converged, "{} start {}: {}", d.name, start + 1, o.reason);
    let mut worst_p: f64 = 16.0;
    let mut worst_sd: f64 = 16.0;
    for (i, (&v, &c)) in o.theta.iter().zip(&d.certified).enumerate() {
        let dp = digits(v, c);
        worst_p = worst_p.min(dp);
        assert!(
            dp >= 6.0,
            "{name} start {} b{}: {v} vs {c} ({dp:.1} digits)",
            start + 1,
            i + 1
        );
        let sd = o.sd[i].unwrap_or_else(|| panic!("{name} b{}: flagged undetermined", i + 1));
        let ds = digits(sd, d.certified_sd[i]);
        worst_sd = worst_sd.min(ds);
        assert!(
            ds >= 3.0,
            "{name} start {} sd(b{}): {sd} vs {} ({ds:.1} digits)",
            start + 1,
            i + 1,
            d.certified_sd[i]
        );
    }
    let dr = digits(o.chi2, d.rss);
    assert!(
        dr >= 6.0,
        "{name}: RSS {} vs {} ({dr:.1} digits)",
        o.chi2,
        d.rss
    );
    eprintln!(
        "{name} start {}: parameters >= {worst_p:.1} digits, sd >= {worst_sd:.1} digits, RSS {dr:.1} digits",
        start + 1
    );
}

#[test]
fn misra1a_both_starts() {
    check("Misra1a", misra1a, 0);
    check("Misra1a", misra1a, 1);
}

#[test]
fn thurber_both_starts() {
    check("Thurber", thurber, 0);
    check("Thurber", thurber, 1);
}

#[test]
fn boxbod_start_2() {
    check("BoxBOD", boxbod, 1);
}

/// BoxBOD start 1 (b1 = 1, b2 = 1). With the default first damping (λ = 1e-3) the first steps
/// send b2 past 30, where exp(−b2·x) vanishes at every x (x ≥ 1): the model becomes the constant
/// b1 and the fit stops on that plateau at b1 = mean(y) = 172.5, χ² = 9771.5 (certified
/// 1168.0). It is a stationary point in the limit b2 → ∞ (the Jacobian column of b2 is zero), so
/// the solver reports convergence; the uncertainty analysis must then flag b2 as undetermined
/// rather than give it an error bar. A cautious first step (λ = 100) reaches the certified
/// minimum, as does a multi-start run.
#[test]
fn boxbod_start_1() {
    let d = parse("BoxBOD");
    let o = fit(&d, boxbod, 0, &LmSettings::default());
    eprintln!(
        "BoxBOD start 1 (default damping): b = {:?}, chi2 {} ({}), sd {:?}",
        o.theta, o.chi2, o.reason, o.sd
    );
    assert!((o.theta[0] - 172.5).abs() < 1e-5 && o.theta[1] > 20.0);
    assert!(
        o.sd[1].is_none(),
        "b2 on the plateau must be flagged undetermined"
    );
    let cautious = LmSettings {
        initial_lambda: 100.0,
        ..LmSettings::default()
    };
    check_with("BoxBOD", boxbod, 0, &cautious);
}
#[test]
fn mgh09_start_2() {
    check("MGH09", mgh09, 1);
}

/// MGH09 start 1 (25, 39, 41.5, 39) lies two orders of magnitude from the solution
/// (0.19, 0.19, 0.12, 0.14) and is the hard start of this set; with Moré's running-maximum
/// scaling the projected LM reaches the certified minimum from it.
#[test]
fn mgh09_start_1() {
    check("MGH09", mgh09, 0);
}
