//! The structure factors of one orientation on the lattice and their sum into `d_mn(t)`.
//!
//! For each `(t_i, τ)` point and coupled channel pair `n → m` the integrand of
//! [`super`] is completed by the factors that depend on the molecule:
//!
//! ```text
//! K₀(i, k) · e^{iIp_n t_i} · [U_I(t, t_i)]_mn · R J_mn,
//! J_mn = ∫ d³q e^{−(ε+iτ)q²/2} d̄_m(Rᵀ(v_r + q), Ω_loc) a_n(Rᵀ(v_i + q), Rᵀ E(t_i)),
//! v_r = p_s + A(t),  v_i = p_s + A(t_i),  Ω_loc = ½ v_r² + Ip_m,
//! ```
//!
//! with the momentum integral `J_mn` done exactly for Gaussian-type structure
//! ([`crate::momentum::exact_integral`], [`MomentumIntegral::Exact`], the default) or by the
//! shortcut `(2π/(ε+iτ))^{3/2} d̄_m(Rᵀv_r) a_n(Rᵀv_i, …)` ([`MomentumIntegral::Stationary`]).
//!
//! and added to the emission time `t = t_i + τ`. The factor `e^{−iIp_m t}` is applied after the
//! orientation sum. `Ω_loc` is the photon energy that energy conservation at recombination
//! assigns to the point; at a return saddle it equals Ω, so models that need a photon energy
//! (the `photon` return momentum of `lcao`, the `table` model) get the value the saddle path
//! gives them there.

use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

use super::MomentumIntegral;
use super::lattice::Lattice;
use crate::error::{Error, Result};
use crate::field::CVec3;
use crate::hole::{FieldSamples, HolePropagator};
use crate::ionization::IonizationModel;
use crate::momentum::{GaussianSide, IonSide, RecSide, exact_integral};
use crate::orientation::Orientation;
use crate::target::Target;

/// The Gaussian forms of one channel's structure models (None where a model has none).
pub(super) struct ChannelSides {
    pub ion: Option<GaussianSide>,
    pub rec: Option<GaussianSide>,
}

impl ChannelSides {
    pub fn of(target: &Target) -> Vec<ChannelSides> {
        target
            .channels
            .iter()
            .map(|c| ChannelSides {
                ion: GaussianSide::ionization(&c.ionization),
                rec: GaussianSide::recombination(&c.recombination),
            })
            .collect()
    }
}

/// Everything the orientation loop reads.
pub(super) struct Context<'a> {
    pub target: &'a Target,
    pub lattice: &'a Lattice,
    /// `K₀`, row-major.
    pub kernel: &'a [Complex64],
    /// `ρ = ε + iτ` per column.
    pub rho: &'a [Complex64],
    /// `(2π/ρ)^{3/2}` per column.
    pub spreading: &'a [Complex64],
    /// How the momentum integral is done.
    pub momentum: MomentumIntegral,
    /// Gaussian forms of every channel's models.
    pub sides: &'a [ChannelSides],
    /// `(ion, rec)` of every coupled pair.
    pub pairs: &'a [(usize, usize)],
    /// `e^{iIp_n t_i}` per channel and birth row.
    pub birth_phase: &'a [Vec<Complex64>],
    /// Field samples of the hole propagator (None when the ion needs no propagation).
    pub hole_samples: Option<&'a FieldSamples>,
}

/// `R v` for a real matrix and a complex vector.
#[inline]
pub(super) fn rotate(r: &Matrix3<f64>, v: &CVec3) -> CVec3 {
    CVec3::new(
        v.x * r[(0, 0)] + v.y * r[(0, 1)] + v.z * r[(0, 2)],
        v.x * r[(1, 0)] + v.y * r[(1, 1)] + v.z * r[(1, 2)],
        v.x * r[(2, 0)] + v.y * r[(2, 1)] + v.z * r[(2, 2)],
    )
}

fn complex(v: &Vector3<f64>) -> CVec3 {
    v.map(|x| Complex64::new(x, 0.0))
}

/// `U_I(t_j, t₀)` of one orientation at every lattice time, `N × N` row-major per time.
struct HoleTable {
    channels: usize,
    values: Vec<Complex64>,
}

impl HoleTable {
    fn new(ctx: &Context<'_>, o: &Orientation, samples: &FieldSamples) -> Result<HoleTable> {
        let prop = HolePropagator::new(&ctx.target.ion, &o.rotation, samples)
            .map_err(|e| Error::Numerical(format!("hole propagator: {e}")))?;
        let n = prop.channels();
        let t_ref = ctx.lattice.time(0);
        let mut values = Vec::with_capacity(ctx.lattice.emission_points() * n * n);
        for j in 0..ctx.lattice.emission_points() {
            let u = prop
                .matrix(ctx.lattice.time(j), t_ref)
                .map_err(|e| Error::Numerical(format!("hole propagator: {e}")))?;
            for m in 0..n {
                for l in 0..n {
                    values.push(u[(m, l)]);
                }
            }
        }
        Ok(HoleTable {
            channels: n,
            values,
        })
    }

    /// `[U_I(t_j, t_i)]_mn = Σ_l U_I(t_j, t₀)_ml conj(U_I(t_i, t₀)_nl)`.
    #[inline]
    fn element(&self, m: usize, n: usize, j: usize, i: usize) -> Complex64 {
        let nc = self.channels;
        let a = &self.values[(j * nc + m) * nc..(j * nc + m + 1) * nc];
        let b = &self.values[(i * nc + n) * nc..(i * nc + n + 1) * nc];
        a.iter()
            .zip(b)
            .fold(Complex64::new(0.0, 0.0), |s, (x, y)| s + x * y.conj())
    }
}

/// `weight × d_mn(t_j)` (lab frame, without `e^{−iIp_m t_j}`) from orientation `o` and the birth
/// rows `rows`, per pair and emission time.
pub(super) fn orientation_sum(
    ctx: &Context<'_>,
    o: &Orientation,
    rows: std::ops::Range<usize>,
) -> Result<Vec<Vec<CVec3>>> {
    let lat = ctx.lattice;
    let nt = lat.emission_points();
    let cols = lat.columns();
    let h = lat.step;
    let channels = &ctx.target.channels;
    let holes = match ctx.hole_samples {
        Some(s) => Some(HoleTable::new(ctx, o, s)?),
        None => None,
    };
    let r = &o.rotation;
    let rt = r.transpose();
    let zero = CVec3::zeros();
    let mut acc = vec![vec![zero; nt]; ctx.pairs.len()];
    let mut rec = vec![zero; channels.len()];
    let mut ion = vec![Complex64::new(0.0, 0.0); channels.len()];
    for i in rows {
        if lat.birth_weight[i] == 0.0 {
            continue;
        }
        let fi = &lat.field[i];
        let e_mol = rt * fi.e;
        let e_mol_c = complex(&e_mol);
        let kernel_row = &ctx.kernel[i * cols..(i + 1) * cols];
        for (c, &k0) in kernel_row.iter().enumerate() {
            if k0 == Complex64::new(0.0, 0.0) {
                continue;
            }
            let k = lat.k_first + c;
            let j = i + k;
            let fj = &lat.field[j];
            let drift = -(fj.int_a - fi.int_a) / (k as f64 * h);
            let v_ret = drift + fj.a;
            let v_ion = drift + fi.a;
            let v_ret_mol = complex(&(rt * v_ret));
            let v_ion_mol = complex(&(rt * v_ion));
            let kinetic = 0.5 * v_ret.norm_squared();
            match ctx.momentum {
                MomentumIntegral::Stationary => {
                    for (ch, model) in channels.iter().enumerate() {
                        rec[ch] = model.recombination.vector(&v_ret_mol, kinetic + model.ip);
                        ion[ch] = model.ionization.factor(&v_ion_mol, &e_mol_c, &e_mol);
                    }
                    let spread = ctx.spreading[c];
                    for (p, &(n, m)) in ctx.pairs.iter().enumerate() {
                        let u = match &holes {
                            Some(t) => t.element(m, n, j, i),
                            None => Complex64::new(1.0, 0.0),
                        };
                        let scalar = k0 * spread * ctx.birth_phase[n][i] * u * ion[n];
                        acc[p][j] += rec[m] * scalar;
                    }
                }
                MomentumIntegral::Exact => {
                    let rho = ctx.rho[c];
                    for (p, &(n, m)) in ctx.pairs.iter().enumerate() {
                        let u = match &holes {
                            Some(t) => t.element(m, n, j, i),
                            None => Complex64::new(1.0, 0.0),
                        };
                        let ion_side = match (&ctx.sides[n].ion, &channels[n].ionization) {
                            (Some(g), _) => IonSide::Gaussian(g),
                            (None, IonizationModel::Constant { amplitude }) => {
                                IonSide::Constant(*amplitude)
                            }
                            // check_models rejects the other models before the loop.
                            (None, _) => IonSide::Constant(Complex64::new(f64::NAN, f64::NAN)),
                        };
                        let model = &channels[m];
                        let rec_side = match &ctx.sides[m].rec {
                            Some(g) => RecSide::Gaussian(g),
                            None => RecSide::Model(&model.recombination, kinetic + model.ip),
                        };
                        let integral = exact_integral(
                            ion_side, rec_side, &v_ion_mol, &v_ret_mol, &e_mol_c, rho,
                        );
                        acc[p][j] += integral * (k0 * ctx.birth_phase[n][i] * u);
                    }
                }
            }
        }
    }
    let w = o.weight;
    for (p, row) in acc.iter_mut().enumerate() {
        for (j, d) in row.iter_mut().enumerate() {
            if !d.iter().all(|c| c.is_finite()) {
                let (n, m) = ctx.pairs[p];
                return Err(Error::Numerical(format!(
                    "quadrature: the integrand of channel pair {} → {} is not finite at emission \
                     time t = {:.6} a.u. for the orientation (α, β, γ) = ({:.4}, {:.4}, {:.4}) rad \
                     (a structure model returned a non-finite value at a real momentum)",
                    channels[n].label,
                    channels[m].label,
                    lat.time(j),
                    o.alpha,
                    o.beta,
                    o.gamma
                )));
            }
            *d = rotate(r, d) * Complex64::new(w, 0.0);
        }
    }
    Ok(acc)
}
