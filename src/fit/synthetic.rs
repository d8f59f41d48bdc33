//! Synthetic measured data: model line yields with seeded noise, for experiment design and for
//! testing the fit on data whose truth is known.
//!
//! Noise models:
//! - [`Noise::Poisson`]: the yields are scaled so that the strongest line of the dataset expects
//!   `peak_counts` counts, and each line's count is drawn from a Poisson distribution with that
//!   mean; the uncertainty column is `sqrt(max(count, 1))`. Lines with zero counts are kept
//!   (log residuals cannot use them; the data say so when fitted).
//! - [`Noise::RelativeGaussian`]: `y = m (1 + f·z)`, `z` standard normal, uncertainty `f·m`
//!   (the model value, as a measurement of the noise level would give); for small `f` the log
//!   residuals are then Gaussian with standard deviation `f`.
//!
//! The generator is xoshiro256++ seeded with the given seed (rand_xoshiro), so the same seed
//! gives the same bytes on every platform; draws go dataset by dataset, line by line.

use rand::SeedableRng;
use rand_distr::{Distribution, Normal, Poisson};
use rand_xoshiro::Xoshiro256PlusPlus;
use serde::{Deserialize, Serialize};

use super::FitError;

/// A noise model.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Noise {
    /// Poisson counts with this expectation at the strongest line.
    Poisson {
        /// Expected counts of the strongest line.
        peak_counts: f64,
    },
    /// Relative Gaussian noise of this standard deviation.
    RelativeGaussian {
        /// Relative standard deviation.
        fraction: f64,
    },
    /// No noise (uncertainty column: 1 % of the yield, for the weights).
    None,
}

/// Noisy yields and their uncertainties of one dataset.
pub type Drawn = (Vec<f64>, Vec<f64>);

/// Noisy yields and their uncertainties for model yields `m` of several datasets.
pub fn draw(models: &[Vec<f64>], noise: Noise, seed: u64) -> Result<Vec<Drawn>, FitError> {
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(seed);
    let mut out = Vec::new();
    for m in models {
        let mut y = Vec::with_capacity(m.len());
        let mut s = Vec::with_capacity(m.len());
        match noise {
            Noise::Poisson { peak_counts } => {
                if !(peak_counts > 0.0 && peak_counts.is_finite()) {
                    return Err(FitError::Setup(format!(
                        "peak counts {peak_counts}: must be positive"
                    )));
                }
                let top = m.iter().cloned().fold(0.0, f64::max);
                for &v in m {
                    let mean = peak_counts * v / top;
                    let c = if mean > 0.0 {
                        Poisson::new(mean)
                            .map_err(|e| FitError::Setup(format!("Poisson mean {mean}: {e}")))?
                            .sample(&mut rng)
                    } else {
                        0.0
                    };
                    y.push(c);
                    s.push(c.max(1.0).sqrt());
                }
            }
            Noise::RelativeGaussian { fraction } => {
                if !(fraction > 0.0 && fraction < 1.0) {
                    return Err(FitError::Setup(format!(
                        "relative noise {fraction}: must lie in (0, 1)"
                    )));
                }
                let n = Normal::new(0.0, 1.0).map_err(|e| FitError::Setup(e.to_string()))?;
                for &v in m {
                    let z: f64 = n.sample(&mut rng);
                    y.push(v * (1.0 + fraction * z));
                    s.push(fraction * v);
                }
            }
            Noise::None => {
                for &v in m {
                    y.push(v);
                    s.push(0.01 * v);
                }
            }
        }
        out.push((y, s));
    }
    Ok(out)
}

/// A line table in the format the fit reads: header `order yield uncertainty`, one line per
/// harmonic, `#` comment lines first.
pub fn table(comments: &[String], orders: &[f64], y: &[f64], s: &[f64]) -> String {
    let mut t = String::new();
    for c in comments {
        t.push_str("# ");
        t.push_str(c);
        t.push('\n');
    }
    t.push_str("order yield uncertainty\n");
    for i in 0..orders.len() {
        t.push_str(&format!("{} {:.10e} {:.10e}\n", orders[i], y[i], s[i]));
    }
    t
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_same_seed_gives_the_same_draws_and_poisson_means_hold() {
        let m = vec![vec![1.0, 0.5, 0.25]; 400];
        let a = draw(&m, Noise::Poisson { peak_counts: 400.0 }, 7).unwrap();
        let b = draw(&m, Noise::Poisson { peak_counts: 400.0 }, 7).unwrap();
        assert_eq!(a, b);
        // Mean of 400 draws of Poisson(100): 100 ± 0.5 (σ/√n = 10/20), checked at 4σ.
        let mean: f64 = a.iter().map(|(y, _)| y[2]).sum::<f64>() / 400.0;
        assert!((mean - 100.0).abs() < 2.0, "{mean}");
    }
}
