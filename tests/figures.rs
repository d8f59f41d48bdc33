//! Figure helpers (issue 9): odd-order ticks, power-of-ten labels, the attochirp fit; and the
//! figures the binary writes: a title that tells runs apart, legends that name what is left out.

use std::path::Path;

use assert_cmd::Command;
use holecast::report::svg::canvas::{decade_ticks, order_ticks};
use holecast::report::svg::timing::attochirp;

#[test]
fn order_ticks_are_odd_orders_for_symmetric_fields() {
    for (a, b) in [(15.0, 39.0), (35.0, 203.0), (11.7, 37.5), (101.0, 1001.0)] {
        let ticks = order_ticks(a, b, true);
        let labelled: Vec<f64> = ticks
            .iter()
            .filter(|t| !t.1.is_empty())
            .map(|t| t.1.parse().unwrap())
            .collect();
        assert!(
            labelled.len() >= 3 && labelled.len() <= 17,
            "{a}–{b}: {labelled:?}"
        );
        for q in &labelled {
            assert!(*q >= a && *q <= b);
            assert_eq!((*q as i64).rem_euclid(2), 1, "{a}–{b}: {q} is even");
        }
        // Every tick, labelled or not, sits on an odd order.
        assert!(ticks.iter().all(|t| (t.0 as i64).rem_euclid(2) == 1));
    }
    assert_eq!(
        order_ticks(15.0, 21.0, true)
            .iter()
            .map(|t| t.1.as_str())
            .collect::<Vec<_>>(),
        ["15", "17", "19", "21"]
    );
}

#[test]
fn y_labels_are_powers_of_ten_covering_the_range() {
    let ticks = decade_ticks(-25.0, -8.0);
    assert_eq!(ticks.first().unwrap().0, -25.0);
    assert_eq!(ticks.last().unwrap().0, -8.0);
    let labels: Vec<&str> = ticks
        .iter()
        .map(|t| t.1.as_str())
        .filter(|l| !l.is_empty())
        .collect();
    assert!(labels.contains(&"10⁻²⁴") && labels.len() <= 9, "{labels:?}");
    assert!(labels.iter().all(|l| l.starts_with("10")));
    assert_eq!(decade_ticks(-2.0, 0.0)[2].1, "10⁰");
}

#[test]
fn attochirp_is_the_slope_in_attoseconds_per_electronvolt() {
    // Re t_r = 1.5 fs + 0.02 fs/eV · E: 20 as/eV (definition of the unit; plain arithmetic).
    let pts: Vec<(f64, f64)> = (0..10)
        .map(|k| {
            let e = 20.0 + 2.0 * f64::from(k);
            (e, 1.5 + 0.02 * e)
        })
        .collect();
    assert!((attochirp(&pts).unwrap() - 20.0).abs() < 1e-9);
    assert!(attochirp(&pts[..2]).is_none(), "two points are no fit");
}

fn svg(dir: &Path, name: &str, args: &[&str], file: &str) -> String {
    let out = dir.join(name);
    Command::cargo_bin("holecast")
        .unwrap()
        .arg("spectrum")
        .args(args)
        .args(["--quiet", "--out"])
        .arg(&out)
        .assert()
        .success();
    std::fs::read_to_string(out.join(file)).unwrap()
}

#[test]
fn titles_tell_runs_apart_and_legends_name_what_is_left_out() {
    // Formerly the ε = 0.2 and the linear run both read "argon-like atom — 800 nm, Up = 8.96 eV
    // (uniform sum)".
    let dir = tempfile::tempdir().unwrap();
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let argon = root.join("channels/argon-like.json");
    let elliptical = dir.path().join("e.json");
    std::fs::write(
        &elliptical,
        r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1.5e14,
            "polarization": {"kind": "elliptical", "ellipticity": 0.2}}]}"#,
    )
    .unwrap();
    let a = argon.to_str().unwrap();
    let lin = svg(
        dir.path(),
        "lin",
        &[a, "--intensity", "1.5e14", "--wavelength", "800"],
        "spectrum.svg",
    );
    let ell = svg(
        dir.path(),
        "ell",
        &[a, "--laser", elliptical.to_str().unwrap()],
        "spectrum.svg",
    );
    assert!(lin.contains("linear at 0° from z") && !lin.contains("elliptical"));
    assert!(ell.contains("elliptical ε = 0.2"));
    for s in [&lin, &ell] {
        assert!(s.contains("1.500e14 W/cm²"));
        assert!(s.contains("photon energy (eV)"));
        assert!(s.contains("attochirp +") && s.contains("as/eV"));
        assert!(s.contains("10⁻"), "power-of-ten labels");
        assert!(!s.contains(">1e-"), "no 1e-8 style labels");
    }
    // The demo: the coherences forbidden by the aligned ensemble's symmetry are named as not
    // drawn; the allowed one is drawn with its phase.
    let demo = root.join("channels/demo-linear-triatomic.json");
    let holes = svg(
        dir.path(),
        "demo",
        &[
            demo.to_str().unwrap(),
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
        ],
        "holes.svg",
    );
    assert!(
        holes.contains("not drawn: ρ_XA"),
        "the zero coherences are named"
    );
    assert!(holes.contains("ρ_XB (short orbits)") && holes.contains("ρ_XB (long orbits)"));
    assert!(holes.contains("beyond the cutoff"));
}
