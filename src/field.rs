//! The driving laser field as a finite trigonometric sum, analytic in complex time.
//!
//! Every field holecast handles is written as
//!
//! ```text
//! A(t) = Σ_j [ a_j e^{−iν_j t} + conj(a_j) e^{+iν_j t} ],     ν_j > 0,  a_j ∈ C³,
//! ```
//!
//! which is real for real `t` and an entire function of complex `t`. Monochromatic linear and
//! elliptical fields, two-colour and bicircular fields and sin²-enveloped pulses are all of this
//! form (an envelope `cos²(πt/T_p)` times a carrier is again a finite sum). The electric field is
//! `E = −∂A/∂t`, and the integrals `∫A dt` and `∫A·A dt` that the strong-field action needs are
//! closed-form; the pair coefficients of `A·A` are merged by frequency once, when the field is
//! built. Dot products of complex vectors here are bilinear (no conjugation), as analyticity
//! requires.
//!
//! Frame and conventions (DESIGN §3): lab frame with the laser propagating along `+y`, so the
//! polarization plane is the `z–x` plane. A polarization angle `θ` is measured from `+z` towards
//! `+x`. The time origin `t = 0` is the crest of the first colour (the centre of the envelope for
//! pulses).

use nalgebra::Vector3;
use num_complex::Complex64;

use crate::error::{Error, Result, require_finite, require_positive};

/// Complex 3-vector.
pub type CVec3 = Vector3<Complex64>;

/// Largest number of positive-frequency modes a field may have.
pub const MAX_MODES: usize = 12;

/// Bilinear (non-conjugating) dot product of complex 3-vectors.
#[inline]
pub fn bdot(a: &CVec3, b: &CVec3) -> Complex64 {
    a.x * b.x + a.y * b.y + a.z * b.z
}

/// One positive-frequency component of the vector potential: contributes
/// `amplitude·e^{−iνt} + c.c.` to `A(t)`.
#[derive(Clone, Debug, PartialEq)]
pub struct Mode {
    /// Angular frequency ν > 0 (a.u.).
    pub frequency: f64,
    /// Complex amplitude vector (a.u. of vector potential).
    pub amplitude: CVec3,
}

/// One term of `∫A·A dt` after merging equal frequencies.
#[derive(Clone, Debug)]
struct SquareTerm {
    /// Indices into the signed-term list (see [`Field::signed_exponentials`]).
    first: usize,
    second: usize,
    /// Coefficient of the antiderivative: `i·c/f` for `f ≠ 0`; the coefficient `c` of `t` for `f = 0`.
    coefficient: Complex64,
    /// Whether the merged frequency is zero (the term is linear in t).
    secular: bool,
}

/// How the field repeats in time.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum TimeStructure {
    /// Periodic with the given period (a.u.).
    Periodic {
        /// The period of the whole field (a.u.).
        period: f64,
    },
    /// A pulse whose vector potential vanishes outside `[start, end]` (a.u.).
    Pulse {
        /// First instant of the envelope (a.u.).
        start: f64,
        /// Last instant of the envelope (a.u.).
        end: f64,
    },
}

/// Field quantities at one (complex) time.
#[derive(Clone, Copy, Debug)]
pub struct FieldPoint {
    /// Vector potential `A(t)`.
    pub a: CVec3,
    /// Electric field `E(t) = −∂A/∂t`.
    pub e: CVec3,
    /// Antiderivative of `A` (an arbitrary constant cancels in every use).
    pub int_a: CVec3,
    /// Antiderivative of `A·A`.
    pub int_a2: Complex64,
}

/// A laser field: vector potential as a finite trigonometric sum.
#[derive(Clone, Debug)]
pub struct Field {
    modes: Vec<Mode>,
    square_terms: Vec<SquareTerm>,
    omega: f64,
    structure: TimeStructure,
    axis: Vector3<f64>,
    up: f64,
    peak_field: f64,
    /// Cartesian components that any mode has (the others are identically zero).
    active: Vec<usize>,
}

/// Polarization of one colour.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Polarization {
    /// Linear along `(sin θ, 0, cos θ)`.
    Linear {
        /// Angle θ from `+z` towards `+x` (rad).
        angle: f64,
    },
    /// Elliptical with the major axis at angle θ. Positive ellipticity turns the field vector
    /// from the major axis towards the minor axis `(cos θ, 0, −sin θ)` rotated by +90°, i.e. in
    /// the positive sense about the propagation direction `+y`. `|ε| = 1` is circular.
    Elliptical {
        /// Ellipticity ε = E_minor/E_major, in [−1, 1]; the sign gives the helicity.
        ellipticity: f64,
        /// Angle θ of the major axis from `+z` towards `+x` (rad).
        major_axis: f64,
    },
}

/// One colour of a (possibly multi-colour) laser field.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Colour {
    /// Angular frequency (a.u.).
    pub omega: f64,
    /// Peak field `F₀ = sqrt(I/I_au)` of a linearly polarised wave with this colour's total
    /// cycle-averaged intensity (a.u.). An elliptical colour shares it as `F₀²/(1+ε²)` along the
    /// major axis and `ε²F₀²/(1+ε²)` along the minor axis, so its total intensity is unchanged.
    pub peak_field: f64,
    /// Phase φ: the major-axis field is `∝ cos(ωt + φ)` (rad).
    pub phase: f64,
    /// Polarization.
    pub polarization: Polarization,
}

/// Temporal envelope shared by all colours.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Envelope {
    /// Infinitely long (periodic) field.
    Continuous,
    /// `A(t) ∝ cos²(πt/T_p)` for `|t| < T_p/2`, zero outside. The intensity envelope is then
    /// `cos⁴(πt/T_p)`, whose full width at half maximum is `FWHM = (2/π)·arccos(2^{−1/4})·T_p
    /// ≈ 0.3640 T_p`.
    Sin2 {
        /// FWHM of the intensity envelope (a.u. of time).
        fwhm: f64,
    },
}

/// Ratio `T_p / FWHM` of the cos² vector-potential envelope (intensity `cos⁴`).
pub fn sin2_total_over_fwhm() -> f64 {
    std::f64::consts::PI / (2.0 * (2f64.powf(-0.25)).acos())
}

/// Unit vector of polarization angle `angle` in the z–x plane.
pub fn polarization_direction(angle: f64) -> Vector3<f64> {
    Vector3::new(angle.sin(), 0.0, angle.cos())
}

impl Colour {
    /// Complex electric-field amplitude vector `e` with `E(t) = Re(e·e^{−iωt})`.
    fn field_amplitude(&self) -> CVec3 {
        let phase = Complex64::from_polar(1.0, -self.phase);
        match self.polarization {
            Polarization::Linear { angle } => {
                polarization_direction(angle).map(|x| Complex64::new(x, 0.0) * self.peak_field)
                    * phase
            }
            Polarization::Elliptical {
                ellipticity,
                major_axis,
            } => {
                let major = polarization_direction(major_axis);
                let minor = polarization_direction(major_axis + std::f64::consts::FRAC_PI_2);
                let f_major = self.peak_field / (1.0 + ellipticity * ellipticity).sqrt();
                let v = major.map(|x| Complex64::new(x, 0.0))
                    + minor.map(|x| Complex64::new(0.0, ellipticity * x));
                v * (phase * f_major)
            }
        }
    }

    fn validate(&self, index: usize) -> Result<()> {
        let key = |k: &str| format!("colour {} {}", index + 1, k);
        require_positive(&key("angular frequency"), self.omega)?;
        require_positive(&key("peak field"), self.peak_field)?;
        require_finite(&key("phase"), self.phase)?;
        match self.polarization {
            Polarization::Linear { angle } => {
                require_finite(&key("polarization angle"), angle)?;
            }
            Polarization::Elliptical {
                ellipticity,
                major_axis,
            } => {
                require_finite(&key("major axis angle"), major_axis)?;
                if !ellipticity.is_finite() || ellipticity.abs() > 1.0 {
                    return Err(Error::invalid(
                        &key("ellipticity"),
                        ellipticity,
                        "must lie in [-1, 1]",
                    ));
                }
            }
        }
        Ok(())
    }
}

/// Finds `q ≤ max_den` with `ratio·q` an integer (to 1e-9 relative), if any.
fn rational_denominator(ratio: f64, max_den: u32) -> Option<u32> {
    (1..=max_den).find(|&q| {
        let x = ratio * f64::from(q);
        (x - x.round()).abs() < 1e-9 * x.abs().max(1.0) && x.round() >= 1.0
    })
}

impl Field {
    /// Builds the field of one or more colours under a common envelope.
    ///
    /// The first colour is the reference: harmonic orders are `Ω/ω₁` and `t = 0` is its crest.
    /// A continuous field must be periodic: every `ω_k/ω₁` must be a ratio `p/q` with `q ≤ 12`;
    /// the period is then `q·2π/ω₁` for the least common such `q`.
    pub fn new(colours: &[Colour], envelope: Envelope) -> Result<Field> {
        let Some(first) = colours.first() else {
            return Err(Error::invalid(
                "colours",
                "[]",
                "at least one colour is required",
            ));
        };
        for (k, c) in colours.iter().enumerate() {
            c.validate(k)?;
        }
        let omega = first.omega;
        let mut modes = Vec::new();
        for c in colours {
            // A(t) = Re(c_A e^{-iωt}) with c_A = -i e/ω; mode amplitude is c_A/2.
            let a = c.field_amplitude() * Complex64::new(0.0, -0.5 / c.omega);
            modes.push(Mode {
                frequency: c.omega,
                amplitude: a,
            });
        }
        let structure = match envelope {
            Envelope::Continuous => {
                let mut q_all = 1u32;
                for (k, c) in colours.iter().enumerate().skip(1) {
                    let ratio = c.omega / omega;
                    let Some(q) = rational_denominator(ratio, 12) else {
                        return Err(Error::invalid(
                            &format!("colour {} frequency ratio to colour 1", k + 1),
                            ratio,
                            "a continuous field must be periodic: the ratio must be p/q with \
                             q <= 12 (use a pulse envelope for other ratios)",
                        ));
                    };
                    q_all = lcm(q_all, q);
                }
                TimeStructure::Periodic {
                    period: f64::from(q_all) * 2.0 * std::f64::consts::PI / omega,
                }
            }
            Envelope::Sin2 { fwhm } => {
                require_positive("pulse FWHM", fwhm)?;
                let total = fwhm * sin2_total_over_fwhm();
                let shift = 2.0 * std::f64::consts::PI / total;
                let mut enveloped = Vec::with_capacity(3 * modes.len());
                for (k, m) in modes.iter().enumerate() {
                    if m.frequency - shift <= 0.0 {
                        return Err(Error::invalid(
                            "pulse FWHM",
                            fwhm,
                            &format!(
                                "the envelope must be longer than one optical cycle of colour {} \
                                 (total duration {:.3} a.u. < period {:.3} a.u.)",
                                k + 1,
                                total,
                                2.0 * std::f64::consts::PI / m.frequency
                            ),
                        ));
                    }
                    // cos²(πt/T) = 1/2 + e^{+iΩe t}/4 + e^{-iΩe t}/4 with Ωe = 2π/T.
                    enveloped.push(Mode {
                        frequency: m.frequency,
                        amplitude: m.amplitude * Complex64::new(0.5, 0.0),
                    });
                    enveloped.push(Mode {
                        frequency: m.frequency - shift,
                        amplitude: m.amplitude * Complex64::new(0.25, 0.0),
                    });
                    enveloped.push(Mode {
                        frequency: m.frequency + shift,
                        amplitude: m.amplitude * Complex64::new(0.25, 0.0),
                    });
                }
                modes = enveloped;
                TimeStructure::Pulse {
                    start: -0.5 * total,
                    end: 0.5 * total,
                }
            }
        };
        let axis = match first.polarization {
            Polarization::Linear { angle } => polarization_direction(angle),
            Polarization::Elliptical { major_axis, .. } => polarization_direction(major_axis),
        };
        let up = colours
            .iter()
            .map(|c| c.peak_field * c.peak_field / (4.0 * c.omega * c.omega))
            .sum();
        Field::from_modes(modes, omega, structure, axis, up, first.peak_field)
    }

    /// Builds a field directly from its modes (used by the builders and by tests).
    ///
    /// `axis` is the reference polarization direction (unit vector), `up` the ponderomotive
    /// energy quoted for the field and `peak_field` the reference peak field.
    pub fn from_modes(
        modes: Vec<Mode>,
        omega: f64,
        structure: TimeStructure,
        axis: Vector3<f64>,
        up: f64,
        peak_field: f64,
    ) -> Result<Field> {
        if modes.is_empty() || modes.len() > MAX_MODES {
            return Err(Error::invalid(
                "number of field modes",
                modes.len(),
                &format!("must be between 1 and {MAX_MODES}"),
            ));
        }
        for m in &modes {
            require_positive("mode frequency", m.frequency)?;
            if m.amplitude
                .iter()
                .any(|c| !c.re.is_finite() || !c.im.is_finite())
            {
                return Err(Error::invalid(
                    "mode amplitude",
                    format!("{:?}", m.amplitude),
                    "must be finite",
                ));
            }
        }
        require_positive("reference angular frequency", omega)?;
        let square_terms = square_terms(&modes);
        let active = (0..3)
            .filter(|&k| modes.iter().any(|m| m.amplitude[k].norm() > 0.0))
            .collect();
        Ok(Field {
            modes,
            square_terms,
            omega,
            structure,
            axis: axis.normalize(),
            up,
            peak_field,
            active,
        })
    }

    /// The polarization direction if the field is linearly polarised (every mode's amplitude a
    /// complex multiple of one real unit vector), else None.
    pub fn linear_axis(&self) -> Option<Vector3<f64>> {
        let mut axis: Option<Vector3<f64>> = None;
        for m in &self.modes {
            for part in [m.amplitude.map(|c| c.re), m.amplitude.map(|c| c.im)] {
                let n = part.norm();
                if n == 0.0 {
                    continue;
                }
                match axis {
                    None => axis = Some(part / n),
                    Some(a) => {
                        if a.cross(&part).norm() > 1e-12 * n {
                            return None;
                        }
                    }
                }
            }
        }
        axis.map(|a| {
            // Orient like the reference axis so that signs are reproducible.
            if a.dot(&self.axis) < 0.0 { -a } else { a }
        })
    }

    /// Whether `A(t + T/2) = −A(t)` (periodic field whose modes are all odd multiples of
    /// `2π/T`): the second half of every period repeats the first with the field reversed.
    pub fn half_wave_symmetric(&self) -> bool {
        match self.structure {
            TimeStructure::Periodic { period } => self.modes.iter().all(|m| {
                let n = m.frequency * period / (2.0 * std::f64::consts::PI);
                (n - n.round()).abs() < 1e-9 * n.max(1.0) && (n.round() as i64) % 2 == 1
            }),
            TimeStructure::Pulse { .. } => false,
        }
    }

    /// Modes of the vector potential.
    pub fn modes(&self) -> &[Mode] {
        &self.modes
    }

    /// Reference angular frequency ω₁ (harmonic order = Ω/ω₁).
    pub fn omega(&self) -> f64 {
        self.omega
    }

    /// Periodic or pulsed.
    pub fn structure(&self) -> TimeStructure {
        self.structure
    }

    /// Reference polarization direction (major axis of the first colour).
    pub fn axis(&self) -> Vector3<f64> {
        self.axis
    }

    /// Ponderomotive energy `Up = Σ_colours F₀²/(4ω²)` (a.u.), the cycle-averaged quiver energy
    /// at the peak of the envelope.
    pub fn ponderomotive_energy(&self) -> f64 {
        self.up
    }

    /// Reference peak field F₀ of the first colour (a.u.).
    pub fn peak_field(&self) -> f64 {
        self.peak_field
    }

    /// Interval of time where the trigonometric sum is the physical field: one period for a
    /// periodic field (`[0, T)`; any shift is equally valid), the envelope's support for a pulse.
    pub fn time_span(&self) -> (f64, f64) {
        match self.structure {
            TimeStructure::Periodic { period } => (0.0, period),
            TimeStructure::Pulse { start, end } => (start, end),
        }
    }

    /// `A`, `E`, `∫A` and `∫A·A` at complex time `t`.
    #[inline]
    pub fn at(&self, t: Complex64) -> FieldPoint {
        // The exponentials of the modes go into a stack array sized for the field (one or two
        // modes for monochromatic and two-colour fields), so that the common case does not
        // clear room for the largest field.
        match self.modes.len() {
            0..=2 => self.at_sized::<4>(t),
            3..=4 => self.at_sized::<8>(t),
            _ => self.at_sized::<{ 2 * MAX_MODES }>(t),
        }
    }

    /// [`Field::at`] with room for `N/2` modes (`N ≥ 2 × self.modes.len()`).
    #[inline(always)]
    fn at_sized<const N: usize>(&self, t: Complex64) -> FieldPoint {
        let zero = Complex64::new(0.0, 0.0);
        let mut x = [zero; N];
        let (mut a, mut e, mut ia) = ([zero; 3], [zero; 3], [zero; 3]);
        for (j, m) in self.modes.iter().enumerate() {
            let nu = m.frequency;
            let (s, c) = (nu * t.re).sin_cos();
            let g = (nu * t.im).exp();
            let gi = 1.0 / g;
            let xp = Complex64::new(g * c, -g * s);
            let xm = Complex64::new(c * gi, s * gi);
            x[2 * j] = xp;
            x[2 * j + 1] = xm;
            let inv_nu = 1.0 / nu;
            for &k in &self.active {
                let p = m.amplitude[k] * xp;
                let q = m.amplitude[k].conj() * xm;
                a[k] += p + q;
                let d = p - q;
                // E += iν d,  ∫A += (i/ν) d.
                e[k] += Complex64::new(-nu * d.im, nu * d.re);
                ia[k] += Complex64::new(-inv_nu * d.im, inv_nu * d.re);
            }
        }
        let mut ia2 = zero;
        for term in &self.square_terms {
            if term.secular {
                ia2 += term.coefficient * t;
            } else {
                ia2 += term.coefficient * x[term.first] * x[term.second];
            }
        }
        FieldPoint {
            a: CVec3::new(a[0], a[1], a[2]),
            e: CVec3::new(e[0], e[1], e[2]),
            int_a: CVec3::new(ia[0], ia[1], ia[2]),
            int_a2: ia2,
        }
    }

    /// Vector potential at complex time.
    pub fn vector_potential(&self, t: Complex64) -> CVec3 {
        self.at(t).a
    }

    /// Electric field at complex time.
    pub fn electric(&self, t: Complex64) -> CVec3 {
        self.at(t).e
    }

    /// Electric field and its time derivative `(E(t), dE/dt)` at complex time, without the
    /// other quantities of [`Field::at`] (cheaper where only the field is needed).
    #[inline]
    pub fn electric_and_rate(&self, t: Complex64) -> (CVec3, CVec3) {
        let zero = Complex64::new(0.0, 0.0);
        let (mut e, mut de) = ([zero; 3], [zero; 3]);
        for m in &self.modes {
            let nu = m.frequency;
            let (s, c) = (nu * t.re).sin_cos();
            let g = (nu * t.im).exp();
            let xp = Complex64::new(g * c, -g * s);
            let xm = Complex64::new(c / g, s / g);
            for &k in &self.active {
                let p = m.amplitude[k] * xp;
                let q = m.amplitude[k].conj() * xm;
                // E = −dA/dt = iν (p − q);  dE/dt = iν (−iν p − iν q) = ν² (p + q).
                let d = p - q;
                e[k] += Complex64::new(-nu * d.im, nu * d.re);
                de[k] += (p + q) * (nu * nu);
            }
        }
        (
            CVec3::new(e[0], e[1], e[2]),
            CVec3::new(de[0], de[1], de[2]),
        )
    }

    /// Real electric field at real time `t` from the same closed form as [`Field::at`]
    /// (`E = Re Σ iν c e^{−iνt}` per component), without the other quantities (one `sin_cos`
    /// per mode, no exponentials).
    #[inline]
    pub fn electric_at_real(&self, t: f64) -> Vector3<f64> {
        let mut e = [0.0; 3];
        for m in &self.modes {
            let nu = m.frequency;
            let (s, c) = (nu * t).sin_cos();
            for &k in &self.active {
                // p − q = c_k e^{−iνt} − c_k* e^{iνt} = 2i Im(c_k e^{−iνt}); E_k = Re(iν(p − q)).
                let a = m.amplitude[k];
                let im = a.im * c - a.re * s;
                e[k] += -nu * 2.0 * im;
            }
        }
        Vector3::new(e[0], e[1], e[2])
    }

    /// Real vector potential, electric field and `∫A` at real time `t`.
    pub fn real_at(&self, t: f64) -> (Vector3<f64>, Vector3<f64>, Vector3<f64>) {
        let p = self.at(Complex64::new(t, 0.0));
        (p.a.map(|c| c.re), p.e.map(|c| c.re), p.int_a.map(|c| c.re))
    }

    /// Real electric field at real time `t` (zero outside a pulse's envelope).
    pub fn electric_real(&self, t: f64) -> Vector3<f64> {
        if let TimeStructure::Pulse { start, end } = self.structure
            && (t < start || t > end)
        {
            return Vector3::zeros();
        }
        self.real_at(t).1
    }

    /// Birth windows: the field's time span cut at the deep minima of `|E(t)|`, each with the
    /// highest crest inside it (one window per half cycle of a linear field, per lobe of a
    /// bicircular field). A minimum between two maxima splits the window if `|E|` there is below
    /// half the lower of the two maxima (deep), or if the field turns round between them: the
    /// field vectors at the two maxima make an obtuse angle, `E(t_l)·E(t_r) < 0` (the two half
    /// cycles of an elliptical field, whose `|E|` only dips to `ε` times its crest). Shallow dips
    /// with the field still pointing the same way (e.g. from a weak second colour) do not split a
    /// window. Windows whose crest is below `threshold` times the highest crest are dropped.
    /// For a periodic field the windows cover one period.
    pub fn birth_windows(&self, threshold: f64) -> Vec<BirthWindow> {
        let nu_max = self
            .modes
            .iter()
            .map(|m| m.frequency)
            .fold(self.omega, f64::max);
        let (t0, t1) = self.time_span();
        let periodic = matches!(self.structure, TimeStructure::Periodic { .. });
        let n = (((t1 - t0) * nu_max / (2.0 * std::f64::consts::PI)) * 64.0).ceil() as usize + 16;
        let h = (t1 - t0) / n as f64;
        let mag = |t: f64| self.real_at(t).1.norm();
        // For a periodic field start the sampling at the deepest minimum so that no window
        // straddles the ends; for a pulse the ends are where the field vanishes anyway.
        let start = if periodic {
            (0..n)
                .map(|i| t0 + i as f64 * h)
                .min_by(|a, b| mag(*a).total_cmp(&mag(*b)))
                .unwrap_or(t0)
        } else {
            t0
        };
        let samples: Vec<(f64, f64)> = (0..=n)
            .map(|i| {
                let t = start + i as f64 * h;
                (t, mag(t))
            })
            .collect();
        // Alternating extrema: (time, |E|, is_max), refined by golden section.
        let mut extrema: Vec<(f64, f64, bool)> = vec![(samples[0].0, samples[0].1, false)];
        for i in 1..n {
            let (prev, cur, next) = (samples[i - 1].1, samples[i].1, samples[i + 1].1);
            let t = samples[i].0;
            if cur >= prev && cur > next {
                let tm = golden_max(&mag, t - h, t + h, 1e-13 * (1.0 + t.abs()));
                extrema.push((tm, mag(tm), true));
            } else if cur <= prev && cur < next {
                let tm = golden_max(&|x| -mag(x), t - h, t + h, 1e-13 * (1.0 + t.abs()));
                extrema.push((tm, mag(tm), false));
            }
        }
        extrema.push((samples[n].0, samples[n].1, false));
        // Cut at deep minima and where the field turns round.
        let mut cuts = vec![0usize];
        for i in 1..extrema.len() - 1 {
            if extrema[i].2 {
                continue;
            }
            let left = extrema[..i].iter().rev().find(|e| e.2);
            let right = extrema[i + 1..].iter().find(|e| e.2);
            if let (Some(l), Some(r)) = (left, right) {
                let deep = extrema[i].1 < 0.5 * l.1.min(r.1);
                let reversed = self.real_at(l.0).1.dot(&self.real_at(r.0).1) < 0.0;
                if deep || reversed {
                    cuts.push(i);
                }
            }
        }
        cuts.push(extrema.len() - 1);
        let mut windows: Vec<BirthWindow> = cuts
            .windows(2)
            .filter_map(|w| {
                let crest = extrema[w[0]..=w[1]]
                    .iter()
                    .filter(|e| e.2)
                    .max_by(|a, b| a.1.total_cmp(&b.1))?;
                Some(BirthWindow {
                    start: extrema[w[0]].0,
                    crest: crest.0,
                    end: extrema[w[1]].0,
                    crest_field: crest.1,
                    index: 0,
                })
            })
            .collect();
        let peak = windows.iter().map(|w| w.crest_field).fold(0.0, f64::max);
        windows.retain(|w| w.crest_field >= threshold * peak);
        if let TimeStructure::Periodic { period } = self.structure {
            // Shift every window by whole periods so that its crest lies in [−δ, T − δ): the
            // crest at t = 0 is reported at 0 and gets index 0.
            let delta = 1e-6 * period;
            for w in &mut windows {
                let shift = period * ((w.crest + delta) / period).floor();
                w.start -= shift;
                w.crest -= shift;
                w.end -= shift;
                if w.crest.abs() < delta {
                    w.crest = 0.0;
                }
            }
            windows.sort_by(|a, b| a.crest.total_cmp(&b.crest));
            for (i, w) in windows.iter_mut().enumerate() {
                w.index = i as i32;
            }
        } else {
            // Index 0 is the crest nearest t = 0 (the centre of the pulse).
            let origin = windows
                .iter()
                .enumerate()
                .min_by(|a, b| a.1.crest.abs().total_cmp(&b.1.crest.abs()))
                .map_or(0, |(i, _)| i);
            for (i, w) in windows.iter_mut().enumerate() {
                w.index = i as i32 - origin as i32;
            }
        }
        windows
    }
}

/// A window of birth times around one crest of the field.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct BirthWindow {
    /// First instant of the window (a deep minimum of |E|).
    pub start: f64,
    /// Time of the highest crest inside.
    pub crest: f64,
    /// Last instant of the window.
    pub end: f64,
    /// |E| at the crest (a.u.).
    pub crest_field: f64,
    /// Crest index: 0 for the crest nearest t = 0, counting up in time.
    pub index: i32,
}

fn gcd(a: u32, b: u32) -> u32 {
    if b == 0 { a } else { gcd(b, a % b) }
}

fn lcm(a: u32, b: u32) -> u32 {
    a / gcd(a, b) * b
}

/// Golden-section search for the maximum of `f` on `[a, b]`.
pub(crate) fn golden_max(f: &dyn Fn(f64) -> f64, mut a: f64, mut b: f64, tol: f64) -> f64 {
    let r = 0.5 * (5f64.sqrt() - 1.0);
    let mut c = b - r * (b - a);
    let mut d = a + r * (b - a);
    let (mut fc, mut fd) = (f(c), f(d));
    for _ in 0..200 {
        if (b - a).abs() < tol {
            break;
        }
        if fc > fd {
            b = d;
            d = c;
            fd = fc;
            c = b - r * (b - a);
            fc = f(c);
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + r * (b - a);
            fd = f(d);
        }
    }
    0.5 * (a + b)
}

/// Merges the products of the signed terms of `A` by frequency and integrates them once.
fn square_terms(modes: &[Mode]) -> Vec<SquareTerm> {
    // Signed terms: index 2j is a_j e^{-iν t} (frequency +ν), 2j+1 is conj(a_j) e^{+iν t} (−ν).
    let mut signed: Vec<(f64, CVec3)> = Vec::with_capacity(2 * modes.len());
    for m in modes {
        signed.push((m.frequency, m.amplitude));
        signed.push((-m.frequency, m.amplitude.map(|c| c.conj())));
    }
    let scale = modes.iter().map(|m| m.frequency).fold(0.0, f64::max);
    let mut merged: Vec<(f64, Complex64, usize, usize)> = Vec::new();
    for p in 0..signed.len() {
        for q in p..signed.len() {
            let mult = if p == q { 1.0 } else { 2.0 };
            let c = bdot(&signed[p].1, &signed[q].1) * mult;
            // Frequency of e^{-i f t}: f = ν_p + ν_q.
            let f = signed[p].0 + signed[q].0;
            match merged.iter_mut().find(|m| (m.0 - f).abs() <= 1e-12 * scale) {
                Some(m) => m.1 += c,
                None => merged.push((f, c, p, q)),
            }
        }
    }
    merged
        .into_iter()
        .filter(|m| m.1.norm() > 0.0)
        .map(|(f, c, p, q)| {
            let secular = f.abs() <= 1e-12 * scale;
            SquareTerm {
                first: p,
                second: q,
                coefficient: if secular {
                    c
                } else {
                    c * Complex64::new(0.0, 1.0 / f)
                },
                secular,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn linear(f: f64, w: f64) -> Field {
        Field::new(
            &[Colour {
                omega: w,
                peak_field: f,
                phase: 0.0,
                polarization: Polarization::Linear { angle: 0.0 },
            }],
            Envelope::Continuous,
        )
        .unwrap()
    }

    #[test]
    fn monochromatic_closed_forms() {
        // Closed forms for E = F cos ωt ẑ (physics notes §0, §1.2): A = -(F/ω) sin ωt,
        // ∫A = (F/ω²) cos ωt, ∫A² = (F²/ω²)[t/2 − sin 2ωt/(4ω)] up to constants.
        let (f, w) = (0.07, 0.9);
        let field = linear(f, w);
        let t = Complex64::new(1.3, 0.4);
        let p = field.at(t);
        let a_ref = -(f / w) * (w * t).sin();
        let e_ref = f * (w * t).cos();
        let ia_ref = (f / (w * w)) * (w * t).cos();
        let ia2_ref = (f * f / (w * w)) * (t * 0.5 - (2.0 * w * t).sin() / (4.0 * w));
        assert!((p.a.z - a_ref).norm() < 1e-15);
        assert!((p.e.z - e_ref).norm() < 1e-15);
        assert!((p.int_a.z - ia_ref).norm() < 1e-15);
        assert!((p.int_a2 - ia2_ref).norm() < 1e-15);
        assert!(p.a.x.norm() < 1e-15 && p.a.y.norm() < 1e-15);
    }
}
