//! The residuals of a spectrum fit: every dataset's measured line yields against the model
//! under that dataset's conditions, with the free parameters set by address.
//!
//! For dataset `d` with model yields `m_i` (plus a background `b_d·mean(m)` if fitted), the
//! residuals are, in log mode, `r_i = (ln y_i − ln m_i − ln s_d) / σ_i` with `σ_i = σ_{y,i}/y_i`
//! (relative uncertainty; 1 when no uncertainty is given), and in linear mode
//! `r_i = (y_i − s_d m_i) / σ_{y,i}`. The scale `s_d` is profiled out analytically unless fixed:
//! `ln s_d = Σ w_i (ln y_i − ln m_i) / Σ w_i` (log) or `s_d = Σ w_i y_i m_i / Σ w_i m_i²`
//! (linear), `w_i = 1/σ_i²` — the minimiser over `s_d` of χ² for every other parameter vector,
//! so the Jacobian of the profiled residuals gives the other parameters' covariance exactly as
//! the full problem would (Golub and Pereyra, SIAM J. Numer. Anal. 10, 413 (1973)); each profiled
//! scale takes one degree of freedom.

use rayon::prelude::*;
use serde_json::Value;

use super::FitError;
use super::lines::integrate_lines;
use super::measured::{self, energy};
use super::model::SpectrumModel;
use super::parameters::FreeParameter;
use super::problem::Residuals;
use super::spec::{DataKind, FitSpec, ResidualMode, ScaleSpec};
use crate::address::{Address, Document};
use crate::laser::LaserSpec;
use crate::target::TargetSpec;

/// What a free parameter sets.
#[derive(Clone, Debug, PartialEq)]
pub enum Slot {
    /// A number in the target or laser, by address.
    Address(Address),
    /// The factor on every colour's intensity.
    IntensityCalibration,
    /// The background of dataset `k` (fraction of its mean model yield).
    Background(usize),
}

/// One dataset ready for fitting.
#[derive(Clone, Debug)]
pub struct Dataset {
    /// Label.
    pub label: String,
    /// Source file (for messages and outputs).
    pub file: String,
    /// Harmonic orders of the lines (relative to the dataset's first colour).
    pub orders: Vec<f64>,
    /// Photon energies (a.u.).
    pub energies: Vec<f64>,
    /// Measured line yields.
    pub y: Vec<f64>,
    /// Uncertainties of the yields (None: unweighted).
    pub sigma: Option<Vec<f64>>,
    /// Source row of each line (for continuous data: the row nearest the line centre).
    pub rows: Vec<usize>,
    /// Conditions by address.
    pub conditions: Vec<(Address, f64)>,
    /// Scale.
    pub scale: ScaleSpec,
}

/// The model of one dataset at one parameter vector.
#[derive(Clone, Debug)]
pub struct Evaluated {
    /// Model yields after scale and background (comparable with the data).
    pub model: Vec<f64>,
    /// The scale used.
    pub scale: f64,
    /// Residuals.
    pub residuals: Vec<f64>,
}

/// A spectrum fit (implements [`Residuals`]).
pub struct SpectrumFit<'m> {
    /// Base target document (JSON form).
    pub target: Value,
    /// Base laser document (JSON form).
    pub laser: Value,
    /// Datasets.
    pub datasets: Vec<Dataset>,
    /// What each free parameter sets.
    pub slots: Vec<Slot>,
    /// The free parameters.
    pub params: Vec<FreeParameter>,
    /// Residual mode.
    pub mode: ResidualMode,
    /// The model.
    pub model: &'m dyn SpectrumModel,
    len: usize,
}

fn data_err(msg: String) -> FitError {
    FitError::Data(msg)
}

impl<'m> SpectrumFit<'m> {
    /// Builds the fit from a fit file, its resolved target and laser, and the text of every
    /// dataset's table (in dataset order). Errors name the file, row or key.
    pub fn build(
        spec: &FitSpec,
        target: &TargetSpec,
        laser: &LaserSpec,
        tables: &[String],
        model: &'m dyn SpectrumModel,
    ) -> Result<Self, FitError> {
        if spec.setup.is_some() {
            return Err(FitError::Setup(
                "setup: the detection layer (beam, medium, detector) is not available in this \
                 build; remove the key to fit the single-molecule spectrum"
                    .into(),
            ));
        }
        if spec.datasets.is_empty() {
            return Err(FitError::Setup("datasets: the list is empty".into()));
        }
        let tdoc = serde_json::to_value(target).map_err(|e| FitError::Setup(e.to_string()))?;
        let ldoc = serde_json::to_value(laser).map_err(|e| FitError::Setup(e.to_string()))?;
        let mut slots = Vec::new();
        let mut params = Vec::new();
        for (i, p) in spec.parameters.iter().enumerate() {
            let key = format!("parameters[{i}].address");
            let a: Address = p
                .address
                .parse()
                .map_err(|e| FitError::Setup(format!("{key}: {e}")))?;
            let doc = match a.document {
                Document::Target => &tdoc,
                Document::Laser => &ldoc,
                Document::Setup => {
                    return Err(FitError::Setup(format!(
                        "{key}: \"{}\" points into the setup, which needs the detection layer",
                        p.address
                    )));
                }
            };
            let current = a
                .get(doc)
                .map_err(|e| FitError::Setup(format!("{key}: {e}")))?;
            params.push(FreeParameter {
                name: p.address.clone(),
                start: p.start.unwrap_or(current),
                lower: p.lower.unwrap_or(f64::NEG_INFINITY),
                upper: p.upper.unwrap_or(f64::INFINITY),
                periodic: p.periodic,
            });
            slots.push(Slot::Address(a));
        }
        if let Some(r) = spec.nuisance.intensity_calibration {
            params.push(FreeParameter {
                name: "intensity_calibration".into(),
                start: r.start,
                lower: r.lower,
                upper: r.upper,
                periodic: false,
            });
            slots.push(Slot::IntensityCalibration);
        }
        let mut datasets = Vec::new();
        for (k, d) in spec.datasets.iter().enumerate() {
            if spec.datasets[..k].iter().any(|o| o.label == d.label) {
                return Err(FitError::Setup(format!(
                    "datasets[{k}].label \"{}\" is used twice",
                    d.label
                )));
            }
            if let Some(r) = spec.nuisance.background {
                params.push(FreeParameter {
                    name: format!("background[{}]", d.label),
                    start: r.start,
                    lower: r.lower,
                    upper: r.upper,
                    periodic: false,
                });
                slots.push(Slot::Background(k));
            }
            let mut conditions = Vec::new();
            for (addr, v) in &d.conditions {
                let key = format!("datasets[{k}].conditions.\"{addr}\"");
                let a: Address = addr
                    .parse()
                    .map_err(|e| FitError::Setup(format!("{key}: {e}")))?;
                if spec.parameters.iter().any(|p| p.address == *addr) {
                    return Err(FitError::Setup(format!(
                        "{key}: the same value is a free parameter; a value is either fitted or \
                         a condition"
                    )));
                }
                conditions.push((a, *v));
            }
            let text = tables
                .get(k)
                .ok_or_else(|| FitError::Setup(format!("datasets[{k}]: no table text given")))?;
            datasets.push(load_dataset(
                spec, k, text, &tdoc, &ldoc, conditions, d.scale,
            )?);
        }
        let fit = SpectrumFit {
            target: tdoc,
            laser: ldoc,
            len: datasets.iter().map(|d| d.y.len()).sum(),
            datasets,
            slots,
            params,
            mode: spec.fitter.residuals,
            model,
        };
        super::parameters::validate_all(&fit.params)?;
        // Every document must read back at the start values (a bad address value fails here).
        let start: Vec<f64> = fit.params.iter().map(|p| p.start).collect();
        for d in 0..fit.datasets.len() {
            fit.documents(&start, d)?;
        }
        Ok(fit)
    }

    /// Number of profiled scales (for the degrees of freedom).
    pub fn profiled(&self) -> usize {
        self.datasets
            .iter()
            .filter(|d| matches!(d.scale, ScaleSpec::Profiled))
            .count()
    }

    /// The target and laser of dataset `d` at `theta`.
    pub fn documents(&self, theta: &[f64], d: usize) -> Result<(TargetSpec, LaserSpec), FitError> {
        documents_at(
            &self.target,
            &self.laser,
            &self.datasets[d].conditions,
            &self.slots,
            theta,
        )
    }

    /// Every dataset's model at `theta`.
    pub fn evaluate(&self, theta: &[f64]) -> Result<Vec<Evaluated>, FitError> {
        (0..self.datasets.len())
            .into_par_iter()
            .map(|d| self.evaluate_one(theta, d))
            .collect()
    }

    fn evaluate_one(&self, theta: &[f64], d: usize) -> Result<Evaluated, FitError> {
        let ds = &self.datasets[d];
        let (t, l) = self.documents(theta, d)?;
        let mut m = self
            .model
            .yields(&t, &l, &ds.energies)
            .map_err(|e| FitError::Model(format!("dataset {}: {e}", ds.label)))?;
        let background = self.slots.iter().zip(theta).find_map(|(s, v)| match s {
            Slot::Background(k) if *k == d => Some(*v),
            _ => None,
        });
        if let Some(b) = background {
            let mean = m.iter().sum::<f64>() / m.len() as f64;
            for x in &mut m {
                *x += b * mean;
            }
        }
        let sig = |i: usize| ds.sigma.as_ref().map(|s| s[i]);
        let (scale, residuals) = match self.mode {
            ResidualMode::Log => {
                if let Some(i) = m.iter().position(|&x| !(x > 0.0 && x.is_finite())) {
                    return Err(FitError::Model(format!(
                        "dataset {}: the model yield at order {:.3} is {}, which has no logarithm",
                        ds.label, ds.orders[i], m[i]
                    )));
                }
                let sl: Vec<f64> = (0..m.len())
                    .map(|i| sig(i).map(|s| s / ds.y[i]).unwrap_or(1.0))
                    .collect();
                let ln_s = match ds.scale {
                    ScaleSpec::Fixed(s) => s.ln(),
                    ScaleSpec::Profiled => {
                        let (mut a, mut b) = (0.0, 0.0);
                        for i in 0..m.len() {
                            let w = 1.0 / (sl[i] * sl[i]);
                            a += w * (ds.y[i].ln() - m[i].ln());
                            b += w;
                        }
                        a / b
                    }
                };
                let r = (0..m.len())
                    .map(|i| (ds.y[i].ln() - m[i].ln() - ln_s) / sl[i])
                    .collect();
                (ln_s.exp(), r)
            }
            ResidualMode::Linear => {
                let s_y: Vec<f64> = (0..m.len()).map(|i| sig(i).unwrap_or(1.0)).collect();
                let s = match ds.scale {
                    ScaleSpec::Fixed(s) => s,
                    ScaleSpec::Profiled => {
                        let (mut a, mut b) = (0.0, 0.0);
                        for i in 0..m.len() {
                            let w = 1.0 / (s_y[i] * s_y[i]);
                            a += w * ds.y[i] * m[i];
                            b += w * m[i] * m[i];
                        }
                        if b > 0.0 { a / b } else { 0.0 }
                    }
                };
                let r = (0..m.len())
                    .map(|i| (ds.y[i] - s * m[i]) / s_y[i])
                    .collect();
                (s, r)
            }
        };
        let model = m.iter().map(|x| x * scale).collect();
        Ok(Evaluated {
            model,
            scale,
            residuals,
        })
    }
}

/// The documents of one dataset: base, then its conditions, then the free parameters.
pub fn documents_at(
    target: &Value,
    laser: &Value,
    conditions: &[(Address, f64)],
    slots: &[Slot],
    theta: &[f64],
) -> Result<(TargetSpec, LaserSpec), FitError> {
    let mut t = target.clone();
    let mut l = laser.clone();
    let set = |a: &Address, v: f64, t: &mut Value, l: &mut Value| -> Result<(), FitError> {
        let doc = match a.document {
            Document::Target => t,
            Document::Laser => l,
            Document::Setup => {
                return Err(FitError::Setup(format!(
                    "{a}: the setup needs the detection layer"
                )));
            }
        };
        a.set(doc, v).map_err(|e| FitError::Setup(e.to_string()))
    };
    for (a, v) in conditions {
        set(a, *v, &mut t, &mut l)?;
    }
    for (s, v) in slots.iter().zip(theta) {
        match s {
            Slot::Address(a) => set(a, *v, &mut t, &mut l)?,
            Slot::IntensityCalibration => {
                if let Some(colours) = l.get_mut("colours").and_then(Value::as_array_mut) {
                    for c in colours {
                        if let Some(i) = c.get("intensity_wcm2").and_then(Value::as_f64) {
                            c["intensity_wcm2"] = serde_json::json!(i * v);
                        }
                    }
                }
            }
            Slot::Background(_) => {}
        }
    }
    let ts: TargetSpec = serde_json::from_value(t)
        .map_err(|e| FitError::Setup(format!("the target with the parameters set: {e}")))?;
    let ls: LaserSpec = serde_json::from_value(l)
        .map_err(|e| FitError::Setup(format!("the laser with the parameters set: {e}")))?;
    Ok((ts, ls))
}

#[allow(clippy::too_many_arguments)]
fn load_dataset(
    spec: &FitSpec,
    k: usize,
    text: &str,
    tdoc: &Value,
    ldoc: &Value,
    conditions: Vec<(Address, f64)>,
    scale: ScaleSpec,
) -> Result<Dataset, FitError> {
    let d = &spec.datasets[k];
    let src = format!("dataset {} ({})", d.label, d.file);
    let table = measured::parse(text, &src, &d.columns)?;
    let (t, l) = documents_at(tdoc, ldoc, &conditions, &[], &[])?;
    let target = t
        .validate()
        .map_err(|e| FitError::Setup(format!("{src}: target under its conditions: {e}")))?;
    let field = l
        .to_field()
        .map_err(|e| FitError::Setup(format!("{src}: laser under its conditions: {e}")))?;
    let omega = field.omega();
    let (energies, y, sigma, rows) = match d.kind {
        DataKind::Lines => {
            let e: Vec<f64> = table
                .x
                .iter()
                .map(|&x| energy(x, d.x_unit, omega))
                .collect();
            (e, table.y.clone(), table.sigma.clone(), table.rows.clone())
        }
        DataKind::Continuous => {
            let e: Vec<f64> = table
                .x
                .iter()
                .map(|&x| energy(x, d.x_unit, omega))
                .collect();
            let (lo, hi) = e
                .iter()
                .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
                    (a.min(v), b.max(v))
                });
            let orders = match &d.orders {
                Some(o) => o.clone(),
                None => {
                    let w = d.window_half_width_orders;
                    let first = ((lo / omega + w).ceil() as i64) | 1;
                    (0..)
                        .map(|j| (first + 2 * j) as f64)
                        .take_while(|q| (q + w) * omega <= hi)
                        .collect()
                }
            };
            if orders.is_empty() {
                return Err(data_err(format!(
                    "{src}: no whole line window fits inside the measured range"
                )));
            }
            let (y, s) = integrate_lines(
                &table.x,
                &table.y,
                table.sigma.as_deref(),
                d.x_unit,
                omega,
                &orders,
                d.window_half_width_orders,
                d.background,
                &src,
            )?;
            let rows = orders
                .iter()
                .map(|q| {
                    let k = e
                        .iter()
                        .enumerate()
                        .min_by(|a, b| (a.1 - q * omega).abs().total_cmp(&(b.1 - q * omega).abs()))
                        .map(|(i, _)| i)
                        .unwrap_or(0);
                    table.rows[k]
                })
                .collect();
            (orders.iter().map(|q| q * omega).collect(), y, s, rows)
        }
    };
    if y.is_empty() {
        return Err(data_err(format!("{src}: the dataset is empty")));
    }
    let sigma = match (sigma, d.relative_uncertainty) {
        (Some(s), _) => Some(s),
        (None, Some(r)) => {
            if !(r > 0.0 && r.is_finite()) {
                return Err(FitError::Setup(format!(
                    "datasets[{k}].relative_uncertainty = {r}: must be positive"
                )));
            }
            Some(y.iter().map(|v| r * v.abs()).collect())
        }
        (None, None) => None,
    };
    if spec.fitter.residuals == ResidualMode::Log {
        for (i, v) in y.iter().enumerate() {
            if v.is_nan() || *v <= 0.0 {
                return Err(data_err(format!(
                    "{src}: row {}: yield {v} is not positive, which log residuals cannot use \
                     (use \"residuals\": \"linear\" or remove the row)",
                    rows[i]
                )));
            }
        }
    }
    // Range: above the lowest ionization potential and at most 30 % past the cutoff estimate
    // Ip_max + 3.17 Up of the dataset's field.
    let ip_min = target
        .channels
        .iter()
        .map(|c| c.ip)
        .fold(f64::INFINITY, f64::min);
    let ip_max = target.channels.iter().map(|c| c.ip).fold(0.0, f64::max);
    let top = 1.3 * (ip_max + 3.17 * field.ponderomotive_energy());
    for (i, &e) in energies.iter().enumerate() {
        if !(e > ip_min && e <= top) {
            return Err(data_err(format!(
                "{src}: row {}: photon energy {:.3} eV (order {:.2}) lies outside the computed \
                 range {:.3}..{:.3} eV (above the lowest ionization potential, at most 30 % past \
                 the cutoff estimate Ip + 3.17 Up)",
                rows[i],
                crate::units::au_to_ev(e),
                e / omega,
                crate::units::au_to_ev(ip_min),
                crate::units::au_to_ev(top)
            )));
        }
    }
    let orders = energies.iter().map(|e| e / omega).collect();
    Ok(Dataset {
        label: d.label.clone(),
        file: d.file.clone(),
        orders,
        energies,
        y,
        sigma,
        rows,
        conditions,
        scale,
    })
}

impl Residuals for SpectrumFit<'_> {
    fn len(&self) -> usize {
        self.len
    }

    fn residuals(&self, theta: &[f64]) -> Result<Vec<f64>, FitError> {
        let e = self.evaluate(theta)?;
        Ok(e.into_iter().flat_map(|d| d.residuals).collect())
    }
}
