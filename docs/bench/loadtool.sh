#!/usr/bin/env bash
# loadtool.sh OUT PAIRS LT... : full load-tool runs (go build -o LT ./api/loadtest),
# the builds in turns, over SQLite and PostgreSQL at 4 and 16 connections,
# 12 s each; OUT collects each run's figures under a header line with the load
# average and, over PostgreSQL, the server's backends' CPU a distinct plan
# (the postmaster's reaped children, /proc/PID/stat fields 16 and 17).
# PostgreSQL runs on a schema of their own (SCHEMA, default ltbench), dropped
# and created before each run, with sslmode=disable as docker-compose.yml sets
# it; PGPID names the postmaster (default: its pid file under /var/run/postgresql).
# loadsummary.py OUT prints the figures side by side.
set -euo pipefail
[ $# -ge 3 ] || { echo "usage: $0 OUT PAIRS LT..." >&2; exit 2; }
OUT=$(realpath -m "$1"); PAIRS=$2; shift 2
LTS=(); for x in "$@"; do LTS+=("$(realpath "$x")"); done
cd "$(dirname "$0")/../.." # the load tool reads api/testdata/load
SCHEMA=${SCHEMA:-ltbench}
PGPID=${PGPID:-$(head -n 1 /var/run/postgresql/*.pid 2>/dev/null | head -n 1 || true)}
tick=$(getconf CLK_TCK)
reaped() { awk '{print $16 + $17}' "/proc/$PGPID/stat"; }
: >"$OUT"
for i in $(seq 1 "$PAIRS"); do
  for store in sqlite postgres; do
    for c in 4 16; do
      for X in "${LTS[@]}"; do
        extra=""
        if [ "$store" = postgres ]; then
          PGOPTIONS="-c client_min_messages=warning" psql -q -h 127.0.0.1 -U postgres -d test -c "DROP SCHEMA IF EXISTS $SCHEMA CASCADE; CREATE SCHEMA $SCHEMA" >/dev/null
          b0=$(reaped)
          r=$(SCALEMATCH_DATABASE_URL="postgres://postgres@127.0.0.1:5432/test?search_path=$SCHEMA&sslmode=disable" \
            "$X" -serve -duration 12s -concurrency "$c" 2>&1)
          n=$(awk '/^distinct +POST/{print $6}' <<<"$r")
          extra="backends $(( ( $(reaped) - b0 ) * 1000000 / tick / n )) us/distinct"
        else
          r=$(env -u SCALEMATCH_DATABASE_URL "$X" -serve -duration 12s -concurrency "$c" 2>&1)
        fi
        echo "== $X $store c=$c pair=$i load=$(cut -d' ' -f1 /proc/loadavg) $extra" >>"$OUT"
        grep -E '^(distinct|health)|per health|CPU of|group commits' <<<"$r" >>"$OUT"
      done
    done
  done
done
if [ -n "${SCHEMA:-}" ] && command -v psql >/dev/null; then
  PGOPTIONS="-c client_min_messages=warning" psql -q -h 127.0.0.1 -U postgres -d test -c "DROP SCHEMA IF EXISTS $SCHEMA CASCADE" >/dev/null || true
fi
