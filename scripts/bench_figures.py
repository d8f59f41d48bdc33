#!/usr/bin/env python3
"""Runs the criterion benchmarks and prints the figures the issues ask for.

Usage: python3 scripts/bench_figures.py [--no-run] [bench ...]
  --no-run   only read the last results under target/criterion
"""
import json
import pathlib
import subprocess
import sys

ROOT = pathlib.Path(__file__).resolve().parent.parent
CRITERION = ROOT / "target" / "criterion"


def mean_seconds(bench_id):
    # criterion writes group/function for benchmark groups and group_function for ids with '/'.
    path = CRITERION / bench_id / "new" / "estimates.json"
    if not path.exists():
        path = CRITERION / bench_id.replace("/", "_") / "new" / "estimates.json"
    if not path.exists():
        return None
    est = json.loads(path.read_text())
    return est["mean"]["point_estimate"] * 1e-9, est["mean"]["standard_error"] * 1e-9


def show(label, bench_id, per=None, unit=None):
    m = mean_seconds(bench_id)
    if m is None:
        print(f"{label:58s} (no result: run the bench)")
        return
    t, err = m
    line = f"{label:58s} {t * 1e3:10.4f} ms ± {err * 1e3:.4f}"
    if per:
        line += f"   → {per / t:,.0f} {unit}/s"
    print(line)


def main():
    args = [a for a in sys.argv[1:] if not a.startswith("--")]
    if "--no-run" not in sys.argv:
        benches = args or ["orbits", "multichannel"]
        for b in benches:
            subprocess.run(["cargo", "bench", "--bench", b, "--", "--noplot"], cwd=ROOT, check=True)
    print("\nholecast benchmark figures (mean ± standard error of criterion's estimate)\n")
    show("trajectory stage: 3001 energies × 4 families", "orbits/continuation_12004_saddles", 12004, "saddle solutions")
    show("family discovery (classical seeds, once per field)", "orbits/family_discovery")
    show("plateau spectrum H11–H41, Δq = 0.1, with group delays", "spectrum/plateau_301_energies_with_group_delay")
    show("plateau spectrum H11–H41, Δq = 0.1, no group delays", "spectrum/plateau_301_energies_no_group_delay")
    print()
    print("three channels (9 pairs), H9–H34 at Δq = 0.1, 192 orientations, 2 threads available:")
    for name in ["with_group_delay", "no_group_delay"]:
        show(f"  trajectory stage ({name.replace('_', ' ')})", f"multichannel/trajectory_stage_9_pairs_{name}")
        show(f"  orientation loop ({name.replace('_', ' ')})", f"multichannel/assemble_192_orientations_{name}")
        show(f"  whole spectrum ({name.replace('_', ' ')})", f"multichannel/whole_spectrum_{name}")


if __name__ == "__main__":
    main()
