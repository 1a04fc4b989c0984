#!/usr/bin/env bash
# Paired benchmark of `lidscope run` (see bench/README.md). On the 1° 40-year
# synthetic world of package fixtures (invented data), each round runs, one
# right after the other:
#
#   read      bench/readonly (every slab the run reads: the floor)
#   run       lidscope run (relationship analysis on, default workers)
#   w1, w2    lidscope run --jobs 1 --workers 1, then --workers 2 (one
#             process: with the default --jobs the CPUs go to processes,
#             and --workers 1 changes nothing)
#   regimes   lidscope run with relationships.enabled=false (the outputs of the yardstick)
#   xarray    bench/yardstick.py (xarray + dask, same formulas, same regime outputs)
#
# and the ratios of each round's pairs are printed with their median over
# the rounds. On a shared machine only ratios of runs made side by side mean
# anything; absolute times are noise. Then, once: the yardstick's outputs are
# checked against lidscope's, peak RSS for 10 vs 40 years, the metrics
# stage's columns/s per core (CPU profile), and bytes per analysed cell at
# 0.25° (1 year).
#
# Settings (environment):
#   BENCH_ROUNDS   paired rounds (default 3)
#   BENCH_WORK     worlds and results (default $TMPDIR/lidscope-bench)
#   BENCH_QUARTER  0 skips the 0.25° memory measurement (default 1)
#   LIDSCOPE       a lidscope binary to measure instead of building one
#
# Not run by CI or `make test`: a benchmark, not a test.
set -euo pipefail

root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root"
rounds=${BENCH_ROUNDS:-3}
work=${BENCH_WORK:-${TMPDIR:-/tmp}/lidscope-bench}
out=bench/out
py=/usr/bin/python3
mkdir -p "$out/bin" "$work"

[ -x /usr/bin/time ] || ./scripts/apt-need time
"$py" -c 'import xarray, dask, scipy' 2>/dev/null || ./scripts/apt-need python3-xarray python3-dask python3-scipy python3-netcdf4

echo "building lidscope, bench/gen and bench/readonly" >&2
lid=${LIDSCOPE:-$out/bin/lidscope}
[ -n "${LIDSCOPE:-}" ] || go build -o "$lid" ./cmd/lidscope
go build -o "$out/bin/gen" ./bench/gen
go build -o "$out/bin/readonly" ./bench/readonly

world() { # RES YEARS: generate once, print the folder
  local d="$work/world-${1}deg-${2}y"
  [ -f "$d/study.yaml" ] || "$out/bin/gen" -out "$d" -resolution "$1" -years "$2" -years-per-file 10 >&2
  echo "$d"
}
w40=$(world 1 40)
w10=$(world 1 10)

field() { sed -n "s/^[[:space:]]*$1: //p" "$2" | head -n 1; }
# measure NAME COMMAND...: run under GNU time; sets wall_NAME, cpu_NAME, rss_NAME (MB)
measure() {
  local name=$1 log="$out/ratios-$1"
  shift
  if ! /usr/bin/time -v -o "$log.time" "$@" >"$log.out" 2>"$log.err"; then
    echo "FAILED: $* (see $log.err)" >&2
    cat "$log.err" >&2
    exit 1
  fi
  local el user sys rss
  el=$(field 'Elapsed (wall clock) time (h:mm:ss or m:ss)' "$log.time")
  user=$(field 'User time (seconds)' "$log.time")
  sys=$(field 'System time (seconds)' "$log.time")
  rss=$(field 'Maximum resident set size (kbytes)' "$log.time")
  printf -v "wall_$name" '%s' "$(awk -F: '{ s = 0; for (i = 1; i <= NF; i++) s = s * 60 + $i; print s }' <<<"$el")"
  printf -v "cpu_$name" '%s' "$(awk -v u="$user" -v s="$sys" 'BEGIN { print u + s }')"
  printf -v "rss_$name" '%s' "$(awk -v k="$rss" 'BEGIN { printf "%.0f", k / 1024 }')"
}
warm() { cat $(find "$1" -name '*.nc') >/dev/null; }
ratio() { awk -v a="$1" -v b="$2" 'BEGIN { printf "%.2f", a / b }'; }
median() { tr ' ' '\n' | sort -g | awk '{ v[NR] = $1 } END { if (NR % 2) print v[(NR + 1) / 2]; else printf "%.2f\n", (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }

res="$work/results"
declare -A col
pairs=(run/read:wall run/read:cpu run/xarray:wall run/xarray:cpu regimes/xarray:wall regimes/xarray:cpu w1/w2:wall regimes/run:cpu)
lr=("$lid" run --quiet --no-plots --force)
for r in $(seq 1 "$rounds"); do
  echo "round $r of $rounds" >&2
  warm "$w40"
  measure read "$out/bin/readonly" "$w40"
  measure run "${lr[@]}" --out "$res/run" "$w40/study.yaml"
  measure w1 "${lr[@]}" --jobs 1 --workers 1 --out "$res/w1" "$w40/study.yaml"
  measure w2 "${lr[@]}" --jobs 1 --workers 2 --out "$res/w2" "$w40/study.yaml"
  measure regimes "${lr[@]}" --set relationships.enabled=false --out "$res/regimes" "$w40/study.yaml"
  measure xarray "$py" bench/yardstick.py "$w40" "$res/xarray"
  for p in "${pairs[@]}"; do
    a=${p%%/*} rest=${p#*/} b=${rest%%:*} kind=${p##*:}
    va="${kind}_${a//-/_}" vb="${kind}_${b//-/_}"
    col[$p]="${col[$p]:-} $(ratio "${!va}" "${!vb}")"
  done
  rows+=("round $r: read ${wall_read} s/${cpu_read} s CPU; run ${wall_run}/${cpu_run}; w1 ${wall_w1}/${cpu_w1}; w2 ${wall_w2}/${cpu_w2}; regimes ${wall_regimes}/${cpu_regimes}; xarray ${wall_xarray}/${cpu_xarray} (wall s/CPU s)")
  rss40=$rss_run rssx=$rss_xarray rssread=$rss_read
done

echo "checking the yardstick's outputs against lidscope's (relationships off)" >&2
"$py" bench/yardstick.py --check "$res/xarray" "$res/regimes" >"$out/ratios-check.txt" 2>&1 || echo "THE YARDSTICK'S OUTPUTS DO NOT AGREE (its times mean nothing): see below" >>"$out/ratios-check.txt"

# peak RSS 10 years, same settings
warm "$w10"
measure run10 "${lr[@]}" --out "$res/run10" "$w10/study.yaml"

# metrics columns/s/core: CPU seconds in the metrics kernel from a profile,
# columns = ocean columns (ever valid) × steps
"${lr[@]}" --jobs 1 --cpuprofile "$out/ratios-cpu.prof" --out "$res/run" "$w40/study.yaml" >/dev/null # one process: the profile sees the kernel
go tool pprof -top -nodecount=30 "$lid" "$out/ratios-cpu.prof" >"$out/ratios-profile.txt" 2>/dev/null
kern=$(awk '$NF ~ /^lidscope\/metrics\.\(\*Kernel\)\.Slab$/ || $NF ~ /^lidscope\/metrics\.slab\[/ { v = $4; sub(/s$/, "", v); if (v ~ /ms$/) { sub(/ms$/, "", v); v /= 1000 }; print v; exit }' \
  <(go tool pprof -top -cum -nodecount=200 "$lid" "$out/ratios-cpu.prof" 2>/dev/null))
cols=$("$py" -c "
import xarray as xr
m = xr.open_dataset('$res/run/maps.nc')
print(int((m['valid_steps'].isel(time=0) > 0).sum()) * 480)")
mcs=$(awk -v c="$cols" -v s="$kern" 'BEGIN { if (s > 0) printf "%.1f", c / s / 1e6; else print "NA" }')

quarter=NA
if [ "${BENCH_QUARTER:-1}" != 0 ]; then
  wq=$(world 0.25 1)
  warm "$wq"
  measure quarter "${lr[@]}" --out "$res/quarter" "$wq/study.yaml"
  cells=$("$py" -c "
import xarray as xr
m = xr.open_dataset('$res/quarter/maps.nc')
print(int((m['valid_steps'].isel(time=0) > 0).sum()))")
  quarter=$(awk -v r="$rss_quarter" -v c="$cells" 'BEGIN { printf "%.0f", r * 1048576 / c }')
  quarter="$quarter bytes per analysed (ocean) cell: peak RSS ${rss_quarter} MB for $cells cells"
fi

stamp=$(date -u +%Y%m%dT%H%M%SZ)
table="$out/ratios-$stamp.txt"
{
  echo "lidscope paired benchmark, $(date -u +%Y-%m-%dT%H:%M:%SZ), $rounds rounds"
  echo "commit $(git rev-parse --short HEAD 2>/dev/null || echo unknown)$(git diff --quiet 2>/dev/null || echo ' (+ uncommitted changes)'), $(go version | cut -d' ' -f3), machine $(nproc) CPUs, load $(cut -d' ' -f1-3 /proc/loadavg)"
  echo "input: synthetic world (invented data), 1° global monthly, 40 years, NetCDF-4 deflate, page cache warm"
  echo
  printf '%-36s %-8s %s\n' pair median "per round"
  for p in "${pairs[@]}"; do
    printf '%-36s %-8s%s\n' "$p" "$(median <<<"${col[$p]# }")" "${col[$p]}"
  done
  echo
  echo "peak RSS: run 10 years ${rss_run10} MB, 40 years ${rss40} MB; read ${rssread} MB; xarray ${rssx} MB"
  echo "metrics kernel in the run: $mcs M columns/s/core ($cols columns, ${kern} CPU s in the kernel)"
  echo "0.25°, 1 year: $quarter"
  echo
  printf '%s\n' "${rows[@]}"
  echo
  echo "yardstick check (bench/yardstick.py --check):"
  cat "$out/ratios-check.txt"
  echo
  echo "CPU profile of the run, top entries:"
  sed -n '5,22p' "$out/ratios-profile.txt"
} >"$table"
cp "$table" "$out/ratios.txt"
cat "$table"
