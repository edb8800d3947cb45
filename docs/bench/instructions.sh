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
outside() {
  GODEBUG=asyncpreemptoff=1 GOGC=off GOMAXPROCS=1 valgrind --tool=callgrind --callgrind-out-file="$tmp/cg" \
    "$X" -test.run '^$' -test.bench "BenchmarkPlanKinds/$1\$" -test.benchtime "$2x" >/dev/null 2>&1
  callgrind_annotate --auto=no --threshold=100 "$tmp/cg" |
    awk '/PROGRAM TOTALS/ {next} /^ *[0-9,]+ .*\(/ {n = $1; gsub(",", "", n); if ($0 !~ /:runtime\./) o += n} END {print o}'
}
for c in "$@"; do
  a=$(outside "$c" 100); b=$(outside "$c" 300)
  echo "$c $(( (b - a) / 200 ))"
done
