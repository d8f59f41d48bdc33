//! Exact labels of a photon-energy grid: the grid is a lattice `FIRST + k·STEP` of decimal
//! numbers, and its labels are computed on the lattice as rationals `n / 10^s`, so that they
//! print without floating-point noise (`23`, never `23.000000000000004`).
//!
//! The rule (README, "Conventions"): the column of the grid's own unit (`order` for
//! `--orders` and the default grid, `energy_ev` for `--energies`) holds the exact lattice value
//! `(FIRST·10^s + k·STEP·10^s) / 10^s`, printed as the shortest decimal (no trailing zeros; an
//! integer has no decimal point). FIRST and STEP are the decimals as typed (or chosen by the
//! default rule). The photon energies used in the computation are the floating-point values
//! `FIRST + k·STEP` (as before the labels existed); they differ from the labels by rounding
//! only (checked: relative difference below 1e-12). The other unit's column is computed in
//! floating point and printed as the shortest decimal that reads back to the same `f64`.

use std::fmt;

/// An exact decimal `mantissa / 10^scale`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Decimal {
    mantissa: i128,
    scale: u32,
}

/// Largest number of decimal digits after the point a label may carry.
const MAX_SCALE: u32 = 30;

impl Decimal {
    /// `mantissa / 10^scale`.
    pub fn new(mantissa: i64, scale: u32) -> Self {
        let mut d = Self {
            mantissa: i128::from(mantissa),
            scale,
        };
        d.normalise();
        d
    }

    /// An integer.
    pub fn integer(n: i64) -> Self {
        Self {
            mantissa: i128::from(n),
            scale: 0,
        }
    }

    /// Parses a decimal number as typed (`11`, `0.001`, `-2.5`, `1e-3`, `2.5E2`); None if it is
    /// not one or has more digits than a label can hold.
    pub fn parse(text: &str) -> Option<Self> {
        let t = text.trim();
        let (body, exp) = match t.find(['e', 'E']) {
            Some(i) => (&t[..i], t[i + 1..].parse::<i32>().ok()?),
            None => (t, 0),
        };
        let (neg, body) = match body.as_bytes().first()? {
            b'-' => (true, &body[1..]),
            b'+' => (false, &body[1..]),
            _ => (false, body),
        };
        let (int, frac) = body.split_once('.').unwrap_or((body, ""));
        if int.is_empty() && frac.is_empty() {
            return None;
        }
        if !int.bytes().chain(frac.bytes()).all(|b| b.is_ascii_digit()) {
            return None;
        }
        let mut mantissa: i128 = 0;
        for b in int.bytes().chain(frac.bytes()) {
            mantissa = mantissa
                .checked_mul(10)?
                .checked_add(i128::from(b - b'0'))?;
        }
        let mut scale = i64::try_from(frac.len()).ok()? - i64::from(exp);
        while scale < 0 {
            mantissa = mantissa.checked_mul(10)?;
            scale += 1;
        }
        let mut d = Self {
            mantissa: if neg { -mantissa } else { mantissa },
            scale: u32::try_from(scale).ok()?,
        };
        d.normalise();
        (d.scale <= MAX_SCALE).then_some(d)
    }

    /// The shortest decimal that reads back as `x` (Rust's round-trip formatting); None for
    /// non-finite values or values whose digits do not fit.
    pub fn from_f64(x: f64) -> Option<Self> {
        if !x.is_finite() {
            return None;
        }
        Self::parse(&format!("{x:e}"))
    }

    /// Drops trailing zeros after the point.
    fn normalise(&mut self) {
        while self.scale > 0 && self.mantissa % 10 == 0 {
            self.mantissa /= 10;
            self.scale -= 1;
        }
    }

    /// Both numbers on a common scale.
    fn common(a: Self, b: Self) -> Option<(i128, i128, u32)> {
        let s = a.scale.max(b.scale);
        let up = |d: Self| {
            10i128
                .checked_pow(s - d.scale)
                .and_then(|f| d.mantissa.checked_mul(f))
        };
        Some((up(a)?, up(b)?, s))
    }

    /// `self + k·step`, exactly (None on overflow).
    pub fn add_multiple(self, step: Self, k: u64) -> Option<Self> {
        let (a, b, scale) = Self::common(self, step)?;
        let mantissa = b.checked_mul(i128::from(k))?.checked_add(a)?;
        let mut d = Self { mantissa, scale };
        d.normalise();
        Some(d)
    }

    /// `k·self`, exactly (None on overflow).
    pub fn times(self, k: i64) -> Option<Self> {
        let mut d = Self {
            mantissa: self.mantissa.checked_mul(i128::from(k))?,
            scale: self.scale,
        };
        d.normalise();
        Some(d)
    }

    /// The nearest `f64` (through the decimal text, so correctly rounded).
    pub fn to_f64(self) -> f64 {
        self.to_string().parse().unwrap_or(f64::NAN)
    }
}

impl Decimal {
    /// Appends the plain decimal notation: no exponent, no trailing zeros, no point for
    /// integers (`23`, `11.001`, `0.05`).
    pub fn write_to(&self, out: &mut Vec<u8>) {
        if self.mantissa < 0 {
            out.push(b'-');
        }
        let mut buffer = itoa::Buffer::new();
        let digits = buffer.format(self.mantissa.unsigned_abs()).as_bytes();
        let s = self.scale as usize;
        if s == 0 {
            out.extend_from_slice(digits);
        } else if digits.len() > s {
            let (i, frac) = digits.split_at(digits.len() - s);
            out.extend_from_slice(i);
            out.push(b'.');
            out.extend_from_slice(frac);
        } else {
            out.extend_from_slice(b"0.");
            out.resize(out.len() + s - digits.len(), b'0');
            out.extend_from_slice(digits);
        }
    }
}

impl fmt::Display for Decimal {
    /// As [`Decimal::write_to`].
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut out = Vec::new();
        self.write_to(&mut out);
        f.write_str(std::str::from_utf8(&out).map_err(|_| fmt::Error)?)
    }
}

/// The unit of a grid's lattice.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum GridUnit {
    /// Harmonic orders Ω/ω (column `order`).
    Order,
    /// Photon energies in eV (column `energy_ev`).
    ElectronVolt,
}

/// A photon-energy grid `FIRST + k·STEP`, `k = 0 … count−1`: the exact labels and the
/// floating-point values used in the computation.
#[derive(Clone, Debug, PartialEq)]
pub struct Lattice {
    unit: GridUnit,
    first: Decimal,
    step: Decimal,
    first_value: f64,
    step_value: f64,
    count: usize,
    rule: String,
    /// For a rational lattice `n/q` ([`Lattice::rational`]): `(first n, stride, q)`.
    rational: Option<(i64, i64, i64)>,
}

/// The label of `n/q`: the exact decimal when `q` divides a power of ten (`q = 2^a 5^b`), else
/// the shortest decimal that reads back as the nearest double of `n/q`.
fn ratio_label(n: i64, q: i64) -> Option<Decimal> {
    let exact = (0..=18u32).find_map(|s| {
        let p = 10i64.checked_pow(s)?;
        if p % q != 0 {
            return None;
        }
        Some(Decimal::new(n.checked_mul(p / q)?, s))
    });
    exact.or_else(|| Decimal::from_f64(n as f64 / q as f64))
}

/// Relative difference allowed between a label and the value computed in floating point.
const LABEL_TOLERANCE: f64 = 1e-12;

impl Lattice {
    /// The lattice from `first` to `last` (inclusive, up to 1e-9 of a step) in steps of `step`:
    /// exact decimals for the labels, `first_value`, `step_value` for the computed points
    /// (`first_value + k·step_value`). `rule` says in words how the grid was chosen. Errors if
    /// the exact and computed values disagree by more than rounding.
    pub fn new(
        unit: GridUnit,
        (first, first_value): (Decimal, f64),
        (step, step_value): (Decimal, f64),
        last_value: f64,
        rule: impl Into<String>,
    ) -> Result<Self, String> {
        let count = ((last_value - first_value) / step_value + 1e-9).floor() as usize + 1;
        let lattice = Self {
            unit,
            first,
            step,
            first_value,
            step_value,
            count,
            rule: rule.into(),
            rational: None,
        };
        for (value, label) in [(first_value, first), (step_value, step)] {
            let exact = label.to_f64();
            if (value - exact).abs() > LABEL_TOLERANCE * exact.abs().max(f64::MIN_POSITIVE) {
                return Err(format!(
                    "internal: grid label {label} and value {value:e} differ beyond rounding"
                ));
            }
        }
        if lattice.label(count - 1).is_none() {
            return Err(format!(
                "grid labels from {first} in steps of {step} do not fit in {MAX_SCALE} digits"
            ));
        }
        Ok(lattice)
    }

    /// The rational lattice `n/q`, `n = first, first + stride, …` (`count` points), of the
    /// default grid ([`crate::grid::DefaultGrid`]). The values are `n/q` rounded once to the
    /// nearest double (as [`crate::grid::DefaultGrid::orders`]). The labels are exact decimals
    /// when `q` divides a power of ten (every integer `q` of one-colour fields and pulses, whose
    /// `q` is 1 or 10); otherwise (`q` = 3, 7, … for commensurate colours) no finite decimal is
    /// exact and the label is the shortest decimal that reads back as the value.
    pub fn rational(
        unit: GridUnit,
        first: i64,
        stride: i64,
        count: usize,
        q: i64,
        rule: impl Into<String>,
    ) -> Result<Self, String> {
        if q <= 0 || stride <= 0 || count == 0 {
            return Err(format!(
                "internal: rational lattice with q = {q}, stride = {stride}, {count} points"
            ));
        }
        let value = |n: i64| n as f64 / q as f64;
        let label = |n: i64| {
            ratio_label(n, q).ok_or_else(|| format!("grid order {n}/{q} cannot be labelled"))
        };
        let last = first
            .checked_add(
                stride
                    .checked_mul(count as i64 - 1)
                    .ok_or("grid too long for its labels")?,
            )
            .ok_or("grid too long for its labels")?;
        label(last)?;
        Ok(Self {
            unit,
            first: label(first)?,
            step: label(stride)?,
            first_value: value(first),
            step_value: value(stride),
            count,
            rule: rule.into(),
            rational: Some((first, stride, q)),
        })
    }

    /// A lattice read from typed `FIRST`, `STEP` text and the parsed values (exact labels from
    /// the text when it is a plain decimal, else from the shortest round-trip of the value).
    pub fn from_text(
        unit: GridUnit,
        (first_text, first): (&str, f64),
        (step_text, step): (&str, f64),
        last: f64,
        rule: impl Into<String>,
    ) -> Result<Self, String> {
        let exact = |text: &str, x: f64| {
            Decimal::parse(text)
                .or_else(|| Decimal::from_f64(x))
                .ok_or_else(|| format!("grid value {text:?} has too many digits for a label"))
        };
        Self::new(
            unit,
            (exact(first_text, first)?, first),
            (exact(step_text, step)?, step),
            last,
            rule,
        )
    }

    /// Unit of the labels.
    pub fn unit(&self) -> GridUnit {
        self.unit
    }

    /// Number of points.
    pub fn len(&self) -> usize {
        self.count
    }

    /// Whether the grid is empty (never, for a grid built by [`Lattice::new`]).
    pub fn is_empty(&self) -> bool {
        self.count == 0
    }

    /// First label.
    pub fn first(&self) -> Decimal {
        self.first
    }

    /// The step.
    pub fn step(&self) -> Decimal {
        self.step
    }

    /// How the grid was chosen, in words.
    pub fn rule(&self) -> &str {
        &self.rule
    }

    /// Exact label of point `k` (None on overflow, which [`Lattice::new`] excludes).
    pub fn label(&self, k: usize) -> Option<Decimal> {
        match self.rational {
            Some((first, stride, q)) => {
                let n = first.checked_add(stride.checked_mul(k as i64)?)?;
                ratio_label(n, q)
            }
            None => self.first.add_multiple(self.step, k as u64),
        }
    }

    /// The floating-point values `first + k·step` used in the computation, in the grid's unit.
    pub fn values(&self) -> Vec<f64> {
        if let Some((first, stride, q)) = self.rational {
            return (0..self.count as i64)
                .map(|k| (first + k * stride) as f64 / q as f64)
                .collect();
        }
        (0..self.count)
            .map(|k| self.first_value + self.step_value * k as f64)
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_and_prints_decimals() {
        for (text, shown) in [
            ("11", "11"),
            ("0.001", "0.001"),
            ("23.000", "23"),
            ("1e-3", "0.001"),
            ("2.5E2", "250"),
            ("-0.25", "-0.25"),
            (".5", "0.5"),
        ] {
            assert_eq!(Decimal::parse(text).unwrap().to_string(), shown, "{text}");
        }
        for bad in ["", "-", "1.2.3", "abc", "1e", "0x10"] {
            assert!(Decimal::parse(bad).is_none(), "{bad}");
        }
    }

    #[test]
    fn rational_lattices_label_exactly_where_a_decimal_can() {
        // Pulse grid: n/10.
        let pulse = Lattice::rational(GridUnit::Order, 153, 1, 5, 10, "r").unwrap();
        let labels: Vec<String> = (0..5)
            .map(|k| pulse.label(k).unwrap().to_string())
            .collect();
        assert_eq!(labels, ["15.3", "15.4", "15.5", "15.6", "15.7"]);
        assert_eq!(pulse.values()[2], 155.0 / 10.0);
        // Odd orders.
        let odd = Lattice::rational(GridUnit::Order, 15, 2, 3, 1, "r").unwrap();
        assert_eq!(odd.label(2).unwrap().to_string(), "19");
        // q = 3 has no finite decimal: the shortest round-trip of n/q.
        let third = Lattice::rational(GridUnit::Order, 31, 2, 2, 3, "r").unwrap();
        assert_eq!(
            third.label(0).unwrap().to_string(),
            (31.0f64 / 3.0).to_string()
        );
        assert_eq!(third.label(1).unwrap().to_f64(), 33.0 / 3.0);
    }

    #[test]
    fn labels_are_exact_where_floats_are_not() {
        // 0.1 is not a binary fraction: 92·0.1 + 0.1 = 9.3 carries noise in f64 arithmetic.
        let step = Decimal::parse("0.1").unwrap();
        let first = Decimal::integer(11);
        assert_eq!(first.add_multiple(step, 120).unwrap().to_string(), "23");
        assert_eq!(step.times(93).unwrap().to_string(), "9.3");
        assert_eq!(
            Decimal::from_f64(0.1 * 3.0).unwrap().to_string(),
            "0.30000000000000004"
        );
    }
}
