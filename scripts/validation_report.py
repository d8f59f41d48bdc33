#!/usr/bin/env python3
"""Accuracy of the saddle path against the quadrature path: runs the holecast CLI and writes the
tables and figures of docs/validation.md.

Usage: python3 scripts/validation_report.py [--bin PATH] [--quick]

For every target and laser case the script runs

    holecast spectrum TARGET --intensity I --wavelength L --method saddle       (defaults: uniform
                sum, hole at the complex saddle times with its next-order terms, structure in the phase)
    holecast spectrum TARGET ... --method saddle --ionization-structure prefactor
                                  --recombination-structure prefactor        (structure at the saddle)
    holecast spectrum TARGET ... --method saddle --hole-expansion leading    (coupled targets only:
                                                                              hole at the saddle only)
    holecast spectrum TARGET ... --method saddle --hole-times real           (coupled targets only:
                                                                              hole frozen under the barrier)
    holecast spectrum TARGET --intensity I --wavelength L --method quadrature   (0.03 T < τ < 0.97 T,
                                                                    exact momentum integral, real-time hole)
    holecast spectrum TARGET ... --method quadrature --excursion-cycles 0.75 --window-fall-cycles 0.25
                                                                               (short orbits only)

reads the spectrum.json files and computes the measures defined in docs/validation.md. It
rewrites the part of docs/validation.md between the GENERATED markers, docs/validation/results.json
and the figures docs/validation/*.svg. Only NumPy is used (no other HHG code, no plotting library).

The binary defaults to $CARGO_TARGET_DIR/release/holecast, else target/release/holecast (build it
with `cargo build --release` first).
"""
import json
import os
import pathlib
import platform
import subprocess
import sys
import tempfile
import time

import numpy as np

ROOT = pathlib.Path(__file__).resolve().parent.parent
DOC = ROOT / "docs" / "validation.md"
OUT = ROOT / "docs" / "validation"
HARTREE_EV = 27.211386245988  # CODATA 2018 (the project's constant)
AU_AS = 24.188843265857  # atomic unit of time in attoseconds, CODATA 2018

# The control target: physics notes §1.5 (Gaussian s-orbital α = 1 for both steps, Ip = 0.5 a.u.).
CONTROL = {
    "name": "Gaussian model atom (alpha = 1, Ip = 0.5 a.u.)",
    "invented": True,
    "description": "control: the model of physics notes §1.5, where the saddle-point approximation is accurate",
    "channels": [{
        "label": "X",
        "ip_ev": 0.5 * HARTREE_EV,
        "ionization": {"model": "gaussian", "exponent_au": 1.0},
        "recombination": {"model": "gaussian", "exponent_au": 1.0},
    }],
}

DEMO = "tests/data/demo-linear-triatomic-orbital.json"


def collapsed(spec):
    """Diagnostic: every Dyson-orbital term moved to the origin (no two-centre factors)."""
    for c in spec["channels"]:
        for t in c["dyson_orbital"]["terms"]:
            t["centre_bohr"] = [0.0, 0.0, 0.0]
    spec["name"] += " [diagnostic: orbitals collapsed to the centre]"
    return spec


def uncoupled(spec):
    """Diagnostic: the couplings removed (no hole motion)."""
    spec["couplings"] = []
    spec["name"] += " [diagnostic: couplings removed]"
    return spec


def fixed(beta_deg):
    """The molecule held at Euler angles (0, β, 0): its axis at β to the field."""
    def transform(spec):
        spec["orientations"] = {"grid": "fixed", "euler_deg": [0.0, beta_deg, 0.0]}
        spec.pop("alignment", None)
        spec["name"] += f" [axis at {beta_deg:g} deg to the field]"
        return spec
    return transform


DIATOMIC = "channels/demo-coupled-diatomic.json"

# (label, file, transform of the parsed file or None, coupled); None as file is the control target.
TARGETS = [
    ("hydrogen", "channels/hydrogen.json", None, False),
    ("control: Gaussian atom", None, None, False),
    ("demo triatomic (orbital)", DEMO, None, True),
    ("coupled diatomic, parallel", DIATOMIC, fixed(0.0), True),
    ("coupled diatomic, perpendicular", DIATOMIC, fixed(90.0), True),
    ("diagnostic: demo, no couplings", DEMO, uncoupled, False),
]
PREFACTOR = ["--ionization-structure", "prefactor", "--recombination-structure", "prefactor"]
FROZEN = ["--hole-times", "real"]
LEADING = ["--hole-expansion", "leading"]
WAVELENGTHS = [800.0, 1200.0]
INTENSITIES = [1e14, 2e14, 3e14]
SHORT_WINDOW = ["--excursion-cycles", "0.75", "--window-fall-cycles", "0.25"]

TARGET_PLATEAU_RMS = 0.1  # decades
TARGET_CUTOFF = 1.0  # harmonic orders
TARGET_EMISSION = 20.0  # as, where γ ≤ 1
TARGET_SHARE = 0.02  # recombination shares (absolute)


def binary(args):
    if "--bin" in args:
        return pathlib.Path(args[args.index("--bin") + 1])
    base = pathlib.Path(os.environ.get("CARGO_TARGET_DIR", ROOT / "target"))
    return base / "release" / "holecast"


def orders(target_doc, intensity, wavelength):
    """Integer orders from the first above Ip to 1.5 × the Lewenstein cutoff Ip·1.32 + 3.17 Up
    (same grid for both paths; ω[a.u.] = 45.563352529/λ[nm], F² = I/I_au, Up = F²/(4ω²))."""
    omega = 45.563352529 / wavelength
    up = intensity / 3.50944552e16 / (4 * omega ** 2)
    ip = min(c["ip_ev"] for c in target_doc["channels"]) / HARTREE_EV
    first = int(np.floor(ip / omega)) + 1
    last = int(np.ceil(1.5 * (1.32 * ip + 3.17 * up) / omega))
    return f"{first}:{last}:1"


def run(bin_path, target, intensity, wavelength, method, extra, workdir):
    out = pathlib.Path(tempfile.mkdtemp(dir=workdir))
    grid = orders(json.loads(pathlib.Path(target).read_text()), intensity, wavelength)
    cmd = [str(bin_path), "--quiet", "spectrum", str(target), "--intensity", f"{intensity:g}",
           "--wavelength", f"{wavelength:g}", "--orders", grid, "--method", method,
           "--out", str(out)] + extra
    start = time.perf_counter()
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL)
    seconds = time.perf_counter() - start
    doc = json.loads((out / "spectrum.json").read_text())
    return doc, seconds, cmd


def columns(doc):
    pts = doc["points"]
    order = np.array([p["order"] for p in pts])
    intensity = np.array([p["intensity"] for p in pts])
    parallel = np.array([complex(*p["parallel"]) for p in pts])
    return order, intensity, parallel, pts


def short_sum(pts):
    """Saddle path: the short families of every channel pair and half cycle, summed.

    The family columns give |D|² and arg(ê·D); the dipoles are along the lab z axis here (atoms,
    and the β-only grid of the linear molecule, which removes the other components), so
    ê·D = sqrt(|D|²) e^{i arg}."""
    out = []
    for p in pts:
        total = 0j
        for key, value in p.items():
            if "_short_hc" in key and key.endswith("_intensity") and value is not None:
                phase = p[key[: -len("_intensity")] + "_phase_rad"]
                if phase is not None:
                    total += np.sqrt(value) * np.exp(1j * phase)
        out.append(total)
    return np.array(out)


def short_emission_time(pts):
    """Re t_r of the short orbit of half cycle 0 of the reference pair (fs → as), for context."""
    vals = []
    for p in pts:
        v = [p[k] for k in p if k.endswith("_short_hc0_emission_time_fs") and p[k] is not None]
        vals.append(v[0] * 1000.0 if v else np.nan)
    return np.array(vals)


def odd(order):
    return np.abs(order - 2 * np.floor(order / 2) - 1) < 1e-6


def plateau_mask(order, omega_ev, ip_ev, up_ev, lo=1.0, hi=2.8):
    energy = order * omega_ev
    return odd(order) & (energy >= ip_ev + lo * up_ev) & (energy <= ip_ev + hi * up_ev)


def envelope(order, intensity):
    """Upper envelope of log10 I over the odd lines: the largest value within ±4 orders (five odd
    lines), so that the short–long interference dips do not count as a fall."""
    sel = odd(order)
    q, li = order[sel], np.log10(intensity[sel])
    env = np.array([li[np.abs(q - x) <= 4.0 + 1e-9].max() for x in q])
    return q, env


def cutoff(order, intensity, mask):
    """First odd order above the plateau band where the upper envelope of log10 I falls a decade
    below the plateau level, taken as the envelope at the top of the plateau band (a local level:
    molecular plateaus slope), interpolated linearly between neighbouring odd orders."""
    q_all, env = envelope(order, intensity)
    top = order[mask].max()
    level = env[q_all == top][0]
    above = q_all > top
    q, li = q_all[above], env[above]
    prev_q, prev_l = top, env[q_all == top][0]
    for qq, ll in zip(q, li):
        if ll < level - 1.0:
            if prev_l == ll:
                return qq
            return prev_q + (qq - prev_q) * (prev_l - (level - 1.0)) / (prev_l - ll)
        prev_q, prev_l = qq, ll
    return np.nan


def wrap(x, period):
    return (x + period / 2) % period - period / 2


def line_emission_times(order, value, omega_au):
    """(φ_{q+1} − φ_{q−1})/(2ω) at even q between two odd lines (as, modulo T/2)."""
    out_q, out_t = [], []
    for i, q in enumerate(order):
        if not odd(np.array([q]))[0]:
            continue
        j = np.where(np.abs(order - (q + 2)) < 1e-6)[0]
        if len(j) == 0:
            continue
        dphi = np.angle(value[j[0]] / value[i])
        out_q.append(q + 1)
        out_t.append(dphi / (2 * omega_au) * AU_AS)
    return np.array(out_q), np.array(out_t)


def rec_channel(key):
    """Recombination channel of a column prefix such as `X_to_A_short_hc0` (→ `A`)."""
    return key.split("_to_")[1].split("_")[0]


def shares_from(pts, labels, family_filter):
    """Recombination shares |Σ_n ê·D_(n→m)|² / Σ_m' |…|² per point, from pair columns
    (`family_filter` None) or from the family columns whose key contains it (e.g. "_short_hc").
    ê·D is rebuilt as sqrt(|D|²) e^{i arg(ê·D)}: exact for dipoles along the field (atoms,
    molecules on their β grid or held along or across a linear field by symmetry)."""
    out = []
    for p in pts:
        e = {m: 0j for m in labels}
        for key, value in p.items():
            if "_to_" not in key or not key.endswith("_intensity") or value is None:
                continue
            stem = key[: -len("_intensity")]
            is_family = "_hc" in stem
            if family_filter is None and is_family:
                continue
            if family_filter is not None and (not is_family or family_filter not in stem):
                continue
            phase = p.get(stem + "_phase_rad")
            if phase is None:
                continue
            e[rec_channel(stem)] += np.sqrt(value) * np.exp(1j * phase)
        total = sum(abs(v) ** 2 for v in e.values())
        out.append([abs(e[m]) ** 2 / total if total > 0 else np.nan for m in labels])
    return np.array(out)


def analyse(name, saddle, quad, short, omega_ev, ip_ev, up_ev):
    qs, i_s, par_s, pts_s = columns(saddle)
    qq, i_q, par_q, _ = columns(quad)
    qsh, _, par_sh, _ = columns(short)
    assert np.allclose(qs, qq) and np.allclose(qs, qsh)
    omega_au = omega_ev / HARTREE_EV
    period_as = 2 * np.pi / omega_au * AU_AS
    plateau = plateau_mask(qs, omega_ev, ip_ev, up_ev)
    res = {"plateau_orders": [float(x) for x in qs[plateau]]}
    dlog = np.log10(i_s[plateau]) - np.log10(i_q[plateau])
    res["plateau_rms_decades"] = float(np.sqrt(np.mean(dlog ** 2)))
    res["plateau_mean_decades"] = float(np.mean(dlog))
    res["plateau_rms_shape_decades"] = float(np.sqrt(np.mean((dlog - dlog.mean()) ** 2)))
    res["plateau_median_abs_decades"] = float(np.median(np.abs(dlog)))
    res["plateau_worst"] = {"order": float(qs[plateau][np.argmax(np.abs(dlog))]),
                            "decades": float(dlog[np.argmax(np.abs(dlog))])}
    res["cutoff_saddle"] = float(cutoff(qs, i_s, plateau))
    res["cutoff_quadrature"] = float(cutoff(qs, i_q, plateau))
    # Short orbits: harmonics with Ip + Up ≤ Ω ≤ Ip + 2 Up (classically τ_short ≤ 0.47 T and
    # τ_long ≥ 0.81 T, both clear of the short window's falling ramp 0.5–0.75 T).
    band = plateau_mask(qs, omega_ev, ip_ev, up_ev, lo=1.0, hi=2.0)
    ss = short_sum(pts_s)
    ratio = ss[band] / par_sh[band]
    res["short_orders"] = [float(x) for x in qs[band]]
    res["short_modulus_ratio"] = [float(x) for x in np.abs(ratio)]
    res["short_phase_difference_rad"] = [float(x) for x in np.angle(ratio)]
    rel = np.angle(ratio * np.conj(ratio.mean())) if len(ratio) else ratio
    res["short_phase_relative_rms_rad"] = float(np.sqrt(np.mean(rel ** 2))) if len(ratio) else np.nan
    # Emission times modulo T/2 (the period of the odd-line train), on the branch
    # [−T/8, 3T/8) after the crest, which holds the short orbits' returns without a jump.
    half = period_as / 2
    branch = lambda t: (np.asarray(t) + half / 4) % half - half / 4
    te_q, te_s = line_emission_times(qs[band], ss[band], omega_au)
    _, te_quad = line_emission_times(qs[band], par_sh[band], omega_au)
    te_s, te_quad = branch(te_s), branch(te_quad)
    diff = wrap(te_s - te_quad, half)
    res["emission_orders"] = [float(x) for x in te_q]
    res["emission_saddle_as"] = [float(x) for x in te_s]
    res["emission_quadrature_as"] = [float(x) for x in te_quad]
    res["emission_difference_as"] = [float(x) for x in diff]
    res["emission_max_abs_difference_as"] = float(np.max(np.abs(diff))) if len(diff) else np.nan
    # Re t_r of the short orbit at the two odd lines around each even order, averaged, same branch.
    rt = short_emission_time(pts_s)
    res["short_re_t_r_as"] = [
        float(branch(0.5 * (rt[np.isclose(qs, q - 1)][0] + rt[np.isclose(qs, q + 1)][0])))
        for q in te_q]
    labels = [c["label"] for c in saddle["channels"]]
    if len(labels) > 1:
        sh_s = shares_from(pts_s, labels, "_short_hc")[band]
        _, _, _, pts_short = columns(short)
        sh_q = shares_from(pts_short, labels, None)[band]
        diff = np.abs(sh_s - sh_q)
        res["share_labels"] = labels
        res["short_shares_saddle"] = sh_s.tolist()
        res["short_shares_quadrature"] = sh_q.tolist()
        res["short_share_max_abs_difference"] = float(np.nanmax(diff)) if diff.size else np.nan
        _, _, _, pts_q = columns(quad)
        all_s = shares_from(pts_s, labels, None)[plateau]
        all_q = shares_from(pts_q, labels, None)[plateau]
        res["plateau_share_max_abs_difference"] = float(np.nanmax(np.abs(all_s - all_q)))
    res["curves"] = {
        "order": [float(x) for x in qs],
        "log10_saddle": [float(x) for x in np.log10(i_s)],
        "log10_quadrature": [float(x) for x in np.log10(i_q)],
    }
    return res


# --- SVG -------------------------------------------------------------------------------------

# The colours of every holecast figure (src/report/svg/palette.rs): the Okabe–Ito palette
# (M. Okabe and K. Ito, "Color Universal Design", 2008; B. Wong, Nature Methods 8, 441 (2011)),
# readable for colour-blind readers; the dashes of the second curve keep it apart in greyscale.
OKABE_ITO = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9"]
COLOURS = OKABE_ITO


def panel(x0, y0, w, h, series, title, xlabel, ylabel, yrange=None):
    xs = np.concatenate([s[0] for s in series if len(s[0])])
    ys = np.concatenate([s[1] for s in series if len(s[1])])
    ys = ys[np.isfinite(ys)]
    xmin, xmax = float(xs.min()), float(xs.max())
    ymin, ymax = yrange if yrange else (float(ys.min()), float(ys.max()))
    if ymax <= ymin:
        ymax = ymin + 1
    if xmax <= xmin:
        xmin, xmax = xmin - 1, xmax + 1
    sx = lambda x: x0 + 50 + (x - xmin) / (xmax - xmin) * (w - 60)
    sy = lambda y: y0 + h - 35 - (min(max(y, ymin), ymax) - ymin) / (ymax - ymin) * (h - 60)
    g = [f'<rect x="{x0 + 50}" y="{y0 + 25}" width="{w - 60}" height="{h - 60}" fill="none" stroke="#888"/>',
         f'<text x="{x0 + w / 2}" y="{y0 + 16}" font-size="12" text-anchor="middle">{title}</text>',
         f'<text x="{x0 + w / 2}" y="{y0 + h - 5}" font-size="11" text-anchor="middle">{xlabel}</text>',
         f'<text x="{x0 + 12}" y="{y0 + h / 2}" font-size="11" text-anchor="middle" '
         f'transform="rotate(-90 {x0 + 12} {y0 + h / 2})">{ylabel}</text>']
    for t in np.linspace(ymin, ymax, 5):
        g.append(f'<text x="{x0 + 46}" y="{sy(t) + 4:.1f}" font-size="9" text-anchor="end">{t:.3g}</text>')
    for t in np.linspace(xmin, xmax, 5):
        g.append(f'<text x="{sx(t):.1f}" y="{y0 + h - 22}" font-size="9" text-anchor="middle">{t:.0f}</text>')
    for i, (x, y, label, dashed) in enumerate(series):
        pts = " ".join(f"{sx(a):.1f},{sy(b):.1f}" for a, b in zip(x, y) if np.isfinite(b))
        dash = ' stroke-dasharray="4 3"' if dashed else ""
        c = COLOURS[i % len(COLOURS)]
        g.append(f'<polyline points="{pts}" fill="none" stroke="{c}" stroke-width="1.3"{dash}/>')
        if len(x) <= 12:
            g.extend(f'<circle cx="{sx(a):.1f}" cy="{sy(b):.1f}" r="2" fill="{c}"/>'
                     for a, b in zip(x, y) if np.isfinite(b))
        g.append(f'<text x="{x0 + 60}" y="{y0 + 40 + 12 * i}" font-size="10" fill="{c}">{label}</text>')
    return "\n".join(g)


def figure(path, panels, cols=3, w=330, h=240):
    rows = (len(panels) + cols - 1) // cols
    body = []
    for k, p in enumerate(panels):
        body.append(panel((k % cols) * w, (k // cols) * h, w, h, *p))
    path.write_text(f'<svg xmlns="http://www.w3.org/2000/svg" width="{cols * w}" height="{rows * h}" '
                    f'font-family="sans-serif"><rect width="100%" height="100%" fill="white"/>\n'
                    + "\n".join(body) + "\n</svg>\n")


# --- report ---------------------------------------------------------------------------------

def fmt(x, spec):
    return "–" if x is None or (isinstance(x, float) and not np.isfinite(x)) else format(x, spec)


def ok(flag):
    return "✓" if flag else "✗"


def tables(results, versions):
    lines = ["<!-- BEGIN GENERATED by scripts/validation_report.py: do not edit by hand -->", ""]
    lines.append("Produced by `python3 scripts/validation_report.py` with " + ", ".join(
        f"{k} {v}" for k, v in versions.items()) + ".")
    lines.append("")
    lines.append("Saddle path with its defaults (uniform sum, hole at the complex saddle times with its "
                 "next-order terms, Gaussian structure in the phase); quadrature with the exact momentum integral and the hole "
                 "propagated in real time.")
    lines.append("")
    lines.append("### Plateau and cutoff")
    lines.append("")
    lines.append("| target | λ (nm) | I (W/cm²) | γ | plateau orders | rms Δlog₁₀ I (dec) | mean Δ (dec) | "
                 "median \\|Δ\\| (dec) | worst | cutoff saddle | cutoff quadrature | Δ cutoff | "
                 "wall time saddle / quadrature (s) |")
    lines.append("|---|---|---|---|---|---|---|---|---|---|---|---|---|")
    for r in results:
        a = r["analysis"]
        po = a["plateau_orders"]
        dc = a["cutoff_saddle"] - a["cutoff_quadrature"]
        ok_p = ok(a["plateau_rms_decades"] <= TARGET_PLATEAU_RMS)
        ok_c = ok(np.isfinite(dc) and abs(dc) <= TARGET_CUTOFF)
        lines.append(
            f"| {r['target']} | {r['wavelength_nm']:.0f} | {r['intensity_wcm2']:.0e} | {r['keldysh']:.2f} | "
            f"H{po[0]:.0f}–H{po[-1]:.0f} ({len(po)}) | {a['plateau_rms_decades']:.3f} {ok_p} | "
            f"{a['plateau_mean_decades']:+.3f} | {a['plateau_median_abs_decades']:.3f} | "
            f"{a['plateau_worst']['decades']:+.2f} at H{a['plateau_worst']['order']:.0f} | "
            f"{fmt(a['cutoff_saddle'], '.2f')} | {fmt(a['cutoff_quadrature'], '.2f')} | "
            f"{fmt(dc, '+.2f')} {ok_c} | {r['seconds']['saddle']:.2f} / {r['seconds']['quadrature']:.2f} |")
    lines.append("")
    lines.append("### Short orbits: phases and emission times")
    lines.append("")
    lines.append("Emission times are gated (target 20 as) where γ ≤ 1 only.")
    lines.append("")
    lines.append("| target | λ (nm) | I (W/cm²) | γ | orders | \\|short saddle / short quadrature\\| | "
                 "phase difference (rad) | rms relative phase (rad) | emission times saddle (as) | "
                 "max \\|Δt_e\\| (as) |")
    lines.append("|---|---|---|---|---|---|---|---|---|---|")
    for r in results:
        a = r["analysis"]
        so = a["short_orders"]
        if not so:
            lines.append(f"| {r['target']} | {r['wavelength_nm']:.0f} | {r['intensity_wcm2']:.0e} | "
                         f"{r['keldysh']:.2f} | none | – | – | – | – | – |")
            continue
        m = a["short_modulus_ratio"]
        ph = a["short_phase_difference_rad"]
        te = a["emission_saddle_as"]
        gated = r["keldysh"] <= 1.0
        mark = ""
        if te:
            mark = ok(np.isfinite(a["emission_max_abs_difference_as"]) and
                      a["emission_max_abs_difference_as"] <= TARGET_EMISSION) if gated else "(γ > 1)"
        lines.append(
            f"| {r['target']} | {r['wavelength_nm']:.0f} | {r['intensity_wcm2']:.0e} | {r['keldysh']:.2f} | "
            f"H{so[0]:.0f}–H{so[-1]:.0f} ({len(so)}) | {min(m):.2f}–{max(m):.2f} | "
            f"{min(ph):+.2f} … {max(ph):+.2f} | {a['short_phase_relative_rms_rad']:.3f} | "
            f"{fmt(min(te) if te else np.nan, '.0f')}–{fmt(max(te) if te else np.nan, '.0f')} | "
            f"{fmt(a['emission_max_abs_difference_as'], '.1f')} {mark} |")
    lines.append("")
    multi = [r for r in results if "short_share_max_abs_difference" in r["analysis"]]
    if multi:
        lines.append("### Recombination shares (which ionic state each harmonic recombines into)")
        lines.append("")
        lines.append("`recombined_<m>_share` of the spectrum files: the share of the emission along the "
                     "field that comes from recombination into channel m. Short orbits: saddle short "
                     "families against the short-window quadrature (target ≤ 0.02); plateau: all "
                     "families against the full window.")
        lines.append("")
        lines.append("| target | λ (nm) | I (W/cm²) | γ | max \\|Δ share\\| short | max \\|Δ share\\| plateau |")
        lines.append("|---|---|---|---|---|---|")
        for r in multi:
            a = r["analysis"]
            d = a["short_share_max_abs_difference"]
            lines.append(f"| {r['target']} | {r['wavelength_nm']:.0f} | {r['intensity_wcm2']:.0e} | "
                         f"{r['keldysh']:.2f} | {fmt(d, '.3f')} {ok(np.isfinite(d) and d <= TARGET_SHARE)} | "
                         f"{fmt(a['plateau_share_max_abs_difference'], '.3f')} |")
        lines.append("")
    lines.append("### The options side by side")
    lines.append("")
    lines.append("Each cell: plateau rms Δlog₁₀ I (decades) / Δ cutoff (orders) / max \\|Δt_e\\| (as). "
                 "*prefactor*: `--ionization-structure prefactor --recombination-structure prefactor`; "
                 "*hole at leading order*: `--hole-expansion leading`; "
                 "*frozen hole*: `--hole-times real` (coupled targets).")
    lines.append("")
    lines.append("| target | λ (nm) | I (W/cm²) | default | structure in the prefactor | "
                 "hole at leading order | frozen hole |")
    lines.append("|---|---|---|---|---|---|---|")

    def cell(a):
        if a is None:
            return "–"
        dc = a["cutoff_saddle"] - a["cutoff_quadrature"]
        return (f"{a['plateau_rms_decades']:.3f} / {fmt(dc, '+.2f')} / "
                f"{fmt(a['emission_max_abs_difference_as'], '.0f')}")
    for r in results:
        v = r.get("variants", {})
        lines.append(f"| {r['target']} | {r['wavelength_nm']:.0f} | {r['intensity_wcm2']:.0e} | "
                     f"{cell(r['analysis'])} | {cell(v.get('prefactor'))} | {cell(v.get('leading'))} | "
                     f"{cell(v.get('frozen'))} |")
    lines.append("")
    lines.append("Figures: `docs/validation/spectra.svg` (log₁₀ |D|² of both paths), "
                 "`docs/validation/emission_times.svg` (short-orbit emission times of both paths).")
    lines.append("")
    lines.append("<!-- END GENERATED -->")
    return "\n".join(lines)


def main():
    args = sys.argv[1:]
    bin_path = binary(args)
    if not bin_path.exists():
        sys.exit(f"{bin_path} not found: run `cargo build --release` first (or pass --bin)")
    cases = [(w, i) for w in WAVELENGTHS for i in INTENSITIES]
    if "--quick" in args:
        cases = cases[:1]
    OUT.mkdir(parents=True, exist_ok=True)
    results = []
    version = None
    with tempfile.TemporaryDirectory() as work:
        control = pathlib.Path(work) / "control.json"
        control.write_text(json.dumps(CONTROL))
        for label, rel, transform, coupled in TARGETS:
            target = ROOT / rel if rel else control
            if transform:
                target = pathlib.Path(work) / (label.replace(" ", "_").replace(":", "").replace(",", "") + ".json")
                target.write_text(json.dumps(transform(json.loads((ROOT / rel).read_text()))))
            for wavelength, intensity in cases:
                saddle, t_s, _ = run(bin_path, target, intensity, wavelength, "saddle", [], work)
                quad, t_q, _ = run(bin_path, target, intensity, wavelength, "quadrature", [], work)
                short, t_sh, _ = run(bin_path, target, intensity, wavelength, "quadrature",
                                     SHORT_WINDOW, work)
                version = saddle["holecast_version"]
                ip_ev = min(c["ip_ev"] for c in saddle["channels"])
                a = analyse(label, saddle, quad, short, saddle["photon_ev"], ip_ev, saddle["up_ev"])
                variants = {}
                for name, extra in [("prefactor", PREFACTOR)] + (
                        [("leading", LEADING), ("frozen", FROZEN)] if coupled else []):
                    v, _, _ = run(bin_path, target, intensity, wavelength, "saddle", extra, work)
                    variants[name] = analyse(label, v, quad, short, saddle["photon_ev"], ip_ev,
                                             saddle["up_ev"])
                    variants[name].pop("curves", None)
                results.append({
                    "target": label, "file": rel or "(control, written by the script)",
                    "wavelength_nm": wavelength, "intensity_wcm2": intensity,
                    "keldysh": saddle["keldysh"], "up_ev": saddle["up_ev"], "ip_ev": ip_ev,
                    "quadrature_steps_per_cycle": quad["approximations"]["steps_per_cycle"],
                    "seconds": {"saddle": t_s, "quadrature": t_q, "quadrature_short": t_sh},
                    "analysis": a,
                    "variants": variants,
                })
                print(f"{label:32s} {wavelength:6.0f} nm {intensity:.0e}: plateau rms "
                      f"{a['plateau_rms_decades']:.3f} dec (prefactor "
                      f"{variants['prefactor']['plateau_rms_decades']:.3f}), cutoff "
                      f"{a['cutoff_saddle']:.2f} / {a['cutoff_quadrature']:.2f}, emission max |Δ| "
                      f"{a['emission_max_abs_difference_as']:.1f} as, share "
                      f"{a.get('short_share_max_abs_difference', float('nan')):.3f}", flush=True)
    commit = subprocess.run(["git", "-C", str(ROOT), "rev-parse", "--short", "HEAD"],
                            capture_output=True, text=True).stdout.strip()
    versions = {"holecast": f"{version} (commit {commit})", "Python": platform.python_version(),
                "NumPy": np.__version__}
    (OUT / "results.json").write_text(json.dumps({"versions": versions, "results": results},
                                                 indent=1) + "\n")
    spectra, times = [], []
    for r in results:
        c = r["analysis"]["curves"]
        title = f"{r['target']}, {r['wavelength_nm']:.0f} nm, {r['intensity_wcm2']:.0e}"
        o = np.array(c["order"])
        sel = odd(o)
        spectra.append(([(o[sel], np.array(c["log10_saddle"])[sel], "saddle (uniform)", False),
                         (o[sel], np.array(c["log10_quadrature"])[sel], "quadrature", True)],
                        title, "harmonic order", "log10 |D|^2"))
        a = r["analysis"]
        if a["emission_orders"]:
            eo = np.array(a["emission_orders"])
            times.append(([(eo, np.array(a["emission_saddle_as"]), "saddle, short families", False),
                           (eo, np.array(a["emission_quadrature_as"]), "quadrature, τ window", True),
                           (eo, np.array(a["short_re_t_r_as"]), "Re t_r (short, hc0)", False)],
                          title, "order (between two odd lines)", "emission time (as)"))
    figure(OUT / "spectra.svg", spectra)
    if times:
        figure(OUT / "emission_times.svg", times)
    text = DOC.read_text()
    begin = text.index("<!-- BEGIN GENERATED")
    end = text.index("<!-- END GENERATED -->") + len("<!-- END GENERATED -->")
    DOC.write_text(text[:begin] + tables(results, versions) + text[end:])
    print(f"wrote {DOC.relative_to(ROOT)}, {OUT.relative_to(ROOT)}/results.json and figures")


if __name__ == "__main__":
    main()
