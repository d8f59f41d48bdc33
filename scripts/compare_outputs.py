#!/usr/bin/env python3
"""Compares the rows of two holecast output files (JSON or CSV) number by number.

Usage: python3 scripts/compare_outputs.py OLD NEW [--rtol R]

Written for the change of file layout (issue 9): an older file may hold complex numbers as
[re, im] pairs in JSON; they are compared with the NAME_re / NAME_im columns of the newer one.
Rows are matched in order; every key of the old row must be in the new row. Numbers must agree
within the relative tolerance R (default 0: identical doubles). Prints the largest difference
and exits non-zero on a mismatch. Standard library only.
"""
import argparse
import csv
import json
import sys


def rows(path):
    if path.endswith(".csv"):
        with open(path, newline="") as f:
            out = []
            for r in csv.DictReader(f):
                out.append({k: (None if v == "" else v) for k, v in r.items()})
            return out
    doc = json.load(open(path))
    for key in ("points", "orbits"):
        if key in doc:
            return doc[key]
    raise SystemExit(f"{path}: no rows (points or orbits)")


def flat(row):
    out = {}
    for k, v in row.items():
        if isinstance(v, list) and len(v) == 2:
            out[f"{k}_re"], out[f"{k}_im"] = v
        else:
            out[k] = v
    return out


def number(v):
    if v is None or isinstance(v, bool):
        return None
    if isinstance(v, (int, float)):
        return float(v)
    try:
        return float(v)
    except ValueError:
        return None


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("old")
    parser.add_argument("new")
    parser.add_argument("--rtol", type=float, default=0.0)
    opts = parser.parse_args()
    args, rtol = [opts.old, opts.new], opts.rtol
    old, new = rows(args[0]), rows(args[1])
    if len(old) != len(new):
        raise SystemExit(f"row counts differ: {len(old)} vs {len(new)}")
    worst, where, values, bad = 0.0, None, 0, 0
    columns = set()
    for i, (a, b) in enumerate(zip(old, new)):
        a, b = flat(a), flat(b)
        for k, va in a.items():
            if k not in b:
                raise SystemExit(f"row {i}: column {k} missing in {args[1]}")
            vb = b[k]
            xa, xb = number(va), number(vb)
            if xa is None or xb is None:
                # Missing values, text and booleans: the same text (true/True alike).
                if str(va).lower() != str(vb).lower():
                    bad += 1
                    print(f"row {i} {k}: {va!r} vs {vb!r}")
                continue
            values += 1
            d = abs(xa - xb) / max(abs(xa), abs(xb), 1e-300) if xa != xb else 0.0
            if d > worst:
                worst, where = d, (i, k, va, vb)
            if d > rtol:
                bad += 1
                columns.add(k)
    print(f"{len(old)} rows, {values} numbers compared; largest relative difference {worst:.3g}"
          + (f" at row {where[0]} {where[1]}: {where[2]!r} vs {where[3]!r}" if where else ""))
    if bad:
        raise SystemExit(f"{bad} values differ beyond rtol = {rtol}, in columns {sorted(columns)}")


if __name__ == "__main__":
    main()
