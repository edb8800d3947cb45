// Command openapi3gen writes the service's OpenAPI 3 document. It converts the
// Swagger 2.0 document that swag generates from the handlers' annotations
// (docs/swagger.json) with kin-openapi's openapi2conv, then adds what the
// annotations cannot say, read from the Go types and from the tables in table.go:
//
//   - required and nullable properties, from the json tags of the response types
//     (a field without omitempty is always sent; a nil pointer, slice or map
//     without omitempty is sent as null) and from requestRequired;
//   - the documented range of every input number (minimum, maximum), from
//     app.Bounds, and the unit strings a dimensional number may be given as
//     (a `unit` tag: a number or a string such as "2.5 bar");
//   - the caps on request lists (a `maxItems` tag, else the decoder's default);
//   - the union types the Go types write with their own MarshalJSON (table.go);
//   - one application/problem+json response per problem kind (api.ProblemKinds)
//     on every operation that can answer it, with the headers every answer carries.
//
// docs/gen.sh runs it after swag; with -check it compares instead of writing.
package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"os"

	"github.com/getkin/kin-openapi/openapi2"
	"github.com/getkin/kin-openapi/openapi2conv"
	"github.com/getkin/kin-openapi/openapi3"
)

func main() {
	in := flag.String("in", "docs/swagger.json", "the Swagger 2.0 document swag wrote")
	out := flag.String("out", "docs/openapi3.json", "where to write the OpenAPI 3 document")
	flag.Parse()
	src, err := os.ReadFile(*in)
	if err == nil {
		var b []byte
		b, err = Generate(src)
		if err == nil {
			err = os.WriteFile(*out, b, 0o644)
		}
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "openapi3gen:", err)
		os.Exit(1)
	}
}

// Generate converts the Swagger 2.0 document swagger to OpenAPI 3, completes it
// and returns it as indented JSON. The document is checked with kin-openapi's
// validation before it is returned.
func Generate(swagger []byte) ([]byte, error) {
	var d2 openapi2.T
	if err := json.Unmarshal(swagger, &d2); err != nil {
		return nil, fmt.Errorf("reading the Swagger 2.0 document: %w", err)
	}
	doc, err := openapi2conv.ToV3(&d2)
	if err != nil {
		return nil, fmt.Errorf("converting to OpenAPI 3: %w", err)
	}
	g, err := newGenerator(doc)
	if err != nil {
		return nil, err
	}
	if err := g.run(); err != nil {
		return nil, err
	}
	b, err := json.Marshal(doc)
	if err != nil {
		return nil, err
	}
	// Read back, as a client would, so that every reference resolves.
	back, err := openapi3.NewLoader().LoadFromData(b)
	if err != nil {
		return nil, fmt.Errorf("reading the generated document back: %w", err)
	}
	if err := back.Validate(context.Background()); err != nil {
		return nil, fmt.Errorf("the generated document is not valid OpenAPI 3: %w", err)
	}
	var buf bytes.Buffer
	if err := json.Indent(&buf, b, "", "  "); err != nil {
		return nil, err
	}
	buf.WriteByte('\n')
	return buf.Bytes(), nil
}
