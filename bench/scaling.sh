#!/usr/bin/env bash
# Scaling benchmark of `lidscope run` (see bench/README.md): builds lidscope
# and the two helpers, generates the synthetic world of package fixtures
# (invented data) at 1° for 10 and 40 years of monthly means (NetCDF-4,
# deflate, 10 years per file), and runs under /usr/bin/time -v
#
#   1. the baseline: bench/readonly reads every slab the run reads, and
#   2. lidscope run on the world's study,
#
# then prints a table of wall time, CPU time and peak RSS and writes it to
# bench/out/ (gitignored). Peak RSS must not grow with the record length.
#
# Settings (environment):
#   BENCH_YEARS       record lengths, default "10 40"
#   BENCH_RESOLUTION  grid spacing in degrees, default 1
#   BENCH_PER_FILE    years per file, default 10
#   BENCH_WORK        where the worlds and results go, default $TMPDIR/lidscope-bench
#                     (1° × 40 years is about 1 GB); worlds are reused when present
#   BENCH_KEEP=1      keep the results folders
#
# Not run by CI or `make test`: it takes minutes and its numbers depend on
# the machine.
set -euo pipefail

root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root"
years=${BENCH_YEARS:-"10 40"}
res=${BENCH_RESOLUTION:-1}
perfile=${BENCH_PER_FILE:-10}
work=${BENCH_WORK:-${TMPDIR:-/tmp}/lidscope-bench}
out=bench/out
mkdir -p "$out/bin" "$work"

# GNU time (Debian package time) for wall time and peak RSS.
if [ ! -x /usr/bin/time ]; then
  ./scripts/apt-need time
fi

echo "building lidscope, bench/gen and bench/readonly" >&2
go build -o "$out/bin/lidscope" ./cmd/lidscope
go build -o "$out/bin/gen" ./bench/gen
go build -o "$out/bin/readonly" ./bench/readonly

# field NAME FILE: the value of a /usr/bin/time -v line.
field() { sed -n "s/^[[:space:]]*$1: //p" "$2" | head -n 1; }

# seconds H:MM:SS.ss | M:SS.ss → seconds
seconds() { awk -F: '{ s = 0; for (i = 1; i <= NF; i++) s = s * 60 + $i; printf "%.2f", s }' <<<"$1"; }

# measure LABEL WHAT LOG COMMAND...: run under /usr/bin/time -v, print a table row.
measure() {
  local label=$1 what=$2 log=$3
  shift 3
  if ! /usr/bin/time -v -o "$log.time" "$@" >"$log.out" 2>"$log.err"; then
    echo "FAILED: $* (see $log.err and $log.time)" >&2
    cat "$log.err" >&2
    exit 1
  fi
  local wall user sys rss
  wall=$(seconds "$(field 'Elapsed (wall clock) time (h:mm:ss or m:ss)' "$log.time")")
  user=$(field 'User time (seconds)' "$log.time")
  sys=$(field 'System time (seconds)' "$log.time")
  rss=$(field 'Maximum resident set size (kbytes)' "$log.time")
  printf '%-7s %6s %9s  %-5s %9s %9s %14.1f\n' "$label" "$steps" "$size" "$what" "$wall" "$(awk -v u="$user" -v s="$sys" 'BEGIN { printf "%.2f", u + s }')" "$(awk -v k="$rss" 'BEGIN { print k / 1024 }')"
}

stamp=$(date -u +%Y%m%dT%H%M%SZ)
table="$out/scaling-$stamp.txt"
{
  echo "lidscope scaling benchmark, $(date -u +%Y-%m-%dT%H:%M:%SZ)"
  echo "commit $(git rev-parse --short HEAD 2>/dev/null || echo unknown)$(git diff --quiet 2>/dev/null || echo ' (+ uncommitted changes)'), $(go version | cut -d' ' -f3), netCDF-C $(nc-config --version 2>/dev/null | cut -d' ' -f2 || echo '?')"
  echo "machine: $(nproc) CPUs, $(awk '/MemTotal/ { printf "%.1f GB", $2 / 1048576 }' /proc/meminfo) RAM, $(uname -sr)"
  echo "input: synthetic world (package fixtures, invented data), ${res}° global monthly, NetCDF-4 deflate level 4, ${perfile} year(s) per file"
  echo "files read from the page cache (warmed before each measurement)"
  echo
} >"$table"

rows=()
for y in $years; do
  data="$work/world-${res}deg-${y}y"
  if [ ! -f "$data/study.yaml" ]; then
    echo "generating $data" >&2
    "$out/bin/gen" -out "$data" -resolution "$res" -years "$y" -years-per-file "$perfile" >&2
  fi
  size=$(du -sm "$data" | cut -f1)
  steps=$((y * 12))
  # warm the page cache so both measurements read from memory
  cat $(find "$data" -name '*.nc') >/dev/null
  row=$(measure "${y}y" read "$out/read-${y}y" "$out/bin/readonly" "$data") || exit 1
  rows+=("$row")
  results="$work/results-${res}deg-${y}y"
  cat $(find "$data" -name '*.nc') >/dev/null
  row=$(measure "${y}y" run "$out/run-${y}y" "$out/bin/lidscope" run --quiet --no-plots --force --out "$results" "$data/study.yaml") || exit 1
  rows+=("$row")
  [ "${BENCH_KEEP:-0}" = 1 ] || rm -rf "$results"
done

{
  echo
  printf '%-7s %6s %9s  %-5s %9s %9s %14s\n' record steps "input MB" what "wall (s)" "CPU (s)" "peak RSS (MB)"
  for r in "${rows[@]}"; do echo "$r"; done
  echo
  echo "read: bench/readonly (every slab the run reads, via lidscope/netcdf ReadFloat32)"
  echo "run:  lidscope run --no-plots (workers: one per CPU)"
  echo "wall and CPU time and peak RSS from /usr/bin/time -v; input MB from du"
} >>"$table"
cp "$table" "$out/scaling.txt"
cat "$table"
