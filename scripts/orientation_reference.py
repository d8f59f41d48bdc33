#!/usr/bin/env python3
"""Reference values for holecast's orientation and alignment tests.

Writes tests/data/orientation_reference.json:

* "euler": rotation matrices from scipy.spatial.transform.Rotation.from_euler("ZYZ", [a, b, g])
  (upper-case = intrinsic axes, i.e. R = Rz(a) Ry(b) Rz(g)), row-major.
* "exp_cos2_mean": <cos^2 beta> for rho ~ exp(a cos^2 beta) by scipy.integrate.quad over
  x = cos(beta) in [0, 1] (the density is even in x), integrands scaled by exp(-a) for a > 0 so
  nothing overflows, with break points at the width of the peak. Each value is cross-checked
  against mpmath.quad at 30 digits; the largest difference is recorded.
* "exp_cos2_inverse": the strength a for a target <cos^2 beta>, by scipy.optimize.brentq on the
  quad-based mean.
* "cos2n_mean": <cos^2 beta> for rho ~ cos^(2n) beta by quad, for non-integer n.
* "pchip_tables": scipy.interpolate.PchipInterpolator in beta (radians) through tables given in
  degrees, evaluated at sample angles, and the table distribution's <cos^2 beta> and normalised
  density rho(beta) = p(beta) / (2 pi int_0^pi p sin(beta) d beta) by quad with the nodes as
  break points.

Run from the crate root:  python3 scripts/orientation_reference.py
"""
import json
import math
import pathlib

import mpmath
import numpy
import scipy
from scipy.integrate import quad
from scipy.interpolate import PchipInterpolator
from scipy.optimize import brentq
from scipy.spatial.transform import Rotation

QUAD = dict(epsabs=0.0, epsrel=1e-13, limit=500)

EULER_ANGLES = [
    (0.3, 1.1, -0.7),
    (math.pi / 2, math.pi / 2, 0.0),
    (2.0, 0.4, 5.5),
    (-1.3, 2.9, 0.25),
    (7.0, 3.0, -4.0),
    (0.0, 0.0, 0.9),
]

STRENGTHS = [-1e4, -1000.0, -100.0, -41.0, -40.0, -39.0, -10.0, -1.0, -0.3, -1e-3, 0.0,
             1e-3, 0.3, 1.0, 5.0, 20.0, 49.0, 50.0, 51.0, 100.0, 1000.0, 1e4]
TARGETS = [0.01, 0.2, 0.5, 0.8, 0.95, 0.999]
COS2N_POWERS = [0.25, 0.5, 1.5, 2.7, 10.3, 250.0]

TABLES = [
    {"name": "mixed", "beta_deg": [0, 20, 45, 60, 90, 120, 150, 180],
     "density": [3.0, 2.5, 1.0, 1.0, 0.0, 0.2, 1.9, 3.1]},
    {"name": "two_points", "beta_deg": [0, 180], "density": [1.0, 2.0]},
    {"name": "spiky", "beta_deg": [0, 5, 10, 90, 170, 175, 180],
     "density": [0.0, 4.0, 0.5, 0.1, 0.5, 4.0, 0.0]},
]


def scaled_exp_cos2(a, x):
    """exp(a x^2) times exp(-a) for a > 0: at most 1."""
    return math.exp(-a * (1.0 - x) * (1.0 + x)) if a > 0 else math.exp(a * x * x)


def breakpoints(a):
    if a > 1:
        return sorted(p for p in (1 - 1 / a, 1 - 10 / a, 1 - 100 / a) if p > 0)
    if a < -1:
        b = -a
        return sorted(p for p in (1 / math.sqrt(b), 10 / math.sqrt(b)) if p < 1)
    return []


def mean_cos2_quad(a):
    pts = breakpoints(a) or None
    norm = quad(lambda x: scaled_exp_cos2(a, x), 0.0, 1.0, points=pts, **QUAD)[0]
    moment = quad(lambda x: x * x * scaled_exp_cos2(a, x), 0.0, 1.0, points=pts, **QUAD)[0]
    return moment / norm


def mean_cos2_mpmath(a):
    mpmath.mp.dps = 30
    a = mpmath.mpf(a)
    shift = a if a > 0 else 0
    g = lambda x: mpmath.exp(a * x * x - shift)
    pts = [0] + [mpmath.mpf(p) for p in breakpoints(float(a))] + [1]
    return float(mpmath.quad(lambda x: x * x * g(x), pts) / mpmath.quad(g, pts))


def cos2n_mean(n):
    norm = quad(lambda x: x ** (2 * n), 0.0, 1.0, points=[1 - 1 / (2 * n + 1)] if n > 1 else None, **QUAD)[0]
    moment = quad(lambda x: x ** (2 * n + 2), 0.0, 1.0, points=[1 - 1 / (2 * n + 1)] if n > 1 else None, **QUAD)[0]
    return moment / norm


def pchip_table(table):
    beta = numpy.radians(numpy.array(table["beta_deg"], dtype=float))
    p = PchipInterpolator(beta, numpy.array(table["density"], dtype=float))
    samples_deg = list(numpy.linspace(0.0, 180.0, 37)) + [1.0, 7.5, 44.9, 91.3, 179.2]
    samples_deg = sorted(set(float(s) for s in samples_deg))
    values = [float(p(math.radians(s))) for s in samples_deg]
    pts = list(beta[1:-1]) or None
    norm = quad(lambda b: float(p(b)) * math.sin(b), 0.0, math.pi, points=pts, **QUAD)[0]
    moment = quad(lambda b: float(p(b)) * math.sin(b) * math.cos(b) ** 2, 0.0, math.pi, points=pts, **QUAD)[0]
    density = [v / (2 * math.pi * norm) for v in values]
    return {
        "name": table["name"],
        "beta_deg": table["beta_deg"],
        "density": table["density"],
        "sample_beta_deg": samples_deg,
        "interpolated": values,
        "normalised_density": density,
        "mean_cos2": moment / norm,
    }


def main():
    euler = []
    for a, b, g in EULER_ANGLES:
        m = Rotation.from_euler("ZYZ", [a, b, g]).as_matrix()
        euler.append({"alpha": a, "beta": b, "gamma": g, "matrix": [float(v) for v in m.reshape(-1)]})

    exp_mean, worst = [], 0.0
    for a in STRENGTHS:
        value = mean_cos2_quad(a)
        check = mean_cos2_mpmath(a)
        worst = max(worst, abs(value - check) / check)
        exp_mean.append({"strength": a, "mean_cos2": value})

    inverse = []
    for m in TARGETS:
        if m > 1 / 3:
            lo, hi = 0.0, 2.0 / (1 - m) + 1
        else:
            lo, hi = -0.5 / m - 1, 0.0
        a = brentq(lambda s: mean_cos2_quad(s) - m, lo, hi, xtol=1e-13, rtol=1e-14, maxiter=500)
        inverse.append({"mean_cos2": m, "strength": a})

    out = {
        "description": "orientation/alignment references; see scripts/orientation_reference.py",
        "scipy_version": scipy.__version__,
        "numpy_version": numpy.__version__,
        "mpmath_version": mpmath.__version__,
        "quad_epsrel": QUAD["epsrel"],
        "exp_cos2_scipy_vs_mpmath_max_relative_difference": worst,
        "euler": euler,
        "exp_cos2_mean": exp_mean,
        "exp_cos2_inverse": inverse,
        "cos2n_mean": [{"power_n": n, "mean_cos2": cos2n_mean(n)} for n in COS2N_POWERS],
        "pchip_tables": [pchip_table(t) for t in TABLES],
    }
    path = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "orientation_reference.json"
    path.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {path}; scipy vs mpmath max relative difference {worst:.2e}")


if __name__ == "__main__":
    main()
