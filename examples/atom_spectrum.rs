//! One-channel harmonic spectrum of an argon-like atom, uniform against plain saddle sums
//! (a one-channel target through the same multichannel path as every molecule).
//!
//! Run with `cargo run --release --example atom_spectrum`.

use holecast::dipole::SaddleSum;
use holecast::ionization::IonizationModel;
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, spectrum};
use holecast::recombination::RecombinationModel;
use holecast::target::Target;
use holecast::units;

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let field = LaserSpec::monochromatic(1.5e14, 800.0).to_field()?;
    let w = field.omega();
    let ip = units::ev_to_au(15.7596119);
    let target = Target::one_channel(
        ip,
        IonizationModel::Gaussian {
            exponent: 0.27095 * 2.0 * ip,
        },
        RecombinationModel::Hydrogenic { ip },
    )?;
    let energies: Vec<f64> = (11..=37).step_by(2).map(|q| f64::from(q) * w).collect();
    let run = |sum| {
        let settings = MultichannelSettings {
            sum,
            ..MultichannelSettings::default()
        };
        spectrum(&field, &target, &energies, &settings)
    };
    let (uniform, plain) = (run(SaddleSum::Uniform)?, run(SaddleSum::Plain)?);
    println!("order  power (uniform)   power (plain)   group delay (fs)");
    for (k, e) in energies.iter().enumerate() {
        println!(
            "{:5.0}  {:14.4e}  {:14.4e}   {:8.3}",
            e / w,
            uniform.power(k),
            plain.power(k),
            uniform.group_delay[k].map_or(f64::NAN, units::au_to_fs)
        );
    }
    Ok(())
}
