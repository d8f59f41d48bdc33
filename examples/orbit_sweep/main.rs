//! The robustness sweep of the trajectory stage: sin² pulses (FWHM 2–10 fs, CEP 0–330° in steps
//! of 30°, 1.5 and 3 × 10¹⁴ W/cm², 800 nm) and continuous elliptical fields (ε = 0–0.9 in steps
//! of 0.1, 800 and 1300 nm, the same intensities), for hydrogen and every channel pair of the
//! demo targets (13.6 eV; 13.8/17.6/18.1 eV; 12.6/14.7 eV). Each case solves the first-return
//! orbits from just above the recombination threshold to 20% past the field's cutoff and prints
//! one line: failed points, growing saddles summed, labelled points (below threshold / no
//! classical return / far past the half cycle's own cutoff), excluded saddles, and the cutoffs
//! of the strongest half cycle for hydrogen.
//!
//! Run with `cargo run --release --example orbit_sweep` (about a minute on one core);
//! `-- --quick` runs a reduced grid, `-- --only TEXT` the cases whose name contains TEXT.

#[path = "audit.rs"]
mod audit;

use std::time::Instant;

use audit::{Audit, all_pairs, audit_case, elliptical, pulse};
use holecast::field::Field;
use holecast::units::au_to_ev;

fn run(name: &str, field: &Field, pairs: &[(f64, f64)], n: usize, total: &mut Audit) -> bool {
    let mut sum = Audit::default();
    let mut hydrogen = None;
    for &(a, b) in pairs {
        let r = audit_case(field, a, b, n);
        if (a, b) == (audit::HYDROGEN, audit::HYDROGEN) {
            hydrogen = Some((r.classical, r.quantum));
        }
        sum.add(&r);
    }
    total.add(&sum);
    let (cl, q) = hydrogen.unwrap_or((f64::NAN, None));
    println!(
        "{name:34} failed {:4} growing {:3} uniform-growing {:3} | labelled {:5} {:4} {:5} {:4} \
         excluded {:5} of {:6} | H: classical {:6.2} eV quantum {}{}",
        sum.failed,
        sum.growing,
        sum.uniform_growing,
        sum.labelled[0],
        sum.labelled[1],
        sum.labelled[2],
        sum.labelled[3],
        sum.excluded,
        sum.points,
        au_to_ev(cl),
        q.map_or("  none".to_string(), |q| format!("{:6.2} eV", au_to_ev(q))),
        if sum.notes.is_empty() {
            String::new()
        } else {
            format!(" | {}", sum.notes.join("; "))
        }
    );
    sum.failed + sum.growing + sum.uniform_growing == 0
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let quick = args.iter().any(|a| a == "--quick");
    // `--only TEXT`: run only the cases whose name contains TEXT.
    let only = args
        .iter()
        .position(|a| a == "--only")
        .and_then(|i| args.get(i + 1).cloned());
    let wanted = |name: &str| only.as_ref().is_none_or(|o| name.contains(o.as_str()));
    let pairs = all_pairs();
    let n = 80;
    let (fwhms, ceps, intensities, eps): (Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) = if quick {
        (
            vec![2.0, 3.0, 5.0],
            vec![0.0, 90.0, 210.0],
            vec![1.5e14],
            vec![0.0, 0.5, 0.9],
        )
    } else {
        (
            (2..=10).map(f64::from).collect(),
            (0..12).map(|k| 30.0 * f64::from(k)).collect(),
            vec![1.5e14, 3e14],
            (0..10).map(|k| 0.1 * f64::from(k)).collect(),
        )
    };
    let start = Instant::now();
    let mut total = Audit::default();
    let mut clean = 0;
    let mut cases = 0;
    println!(
        "columns: failed, growing summed, uniform growing | labelled: below threshold, no \
         classical return, far past own cutoff, cut by the pulse end; excluded; points"
    );
    for &i in &intensities {
        for &f in &fwhms {
            for &c in &ceps {
                let name = format!("pulse {f:4.1} fs CEP {c:5.1} {i:.1e} 800nm");
                if !wanted(&name) {
                    continue;
                }
                cases += 1;
                if run(&name, &pulse(f, c, i, 800.0), &pairs, n, &mut total) {
                    clean += 1;
                }
            }
        }
    }
    let pulses = start.elapsed();
    for &i in &intensities {
        for &wl in &[800.0, 1300.0] {
            for &e in &eps {
                let name = format!("elliptical ε {e:.1} {i:.1e} {wl:.0}nm");
                if !wanted(&name) {
                    continue;
                }
                cases += 1;
                if run(&name, &elliptical(e, i, wl), &pairs, n, &mut total) {
                    clean += 1;
                }
            }
        }
    }
    println!(
        "\n{cases} fields × {} channel pairs: {clean} fields clean; failed points {}, growing \
         saddles summed {}, uniform sums growing {}, of {} points; labelled {:?}; excluded {}",
        pairs.len(),
        total.failed,
        total.growing,
        total.uniform_growing,
        total.points,
        total.labelled,
        total.excluded
    );
    println!(
        "families by start: classical pair {}, coalescence {}, transverse continuation {}, \
         lone {}, not started {}",
        total.starts[0], total.starts[1], total.starts[2], total.starts[3], total.starts[4]
    );
    println!(
        "time: pulses {:.1} s, all {:.1} s",
        pulses.as_secs_f64(),
        start.elapsed().as_secs_f64()
    );
}
