#!/usr/bin/env python3
"""Runs the criterion benchmarks and prints the figures the issues ask for.

Usage: python3 scripts/bench_figures.py [--no-run] [--commands[=BINARY]] [bench ...]
  --no-run     only read the last results under target/criterion ($CARGO_TARGET_DIR/criterion
               when that variable is set)
  --commands   also time whole output commands of the release binary (default
               target/release/holecast; build it first): wall time and peak memory (max RSS from
               /usr/bin/time -v), minimum of 5 runs each
"""
import json
import os
import pathlib
import subprocess
import sys

ROOT = pathlib.Path(__file__).resolve().parent.parent
CRITERION = pathlib.Path(os.environ.get("CARGO_TARGET_DIR", ROOT / "target")) / "criterion"


def mean_seconds(bench_id):
    # criterion stores `c.bench_function("a/b")` under a_b and group "a", function "b" under a/b.
    path = CRITERION / bench_id.replace("/", "_") / "new" / "estimates.json"
    if not path.exists():
        path = CRITERION / bench_id / "new" / "estimates.json"
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
        benches = args or ["orbits", "multichannel", "threads", "quadrature", "output"]
        for b in benches:
            subprocess.run(["cargo", "bench", "--features", "benchmarks", "--bench", b, "--", "--noplot"],
                           cwd=ROOT, check=True)
    print("\nholecast benchmark figures (mean ± standard error of criterion's estimate)\n")
    show("trajectory stage: 3001 energies × 4 families", "orbits/continuation_12004_saddles", 12004, "saddle solutions")
    show("family discovery (classical seeds, once per field)", "orbits/family_discovery")
    for tag in ("prefactor", "phase"):
        show(f"plateau spectrum H11–H41, Δq = 0.1, with group delays, structure in {tag}",
             f"spectrum/plateau_301_energies_with_group_delay_structure_{tag}")
        show(f"plateau spectrum H11–H41, Δq = 0.1, no group delays, structure in {tag}",
             f"spectrum/plateau_301_energies_no_group_delay_structure_{tag}")
    print()
    print("three channels (9 pairs), H9–H34 at Δq = 0.1, 192 orientations, 2 threads available:")
    for name in ["with_group_delay", "no_group_delay"]:
        show(f"  trajectory stage ({name.replace('_', ' ')})", f"multichannel/trajectory_stage_9_pairs_{name}")
        show(f"  orientation loop ({name.replace('_', ' ')})", f"multichannel/assemble_192_orientations_{name}")
        show(f"  whole spectrum ({name.replace('_', ' ')})", f"multichannel/whole_spectrum_{name}")
    show("bent triatomic (2 channels, structure in the phase), 192 orientations, whole spectrum",
         "multichannel/whole_spectrum_bent_triatomic_192_orientations")
    print("\nthread scaling of the whole spectrum, default settings (benches/threads.rs):")
    for name in ["linear_triatomic", "bent_triatomic"]:
        one = f"threads/whole_spectrum_{name}_1_threads"
        two = f"threads/whole_spectrum_{name}_2_threads"
        show(f"  {name.replace('_', ' ')}, 1 thread", one)
        show(f"  {name.replace('_', ' ')}, 2 threads", two)
        a, b = mean_seconds(one), mean_seconds(two)
        if a is not None and b is not None:
            print(f"  {'→ speed-up with 2 threads':56s} {a[0] / b[0]:10.2f}")
    print("\nsaddle path against quadrature, same work (benches/quadrature.rs)\n")
    pairs = [
        ("hydrogen, 800 nm, H11–H41 (31 lines)", "quadrature/saddle_hydrogen_800nm_H11_H41",
         [("quadrature, 64 steps/cycle (coarsest resolving step)",
           "quadrature/quadrature_hydrogen_800nm_H11_H41_64_steps"),
          ("quadrature, automatic step (192/cycle)",
           "quadrature/quadrature_hydrogen_800nm_H11_H41_auto_steps")]),
        ("demo triatomic (orbital), 16 orientations, 9 pairs", "quadrature/saddle_demo_800nm_H11_H41",
         [("quadrature, 64 steps/cycle", "quadrature/quadrature_demo_800nm_H11_H41_64_steps")]),
    ]
    for label, saddle_id, quads in pairs:
        show(f"saddle: {label}", saddle_id)
        s = mean_seconds(saddle_id)
        for qlabel, qid in quads:
            show(f"  {qlabel}", qid)
            q = mean_seconds(qid)
            if s is not None and q is not None:
                print(f"  {'→ time(quadrature) / time(saddle)':56s} {q[0] / s[0]:10.2f}")
    output_figures()
    for a in sys.argv[1:]:
        if a.startswith("--commands"):
            binary = a.split("=", 1)[1] if "=" in a else str(ROOT / "target" / "release" / "holecast")
            time_commands(binary)


def rows_of(bench_id):
    """The row count a bench declared as its throughput (criterion's benchmark.json)."""
    path = CRITERION / bench_id / "new" / "benchmark.json"
    if not path.exists():
        return None
    t = json.loads(path.read_text()).get("throughput") or {}
    return t.get("Elements")


OUTPUT_COMMANDS = [
    # The case of issue 10: 100,610 orbit rows.
    ("orbits H11–H41 Δq = 0.001, JSON to stdout", ["orbits", "--ip", "15.76", "--intensity", "1.5e14",
      "--wavelength", "800", "--orders", "11:41:0.001", "--format", "json", "--quiet"]),
    ("orbits H11–H41 Δq = 0.001, CSV to stdout", ["orbits", "--ip", "15.76", "--intensity", "1.5e14",
      "--wavelength", "800", "--orders", "11:41:0.001", "--format", "csv", "--quiet"]),
]


def time_commands(binary, runs=5):
    """Minimum wall time and peak memory of each output command (stdout to /dev/null)."""
    import re
    import time
    print(f"\nwhole commands ({binary}; minimum of {runs} runs; max RSS from /usr/bin/time -v)\n")
    for label, args in OUTPUT_COMMANDS:
        walls, rss = [], []
        for _ in range(runs):
            t0 = time.perf_counter()
            r = subprocess.run(["/usr/bin/time", "-v", binary, *args], stdout=subprocess.DEVNULL,
                               stderr=subprocess.PIPE, text=True, check=True)
            walls.append(time.perf_counter() - t0)
            m = re.search(r"Maximum resident set size \(kbytes\): (\d+)", r.stderr)
            if m:
                rss.append(int(m.group(1)) / 1024)
        peak = f"{min(rss):8.1f} MB" if rss else "   (no /usr/bin/time)"
        print(f"{label:58s} {min(walls):8.3f} s   peak {peak}")


def output_figures():
    print("\noutput writers (benches/output.rs; rows streamed into a byte counter, no file system)\n")
    for label, bench_id in [
        ("orbit rows built, not written (H11–H41, Δq = 0.001)", "output/orbits_rows_only"),
        ("orbit rows as JSON", "output/orbits_json"),
        ("orbit rows as CSV", "output/orbits_csv"),
        ("demo spectrum rows, JSON + CSV (H9–H39, Δq = 0.1)", "output/spectrum_json_csv_demo_301_rows"),
        ("demo hole rows, JSON + CSV", "output/holes_json_csv_demo"),
    ]:
        show(label, bench_id, rows_of(bench_id), "rows")
    print("  whole command with files and peak memory: /usr/bin/time -v target/release/holecast orbits "
          "channels/hydrogen.json --intensity 2e14 --wavelength 800 --orders 11:41:0.001 --format json")


if __name__ == "__main__":
    main()
