#!/bin/sh
# Extract the per-city daily max/min temperature files from vega-datasets' data/weather.csv.
#
#   mkdir /tmp/vds && cd /tmp/vds && npm pack vega-datasets@3.2.1 && tar xzf vega-datasets-3.2.1.tgz
#   sh testdata/noaa/extract.sh /tmp/vds/package/data/weather.csv
#
# Input columns: location,date,precipitation,temp_max,temp_min,wind,weather.
# Output columns: date,temp_max,temp_min — the fields are copied as text, unchanged.
set -eu
src=${1:?usage: extract.sh path/to/weather.csv}
dir=$(cd "$(dirname "$0")" && pwd)
want=27219f1ca8dbd94c9b6f4b9f4f52ab2f1eb33dfdcf719cd9fc6481ed50b74549
got=$(sha256sum "$src" | cut -d' ' -f1)
if [ "$got" != "$want" ]; then
	echo "extract.sh: $src has SHA-256 $got, expected $want" >&2
	exit 1
fi
head -n 1 "$src" | tr -d '\r' | grep -qx 'location,date,precipitation,temp_max,temp_min,wind,weather' || {
	echo "extract.sh: unexpected header in $src" >&2
	exit 1
}
for pair in "Seattle:seattle" "New York:new_york"; do
	loc=${pair%%:*}
	out=$dir/${pair#*:}.csv
	awk -F, -v loc="$loc" 'BEGIN { OFS = ","; print "date,temp_max,temp_min" }
		NR > 1 { sub(/\r$/, "") } NR > 1 && $1 == loc { print $2, $4, $5 }' "$src" >"$out"
	echo "$out: $(($(wc -l <"$out") - 1)) rows"
done
