package api

import (
	_ "embed"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/docs"
)

// docsPage is the browsable page of the OpenAPI document served at /docs/: plain
// HTML, CSS and JavaScript that read /openapi3.json; nothing is fetched from elsewhere.
//
//go:embed openapi.html
var docsPage []byte

func (s *Server) registerDocs() {
	s.engine.GET("/openapi.json", s.openAPI)
	s.engine.GET("/openapi3.json", s.openAPI3)
	s.engine.GET("/docs/", s.docs)
	s.engine.GET("/docs", func(c *gin.Context) { c.Redirect(http.StatusMovedPermanently, "/docs/") })
}

// openAPI serves the generated Swagger 2.0 document.
//
//	@Summary		OpenAPI document (Swagger 2.0)
//	@Description	The service's Swagger 2.0 document, generated from the handlers' annotations by swag, for older tooling; /openapi3.json is the complete one (required and nullable fields, ranges, unions, every problem).
//	@Tags			operations
//	@Produce		json
//	@Success		200	{object}	object
//	@Router			/openapi.json [get]
func (s *Server) openAPI(c *gin.Context) {
	s.answerBytes(c, http.StatusOK, "application/json", docs.OpenAPI)
}

// openAPI3 serves the generated OpenAPI 3 document.
//
//	@Summary		OpenAPI 3 document
//	@Description	The service's OpenAPI 3.0 document: converted from the Swagger 2.0 one with kin-openapi and completed from the Go types by docs/openapi3gen (required and nullable fields, each number's range and unit strings, the union types, and every application/problem+json answer). The service's tests validate every answer against it.
//	@Tags			operations
//	@Produce		json
//	@Success		200	{object}	object
//	@Router			/openapi3.json [get]
func (s *Server) openAPI3(c *gin.Context) {
	s.answerBytes(c, http.StatusOK, "application/json", docs.OpenAPI3)
}

// docs serves a browsable page of the OpenAPI document.
//
//	@Summary		API documentation page
//	@Description	A page that lists every path with its parameters, request and response schemas, read from /openapi3.json.
//	@Tags			operations
//	@Produce		html
//	@Success		200	{string}	string	"HTML page"
//	@Router			/docs/ [get]
func (s *Server) docs(c *gin.Context) {
	c.Header("Content-Security-Policy", "default-src 'self'; style-src 'self' 'unsafe-inline'; script-src 'self' 'unsafe-inline'")
	s.answerBytes(c, http.StatusOK, "text/html; charset=utf-8", docsPage)
}
