//! Gauss–Hermite quadrature: `∫ e^{−x²} f(x) dx ≈ Σ_i w_i f(x_i)`, exact for every polynomial of
//! degree `≤ 2n − 1` (DLMF §3.5(v)).
//!
//! The nodes are the eigenvalues of the symmetric tridiagonal Jacobi matrix of the
//! physicists' Hermite polynomials (zero diagonal, off-diagonal `√(k/2)`, `k = 1…n−1`, from the
//! recurrence `H_{k+1} = 2x H_k − 2k H_{k−1}`, DLMF Table 18.9.1) and the weights are
//! `√π v₀²` with `v₀` the first component of the normalised eigenvector (G. H. Golub and
//! J. H. Welsch, Math. Comp. 23, 221 (1969)). The rule is used with a complex shift and scale,
//! `E[p(m + sZ)] = π^{−1/2} Σ_i w_i p(m + s√2 x_i)` for `Z` standard normal, which is an
//! algebraic identity between the moments of a polynomial `p` and holds for complex `m` and `s`.

use nalgebra::{DMatrix, SymmetricEigen};

/// Nodes (ascending) and weights of the `n`-point Gauss–Hermite rule for the weight `e^{−x²}`;
/// `n` between 1 and 64 (the eigenvalue method is accurate to a few ulp at these sizes).
///
/// # Panics
/// Never for `1 ≤ n ≤ 64`; for other `n` the rule is empty.
pub fn gauss_hermite(n: usize) -> (Vec<f64>, Vec<f64>) {
    if n == 0 || n > 64 {
        return (Vec::new(), Vec::new());
    }
    let mut j = DMatrix::<f64>::zeros(n, n);
    for k in 1..n {
        let b = (k as f64 / 2.0).sqrt();
        j[(k, k - 1)] = b;
        j[(k - 1, k)] = b;
    }
    let eig = SymmetricEigen::new(j);
    let mut pairs: Vec<(f64, f64)> = (0..n)
        .map(|i| {
            let v0 = eig.eigenvectors[(0, i)];
            (eig.eigenvalues[i], std::f64::consts::PI.sqrt() * v0 * v0)
        })
        .collect();
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
    // The rule is symmetric: average each node with its mirror to remove rounding asymmetry.
    let mut nodes: Vec<f64> = pairs.iter().map(|p| p.0).collect();
    let mut weights: Vec<f64> = pairs.iter().map(|p| p.1).collect();
    for i in 0..n / 2 {
        let x = 0.5 * (nodes[n - 1 - i] - nodes[i]);
        let w = 0.5 * (weights[i] + weights[n - 1 - i]);
        nodes[i] = -x;
        nodes[n - 1 - i] = x;
        weights[i] = w;
        weights[n - 1 - i] = w;
    }
    if n % 2 == 1 {
        nodes[n / 2] = 0.0;
    }
    (nodes, weights)
}

#[cfg(test)]
mod tests {
    use super::gauss_hermite;

    #[test]
    fn integrates_even_moments_exactly() {
        // Mathematics: ∫ x^{2k} e^{−x²} dx = Γ(k + 1/2) = (2k−1)!! √π / 2^k, and odd moments
        // vanish; an n-point Gauss rule is exact up to degree 2n − 1 (DLMF §3.5(v)).
        for n in 1..=12 {
            let (x, w) = gauss_hermite(n);
            for degree in 0..2 * n {
                let sum: f64 = x
                    .iter()
                    .zip(&w)
                    .map(|(x, w)| w * x.powi(degree as i32))
                    .sum();
                let scale: f64 = x
                    .iter()
                    .zip(&w)
                    .map(|(x, w)| w * x.abs().powi(degree as i32))
                    .sum();
                let exact = if degree % 2 == 1 {
                    0.0
                } else {
                    let k = degree / 2;
                    let double_factorial: f64 = (1..=k).map(|j| (2 * j - 1) as f64).product();
                    double_factorial * std::f64::consts::PI.sqrt() / 2f64.powi(k as i32)
                };
                assert!(
                    (sum - exact).abs() <= 1e-12 * scale.max(1.0),
                    "n = {n}, degree {degree}: {sum} vs {exact}"
                );
            }
        }
    }
}
