#!/usr/bin/env bash
# perf.sh - time the whole floodtrace pipeline on synthetic cases.
#
# Builds floodtrace (static, CGO_ENABLED=0, as the README builds it),
# generates the benchmark pattern with `floodtrace synth` at 100x100, 300x300 and 1000x1000 cells (a 10 km square of log-normal
# permeability, ln k standard deviation 1.5, ranges 1500 x 600 at azimuth
# 30, seed 3; four rate injectors and five BHP producers on a regular
# pattern; 5000 streamlines, fixed streamlines, one snapshot), runs
#
#   floodtrace run case.yaml --out DIR --pictures minimal
#
# (read, solve, trace, transport, write, one picture) and prints a table of
# the stage times (from the stage lines the run prints on stderr), the
# wall time, the peak resident memory (/usr/bin/time -v) and the pressure
# iterations (summary.json). Then it times the 300x300 case with 1000,
# 5000 and 20000 streamlines.
#
# Usage: scripts/perf.sh [-r REPEATS] [-s SIZES] [-k DIR]
#   -r REPEATS  runs per case; the fastest is reported (default 3)
#   -s SIZES    cells per side, comma separated (default 100,300,1000)
#   -k DIR      keep the cases and outputs in DIR (default: a temporary
#               folder, removed at the end)
# Run it on a quiet machine: the load average is printed before and after.
set -euo pipefail

repeats=3
sizes=100,300,1000
keep=""
usage() { sed -n '2,/^set -euo/p' "$0" | sed '$d; s/^# \{0,1\}//'; }
while getopts "r:s:k:h" opt; do
	case $opt in
	r) repeats=$OPTARG ;;
	s) sizes=$OPTARG ;;
	k) keep=$OPTARG ;;
	h)
		usage
		exit 0
		;;
	*)
		usage >&2
		exit 2
		;;
	esac
done

root=$(cd "$(dirname "$0")/.." && pwd)
if [[ -n $keep ]]; then
	work=$keep
	mkdir -p "$work"
else
	work=$(mktemp -d "${TMPDIR:-/tmp}/floodtrace-perf.XXXXXX")
	trap 'rm -rf "$work"' EXIT
fi
bin=$work/floodtrace
(cd "$root" && CGO_ENABLED=0 go build -o "$bin" ./cmd/floodtrace)

timer=""
if [[ -x /usr/bin/time ]] && /usr/bin/time -v true >/dev/null 2>&1; then
	timer=/usr/bin/time
fi

cpu=$(grep -m1 'model name' /proc/cpuinfo 2>/dev/null | sed 's/.*: //' || echo unknown)
echo "machine: $(nproc) cores, $cpu; $(go version | awk '{print $3}')"
echo "load average before: $(cut -d' ' -f1-3 /proc/loadavg)"
[[ -z $timer ]] && echo "(no GNU /usr/bin/time: peak memory not measured)"

# makecase N: writes $work/cNxN/case.yaml and its maps.
makecase() {
	local n=$1 dir=$work/c${1}x$1
	local dx
	dx=$(awk -v n="$n" 'BEGIN { printf "%.15g", 10000 / n }')
	mkdir -p "$dir"
	if [[ ! -f $dir/maps/perm_1.asc ]]; then
		"$bin" synth --out "$dir/maps" --force --nx "$n" --ny "$n" --dx "$dx" --range 1500 --range-minor 600 \
			--azimuth 30 --mean-perm 100 --log-std 1.5 --seed 3 >/dev/null
	fi
	cat >"$dir/case.yaml" <<EOF
title: Benchmark pattern ${n}x$n
units: field
rock: {perm: maps/perm_1.asc, porosity: maps/poro_1.asc, thickness: 20}
fluids: {water_viscosity: 0.5, oil_viscosity: 2.0, initial_water_saturation: 0.2}
relperm:
  corey: {swc: 0.2, sor: 0.25, krw_max: 0.3, kro_max: 0.85, nw: 2.5, no: 2}
wells:
  - {name: I1, type: injector, x: 2500, y: 2500, rate: 5000}
  - {name: I2, type: injector, x: 7500, y: 2500, rate: 5000}
  - {name: I3, type: injector, x: 2500, y: 7500, rate: 5000}
  - {name: I4, type: injector, x: 7500, y: 7500, rate: 5000}
  - {name: P1, type: producer, x: 500, y: 500, bhp: 500}
  - {name: P2, type: producer, x: 9500, y: 500, bhp: 500}
  - {name: P3, type: producer, x: 500, y: 9500, bhp: 500}
  - {name: P4, type: producer, x: 9500, y: 9500, bhp: 500}
  - {name: P5, type: producer, x: 5000, y: 5000, bhp: 500}
run: {end: 7300, report_every: 60, snapshots: [7300], streamlines: 5000}
EOF
}

# runcase N LINES: runs the case `repeats` times and prints one table row
# for the fastest run.
runcase() {
	local n=$1 lines=$2 dir=$work/c${1}x$1
	local best="" bestwall=""
	for _ in $(seq "$repeats"); do
		local log=$dir/stderr.txt tlog=$dir/time.txt
		local start end wall
		start=$(date +%s.%N)
		if [[ -n $timer ]]; then
			$timer -v -o "$tlog" "$bin" run "$dir/case.yaml" --out "$dir/out" --force --pictures minimal \
				--streamlines "$lines" >/dev/null 2>"$log"
		else
			"$bin" run "$dir/case.yaml" --out "$dir/out" --force --pictures minimal --streamlines "$lines" >/dev/null 2>"$log"
			: >"$tlog"
		fi
		end=$(date +%s.%N)
		wall=$(awk -v a="$start" -v b="$end" 'BEGIN { printf "%.3f", b - a }')
		if [[ -z $bestwall ]] || awk -v a="$wall" -v b="$bestwall" 'BEGIN { exit !(a < b) }'; then
			bestwall=$wall
			best=$(awk -v n="$n" -v lines="$lines" -v wall="$wall" '
				FILENAME ~ /stderr/ && /^ *[0-9.]+s  / {
					t = $1; sub(/s$/, "", t)
					if ($2 == "case") read = t
					else if ($2 == "pressure:") p0 = t
					else if ($2 == "streamlines:") s0 = t
					else if ($2 == "transport:") { t0 = t; nl = $5 }
					else if ($2 == "writing") w0 = t
					else if ($2 == "drawing") d0 = t
					else if ($2 == "done") done = t
				}
				FILENAME ~ /time/ && /Maximum resident set size/ { rss = $NF / 1024 }
				END {
					if (d0 == "") d0 = done
					printf "%-10s %6s %6s %6.2f %8.2f %6.2f %9.2f %6.2f %7.2f %7.2f %7s",
						n "x" n, lines, nl, read, s0 - p0, t0 - s0, w0 - t0, d0 - w0, done - d0, wall,
						(rss > 0 ? sprintf("%.0f", rss) : "n/a")
				}' "$log" "$tlog")
			local its
			its=$(grep -A3 '"pressure_solver"' "$dir/out/summary.json" | awk -F'[:,]' '/"iterations"/ { gsub(/ /, "", $2); print $2 }')
			best="$best $(printf '%5s' "$its")"
		fi
	done
	echo "$best"
}

header() {
	printf "%-10s %6s %6s %6s %8s %6s %9s %6s %7s %7s %7s %5s\n" \
		grid lines traced read pressure trace transport write picture total "RSS MB" iters
}

echo
echo "Stage times in seconds (fastest of $repeats runs; total is the wall time of the process):"
header
IFS=, read -r -a list <<<"$sizes"
for n in "${list[@]}"; do
	makecase "$n"
	runcase "$n" 5000
done

echo
echo "Cost against streamlines, 300x300:"
header
makecase 300
for lines in 1000 5000 20000; do
	runcase 300 "$lines"
done
echo
echo "load average after: $(cut -d' ' -f1-3 /proc/loadavg)"
