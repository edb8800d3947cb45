#!/usr/bin/env bash
# instructions.sh X.test CASE...: instructions a plan outside the Go runtime for
# each BenchmarkPlanKinds case (e.g. tsw-1/priority/cruise), counted by
# valgrind's callgrind, which counts the same whatever else the machine runs:
# (count at 300 plans − count at 100 plans) ÷ 200, so that the binary's start
# and the first plan's one-time work (sonic's encoders compiled) cancel out.
set -euo pipefail
[ $# -ge 2 ] || { echo "usage: $0 X.test CASE..." >&2; exit 2; }
X=$(realpath "$1"); shift
cd "$(dirname "$0")/../../internal/app"
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
# valgrind 3.19 does not decode RDTSCP, which the Go runtime's cputicks uses
# where the CPU has it (reached under lock contention, with sysmon for one):
# such a run dies of SIGILL at random, on some machines almost always.
# GODEBUG cpu.rdtscp=off makes the runtime read the clock with RDTSC instead;
# a run that still fails is run again, up to five times.
outside() {
  local try
  for try in 1 2 3 4 5; do
    if GODEBUG=asyncpreemptoff=1,cpu.rdtscp=off GOGC=off GOMAXPROCS=1 valgrind --tool=callgrind --callgrind-out-file="$tmp/cg" \
      "$X" -test.run '^$' -test.bench "BenchmarkPlanKinds/$1\$" -test.benchtime "$2x" >"$tmp/out" 2>&1; then
      break
    fi
    [ "$try" -lt 5 ] || { echo "$1 at $2 plans failed five times under valgrind:" >&2; grep -v '^==' "$tmp/out" | head -5 >&2; exit 1; }
  done
  callgrind_annotate --auto=no --threshold=100 "$tmp/cg" |
    awk '/PROGRAM TOTALS/ {next} /^ *[0-9,]+ .*\(/ {n = $1; gsub(",", "", n); if ($0 !~ /:runtime\./) o += n} END {print o}'
}
for c in "$@"; do
  a=$(outside "$c" 100); b=$(outside "$c" 300)
  echo "$c $(( (b - a) / 200 ))"
done
