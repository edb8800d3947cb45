#!/usr/bin/env bash
# alternate.sh A.test B.test OUT RUNS [REGEX]: runs two test binaries of
# internal/app (go test -c -o X.test ./internal/app) in turns, RUNS times each,
# benchmarks matching REGEX (default BenchmarkPlanKinds) at BENCHTIME plans
# (environment, default 300x), so that other work on the machine weighs on both
# alike; OUT collects the output, one header line a run with the load average.
# summarize.py OUT prints the ranges and the after/before ratios.
set -euo pipefail
[ $# -ge 4 ] || { echo "usage: $0 A.test B.test OUT RUNS [REGEX]" >&2; exit 2; }
A=$(realpath "$1"); B=$(realpath "$2"); OUT=$(realpath -m "$3"); RUNS=$4; RE=${5:-BenchmarkPlanKinds}
cd "$(dirname "$0")/../../internal/app" # the benchmarks read ../../examples
: >"$OUT"
for i in $(seq 1 "$RUNS"); do
  for X in "$A" "$B"; do
    echo "### $X run $i load $(cut -d' ' -f1 /proc/loadavg)" >>"$OUT"
    "$X" -test.run '^$' -test.bench "$RE" -test.benchtime "${BENCHTIME:-300x}" -test.benchmem >>"$OUT" 2>&1
  done
done
