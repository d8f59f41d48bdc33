//! The spectrum-fit layer with a stand-in model whose answer is known in closed form: the
//! profiled scale, the continuous-spectrum path (wavelength axis, Jacobian, windows), the
//! recovery of a parameter set by address, and a factor the profiled scale absorbs.

use holecast::fit::model::SpectrumModel;
use holecast::fit::objective::SpectrumFit;
use holecast::fit::outcome::{RunSettings, run};
use holecast::fit::spec::FitSpec;
use holecast::fit::uncertainty::DEFAULT_RCOND;
use holecast::fit::{FitError, LmSettings, Residuals};
use holecast::laser::LaserSpec;
use holecast::target::TargetSpec;
use holecast::units;

/// m(E) = ip_ev · exp(−E / (ip_ev · 0.1 eV⁻¹·…)): a smooth model whose shape depends on the
/// channel's ionization potential (shape) and whose level is proportional to it.
struct Stand;

fn shape(e: f64, ip_ev: f64) -> f64 {
    let e_ev = units::au_to_ev(e);
    ip_ev * (-e_ev / (0.5 * ip_ev)).exp()
}

impl SpectrumModel for Stand {
    fn yields(&self, t: &TargetSpec, _l: &LaserSpec, e: &[f64]) -> Result<Vec<f64>, FitError> {
        Ok(e.iter().map(|&x| shape(x, t.channels[0].ip_ev)).collect())
    }
    fn describe(&self) -> String {
        "stand-in".into()
    }
}

fn target() -> TargetSpec {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/channels/hydrogen.json"
    ))
    .unwrap();
    TargetSpec::from_json(&text).unwrap()
}

fn scatter(i: usize) -> f64 {
    ((i as f64 * 78.233).sin() * 43758.5453).fract() * 2.0 - 1.0
}

#[test]
fn continuous_spectra_in_nm_are_reduced_to_lines_and_the_shape_parameter_recovered() {
    // Gaussian lines (width 0.15 order) at odd orders 11..29 of 800 nm, weights
    // 3.7·shape(qω, ip = 15), written as a density per nm (the Jacobian |dE/dλ| applied by
    // hand), with 1 % scatter on the line weights; fitted with ip free, the scale profiled.
    let laser = LaserSpec::monochromatic(1.3e14, 800.0);
    let omega = units::wavelength_nm_to_omega(800.0);
    let truth = 15.0;
    let mut rows = String::from("wavelength_nm,density\n");
    let c = units::wavelength_nm_to_omega(1.0); // E·λ = c (a.u.·nm)
    let w = 0.15 * omega;
    let weights: Vec<f64> = (0..10)
        .map(|k| {
            let q = 11.0 + 2.0 * k as f64;
            3.7 * shape(q * omega, truth) * (1.0 + 0.01 * scatter(k))
        })
        .collect();
    let n = 6000;
    let (lmin, lmax) = (c / (31.0 * omega), c / (9.5 * omega));
    for i in 0..n {
        let l = lmin + (lmax - lmin) * i as f64 / (n - 1) as f64;
        let e = c / l;
        let per_e: f64 = (0..10)
            .map(|k| {
                let q = 11.0 + 2.0 * k as f64;
                weights[k] * (-(e - q * omega).powi(2) / (2.0 * w * w)).exp()
                    / (w * (2.0 * std::f64::consts::PI).sqrt())
            })
            .sum();
        // density per nm = density per a.u. · |dE/dλ| = per_e · c / λ²
        rows.push_str(&format!("{l},{}\n", per_e * c / (l * l)));
    }
    let spec: FitSpec = FitSpec::from_json(
        &serde_json::json!({
            "target": "unused",
            "laser": "unused",
            "datasets": [{
                "label": "c", "file": "c.csv", "kind": "continuous", "x_unit": "nm",
                "columns": {"x": "wavelength_nm", "yield": "density"},
                "orders": [11, 13, 15, 17, 19, 21, 23, 25, 27, 29],
                "relative_uncertainty": 0.01
            }],
            "parameters": [{"address": "target.channels[X].ip_ev", "start": 12.0,
                            "lower": 5.0, "upper": 40.0}]
        })
        .to_string(),
    )
    .unwrap();
    let fit = SpectrumFit::build(&spec, &target(), &laser, &[rows], &Stand).unwrap();
    // The window integrals hold the line weights (Gaussians of width 0.15 order inside ±1 order).
    for (k, y) in fit.datasets[0].y.iter().enumerate() {
        assert!(
            (y / weights[k] - 1.0).abs() < 1e-4,
            "line {k}: {y} vs {}",
            weights[k]
        );
    }
    let settings = RunSettings {
        lm: LmSettings::default(),
        starts: 1,
        minima_delta_chi2: 1.0,
        profile: vec![],
        rcond: DEFAULT_RCOND,
    };
    let (out, best) = run(
        &fit,
        &fit.params,
        fit.profiled(),
        &settings,
        None,
        &|_| {},
        None,
    )
    .unwrap();
    let p = &out.parameters[0];
    assert!(out.converged);
    assert!(
        (p.value - truth).abs() <= 2.0 * p.std_error.unwrap(),
        "{p:?}"
    );
    // The profiled scale is near the data's level over the model's, 3.7 (the fitted ip also
    // moves the level a little through the shape).
    let e = fit.evaluate(&best.theta).unwrap();
    assert!((e[0].scale / 3.7 - 1.0).abs() < 0.05, "{}", e[0].scale);
    // It minimises χ² over the scale: moving it by ±1 % raises χ².
    let r0: f64 = fit
        .residuals(&best.theta)
        .unwrap()
        .iter()
        .map(|r| r * r)
        .sum();
    let ln: Vec<f64> = fit.datasets[0]
        .y
        .iter()
        .zip(&e[0].model)
        .map(|(y, m)| (y / m).ln())
        .collect();
    for d in [-0.01f64, 0.01] {
        let c2: f64 = ln.iter().map(|x| ((x - d.ln_1p()) / 0.01).powi(2)).sum();
        assert!(c2 > r0, "{c2} <= {r0}");
    }
}
