//! Tests of `holecast::special::gauss_legendre`.

use holecast::special::gauss_legendre::{
    MAX_NODES, QuadratureError, gauss_legendre, gauss_legendre_angles, gauss_legendre_interval,
    map_to_interval,
};
use serde::Deserialize;

#[derive(Deserialize)]
struct Rule {
    n: usize,
    nodes: Vec<f64>,
    weights: Vec<f64>,
}

#[derive(Deserialize)]
struct Reference {
    numpy_version: String,
    mpmath_version: String,
    mpmath_digits: u32,
    numpy: Vec<Rule>,
    mpmath: Vec<Rule>,
}

fn reference() -> Reference {
    let text = include_str!("data/gauss_legendre_reference.json");
    let reference: Reference = serde_json::from_str(text).expect("reference JSON parses");
    // Provenance recorded by scripts/gauss_legendre_reference.py.
    assert_eq!(reference.numpy_version, "2.4.6");
    assert_eq!(reference.mpmath_version, "1.3.0");
    assert_eq!(reference.mpmath_digits, 40);
    reference
}

/// `n` = 0 has no rule; orders above the cap are refused; both say so in the message.
#[test]
fn zero_and_oversized_orders_are_errors() {
    // Common practice: a rule needs at least one node.
    let error = gauss_legendre(0).unwrap_err();
    assert_eq!(error, QuadratureError::NoNodes);
    assert!(error.to_string().contains("n = 0"));
    assert!(gauss_legendre_angles(0).is_err());
    let error = gauss_legendre(MAX_NODES + 1).unwrap_err();
    assert!(matches!(error, QuadratureError::TooManyNodes { .. }));
    assert!(error.to_string().contains(&(MAX_NODES + 1).to_string()));
}

/// Degree of exactness 2n − 1 (DLMF §3.5(v)): `∫_{-1}^{1} x^k dx = 2/(k+1)` for even `k`, 0 for
/// odd `k`, for every `k ≤ 2n − 1`; and the remainder for `x^{2n}` is exactly
/// `2^{2n+1} (n!)^4 / ((2n+1) ((2n)!)^2)` (Abramowitz & Stegun 25.4.29 with f^{(2n)} = (2n)!,
/// from memory; n = 1, 2 checked by hand: 2/3 and 8/45), so the rule is not exact one degree up.
#[test]
fn exact_for_monomials_up_to_degree_2n_minus_1() {
    for n in 1..=20 {
        let (x, w) = gauss_legendre(n).unwrap();
        for k in 0..=2 * n - 1 {
            let sum: f64 = x.iter().zip(&w).map(|(x, w)| w * x.powi(k as i32)).sum();
            let exact = if k % 2 == 0 {
                2.0 / (k as f64 + 1.0)
            } else {
                0.0
            };
            assert!(
                (sum - exact).abs() < 1e-14,
                "n = {n}, k = {k}: {sum} vs {exact}"
            );
        }
        let sum: f64 = x
            .iter()
            .zip(&w)
            .map(|(x, w)| w * x.powi(2 * n as i32))
            .sum();
        let exact = 2.0 / (2.0 * n as f64 + 1.0);
        // log of 2^{2n+1} (n!)^4 / ((2n+1) ((2n)!)^2)
        let ln_factorial = |m: usize| (1..=m).map(|j| (j as f64).ln()).sum::<f64>();
        let ln_remainder = (2 * n + 1) as f64 * 2f64.ln() + 4.0 * ln_factorial(n)
            - ((2 * n + 1) as f64).ln()
            - 2.0 * ln_factorial(2 * n);
        let remainder = ln_remainder.exp();
        assert!(
            ((exact - sum) - remainder).abs() < 1e-14 + 1e-12 * remainder,
            "n = {n}: remainder {} vs {remainder}",
            exact - sum
        );
    }
}

/// Legendre orthogonality `∫ P_j P_k dx = 2 δ_jk / (2k+1)` (DLMF 18.2.5 with Table 18.3.1 norms),
/// integrated exactly when `j + k ≤ 2n − 1`; checks high degrees where monomials are ill-suited.
#[test]
fn integrates_products_of_legendre_polynomials() {
    for &n in &[37usize, 100, 250] {
        let (x, w) = gauss_legendre(n).unwrap();
        // table[k][i] = P_k(x_i) by the recurrence (DLMF §18.9)
        let degree = n;
        let mut table = vec![vec![1.0; n]; degree];
        if degree > 1 {
            table[1].clone_from(&x);
        }
        for k in 1..degree - 1 {
            for i in 0..n {
                let kf = k as f64;
                table[k + 1][i] =
                    ((2.0 * kf + 1.0) * x[i] * table[k][i] - kf * table[k - 1][i]) / (kf + 1.0);
            }
        }
        for j in (0..degree).step_by(7) {
            for k in (0..degree).step_by(5) {
                if j + k > 2 * n - 1 {
                    continue;
                }
                let sum: f64 = (0..n).map(|i| w[i] * table[j][i] * table[k][i]).sum();
                let exact = if j == k {
                    2.0 / (2.0 * k as f64 + 1.0)
                } else {
                    0.0
                };
                assert!(
                    (sum - exact).abs() < 5e-14,
                    "n = {n}, j = {j}, k = {k}: {sum}"
                );
            }
        }
    }
}

/// Weights sum to the length of the interval, 2 (exactness for degree 0); symmetry and order.
#[test]
fn weights_sum_to_two_and_nodes_are_symmetric() {
    for n in (1..=60).chain([99, 128, 333, 500, 1000]) {
        let (x, w) = gauss_legendre(n).unwrap();
        assert_eq!(x.len(), n);
        let total: f64 = w.iter().sum();
        assert!((total - 2.0).abs() < 2e-14, "n = {n}: Σw = {total}");
        for i in 0..n {
            assert_eq!(x[i], -x[n - 1 - i]);
            assert_eq!(w[i], w[n - 1 - i]);
            assert!(w[i] > 0.0);
            assert!(x[i] > -1.0 && x[i] < 1.0);
        }
        assert!(x.windows(2).all(|p| p[0] < p[1]), "n = {n}: not ascending");
    }
}

/// Against numpy.polynomial.legendre.leggauss (NumPy 2.4.6, tests/data via
/// scripts/gauss_legendre_reference.py). numpy's own weights are only good to about 2e-14
/// absolute at n = 500 (measured against the mpmath reference), hence the weight tolerance.
#[test]
fn agrees_with_numpy_leggauss() {
    let reference = reference();
    for rule in &reference.numpy {
        let (x, w) = gauss_legendre(rule.n).unwrap();
        assert_eq!(x.len(), rule.nodes.len());
        for i in 0..rule.n {
            assert!(
                (x[i] - rule.nodes[i]).abs() < 5e-16,
                "n = {}, node {i}: {} vs {}",
                rule.n,
                x[i],
                rule.nodes[i]
            );
            assert!(
                (w[i] - rule.weights[i]).abs() < 5e-14,
                "n = {}, weight {i}: {} vs {}",
                rule.n,
                w[i],
                rule.weights[i]
            );
        }
    }
}

/// Against 40-digit roots of mpmath.legendre (mpmath 1.3.0, same script). Measured worst cases
/// (n = 7, 40, 101, 500): nodes 2.5e-16 absolute (n = 500, x = −0.166), weights 2.8e-16 absolute
/// and 9.3e-15 relative.
#[test]
fn agrees_with_forty_digit_mpmath_rules() {
    let reference = reference();
    for rule in &reference.mpmath {
        let (x, w) = gauss_legendre(rule.n).unwrap();
        let mut worst_node: f64 = 0.0;
        let mut worst_weight: f64 = 0.0;
        for i in 0..rule.n {
            worst_node = worst_node.max((x[i] - rule.nodes[i]).abs());
            worst_weight = worst_weight.max(((w[i] - rule.weights[i]) / rule.weights[i]).abs());
        }
        assert!(
            worst_node <= 3e-16,
            "n = {}: node error {worst_node:e}",
            rule.n
        );
        assert!(
            worst_weight <= 2e-14,
            "n = {}: weight error {worst_weight:e}",
            rule.n
        );
    }
}

/// Newton converges for every order the module claims (common practice: check each order), and
/// the result is a valid rule: ascending interior nodes, positive weights summing to 2.
#[test]
fn every_order_converges() {
    for n in (1..=500)
        .chain((501..MAX_NODES).step_by(2499))
        .chain([MAX_NODES])
    {
        let (x, w) = gauss_legendre(n).unwrap_or_else(|e| panic!("n = {n}: {e}"));
        assert!(x.windows(2).all(|p| p[0] < p[1]), "n = {n}");
        assert!(x[0] > -1.0 && x[n - 1] < 1.0 && w.iter().all(|&w| w > 0.0));
        let total: f64 = w.iter().sum();
        assert!(
            (total - 2.0).abs() < 1e-13,
            "n = {n}: Σw − 2 = {:e}",
            total - 2.0
        );
    }
}

/// The angle form is the same rule: cos θ_i reproduces the nodes (reversed), same weights.
#[test]
fn angle_form_matches_node_form() {
    for &n in &[1usize, 2, 7, 64, 501] {
        let (x, w) = gauss_legendre(n).unwrap();
        let (theta, w_theta) = gauss_legendre_angles(n).unwrap();
        for i in 0..n {
            // cos(π − θ) and −cos θ differ by rounding only.
            assert!((theta[i].cos() - x[n - 1 - i]).abs() < 4e-16);
            assert_eq!(w_theta[i], w[n - 1 - i]);
        }
        assert!(theta.windows(2).all(|p| p[0] < p[1]));
        // Σ w g(θ) ≈ ∫_0^π g sinθ dθ; g = sin²θ gives 4/3 (elementary).
        let integral: f64 = theta
            .iter()
            .zip(&w_theta)
            .map(|(t, w)| w * t.sin().powi(2))
            .sum();
        if n >= 2 {
            assert!((integral - 4.0 / 3.0).abs() < 1e-14);
        }
    }
}

/// Mapping to [a, b]: `∫_a^b t^k dt = (b^{k+1} − a^{k+1})/(k+1)` for k ≤ 2n − 1 (elementary),
/// and invalid intervals are refused with the end points in the message.
#[test]
fn mapped_rule_integrates_on_an_interval() {
    let (a, b) = (-0.3, 2.7);
    for n in 1..=12 {
        let (t, w) = gauss_legendre_interval(n, a, b).unwrap();
        assert!(t.windows(2).all(|p| p[0] < p[1]));
        assert!(t[0] > a && t[n - 1] < b);
        for k in 0..=2 * n - 1 {
            let sum: f64 = t.iter().zip(&w).map(|(t, w)| w * t.powi(k as i32)).sum();
            let kp = (k + 1) as i32;
            let exact = (b.powi(kp) - a.powi(kp)) / kp as f64;
            assert!(
                (sum - exact).abs() < 1e-13 * exact.abs().max(1.0),
                "n = {n}, k = {k}"
            );
        }
    }
    // Smooth non-polynomial: ∫_0^π sin t dt = 2 (elementary), converges to 1e-15 by n = 12.
    let (t, w) = gauss_legendre_interval(12, 0.0, std::f64::consts::PI).unwrap();
    let integral: f64 = t.iter().zip(&w).map(|(t, w)| w * t.sin()).sum();
    assert!((integral - 2.0).abs() < 1e-14);

    for (a, b) in [
        (1.0, 1.0),
        (2.0, 1.0),
        (f64::NAN, 1.0),
        (0.0, f64::INFINITY),
    ] {
        let error = gauss_legendre_interval(4, a, b).unwrap_err();
        assert!(matches!(error, QuadratureError::InvalidInterval { .. }));
        assert!(error.to_string().contains("[a, b]"));
        let (mut x, mut w) = gauss_legendre(3).unwrap();
        assert!(map_to_interval(&mut x, &mut w, a, b).is_err());
    }
}
