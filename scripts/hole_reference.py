#!/usr/bin/env python3
"""Reference values for the ionic (hole) propagator tests (holecast::hole).

Writes tests/data/hole_reference.json with:

* pade_cases    -- scipy.linalg.expm of anti-Hermitian 3x3 matrices of growing norm
                   (checks the Pade exponential of every degree and the squaring branch);
* static_cases  -- time-independent channel Hamiltonians H; scipy.linalg.expm(-1j*H*t);
* two_colour    -- a 3-channel ion (complex Hermitian dipoles in the molecular frame, rotated by
                   ZYZ Euler angles) in E(t) = F1 cos(wt) z + F2 cos(2wt + 0.7) x: the
                   interaction-picture propagator U_I(t2, t1) from scipy.integrate.solve_ivp
                   (DOP853, rtol = atol = 1e-12);
* worst_case    -- the same for the largest couplings the default grid step is specified for
                   (Ip differences up to 1 a.u., dipole elements up to 3 a.u., |E| < 0.1 a.u.),
                   integrated with rtol = atol = 1e-13;
* rabi          -- exact TDSE populations of a resonantly driven two-level ion.

Conventions (same as the Rust code): H(t)_mn = Ip_m d_mn + V_mn - E(t).mu_lab_mn, with
mu_lab_a = sum_b R_ab mu_mol_b and R = Rz(alpha) Ry(beta) Rz(gamma) (active rotation taking
molecular-frame vectors to the lab frame). V_I(t)_mn = (V - E.mu_lab)_mn exp(i(Ip_m - Ip_n)t),
i dU_I/dt = V_I U_I, U_I(t1, t1) = 1. Atomic units. No physical constants are used.

Every ODE is also integrated with tolerances ten times tighter; the largest difference is stored
as `integration_error_estimate`.
"""

import json
import pathlib

import numpy as np
import scipy
from scipy.integrate import solve_ivp
from scipy.linalg import expm

OUT = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "hole_reference.json"


def cmat(m):
    """Complex matrix -> nested lists of [re, im]."""
    return [[[float(z.real), float(z.imag)] for z in row] for row in np.asarray(m)]


def rz(a):
    c, s = np.cos(a), np.sin(a)
    return np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])


def ry(b):
    c, s = np.cos(b), np.sin(b)
    return np.array([[c, 0.0, s], [0.0, 1.0, 0.0], [-s, 0.0, c]])


def euler_zyz(alpha, beta, gamma):
    return rz(alpha) @ ry(beta) @ rz(gamma)


def hermitian(rng, n, scale):
    a = rng.normal(size=(n, n)) + 1j * rng.normal(size=(n, n))
    a = (a + a.conj().T) / 2
    return a * (scale / np.abs(a).max())


def pade_cases():
    rng = np.random.default_rng(20240601)
    cases = []
    for norm in [0.005, 0.1, 0.6, 2.5, 7.0]:
        k = hermitian(rng, 3, 1.0)
        x = -1j * k
        x = x * (norm / np.abs(x).sum(axis=0).max())
        cases.append({"one_norm": float(norm), "generator": cmat(x), "exponential": cmat(expm(x))})
    return cases


def static_cases():
    rng = np.random.default_rng(7)
    out = []
    # (1) diag(Ip) + V, no field; V with a non-zero diagonal.
    ip = np.array([0.5, 0.55, 0.8])
    v = hermitian(rng, 3, 0.05)
    h = np.diag(ip) + v
    times = [1.3, 17.9, 123.4]
    out.append({
        "name": "coupling only",
        "energies": ip.tolist(),
        "coupling": cmat(v),
        "dipole": [cmat(np.zeros((3, 3))) for _ in range(3)],
        "euler_zyz": [0.0, 0.0, 0.0],
        "field_lab": [0.0, 0.0, 0.0],
        "times": times,
        "schrodinger": [cmat(expm(-1j * h * t)) for t in times],
    })
    # (2) a static lab-frame field acting on rotated dipoles, plus V.
    mu = [hermitian(rng, 3, 1.5) for _ in range(3)]
    v2 = hermitian(rng, 3, 0.02)
    np.fill_diagonal(v2, 0.0)
    angles = [0.3, 1.1, -0.4]
    r = euler_zyz(*angles)
    e_lab = np.array([0.01, -0.02, 0.03])
    mu_lab = [sum(r[a, b] * mu[b] for b in range(3)) for a in range(3)]
    h2 = np.diag(ip) + v2 - sum(e_lab[a] * mu_lab[a] for a in range(3))
    out.append({
        "name": "static field",
        "energies": ip.tolist(),
        "coupling": cmat(v2),
        "dipole": [cmat(m) for m in mu],
        "euler_zyz": angles,
        "field_lab": e_lab.tolist(),
        "times": times,
        "schrodinger": [cmat(expm(-1j * h2 * t)) for t in times],
    })
    return out


def propagate(ip, v, mu_lab, field, t1, t2_list, tol):
    """U_I(t2, t1) for each t2 (all on one side of t1), DOP853."""
    n = len(ip)
    dphase = np.subtract.outer(ip, ip)

    def rhs(t, y):
        u = (y[: n * n] + 1j * y[n * n:]).reshape(n, n)
        e = field(t)
        g = v - (e[0] * mu_lab[0] + e[1] * mu_lab[1] + e[2] * mu_lab[2])
        du = -1j * (g * np.exp(1j * dphase * t)) @ u
        du = du.reshape(-1)
        return np.concatenate([du.real, du.imag])

    y0 = np.concatenate([np.eye(n).reshape(-1), np.zeros(n * n)])
    t_end = t2_list[-1]
    sol = solve_ivp(rhs, (t1, t_end), y0, method="DOP853", rtol=tol, atol=tol,
                    t_eval=t2_list, dense_output=False)
    assert sol.success, sol.message
    mats = []
    for k in range(len(t2_list)):
        y = sol.y[:, k]
        mats.append((y[: n * n] + 1j * y[n * n:]).reshape(n, n))
    return mats


def driven_case(name, ip, v, mu, angles, field_params, window, pairs, tol):
    r = euler_zyz(*angles)
    mu_lab = [sum(r[a, b] * mu[b] for b in range(3)) for a in range(3)]
    w, f1, f2, phi = field_params

    def field(t):
        return np.array([f2 * np.cos(2 * w * t + phi), 0.0, f1 * np.cos(w * t)])

    results = []
    err = 0.0
    for t1, t2_list in pairs:
        mats = propagate(ip, v, mu_lab, field, t1, t2_list, tol)
        tight = propagate(ip, v, mu_lab, field, t1, t2_list, tol / 10)
        err = max(err, max(np.abs(a - b).max() for a, b in zip(mats, tight)))
        for t2, m in zip(t2_list, mats):
            results.append({"t2": t2, "t1": t1, "u_interaction": cmat(m)})
    return {
        "name": name,
        "energies": list(map(float, ip)),
        "coupling": cmat(v),
        "dipole": [cmat(m) for m in mu],
        "euler_zyz": angles,
        "rotation": r.tolist(),
        "field": {"formula": "E(t) = F1 cos(w t) z + F2 cos(2 w t + phase) x",
                  "w": w, "F1": f1, "F2": f2, "phase": phi},
        "window": window,
        "solver": f"scipy.integrate.solve_ivp DOP853 rtol=atol={tol:g}",
        "integration_error_estimate": float(err),
        "pairs": results,
    }


def two_colour():
    ip = np.array([0.5, 0.55, 0.8])
    mu = [
        np.array([[0.4, 0.9 - 0.3j, 0.2 + 0.5j],
                  [0.9 + 0.3j, -0.6, 1.1 - 0.2j],
                  [0.2 - 0.5j, 1.1 + 0.2j, 0.1]]),
        np.array([[0.0, 0.3 + 0.8j, -0.7 + 0.1j],
                  [0.3 - 0.8j, 0.2, 0.4 + 0.4j],
                  [-0.7 - 0.1j, 0.4 - 0.4j, -0.3]]),
        np.array([[1.2, 1.5 + 0.2j, 0.3 - 0.6j],
                  [1.5 - 0.2j, -0.9, 0.8 + 0.7j],
                  [0.3 + 0.6j, 0.8 - 0.7j, 0.5]]),
    ]
    v = np.array([[0.0, 0.01 + 0.004j, 0.0],
                  [0.01 - 0.004j, 0.0, -0.006j],
                  [0.0, 0.006j, 0.0]])
    pairs = [
        (3.21, [40.7, 123.45, 250.02, 331.9]),
        (77.77, [60.0, 12.5]),  # backwards in time: U_I(t2, t1) = U_I(t1, t2)^dagger
    ]
    return driven_case("two-colour", ip, v, mu, [0.3, 1.1, -0.4], (0.057, 0.05, 0.02, 0.7),
                       [-5.0, 335.0], pairs, 1e-12)


def worst_case():
    rng = np.random.default_rng(11)
    ip = np.array([0.5, 0.9, 1.5])
    mu = [hermitian(rng, 3, 3.0) for _ in range(3)]
    v = hermitian(rng, 3, 0.05)
    np.fill_diagonal(v, 0.0)
    pairs = [
        (-13.37, [0.71, 97.3, 250.55, 419.9]),
        (201.03, [333.3, 421.1]),
    ]
    return driven_case("worst case", ip, v, mu, [1.9, 0.7, 2.6], (0.057, 0.09, 0.04, 0.7),
                       [-20.0, 421.2], pairs, 1e-13)


def rabi():
    """Two levels, dE = w = 0.1, E(t) = F cos(wt) z, mu_z off-diagonal = 1, mu F = 0.005."""
    w, f = 0.1, 0.005
    ip = np.array([0.5, 0.6])
    mu_z = np.array([[0.0, 1.0], [1.0, 0.0]])
    zero = np.zeros((2, 2))
    omega_r = f
    times = [np.pi / (2 * omega_r), np.pi / omega_r]
    mats = propagate(ip, zero, [zero, zero, mu_z], lambda t: np.array([0.0, 0.0, f * np.cos(w * t)]),
                     0.0, times, 1e-12)
    return {
        "energies": ip.tolist(), "w": w, "F": f, "mu_z_offdiagonal": 1.0,
        "solver": "scipy.integrate.solve_ivp DOP853 rtol=atol=1e-12",
        "times": times,
        "population_2": [float(abs(m[1, 0]) ** 2) for m in mats],
        "dossier_values": {"source": "physics-notes.md §4.3 (NUM)", "population_2": [0.499860, 0.999844]},
    }


def main():
    data = {
        "script": "scripts/hole_reference.py",
        "libraries": {"scipy": scipy.__version__, "numpy": np.__version__},
        "complex_format": "[re, im]; matrices are lists of rows",
        "pade_cases": pade_cases(),
        "static_cases": static_cases(),
        "two_colour": two_colour(),
        "worst_case": worst_case(),
        "rabi": rabi(),
    }
    OUT.write_text(json.dumps(data, indent=1) + "\n")
    print("wrote", OUT)
    print("two-colour integration error estimate", data["two_colour"]["integration_error_estimate"])
    print("worst-case integration error estimate", data["worst_case"]["integration_error_estimate"])
    print("rabi", data["rabi"]["population_2"])


if __name__ == "__main__":
    main()
