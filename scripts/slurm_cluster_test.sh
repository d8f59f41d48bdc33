#!/usr/bin/env bash
# A real one-node Slurm cluster for the scan's array and merge jobs (issue 13).
#
# On Debian, as root: installs slurm-wlm and munge from the distribution's packages, writes a
# minimal slurm.conf for this machine (its hostname, CPUs and memory), creates a munge key,
# starts munged, slurmctld and slurmd in the background (no systemd), writes the batch scripts
# of a small scan with `holecast scan-slurm`, submits the array job and the merge job with the
# sbatch lines it prints, waits for them, and compares the merged scan.npz, scan.csv and
# scan.svg byte for byte with a single-process run. Then checks that scan.npz loads in NumPy
# (from the package registry, in a virtual environment it creates) with the documented names
# and shapes. Stops the daemons it started by their process ids and removes its temporary
# folder. A few minutes at most (most of it the package installation).
#
# Usage: scripts/slurm_cluster_test.sh [path/to/holecast]   (default target/release/holecast,
# built if missing)
set -euo pipefail
cd "$(dirname "$0")/.."
repo=$(pwd)

if [ "$(id -u)" != 0 ] || [ ! -f /etc/debian_version ]; then
  echo "slurm_cluster_test: needs root on Debian (apt-get); not run" >&2
  exit 1
fi

bin=${1:-$repo/target/release/holecast}
if [ ! -x "$bin" ]; then
  cargo build --release --locked
fi
bin=$(cd "$(dirname "$bin")" && pwd)/$(basename "$bin")

tmp=$(mktemp -d /tmp/holecast-slurm.XXXXXX)
pids=()
policy_created=0
cleanup() {
  set +e
  # Daemons we started, newest first, by process id.
  for ((i = ${#pids[@]} - 1; i >= 0; i--)); do
    kill "${pids[$i]}" 2>/dev/null
  done
  for pid in "${pids[@]}"; do
    for _ in $(seq 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -9 "$pid" 2>/dev/null
    wait "$pid" 2>/dev/null
  done
  if [ "$policy_created" = 1 ]; then rm -f /usr/sbin/policy-rc.d; fi
  rm -rf "$tmp"
}
trap cleanup EXIT

step() { echo "== $*"; }

step "installing slurm-wlm, munge, python3-venv (apt-get)"
# Keep the packages' own services from starting during the installation (we start ours).
if [ ! -e /usr/sbin/policy-rc.d ]; then
  printf '#!/bin/sh\nexit 101\n' > /usr/sbin/policy-rc.d
  chmod +x /usr/sbin/policy-rc.d
  policy_created=1
fi
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq
apt-get install -y -qq --no-install-recommends slurm-wlm munge python3-venv > "$tmp/apt.log" 2>&1 \
  || { tail -n 30 "$tmp/apt.log"; exit 1; }
if [ "$policy_created" = 1 ]; then rm -f /usr/sbin/policy-rc.d; policy_created=0; fi

host=$(hostname -s)
cpus=$(nproc)
mem_mb=$(awk '/MemTotal/ {print int($2 / 1024 * 0.8)}' /proc/meminfo)
mkdir -p "$tmp"/{state,spool,munge,run}
chmod 700 "$tmp/munge"

step "munge key and munged"
dd if=/dev/urandom of="$tmp/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$tmp/munge/munge.key"
munged --foreground --force --key-file="$tmp/munge/munge.key" \
  --socket="$tmp/munge/munge.socket" --pid-file="$tmp/munge/munged.pid" \
  --log-file="$tmp/munge/munged.log" --seed-file="$tmp/munge/munged.seed" &
pids+=($!)
for _ in $(seq 50); do [ -S "$tmp/munge/munge.socket" ] && break; sleep 0.1; done
munge --socket="$tmp/munge/munge.socket" -n | unmunge --socket="$tmp/munge/munge.socket" > /dev/null

step "slurm.conf for $host ($cpus CPUs, $mem_mb MB)"
cat > "$tmp/slurm.conf" <<CONF
ClusterName=holecast-test
SlurmctldHost=$host
AuthType=auth/munge
AuthInfo=socket=$tmp/munge/munge.socket
CredType=cred/munge
SlurmUser=root
SlurmdUser=root
SlurmctldPort=16917
SlurmdPort=16918
StateSaveLocation=$tmp/state
SlurmdSpoolDir=$tmp/spool
SlurmctldPidFile=$tmp/run/slurmctld.pid
SlurmdPidFile=$tmp/run/slurmd.pid
SlurmctldLogFile=$tmp/slurmctld.log
SlurmdLogFile=$tmp/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SchedulerType=sched/backfill
ReturnToService=2
MpiDefault=none
NodeName=$host CPUs=$cpus RealMemory=$mem_mb State=UNKNOWN
PartitionName=test Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF

export SLURM_CONF=$tmp/slurm.conf

step "slurmctld and slurmd"
slurmctld -D -f "$SLURM_CONF" > "$tmp/slurmctld.out" 2>&1 &
pids+=($!)
slurmd -D -f "$SLURM_CONF" > "$tmp/slurmd.out" 2>&1 &
pids+=($!)
ready=0
for _ in $(seq 120); do
  state=$(sinfo -h -n "$host" -o %T 2>/dev/null | head -n 1 || true)
  case "$state" in
    idle*|mix*|alloc*) ready=1; break ;;
  esac
  sleep 0.5
done
if [ "$ready" != 1 ]; then
  echo "the node did not come up (state: ${state:-none})"
  tail -n 20 "$tmp/slurmctld.log" "$tmp/slurmd.log" "$tmp/slurmctld.out" "$tmp/slurmd.out" 2>/dev/null
  exit 1
fi
sinfo

step "a small scan: batch scripts, array job, merge job"
cat > "$tmp/scan.json" <<JSON
{
  "description": "cluster test: 4 intensities x 2 ionization potentials",
  "target": "$repo/tests/data/scan/flat-atom.json",
  "laser": { "colours": [ { "wavelength_nm": 800, "intensity_wcm2": 1.5e14 } ] },
  "axes": [
    { "parameter": "intensity", "range": { "from": 1e14, "to": 2e14, "count": 4 } },
    { "parameter": "target.channels[X].ip_ev", "values": [14, 16] }
  ],
  "grid": { "unit": "order", "from": 11, "to": 31, "step": 2 }
}
JSON
submit=$("$bin" --quiet scan-slurm --plan "$tmp/scan.json" --shards 3 --cpus-per-task 1 \
  --time 00:10:00 --mem-mb 300 --job-name holecast-ci --out "$tmp/cluster")
echo "$submit"
( cd "$tmp" && eval "$submit" )
deadline=$((SECONDS + 240))
while [ -n "$(squeue -h -o %i 2>/dev/null)" ]; do
  if [ "$SECONDS" -gt "$deadline" ]; then
    echo "jobs still queued after 240 s:"; squeue; exit 1
  fi
  sleep 1
done
ls "$tmp/cluster" "$tmp/cluster/shards"
for f in "$tmp"/cluster/logs/*; do
  if [ -s "$f" ]; then echo "--- $f"; cat "$f"; fi
done

step "single-process run and byte comparison"
"$bin" --quiet scan --plan "$tmp/scan.json" --out "$tmp/single"
for f in scan.npz scan.csv scan.svg; do
  cmp "$tmp/single/$f" "$tmp/cluster/$f"
  echo "identical: $f ($(stat -c %s "$tmp/cluster/$f") bytes)"
done

step "scan.npz in NumPy"
python3 -m venv "$tmp/venv"
"$tmp/venv/bin/pip" install -q numpy
"$tmp/venv/bin/python" - "$tmp/cluster/scan.npz" <<'PY'
import sys
import numpy as np
z = np.load(sys.argv[1])
print("numpy", np.__version__)
grid = 11  # orders 11, 13, ..., 31
shapes = {
    "yield": (4, 2, grid), "power": (4, 2, grid), "phase_rad": (4, 2, grid),
    "row_status": (4, 2, grid), "energy_ev_at_point": (4, 2, grid),
    "pair_X_to_X_yield": (4, 2, grid),
    "family_X_to_X_short_hc0_yield": (4, 2, grid),
    "family_X_to_X_short_hc0_emission_time_fs": (4, 2, grid),
    "family_X_to_X_long_hc1_status": (4, 2, grid),
    "point_status": (4, 2), "point_reason": (4, 2), "point_warnings": (4, 2),
    "omega_ev": (4, 2), "order": (grid,), "axis0_values": (4,), "axis1_values": (2,),
    "axis0_unit": (), "axis1_unit": (), "axis0_parameter": (), "axis0_dimension": (),
    "dims": (3,), "grid_unit": (), "scan_hash": (), "holecast_version": (),
    "definition_json": (),
}
for name, shape in shapes.items():
    assert name in z.files, f"missing {name}"
    assert z[name].shape == shape, f"{name}: {z[name].shape} != {shape}"
assert z["yield"].dtype == np.float64
assert list(z["dims"]) == ["intensity", "target_channels_X_ip_ev", "order"], z["dims"]
assert str(z["axis0_unit"]) == "W/cm2" and str(z["axis1_unit"]) == "eV"
assert np.allclose(z["axis0_values"], [1e14, 4e14 / 3, 5e14 / 3, 2e14])
assert np.array_equal(z["order"], np.arange(11, 32, 2))
assert (z["point_status"] == "computed").all()
assert np.isfinite(z["yield"]).all() and (z["yield"] > 0).all()
print(f"scan.npz: {len(z.files)} arrays, names and shapes as documented")
PY
step "slurm cluster test passed"
