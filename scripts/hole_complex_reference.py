#!/usr/bin/env python3
"""Reference values for the ionic (hole) propagator continued to complex times (holecast::hole).

Purpose
-------
At a complex saddle pair (t_i, t_r) the multichannel amplitude needs the interaction-picture ion
propagator U_I(t_r, t_i) at the complex times themselves (physics-notes §4.2-4.3). This script
computes it, independently of the Rust code, by integrating the ODE along contours in the complex
t plane with scipy.integrate.solve_ivp, and writes tests/data/hole_complex_contour.json.

Conventions (atomic units, same as the Rust code)
-------------------------------------------------
* H(t) = diag(Ip) + V - E_z(t) mu_z, with E_z(t) = F cos(w t) (crest at t = 0), V and mu_z real
  symmetric N x N matrices.
* Schroedinger propagator: i dU_S(t2, t1)/dt2 = H(t2) U_S, U_S(t1, t1) = 1.
* Interaction picture: U_I(t2, t1) = diag(e^{i Ip t2}) U_S(t2, t1) diag(e^{-i Ip t1}), which obeys
  i dU_I/dt2 = V_I(t2) U_I with V_I(t)_mn = (V - E_z(t) mu_z)_mn e^{i (Ip_m - Ip_n) t}.
* Complex times: H(t) is entire in t, so U_I(t2, t1) is the analytic continuation, obtained by
  integrating along any contour t(s) from t1 to t2:  dU/ds = -i V_I(t(s)) U t'(s), s real.
  Each contour is piecewise linear; each straight leg a -> b uses t(s) = a + s (b - a), s in [0, 1],
  and solve_ivp is restarted at every corner (the ODE's right side jumps there).
* "complex contour": t_i -> Re t_i (vertical) -> Re t_r (real axis) -> t_r (vertical).
  Stored: the full U_I(t_r, t_i) along it, the real-time shortcut U_I(Re t_r, Re t_i), the
  ionization leg U_I(Re t_i, t_i) and the return leg U_I(t_r, Re t_r) (each from the identity).

Error estimate (stored per case, all max-abs element differences)
-----------------------------------------------------------------
* tolerance: the main contour at rtol = 1e-13, atol = 1e-15 versus rtol = 1e-11, atol = 1e-13;
* path independence: the main contour versus (1) the straight segment t_i -> t_r and (2) a detour
  through other real points, t_i -> Re t_i - 0.5/w -> Re t_r + 0.5/w -> t_r;
* formulation: the straight segment integrated in the Schroedinger picture (the definition
  above) and converted with the diagonal phases, versus the interaction-picture ODE;
* legs: the product return leg . real leg . ionization leg versus the chained integration.
All must be <= 1e-10 (asserted). det U_I = 1 exactly for these traceless V_I (tr V = tr mu = 0),
which is also checked. Case (d) (F = 0, degenerate Ip) is also compared with the closed form
U_I(t2, t1) = expm(-i V (t2 - t1)) (scipy.linalg.expm).

The eV -> hartree conversion of case (c) uses the CODATA 2018 Hartree energy 27.211386245988 eV,
hard-coded here (SciPy >= 1.15 ships CODATA 2022).

Run:  python3 -m venv /tmp/venv-ref && /tmp/venv-ref/bin/pip install numpy scipy mpmath sympy
      /tmp/venv-ref/bin/python scripts/hole_complex_reference.py
(writes tests/data/hole_complex_contour.json; about a minute on one core.)
"""

import json
import pathlib
import platform

import numpy as np
import scipy
from scipy.integrate import solve_ivp
from scipy.linalg import expm

OUT = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "hole_complex_contour.json"

HARTREE_EV_CODATA2018 = 27.211386245988  # CODATA 2018, hard-coded on purpose
RTOL, ATOL = 1e-13, 1e-15
RTOL_LOOSE, ATOL_LOOSE = 1e-11, 1e-13
ACCEPT = 1e-10
DETOUR_SHIFT = 0.5  # detour real points: Re t_i - 0.5/w and Re t_r + 0.5/w


def cmat(m):
    """Complex matrix -> nested lists of rows of [re, im]."""
    return [[[float(z.real), float(z.imag)] for z in row] for row in np.asarray(m)]


def cnum(z):
    return [float(complex(z).real), float(complex(z).imag)]


def maxdiff(a, b):
    return float(np.abs(np.asarray(a) - np.asarray(b)).max())


class Ion:
    def __init__(self, ip, v, mu, f, w):
        self.ip = np.asarray(ip, dtype=float)
        self.v = np.asarray(v, dtype=float)
        self.mu = np.asarray(mu, dtype=float)
        self.f = float(f)
        self.w = float(w)
        self.n = len(ip)
        self.dphase = np.subtract.outer(self.ip, self.ip)  # Ip_m - Ip_n

    def field(self, t):
        return self.f * np.cos(self.w * t)

    def v_interaction(self, t):
        return (self.v - self.field(t) * self.mu) * np.exp(1j * self.dphase * t)

    def h_schroedinger(self, t):
        return np.diag(self.ip) + self.v - self.field(t) * self.mu


def leg(gen, a, b, u0, rtol, atol):
    """Integrate dU/ds = -i gen(t(s)) U (b - a) on t(s) = a + s (b - a), s in [0, 1]."""
    n = u0.shape[0]
    d = b - a

    def rhs(s, y):
        u = y.reshape(n, n)
        return (-1j * d * (gen(a + s * d) @ u)).reshape(-1)

    sol = solve_ivp(rhs, (0.0, 1.0), u0.reshape(-1).astype(complex), method="DOP853",
                    rtol=rtol, atol=atol)
    assert sol.success, sol.message
    return sol.y[:, -1].reshape(n, n)


def contour(gen, points, n, rtol=RTOL, atol=ATOL):
    """Chained integration along the piecewise-linear contour through `points`."""
    u = np.eye(n, dtype=complex)
    for a, b in zip(points[:-1], points[1:]):
        if a != b:
            u = leg(gen, a, b, u, rtol, atol)
    return u


def run_case(name, ip, v, mu, f, w, ti, tr, note):
    ion = Ion(ip, v, mu, f, w)
    n = ion.n
    gen = ion.v_interaction
    ri, rr = complex(ti.real, 0.0), complex(tr.real, 0.0)
    main_path = [ti, ri, rr, tr]

    full = contour(gen, main_path, n)
    full_loose = contour(gen, main_path, n, RTOL_LOOSE, ATOL_LOOSE)
    ion_leg = contour(gen, [ti, ri], n)
    real_leg = contour(gen, [ri, rr], n)
    ret_leg = contour(gen, [rr, tr], n)
    straight = contour(gen, [ti, tr], n)
    detour = contour(gen, [ti, complex(ti.real - DETOUR_SHIFT / w, 0.0),
                           complex(tr.real + DETOUR_SHIFT / w, 0.0), tr], n)
    # Schroedinger picture along the straight segment, converted to the interaction picture
    u_s = contour(ion.h_schroedinger, [ti, tr], n)
    via_s = np.diag(np.exp(1j * ion.ip * tr)) @ u_s @ np.diag(np.exp(-1j * ion.ip * ti))

    checks = {
        "tolerance_rtol1e-13_vs_rtol1e-11": maxdiff(full, full_loose),
        "path_straight_segment": maxdiff(full, straight),
        "path_detour_real_points": maxdiff(full, detour),
        "schroedinger_picture_straight_segment": maxdiff(full, via_s),
        "legs_product_vs_chained": maxdiff(full, ret_leg @ real_leg @ ion_leg),
        "determinant_minus_one": float(abs(np.linalg.det(full) - 1.0)),
    }
    closed = None
    if f == 0.0 and np.ptp(ion.ip) == 0.0:
        closed = expm(-1j * ion.v * (tr - ti))
        checks["closed_form_expm"] = maxdiff(full, closed)
    for key, val in checks.items():
        assert val <= ACCEPT, (name, key, val)
    path_disc = max(checks["path_straight_segment"], checks["path_detour_real_points"])
    err = max(checks[k] for k in checks if k != "determinant_minus_one")
    shortcut_diff = maxdiff(full, real_leg)
    shortcut_rel = float(np.linalg.norm(full - real_leg) / np.linalg.norm(full))

    print(f"case {name}: max|U_I| = {np.abs(full).max():.4g}")
    for key, val in checks.items():
        print(f"  {key:42s} {val:.3e}")
    print(f"  complex contour vs real-time shortcut: max abs {shortcut_diff:.4g}, "
          f"relative Frobenius {shortcut_rel:.4g}")

    case = {
        "name": name,
        "note": note,
        "ionization_potentials": [float(x) for x in ion.ip],
        "coupling": ion.v.tolist(),
        "dipole_z": ion.mu.tolist(),
        "field_amplitude": ion.f,
        "angular_frequency": ion.w,
        "t_ionization": cnum(ti),
        "t_return": cnum(tr),
        "u_interaction_complex_contour": cmat(full),
        "u_interaction_real_shortcut": cmat(real_leg),
        "u_interaction_ionization_leg": cmat(ion_leg),
        "u_interaction_return_leg": cmat(ret_leg),
        "path_independence_discrepancy": path_disc,
        "checks": checks,
        "error_estimate": err,
        "shortcut_difference_max_abs": shortcut_diff,
        "shortcut_difference_relative_frobenius": shortcut_rel,
    }
    if closed is not None:
        case["closed_form"] = cmat(closed)
    return case


def two_level(mu12):
    return np.array([[0.0, mu12], [mu12, 0.0]])


def main():
    cases = []
    w = 0.057
    cases.append(run_case(
        "a: resonant two-level", [0.5, 0.5 + w], np.zeros((2, 2)), two_level(1.0), 0.06, w,
        complex(0.3, 0.8) / w, complex(4.2, -0.05) / w,
        "Ip_2 - Ip_1 = w (resonant), mu_z off-diagonal 1.0, V = 0"))
    cases.append(run_case(
        "b: off-resonant two-level", [0.5, 0.55], np.zeros((2, 2)), two_level(1.8), 0.06, w,
        complex(0.1, 0.7) / w, complex(5.3, 0.01) / w,
        "mu_z off-diagonal 1.8, V = 0"))

    ip3 = [x / HARTREE_EV_CODATA2018 for x in (13.8, 17.6, 18.1)]
    mu3 = np.zeros((3, 3))
    mu3[0, 1] = mu3[1, 0] = 0.3
    mu3[1, 2] = mu3[2, 1] = 1.8
    w3 = 0.05695
    cases.append(run_case(
        "c: three channels", ip3, np.zeros((3, 3)), mu3, 0.065, w3,
        complex(0.45, 0.9) / w3, complex(3.4, -0.07) / w3,
        "Ip = 13.8, 17.6, 18.1 eV / 27.211386245988 (CODATA 2018); mu_z(1,2) = 0.3, (2,3) = 1.8"))

    v_d = np.array([[0.0, 0.02], [0.02, 0.0]])
    cases.append(run_case(
        "d: degenerate, constant coupling", [0.5, 0.5], v_d, np.zeros((2, 2)), 0.0, w,
        complex(3.0, 14.0), complex(120.0, -1.0),
        "F = 0, mu = 0; closed form U_I(t2, t1) = expm(-i V (t2 - t1)); w is unused"))

    v_e = np.zeros((3, 3))
    v_e[1, 2] = v_e[2, 1] = 0.01
    cases.append(run_case(
        "e: three channels with field-free coupling", ip3, v_e, mu3, 0.08, w3,
        complex(0.45, 0.9) / w3, complex(3.4, -0.07) / w3,
        "case c with V(2,3) = V(3,2) = 0.01 and F = 0.08"))

    data = {
        "generated_by": {
            "script": "scripts/hole_complex_reference.py",
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
        },
        "description": "interaction-picture ion propagator U_I(t2, t1) at complex times, "
                       "H = diag(Ip) + V - F cos(w t) mu_z; see the script's doc string",
        "complex_format": "[re, im]; matrices are lists of rows (row-major)",
        "solver": {
            "method": "scipy.integrate.solve_ivp DOP853 on straight legs t(s) = a + s (b - a)",
            "rtol": RTOL, "atol": ATOL,
            "loose_rtol": RTOL_LOOSE, "loose_atol": ATOL_LOOSE,
            "acceptance": ACCEPT,
            "detour_real_points": "Re t_i - 0.5/w and Re t_r + 0.5/w",
        },
        "hartree_ev_codata2018": HARTREE_EV_CODATA2018,
        "error_estimate_all_cases": max(c["error_estimate"] for c in cases),
        "cases": cases,
    }
    OUT.write_text(json.dumps(data, indent=1) + "\n")
    print("wrote", OUT)


if __name__ == "__main__":
    main()
