#!/usr/bin/env bash
# same.sh A B: do two lidscope run folders hold the same results, value for
# value? NetCDF files are compared as ncdump -p 9,17 text (every float32
# and float64 printed with enough digits to be exact) without their history
# attribute; CSV and JSON result files byte for byte; provenance.json (times,
# command line), run-state.gob (which embeds the provenance) and
# run-manifest.json (their sizes and checksums) are skipped.
# Prints the files that differ; exit status 1 when any does.
set -euo pipefail
a=$1 b=$2
status=0
for f in $(cd "$a" && ls); do
  case $f in
    provenance.json | run-manifest.json | run-state.gob | *.png | *.svg) continue ;;
    *.nc)
      if ! diff -q <(ncdump -p 9,17 "$a/$f" | grep -v ':history = ') <(ncdump -p 9,17 "$b/$f" | grep -v ':history = ') >/dev/null; then
        echo "differs: $f"
        status=1
      fi ;;
    *)
      if ! cmp -s "$a/$f" "$b/$f"; then
        echo "differs: $f"
        status=1
      fi ;;
  esac
done
[ $status = 0 ] && echo "same results: $a and $b"
exit $status
