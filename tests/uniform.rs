//! The uniform (Airy) approximation for coalescing saddles.

use holecast::dipole::{SaddleSum, uniform_weights};
use holecast::field::CVec3;
use holecast::ionization::IonizationModel;
use holecast::laser::LaserSpec;
use holecast::multichannel::{MultichannelSettings, MultichannelSpectrum, spectrum};
use holecast::orbits::airy_branch::ZetaBranch;
use holecast::recombination::RecombinationModel;
use holecast::target::Target;
use num_complex::Complex64;
use serde_json::Value;

/// Exact I(z) = J_30(z) + 0.3[J_31(z) − J_29(z)]/(2i) from tests/data/bessel_uniform_reference.json
/// (scripts/bessel_uniform_reference.py; SciPy 1.17.1 and mpmath 1.3.0).
fn exact() -> Vec<(f64, Complex64)> {
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/data/bessel_uniform_reference.json"
    ))
    .unwrap();
    let v: Value = serde_json::from_str(&text).unwrap();
    v["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| {
            let z = p["z"].as_f64().unwrap();
            let c = &p["value"];
            (
                z,
                Complex64::new(c[0].as_f64().unwrap(), c[1].as_f64().unwrap()),
            )
        })
        .collect()
}

/// The saddles of Φ(t) = 30t − z sin t, the prefactor g(t) = (1 + 0.3 sin t)/2π, and the
/// uniform result, continued along a path of complex z that passes the coalescence at z = 30 on
/// a half circle of radius 0.5 (as real photon energies pass the complex coalescence of HHG).
struct BesselTest {
    t_plus: Complex64,
    root_plus: Complex64,
    root_minus: Complex64,
    branch: ZetaBranch,
    z: Complex64,
}

fn phi(z: Complex64, t: Complex64) -> Complex64 {
    30.0 * t - z * t.sin()
}

/// The path of z: 45 → 30.5 on the real axis, a half circle of radius 0.5 above z = 30, then
/// 29.5 → 24; real samples fall exactly on the reference grid (multiples of 0.25). Returns the
/// points with their arc length.
fn path() -> Vec<(f64, Complex64)> {
    let mut pts = Vec::new();
    let step = 0.0125;
    for k in 0..=1160 {
        pts.push(Complex64::new(45.0 - step * f64::from(k), 0.0));
    }
    for k in 1..400 {
        let th = std::f64::consts::PI * f64::from(k) / 400.0;
        pts.push(Complex64::new(30.0, 0.0) + Complex64::from_polar(0.5, th));
    }
    for k in 0..=440 {
        pts.push(Complex64::new(29.5 - step * f64::from(k), 0.0));
    }
    let mut s = 0.0;
    let mut out = Vec::with_capacity(pts.len());
    for (i, z) in pts.iter().enumerate() {
        if i > 0 {
            s += (z - pts[i - 1]).norm();
        }
        out.push((s, *z));
    }
    out
}

impl BesselTest {
    fn start() -> Self {
        let z = Complex64::new(45.0, 0.0);
        let t_plus = Complex64::new((30.0f64 / 45.0).acos(), 0.0);
        let (rp, rm) = Self::roots(z, t_plus);
        let delta = 0.5 * (phi(z, -t_plus) - phi(z, t_plus));
        BesselTest {
            t_plus,
            root_plus: rp,
            root_minus: rm,
            branch: ZetaBranch::start(delta, 0.0),
            z,
        }
    }

    /// sqrt(−iΦ''(t±)), Φ'' = z sin t.
    fn roots(z: Complex64, t_plus: Complex64) -> (Complex64, Complex64) {
        let i = Complex64::i();
        (
            (-i * z * t_plus.sin()).sqrt(),
            (-i * z * (-t_plus).sin()).sqrt(),
        )
    }

    fn advance(&mut self, s: f64, z: Complex64) {
        // Newton on Φ'(t) = 30 − z cos t from the previous saddle.
        let mut t = self.t_plus;
        for _ in 0..50 {
            let f = 30.0 - z * t.cos();
            let df = z * t.sin();
            t -= f / df;
            if f.norm() < 1e-14 {
                break;
            }
        }
        let (rp, rm) = Self::roots(z, t);
        let pick = |r: Complex64, old: Complex64| {
            if (r - old).norm() <= (r + old).norm() {
                r
            } else {
                -r
            }
        };
        self.root_plus = pick(rp, self.root_plus);
        self.root_minus = pick(rm, self.root_minus);
        self.t_plus = t;
        let delta = 0.5 * (phi(z, -t) - phi(z, t));
        self.branch = self.branch.advance(delta, s).expect("unambiguous step");
        self.z = z;
    }

    fn uniform(&self) -> (Complex64, Complex64) {
        let z = self.z;
        let g = |t: Complex64| (1.0 + 0.3 * t.sin()) / (2.0 * std::f64::consts::PI);
        let two_pi_sqrt = (2.0 * std::f64::consts::PI).sqrt();
        let gp = g(self.t_plus) * two_pi_sqrt / self.root_plus;
        let gm = g(-self.t_plus) * two_pi_sqrt / self.root_minus;
        let (wm, wp) = uniform_weights(
            phi(z, -self.t_plus),
            phi(z, self.t_plus),
            self.branch.zeta,
            self.branch.sqrt,
            self.branch.quarter,
        );
        let i = Complex64::i();
        let plain = gp * (i * phi(z, self.t_plus)).exp() + gm * (i * phi(z, -self.t_plus)).exp();
        (gm * wm + gp * wp, plain)
    }
}

#[test]
fn uniform_formula_reproduces_an_exact_bessel_integral_through_its_caustic() {
    // Physics notes §2.3(a): the uniform result has relative error ≤ 2.4e-3 for all z in [24, 45]
    // while the two-saddle sum fails near z = 30; table values of the uniform result there:
    // z = 45: 0.04575524−0.02927409i, 31: 0.18310524+0.01079935i, 29: 0.10306746+0.01190245i,
    // 25: 0.01181306+0.00251188i.
    let exact = exact();
    let mut test = BesselTest::start();
    let mut worst: f64 = 0.0;
    let mut plain_near_caustic: f64 = 0.0;
    let published = [
        (45.0, Complex64::new(0.045_755_24, -0.029_274_09)),
        (31.0, Complex64::new(0.183_105_24, 0.010_799_35)),
        (29.0, Complex64::new(0.103_067_46, 0.011_902_45)),
        (25.0, Complex64::new(0.011_813_06, 0.002_511_88)),
    ];
    let mut compared = 0;
    for (k, &(s, z)) in path().iter().enumerate() {
        if k > 0 {
            test.advance(s, z);
        }
        if z.im != 0.0 {
            continue;
        }
        for &(zr, value) in &exact {
            if (z.re - zr).abs() < 1e-9 && (zr - 30.0).abs() > 0.6 {
                compared += 1;
                let (u, p) = test.uniform();
                worst = worst.max((u / value - 1.0).norm());
                if (zr - 30.0).abs() < 1.6 {
                    plain_near_caustic = plain_near_caustic.max((p / value - 1.0).norm());
                }
                for &(zp, up) in &published {
                    if (zr - zp).abs() < 1e-9 {
                        assert!((u - up).norm() < 2e-8, "z = {zp}: {u} vs published {up}");
                    }
                }
            }
        }
    }
    assert_eq!(
        compared, 80,
        "every reference point off the caustic is compared"
    );
    assert!(worst <= 2.4e-3, "worst relative error {worst}");
    assert!(
        plain_near_caustic > 10.0 * worst,
        "plain sum near the caustic: {plain_near_caustic}"
    );
}

fn atom_spectrum(sum: SaddleSum, orders: &[f64]) -> MultichannelSpectrum {
    let spec = LaserSpec::monochromatic(2e14, 1600.0);
    let field = spec.to_field().unwrap();
    let w = field.omega();
    let target = Target::one_channel(
        0.5,
        IonizationModel::Gaussian { exponent: 1.0 },
        RecombinationModel::Gaussian { exponent: 1.0 },
    )
    .unwrap();
    let energies: Vec<f64> = orders.iter().map(|q| q * w).collect();
    let settings = MultichannelSettings {
        sum,
        group_delays: holecast::multichannel::GroupDelays::Skip,
        ..MultichannelSettings::default()
    };
    spectrum(&field, &target, &energies, &settings).unwrap()
}

/// Sum of the half-cycle-0 contributions (short and long of the first crest).
fn first_crest(s: &MultichannelSpectrum, k: usize) -> CVec3 {
    s.pairs[0]
        .families
        .iter()
        .filter(|c| c.half_cycle == 0)
        .filter_map(|c| c.dipole[k])
        .fold(CVec3::zeros(), |a, b| a + b)
}

#[test]
fn uniform_equals_the_plain_sum_in_mid_plateau() {
    // DLMF §9.7 asymptotics: far from the caustic the uniform pieces reduce to the saddle terms.
    // 1600 nm, 2e14 W/cm², Ip = 0.5: cutoff ≈ H140; mid plateau ≈ H50–H95 (with the Gaussian
    // structure in the phase the pair's caustic moves down by a few orders: at H98 the two sums
    // differ by 1.02%).
    let orders: Vec<f64> = (50..=95).map(f64::from).collect();
    let u = atom_spectrum(SaddleSum::Uniform, &orders);
    let p = atom_spectrum(SaddleSum::Plain, &orders);
    for (k, q) in orders.iter().enumerate() {
        let (a, b) = (first_crest(&u, k), first_crest(&p, k));
        let rel = (a - b).norm() / b.norm();
        assert!(rel < 0.01, "H{q}: uniform/plain differ by {rel}");
    }
}

#[test]
fn uniform_is_finite_and_smooth_through_the_cutoff_and_decays_beyond() {
    let spec = LaserSpec::monochromatic(2e14, 1600.0);
    let field = spec.to_field().unwrap();
    let w = field.omega();
    let c = holecast::cutoff::cutoffs(
        &field,
        holecast::orbits::ChannelPair::single(0.5),
        &holecast::orbits::OrbitSettings::default(),
    );
    let qc = c.quantum.unwrap() / w;
    let orders: Vec<f64> = (0..=400).map(|k| qc - 10.0 + 0.05 * f64::from(k)).collect();
    let u = atom_spectrum(SaddleSum::Uniform, &orders);
    let mag: Vec<f64> = (0..orders.len())
        .map(|k| first_crest(&u, k).norm())
        .collect();
    assert!(mag.iter().all(|m| m.is_finite() && *m > 0.0));
    // Smooth: no jump larger than 25% between neighbouring points 0.05 orders apart, except at
    // short/long interference minima below the cutoff (where |D| dips and recovers).
    for k in 1..orders.len() {
        if orders[k] > qc - 1.0 {
            let r = mag[k] / mag[k - 1];
            assert!(
                (0.75..1.25).contains(&r),
                "jump at H{:.2}: ratio {r}",
                orders[k]
            );
        }
    }
    // Decays beyond the cutoff: monotonically from 2 orders past it, and by orders of magnitude
    // 10 orders past it.
    let past = |q: f64| orders.iter().position(|&o| o >= q).unwrap();
    for k in past(qc + 2.0) + 1..orders.len() {
        assert!(mag[k] < mag[k - 1], "not decaying at H{:.2}", orders[k]);
    }
    let drop = mag[orders.len() - 1] / mag[past(qc)];
    // Intensity falls by more than 100× within 10 orders (7% of the cutoff order) past it.
    assert!(
        drop * drop < 1e-2,
        "decay over 10 orders past the cutoff: {drop}"
    );
}
