#!/bin/sh
# Regenerates plan-answer.json, the plan body the store benchmarks save: the
# answer POST /v1/plans gives for the load tool's request (the Orrin J16 in
# tsw-1, 21 α points; exit statuses 3 to 5 are load verdicts, not errors), from
# this repository's own command line. Run from the
# repository root: sh facilities/catalogtest/testdata/gen.sh
set -e
go run ./cmd/scalematch plan --json --data /nonexistent api/testdata/load/plan-orrin-j16-tsw-1.json \
	> facilities/catalogtest/testdata/plan-answer.json || { s=$?; [ $s -ge 3 ] && [ $s -le 5 ]; }
