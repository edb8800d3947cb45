#!/usr/bin/env bash
# Regenerates the OpenAPI documents from the swag annotations in api/: the Swagger
# 2.0 document (docs/swagger.json, docs/swagger.yaml) that swag writes, and the
# OpenAPI 3 document (docs/openapi3.json) that docs/openapi3gen converts from it
# with kin-openapi and completes from the Go types (required, nullable, ranges,
# unions, problems). With --check it regenerates into a temporary directory and
# fails when the committed files differ, so CI catches stale docs.
# Needs swag v1.16.6: go install github.com/swaggo/swag/cmd/swag@v1.16.6
set -euo pipefail
cd "$(dirname "$0")/.."
swag=${SWAG:-swag}
command -v "$swag" >/dev/null || swag="$(go env GOPATH)/bin/swag"
out=docs
if [ "${1:-}" = "--check" ]; then
  out=$(mktemp -d)
  trap 'rm -rf "$out"' EXIT
fi
"$swag" init --quiet --generalInfo server.go --dir ./api --output "$out" \
  --outputTypes json,yaml --parseDependencyLevel 1 --parseInternal --requiredByDefault=false >&2
go run ./docs/openapi3gen -in "$out/swagger.json" -out "$out/openapi3.json"
if [ "$out" != docs ]; then
  status=0
  for f in swagger.json swagger.yaml openapi3.json; do
    if ! diff -u "docs/$f" "$out/$f"; then status=1; fi
  done
  if [ $status -ne 0 ]; then
    echo "the committed OpenAPI document is stale: run bash docs/gen.sh and commit docs/swagger.* docs/openapi3.json" >&2
  fi
  exit $status
fi
