#!/usr/bin/env python3
"""Reference values for tests/tunnelling.rs, written to tests/data/tunnelling_reference.json.

Everything is computed with mpmath (50 significant digits) or sympy (exact rationals), from
definitions that are independent of the Rust implementation where possible:

* g(gamma): the closed PPT form evaluated at 50 digits; Taylor coefficients by sympy.series.
* Gamma: mpmath.gamma / mpmath.loggamma.
* Wigner d and D: the definition D = exp(-i a Jz) exp(-i b Jy) exp(-i c Jz) with the
  Condon-Shortley angular-momentum matrices, exponentiated by mpmath.expm (not Wigner's sum).
* ADK / MO-ADK: the formulas of the physics notes (sections 3.2-3.4); MO-ADK structure factors
  from the expm-based D above; spherical harmonics from mpmath.spherharm (Condon-Shortley).

Constants: CODATA 2018 Hartree energy 27.211386245988 eV hard-coded (scipy.constants is NOT
used; SciPy 1.17 ships CODATA 2022).

Run:  python3 scripts/tunnelling_reference.py
"""

import json
import pathlib
import platform

import mpmath as mp
import sympy as sp

mp.mp.dps = 50
HARTREE_EV_CODATA2018 = mp.mpf("27.211386245988")


def s(x):
    """Decimal string with 20 significant digits (parsed as f64 by the tests)."""
    return mp.nstr(mp.mpf(x), 20, strip_zeros=False)


def c(z):
    z = mp.mpc(z)
    return [s(z.real), s(z.imag)]


# ---------------------------------------------------------------- g(gamma)
def ppt_g(x):
    x = mp.mpf(x)
    if x == 0:
        return mp.mpf(1)
    return 3 / (2 * x) * ((1 + 1 / (2 * x**2)) * mp.asinh(x) - mp.sqrt(1 + x**2) / (2 * x))


G_POINTS = ["1e-8", "1e-6", "1e-4", "1e-3", "0.01", "0.05", "0.1", "0.2", "0.2499",
            "0.25", "0.2501", "0.3", "0.5", "0.75", "1", "1.14", "2", "5", "10", "100",
            "1e4", "1e8"]
# Inputs are taken as the exact binary value of the f64 the tests parse (mp.mpf(float(p))), so
# that the references do not include the conditioning of the decimal -> binary rounding.
def x64(p):
    return mp.mpf(float(p))


g_values = [[p, s(ppt_g(x64(p)))] for p in G_POINTS]

t = sp.symbols("t")
g_expr = 3 / (2 * t) * ((1 + 1 / (2 * t**2)) * sp.asinh(t) - sp.sqrt(1 + t**2) / (2 * t))
series = sp.series(g_expr, t, 0, 34).removeO()
g_taylor = []
for k in range(17):
    q = sp.Rational(series.coeff(t, 2 * k))
    g_taylor.append([k, f"{q.p}/{q.q}", s(mp.mpf(q.p) / q.q)])

# ---------------------------------------------------------------- Gamma
GAMMA_POINTS = ["1e-10", "0.001", "0.1", "0.5", "1", "1.5", "1.8583081693475286", "2",
                "2.5", "3.7", "7.25", "10", "11.999", "12", "12.5", "20.3", "50.5", "100.1",
                "170.5", "171.6", "-0.5", "-1.5", "-2.7", "-10.3", "-100.5", "-170.2",
                "-180.5"]
gamma_values = [[p, s(mp.gamma(x64(p)))] for p in GAMMA_POINTS]
LNGAMMA_POINTS = ["0.25", "1.5", "3", "10", "171.5", "200", "1000", "1e6"]
ln_gamma_values = [[p, s(mp.loggamma(x64(p)))] for p in LNGAMMA_POINTS]


# ---------------------------------------------------------------- Wigner D by expm
def j_matrices(l):
    """Jy and Jz in the basis |l, m>, m = l, l-1, ..., -l (Condon-Shortley)."""
    dim = 2 * l + 1
    ms = [l - i for i in range(dim)]
    jp = mp.zeros(dim, dim)
    for i, m in enumerate(ms):  # <m+1| J+ |m> = sqrt(l(l+1) - m(m+1))
        if m + 1 <= l:
            jp[i - 1, i] = mp.sqrt(l * (l + 1) - m * (m + 1))
    jm = jp.T
    jy = (jp - jm) / (2j)
    jz = mp.diag(ms)
    return ms, jy, jz


def wigner_D(l, alpha, beta, gamma):
    ms, jy, jz = j_matrices(l)
    d = mp.expm(-1j * alpha * jz) * mp.expm(-1j * beta * jy) * mp.expm(-1j * gamma * jz)
    return ms, d


def wigner_D_elem(l, m, mp_, alpha, beta, gamma):
    ms, d = wigner_D(l, alpha, beta, gamma)
    return d[ms.index(m), ms.index(mp_)]


small_d = []
for l, beta in [(1, "0.7"), (2, "1.1"), (3, "2.3"), (4, "0.3"), (6, "2.9"), (8, "1.6"),
                (12, "0.9"), (12, "3.0")]:
    b = x64(beta)
    ms, d = wigner_D(l, 0, b, 0)
    pairs = [(m, mp_) for m in ms for mp_ in ms if (m + 2 * mp_ + l) % 3 == 0]
    for m, mp_ in pairs:
        v = d[ms.index(m), ms.index(mp_)]
        small_d.append([l, m, mp_, beta, s(v.real)])

big_d = []
for l, m, mp_, a, b, g in [(1, 1, 0, "0.4", "1.2", "-0.7"), (2, -1, 2, "2.0", "0.5", "1.3"),
                          (3, 2, -1, "-1.1", "2.6", "0.2"), (4, 0, 3, "0.9", "1.9", "2.8")]:
    v = wigner_D_elem(l, m, mp_, x64(a), x64(b), x64(g))
    big_d.append([l, m, mp_, a, b, g, c(v)])


# ---------------------------------------------------------------- ADK
def adk(ip, z, l, m, F):
    kappa = mp.sqrt(2 * ip)
    n = z / kappa
    ls = n - 1
    c2 = 2 ** (2 * n) / (n * mp.gamma(n + ls + 1) * mp.gamma(n - ls))
    am = abs(m)
    f = (2 * l + 1) * mp.factorial(l + am) / (2**am * mp.factorial(am) * mp.factorial(l - am))
    w = c2 * f * ip * (2 * kappa**3 / F) ** (2 * n - am - 1) * mp.exp(-2 * kappa**3 / (3 * F))
    avg = mp.sqrt(3 * F / (mp.pi * kappa**3))
    return n, c2, f, w, avg


ip_ar = mp.mpf("15.7596") / HARTREE_EV_CODATA2018
adk_cases = []
for (name, ip, z, l, m, F) in [("Ar", ip_ar, 1, 1, 0, mp.mpf("0.0534")),
                               ("Ar", ip_ar, 1, 1, 0, mp.mpf("0.0755")),
                               ("Ar", ip_ar, 1, 1, 1, mp.mpf("0.0534")),
                               ("He+like", mp.mpf(2), 2, 0, 0, mp.mpf("0.5")),
                               ("Z2 l2 m-2", mp.mpf("1.3"), 2, 2, -2, mp.mpf("0.11"))]:
    ip, F = x64(ip), x64(F)
    n, c2, f, w, avg = adk(ip, z, l, m, F)
    adk_cases.append({"label": name, "ip": s(ip), "z": z, "l": l, "m": m, "field": s(F),
                      "n_star": s(n), "c2": s(c2), "f_lm": s(f), "static_rate": s(w),
                      "cycle_factor": s(avg), "cycle_averaged_rate": s(w * avg)})


# ---------------------------------------------------------------- MO-ADK
def q_factor(l, m):
    am = abs(m)
    return (-1) ** am * mp.sqrt((2 * l + 1) * mp.factorial(l + am) / (2 * mp.factorial(l - am)))


def mo_adk(ip, z, terms, F, alpha, beta, gamma):
    kappa = mp.sqrt(2 * ip)
    lmax = max(t[0] for t in terms)
    b = {}
    for m in range(-lmax, lmax + 1):
        acc = mp.mpc(0)
        for (l, mp_, coef) in terms:
            if abs(m) <= l:
                acc += coef * wigner_D_elem(l, m, mp_, alpha, beta, gamma) * q_factor(l, m)
        b[m] = acc
    rate = mp.mpf(0)
    for m, bm in b.items():
        am = abs(m)
        rate += abs(bm) ** 2 / (2**am * mp.factorial(am)) * kappa ** (-(2 * z / kappa - 1)) \
            * (2 * kappa**3 / F) ** (2 * z / kappa - am - 1) * mp.exp(-2 * kappa**3 / (3 * F))
    return b, rate


def exit_euler(field_dir):
    """Euler angles (pi, theta_u, pi - phi_u) of the exit frame for u = -E (our convention)."""
    u = [-x for x in field_dir]
    nrm = mp.sqrt(sum(x * x for x in u))
    u = [x / nrm for x in u]
    theta = mp.acos(u[2])
    phi = mp.atan2(u[1], u[0]) if (u[0] != 0 or u[1] != 0) else mp.mpf(0)
    return mp.pi, theta, mp.pi - phi, u, theta, phi


mo_cases = []
def c64(re, im="0"):
    return mp.mpc(x64(re), x64(im))


orbitals = {
    "sigma_g": (x64("0.5726"), 1, [(0, 0, c64("2.02")), (2, 0, c64("0.78")),
                                    (4, 0, c64("0.04"))]),
    "pi_complex": (x64("0.4"), 1, [(1, 1, c64("1.1", "0.3")), (2, -1, c64("-0.4", "0.9")),
                                    (3, 1, c64("0.2"))]),
    "mixed_parity": (x64("0.51"), 1, [(0, 0, c64("1.6")), (1, 0, c64("-0.9")),
                                       (2, 0, c64("0.3")), (2, 2, c64("0.25"))]),
}
for name, (ip, z, terms) in orbitals.items():
    for (a, bb, g) in [("0.3", "0.9", "-1.4"), ("2.1", "2.7", "0.8")]:
        bm, rate = mo_adk(ip, z, terms, x64("0.06"), x64(a), x64(bb), x64(g))
        mo_cases.append({"orbital": name, "mode": "frame", "alpha": a, "beta": bb, "gamma": g,
                         "field": "0.06", "b": {str(m): c(v) for m, v in bm.items()},
                         "static_rate": s(rate)})
    for fd in [("0.3", "-0.5", "0.8"), ("0", "0", "1"), ("-0.2", "0.1", "-2.0")]:
        fdir = [x64(x) for x in fd]
        a, bb, g, u, theta, phi = exit_euler(fdir)
        bm, rate = mo_adk(ip, z, terms, x64("0.06"), a, bb, g)
        # identity B(0) = sqrt(2 pi) sum_t C_t Y_{l m'}(u)
        b0_ylm = mp.sqrt(2 * mp.pi) * sum(coef * mp.spherharm(l, mp_, theta, phi)
                                          for (l, mp_, coef) in terms)
        mo_cases.append({"orbital": name, "mode": "field", "field_direction": list(fd),
                         "field": "0.06", "b": {str(m): c(v) for m, v in bm.items()},
                         "b0_from_ylm": c(b0_ylm), "static_rate": s(rate)})

orbital_defs = {name: {"ip": s(ip), "charge": z,
                       "terms": [[l, mp_, c(coef)] for (l, mp_, coef) in terms]}
                for name, (ip, z, terms) in orbitals.items()}

out = {
    "generator": "scripts/tunnelling_reference.py",
    "libraries": {"mpmath": mp.__version__, "sympy": sp.__version__,
                  "python": platform.python_version()},
    "precision_digits": mp.mp.dps,
    "constants": {"hartree_ev": "27.211386245988 (CODATA 2018, hard-coded)"},
    "ppt_g": g_values,
    "ppt_g_taylor": g_taylor,
    "gamma": gamma_values,
    "ln_gamma": ln_gamma_values,
    "wigner_small_d": small_d,
    "wigner_big_d": big_d,
    "adk": adk_cases,
    "mo_adk_orbitals": orbital_defs,
    "mo_adk": mo_cases,
}
path = pathlib.Path(__file__).resolve().parent.parent / "tests" / "data" / "tunnelling_reference.json"
path.write_text(json.dumps(out, indent=1, sort_keys=True) + "\n")
print(f"wrote {path}")
