//! Classical (simple-man) cutoff from the field module's own trajectories.

use holecast::classical::max_return_energy;
use holecast::laser::LaserSpec;

#[test]
fn classical_cutoff_is_3_17_up_at_18_and_252_degrees() {
    // Corkum, PRL 71, 1994 (1993); Krause, Schafer, Kulander, PRL 68, 3535 (1992): maximum return
    // energy 3.17 Up; precise values 3.1731365667 Up at ωt_i = 17.96° (0.313408 rad) and
    // ωt_r = 252.04° (4.398981 rad) after the crest of E = F cos ωt (physics notes §1.6, NUM).
    for &(i, l) in &[(1e14, 800.0), (4e14, 1800.0)] {
        let field = LaserSpec::monochromatic(i, l).to_field().unwrap();
        let w = field.omega();
        let quarter = 0.5 * std::f64::consts::PI / w;
        let c = max_return_energy(&field, 0.0, quarter).expect("a return exists");
        let up = field.ponderomotive_energy();
        assert!(
            (c.energy / up - 3.173_136_566_7).abs() < 1e-6,
            "{}",
            c.energy / up
        );
        assert!((c.birth * w - 0.313_408).abs() < 1e-4, "{}", c.birth * w);
        assert!(
            (c.return_time * w - 4.398_981).abs() < 1e-4,
            "{}",
            c.return_time * w
        );
        assert!(((c.birth * w).to_degrees() - 17.96).abs() < 0.01);
        assert!(((c.return_time * w).to_degrees() - 252.04).abs() < 0.01);
    }
}

#[test]
fn classical_short_and_long_examples() {
    // Physics notes §2.1 (NUM): E_kin = 2 Up is reached by short ωt_i = 35.74°, ωt_r = 204.58°
    // and long 6.15°, 296.77°.
    use holecast::classical::{ReturnSearch, returns};
    let field = LaserSpec::monochromatic(1e14, 800.0).to_field().unwrap();
    let w = field.omega();
    let up = field.ponderomotive_energy();
    let search = ReturnSearch::default();
    for &(birth_deg, return_deg) in &[(35.74f64, 204.58f64), (6.15, 296.77)] {
        let ev = returns(&field, birth_deg.to_radians() / w, &search)[0];
        assert!((ev.energy / up - 2.0).abs() < 2e-3, "{}", ev.energy / up);
        let got = (ev.time * w).to_degrees();
        assert!((got - return_deg).abs() < 0.05, "{got} vs {return_deg}");
        assert!(ev.initial_speed < 1e-9, "linear field: born at rest");
    }
}
