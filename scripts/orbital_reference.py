#!/usr/bin/env python3
"""Reference values for tests/orbital.rs, computed by numerical quadrature.

Everything here comes from the definitions alone (no Hermite formula, no Obara-Saika):

* plane waves <r|k> = (2 pi)^(-3/2) e^{i k.r}, so
  psi~(k)        = (2 pi)^(-3/2) Int e^{-i k.r} psi(r) d^3r,
  d(k)           = (2 pi)^(-3/2) Int e^{-i k.r} r psi(r) d^3r          (length form),
  d_rec(k)       = (2 pi)^(-3/2) Int e^{+i k.r} r psi*(r) d^3r         (= [d(k*)]*),
  evaluated at real and complex k (the integrands are entire in k).
* primitives (x-Ax)^a (y-Ay)^b (z-Az)^c e^{-alpha |r-A|^2}, normalised by quadrature of |chi|^2;
  contractions and orbitals normalised with overlaps computed by quadrature.

The 3-D integrals of a product Gaussian factorise exactly into 1-D integrals along x, y, z
(Fubini); each 1-D integral is done with scipy.integrate.quad (complex integrand, tolerance
1e-13) in the lab coordinate x (not shifted to the centre), so the phase e^{-i k.A} is not put
in by hand. Two checks guard the quadrature: the 1-D factors of one d primitive at a complex k
are recomputed with mpmath.quad (30 digits), and one value of the LCAO transform is recomputed
as a genuine triple integral on a tensor Gauss-Legendre grid (NumPy); both differences are stored.

The zero of the length-form dipole of a bonding pair of s Gaussians along the bond is found
with scipy.optimize.brentq on the quadrature of Int e^{-ikz} z psi(z) dz.

Run: python3 scripts/orbital_reference.py  (writes tests/data/orbital_reference.json)
"""

import json
import cmath
import math
import os
import platform
import sys
import time

import mpmath as mp
import numpy as np
import scipy
from scipy import integrate, optimize

mp.mp.dps = 30

AXES = 3


def quad_line(f, centre, alpha, shift=0.0):
    """Int f(x) dx over R by scipy.integrate.quad (complex integrand) on the window
    centre+shift +- 14/sqrt(alpha), outside which the Gaussian factor is below e^{-190}."""
    w = 14.0 / math.sqrt(alpha)
    peak = centre + shift
    pts = [peak - w / 14, peak, peak + w / 14]
    value, _ = integrate.quad(f, peak - w, peak + w, points=pts, epsabs=1e-15, epsrel=1e-13,
                              limit=500, complex_func=True)
    return value


def factor_1d(k, sign, n, a, alpha, times_x):
    """Int e^{sign*i*k*x} x^times_x (x-a)^n e^{-alpha (x-a)^2} dx (lab coordinate x)."""
    k = complex(k)

    def f(x):
        return cmath.exp(sign * 1j * k * x) * x**times_x * (x - a) ** n * math.exp(-alpha * (x - a) ** 2)

    # the integrand's modulus peaks near a - sign*Im(k)/(2 alpha)
    return quad_line(f, a, alpha, -sign * k.imag / (2 * alpha))


def factor_1d_mpmath(k, sign, n, a, alpha, times_x):
    """The same integral with mpmath.quad (tanh-sinh, 30 digits) over the whole line."""
    k, a, alpha = mp.mpc(k), mp.mpf(a), mp.mpf(alpha)

    def f(x):
        return mp.exp(sign * 1j * k * x) * x**times_x * (x - a) ** n * mp.exp(-alpha * (x - a) ** 2)

    peak = float(a - sign * k.imag / (2 * alpha))
    return complex(mp.quad(f, [-mp.inf, peak, mp.inf]))


def overlap_1d(na, a, alpha, nb, b, beta):
    def f(x):
        return (x - a) ** na * (x - b) ** nb * math.exp(-alpha * (x - a) ** 2 - beta * (x - b) ** 2)

    p = alpha + beta
    return quad_line(f, (alpha * a + beta * b) / p, p).real


def raw_overlap(pa, pb):
    """Overlap of two unnormalised primitives given as (centre, alpha, powers)."""
    (ca, aa, na), (cb, ab, nb) = pa, pb
    s = 1.0
    for ax in range(AXES):
        s *= overlap_1d(na[ax], ca[ax], aa, nb[ax], cb[ax], ab)
    return s


def normalisation(prim):
    return 1 / math.sqrt(raw_overlap(prim, prim))


PREF = (2 * math.pi) ** -1.5


def raw_projections(prim, k, sign):
    """(transform, dipole[3]) of an unnormalised primitive, with e^{sign i k.r}."""
    centre, alpha, powers = prim
    plain = [factor_1d(k[ax], sign, powers[ax], centre[ax], alpha, 0) for ax in range(AXES)]
    with_x = [factor_1d(k[ax], sign, powers[ax], centre[ax], alpha, 1) for ax in range(AXES)]
    transform = PREF * plain[0] * plain[1] * plain[2]
    dipole = []
    for ax in range(AXES):
        prod = PREF
        for other in range(AXES):
            prod *= with_x[other] if other == ax else plain[other]
        dipole.append(prod)
    return transform, dipole



def label_powers(label):
    if isinstance(label, list):
        return tuple(label)
    p = [0, 0, 0]
    for c in label[1:]:
        p["xyz".index(c)] += 1
    return tuple(p)


def expand_orbital(spec):
    """List of (unnormalised primitive, complex weight) of the normalised orbital, and the norm
    before normalisation (contractions normalised)."""
    terms = []
    for term in spec["terms"]:
        powers = label_powers(term["cartesian"])
        centre = term["centre_bohr"]
        exps = term["exponents_inv_bohr2"]
        contr = term.get("contraction") or [1.0]
        prims = [(centre, e, powers) for e in exps]
        weights = [d * normalisation(p) for d, p in zip(contr, prims)]
        n2 = sum(wa * wb * raw_overlap(pa, pb) for wa, pa in zip(weights, prims) for wb, pb in zip(weights, prims))
        c = complex(*term["coefficient"])
        for w, p in zip(weights, prims):
            terms.append((p, c * w / math.sqrt(n2)))
    n2 = 0.0
    for pa, wa in terms:
        for pb, wb in terms:
            n2 += (wa.conjugate() * wb * raw_overlap(pa, pb)).real
    norm = math.sqrt(n2)
    return [(p, w / norm) for p, w in terms], norm


def orbital_projections(expanded, k):
    t = 0j
    d = [0j] * 3
    rec = [0j] * 3
    for prim, w in expanded:
        pt, pd = raw_projections(prim, k, -1)
        _, pr = raw_projections(prim, k, +1)
        t += w * pt
        d = [d[i] + w * pd[i] for i in range(3)]
        rec = [rec[i] + w.conjugate() * pr[i] for i in range(3)]
    return t, d, rec


def cplx(z):
    z = complex(z)
    return [z.real, z.imag]


K_POINTS = [
    [0.3, -0.5, 0.8],
    [1.2, 0.4, -0.9],
    [complex(0.4, 0.3), complex(-0.2, 0.1), complex(0.9, -0.4)],
    [complex(1.1, -0.2), complex(0.5, 0.6), complex(-0.3, 0.2)],
    [complex(0.2, 0.9), complex(0.1, -0.3), complex(1.4, 0.7)],
]

PRIMITIVES = [
    ([0.3, -0.2, 0.5], 0.8, (0, 0, 0)),
    ([0.1, 0.4, -0.7], 0.6, (0, 0, 1)),
    ([-0.3, 0.25, 0.15], 1.4, (1, 0, 0)),
    ([-0.5, 0.2, 0.3], 1.1, (1, 1, 0)),
    ([0.6, -0.1, -0.4], 0.45, (0, 0, 2)),
    ([0.2, 0.3, -0.2], 0.75, (2, 0, 1)),
    ([-0.1, 0.5, 0.4], 0.9, (2, 1, 1)),
    ([0.3, 0.3, 0.3], 1.2, (0, 0, 4)),
]

ORBITALS = [
    {
        "name": "two_centre_complex",
        "terms": [
            {"centre_bohr": [0.0, 0.0, -0.7], "exponents_inv_bohr2": [1.3, 0.35],
             "contraction": [0.4, 0.7], "cartesian": "s", "coefficient": [0.8, 0.1]},
            {"centre_bohr": [0.0, 0.0, -0.7], "exponents_inv_bohr2": [0.9],
             "cartesian": "dxz", "coefficient": [0.2, -0.1]},
            {"centre_bohr": [0.1, 0.2, 0.7], "exponents_inv_bohr2": [0.6],
             "cartesian": "pz", "coefficient": [-0.5, 0.3]},
        ],
    },
    {
        "name": "three_centre_real",
        "terms": [
            {"centre_bohr": [0.0, 0.0, 0.0], "exponents_inv_bohr2": [0.7],
             "cartesian": "s", "coefficient": [0.6, 0.0]},
            {"centre_bohr": [1.2, -0.4, 0.3], "exponents_inv_bohr2": [0.45],
             "cartesian": [0, 1, 0], "coefficient": [-0.9, 0.0]},
            {"centre_bohr": [-0.8, 0.5, 0.1], "exponents_inv_bohr2": [0.6],
             "cartesian": "fxyz", "coefficient": [0.35, 0.0]},
        ],
    },
]


def grid_transform(expanded, k, n):
    """Genuine triple integral of the transform on a tensor Gauss-Legendre grid of n^3 nodes
    (numpy.polynomial.legendre.leggauss) over the box [-12, 12]^3, outside which every
    primitive of the orbital times the growth e^{Im k.r} of the plane wave is below e^{-40}."""
    x, w = np.polynomial.legendre.leggauss(n)
    half = 12.0
    x, w = x * half, w * half
    kv = np.array(k, complex)
    total = 0j
    for (centre, alpha, powers), weight in expanded:
        c = np.asarray(centre, float)
        X, Y, Z = np.meshgrid(x - c[0], x - c[1], x - c[2], indexing="ij")
        chi = X ** powers[0] * Y ** powers[1] * Z ** powers[2] * np.exp(-alpha * (X * X + Y * Y + Z * Z))
        phase = np.exp(-1j * (kv[0] * (X + c[0]) + kv[1] * (Y + c[1]) + kv[2] * (Z + c[2])))
        W = w[:, None, None] * w[None, :, None] * w[None, None, :]
        total += weight * np.sum(W * chi * phase)
    return total * (2 * math.pi) ** -1.5


def length_zero(alpha, half_bond):
    """k > 0 where the length-form dipole of e^{-a(z-h)^2}+e^{-a(z+h)^2} along the bond
    vanishes, first root above k = pi/(2h): by quadrature + brentq, and from the closed form."""

    def im_dz(k):
        def f(z):
            return -math.sin(k * z) * z * (math.exp(-alpha * (z - half_bond) ** 2) + math.exp(-alpha * (z + half_bond) ** 2))

        return integrate.quad(f, -half_bond - 12, half_bond + 12, epsabs=1e-15, epsrel=1e-14, limit=400, points=[-half_bond, 0.0, half_bond])[0]

    lo, hi = math.pi / (2 * half_bond) * 1.0001, math.pi / half_bond * 0.9999
    k_quad = optimize.brentq(im_dz, lo, hi, xtol=1e-15, rtol=4 * np.finfo(float).eps)

    # closed form (derivative of 2 e^{-k^2/4a} cos(k h)): -k/(2a) cos(kh) - h sin(kh) = 0
    def closed(k):
        return -k / (2 * alpha) * math.cos(k * half_bond) - half_bond * math.sin(k * half_bond)

    k_closed = optimize.brentq(closed, lo, hi, xtol=1e-15, rtol=4 * np.finfo(float).eps)
    return k_quad, k_closed


def main():
    t0 = time.time()
    out = {
        "generator": "scripts/orbital_reference.py",
        "libraries": {
            "python": platform.python_version(),
            "mpmath": mp.__version__,
            "scipy": scipy.__version__,
            "numpy": np.__version__,
        },
        "method": "1-D scipy.integrate.quad factors of the exact 3-D integrals; see script doc",
        "k_points": [[cplx(c) for c in k] for k in K_POINTS],
    }

    prims_out = []
    for centre, alpha, powers in PRIMITIVES:
        prim = (centre, alpha, powers)
        n = normalisation(prim)
        cases = []
        for k in K_POINTS:
            t, d = raw_projections(prim, k, -1)
            cases.append({"transform": cplx(n * t), "dipole_length": [cplx(n * x) for x in d]})
        prims_out.append({"centre_bohr": centre, "exponent": alpha, "powers": list(powers),
                          "normalisation": n, "cases": cases})
    out["primitives"] = prims_out

    overlaps = []
    for i in range(len(PRIMITIVES)):
        for j in range(i, len(PRIMITIVES)):
            pa, pb = PRIMITIVES[i], PRIMITIVES[j]
            s = raw_overlap(pa, pb) * normalisation(pa) * normalisation(pb)
            overlaps.append({"a": i, "b": j, "overlap": s})
    out["overlaps"] = overlaps

    orbs_out = []
    for spec in ORBITALS:
        expanded, norm = expand_orbital(spec)
        cases = []
        for k in K_POINTS:
            t, d, rec = orbital_projections(expanded, k)
            cases.append({"transform": cplx(t), "dipole_length": [cplx(x) for x in d],
                          "dipole_length_recombination": [cplx(x) for x in rec]})
        orbs_out.append({"spec": spec, "norm_before_normalisation": norm, "cases": cases})
    out["orbitals"] = orbs_out

    # second quadrature engine: mpmath.quad for every 1-D factor of one d primitive at one
    # complex k (scipy values above)
    centre, alpha, powers = PRIMITIVES[3]
    k = K_POINTS[4]
    worst = 0.0
    for ax in range(AXES):
        for times_x in (0, 1):
            a = factor_1d(k[ax], -1, powers[ax], centre[ax], alpha, times_x)
            b = factor_1d_mpmath(k[ax], -1, powers[ax], centre[ax], alpha, times_x)
            worst = max(worst, abs(a - b) / abs(b))
    assert worst < 1e-12, worst
    out["mpmath_check"] = {"primitive_index": 3, "k_index": 4, "max_rel_difference_scipy_vs_mpmath": worst}

    # genuine 3-D check of the factorisation, one complex k
    expanded, _ = expand_orbital(ORBITALS[0])
    k = K_POINTS[2]
    t3 = grid_transform(expanded, k, 200)
    t3_coarse = grid_transform(expanded, k, 160)
    t1 = orbital_projections(expanded, k)[0]
    out["triple_integral_check"] = {"orbital": ORBITALS[0]["name"], "k_index": 2, "nodes_per_axis": 200,
                                    "value": [t3.real, t3.imag],
                                    "abs_difference_160_vs_200_nodes": abs(t3 - t3_coarse),
                                    "abs_difference_to_factorised": abs(t3 - t1)}
    assert abs(t3 - t1) < 1e-12 and abs(t3 - t3_coarse) < 1e-12, (t3, t3_coarse, t1)

    alpha, half = 0.5, 1.0
    k_quad, k_closed = length_zero(alpha, half)
    assert abs(k_quad - k_closed) < 1e-12, (k_quad, k_closed)
    out["length_form_zero"] = {
        "exponent": alpha, "bond_length_bohr": 2 * half,
        "k_zero_quadrature": k_quad, "k_zero_closed_form": k_closed,
        "velocity_form_zero": math.pi / (2 * half),
    }

    path = os.path.join(os.path.dirname(__file__), "..", "tests", "data", "orbital_reference.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print(f"wrote {path} in {time.time() - t0:.1f} s; triple-integral diff {abs(t3 - t1):.2e}; "
          f"length zero {k_quad!r} (closed {k_closed!r})", file=sys.stderr)


if __name__ == "__main__":
    main()
