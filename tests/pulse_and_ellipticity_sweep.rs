//! The robustness sweep of the trajectory stage on a reduced grid (the full grid is
//! `cargo run --release --example orbit_sweep`): sin² pulses of 2, 3, 5 and 8 fs FWHM at six
//! carrier-envelope phases, continuous elliptical fields up to ε = 0.9 at 800 and 1300 nm, for
//! hydrogen and channel pairs of the demo targets, from just above the recombination threshold
//! to 20% past the cutoff.
//!
//! Checks (common practice for a saddle-point code, no published source): no failed point; no
//! growing saddle summed — `Im Φ < 0`, or past its half cycle's cutoff a member whose `Im Φ`
//! is smaller than its partner's, or falls relative to the pair's mean, or two members summed
//! (the Stokes rule of physics notes §2.2); and the uniform pair sum past the cutoff never
//! exceeds three times the decaying member's plain contribution (Ai(x) ~ e^{−(2/3)x^{3/2}},
//! DLMF §9.7). The audit is in `examples/orbit_sweep/audit.rs`, shared with the example.

#[path = "../examples/orbit_sweep/audit.rs"]
mod audit;

use audit::{Audit, audit_case, elliptical, pulse};

fn check(
    name: &str,
    field: &holecast::field::Field,
    pairs: &[(f64, f64)],
    report: &mut Vec<String>,
) {
    let mut sum = Audit::default();
    for &(a, b) in pairs {
        sum.add(&audit_case(field, a, b, 40));
    }
    if sum.failed + sum.growing + sum.uniform_growing > 0 {
        report.push(format!(
            "{name}: failed {}, growing {}, uniform growing {}: {}",
            sum.failed,
            sum.growing,
            sum.uniform_growing,
            sum.notes.join("; ")
        ));
    }
}

#[test]
fn few_cycle_pulses_have_no_failed_or_growing_saddle() {
    let pairs = [(13.6, 13.6), (13.8, 18.1), (17.6, 13.8), (12.6, 14.7)];
    let mut report = Vec::new();
    for fwhm in [2.0, 3.0, 5.0, 8.0] {
        for cep in [0.0, 60.0, 90.0, 150.0, 210.0, 300.0] {
            let name = format!("{fwhm} fs, CEP {cep}°");
            check(&name, &pulse(fwhm, cep, 1.5e14, 800.0), &pairs, &mut report);
        }
    }
    check(
        "3 fs, CEP 30°, 3e14 W/cm²",
        &pulse(3.0, 30.0, 3e14, 800.0),
        &pairs,
        &mut report,
    );
    assert!(report.is_empty(), "{}", report.join("\n"));
}

#[test]
fn elliptical_fields_have_no_failed_or_growing_saddle() {
    let pairs = [(13.6, 13.6), (14.7, 12.6)];
    let mut report = Vec::new();
    for wavelength in [800.0, 1300.0] {
        for eps in [0.0, 0.3, 0.6, 0.9] {
            let name = format!("ε = {eps}, {wavelength} nm");
            check(
                &name,
                &elliptical(eps, 1.5e14, wavelength),
                &pairs,
                &mut report,
            );
        }
    }
    assert!(report.is_empty(), "{}", report.join("\n"));
}
