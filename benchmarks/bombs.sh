#!/bin/bash
# The resource bombs of the second hostile round, each timed in a fresh process: wall time, peak resident memory,
# exit status and the first error line.  Usage: benchmarks/bombs.sh [REPRODUCERS] [TIMEOUT]
# REPRODUCERS: the round2 folder of the shared hostile plans (default ../shared/hostile-plans/round2).
HERE=$(cd "$(dirname "$0")/.." && pwd)
R2=${1:-$HERE/../shared/hostile-plans/round2}
TO=${2:-60}
B=$R2/08-resource-bombs
for p in R1-blocks-190k-points.gplan R2-blocks-loops.gplan R3-fields-x-loops.gplan R4-256-shockley-rectifiers.gplan \
         R4b-256-valve-low-secondary.gplan R5-75k-frequencies.gplan inc/R7-include-fanout.gplan \
         dev/R8-10000-devices.gplan dev/R8b-20000-simple-devices.gplan dev2/R8c-nested-devices.gplan \
         ../14-valve-rectifier-slow/secondary-4V.gplan ../14-valve-rectifier-slow/secondary-1e-7V.gplan \
         ../14-valve-rectifier-slow/filter-4.3Gohm.gplan "$HERE/tests/hostile/rect-10000.gplan"; do
  case $p in /*) f=$p;; *) f=$B/$p;; esac
  err=$(mktemp)
  ( cd "$B" && PYTHONPATH=$HERE /usr/bin/time -f "%e s, %M KB, exit %x" timeout "$TO" \
      python3 -m groundcheck check "$f" --format json >/dev/null 2>"$err" )
  echo "$(basename "$p") | $(tail -1 "$err") | $(grep -m1 -o -E '(internal error|error): .{0,110}' "$err")"
  rm -f "$err"
done
echo "load: $(cut -d' ' -f1-3 /proc/loadavg)"
