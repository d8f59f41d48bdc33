//! Branch choices of a pair normalised at a plateau reference energy.
//!
//! Three quantities of a pair are multivalued and continued along Ω by the tracker: each
//! member's `√(−det Φ'')`, the Airy variable ζ (one of three cube roots) with its `√ζ` and
//! `ζ^{1/4}`, and the labelling of the members as "−" and "+". The tracker fixes them at the
//! start of the continuation (principal values; "−" the member with the larger `Re Φ`) and
//! carries them by continuity. That convention is the one validated against the quadrature and
//! the exact Bessel integral (physics notes §2.3, rules 1–5: "−" has the larger `Re Φ` *in the
//! plateau*, ζ ≈ real-positive there, the Hessian root continued *from the plateau*) — for a
//! start in mid-plateau. A pair started elsewhere (from the split of its coalescence point, just
//! below the cutoff, or continued in the transverse field) is brought to the same convention
//! here: at a reference energy in mid-plateau, `Ω_ref = Ip_rec + E_max/2` (half the half
//! cycle's classical cutoff energy, where the classical start sits), every choice is made as a
//! mid-plateau start would make it, and the same global change (a sign, a cube root of unity, a
//! swap of the labels) is applied at every energy: continuation preserves the relative choices,
//! so one reference fixes them all.

use num_complex::Complex64;

use super::airy_branch::sqrt_matching;
use super::{OrbitPoint, PairPoint, Saddle};
use crate::cmath::{modulus, sqrt};

/// The two members (in slot order) and the pair point at the reference energy.
pub(crate) struct Reference {
    pub saddles: [Saddle; 2],
    pub pair: Option<PairPoint>,
}

fn nearest_sign(value: Complex64, target: Complex64) -> f64 {
    if modulus(value - target) <= modulus(-value - target) {
        1.0
    } else {
        -1.0
    }
}

/// Normalises the branches of a pair (slots 0 and 1 of `points`, pair points `pairs`, "−"
/// member `minus`) at `reference`. Returns the new "−" slot.
pub(crate) fn normalise(
    points: &mut [Vec<OrbitPoint>],
    pairs: &mut [Option<PairPoint>],
    minus: usize,
    reference: &Reference,
) -> usize {
    // Hessian roots: principal at the reference.
    for (slot, s) in reference.saddles.iter().enumerate() {
        let sign = nearest_sign(s.hessian_root, sqrt(-s.det_hessian));
        if sign < 0.0 {
            for p in points[slot].iter_mut() {
                if let OrbitPoint::Solved(x) = p {
                    x.hessian_root = -x.hessian_root;
                }
            }
        }
    }
    // Labels: "−" has the larger Re Φ at the reference.
    let [a, b] = &reference.saddles;
    let new_minus = usize::from(a.action.re < b.action.re);
    let delta = |m: &Saddle, p: &Saddle| 0.5 * (m.action - p.action);
    let Some(z) = reference.pair else {
        return new_minus;
    };
    let (rm, rp) = (
        &reference.saddles[new_minus],
        &reference.saddles[1 - new_minus],
    );
    let delta_ref = delta(rm, rp);
    // ζ: the cube root that is principal at the reference.
    let principal = (1.5 * delta_ref).powf(2.0 / 3.0);
    let unity = Complex64::new(-0.5, 0.5 * 3f64.sqrt());
    let u = [Complex64::new(1.0, 0.0), unity, unity.conj()]
        .into_iter()
        .min_by(|x, y| {
            modulus(*x * z.zeta - principal).total_cmp(&modulus(*y * z.zeta - principal))
        })
        .unwrap_or(Complex64::new(1.0, 0.0));
    let zeta_ref = u * z.zeta;
    let sqrt_ref = sqrt_matching(zeta_ref, delta_ref);
    // √ζ changes by a constant ρ (ρ² = u; a sign if the labels swap), ζ^{1/4} by c (c² = ρ),
    // with c's sign making ζ^{1/4} principal at the reference.
    let rho = sqrt_ref / z.zeta_sqrt;
    let mut c = sqrt(rho);
    let quarter_ref = c * z.zeta_quarter;
    c *= nearest_sign(quarter_ref, sqrt(sqrt_ref));
    if new_minus != minus || u != Complex64::new(1.0, 0.0) || c != Complex64::new(1.0, 0.0) {
        for pp in pairs.iter_mut().flatten() {
            pp.zeta *= u;
            pp.zeta_sqrt *= rho;
            pp.zeta_quarter *= c;
        }
    }
    new_minus
}
