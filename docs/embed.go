// Package docs holds the service's OpenAPI documents, generated from the
// annotations in api/: Swagger 2.0 by swag, OpenAPI 3 converted from it by
// docs/openapi3gen (docs/gen.sh regenerates both; docs/gen.sh --check tells
// whether the committed copies are current).
package docs

import _ "embed"

// OpenAPI is the OpenAPI (Swagger 2.0) document of the HTTP API, as JSON.
//
//go:embed swagger.json
var OpenAPI []byte

// OpenAPI3 is the OpenAPI 3.0 document of the HTTP API, as JSON: the one the
// service's tests validate every answer against (internal/contract).
//
//go:embed openapi3.json
var OpenAPI3 []byte
