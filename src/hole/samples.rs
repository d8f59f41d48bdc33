//! Samples of the lab-frame laser field on the propagator grid, shared by all orientations.

use nalgebra::Vector3;

use super::error::HoleError;
use super::grid::{Grid, GridTime};
use super::magnus::{FOURTH_NODES, SIXTH_NODES};

/// Default largest grid step (a.u. of time) of [`FieldSamples::new`].
///
/// With the sixth-order scheme the error of `U_I(t₂, t₁)` at this step stays below 1e-10 for
/// fields up to 0.1 a.u. with Fourier components up to about 0.12 a.u. (ω and 2ω at 800 nm),
/// dipole elements up to 3 a.u. and `Ip` differences up to 1 a.u., over windows of up to
/// 4 cycles at 800 nm (worst of twelve random such models: 2.6e-11; against SciPy in
/// `tests/hole.rs`: 2.6e-11). See the error model in the module documentation.
pub const DEFAULT_MAX_STEP: f64 = 0.12;

/// Largest number of steps accepted (a guard against runaway memory use: a propagator stores
/// `32 N²` bytes per node, 2 GB for 8 channels at this limit).
pub const MAX_STEPS: usize = 1_000_000;

/// Fewest Magnus steps: the lookup interpolates on four neighbouring nodes.
const MIN_STEPS: usize = 3;

/// The lab-frame field `E(t)` sampled once on a uniform grid over `[t_start, t_end]`: at the
/// grid nodes (the step boundaries, where the propagator is stored) and at the Gauss–Legendre
/// nodes of every Magnus step of both schemes.
///
/// The field is the same for every molecular orientation, so one `FieldSamples` serves all the
/// [`super::HolePropagator`]s of a calculation.
#[derive(Debug, Clone, PartialEq)]
pub struct FieldSamples {
    t_start: f64,
    t_end: f64,
    step: f64,
    steps: usize,
    nodes: Vec<[f64; 3]>,
    sixth: Vec<[[f64; 3]; 3]>,
    fourth: Vec<[[f64; 3]; 2]>,
}

impl FieldSamples {
    /// Samples `field` (lab-frame electric field in a.u., a function of time in a.u.) for
    /// `n = max(3, ⌈(t_end − t_start)/max_step⌉)` equal Magnus steps of length
    /// `h = (t_end − t_start)/n ≤ max_step` (use [`DEFAULT_MAX_STEP`] unless you have a reason).
    /// The propagator is stored at the `n + 1` grid nodes `t_start + kh`.
    ///
    /// The closure is called only at times inside `[t_start, t_end]`.
    ///
    /// # Errors
    /// [`HoleError::Window`] unless `t_start < t_end` are finite (with a finite span),
    /// [`HoleError::MaxStep`] unless `max_step` is positive and finite and gives at most
    /// [`MAX_STEPS`] steps, [`HoleError::NonFiniteField`] if the field is NaN or infinite at a
    /// sample (naming the time and component).
    pub fn new(
        field: &dyn Fn(f64) -> Vector3<f64>,
        t_start: f64,
        t_end: f64,
        max_step: f64,
    ) -> Result<Self, HoleError> {
        let span = t_end - t_start;
        if !(t_start.is_finite() && t_end.is_finite() && span.is_finite() && span > 0.0) {
            return Err(HoleError::Window { t_start, t_end });
        }
        if !(max_step.is_finite() && max_step > 0.0) {
            return Err(HoleError::MaxStep {
                value: max_step,
                reason: "the grid step must be a positive finite number (a.u. of time)".into(),
            });
        }
        let wanted = (span / max_step).ceil();
        if wanted.is_nan() || wanted > MAX_STEPS as f64 {
            return Err(HoleError::MaxStep {
                value: max_step,
                reason: format!(
                    "the window [{t_start}, {t_end}] would need {wanted:e} steps, more than the {MAX_STEPS} allowed; choose a larger step or a shorter window"
                ),
            });
        }
        let steps = (wanted as usize).max(MIN_STEPS);
        let step = span / steps as f64;
        let sample = |t: f64| -> Result<[f64; 3], HoleError> {
            let e = field(t);
            for (value, component) in e.iter().zip(["x", "y", "z"]) {
                if !value.is_finite() {
                    return Err(HoleError::NonFiniteField {
                        time: t,
                        component,
                        value: *value,
                    });
                }
            }
            Ok([e[0], e[1], e[2]])
        };
        let boundary = |k: usize| {
            if k == steps {
                t_end
            } else {
                t_start + k as f64 * step
            }
        };
        let mut nodes = Vec::with_capacity(steps + 1);
        let mut sixth = Vec::with_capacity(steps);
        let mut fourth = Vec::with_capacity(steps);
        for k in 0..=steps {
            nodes.push(sample(boundary(k))?);
        }
        for k in 0..steps {
            let t = boundary(k);
            sixth.push([
                sample(t + SIXTH_NODES[0] * step)?,
                sample(t + SIXTH_NODES[1] * step)?,
                sample(t + SIXTH_NODES[2] * step)?,
            ]);
            fourth.push([
                sample(t + FOURTH_NODES[0] * step)?,
                sample(t + FOURTH_NODES[1] * step)?,
            ]);
        }
        Ok(Self {
            t_start,
            t_end,
            step,
            steps,
            nodes,
            sixth,
            fourth,
        })
    }

    /// Start of the window (a.u.).
    pub fn t_start(&self) -> f64 {
        self.t_start
    }

    /// End of the window (a.u.).
    pub fn t_end(&self) -> f64 {
        self.t_end
    }

    /// The grid step `h` (a.u.): the Magnus step and the spacing of the nodes.
    pub fn step(&self) -> f64 {
        self.step
    }

    /// Number of steps `n` (there are `n + 1` nodes).
    pub fn steps(&self) -> usize {
        self.steps
    }

    /// Time of node `k` (`t_start + kh`; node `n` is exactly `t_end`), or `None` for `k > n`.
    pub fn node_time(&self, k: usize) -> Option<f64> {
        match k {
            k if k == self.steps => Some(self.t_end),
            k if k < self.steps => Some(self.t_start + k as f64 * self.step),
            _ => None,
        }
    }

    /// Resolves a time of the window on the grid, for repeated lookups with
    /// [`super::HolePropagator::element_at`].
    ///
    /// # Errors
    /// [`HoleError::TimeOutsideWindow`] (named `t`) if `t` is not finite or lies outside the
    /// window (beyond a rounding slack of `1e-12 · max(1, |t_start|, |t_end|)`).
    pub fn locate(&self, t: f64) -> Result<GridTime, HoleError> {
        self.grid().locate("t", t)
    }

    pub(crate) fn grid(&self) -> Grid {
        Grid {
            t_start: self.t_start,
            t_end: self.t_end,
            step: self.step,
            steps: self.steps,
        }
    }

    pub(crate) fn node_fields(&self) -> &[[f64; 3]] {
        &self.nodes
    }

    pub(crate) fn sixth_fields(&self) -> &[[[f64; 3]; 3]] {
        &self.sixth
    }

    pub(crate) fn fourth_fields(&self) -> &[[[f64; 3]; 2]] {
        &self.fourth
    }
}
