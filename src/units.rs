//! Conversion between laboratory units and atomic units.
//!
//! Everything inside holecast is in Hartree atomic units (ħ = mₑ = e = 4πε₀ = 1). Lab units
//! appear only at the boundary: input parsing and output writing call the functions here and
//! nowhere else converts.
//!
//! Constants are the CODATA 2018 recommended values (E. Tiesinga, P. J. Mohr, D. B. Newell,
//! B. N. Taylor, Rev. Mod. Phys. 93, 025010 (2021)). Note that SciPy ≥ 1.15 ships CODATA 2022,
//! whose values differ in the last digits; reference scripts state which table they used.
//!
//! Intensity: "the atomic unit of intensity" is not a CODATA quantity. We use the common
//! convention `I_au = ½ ε₀ c E_au²`, the cycle-averaged intensity of a linearly polarised plane
//! wave whose peak field is one atomic unit, so that `F₀ = sqrt(I / I_au)` is the peak field of a
//! linearly polarised wave of cycle-averaged intensity `I`.

/// Hartree energy in electronvolts (CODATA 2018).
pub const HARTREE_EV: f64 = 27.211_386_245_988;
/// Atomic unit of time in seconds (CODATA 2018).
pub const AU_TIME_S: f64 = 2.418_884_326_585_7e-17;
/// Atomic unit of time in femtoseconds.
pub const AU_TIME_FS: f64 = AU_TIME_S * 1e15;
/// Atomic unit of electric field in V/m (CODATA 2018).
pub const AU_FIELD_V_PER_M: f64 = 5.142_206_747_63e11;
/// Bohr radius in metres (CODATA 2018).
pub const BOHR_M: f64 = 5.291_772_109_03e-11;
/// Bohr radius in ångström.
pub const BOHR_ANGSTROM: f64 = BOHR_M * 1e10;
/// Speed of light in vacuum, m/s (exact).
pub const SPEED_OF_LIGHT_M_PER_S: f64 = 299_792_458.0;
/// Vacuum electric permittivity ε₀ in F/m (CODATA 2018).
pub const EPSILON_0: f64 = 8.854_187_812_8e-12;
/// Debye in atomic units of electric dipole (e·a₀): 1 D = 10⁻²¹/c C·m, e·a₀ = 8.478353...e-30 C·m
/// (CODATA 2018 atomic unit of electric dipole moment 8.478 353 6255e-30 C m).
pub const DEBYE_AU: f64 = 1e-21 / SPEED_OF_LIGHT_M_PER_S / 8.478_353_625_5e-30;

/// Cycle-averaged intensity, in W/cm², of a linearly polarised wave with peak field 1 a.u.:
/// `½ ε₀ c E_au²` (≈ 3.50944552e16 W/cm²).
pub fn intensity_au_wcm2() -> f64 {
    0.5 * EPSILON_0 * SPEED_OF_LIGHT_M_PER_S * AU_FIELD_V_PER_M * AU_FIELD_V_PER_M * 1e-4
}

/// Energy: electronvolts → hartree.
pub fn ev_to_au(ev: f64) -> f64 {
    ev / HARTREE_EV
}

/// Energy: hartree → electronvolts.
pub fn au_to_ev(au: f64) -> f64 {
    au * HARTREE_EV
}

/// Time: femtoseconds → atomic units.
pub fn fs_to_au(fs: f64) -> f64 {
    fs / AU_TIME_FS
}

/// Time: atomic units → femtoseconds.
pub fn au_to_fs(au: f64) -> f64 {
    au * AU_TIME_FS
}

/// Time: atomic units → attoseconds.
pub fn au_to_as(au: f64) -> f64 {
    au * AU_TIME_FS * 1e3
}

/// Length: ångström → bohr.
pub fn angstrom_to_au(a: f64) -> f64 {
    a / BOHR_ANGSTROM
}

/// Photon angular frequency in a.u. for a vacuum wavelength in nm:
/// `ω = 2π c ħ / (λ E_h)`, numerically `45.563352529… / λ[nm]`.
pub fn wavelength_nm_to_omega(lambda_nm: f64) -> f64 {
    let period_s = lambda_nm * 1e-9 / SPEED_OF_LIGHT_M_PER_S;
    2.0 * std::f64::consts::PI * AU_TIME_S / period_s
}

/// Vacuum wavelength in nm of a photon of angular frequency `omega` (a.u.).
pub fn omega_to_wavelength_nm(omega: f64) -> f64 {
    2.0 * std::f64::consts::PI * AU_TIME_S / omega * SPEED_OF_LIGHT_M_PER_S * 1e9
}

/// Peak field (a.u.) of a linearly polarised wave of cycle-averaged intensity `i_wcm2`.
pub fn intensity_to_peak_field(i_wcm2: f64) -> f64 {
    (i_wcm2 / intensity_au_wcm2()).sqrt()
}

/// Cycle-averaged intensity (W/cm²) of a linearly polarised wave of peak field `f` (a.u.).
pub fn peak_field_to_intensity(f: f64) -> f64 {
    f * f * intensity_au_wcm2()
}

/// Ponderomotive energy `Up = F²/(4ω²)` (a.u.) of a linearly polarised wave of peak field `f`
/// and angular frequency `omega`.
pub fn ponderomotive_energy(f: f64, omega: f64) -> f64 {
    f * f / (4.0 * omega * omega)
}

/// Keldysh parameter `γ = sqrt(Ip / (2 Up))` (L. V. Keldysh, Sov. Phys. JETP 20, 1307 (1965)).
pub fn keldysh(ip: f64, up: f64) -> f64 {
    (ip / (2.0 * up)).sqrt()
}

/// Electric dipole: debye → atomic units (e·a₀).
pub fn debye_to_au(d: f64) -> f64 {
    d * DEBYE_AU
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn derived_constants_match_codata_2018_derived_values() {
        // Source: ½ ε0 c E_au² with CODATA 2018 values = 3.50944552e16 W/cm² (physics notes §7,
        // computed from CODATA 2018).
        assert!((intensity_au_wcm2() / 3.509_445_52e16 - 1.0).abs() < 1e-8);
        // ω·λ = 45.563352529 a.u.·nm (CODATA 2018 hartree and c).
        assert!((wavelength_nm_to_omega(1.0) / 45.563_352_529 - 1.0).abs() < 1e-10);
        assert!((omega_to_wavelength_nm(wavelength_nm_to_omega(800.0)) - 800.0).abs() < 1e-9);
        // 1 D = 0.393430 e·a0 (CODATA-derived; common practice value 0.393430).
        assert!((debye_to_au(1.0) - 0.393_430_3).abs() < 1e-6);
    }
}
