#!/usr/bin/env bash
# jobs.sh: wall time of `lidscope run --jobs 1` against `--jobs 2` (and
# more, BENCH_JOBS) on the synthetic 1° 40-year world (package fixtures,
# invented data), with the read floor (bench/readonly) beside them. See
# bench/README.md. Each measurement is repeated BENCH_REPEAT times (default
# 3) from the page cache; the medians and their ratios are printed and
# written to bench/out/jobs.txt.
#
# Settings: BENCH_JOBS (default "1 2"), BENCH_RESOLUTION (default 1),
# BENCH_YEARS (default 40), BENCH_WORK (default $TMPDIR/lidscope-bench; the
# world is generated there once and reused), BENCH_REPEAT.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root"
jobs=${BENCH_JOBS:-"1 2"}
res=${BENCH_RESOLUTION:-1}
years=${BENCH_YEARS:-40}
repeat=${BENCH_REPEAT:-3}
work=${BENCH_WORK:-${TMPDIR:-/tmp}/lidscope-bench}
out=bench/out
mkdir -p "$out/bin" "$work"
go build -o "$out/bin/lidscope" ./cmd/lidscope
go build -o "$out/bin/gen" ./bench/gen
go build -o "$out/bin/readonly" ./bench/readonly
data="$work/world-${res}deg-${years}y"
if [ ! -f "$data/study.yaml" ]; then
  "$out/bin/gen" -out "$data" -resolution "$res" -years "$years" -years-per-file 10 >&2
fi
results=$(mktemp -d "${TMPDIR:-/tmp}/lidscope-jobs-XXXXXX")
trap 'rm -rf "$results"' EXIT
warm() { cat $(find "$data" -name '*.nc') >/dev/null; }
# wall COMMAND...: seconds of one run
wall() {
  local t0 t1
  t0=$(date +%s.%N)
  "$@" >/dev/null 2>"$results/err" || { cat "$results/err" >&2; exit 1; }
  t1=$(date +%s.%N)
  awk -v a="$t0" -v b="$t1" 'BEGIN { printf "%.2f", b - a }'
}
median() { tr ' ' '\n' | sort -g | awk '{ v[NR] = $1 } END { print v[int((NR + 1) / 2)] }'; }
declare -A med
rows=()
warm
ts=""
for i in $(seq "$repeat"); do ts="$ts $(wall "$out/bin/readonly" "$data")"; done
med[read]=$(echo $ts | median)
rows+=("read floor   $(echo $ts)  median ${med[read]}")
for j in $jobs; do
  ts=""
  for i in $(seq "$repeat"); do
    warm
    ts="$ts $(wall "$out/bin/lidscope" run --quiet --no-plots --force --jobs "$j" --out "$results/run-$j" "$data/study.yaml")"
  done
  med[$j]=$(echo $ts | median)
  rows+=("--jobs $j    $(echo $ts)  median ${med[$j]}")
done
{
  echo "lidscope run --jobs, $(date -u +%Y-%m-%dT%H:%M:%SZ), commit $(git rev-parse --short HEAD 2>/dev/null || echo unknown)"
  echo "machine: $(nproc) CPUs; world: ${res}° ${years} years monthly (synthetic), files in the page cache"
  echo "wall time (s) of $repeat runs each:"
  for r in "${rows[@]}"; do echo "  $r"; done
  for j in $jobs; do
    awk -v a="${med[1]:-0}" -v b="${med[$j]}" -v r="${med[read]}" -v j="$j" 'BEGIN { if (a > 0) printf "  --jobs %s: %.2f× the wall time of --jobs 1 (speed-up %.2f); %.1f× the read floor\n", j, b / a, a / b, b / r }'
  done
} | tee "$out/jobs.txt"
