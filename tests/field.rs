//! The field's closed forms checked against numerical differentiation (mathematics: E = −dA/dt,
//! d(∫A)/dt = A, d(∫A·A)/dt = A·A hold for the analytic continuation at complex t), plus the
//! builders' conventions.

use holecast::field::{Colour, Envelope, Field, Polarization, bdot, sin2_total_over_fwhm};
use holecast::laser::LaserSpec;
use num_complex::Complex64;

fn fields() -> Vec<Field> {
    let w = 0.057;
    let lin = Colour {
        omega: w,
        peak_field: 0.06,
        phase: 0.3,
        polarization: Polarization::Linear { angle: 0.2 },
    };
    let ell = Colour {
        polarization: Polarization::Elliptical {
            ellipticity: 0.4,
            major_axis: -0.3,
        },
        ..lin
    };
    let second = Colour {
        omega: 2.0 * w,
        peak_field: 0.02,
        phase: 1.1,
        polarization: Polarization::Linear { angle: 1.4 },
    };
    vec![
        Field::new(&[lin], Envelope::Continuous).unwrap(),
        Field::new(&[ell], Envelope::Continuous).unwrap(),
        Field::new(&[lin, second], Envelope::Continuous).unwrap(),
        Field::new(&[ell, second], Envelope::Sin2 { fwhm: 300.0 }).unwrap(),
    ]
}

#[test]
fn closed_forms_are_consistent_derivatives_in_complex_time() {
    for field in fields() {
        for &t in &[
            Complex64::new(3.0, 0.0),
            Complex64::new(41.0, 12.0),
            Complex64::new(-20.0, -5.0),
        ] {
            let h = 1e-4;
            let p = field.at(t);
            let (plus, minus) = (field.at(t + h), field.at(t - h));
            let d_a = (plus.a - minus.a) / Complex64::new(2.0 * h, 0.0);
            let d_ia = (plus.int_a - minus.int_a) / Complex64::new(2.0 * h, 0.0);
            let d_ia2 = (plus.int_a2 - minus.int_a2) / (2.0 * h);
            let scale = p.a.norm().max(p.e.norm()).max(1e-3);
            assert!((d_a + p.e).norm() < 1e-7 * scale, "E = -dA/dt");
            assert!((d_ia - p.a).norm() < 1e-7 * scale, "d(∫A)/dt = A");
            assert!(
                (d_ia2 - bdot(&p.a, &p.a)).norm() < 1e-7 * scale * scale,
                "d(∫A²)/dt = A²"
            );
        }
    }
}

#[test]
fn linear_field_has_its_crest_at_t_zero_and_the_stated_peak() {
    // Convention (DESIGN §3): t = 0 at the crest; E = F cos ωt along (sin θ, 0, cos θ).
    let spec = LaserSpec::monochromatic(1e14, 800.0);
    let field = spec.to_field().unwrap();
    let (_, e, _) = field.real_at(0.0);
    assert!((e.z - field.peak_field()).abs() < 1e-15 && e.x.abs() < 1e-15);
    let windows = field.birth_windows(0.3);
    assert_eq!(windows.len(), 2);
    assert_eq!(windows[0].crest, 0.0);
    let half = std::f64::consts::PI / field.omega();
    assert!((windows[1].crest - half).abs() < 1e-6);
}

#[test]
fn elliptical_intensity_is_shared_between_the_axes() {
    // Total cycle-averaged intensity kept: F_major² + F_minor² = F0² (our documented convention).
    let f0 = 0.05;
    let c = Colour {
        omega: 0.057,
        peak_field: f0,
        phase: 0.0,
        polarization: Polarization::Elliptical {
            ellipticity: 0.5,
            major_axis: 0.0,
        },
    };
    let field = Field::new(&[c], Envelope::Continuous).unwrap();
    let major = field.real_at(0.0).1.z;
    let quarter = 0.5 * std::f64::consts::PI / 0.057;
    let minor = field.real_at(quarter).1.x;
    assert!((major * major + minor * minor - f0 * f0).abs() < 1e-15);
    assert!((minor / major - 0.5).abs() < 1e-12);
    // Up is the cycle average of A²/2, independent of the ellipticity at fixed intensity.
    assert!((field.ponderomotive_energy() - f0 * f0 / (4.0 * 0.057 * 0.057)).abs() < 1e-15);
}

#[test]
fn sin2_pulse_has_the_requested_intensity_fwhm() {
    // cos⁴ intensity envelope: FWHM = (2/π) arccos(2^{-1/4}) T_p (derived; our convention).
    let fwhm = 400.0;
    let total = fwhm * sin2_total_over_fwhm();
    let env = |t: f64| (std::f64::consts::PI * t / total).cos().powi(4);
    assert!((env(0.5 * fwhm) - 0.5).abs() < 1e-12);
    let c = Colour {
        omega: 0.057,
        peak_field: 0.05,
        phase: 0.0,
        polarization: Polarization::Linear { angle: 0.0 },
    };
    let field = Field::new(&[c], Envelope::Sin2 { fwhm }).unwrap();
    // Vector potential is the carrier times cos²(πt/T): compare with the continuous field.
    let cw = Field::new(&[c], Envelope::Continuous).unwrap();
    for &t in &[0.0, 37.0, -120.0, 300.0] {
        let ratio = (std::f64::consts::PI * t / total).cos().powi(2);
        let a = field.at(Complex64::new(t, 0.0)).a.z;
        let b = cw.at(Complex64::new(t, 0.0)).a.z * ratio;
        assert!((a - b).norm() < 1e-15);
    }
    assert!(
        Field::new(&[c], Envelope::Sin2 { fwhm: 10.0 }).is_err(),
        "shorter than a cycle"
    );
}

#[test]
fn non_periodic_two_colour_field_is_rejected() {
    let c = Colour {
        omega: 0.057,
        peak_field: 0.05,
        phase: 0.0,
        polarization: Polarization::Linear { angle: 0.0 },
    };
    let d = Colour {
        omega: 0.057 * std::f64::consts::SQRT_2,
        ..c
    };
    let err = Field::new(&[c, d], Envelope::Continuous)
        .unwrap_err()
        .to_string();
    assert!(err.contains("colour 2 frequency ratio"), "{err}");
    // 800 nm + 1200 nm: ratio 2/3 is periodic with three fundamental periods.
    let e = Colour {
        omega: 0.057 * 2.0 / 3.0,
        ..c
    };
    let f = Field::new(&[c, e], Envelope::Continuous).unwrap();
    match f.structure() {
        holecast::field::TimeStructure::Periodic { period } => {
            assert!((period - 3.0 * 2.0 * std::f64::consts::PI / 0.057).abs() < 1e-9)
        }
        _ => panic!("expected periodic"),
    }
}
