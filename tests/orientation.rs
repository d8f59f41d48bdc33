//! Tests of `holecast::orientation`: Euler rotations, orientation grids, alignment distributions
//! and their target-file description. Each check names its source.

use holecast::orientation::{
    AlignmentDescription, AlignmentDistribution, AlignmentGrid, MAX_GRID_ORIENTATIONS, Orientation,
    OrientationError, OrientationGrid, euler_angles, euler_rotation, exp_cos2_mean_cos2,
    exp_cos2_strength, full_grid, linear_molecule_grid,
};
use holecast::special::gauss_legendre::{MAX_NODES, gauss_legendre_interval};
use nalgebra::{Matrix3, Rotation3, Vector3};
use proptest::prelude::*;
use serde::Deserialize;
use std::f64::consts::{FRAC_PI_2, PI};

// ---------------------------------------------------------------------------------------------
// Reference data (scripts/orientation_reference.py → tests/data/orientation_reference.json)

#[derive(Deserialize)]
struct EulerCase {
    alpha: f64,
    beta: f64,
    gamma: f64,
    matrix: Vec<f64>,
}

#[derive(Deserialize)]
struct StrengthMean {
    strength: f64,
    mean_cos2: f64,
}

#[derive(Deserialize)]
struct PowerMean {
    power_n: f64,
    mean_cos2: f64,
}

#[derive(Deserialize)]
struct PchipTable {
    name: String,
    beta_deg: Vec<f64>,
    density: Vec<f64>,
    sample_beta_deg: Vec<f64>,
    interpolated: Vec<f64>,
    normalised_density: Vec<f64>,
    mean_cos2: f64,
}

#[derive(Deserialize)]
struct Reference {
    scipy_version: String,
    numpy_version: String,
    mpmath_version: String,
    exp_cos2_scipy_vs_mpmath_max_relative_difference: f64,
    euler: Vec<EulerCase>,
    exp_cos2_mean: Vec<StrengthMean>,
    exp_cos2_inverse: Vec<StrengthMean>,
    cos2n_mean: Vec<PowerMean>,
    pchip_tables: Vec<PchipTable>,
}

fn reference() -> Reference {
    let text = include_str!("data/orientation_reference.json");
    let reference: Reference = serde_json::from_str(text).expect("reference JSON parses");
    assert_eq!(reference.scipy_version, "1.17.1");
    assert_eq!(reference.numpy_version, "2.4.6");
    assert_eq!(reference.mpmath_version, "1.3.0");
    // The script cross-checked every SciPy quad value against 30-digit mpmath.quad.
    assert!(reference.exp_cos2_scipy_vs_mpmath_max_relative_difference < 1e-14);
    reference
}

fn relative_error(value: f64, exact: f64) -> f64 {
    ((value - exact) / exact).abs()
}

// ---------------------------------------------------------------------------------------------
// Euler rotations

/// Textbook: a rotation matrix is orthogonal with determinant +1.
fn assert_proper_rotation(r: &Matrix3<f64>) {
    let defect = (r.transpose() * r - Matrix3::identity()).abs().max();
    assert!(defect < 1e-15, "RᵀR − I = {defect:e}");
    assert!((r.determinant() - 1.0).abs() < 1e-14);
}

proptest! {
    #[test]
    fn rotation_is_orthogonal_with_unit_determinant(
        alpha in -10.0f64..10.0, beta in -10.0f64..10.0, gamma in -10.0f64..10.0,
    ) {
        assert_proper_rotation(&euler_rotation(alpha, beta, gamma));
    }

    /// Definition (module docs): R(α, β, γ) = R_z(α) R_y(β) R_z(γ), built here from nalgebra's
    /// independent axis–angle rotations.
    #[test]
    fn rotation_is_the_zyz_product_of_axis_rotations(
        alpha in -7.0f64..7.0, beta in 0.0f64..PI, gamma in -7.0f64..7.0,
    ) {
        let product = Rotation3::from_axis_angle(&Vector3::z_axis(), alpha)
            * Rotation3::from_axis_angle(&Vector3::y_axis(), beta)
            * Rotation3::from_axis_angle(&Vector3::z_axis(), gamma);
        let difference = (product.matrix() - euler_rotation(alpha, beta, gamma)).abs().max();
        prop_assert!(difference < 1e-15);
    }

    /// Composition: the product of two rotations is the rotation of the Euler angles extracted
    /// from it (group closure; common practice), and R(α, β, γ)⁻¹ = Rᵀ = R(−γ, −β, −α)
    /// (inverse of a product of axis rotations, textbook).
    #[test]
    fn composition_and_inverse(
        a1 in -4.0f64..4.0, b1 in 0.0f64..PI, g1 in -4.0f64..4.0,
        a2 in -4.0f64..4.0, b2 in 0.0f64..PI, g2 in -4.0f64..4.0,
    ) {
        let r1 = euler_rotation(a1, b1, g1);
        let r2 = euler_rotation(a2, b2, g2);
        let product = r1 * r2;
        let (a, b, g) = euler_angles(&product);
        prop_assert!((0.0..=PI).contains(&b));
        prop_assert!((euler_rotation(a, b, g) - product).abs().max() < 1e-13);
        prop_assert!((euler_rotation(-g1, -b1, -a1) - r1.transpose()).abs().max() < 1e-15);
        prop_assert!((r1 * r1.transpose() - Matrix3::identity()).abs().max() < 1e-15);
    }
}

/// Derived from the definition: the third column of R is the molecular z axis in the lab,
/// (sin β cos α, sin β sin α, cos β). R(π/2, π/2, 0): β = π/2 tips the axis into the lab xy
/// plane along +x (R_y), then α = π/2 turns +x into +y (R_z): molecular z → lab +y. Likewise
/// R(0, π/2, 0) maps molecular z → lab +x, and R(α, 0, γ) = R_z(α + γ) leaves z alone.
#[test]
fn known_rotations() {
    let z = Vector3::z();
    let r = euler_rotation(FRAC_PI_2, FRAC_PI_2, 0.0);
    assert!((r * z - Vector3::y()).norm() < 1e-15);
    // The same rotation sends molecular x to lab −z and molecular y to lab −x (R_y(π/2) x̂ = −ẑ,
    // then R_z leaves −ẑ; R_y(π/2) ŷ = ŷ, R_z(π/2) ŷ = −x̂).
    assert!((r * Vector3::x() + Vector3::z()).norm() < 1e-15);
    assert!((r * Vector3::y() + Vector3::x()).norm() < 1e-15);
    assert!((euler_rotation(0.0, FRAC_PI_2, 0.0) * z - Vector3::x()).norm() < 1e-15);
    let (alpha, beta): (f64, f64) = (0.7, 1.2);
    let axis = Vector3::new(
        beta.sin() * alpha.cos(),
        beta.sin() * alpha.sin(),
        beta.cos(),
    );
    let o = Orientation::new(alpha, beta, -2.1, 1.0);
    assert!((o.molecular_axis() - axis).norm() < 1e-15);
    assert!((o.to_lab(&z) - axis).norm() < 1e-15);
    // to_molecular undoes to_lab (R orthogonal).
    let v = Vector3::new(0.3, -1.2, 2.5);
    assert!((o.to_molecular(&o.to_lab(&v)) - v).norm() < 1e-14);
    let rz = euler_rotation(0.4, 0.0, 0.5);
    assert!(
        (rz - *Rotation3::from_axis_angle(&Vector3::z_axis(), 0.9).matrix())
            .abs()
            .max()
            < 1e-15
    );
}

/// SciPy 1.17.1 `Rotation.from_euler("ZYZ", [α, β, γ]).as_matrix()` (reference script).
#[test]
fn rotation_matches_scipy_intrinsic_zyz() {
    for case in reference().euler {
        let r = euler_rotation(case.alpha, case.beta, case.gamma);
        for i in 0..3 {
            for j in 0..3 {
                assert!(
                    (r[(i, j)] - case.matrix[3 * i + j]).abs() < 1e-15,
                    "({}, {}, {}) entry ({i}, {j})",
                    case.alpha,
                    case.beta,
                    case.gamma
                );
            }
        }
    }
}

/// Round trip through euler_angles, including the gimbal-lock cases β = 0 and β = π where only
/// α ± γ is defined (definition of the ZYZ angles).
#[test]
fn euler_angles_invert_the_rotation() {
    for &(a, b, g) in &[
        (0.3, 1.1, -0.7),
        (-3.0, 0.01, 2.0),
        (1.0, 0.0, 0.5),
        (1.0, PI, 0.5),
        (2.5, PI - 1e-9, -0.4),
        (0.0, 1e-12, 0.0),
    ] {
        let r = euler_rotation(a, b, g);
        let (a2, b2, g2) = euler_angles(&r);
        assert!(
            (euler_rotation(a2, b2, g2) - r).abs().max() < 1e-14,
            "({a}, {b}, {g})"
        );
        assert!((b2 - b).abs() < 1e-12);
    }
    let (alpha, beta, gamma) = euler_angles(&euler_rotation(1.0, 0.0, 0.5));
    assert!((alpha - 1.5).abs() < 1e-15 && beta == 0.0 && gamma == 0.0);
}

// ---------------------------------------------------------------------------------------------
// Orientation grids

/// Rotation-group orthogonality (Schur orthogonality for the l = 1 representation, textbook):
/// (1/8π²) ∫ R_ij R_kl dR = δ_ik δ_jl / 3. The grid integrates it exactly once
/// n_beta ≥ 2, n_alpha ≥ 3, n_gamma ≥ 3 (products of two entries are D^j_{mk} with j, |m|, |k| ≤ 2).
#[test]
fn full_grid_reproduces_rotation_group_orthogonality() {
    for &(nb, na, ng) in &[(2, 3, 3), (5, 7, 6), (12, 4, 9)] {
        let grid = full_grid(nb, na, ng).unwrap();
        assert_eq!(grid.len(), nb * na * ng);
        assert_eq!(grid.sizes(), (nb, na, ng));
        let total: f64 = grid.orientations().iter().map(|o| o.weight).sum();
        assert!((total - 1.0).abs() < 1e-14);
        for i in 0..3 {
            for j in 0..3 {
                for k in 0..3 {
                    for l in 0..3 {
                        let sum = grid.average(|o| o.rotation[(i, j)] * o.rotation[(k, l)]);
                        let exact = if i == k && j == l { 1.0 / 3.0 } else { 0.0 };
                        assert!(
                            (sum - exact).abs() < 5e-15,
                            "grid {nb}×{na}×{ng}: ⟨R{i}{j} R{k}{l}⟩ = {sum}"
                        );
                    }
                }
            }
        }
    }
    // Too coarse in α (n_alpha = 2 cannot see e^{±2iα}): the identity fails, so the check above
    // can fail.
    let coarse = full_grid(2, 2, 3).unwrap();
    let sum = coarse.average(|o| o.rotation[(0, 0)] * o.rotation[(0, 0)]);
    assert!((sum - 1.0 / 3.0).abs() > 1e-3);
}

/// With n_gamma = 1 only γ-independent quantities average correctly: the molecular-axis
/// components R_i3 (third column) obey ⟨R_i3 R_k3⟩ = δ_ik / 3 (same identity, j = l = 3).
#[test]
fn symmetric_top_grid_averages_axis_quantities() {
    let grid = full_grid(3, 5, 1).unwrap();
    for i in 0..3 {
        for k in 0..3 {
            let sum = grid.average(|o| o.rotation[(i, 2)] * o.rotation[(k, 2)]);
            let exact = if i == k { 1.0 / 3.0 } else { 0.0 };
            assert!((sum - exact).abs() < 1e-15);
        }
    }
}

/// Isotropic ⟨cos²β⟩ = 1/3 (elementary: ∫_{-1}^{1} x² dx / 2) on both grid shapes, and the
/// linear grid's weights are the Gauss–Legendre weights / 2 (so they sum to 1).
#[test]
fn isotropic_mean_cos2_is_one_third_on_both_grids() {
    let linear = linear_molecule_grid(2).unwrap();
    assert_eq!(linear.len(), 2);
    assert!((linear.average(|o| o.beta.cos().powi(2)) - 1.0 / 3.0).abs() < 1e-16);
    let full = full_grid(2, 1, 3).unwrap();
    assert!((full.average(|o| o.rotation[(2, 2)].powi(2)) - 1.0 / 3.0).abs() < 1e-16);
    for grid in [
        linear_molecule_grid(17).unwrap(),
        full_grid(6, 5, 4).unwrap(),
    ] {
        let weights: f64 = grid.orientations().iter().map(|o| o.weight).sum();
        assert!((weights - 1.0).abs() < 1e-14);
        assert!((grid.average(|o| o.beta.cos().powi(2)) - 1.0 / 3.0).abs() < 1e-15);
        let betas: Vec<f64> = grid.orientations().iter().map(|o| o.beta).collect();
        assert!(betas.windows(2).all(|p| p[0] <= p[1]));
    }
    let weighted = AlignmentGrid::weighted(
        &linear_molecule_grid(9).unwrap(),
        &AlignmentDistribution::isotropic(),
    )
    .unwrap();
    assert!((weighted.mean_cos2() - 1.0 / 3.0).abs() < 1e-15);
}

/// Refinement. For a Haar-random R the vector R u is uniform on the sphere, so n·(R u) is uniform
/// on [−1, 1] (Archimedes' hat-box theorem) and ⟨1/(c − n·R u)⟩ = ½ ln((c+1)/(c−1)) for any unit
/// u, n and c > 1. Rates (f analytic inside the Bernstein ellipse / strip set by the pole at
/// cos = c, ρ = c + √(c² − 1)): Gauss–Legendre error ∝ ρ^{−2 n_beta} (Trefethen, *Approximation
/// Theory and Approximation Practice*, ch. 19; from memory), periodic trapezoidal rule error
/// ∝ ρ^{−n_alpha} (Trefethen & Weideman, SIAM Rev. 56, 385 (2014); from memory).
#[test]
fn averages_converge_geometrically_under_refinement() {
    let c: f64 = 1.5;
    let exact = 0.5 * ((c + 1.0) / (c - 1.0)).ln();
    let rho = c + (c * c - 1.0).sqrt();

    // β only: successive error ratios approach ρ⁻² = 0.1459 (measured 0.149 … 0.146).
    let errors: Vec<f64> = (1..=16)
        .map(|n| {
            let grid = linear_molecule_grid(n).unwrap();
            (grid.average(|o| 1.0 / (c - o.beta.cos())) - exact).abs()
        })
        .collect();
    for n in 4..14 {
        let ratio = errors[n] / errors[n - 1];
        assert!(
            (ratio / rho.powi(-2) - 1.0).abs() < 0.05,
            "n_beta = {}: ratio {ratio}",
            n + 1
        );
    }
    assert!(errors[15] < 1e-13);

    // α refinement at converged β, γ: error · ρ^{n_alpha} stays within [1e-3, 1] (measured
    // 0.025 … 0.16 for even n_alpha = 8 … 24).
    let u = Vector3::new(0.3, -0.5, 0.81).normalize();
    let lab_x = Vector3::x();
    for n_alpha in (8..=24).step_by(2) {
        let grid = full_grid(40, n_alpha, 40).unwrap();
        let error = (grid.average(|o| 1.0 / (c - lab_x.dot(&o.to_lab(&u)))) - exact).abs();
        let scaled = error * rho.powi(n_alpha as i32);
        assert!(
            (1e-3..1.0).contains(&scaled),
            "n_alpha = {n_alpha}: error {error:e}, scaled {scaled}"
        );
    }
    // All three refined together.
    let grid = full_grid(24, 24, 24).unwrap();
    let error = (grid.average(|o| 1.0 / (c - lab_x.dot(&o.to_lab(&u)))) - exact).abs();
    assert!(error < rho.powi(-24), "error {error:e}");
}

/// Grid sizes 0 and oversized grids are typed errors that name the parameter.
#[test]
fn grid_size_errors() {
    for (sizes, name) in [
        ((0, 1, 1), "n_beta"),
        ((3, 0, 2), "n_alpha"),
        ((3, 2, 0), "n_gamma"),
    ] {
        let error = full_grid(sizes.0, sizes.1, sizes.2).unwrap_err();
        assert_eq!(error, OrientationError::GridSizeZero { name });
        assert!(error.to_string().contains(name) && error.to_string().contains("= 0"));
    }
    assert!(matches!(
        linear_molecule_grid(0),
        Err(OrientationError::GridSizeZero { name: "n_beta" })
    ));
    let error = full_grid(1000, 1000, 2).unwrap_err();
    assert!(matches!(error, OrientationError::GridTooLarge { .. }));
    assert!(
        error
            .to_string()
            .contains(&MAX_GRID_ORIENTATIONS.to_string())
    );
    assert!(matches!(
        full_grid(usize::MAX, usize::MAX, 2),
        Err(OrientationError::GridTooLarge { .. })
    ));
    let error = linear_molecule_grid(MAX_NODES + 1).unwrap_err();
    assert!(matches!(error, OrientationError::BetaRule { .. }));
    assert!(error.to_string().contains("n_beta"));
}

// ---------------------------------------------------------------------------------------------
// Alignment distributions

/// Physics notes §6.2 and check #19 (derived): ρ ∝ cos^{2n} β gives ⟨cos²β⟩ = (2n+1)/(2n+3):
/// 1/3, 3/5, 5/7, 9/11 for n = 0, 1, 2, 4. Via mean_cos2 (adaptive quadrature) and via both
/// grids, which are exact once 2 n_beta − 1 ≥ 2n + 2 (polynomial in cos β).
#[test]
fn cos2n_mean_cos2_matches_the_closed_form() {
    for (n, exact) in [
        (0.0, 1.0 / 3.0),
        (1.0, 3.0 / 5.0),
        (2.0, 5.0 / 7.0),
        (4.0, 9.0 / 11.0),
    ] {
        let distribution = AlignmentDistribution::cos2n(n).unwrap();
        assert!(
            relative_error(distribution.mean_cos2(), exact) < 1e-14,
            "n = {n}: quadrature {}",
            distribution.mean_cos2()
        );
        let n_beta = n as usize + 2;
        for grid in [
            linear_molecule_grid(n_beta).unwrap(),
            full_grid(n_beta, 3, 2).unwrap(),
        ] {
            let weighted = AlignmentGrid::weighted(&grid, &distribution).unwrap();
            let total: f64 = weighted.orientations().iter().map(|o| o.weight).sum();
            assert!((total - 1.0).abs() < 1e-15);
            assert!(
                relative_error(weighted.mean_cos2(), exact) < 1e-14,
                "n = {n}, grid {:?}: {}",
                grid.sizes(),
                weighted.mean_cos2()
            );
        }
        // One β node fewer is not exact for n ≥ 1 (the check can fail).
        if n >= 1.0 {
            let coarse =
                AlignmentGrid::weighted(&linear_molecule_grid(n_beta - 1).unwrap(), &distribution)
                    .unwrap();
            assert!(relative_error(coarse.mean_cos2(), exact) > 1e-6);
        }
    }
}

/// Non-integer n: the same closed form (derived for real n ≥ 0) and SciPy quad values.
#[test]
fn cos2n_non_integer_powers() {
    for case in reference().cos2n_mean {
        let n = case.power_n;
        let closed = (2.0 * n + 1.0) / (2.0 * n + 3.0);
        assert!(relative_error(case.mean_cos2, closed) < 1e-14);
        let quadrature = AlignmentDistribution::cos2n(n).unwrap().mean_cos2();
        assert!(
            relative_error(quadrature, closed) < 1e-13,
            "n = {n}: {quadrature}"
        );
    }
}

/// Normalisation ∫ρ dΩ = 2π ∫ ρ sin β dβ = 1 (definition, physics notes §6.2), checked with
/// Gauss–Legendre panels in β that end at the table's nodes (a table is only C¹ there).
#[test]
fn densities_are_normalised_on_the_sphere() {
    let distributions = [
        AlignmentDistribution::isotropic(),
        AlignmentDistribution::cos2n(2.5).unwrap(),
        AlignmentDistribution::exp_cos2(7.0).unwrap(),
        AlignmentDistribution::exp_cos2(-3.0).unwrap(),
        AlignmentDistribution::exp_cos2(0.0).unwrap(),
        AlignmentDistribution::table_from_degrees(&[0.0, 60.0, 180.0], &[2.0, 0.5, 1.0]).unwrap(),
    ];
    let panels = [0.0, FRAC_PI_2 / 1.5, FRAC_PI_2, PI];
    for distribution in &distributions {
        let mut integral = 0.0;
        for pair in panels.windows(2) {
            let (beta, w) = gauss_legendre_interval(40, pair[0], pair[1]).unwrap();
            integral += beta
                .iter()
                .zip(&w)
                .map(|(b, w)| w * distribution.density(*b) * b.sin())
                .sum::<f64>();
        }
        integral *= 2.0 * PI;
        assert!(
            (integral - 1.0).abs() < 1e-14,
            "{distribution:?}: {integral}"
        );
    }
    assert!((AlignmentDistribution::isotropic().density(1.0) - 1.0 / (4.0 * PI)).abs() < 1e-17);
}

/// ⟨cos²β⟩(a) for ρ ∝ exp(a cos²β): closed form (Dawson / erf, derived in the module docs)
/// against SciPy 1.17.1 quad (reference script, cross-checked with 30-digit mpmath.quad), for
/// a from −10⁴ to 10⁴, including both sides of the series/asymptotic switches at −40 and 50;
/// and the independent adaptive quadrature of AlignmentDistribution::mean_cos2.
#[test]
fn exp_cos2_mean_matches_scipy_quad() {
    for case in reference().exp_cos2_mean {
        let closed = exp_cos2_mean_cos2(case.strength);
        assert!(
            relative_error(closed, case.mean_cos2) < 2e-15,
            "a = {}: {closed} vs {}",
            case.strength,
            case.mean_cos2
        );
        let quadrature = AlignmentDistribution::exp_cos2(case.strength)
            .unwrap()
            .mean_cos2();
        assert!(
            relative_error(quadrature, case.mean_cos2) < 1e-13,
            "a = {}: quadrature {quadrature}",
            case.strength
        );
    }
    // a = 0 ⇔ ⟨cos²β⟩ = 1/3 (isotropic; derived).
    assert_eq!(exp_cos2_mean_cos2(0.0), 1.0 / 3.0);
    assert_eq!(exp_cos2_strength(1.0 / 3.0).unwrap(), 0.0);
}

/// Round trip (task): from ⟨cos²β⟩ = 0.2, 0.5, 0.8, 0.95 the distribution's own quadrature mean
/// comes back, the strength matches SciPy's brentq on the quad-based mean, and an aligned grid
/// converges to the same value.
#[test]
fn exp_cos2_round_trip_from_mean_cos2() {
    let reference = reference();
    for target in [0.2, 0.5, 0.8, 0.95] {
        let distribution = AlignmentDistribution::exp_cos2_from_mean_cos2(target).unwrap();
        assert!(relative_error(distribution.mean_cos2(), target) < 1e-13);
        let strength = distribution.exp_cos2_strength().unwrap();
        assert!(relative_error(exp_cos2_mean_cos2(strength), target) < 1e-15);
        let scipy = reference
            .exp_cos2_inverse
            .iter()
            .find(|c| c.mean_cos2 == target)
            .unwrap();
        assert!(
            relative_error(strength, scipy.strength) < 1e-12,
            "target {target}: a = {strength} vs SciPy {}",
            scipy.strength
        );
        let grid =
            AlignmentGrid::weighted(&linear_molecule_grid(40).unwrap(), &distribution).unwrap();
        assert!(
            relative_error(grid.mean_cos2(), target) < 1e-13,
            "grid {}",
            grid.mean_cos2()
        );
    }
    // Extreme targets from the same script.
    for case in reference.exp_cos2_inverse {
        let strength = exp_cos2_strength(case.mean_cos2).unwrap();
        assert!(
            relative_error(strength, case.strength) < 1e-11,
            "{}",
            case.mean_cos2
        );
    }
}

/// Large |a| (sharp alignment or anti-alignment) without overflow: the closed form tends to the
/// asymptotes 1 − 1/a and 1/(2|a|) (derived: Dawson and erf asymptotics), the densities stay
/// finite and the quadrature agrees.
#[test]
fn exp_cos2_handles_extreme_strengths() {
    for a in [1e3, 1e6, 1e12, 1e300] {
        // 1 − 1/a − 1/(2a²) from the expansion A(u) = 1 + u + 3u² + … with u = 1/(2a).
        let mean = exp_cos2_mean_cos2(a);
        assert!(mean <= 1.0);
        assert!((mean - (1.0 - 1.0 / a - 0.5 / (a * a))).abs() < 4.5e-16 + 3.0 / (a * a * a));
        let distribution = AlignmentDistribution::exp_cos2(a).unwrap();
        let peak = distribution.density(0.0);
        assert!(peak.is_finite() && peak > 0.0);
        assert_eq!(distribution.density(FRAC_PI_2), 0.0);
        assert!(
            relative_error(distribution.mean_cos2(), mean) < 1e-12,
            "a = {a}"
        );
    }
    for a in [-1e3, -1e6, -1e12, -1e300] {
        let mean = exp_cos2_mean_cos2(a);
        assert!(relative_error(mean, -0.5 / a) < 1e-12);
        let distribution = AlignmentDistribution::exp_cos2(a).unwrap();
        assert!(distribution.density(FRAC_PI_2).is_finite());
        assert!(
            relative_error(distribution.mean_cos2(), mean) < 1e-12,
            "a = {a}"
        );
    }
    // Targets next to 0 and 1 are reachable.
    for target in [1e-8, 1e-200, 1.0 - 1e-9] {
        let a = exp_cos2_strength(target).unwrap();
        assert!(
            relative_error(exp_cos2_mean_cos2(a), target) < 1e-12,
            "{target}"
        );
    }
}

/// ⟨cos²β⟩ must lie in (0, 1); strengths and powers must be finite (powers ≥ 0). Messages name
/// the key and the value.
#[test]
fn invalid_parameters_are_rejected() {
    for m in [0.0, 1.0, -0.1, 1.5, f64::NAN, f64::INFINITY] {
        let error = AlignmentDistribution::exp_cos2_from_mean_cos2(m).unwrap_err();
        assert!(matches!(
            error,
            OrientationError::InvalidParameter {
                key: "mean_cos2",
                ..
            }
        ));
        assert!(error.to_string().contains("mean_cos2"));
        assert!(error.to_string().contains(&m.to_string()));
    }
    for n in [-1.0, f64::NAN, f64::INFINITY, 1e301] {
        let error = AlignmentDistribution::cos2n(n).unwrap_err();
        assert!(error.to_string().contains("power_n"), "{error}");
        assert!(error.to_string().contains(&n.to_string()));
    }
    let error = AlignmentDistribution::exp_cos2(f64::NAN).unwrap_err();
    assert!(error.to_string().contains("strength") && error.to_string().contains("NaN"));
}

/// Tables: SciPy 1.17.1 PchipInterpolator values and quad-based ⟨cos²β⟩ and normalised density
/// (reference script), for tables with zeros, flat pieces, sign changes and two points.
#[test]
fn table_matches_scipy_pchip() {
    for table in reference().pchip_tables {
        let distribution =
            AlignmentDistribution::table_from_degrees(&table.beta_deg, &table.density).unwrap();
        for (i, &deg) in table.sample_beta_deg.iter().enumerate() {
            let beta = deg.to_radians();
            let value = distribution.relative_density(beta);
            assert!(
                (value - table.interpolated[i]).abs() < 1e-14,
                "{} at {deg}°: {value} vs {}",
                table.name,
                table.interpolated[i]
            );
            assert!(
                (distribution.density(beta) - table.normalised_density[i]).abs()
                    < 1e-13 * table.normalised_density[i].max(1.0)
            );
        }
        assert!(
            relative_error(distribution.mean_cos2(), table.mean_cos2) < 1e-13,
            "{}: {} vs {}",
            table.name,
            distribution.mean_cos2(),
            table.mean_cos2
        );
    }
}

/// A finely tabulated cos² density reproduces ⟨cos²β⟩ = 3/5 (notes §6.2) to the interpolation
/// error, which falls as the table is refined (PCHIP on smooth data: O(h³) or better).
#[test]
fn fine_table_of_cos2_density_recovers_three_fifths() {
    let mut previous = f64::INFINITY;
    for points in [19, 37, 73, 145] {
        let beta_deg: Vec<f64> = (0..points)
            .map(|i| 180.0 * i as f64 / (points - 1) as f64)
            .collect();
        let density: Vec<f64> = beta_deg
            .iter()
            .map(|d| d.to_radians().cos().powi(2))
            .collect();
        let distribution = AlignmentDistribution::table_from_degrees(&beta_deg, &density).unwrap();
        let error = (distribution.mean_cos2() - 0.6).abs();
        assert!(error < previous / 4.0, "{points} points: {error:e}");
        previous = error;
    }
    assert!(previous < 1e-5);
}

proptest! {
    /// PCHIP keeps non-negative data non-negative (Fritsch & Carlson 1980: each piece is
    /// monotone between its end values).
    #[test]
    fn table_interpolant_is_non_negative(
        density in prop::collection::vec(0.0f64..10.0, 2..12),
        zero_mask in prop::collection::vec(any::<bool>(), 12),
        probe in prop::collection::vec(0.0f64..180.0, 50),
    ) {
        let n = density.len();
        let mut density = density;
        for (value, zero) in density.iter_mut().zip(&zero_mask) {
            if *zero {
                *value = 0.0;
            }
        }
        density[0] = density[0].max(0.1);
        let beta_deg: Vec<f64> = (0..n).map(|i| 180.0 * (i as f64 / (n - 1) as f64).powf(1.3)).collect();
        let distribution = AlignmentDistribution::table_from_degrees(&beta_deg, &density).unwrap();
        for deg in probe {
            prop_assert!(distribution.relative_density(deg.to_radians()) >= 0.0);
        }
        let mean = distribution.mean_cos2();
        prop_assert!(mean > 0.0 && mean < 1.0);
    }
}

/// Bad tables: typed errors naming the key, index and value.
#[test]
fn bad_tables_are_rejected() {
    let table = AlignmentDistribution::table_from_degrees;
    assert_eq!(
        table(&[0.0, 180.0], &[1.0]).unwrap_err(),
        OrientationError::TableLengthMismatch {
            beta_len: 2,
            density_len: 1
        }
    );
    assert_eq!(
        table(&[0.0], &[1.0]).unwrap_err(),
        OrientationError::TableTooShort { len: 1 }
    );
    let error = table(&[0.0, 90.0, 80.0, 180.0], &[1.0; 4]).unwrap_err();
    assert!(matches!(
        error,
        OrientationError::TableEntry {
            key: "beta_deg",
            index: 2,
            ..
        }
    ));
    assert!(error.to_string().contains("beta_deg") && error.to_string().contains("80"));
    let error = table(&[0.0, 90.0, 90.0, 180.0], &[1.0; 4]).unwrap_err();
    assert!(error.to_string().contains("strictly increasing"));
    let error = table(&[0.0, 90.0, 180.0], &[1.0, -0.5, 1.0]).unwrap_err();
    assert!(error.to_string().contains("density") && error.to_string().contains("-0.5"));
    let error = table(&[0.0, f64::NAN, 180.0], &[1.0; 3]).unwrap_err();
    assert!(error.to_string().contains("beta_deg") && error.to_string().contains("NaN"));
    let error = table(&[0.0, 90.0, 180.0], &[1.0, f64::INFINITY, 1.0]).unwrap_err();
    assert!(error.to_string().contains("density"));
    let error = table(&[5.0, 180.0], &[1.0, 1.0]).unwrap_err();
    assert!(matches!(error, OrientationError::TableRange { .. }));
    // Radians by mistake.
    let error = table(&[0.0, 3.2], &[1.0, 1.0]).unwrap_err();
    assert!(error.to_string().contains("3.2") && error.to_string().contains("180"));
    let error = table(&[0.0, 90.0, 180.0], &[0.0; 3]).unwrap_err();
    assert_eq!(error, OrientationError::TableAllZero { len: 3 });
}

/// A distribution that is zero at every β node cannot weight the grid (typed error), and a very
/// sharp one underflows to zero on a coarse grid the same way.
#[test]
fn distribution_vanishing_on_the_grid_is_an_error() {
    let narrow =
        AlignmentDistribution::table_from_degrees(&[0.0, 1.0, 180.0], &[1.0, 0.0, 0.0]).unwrap();
    let grid = linear_molecule_grid(4).unwrap();
    let error = AlignmentGrid::weighted(&grid, &narrow).unwrap_err();
    assert_eq!(error, OrientationError::VanishesOnGrid { n_beta: 4 });
    assert!(error.to_string().contains("n_beta"));
    let sharp = AlignmentDistribution::cos2n(1e6).unwrap();
    assert!(AlignmentGrid::weighted(&grid, &sharp).is_err());
    // Fine enough grids resolve it: the sharp cos^{2n} mean needs nodes within ~1/√n of β = 0.
    let fine: OrientationGrid = linear_molecule_grid(2000).unwrap();
    let weighted = AlignmentGrid::weighted(&fine, &sharp).unwrap();
    assert!(relative_error(weighted.mean_cos2(), sharp.mean_cos2()) < 1e-6);
}

// ---------------------------------------------------------------------------------------------
// Target-file description (serde)

/// The documented JSON forms parse and build the right distribution.
#[test]
fn descriptions_parse_and_build() {
    let cases = [
        (r#"{"model": "isotropic"}"#, 1.0 / 3.0),
        (r#"{"model": "cos2n", "power_n": 1}"#, 0.6),
        (r#"{"model": "exp_cos2", "mean_cos2": 0.6}"#, 0.6),
        (
            r#"{"model": "table", "beta_deg": [0, 90, 180], "density": [1, 1, 1]}"#,
            1.0 / 3.0,
        ),
    ];
    for (json, mean) in cases {
        let description: AlignmentDescription = serde_json::from_str(json).unwrap();
        let distribution = description.build().unwrap();
        assert!(
            relative_error(distribution.mean_cos2(), mean) < 1e-13,
            "{json}"
        );
        let again: AlignmentDescription =
            serde_json::from_str(&serde_json::to_string(&description).unwrap()).unwrap();
        assert_eq!(again, description);
        assert!(AlignmentDistribution::try_from(&description).is_ok());
    }
    assert_eq!(
        AlignmentDescription::default(),
        AlignmentDescription::Isotropic {}
    );
    let bad: AlignmentDescription =
        serde_json::from_str(r#"{"model": "cos2n", "power_n": -2}"#).unwrap();
    assert!(bad.build().unwrap_err().to_string().contains("power_n"));
}

/// Unknown keys are rejected with the key's name in the message — in every variant, including
/// the isotropic one, where a unit variant of an internally tagged enum would silently accept
/// them (serde behaviour checked while writing this module; the empty struct variant avoids it).
#[test]
fn unknown_keys_are_rejected_by_name() {
    for (json, key) in [
        (r#"{"model": "isotropic", "power_n": 1}"#, "power_n"),
        (r#"{"model": "cos2n", "power_n": 1, "powr_n": 2}"#, "powr_n"),
        (r#"{"model": "cos2n", "power": 1}"#, "power"),
        (r#"{"model": "exp_cos2", "mean_cos": 0.6}"#, "mean_cos"),
        (
            r#"{"model": "exp_cos2", "mean_cos2": 0.6, "strength": 3}"#,
            "strength",
        ),
        (
            r#"{"model": "table", "beta_deg": [0, 180], "density": [1, 1], "beta_rad": [0, 3.14]}"#,
            "beta_rad",
        ),
    ] {
        let error = serde_json::from_str::<AlignmentDescription>(json).unwrap_err();
        let message = error.to_string();
        assert!(
            message.contains(&format!("unknown field `{key}`")),
            "{json}: {message}"
        );
    }
    let error = serde_json::from_str::<AlignmentDescription>(r#"{"model": "cos4"}"#).unwrap_err();
    assert!(error.to_string().contains("cos4"));
    let error = serde_json::from_str::<AlignmentDescription>(r#"{"power_n": 1}"#).unwrap_err();
    assert!(error.to_string().contains("model"));
    let error = serde_json::from_str::<AlignmentDescription>(r#"{"model": "cos2n"}"#).unwrap_err();
    assert!(error.to_string().contains("power_n"));
}
