//! Unit conversions against CODATA 2018 and the common Up formula.

use holecast::units::*;

#[test]
fn codata_2018_constants() {
    // CODATA 2018 (Tiesinga et al., RMP 93, 025010 (2021)): hartree, atomic unit of time, of
    // electric field, Bohr radius.
    assert_eq!(HARTREE_EV, 27.211_386_245_988);
    assert_eq!(AU_TIME_S, 2.418_884_326_585_7e-17);
    assert_eq!(AU_FIELD_V_PER_M, 5.142_206_747_63e11);
    assert_eq!(BOHR_M, 5.291_772_109_03e-11);
}

#[test]
fn intensity_unit_and_peak_field() {
    // I_au = ½ ε0 c E_au² = 3.50944552e16 W/cm² (CODATA 2018 values; physics notes §7).
    assert!((intensity_au_wcm2() / 3.509_445_52e16 - 1.0).abs() < 2e-9);
    // 1e14 W/cm² → F = 0.0533803 a.u. (physics notes §7, computed from CODATA 2018).
    assert!((intensity_to_peak_field(1e14) - 0.053_380_3).abs() < 1e-7);
    assert!(
        (peak_field_to_intensity(intensity_to_peak_field(3.3e14)) / 3.3e14 - 1.0).abs() < 1e-14
    );
}

#[test]
fn photon_energy_of_800_nm() {
    // ω[a.u.]·λ[nm] = 45.563352529 (CODATA 2018 hartree and exact c); 800 nm: ω = 0.0569542 a.u.
    // = 1.54980 eV, T = 110.320 a.u. = 2.66851 fs (physics notes §7).
    let w = wavelength_nm_to_omega(800.0);
    assert!((w * 800.0 - 45.563_352_529).abs() < 1e-8);
    assert!((w - 0.056_954_2).abs() < 1e-7);
    assert!((au_to_ev(w) - 1.549_80).abs() < 1e-5);
    let period = 2.0 * std::f64::consts::PI / w;
    assert!((period - 110.320).abs() < 1e-3);
    assert!((au_to_fs(period) - 2.668_51).abs() < 1e-5);
}

#[test]
fn ponderomotive_energy_matches_the_common_formula() {
    // Up[eV] = 9.33e-14 · I[W/cm²] · λ²[µm] is common practice; the exact coefficient from
    // CODATA 2018 is 9.33729e-14 (physics notes §7).
    for &(i, l) in &[(1e14, 800.0), (3e14, 1300.0), (5e13, 2000.0), (2e14, 400.0)] {
        let up = au_to_ev(ponderomotive_energy(
            intensity_to_peak_field(i),
            wavelength_nm_to_omega(l),
        ));
        let um = l / 1000.0;
        assert!(
            (up / (9.33e-14 * i * um * um) - 1.0).abs() < 1e-3,
            "common formula"
        );
        assert!(
            (up / (9.337_29e-14 * i * um * um) - 1.0).abs() < 1e-6,
            "exact coefficient"
        );
    }
    // 800 nm, 1e14 W/cm²: Up = 0.219609 a.u. = 5.97587 eV (physics notes §7).
    let up = ponderomotive_energy(intensity_to_peak_field(1e14), wavelength_nm_to_omega(800.0));
    assert!((up - 0.219_609).abs() < 1e-6);
}

#[test]
fn keldysh_parameter() {
    // γ = sqrt(Ip/2Up) (Keldysh 1965); H at 800 nm and 2e14 W/cm²: Up = 0.4392179 a.u.,
    // γ = 0.7545 (physics notes §2.1).
    let up = ponderomotive_energy(intensity_to_peak_field(2e14), wavelength_nm_to_omega(800.0));
    assert!((up - 0.439_217_9).abs() < 2e-7);
    assert!((keldysh(0.5, up) - 0.7545).abs() < 1e-4);
}
