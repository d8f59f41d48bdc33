#!/usr/bin/env bash
# Speed of `holecast scan` against single spectra (issue 13): the 41-point intensity scan of
# scans/intensity-demo.json (demo linear triatomic, 800 nm, 1e14..2e14 W/cm2, default grid)
# against `holecast spectrum` at the same 41 intensities (each with its own default grid), run
# one after the other as a shell loop would. Target: scan time <= 41 x single / 1.8.
# Usage: scripts/scan_speed.sh [path/to/holecast]   (after cargo build --release)
set -euo pipefail
cd "$(dirname "$0")/.."
bin=${1:-target/release/holecast}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
now() { date +%s.%N; }
echo "threads: ${RAYON_NUM_THREADS:-all $(nproc) cores}"
t0=$(now)
for k in $(seq 0 40); do
  i=$(python3 -c "print(1e14 + 1e14 * $k / 40)")
  "$bin" --quiet spectrum channels/demo-linear-triatomic.json --intensity "$i" \
    --wavelength 800 --out "$tmp/single-$k" > /dev/null 2>&1
done
t1=$(now)
"$bin" --quiet scan --plan scans/intensity-demo.json --out "$tmp/scan" > /dev/null
t2=$(now)
python3 - "$t0" "$t1" "$t2" <<'PY'
import sys
t0, t1, t2 = map(float, sys.argv[1:])
single, scan = t1 - t0, t2 - t1
print(f"41 single spectra: {single:.2f} s ({single / 41:.3f} s each)")
print(f"41-point scan:     {scan:.2f} s")
print(f"ratio (41 x single) / scan = {single / scan:.2f}  (target >= 1.8)")
PY
