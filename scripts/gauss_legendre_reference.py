#!/usr/bin/env python3
"""Reference Gauss-Legendre nodes and weights for holecast's tests.

Writes tests/data/gauss_legendre_reference.json with two independent references:

* "numpy": numpy.polynomial.legendre.leggauss(n) (companion-matrix eigenvalues plus one
  Newton step inside numpy), full rules for a list of orders.
* "mpmath": the roots of mpmath.legendre(n, x) polished by Newton's method in mpmath arithmetic
  at 40 significant digits (started from numpy's nodes), with weights w = 2 / ((1 - x^2) P_n'(x)^2)
  (Abramowitz & Stegun 25.4.29, from memory) and P_n'(x) = n (P_{n-1}(x) - x P_n(x)) / (1 - x^2)
  (DLMF 18.9, from memory), rounded to double precision at the end.
  These let the tests measure the accuracy of the Rust rule to ~1e-16.

Run from the crate root:  python3 scripts/gauss_legendre_reference.py
"""
import json
import pathlib

import mpmath
import numpy
from numpy.polynomial.legendre import leggauss

NUMPY_ORDERS = [1, 2, 3, 4, 5, 8, 10, 16, 20, 33, 64, 100, 128, 255, 500]
MPMATH_ORDERS = [7, 40, 101, 500]
MPMATH_DIGITS = 40


def numpy_rule(n):
    x, w = leggauss(n)
    return {"n": n, "nodes": [float(v) for v in x], "weights": [float(v) for v in w]}


def polish_root(n, x):
    """Newton's method on mpmath.legendre(n, x) at MPMATH_DIGITS digits."""
    for _ in range(50):
        p_n = mpmath.legendre(n, x)
        dp = n * (mpmath.legendre(n - 1, x) - x * p_n) / (1 - x * x)
        step = p_n / dp
        x -= step
        if abs(step) < mpmath.mpf(10) ** (-MPMATH_DIGITS + 5):
            return x
    raise RuntimeError(f"Newton did not converge for n = {n}")


def mpmath_rule(n):
    mpmath.mp.dps = MPMATH_DIGITS
    x0, _ = leggauss(n)
    nodes, weights = [], []
    for guess in x0:
        root = polish_root(n, mpmath.mpf(float(guess)))
        p_n = mpmath.legendre(n, root)
        p_nm1 = mpmath.legendre(n - 1, root)
        one_minus_x2 = 1 - root * root
        dp = n * (p_nm1 - root * p_n) / one_minus_x2
        w = 2 / (one_minus_x2 * dp * dp)
        nodes.append(float(root))
        weights.append(float(w))
    return {"n": n, "nodes": nodes, "weights": weights}


def main():
    out = {
        "description": "Gauss-Legendre rules on [-1, 1]; see scripts/gauss_legendre_reference.py",
        "numpy_version": numpy.__version__,
        "mpmath_version": mpmath.__version__,
        "mpmath_digits": MPMATH_DIGITS,
        "numpy": [numpy_rule(n) for n in NUMPY_ORDERS],
        "mpmath": [mpmath_rule(n) for n in MPMATH_ORDERS],
    }
    path = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "gauss_legendre_reference.json"
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(json.dumps(out, indent=1) + "\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
