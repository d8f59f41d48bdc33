//! Quantum cutoff: the complex energy where the short and long saddles coalesce.

use holecast::cutoff::cutoffs;
use holecast::field::{Colour, Envelope, Field, Polarization};
use holecast::orbits::{ChannelPair, OrbitSettings};

/// (x = Ip/Up, F(x), Im Ω_c/Up) from physics notes §1.6 (NUM, complex coalescence point).
const TABLE: [(f64, f64, Option<f64>); 7] = [
    (0.01, 1.3234, Some(5.2e-5)),
    (0.1, 1.3203, Some(1.6e-3)),
    (0.2, 1.3167, Some(4.5e-3)),
    (0.5, 1.3066, Some(0.0170)),
    (1.0, 1.2922, Some(0.0449)),
    (2.0, 1.2692, Some(0.113)),
    (3.0, 1.2515, Some(0.188)),
];

#[test]
fn coalescence_reproduces_the_quantum_cutoff_law() {
    // Lewenstein et al., PRA 49, 2117 (1994): Ω_max = 3.17 Up + F(Ip/Up) Ip with F(0) ≈ 1.32,
    // slowly decreasing. Values of F from physics notes §1.6; tolerance 1e-3 as stated there
    // (the two definitions of the cutoff in the notes agree to that level).
    let w = 0.057;
    let up = 1.0;
    let field = Field::new(
        &[Colour {
            omega: w,
            peak_field: 2.0 * w * up,
            phase: 0.0,
            polarization: Polarization::Linear { angle: 0.0 },
        }],
        Envelope::Continuous,
    )
    .unwrap();
    let mut previous = f64::INFINITY;
    for (x, f_ref, im_ref) in TABLE {
        let ip = x * up;
        let c = cutoffs(&field, ChannelPair::single(ip), &OrbitSettings::default());
        let z = c.coalescence.expect("coalescence found");
        assert!(z.converged, "x = {x}");
        let f = (z.omega.re - 3.173_136_566_7 * up) / ip;
        assert!(
            (f - f_ref).abs() < 1e-3,
            "x = {x}: F = {f}, published {f_ref}"
        );
        if let Some(im) = im_ref {
            assert!(
                (z.omega.im / up - im).abs() < 0.05 * im + 2e-5,
                "x = {x}: Im Ω_c = {}",
                z.omega.im
            );
        }
        // Trend: F decreases as Ip/Up grows.
        assert!(f < previous);
        previous = f;
    }
}

#[test]
fn re_zeta_crossing_agrees_with_the_coalescence_point() {
    // The second definition in physics notes §1.6 (real-Ω cutoff) agrees with Re Ω_c to ≈1e-3
    // in F; our Re ζ = 0 crossing plays that role.
    use holecast::orbits::solve_orbits;
    let w = 0.057;
    let field = Field::new(
        &[Colour {
            omega: w,
            peak_field: 2.0 * w,
            phase: 0.0,
            polarization: Polarization::Linear { angle: 0.0 },
        }],
        Envelope::Continuous,
    )
    .unwrap();
    let ip = 1.0;
    let grid: Vec<f64> = (0..=200)
        .map(|k| ip + 2.0 + 3.0 * k as f64 / 200.0)
        .collect();
    let table = solve_orbits(
        &field,
        ChannelPair::single(ip),
        &grid,
        &OrbitSettings::default(),
    )
    .unwrap();
    let p = 0;
    let crossing = table.cutoff_crossing(p).expect("grid spans the cutoff");
    let z = table.pairs[p].coalescence.expect("coalescence");
    assert!(
        ((crossing - z.omega.re) / ip).abs() < 2e-3,
        "{crossing} vs {}",
        z.omega.re
    );
}
