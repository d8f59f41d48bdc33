#!/usr/bin/env python3
"""Reference values of the Airy function Ai and its derivative Ai' for complex arguments.

Writes tests/data/airy_reference.json, read by tests/airy.rs (cargo test needs no Python).

Reference: mpmath.airyai(z) and mpmath.airyai(z, derivative=1) at 30 significant digits
(mp.dps = 30), each value confirmed by a second evaluation at 50 digits (the script stops
if the two differ by more than 1e-25 relative). scipy.special.airy is evaluated at the same
points as a cross-check; its largest deviation from mpmath and every point where it
deviates by more than 1e-13 (or returns a non-finite value) are recorded in the file, but
the mpmath values are the reference.

Point set (deterministic): rings of radius 0.5 ... 150 at the phases 0, ±pi/6, ±pi/3,
±pi/2, ±2pi/3, ±5pi/6, ±0.9pi and exactly ±pi (z = -r + 0i and -r - 0i), rings just inside
and outside the radii where holecast's Airy routine changes method (1 and 9.5), and a band
of points near the negative real axis. Real and imaginary parts are rounded to 12
significant digits, so that their decimal form in the JSON file is parsed to the same
double by any correct-to-one-rounding reader (Python, serde_json). mpmath then evaluates
at that exact double.

Points at which a component of Ai or Ai' is not a normal double (|x| > 1e300 or
0 < |x| < 1e-300) go to "out_of_range" instead of "points", with the mpmath values as
decimal strings (30 digits), so that the test can check overflow to +-inf and underflow
to 0.

Usage: python3 scripts/airy_reference.py   (from the crate root)
"""

import json
import math
import os

import mpmath
import numpy
import scipy
import scipy.special

DPS = 30
CHECK_DPS = 50
OUTPUT = os.path.join(os.path.dirname(__file__), "..", "tests", "data", "airy_reference.json")


def rounded(x):
    """Round to 12 significant digits (keeps the sign of zero)."""
    if x == 0.0:
        return x
    return float(f"{x:.12g}")


def point_set():
    pi = math.pi
    phases = [0.0, pi / 6, pi / 3, pi / 2, 2 * pi / 3, 5 * pi / 6, 0.9 * pi]
    phases = phases + [-p for p in phases if p != 0.0]
    radii = [0.5, 0.999, 1.0, 1.001, 1.5, 2.0, 3.0, 4.0, 5.0, 6.0, 7.5, 9.0, 9.49, 9.5,
             9.51, 10.0, 12.0, 15.0, 20.0, 30.0, 50.0, 75.0, 100.0, 150.0]
    points = []
    for r in radii:
        for p in phases:
            if p == pi / 2 or p == -pi / 2:
                z = complex(0.0, math.copysign(r, p))  # exactly on the imaginary axis
            elif p == 0.0:
                z = complex(r, 0.0)
            else:
                z = complex(rounded(r * math.cos(p)), rounded(r * math.sin(p)))
            points.append(z)
        # Exactly ph z = +pi and -pi (negative real axis, both signs of zero).
        points.append(complex(-r, 0.0))
        points.append(complex(-r, -0.0))
    # Band near the negative real axis.
    for x in [2.0, 5.0, 9.5, 12.0, 30.0, 60.0, 100.0, 150.0]:
        for y in [1e-3, 0.1, 1.0]:
            points.append(complex(-x, y))
            points.append(complex(-x, -y))
    return points


def mp_airy(z, dps):
    with mpmath.workdps(dps):
        w = mpmath.mpc(z.real, z.imag)
        return mpmath.airyai(w), mpmath.airyai(w, derivative=1)


def relative_difference(a, b):
    return abs(a - b) / abs(b) if b != 0 else abs(a - b)


def is_normal(x):
    return x == 0 or 1e-300 <= abs(x) <= 1e300


def main():
    points = []
    out_of_range = []
    scipy_disagreements = []
    scipy_max = 0.0
    scipy_max_off_cut = 0.0  # excluding z = -x - 0i (see below)
    for z in point_set():
        ai, aip = mp_airy(z, DPS)
        ai_check, aip_check = mp_airy(z, CHECK_DPS)
        with mpmath.workdps(CHECK_DPS):
            for value, check in [(ai, ai_check), (aip, aip_check)]:
                if abs(check) > 0 and abs(value - check) / abs(check) > mpmath.mpf("1e-25"):
                    raise SystemExit(f"mpmath 30 vs 50 digits differ at z = {z!r}")
        parts = [ai.real, ai.imag, aip.real, aip.imag]
        z_pair = [z.real, z.imag]
        if all(is_normal(mpmath.mpf(p)) for p in parts):
            points.append({
                "z": z_pair,
                "ai": [float(ai.real), float(ai.imag)],
                "aip": [float(aip.real), float(aip.imag)],
            })
            s_ai, s_aip, _, _ = scipy.special.airy(z)
            if numpy.isfinite(s_ai) and numpy.isfinite(s_aip):
                ref_ai = complex(float(ai.real), float(ai.imag))
                ref_aip = complex(float(aip.real), float(aip.imag))
                d = max(relative_difference(complex(s_ai), ref_ai),
                        relative_difference(complex(s_aip), ref_aip))
            else:
                d = math.inf
            if d < math.inf:
                scipy_max = max(scipy_max, d)
                on_cut_from_below = z.imag == 0.0 and math.copysign(1.0, z.imag) < 0 and z.real < 0
                if not on_cut_from_below:
                    scipy_max_off_cut = max(scipy_max_off_cut, d)
            if d > 1e-13:
                scipy_disagreements.append({
                    "z": z_pair,
                    "scipy_ai": [str(complex(s_ai).real), str(complex(s_ai).imag)],
                    "scipy_aip": [str(complex(s_aip).real), str(complex(s_aip).imag)],
                    "relative_difference": str(d),
                })
        else:
            with mpmath.workdps(DPS):
                out_of_range.append({
                    "z": z_pair,
                    "ai": [mpmath.nstr(ai.real, DPS), mpmath.nstr(ai.imag, DPS)],
                    "aip": [mpmath.nstr(aip.real, DPS), mpmath.nstr(aip.imag, DPS)],
                })
    data = {
        "generator": "scripts/airy_reference.py",
        "description": "Ai(z) and Ai'(z) for complex z; reference = mpmath.airyai at 30 digits "
                       "(confirmed at 50), rounded to double. out_of_range: components "
                       "outside the normal double range, as 30-digit strings.",
        "mpmath_version": mpmath.__version__,
        "mpmath_dps": DPS,
        "scipy_version": scipy.__version__,
        "numpy_version": numpy.__version__,
        "scipy_cross_check": {
            "max_relative_difference": scipy_max,
            "max_relative_difference_except_negative_axis_with_negative_zero": scipy_max_off_cut,
            "note": "scipy.special.airy returns wrong values at z = -x - 0i (negative real "
                    "axis with a negative-zero imaginary part), e.g. Ai(-2-0i); mpmath, which "
                    "has no signed zero, gives Ai(-x). Elsewhere the differences reflect "
                    "scipy's accuracy (about |z|^(3/2) ulp at large |z|) and its NaN on "
                    "overflow.",
            "threshold": 1e-13,
            "points_above_threshold_or_nonfinite": scipy_disagreements,
        },
        "points": points,
        "out_of_range": out_of_range,
    }
    with open(OUTPUT, "w") as f:
        json.dump(data, f, indent=1)
        f.write("\n")
    print(f"{len(points)} points, {len(out_of_range)} out of range, "
          f"scipy max relative difference {scipy_max:.3e} "
          f"({scipy_max_off_cut:.3e} off z = -x - 0i), "
          f"{len(scipy_disagreements)} scipy points above 1e-13 or non-finite")


if __name__ == "__main__":
    main()
