//! Molecular tunnelling theory (MO-ADK): structure factors `B(m)` of an orbital's asymptotic
//! tail and the static tunnelling rate.
//!
//! X. M. Tong, Z. X. Zhao, C. D. Lin, "Theory of molecular tunneling ionization",
//! Phys. Rev. A 66, 033402 (2002). The formulas are from memory via the project's physics notes
//! §3.4, with the normalisation fixed there by derivation: the rate reduces to atomic ADK for
//! `C_l² = C²_{n*l*} κ^{2n*+1}` and to the exact hydrogenic-ion rate `4Z⁵/F e^{−2Z³/(3F)}` for
//! `C_0 = 2 Z^{3/2}` (both tested).
//!
//! # The orbital and the frames
//! In the molecular frame the orbital's tail is
//! `ψ(r) → Σ_t C_t r^{Z/κ − 1} e^{−κr} Y_{l_t m'_t}(r̂)` (Condon–Shortley `Y_lm`, `m'` the
//! projection on the molecular axis; complex `C_t` allowed). In the **exit frame** — any frame
//! whose `+z` axis is the direction in which the electron leaves — with
//! `v_exit = R v_mol`, `R = Rz(α) Ry(β) Rz(γ)`,
//!
//! `B(m; R) = Σ_t C_t D^{l_t}_{m, m'_t}(R) Q(l_t, m)`,
//! `Q(l, m) = (−1)^m √((2l+1)(l+|m|)! / (2 (l−|m|)!))`,
//!
//! `w_stat = Σ_m |B(m)|² / (2^{|m|} |m|!) · κ^{−(2Z/κ − 1)} (2κ³/F)^{2Z/κ − |m| − 1} e^{−2κ³/(3F)}`.
//!
//! For complex `C` the rate uses `|B(m)|²` (Tong et al. write `B²(m)` for real orbitals).
//! Near the `+z` axis `Y_lm(θ, φ) ≈ c_lm θ^{|m|} e^{imφ}` and `|Q(l, m)| = √(2π) 2^{|m|} |m|! |c_lm|`,
//! so the formula samples the tail along the exit-frame `+z` axis; in particular
//! `B(0) = √(2π) Σ_t C_t Y_{l_t m'_t}(û)` with `û` the exit direction in the molecular frame
//! (derived here; tested). The sign `(−1)^m` of `Q` equals that of `c_lm` for `m ≥ 0` and
//! differs by `(−1)^{|m|}` for `m < 0`: an overall sign of each `B(m)`, which drops out of the
//! rate and of any coherent sum at fixed `m`.
//!
//! **Which way the electron leaves.** With electron charge −1 and interaction `+E·r`
//! (physics notes §0) the barrier is lowest on the side `−Ê`: the `…_for_field` methods take
//! the direction of the electric field `Ê` in the molecular frame and use `û = −Ê`. For an
//! orbital of definite parity this multiplies every `B(m)` by that parity, so rates are
//! unchanged; for polar molecules it decides which end ionizes, and for coherent sums over
//! channels of different parity it fixes their relative sign. (Tong et al. speak of "the field
//! direction"; reading it as the exit direction is our interpretation, derived from the origin
//! of `Q(l, m)` above.)
//!
//! **Signed amplitudes.** Coherent sums over channels and orientations need `B(m)` itself, not
//! `|B(m)|²`: its sign/phase flips between the lobes of the orbital. [`StructureAmplitudes`]
//! holds the complex `B(m)`; [`AsymptoticOrbital::rate_weight`] gives the real radial factor
//! so that `w_stat = Σ_m |B(m)|² · rate_weight(|m|, F)`.

use nalgebra::Vector3;
use num_complex::Complex64;

use super::wigner::{EulerZyz, WignerTerm, for_each_wigner_term};
use super::{MAX_ANGULAR_MOMENTUM, TunnellingError, check_l_m, check_positive, factorial};

/// Number of projections `m = −MAX…MAX`.
const M_SLOTS: usize = 2 * MAX_ANGULAR_MOMENTUM as usize + 1;

/// Index of projection `m` in a `[_; M_SLOTS]` array.
fn slot(m: i32) -> usize {
    // |m| ≤ MAX_ANGULAR_MOMENTUM is guaranteed by the callers.
    (m + MAX_ANGULAR_MOMENTUM as i32) as usize
}

/// The MO-ADK factor `Q(l, m) = (−1)^m √((2l+1)(l+|m|)! / (2 (l−|m|)!))`
/// (Tong, Zhao, Lin, PRA 66, 033402 (2002); from memory via physics notes §3.4).
///
/// # Errors
/// [`TunnellingError::InvalidQuantumNumbers`] if `|m| > l` or `l > MAX_ANGULAR_MOMENTUM`.
pub fn mo_adk_q(l: u32, m: i32) -> Result<f64, TunnellingError> {
    check_l_m("l, m", l, m)?;
    Ok(q_unchecked(l, m))
}

fn q_unchecked(l: u32, m: i32) -> f64 {
    let am = m.unsigned_abs();
    let sign = if am % 2 == 0 { 1.0 } else { -1.0 };
    sign * (f64::from(2 * l + 1) * factorial(l + am) / (2.0 * factorial(l - am))).sqrt()
}

/// One term `C · Y_{l m'}` of an orbital's asymptotic expansion in the molecular frame.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AsymptoticTerm {
    /// Orbital angular momentum `l`.
    pub l: u32,
    /// Projection `m'` on the molecular `z` axis (σ: 0, π: ±1, δ: ±2, …).
    pub m_prime: i32,
    /// Asymptotic coefficient `C_{l m'}` (a.u.; real or complex).
    pub coefficient: Complex64,
}

impl AsymptoticTerm {
    /// A term `coefficient · Y_{l m'}`; checked when the orbital is built.
    pub fn new(l: u32, m_prime: i32, coefficient: Complex64) -> Self {
        Self {
            l,
            m_prime,
            coefficient,
        }
    }
}

/// Complex structure factors `B(m)`, `m = −l_max…l_max`, of one orbital for one orientation
/// (MO-ADK, Tong et al. 2002; see the module documentation for the frame and sign conventions).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StructureAmplitudes {
    l_max: u32,
    values: [Complex64; M_SLOTS],
}

impl StructureAmplitudes {
    /// Largest `l` of the orbital; `B(m)` is stored for `|m| ≤ l_max`.
    pub fn l_max(&self) -> u32 {
        self.l_max
    }

    /// `B(m)`, or `None` if `|m| > l_max`.
    pub fn get(&self, m: i32) -> Option<Complex64> {
        (m.unsigned_abs() <= self.l_max).then(|| self.values[slot(m)])
    }

    /// The leading (`m = 0`) signed amplitude `B(0)`.
    pub fn leading(&self) -> Complex64 {
        self.values[slot(0)]
    }

    /// `B(m)` for `m = −l_max, …, l_max`, in that order.
    pub fn as_slice(&self) -> &[Complex64] {
        let lm = self.l_max as usize;
        let centre = MAX_ANGULAR_MOMENTUM as usize;
        &self.values[centre - lm..=centre + lm]
    }
}

/// A run of Wigner-sum terms for one (orbital term, m) pair: `C_t Σ_k a_k c^p s^q`, with
/// `Q(l, m)` folded into the `a_k`.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Run {
    coefficient: Complex64,
    m: i32,
    m_prime: i32,
    start: usize,
    end: usize,
}

/// Power tables shared by all runs of one evaluation.
struct Powers {
    cos: [f64; 2 * MAX_ANGULAR_MOMENTUM as usize + 1],
    sin: [f64; 2 * MAX_ANGULAR_MOMENTUM as usize + 1],
    /// `e^{−ikγ}`, k = 0…l_max.
    gamma: [Complex64; MAX_ANGULAR_MOMENTUM as usize + 1],
}

impl Powers {
    fn new(l_max: u32, c: f64, s: f64, e_gamma: Complex64) -> Self {
        let n = (l_max as usize).min(MAX_ANGULAR_MOMENTUM as usize) + 1;
        let mut p = Self {
            cos: [1.0; 2 * MAX_ANGULAR_MOMENTUM as usize + 1],
            sin: [1.0; 2 * MAX_ANGULAR_MOMENTUM as usize + 1],
            gamma: [Complex64::new(1.0, 0.0); MAX_ANGULAR_MOMENTUM as usize + 1],
        };
        for k in 1..2 * n - 1 {
            p.cos[k] = p.cos[k - 1] * c;
            p.sin[k] = p.sin[k - 1] * s;
        }
        for k in 1..n {
            p.gamma[k] = p.gamma[k - 1] * e_gamma;
        }
        p
    }

    /// `e^{−ikγ}` for any `|k| ≤ l_max`.
    fn gamma_phase(&self, k: i32) -> Complex64 {
        let z = self.gamma[k.unsigned_abs() as usize];
        if k < 0 { z.conj() } else { z }
    }
}

/// An orbital's asymptotic tail (MO-ADK input): ionization potential, residual-ion charge and
/// the `(l, m', C)` terms in the molecular frame (Tong, Zhao, Lin, PRA 66, 033402 (2002)).
///
/// Construction precomputes the Wigner sums, so the per-orientation methods do not allocate.
/// Repeated `(l, m')` entries are allowed and simply add.
#[derive(Debug, Clone, PartialEq)]
pub struct AsymptoticOrbital {
    ip: f64,
    charge: f64,
    kappa: f64,
    terms: Vec<AsymptoticTerm>,
    l_max: u32,
    /// All runs, ordered by term and then m.
    runs: Vec<Run>,
    /// The m = 0 runs only (for the leading amplitude).
    leading_runs: Vec<Run>,
    wigner_terms: Vec<WignerTerm>,
    /// `κ^{−(2Z/κ − 1)}`.
    kappa_power: f64,
}

impl AsymptoticOrbital {
    /// Builds the orbital from its ionization potential `ip` (> 0), the charge `charge` (≥ 0)
    /// of the residual ion and the asymptotic terms.
    ///
    /// # Errors
    /// [`TunnellingError::InvalidValue`] for a non-positive or non-finite `ip` or a negative or
    /// non-finite `charge`; [`TunnellingError::EmptyOrbital`] for no terms;
    /// [`TunnellingError::InvalidTerm`] for a term with `|m'| > l`, `l > MAX_ANGULAR_MOMENTUM`
    /// or a non-finite coefficient.
    pub fn new(ip: f64, charge: f64, terms: Vec<AsymptoticTerm>) -> Result<Self, TunnellingError> {
        check_positive("ip", ip)?;
        if !charge.is_finite() || charge < 0.0 {
            return Err(TunnellingError::invalid(
                "charge",
                charge,
                "the residual-ion charge must be finite and non-negative",
            ));
        }
        if terms.is_empty() {
            return Err(TunnellingError::EmptyOrbital);
        }
        for (index, t) in terms.iter().enumerate() {
            let reject = |reason: String| TunnellingError::InvalidTerm {
                index,
                l: t.l,
                m_prime: t.m_prime,
                re: t.coefficient.re,
                im: t.coefficient.im,
                reason,
            };
            if let Err(e) = check_l_m("l, m'", t.l, t.m_prime) {
                let reason = match e {
                    TunnellingError::InvalidQuantumNumbers { reason, .. } => reason,
                    other => other.to_string(),
                };
                return Err(reject(reason));
            }
            if !(t.coefficient.re.is_finite() && t.coefficient.im.is_finite()) {
                return Err(reject("the coefficient must be finite".to_string()));
            }
        }
        let kappa = (2.0 * ip).sqrt();
        let l_max = terms.iter().map(|t| t.l).max().unwrap_or(0);
        let mut runs = Vec::new();
        let mut wigner_terms = Vec::new();
        for t in &terms {
            let l = t.l as i32;
            for m in -l..=l {
                let q = q_unchecked(t.l, m);
                let start = wigner_terms.len();
                for_each_wigner_term(t.l, m, t.m_prime, |w| {
                    wigner_terms.push(WignerTerm {
                        coefficient: w.coefficient * q,
                        ..w
                    });
                });
                let end = wigner_terms.len();
                runs.push(Run {
                    coefficient: t.coefficient,
                    m,
                    m_prime: t.m_prime,
                    start,
                    end,
                });
            }
        }
        let leading_runs = runs.iter().copied().filter(|r| r.m == 0).collect();
        let kappa_power = kappa.powf(1.0 - 2.0 * charge / kappa);
        Ok(Self {
            ip,
            charge,
            kappa,
            terms,
            l_max,
            runs,
            leading_runs,
            wigner_terms,
            kappa_power,
        })
    }

    /// Ionization potential (a.u.).
    pub fn ip(&self) -> f64 {
        self.ip
    }

    /// Charge of the residual ion.
    pub fn charge(&self) -> f64 {
        self.charge
    }

    /// `κ = √(2 Ip)`.
    pub fn kappa(&self) -> f64 {
        self.kappa
    }

    /// The asymptotic terms as given.
    pub fn terms(&self) -> &[AsymptoticTerm] {
        &self.terms
    }

    /// Largest `l` among the terms.
    pub fn l_max(&self) -> u32 {
        self.l_max
    }

    /// Structure factors `B(m; R) = Σ_t C_t D^{l_t}_{m m'_t}(R) Q(l_t, m)` for the rotation
    /// `R` from the molecular frame to an exit frame (`v_exit = R v_mol`, `+z_exit` = the
    /// direction in which the electron leaves; Tong et al. 2002, physics notes §3.4).
    ///
    /// If you hold the molecular → lab rotation with the electric field along +lab z, pass
    /// [`EulerZyz::exit_frame_for_field_along_lab_z`] of it, or use
    /// [`Self::amplitudes_for_field`] with [`EulerZyz::lab_z_in_molecular_frame`].
    pub fn structure_factor_in_frame(&self, frame: &EulerZyz) -> StructureAmplitudes {
        let (s, c) = (0.5 * frame.beta()).sin_cos();
        let e_alpha = Complex64::from_polar(1.0, -frame.alpha());
        let e_gamma = Complex64::from_polar(1.0, -frame.gamma());
        self.evaluate(c, s, e_alpha, e_gamma)
    }

    /// Structure factors `B(m)`, `|m| ≤ l_max`, for an electric field along `field_direction`
    /// (a vector in the molecular frame, any positive length; normalised here). The electron
    /// leaves along `û = −Ê`; with `(θ, φ)` the polar angles of `û` in the molecular frame the
    /// exit frame is `(θ̂, φ̂, û)`, i.e. Euler angles `(π, θ, π − φ)` (`Rᵀ = Rz(φ) Ry(θ)`), with
    /// `φ = 0` when `û` lies on the molecular axis. `B(0)` does not depend on that choice;
    /// `B(m ≠ 0)` change by `e^{−imδ}` under a rotation `δ` of the exit frame about `û`.
    ///
    /// # Errors
    /// [`TunnellingError::InvalidDirection`] if the vector is zero or not finite.
    pub fn amplitudes_for_field(
        &self,
        field_direction: Vector3<f64>,
    ) -> Result<StructureAmplitudes, TunnellingError> {
        let (c, s, e_gamma) = exit_angles(field_direction)?;
        Ok(self.evaluate(c, s, Complex64::new(-1.0, 0.0), e_gamma))
    }

    /// The leading (`m = 0`) signed amplitude `B(0; Ê) = √(2π) Σ_t C_t Y_{l_t m'_t}(−Ê)` for an
    /// electric field along `field_direction` (molecular frame); the cheap part of
    /// [`Self::amplitudes_for_field`].
    ///
    /// # Errors
    /// [`TunnellingError::InvalidDirection`] if the vector is zero or not finite.
    pub fn leading_amplitude_for_field(
        &self,
        field_direction: Vector3<f64>,
    ) -> Result<Complex64, TunnellingError> {
        let (c, s, e_gamma) = exit_angles(field_direction)?;
        // m = 0: the α phase is 1.
        let powers = Powers::new(self.l_max, c, s, e_gamma);
        Ok(self
            .leading_runs
            .iter()
            .map(|run| self.run_value(run, &powers))
            .sum())
    }

    /// The radial factor of the MO-ADK rate for projection `|m|`:
    /// `κ^{−(2Z/κ − 1)} (2κ³/F)^{2Z/κ − |m| − 1} e^{−2κ³/(3F)} / (2^{|m|} |m|!)`, so that
    /// `w_stat = Σ_m |B(m)|² rate_weight(|m|, F)` (Tong et al. 2002; physics notes §3.4).
    ///
    /// # Errors
    /// [`TunnellingError::InvalidValue`] unless `field` is finite and positive.
    pub fn rate_weight(&self, abs_m: u32, field: f64) -> Result<f64, TunnellingError> {
        check_positive("field", field)?;
        Ok(self.rate_weight_unchecked(abs_m, field))
    }

    /// The pre-exponential part of [`Self::rate_weight`]:
    /// `κ^{−(2Z/κ − 1)} (2κ³/F)^{2Z/κ − |m| − 1} / (2^{|m|} |m|!)`, i.e. the rate weight
    /// without the tunnelling exponent `e^{−2κ³/(3F)}` — for amplitude models in which the
    /// exponent comes from the complex action itself and must not be counted twice
    /// (DESIGN §4.4). `√(rate_prefactor)` times `B(m)` is then the signed prefactor amplitude.
    ///
    /// # Errors
    /// [`TunnellingError::InvalidValue`] unless `field` is finite and positive.
    pub fn rate_prefactor(&self, abs_m: u32, field: f64) -> Result<f64, TunnellingError> {
        check_positive("field", field)?;
        Ok(self.rate_prefactor_unchecked(abs_m, field))
    }

    fn rate_prefactor_unchecked(&self, abs_m: u32, field: f64) -> f64 {
        let kappa3 = self.kappa * self.kappa * self.kappa;
        let x = 2.0 * kappa3 / field;
        let exponent = 2.0 * self.charge / self.kappa - f64::from(abs_m) - 1.0;
        let m_factor = f64::from(abs_m).exp2() * factorial(abs_m);
        self.kappa_power * x.powf(exponent) / m_factor
    }

    fn rate_weight_unchecked(&self, abs_m: u32, field: f64) -> f64 {
        let kappa3 = self.kappa * self.kappa * self.kappa;
        self.rate_prefactor_unchecked(abs_m, field) * (-2.0 * kappa3 / (3.0 * field)).exp()
    }

    /// Static MO-ADK rate `Σ_m |B(m)|² rate_weight(|m|, F)` from precomputed amplitudes.
    ///
    /// # Errors
    /// [`TunnellingError::InvalidValue`] unless `field` is finite and positive.
    pub fn static_rate_from_amplitudes(
        &self,
        field: f64,
        amplitudes: &StructureAmplitudes,
    ) -> Result<f64, TunnellingError> {
        check_positive("field", field)?;
        let l = amplitudes.l_max.min(self.l_max) as i32;
        // Horner in 1/(2x) over |m|: Σ_{|m|} S_{|m|} (2x)^{−|m|} / |m|!, x = 2κ³/F, where
        // S_{|m|} sums |B(m)|² over ±m; then the |m| = 0 weight multiplies the whole sum.
        let kappa3 = self.kappa * self.kappa * self.kappa;
        let inv_2x = field / (4.0 * kappa3);
        let mut sum = 0.0;
        for am in (0..=l).rev() {
            let mut s_m = amplitudes.values[slot(am)].norm_sqr();
            if am > 0 {
                s_m += amplitudes.values[slot(-am)].norm_sqr();
            }
            // sum_{am} = S_am + sum_{am+1} · inv_2x / (am + 1)
            sum = s_m + sum * inv_2x / f64::from(am + 1);
        }
        Ok(sum * self.rate_weight_unchecked(0, field))
    }

    /// Static MO-ADK rate (a.u.) for a field of strength `field` in the exit frame `frame`
    /// (see [`Self::structure_factor_in_frame`]).
    ///
    /// Validity as ADK: tunnelling regime, below barrier suppression; not enforced.
    ///
    /// # Errors
    /// [`TunnellingError::InvalidValue`] unless `field` is finite and positive.
    pub fn static_rate_in_frame(
        &self,
        field: f64,
        frame: &EulerZyz,
    ) -> Result<f64, TunnellingError> {
        self.static_rate_from_amplitudes(field, &self.structure_factor_in_frame(frame))
    }

    /// Static MO-ADK rate (a.u.) for an electric field of strength `field` along
    /// `field_direction` (molecular frame; see [`Self::amplitudes_for_field`]).
    ///
    /// # Errors
    /// [`TunnellingError::InvalidValue`] for a bad `field`,
    /// [`TunnellingError::InvalidDirection`] for a bad direction.
    pub fn static_rate_for_field(
        &self,
        field: f64,
        field_direction: Vector3<f64>,
    ) -> Result<f64, TunnellingError> {
        check_positive("field", field)?;
        self.static_rate_from_amplitudes(field, &self.amplitudes_for_field(field_direction)?)
    }

    /// Cycle-averaged MO-ADK rate for a linearly polarised field of peak strength `field`
    /// along ±`field_direction`: the static rate × `√(3F/(πκ³))` (physics notes §3.4).
    ///
    /// The average runs over both half cycles, so it is the mean of the static rates for
    /// `+Ê` and `−Ê` (these differ for orbitals without definite parity).
    ///
    /// # Errors
    /// As [`Self::static_rate_for_field`].
    pub fn cycle_averaged_rate_for_field(
        &self,
        field: f64,
        field_direction: Vector3<f64>,
    ) -> Result<f64, TunnellingError> {
        let plus = self.static_rate_for_field(field, field_direction)?;
        let minus = self.static_rate_for_field(field, -field_direction)?;
        let kappa3 = self.kappa * self.kappa * self.kappa;
        let average = (3.0 * field / (std::f64::consts::PI * kappa3)).sqrt();
        Ok(0.5 * (plus + minus) * average)
    }

    /// `C_t e^{−im'γ} d^l_{m m'}(β) Q(l, m)` for one run.
    fn run_value(&self, run: &Run, powers: &Powers) -> Complex64 {
        let d: f64 = self.wigner_terms[run.start..run.end]
            .iter()
            .map(|w| w.coefficient * powers.cos[w.cos_power] * powers.sin[w.sin_power])
            .sum();
        run.coefficient * powers.gamma_phase(run.m_prime) * d
    }

    /// Sums `B(m)` from the precomputed Wigner runs. `c`, `s` = cos(β/2), sin(β/2);
    /// `e_alpha = e^{−iα}`, `e_gamma = e^{−iγ}`.
    fn evaluate(
        &self,
        c: f64,
        s: f64,
        e_alpha: Complex64,
        e_gamma: Complex64,
    ) -> StructureAmplitudes {
        let powers = Powers::new(self.l_max, c, s, e_gamma);
        let mut values = [Complex64::new(0.0, 0.0); M_SLOTS];
        for run in &self.runs {
            values[slot(run.m)] += self.run_value(run, &powers);
        }
        // Multiply by e^{−imα}: m = 0 unchanged, ±m by the k-th power and its conjugate.
        let mut phase = Complex64::new(1.0, 0.0);
        for m in 1..=self.l_max as i32 {
            phase *= e_alpha;
            values[slot(m)] *= phase;
            values[slot(-m)] *= phase.conj();
        }
        StructureAmplitudes {
            l_max: self.l_max,
            values,
        }
    }
}

/// For an electric field along `field_direction`: cos(θ/2), sin(θ/2) and `e^{−iγ}` with
/// `γ = π − φ` of the exit direction `û = −Ê` (polar angles θ, φ in the molecular frame).
/// Half angles come from `û_z` and `ρ = √(û_x² + û_y²)` without trigonometric calls, keeping
/// full relative accuracy near both poles.
fn exit_angles(field_direction: Vector3<f64>) -> Result<(f64, f64, Complex64), TunnellingError> {
    let (x, y, z) = (field_direction.x, field_direction.y, field_direction.z);
    let invalid = |reason| TunnellingError::InvalidDirection {
        name: "field_direction",
        x,
        y,
        z,
        reason,
    };
    if !(x.is_finite() && y.is_finite() && z.is_finite()) {
        return Err(invalid("the field direction must be finite"));
    }
    let scale = x.abs().max(y.abs()).max(z.abs());
    if scale == 0.0 {
        return Err(invalid("the field direction must be a non-zero vector"));
    }
    // Scale first so that the norm neither overflows nor underflows.
    let scaled = field_direction / scale;
    let u = -scaled / scaled.norm();
    let rho = u.x.hypot(u.y);
    let (c, s) = if u.z >= 0.0 {
        let c = (0.5 * (1.0 + u.z)).sqrt();
        (c, rho / (2.0 * c))
    } else {
        let s = (0.5 * (1.0 - u.z)).sqrt();
        (rho / (2.0 * s), s)
    };
    // e^{−iγ} = e^{−i(π − φ)} = −e^{iφ} = −(u_x + i u_y)/ρ; φ = 0 on the axis.
    let e_gamma = if rho > 0.0 {
        Complex64::new(-u.x / rho, -u.y / rho)
    } else {
        Complex64::new(-1.0, 0.0)
    };
    Ok((c, s, e_gamma))
}
