//! Orbits in an orthogonally polarised ω + 2ω field, built from a laser description: the
//! second colour breaks the symmetry between the two half cycles.
//!
//! Run with `cargo run --release --example two_colour_orbits`.

use holecast::laser::LaserSpec;
use holecast::orbits::{ChannelPair, OrbitSettings, solve_orbits};
use holecast::units;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let spec: LaserSpec = serde_json::from_str(
        r#"{"colours": [
            {"wavelength_nm": 800, "intensity_wcm2": 1.5e14},
            {"harmonic_of_first": 2, "intensity_ratio": 0.1, "phase_deg": 90,
             "polarization": {"kind": "linear", "angle_deg": 90}}]}"#,
    )?;
    let field = spec.to_field()?;
    let w = field.omega();
    let energies: Vec<f64> = [15.0, 21.0, 27.0].iter().map(|q| q * w).collect();
    let ip = units::ev_to_au(15.76);
    let table = solve_orbits(
        &field,
        ChannelPair::single(ip),
        &energies,
        &OrbitSettings::default(),
    )?;
    for f in &table.families {
        for (k, p) in f.points.iter().enumerate() {
            if let Some(s) = p.saddle() {
                let v = s.v_ret;
                println!(
                    "H{:.0} {:5} half cycle {}: return velocity (x, z) = ({:+.3}, {:+.3}) a.u., Im Φ = {:.3}",
                    energies[k] / w,
                    f.label.to_string(),
                    f.half_cycle,
                    v.x.re,
                    v.z.re,
                    s.action.im
                );
            }
        }
    }
    Ok(())
}
