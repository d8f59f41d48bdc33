//! Quantum orbits of hydrogen at 800 nm: the complex ionization and return times of the short
//! and long orbits of the first half cycle across the plateau.
//!
//! Run with `cargo run --release --example quantum_orbits`.

use holecast::laser::LaserSpec;
use holecast::orbits::{ChannelPair, OrbitPoint, OrbitSettings, solve_orbits};
use holecast::units;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let field = LaserSpec::monochromatic(2e14, 800.0).to_field()?;
    let w = field.omega();
    let ip = units::ev_to_au(13.598_434_599_702);
    let energies: Vec<f64> = (11..=41).step_by(2).map(|q| f64::from(q) * w).collect();
    let table = solve_orbits(
        &field,
        ChannelPair::single(ip),
        &energies,
        &OrbitSettings::default(),
    )?;
    println!("order  family  ωt_ion              ωt_ret              Im Φ");
    for family in table.families.iter().filter(|f| f.half_cycle == 0) {
        for (k, p) in family.points.iter().enumerate() {
            if let OrbitPoint::Solved(s) = p {
                println!(
                    "{:5.0}  {:6}  {:+.4} {:+.4}i   {:+.4} {:+.4}i   {:.4}",
                    energies[k] / w,
                    family.label.to_string(),
                    (s.t_ion * w).re,
                    (s.t_ion * w).im,
                    (s.t_ret * w).re,
                    (s.t_ret * w).im,
                    s.action.im
                );
            }
        }
    }
    if let Some(c) = table.pairs[0].coalescence {
        println!(
            "short and long coalesce at Ω_c/ω = {:.3} {:+.3}i",
            c.omega.re / w,
            c.omega.im / w
        );
    }
    Ok(())
}
