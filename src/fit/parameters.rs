//! Free parameters of a least-squares fit: start value, bounds and the periodic flag.
//!
//! A bounded parameter lives in `[lower, upper]`; the solver projects every trial point onto the
//! box (a projected Levenberg–Marquardt step: common practice, e.g. Kanzow, Yamashita and
//! Fukushima, J. Comput. Appl. Math. 172, 375 (2004)). A periodic parameter (a phase) has no
//! bounds in that sense: `lower` and `upper` give its period `upper − lower`, and every value is
//! wrapped into `[lower, upper)`; it can never sit at a bound.

use serde::{Deserialize, Serialize};

use super::FitError;

/// One free parameter.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct FreeParameter {
    /// Name (for a model parameter, its address such as `target.couplings[0].dipole_au[2]`).
    pub name: String,
    /// Start value.
    pub start: f64,
    /// Lower bound (`-inf` for none).
    pub lower: f64,
    /// Upper bound (`+inf` for none).
    pub upper: f64,
    /// Periodic quantity: `[lower, upper)` is one period.
    pub periodic: bool,
}

impl FreeParameter {
    /// An unbounded, non-periodic parameter.
    pub fn unbounded(name: &str, start: f64) -> Self {
        FreeParameter {
            name: name.to_string(),
            start,
            lower: f64::NEG_INFINITY,
            upper: f64::INFINITY,
            periodic: false,
        }
    }

    /// Checks the start, the bounds and the period; the message names the parameter.
    pub fn validate(&self) -> Result<(), FitError> {
        let bad = |reason: String| FitError::Parameter {
            name: self.name.clone(),
            reason,
        };
        if !self.start.is_finite() {
            return Err(bad(format!("start {} is not a finite number", self.start)));
        }
        if self.lower.is_nan() || self.upper.is_nan() {
            return Err(bad("a bound is NaN".into()));
        }
        if self.lower >= self.upper {
            return Err(bad(format!(
                "lower bound {} is not below upper bound {}",
                self.lower, self.upper
            )));
        }
        if self.periodic {
            if !(self.lower.is_finite() && self.upper.is_finite()) {
                return Err(bad(
                    "a periodic parameter needs finite lower and upper values (one period)".into(),
                ));
            }
        } else if self.start < self.lower || self.start > self.upper {
            return Err(bad(format!(
                "start {} lies outside the bounds [{}, {}]",
                self.start, self.lower, self.upper
            )));
        }
        Ok(())
    }

    /// The period of a periodic parameter.
    pub fn period(&self) -> Option<f64> {
        self.periodic.then_some(self.upper - self.lower)
    }

    /// `x` moved into the allowed set: wrapped into `[lower, upper)` for a periodic parameter,
    /// clamped to `[lower, upper]` otherwise.
    pub fn project(&self, x: f64) -> f64 {
        if self.periodic {
            let p = self.upper - self.lower;
            let w = (x - self.lower).rem_euclid(p) + self.lower;
            if w >= self.upper { self.lower } else { w }
        } else {
            x.clamp(self.lower, self.upper)
        }
    }

    /// The signed difference `a − b`, taken the short way round for a periodic parameter.
    pub fn difference(&self, a: f64, b: f64) -> f64 {
        let d = a - b;
        match self.period() {
            Some(p) => d - p * (d / p).round(),
            None => d,
        }
    }

    /// Whether `x` sits on a bound (never for a periodic parameter). "On" means within a
    /// relative 1e-10 of the bound's magnitude (or 1e-300 absolute at zero).
    pub fn at_bound(&self, x: f64) -> Option<Side> {
        if self.periodic {
            return None;
        }
        let near = |b: f64| (x - b).abs() <= 1e-10 * b.abs().max(1e-290);
        if self.lower.is_finite() && near(self.lower) {
            Some(Side::Lower)
        } else if self.upper.is_finite() && near(self.upper) {
            Some(Side::Upper)
        } else {
            None
        }
    }
}

/// Which bound.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Side {
    /// The lower bound.
    Lower,
    /// The upper bound.
    Upper,
}

/// Checks every parameter and that the names are distinct.
pub fn validate_all(params: &[FreeParameter]) -> Result<(), FitError> {
    if params.is_empty() {
        return Err(FitError::Setup("no free parameter".into()));
    }
    for (i, p) in params.iter().enumerate() {
        p.validate()?;
        if params[..i].iter().any(|q| q.name == p.name) {
            return Err(FitError::Parameter {
                name: p.name.clone(),
                reason: "appears twice among the free parameters".into(),
            });
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wraps_periodic_values_and_measures_the_short_way() {
        let p = FreeParameter {
            name: "phase".into(),
            start: 0.0,
            lower: -180.0,
            upper: 180.0,
            periodic: true,
        };
        assert_eq!(p.project(190.0), -170.0);
        assert_eq!(p.project(-540.0), -180.0);
        assert!((p.difference(170.0, -170.0) + 20.0).abs() < 1e-12);
        assert_eq!(p.at_bound(-180.0), None);
    }

    #[test]
    fn clamps_bounded_values_and_reports_the_bound() {
        let p = FreeParameter {
            name: "x".into(),
            start: 1.0,
            lower: 0.0,
            upper: 2.0,
            periodic: false,
        };
        assert_eq!(p.project(3.0), 2.0);
        assert_eq!(p.at_bound(2.0), Some(Side::Upper));
        assert_eq!(p.at_bound(0.0), Some(Side::Lower));
        assert_eq!(p.at_bound(1.0), None);
        let outside = FreeParameter { start: 5.0, ..p };
        let e = outside.validate().unwrap_err().to_string();
        assert!(e.contains("x") && e.contains("outside the bounds"), "{e}");
    }
}
