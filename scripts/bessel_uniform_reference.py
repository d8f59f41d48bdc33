#!/usr/bin/env python3
"""Exact values of the test integral of the uniform (Airy) approximation.

I(z) = (1/2π) ∫_{-π}^{π} (1 + 0.3 sin t) e^{i(30 t − z sin t)} dt
     = J_30(z) + 0.3 [J_31(z) − J_29(z)] / (2i)          (Bessel's integral, DLMF 10.9.2)

It has two saddles that coalesce at z = 30 (a "cutoff"); physics notes §2.3(a). Values from
scipy.special.jv, cross-checked with mpmath.besselj at 30 digits.
Writes tests/data/bessel_uniform_reference.json.
"""
import json
import pathlib

import mpmath
import numpy
import scipy
import scipy.special

mpmath.mp.dps = 30
points = []
for k in range(0, 85):
    z = 24.0 + 0.25 * k
    j = lambda n: scipy.special.jv(n, z)
    val = j(30) + 0.3 * (j(31) - j(29)) / 2j
    jm = lambda n: mpmath.besselj(n, z)
    ref = jm(30) + mpmath.mpf("0.3") * (jm(31) - jm(29)) / mpmath.mpc(0, 2)
    # SciPy agrees with mpmath to ~1e-13 relative here; mpmath values are stored.
    assert abs(complex(ref) - val) < 1e-12 * max(abs(val), 1e-3), (z, val, ref)
    points.append({"z": z, "value": [float(mpmath.re(ref)), float(mpmath.im(ref))]})

out = {
    "generator": "scripts/bessel_uniform_reference.py",
    "integral": "I(z) = J_30(z) + 0.3 [J_31(z) - J_29(z)]/(2i)",
    "scipy_version": scipy.__version__,
    "mpmath_version": mpmath.__version__,
    "numpy_version": numpy.__version__,
    "points": points,
}
path = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "bessel_uniform_reference.json"
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {path} ({len(points)} points)")
