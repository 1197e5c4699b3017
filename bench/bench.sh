#!/usr/bin/env bash
# Times `wxstress simulate` for 10^5 and 10^6 paths and prints simulated
# station-days per second and peak memory; with --peer, also runs the NumPy
# reference implementation (../shared/bench/peer_numpy.py) on the same data,
# model form and path counts, and prints the ratio.
#
# Usage: bench/bench.sh [--peer] [CSV]      (default CSV: the demo station)
# Needs: Go; GNU time (/usr/bin/time, Debian package "time"); for --peer,
# /usr/bin/python3 with Debian's python3-numpy and python3-scipy.
set -euo pipefail
cd "$(dirname "$0")/.."
peer=0
if [ "${1:-}" = "--peer" ]; then peer=1; shift; fi
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
csv=${1:-}
if [ -z "$csv" ]; then
  csv="$work/kestrel_bay_daily.csv"
  cp demo/kestrel_bay_daily.csv "$csv"
fi
command -v /usr/bin/time >/dev/null || { echo "bench: needs GNU time: apt-get install -y time" >&2; exit 1; }
go build -o "$work/wxstress" ./cmd/wxstress
# The model form of the NumPy peer: linear trend, one harmonic, AR(1),
# monthly sigma, Student-t shocks; the year after the data end, started from
# the last observed anomaly.
"$work/wxstress" fit --temps "$csv" --trend linear --harmonics 1 --ar 1 --shocks t --out "$work/model.json" >/dev/null
echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ //'), $(go version | cut -d' ' -f3)"
for n in 100000 1000000; do
  /usr/bin/time -f "%e %M" -o "$work/time" "$work/wxstress" simulate --model "$work/model.json" --paths "$n" \
    --seed 1 --start conditional --period year --format json >"$work/out.json"
  read -r wall kb <"$work/time"
  days=$(python3 -c "import json,sys; print(json.load(open('$work/out.json'))['manifest']['simulated_days'])" 2>/dev/null || echo 0)
  python3 - "$n" "$wall" "$kb" "$days" <<'PY'
import sys
n, wall, kb, days = int(sys.argv[1]), float(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4])
print(f"wxstress: {n:>8} paths x {days} days: {wall:6.2f} s wall, {n*days/wall/1e6:7.1f} million station-days/s, peak {kb/1024:6.0f} MiB")
PY
  if [ "$peer" = 1 ]; then
    /usr/bin/time -f "%e %M" -o "$work/ptime" /usr/bin/python3 ../shared/bench/peer_numpy.py --in "$csv" --paths "$n" --seed 1 \
      >/dev/null 2>"$work/perr"
    read -r pwall pkb <"$work/ptime"
    python3 - "$n" "$pwall" "$pkb" "$wall" <<'PY'
import sys
n, pwall, pkb, wall = int(sys.argv[1]), float(sys.argv[2]), int(sys.argv[3]), float(sys.argv[4])
print(f"numpy   : {n:>8} paths: {pwall:6.2f} s wall, peak {pkb/1024:6.0f} MiB  ->  wxstress is {pwall/wall:.1f}x faster")
PY
  fi
done
