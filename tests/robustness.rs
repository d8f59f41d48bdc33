//! Robustness sweep of the trajectory stage: no failed point over the whole plateau and 20% past
//! the cutoff, for the parameter ranges the tool is meant for (common practice: a tracker that
//! fails on ordinary inputs is not usable; no published source).

use holecast::cutoff::cutoffs;
use holecast::field::{Colour, Envelope, Field, Polarization};
use holecast::orbits::{ChannelPair, OrbitPoint, OrbitSettings, solve_orbits};
use holecast::units::{ev_to_au, intensity_to_peak_field, wavelength_nm_to_omega};

fn linear(intensity: f64, wavelength: f64) -> Colour {
    Colour {
        omega: wavelength_nm_to_omega(wavelength),
        peak_field: intensity_to_peak_field(intensity),
        phase: 0.0,
        polarization: Polarization::Linear { angle: 0.0 },
    }
}

/// Solves on a grid from just above Ip to 1.2 × the quantum cutoff with ~60 points and returns
/// (failed points, total points, description of the first failure).
fn sweep(field: &Field, ip: f64) -> (usize, usize, String) {
    let settings = OrbitSettings::default();
    let pair = ChannelPair::single(ip);
    let c = cutoffs(field, pair, &settings);
    let top = 1.2 * c.quantum.unwrap_or(c.classical);
    let lo = ip + 0.1 * field.ponderomotive_energy();
    let n = 60;
    let grid: Vec<f64> = (0..=n)
        .map(|k| lo + (top - lo) * k as f64 / n as f64)
        .collect();
    let table = solve_orbits(field, pair, &grid, &settings).expect("valid input");
    let mut first = String::new();
    for f in &table.families {
        for (k, p) in f.points.iter().enumerate() {
            if let OrbitPoint::Failed(fl) = p
                && first.is_empty()
            {
                first = format!(
                    "{} hc{} at Ω = {:.4} a.u.: {}",
                    f.label, f.half_cycle, grid[k], fl.reason
                );
            }
        }
    }
    let total = table.families.len() * grid.len();
    let expected_families = 4;
    if table.families.len() != expected_families {
        first = format!(
            "{} families instead of {expected_families}",
            table.families.len()
        );
        return (total.max(1), total, first);
    }
    (table.failed_points(), total, first)
}

#[test]
fn linear_fields_have_no_failed_points() {
    let mut report = Vec::new();
    for &intensity in &[5e13, 1e14, 2.5e14, 5e14] {
        for &wavelength in &[400.0, 800.0, 1300.0, 2000.0] {
            for &ip_ev in &[10.0, 15.76, 25.0] {
                let field = Field::new(&[linear(intensity, wavelength)], Envelope::Continuous)
                    .expect("valid field");
                let (failed, total, first) = sweep(&field, ev_to_au(ip_ev));
                if failed > 0 {
                    report.push(format!(
                        "I={intensity:e} λ={wavelength} Ip={ip_ev}: {failed}/{total} failed; {first}"
                    ));
                }
            }
        }
    }
    assert!(report.is_empty(), "failures:\n{}", report.join("\n"));
}

#[test]
fn elliptical_fields_have_no_failed_points() {
    let mut report = Vec::new();
    for &eps in &[0.1, 0.2, 0.3] {
        for &(intensity, wavelength) in &[(1e14, 800.0), (3e14, 800.0), (1e14, 1600.0)] {
            let mut c = linear(intensity, wavelength);
            c.polarization = Polarization::Elliptical {
                ellipticity: eps,
                major_axis: 0.0,
            };
            let field = Field::new(&[c], Envelope::Continuous).expect("valid field");
            let (failed, total, first) = sweep(&field, ev_to_au(15.76));
            if failed > 0 {
                report.push(format!(
                    "ε={eps} I={intensity:e} λ={wavelength}: {failed}/{total}; {first}"
                ));
            }
        }
    }
    assert!(report.is_empty(), "failures:\n{}", report.join("\n"));
}

#[test]
fn two_colour_fields_have_no_failed_points() {
    let mut report = Vec::new();
    for &ratio in &[0.01, 0.1, 0.25] {
        for &phase in &[0.0, 0.5 * std::f64::consts::PI, std::f64::consts::PI] {
            for &angle in &[0.0, 0.5 * std::f64::consts::PI] {
                let first = linear(1.5e14, 800.0);
                let second = Colour {
                    omega: 2.0 * first.omega,
                    peak_field: first.peak_field * f64::sqrt(ratio),
                    phase,
                    polarization: Polarization::Linear { angle },
                };
                let field =
                    Field::new(&[first, second], Envelope::Continuous).expect("valid field");
                let (failed, total, msg) = sweep(&field, ev_to_au(15.76));
                if failed > 0 {
                    report.push(format!(
                        "ratio={ratio} φ={phase:.2} angle={angle:.2}: {failed}/{total}; {msg}"
                    ));
                }
            }
        }
    }
    assert!(report.is_empty(), "failures:\n{}", report.join("\n"));
}
