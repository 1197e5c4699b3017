#!/usr/bin/env bash
# Times wxstress on the job of issue-style comparisons and prints, in one
# sitting: simulated station-days per second and peak memory for 10^5 and
# 10^6 one-year paths, the ratio to the NumPy reference (--peer), the
# scaling from one core to all, what a demand model and the per-path file
# add, and the fit times. Wall times are the best of --repeat runs (default
# 3), since a shared machine's timings wander.
#
# Usage: bench/bench.sh [--peer] [--repeat N] [CSV]   (default CSV: the demo station)
# Needs: Go; GNU time (/usr/bin/time, Debian package "time"); for --peer,
# /usr/bin/python3 with Debian's python3-numpy and python3-scipy.
set -euo pipefail
cd "$(dirname "$0")/.."
peer=0 repeat=3
while [ $# -gt 0 ]; do
  case "$1" in
    --peer) peer=1; shift ;;
    --repeat) repeat=$2; shift 2 ;;
    *) break ;;
  esac
done
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
csv=${1:-}
if [ -z "$csv" ]; then
  csv="$work/kestrel_bay_daily.csv"
  cp demo/kestrel_bay_daily.csv "$csv"
fi
command -v /usr/bin/time >/dev/null || { echo "bench: needs GNU time: apt-get install -y time" >&2; exit 1; }
if [ "$peer" = 1 ]; then
  # The NumPy reference lives beside the repository (../shared/bench), not in it.
  [ -f ../shared/bench/peer_numpy.py ] || { echo "bench: --peer needs ../shared/bench/peer_numpy.py beside the repository" >&2; exit 1; }
  /usr/bin/python3 -c "import numpy, scipy" 2>/dev/null || { echo "bench: --peer needs /usr/bin/python3 with numpy and scipy: apt-get install -y python3-numpy python3-scipy" >&2; exit 1; }
fi
go build -o "$work/wxstress" ./cmd/wxstress
wx="$work/wxstress"

# best WALL_FILE CMD...: runs CMD $repeat times (stdout to $work/out), keeps
# the fastest wall time and its peak memory in WALL_FILE as "seconds KiB".
best() {
  local file=$1; shift
  local b="" bk=""
  for _ in $(seq "$repeat"); do
    /usr/bin/time -f "%e %M" -o "$work/t" "$@" >"$work/out" 2>"$work/err" || { cat "$work/err" >&2; exit 1; }
    read -r w k <"$work/t"
    if [ -z "$b" ] || python3 -c "import sys; sys.exit(0 if $w < $b else 1)"; then b=$w bk=$k; fi
  done
  echo "$b $bk" >"$file"
}

echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ //'), $(go version | cut -d' ' -f3); best of $repeat runs"

# Fits: the model's default choices (what a user gets), and the NumPy
# reference's form (linear trend, one harmonic, AR(1), monthly sigma,
# Student-t shocks, no slow part).
best "$work/fit" "$wx" fit --temps "$csv" --out "$work/default.json" --force
read -r fitwall _ <"$work/fit"
"$wx" fit --temps "$csv" --trend linear --harmonics 1 --ar 1 --slow none --shocks t --out "$work/peer.json" --force >/dev/null 2>&1
slow=$(python3 -c "import json; m=json.load(open('$work/default.json')); print('with the slow part' if m.get('slow') else 'without a slow part')")
echo "fit of the record with every choice and diagnostic: ${fitwall} s (default model: $(python3 -c "import json; m=json.load(open('$work/default.json')); print(m['shocks']['family'], 'shocks, AR(%d),' % len(m['ar']['phi']))") $slow)"

row() { # label paths wallfile days
  python3 - "$@" <<'PY'
import sys
label, n, f, days = sys.argv[1], int(sys.argv[2]), sys.argv[3], int(sys.argv[4])
wall, kb = open(f).read().split()
wall, kb = float(wall), int(kb)
print(f"{label:<24} {n:>8} paths x {days} days: {wall:5.2f} s, {n*days/wall/1e6:5.1f} M station-days/s, peak {kb/1024:4.0f} MiB")
PY
}

sim=(simulate --seed 1 --start conditional --period year --format json)
for n in 100000 1000000; do
  for form in peer default; do
    best "$work/w_${form}_$n" "$wx" "${sim[@]}" --model "$work/$form.json" --paths "$n"
    days=$(python3 -c "import json; print(json.load(open('$work/out'))['manifest']['simulated_days'])")
    row "wxstress, $form model" "$n" "$work/w_${form}_$n" "$days"
  done
  if [ "$peer" = 1 ]; then
    best "$work/p_$n" /usr/bin/python3 ../shared/bench/peer_numpy.py --in "$csv" --paths "$n" --seed 1
    row "numpy reference" "$n" "$work/p_$n" 365
    python3 - "$work/p_$n" "$work/w_peer_$n" "$work/w_default_$n" <<'PY'
import sys
p, a, b = (float(open(f).read().split()[0]) for f in sys.argv[1:])
print(f"  -> wxstress is {p/a:.1f}x the NumPy reference with its model form, {p/b:.1f}x with the default model")
PY
  fi
done

# Scaling: the default model, 10^6 paths, one worker against all.
best "$work/w1" "$wx" "${sim[@]}" --model "$work/default.json" --paths 1000000 --workers 1
python3 - "$work/w1" "$work/w_default_1000000" "$(nproc)" <<'PY'
import sys
one, alln, cores = float(open(sys.argv[1]).read().split()[0]), float(open(sys.argv[2]).read().split()[0]), sys.argv[3]
print(f"scaling: 1 worker {one:.2f} s, {cores} workers {alln:.2f} s: {one/alln:.2f}x")
PY

# Demand: the demo's demand model on the default periods, against the same
# run without it.
"$wx" fit-demand --temps "$csv" --demand demo/lanternfield_demand.csv --load-unit GJ/day --out "$work/demand.json" --force >/dev/null 2>&1
best "$work/nd" "$wx" simulate --model "$work/default.json" --paths 1000000 --seed 1 --format json
best "$work/wd" "$wx" simulate --model "$work/default.json" --demand "$work/demand.json" --paths 1000000 --seed 1 --format json
python3 - "$work/nd" "$work/wd" <<'PY'
import sys
a, b = (float(open(f).read().split()[0]) for f in sys.argv[1:])
print(f"demand: default periods, 10^6 paths: {a:.2f} s without, {b:.2f} s with a demand model (+{100*(b/a-1):.0f} %)")
PY

# The per-path file: the same run with --out, with and without --per-path.
best "$work/o1" "$wx" simulate --model "$work/default.json" --paths 1000000 --seed 1 --out "$work/o1d" --force
best "$work/o2" "$wx" simulate --model "$work/default.json" --paths 1000000 --seed 1 --out "$work/o2d" --per-path --force
python3 - "$work/o1" "$work/o2" "$work/o2d/paths.csv" <<'PY'
import os, sys
a, b = (float(open(f).read().split()[0]) for f in sys.argv[1:3])
mb = os.path.getsize(sys.argv[3]) / 1e6
print(f"per-path file: {mb:.0f} MB in {b-a:.2f} s more ({mb/max(b-a, 1e-9):.0f} MB/s)")
PY
