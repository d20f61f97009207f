#!/usr/bin/env bash
# hypre_bench.sh - floodtrace's pressure stage beside hypre on the same system.
#
# For each size, writes the benchmark pattern of scripts/perf.sh with
# `floodtrace synth` (a 10 km square of log-normal permeability, ln k
# standard deviation 1.5, ranges 1500 x 600 at azimuth 30, seed 3; four
# rate injectors, five BHP producers), then
#   - scripts/hypre/dump times floodtrace's pressure stage (pressure.Solve:
#     assembly, preconditioner set-up, conjugate gradients to 1e-10,
#     fluxes; fastest of REPEATS), once on both cores and once on one
#     (GOMAXPROCS=1, as hypre runs here), and writes the assembled system;
#   - scripts/hypre/hypre_tpfa.c (built with mpicc against libhypre-dev,
#     run as an MPI singleton) builds the same matrix in hypre and solves
#     it by conjugate gradients to 1e-10 with PFMG and with BoomerAMG
#     (fastest of REPEATS each);
#   - the whole run, `floodtrace run case.yaml --pictures minimal` (the
#     run of scripts/perf.sh; fastest of REPEATS by wall time), with the
#     pressure stage of that fresh process read from its stage lines;
# and prints one row per size: the times, the iterations, the ratio of
# floodtrace's pressure stage to hypre's set-up + solve (PFMG and
# BoomerAMG; below 1 means floodtrace is faster), the same on one core
# beside PFMG (ft1/pfmg: the fairer ratio on a machine shared with other
# work, where a second core is not always there), and the ratio of the
# whole run to hypre PFMG's set-up + solve. hypre's matrix assembly is
# shown apart. A benchmark, not a test: CI does not run it.
#
# Needs: go, mpicc, libhypre-dev (apt-get install libhypre-dev).
# Usage: scripts/hypre_bench.sh [-r REPEATS] [-s SIZES] [-k DIR]
#   -r REPEATS  runs per program; the fastest is reported (default 3)
#   -s SIZES    cells per side, comma separated (default 100,300,1000)
#   -k DIR      keep cases and systems in DIR (default: a temporary folder)
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
	work=$(mktemp -d "${TMPDIR:-/tmp}/floodtrace-hypre.XXXXXX")
	trap 'rm -rf "$work"' EXIT
fi
inc=$(pkg-config --cflags hypre 2>/dev/null || echo -I/usr/include/hypre)
if ! command -v mpicc >/dev/null; then
	echo "hypre_bench.sh: mpicc not found (apt-get install libhypre-dev)" >&2
	exit 1
fi
(cd "$root" && CGO_ENABLED=0 go build -o "$work/floodtrace" ./cmd/floodtrace && go build -o "$work/dump" ./scripts/hypre/dump)
# shellcheck disable=SC2086
mpicc -O2 $inc -o "$work/hypre_tpfa" "$root/scripts/hypre/hypre_tpfa.c" -lHYPRE -lm
# Open MPI refuses root without these; harmless otherwise.
export OMPI_ALLOW_RUN_AS_ROOT=1 OMPI_ALLOW_RUN_AS_ROOT_CONFIRM=1

echo "machine: $(nproc) cores, $(grep -m1 "model name" /proc/cpuinfo | sed "s/.*: //"); $(go version | awk '{print $3}'); load average before: $(cut -d' ' -f1-3 /proc/loadavg)"
printf '%-10s | %8s %8s %4s %4s | %8s %8s %8s %4s | %8s %8s %8s %4s | %8s %8s %8s | %8s %8s %8s %8s\n' grid floodtr ft-1core its pre \
	pfmg-asm pfmg-set pfmg-sol its amg-asm amg-set amg-sol its "ft/pfmg" "ft1/pfmg" "ft/amg" run run-pres "cpu" "run/pfmg"
IFS=, read -ra list <<<"$sizes"
for n in "${list[@]}"; do
	dir=$work/c${n}x$n
	mkdir -p "$dir"
	dx=$(awk -v n="$n" 'BEGIN { printf "%.15g", 10000 / n }')
	if [[ ! -f $dir/maps/perm_1.asc ]]; then
		"$work/floodtrace" synth --out "$dir/maps" --force --nx "$n" --ny "$n" --dx "$dx" --range 1500 \
			--range-minor 600 --azimuth 30 --mean-perm 100 --log-std 1.5 --seed 3 >/dev/null
	fi
	cat >"$dir/case.yaml" <<EOC
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
EOC
	read -r _ ft ftits pre < <("$work/dump" -r "$repeats" "$dir/case.yaml" "$dir/system.bin")
	read -r _ ft1 _ _ < <(GOMAXPROCS=1 "$work/dump" -r "$repeats" "$dir/case.yaml" "$dir/system.bin")
	# Fastest of the repeats by set-up + solve, per method.
	for _ in $(seq "$repeats"); do "$work/hypre_tpfa" "$dir/system.bin"; done >"$dir/hypre.txt"
	best() { awk -v m="$1" '$1 == m { t = $3 + $4; if (!n++ || t < bt) { bt = t; line = $0 } } END { print line }' "$dir/hypre.txt"; }
	read -r _ pa ps pv pits < <(best pfmg)
	read -r _ aa as av aits < <(best boomeramg)
	# The whole run in a fresh process, fastest of the repeats by wall
	# time; its pressure stage from the stage lines, its CPU time
	# (user + system) from /usr/bin/time when there is one.
	rwall="" rpres="" rcpu=""
	for _ in $(seq "$repeats"); do
		start=$(date +%s.%N)
		if [[ -x /usr/bin/time ]]; then
			/usr/bin/time -f '%U %S' -o "$dir/time.txt" "$work/floodtrace" run "$dir/case.yaml" --out "$dir/out" \
				--force --pictures minimal >/dev/null 2>"$dir/stderr.txt"
		else
			"$work/floodtrace" run "$dir/case.yaml" --out "$dir/out" --force --pictures minimal >/dev/null 2>"$dir/stderr.txt"
			echo "0 0" >"$dir/time.txt"
		fi
		end=$(date +%s.%N)
		wall=$(awk -v a="$start" -v b="$end" 'BEGIN { printf "%.3f", b - a }')
		if [[ -z $rwall ]] || awk -v a="$wall" -v b="$rwall" 'BEGIN { exit !(a < b) }'; then
			rwall=$wall
			rpres=$(awk '/^ *[0-9.]+s  / { t = $1; sub(/s$/, "", t)
				if ($2 == "pressure:") p0 = t; else if ($2 == "streamlines:") s0 = t }
				END { printf "%.3f", s0 - p0 }' "$dir/stderr.txt")
			rcpu=$(awk '{ printf "%.2f", $1 + $2 }' "$dir/time.txt")
		fi
	done
	rm -rf "$dir/out"
	awk -v g="${n}x$n" -v ft="$ft" -v ft1="$ft1" -v fi="$ftits" -v pre="$pre" -v pa="$pa" -v ps="$ps" -v pv="$pv" -v pi="$pits" \
		-v aa="$aa" -v as="$as" -v av="$av" -v ai="$aits" -v rw="$rwall" -v rp="$rpres" -v rc="$rcpu" 'BEGIN {
		printf "%-10s | %8.3f %8.3f %4d %4s | %8.3f %8.3f %8.3f %4d | %8.3f %8.3f %8.3f %4d | %8.2f %8.2f %8.2f | %8.2f %8.3f %8.2f %8.1f\n",
			g, ft, ft1, fi, pre, pa, ps, pv, pi, aa, as, av, ai, ft / (ps + pv), ft1 / (ps + pv), ft / (as + av), rw, rp, rc, rw / (ps + pv) }'
	rm -f "$dir/system.bin"
done
echo "load average after: $(cut -d' ' -f1-3 /proc/loadavg)"
echo "seconds; floodtr = floodtrace's whole pressure stage (assembly included; fastest of the repeats in one process, so warm),"
echo "ft-1core the same with GOMAXPROCS=1 (hypre runs on one core);"
echo "ft/pfmg, ft1/pfmg and ft/amg divide them by hypre's set-up + solve (assembly excluded); run = the whole fresh run"
echo "(floodtrace run --pictures minimal, wall), run-pres its pressure stage, cpu its user + system time;"
echo "run/pfmg divides the whole run by hypre PFMG's set-up + solve"
