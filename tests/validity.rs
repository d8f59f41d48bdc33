//! The validity rules (src/validity.rs) and the work estimate (src/workload.rs), against closed
//! forms from the literature where there is one.

use holecast::field::{Colour, Envelope, Field, Polarization};
use holecast::target::{Target, TargetSpec};
use holecast::tunnelling::{adk_cycle_averaged_rate, barrier_suppression_field};
use holecast::units;
use holecast::validity::{
    self, ChannelIp, MAX_TUNNELLING_EXPONENT, WarningKind, field_warnings, grid_warnings,
    scan_field, tunnelling_exponent,
};
use holecast::workload::{Workload, WorkloadLimits};

fn linear(intensity: f64, wavelength: f64) -> Field {
    Field::new(
        &[Colour {
            omega: units::wavelength_nm_to_omega(wavelength),
            peak_field: units::intensity_to_peak_field(intensity),
            phase: 0.0,
            polarization: Polarization::Linear { angle: 0.0 },
        }],
        Envelope::Continuous,
    )
    .unwrap()
}

fn two_colour(harmonic: f64, ratio: f64) -> Field {
    let omega = units::wavelength_nm_to_omega(800.0);
    let f = units::intensity_to_peak_field(1.5e14);
    Field::new(
        &[
            Colour {
                omega,
                peak_field: f,
                phase: 0.0,
                polarization: Polarization::Linear { angle: 0.0 },
            },
            Colour {
                omega: harmonic * omega,
                peak_field: f * ratio.sqrt(),
                phase: 0.0,
                polarization: Polarization::Linear { angle: 0.0 },
            },
        ],
        Envelope::Continuous,
    )
    .unwrap()
}

fn channel(ip_ev: f64) -> Vec<ChannelIp> {
    vec![ChannelIp {
        label: "X".into(),
        ip: units::ev_to_au(ip_ev),
        charge: 1.0,
    }]
}

fn codes(w: &[validity::Warning]) -> Vec<WarningKind> {
    w.iter().map(|w| w.code).collect()
}

#[test]
fn barrier_suppression_field_of_hydrogen_is_one_sixteenth() {
    // Augst et al., PRL 63, 2212 (1989): F_BS = Ip²/(4Z); hydrogen Ip = 1/2 → 1/16 a.u.,
    // I_BS = 1.37e14 W/cm².
    assert_eq!(barrier_suppression_field(0.5, 1.0), 0.0625);
    let i = units::peak_field_to_intensity(0.0625);
    assert!((i / 1.371e14 - 1.0).abs() < 1e-3, "{i:e}");
    assert!(barrier_suppression_field(-1.0, 1.0).is_nan());
}

#[test]
fn depletion_integral_matches_the_cycle_averaged_adk_rate() {
    // For a linear monochromatic field the integral of the static ADK rate over one period is
    // the cycle-averaged rate (ADK 1986: static rate × √(3F/πκ³), a Laplace approximation
    // accurate to O(F/κ³)) times the period.
    for (intensity, tolerance) in [(5e13, 0.02), (1e14, 0.03)] {
        let field = linear(intensity, 800.0);
        let scan = scan_field(&field, &channel(13.598434599702));
        let f = field.peak_field();
        let period = 2.0 * std::f64::consts::PI / field.omega();
        let averaged = adk_cycle_averaged_rate(0.5, 1.0, 0, 0, f).unwrap() * period;
        let ratio = scan.ionization_integral / averaged;
        assert!(
            (ratio - 1.0).abs() < tolerance,
            "I = {intensity:e}: integral {:e}, cycle-averaged {averaged:e}",
            scan.ionization_integral
        );
        assert!((scan.peak_field / f - 1.0).abs() < 1e-3);
    }
}

#[test]
fn tunnelling_exponent_tends_to_the_static_one() {
    // PPT: g(γ) → 1 for γ → 0, so the exponent tends to 2κ³/3F (Landau–Lifshitz §77 for H).
    let x = tunnelling_exponent(0.5, 0.05, 1e-6);
    assert!((x / (2.0 / (3.0 * 0.05)) - 1.0).abs() < 1e-9);
    // An Ip of 15.8 keV in a 1.5e14 W/cm² field is far beyond double precision: refused.
    let field = linear(1.5e14, 800.0);
    assert!(validity::check_representable(&field, &channel(15759.6)).is_err());
    assert!(validity::check_representable(&field, &channel(15.76)).is_ok());
    assert!(tunnelling_exponent(units::ev_to_au(15.76), 0.0654, 0.057) < MAX_TUNNELLING_EXPONENT);
}

#[test]
fn each_rule_fires_where_it_should_and_only_there() {
    // Hydrogen, 800 nm, 1e14 W/cm²: γ = 1.07, below the barrier-suppression intensity
    // 1.37e14: no field warning but near threshold.
    let quiet = field_warnings(&linear(1e14, 800.0), &channel(13.6));
    assert!(quiet.is_empty(), "{quiet:?}");
    let multiphoton = field_warnings(&linear(1e12, 800.0), &channel(13.6));
    assert!(codes(&multiphoton).contains(&WarningKind::MultiphotonRegime));
    let over = field_warnings(&linear(6e14, 800.0), &channel(15.76));
    assert!(codes(&over).contains(&WarningKind::OverTheBarrier));
    assert!(codes(&over).contains(&WarningKind::GroundStateDepletion));
    let uv = field_warnings(&linear(1.5e14, 10.0), &channel(13.6));
    assert!(codes(&uv).contains(&WarningKind::PhotonEnergyAboveIp));
    let near = field_warnings(&linear(1.5e14, 300.0), &channel(13.6));
    assert!(codes(&near).contains(&WarningKind::PhotonEnergyNearIp));
    // A weak 300th harmonic is amplified by e^~230 at the complex ionization time; a 2ω colour
    // at a tenth of the intensity is not.
    let h300 = field_warnings(&two_colour(300.0, 0.1), &channel(13.6));
    assert!(codes(&h300).contains(&WarningKind::WeakColourAmplified));
    let w2 = field_warnings(&two_colour(2.0, 0.1), &channel(13.6));
    assert!(!codes(&w2).contains(&WarningKind::WeakColourAmplified));
}

#[test]
fn near_threshold_lists_the_channels_and_the_orders() {
    let field = linear(1.5e14, 800.0);
    let omega = field.omega();
    let channels = vec![
        ChannelIp {
            label: "X".into(),
            ip: units::ev_to_au(13.8),
            charge: 1.0,
        },
        ChannelIp {
            label: "A".into(),
            ip: units::ev_to_au(17.6),
            charge: 1.0,
        },
    ];
    let energies: Vec<f64> = (9..=20).map(|q| f64::from(q) * omega).collect();
    let w = grid_warnings(&field, &channels, &energies);
    assert_eq!(codes(&w), [WarningKind::NearThreshold]);
    // 17.6 eV is H11.36: H9–H11 lie below A's threshold, H12 within one photon above it.
    assert!(
        w[0].message.contains("H9.00–H11.00 (3 energies) below"),
        "{}",
        w[0].message
    );
    assert!(
        w[0].message
            .contains("H12.00 within one photon above the threshold of channel A")
    );
    let plateau: Vec<f64> = (15..=25).map(|q| f64::from(q) * omega).collect();
    assert!(grid_warnings(&field, &channels, &plateau).is_empty());
}

#[test]
fn work_estimate_counts_pairs_families_and_orientations() {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("channels/demo-linear-triatomic.json"),
    )
    .unwrap();
    let target: Target = TargetSpec::from_json(&text).unwrap().validate().unwrap();
    let field = linear(1.5e14, 800.0);
    let settings = holecast::orbits::OrbitSettings::default();
    let w = Workload::estimate(&field, &target, 31, &settings).unwrap();
    // Three coupled channels: 9 pairs; two crests per period, short and long: 4 families;
    // a β grid of 16 points (the run reports 9 pairs, 36 families, 16 orientations).
    assert_eq!(
        (w.channel_pairs, w.families_per_pair, w.orientations),
        (9, 4, 16)
    );
    assert_eq!(w.terms, 31.0 * 36.0 * 16.0);
    assert!(w.check(&WorkloadLimits::default()).is_ok());
    let tight = WorkloadLimits {
        terms: 1e3,
        memory_bytes: 1e12,
    };
    let e = w.check(&tight).unwrap_err().to_string();
    assert!(
        e.contains("amplitude stage") && e.contains("31 energies"),
        "{e}"
    );
    let small = WorkloadLimits {
        terms: 1e12,
        memory_bytes: 1e6,
    };
    assert!(w.check(&small).unwrap_err().to_string().contains("MB"));
}
