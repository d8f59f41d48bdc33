#!/usr/bin/env python3
"""Speed of the demo fit (issue 12): runs `holecast fit` on examples/fits/demo-alignment.fit.json
from one start and prints the wall time, the residual evaluations, evaluations per second and
the trajectory stages solved. Run after `cargo build --release`; the breakdown per evaluation
comes from `cargo bench --bench fit` (residuals with the stage cached or solved afresh, one
Jacobian). Standard library only."""
import json
import os
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
BIN = os.path.join(ROOT, "target", "release", "holecast")
FIT = os.path.join(ROOT, "examples", "fits", "demo-alignment.fit.json")


def main():
    with tempfile.TemporaryDirectory() as d:
        t0 = time.perf_counter()
        subprocess.run([BIN, "--quiet", "fit", FIT, "--out", d], check=True)
        wall = time.perf_counter() - t0
        r = json.load(open(os.path.join(d, "fit.json")))
    print(f"demo fit (6 parameters, 3 datasets x 12 lines, 16 beta points, one start): "
          f"{wall:.2f} s wall, {r['evaluations']} residual evaluations "
          f"({r['evaluations'] / wall:.1f} per second, each = 3 spectra), "
          f"{r['trajectory_stages_solved']} trajectory stages solved, "
          f"converged {r['converged']} ({r['termination']}), reduced chi2 {r['reduced_chi2']:.3f}; "
          f"cores: {os.cpu_count()}, load average {os.getloadavg()[0]:.1f}")


if __name__ == "__main__":
    sys.exit(main())
