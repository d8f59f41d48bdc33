#!/usr/bin/env python3
"""Coverage of the fit's standard errors on the demo (issue 12 check).

For each noise seed: `holecast synthetic` writes the three invented datasets of
examples/fits/demo-alignment.fit.json at the generating values TRUTH (5 % relative Gaussian
noise), `holecast fit` fits them from the target file's values, and the script counts the
parameters whose fitted value lies within one standard error of the truth. For Gaussian errors
the expected fraction is 0.683; with 6 parameters and N seeds its binomial spread is
sqrt(0.683*0.317/(6N)) (parameters of one fit are correlated, so the true spread is somewhat
larger).

Usage: python3 scripts/fit_coverage.py [N_SEEDS] [OUT.jsonl]   (after cargo build --release)
Standard library only. Each finished seed is appended to OUT.jsonl (default
/tmp/fit_coverage.jsonl), so a partial run can be read.
"""
import json
import math
import os
import subprocess
import sys
import tempfile

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
BIN = os.path.join(ROOT, "target", "release", "holecast")
FIT = os.path.join(ROOT, "examples", "fits", "demo-alignment.fit.json")
TRUTH = {
    "target.couplings[0].dipole_au[2]": 1.5,
    "target.couplings[1].dipole_au[2]": 0.45,
    "target.channels[X].ionization.coefficients[1].c": 0.7,
    "target.channels[A].ionization.coefficients[0].c": 1.3,
    "target.channels[B].ionization.coefficients[0].c": 0.6,
    "target.channels[B].ionization.coefficients[1].c": 1.2,
}


def main():
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 100
    out = sys.argv[2] if len(sys.argv) > 2 else "/tmp/fit_coverage.jsonl"
    spec = json.load(open(FIT))
    spec["target"] = os.path.join(ROOT, "channels", "demo-linear-triatomic.json")
    inside = total = 0
    undetermined = 0
    for seed in range(1, n + 1):
        with tempfile.TemporaryDirectory() as d:
            fit = os.path.join(d, "fit.json")
            json.dump(spec, open(fit, "w"))
            sets = sum((["--set", f"{k}={v}"] for k, v in TRUTH.items()), [])
            subprocess.run([BIN, "--quiet", "synthetic", fit, "--out", d, "--seed", str(seed),
                            "--relative-noise", "0.05"] + sets, check=True)
            res = os.path.join(d, "res")
            subprocess.run([BIN, "--quiet", "fit", fit, "--out", res], check=True)
            r = json.load(open(os.path.join(res, "fit.json")))
        row = {"seed": seed, "reduced_chi2": r["reduced_chi2"], "converged": r["converged"],
               "evaluations": r["evaluations"], "pulls": {}}
        for p in r["parameters"]:
            t = TRUTH[p["name"]]
            if p["std_error"] is None:
                undetermined += 1
                row["pulls"][p["name"]] = None
                continue
            pull = (p["value"] - t) / p["std_error"]
            row["pulls"][p["name"]] = pull
            total += 1
            inside += abs(pull) <= 1.0
        with open(out, "a") as f:
            f.write(json.dumps(row) + "\n")
        frac = inside / total if total else float("nan")
        print(f"seed {seed}: reduced chi2 {r['reduced_chi2']:.3f}, converged {r['converged']}; "
              f"running fraction within 1 sigma {frac:.3f} ({inside}/{total})", flush=True)
    frac = inside / total
    spread = math.sqrt(0.683 * 0.317 / total)
    print(f"fraction of parameters within 1 standard error: {frac:.3f} "
          f"({inside}/{total}; {undetermined} undetermined); expected 0.683 ± {spread:.3f} "
          f"(binomial)")


if __name__ == "__main__":
    main()
