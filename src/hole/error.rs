//! Errors of the ionic (hole) propagator.

use thiserror::Error;

/// Why an ion model, a field sampling, a propagator or a lookup was rejected.
///
/// Every message names the parameter, the offending value and the reason.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum HoleError {
    /// The number of channels is zero or above [`super::MAX_CHANNELS`].
    #[error(
        "energies: {found} channels given; the hole propagator needs between 1 and {max} channels"
    )]
    ChannelCount {
        /// Number of channels given.
        found: usize,
        /// Largest supported number.
        max: usize,
    },
    /// A matrix does not have one row and one column per channel.
    #[error(
        "{parameter}: shape {rows}×{cols}, expected {expected}×{expected} (one row and column per channel)"
    )]
    Shape {
        /// Name of the matrix (`coupling`, `dipole_x`, ...).
        parameter: &'static str,
        /// Rows given.
        rows: usize,
        /// Columns given.
        cols: usize,
        /// Number of channels.
        expected: usize,
    },
    /// An ionization potential is NaN or infinite.
    #[error("energies[{index}] = {value}: the ionization potential must be finite")]
    NonFiniteEnergy {
        /// Channel index.
        index: usize,
        /// Value given.
        value: f64,
    },
    /// A matrix element is NaN or infinite.
    #[error("{parameter}[({row}, {col})] = {re} + {im}i: matrix elements must be finite")]
    NonFiniteElement {
        /// Name of the matrix.
        parameter: &'static str,
        /// Row.
        row: usize,
        /// Column.
        col: usize,
        /// Real part given.
        re: f64,
        /// Imaginary part given.
        im: f64,
    },
    /// A matrix that must be Hermitian is not, beyond [`super::HERMITICITY_TOLERANCE`].
    #[error(
        "{parameter} is not Hermitian: element ({row}, {col}) = {re} + {im}i but the conjugate of element ({col}, {row}) is {conj_re} + {conj_im}i; they differ by {difference:e}, more than the allowed {allowed:e}"
    )]
    NotHermitian {
        /// Name of the matrix.
        parameter: &'static str,
        /// Row of the offending element.
        row: usize,
        /// Column of the offending element.
        col: usize,
        /// Real part of element (row, col).
        re: f64,
        /// Imaginary part of element (row, col).
        im: f64,
        /// Real part of the conjugate of element (col, row).
        conj_re: f64,
        /// Imaginary part of the conjugate of element (col, row).
        conj_im: f64,
        /// `|a_rc − conj(a_cr)|`.
        difference: f64,
        /// The tolerance applied to this element.
        allowed: f64,
    },
    /// The rotation matrix has a non-finite entry or is not orthogonal.
    #[error(
        "rotation: {reason} (max |RᵀR − I| entry = {deviation:e}, allowed {allowed:e}); pass the proper rotation matrix molecular → lab"
    )]
    Rotation {
        /// What is wrong.
        reason: &'static str,
        /// Largest entry of `|RᵀR − I|` (NaN if an entry of `R` is not finite).
        deviation: f64,
        /// Tolerance.
        allowed: f64,
    },
    /// The time window is empty, reversed or not finite.
    #[error(
        "time window: t_start = {t_start}, t_end = {t_end}; both must be finite with t_end > t_start"
    )]
    Window {
        /// Start given.
        t_start: f64,
        /// End given.
        t_end: f64,
    },
    /// The maximum grid step is not a positive finite number, or gives too many steps.
    #[error("max_step = {value}: {reason}")]
    MaxStep {
        /// Value given.
        value: f64,
        /// Why it was rejected.
        reason: String,
    },
    /// The field closure returned a non-finite component.
    #[error(
        "field: E({time}) has component {component} = {value}; the field must be finite in the whole window"
    )]
    NonFiniteField {
        /// Time of the bad sample.
        time: f64,
        /// Component name (`x`, `y` or `z`).
        component: &'static str,
        /// Value returned.
        value: f64,
    },
    /// A lookup time is not finite or lies outside the propagator's window.
    #[error("{parameter} = {value} lies outside the propagator window [{t_start}, {t_end}]")]
    TimeOutsideWindow {
        /// Which time (`t2` or `t1`).
        parameter: &'static str,
        /// Value given.
        value: f64,
        /// Window start.
        t_start: f64,
        /// Window end.
        t_end: f64,
    },
    /// A time resolved on one grid was used with a propagator built on another.
    #[error(
        "{parameter} = {time} was located on the grid of window [{located_start}, {located_end}] with {located_steps} steps, but the propagator's grid is [{own_start}, {own_end}] with {own_steps} steps; locate it with the FieldSamples the propagator was built from"
    )]
    GridMismatch {
        /// Which time (`t2` or `t1`).
        parameter: &'static str,
        /// The time.
        time: f64,
        /// Window start of the grid it was located on.
        located_start: f64,
        /// Window end of the grid it was located on.
        located_end: f64,
        /// Steps of the grid it was located on.
        located_steps: usize,
        /// The propagator's window start.
        own_start: f64,
        /// The propagator's window end.
        own_end: f64,
        /// The propagator's number of steps.
        own_steps: usize,
    },
    /// A channel index is out of range.
    #[error("{parameter} = {value}: channel index out of range, the model has {channels} channels")]
    ChannelIndex {
        /// Which index (`m` or `n`).
        parameter: &'static str,
        /// Value given.
        value: usize,
        /// Number of channels.
        channels: usize,
    },
}
