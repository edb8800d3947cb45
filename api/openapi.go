package api

import (
	_ "embed"
	"net/http"

	"github.com/gin-gonic/gin"

	"scalematch/docs"
)

// docsPage is the browsable page of the OpenAPI document served at /docs/: plain
// HTML, CSS and JavaScript that read /openapi.json; nothing is fetched from elsewhere.
//
//go:embed openapi.html
var docsPage []byte

func (s *Server) registerDocs() {
	s.engine.GET("/openapi.json", s.openAPI)
	s.engine.GET("/docs/", s.docs)
	s.engine.GET("/docs", func(c *gin.Context) { c.Redirect(http.StatusMovedPermanently, "/docs/") })
}

// openAPI serves the generated OpenAPI document.
//
//	@Summary		OpenAPI document
//	@Description	The service's OpenAPI (Swagger 2.0) document, generated from the handlers' annotations by swag; docs/gen.sh regenerates it.
//	@Tags			operations
//	@Produce		json
//	@Success		200	{object}	object
//	@Router			/openapi.json [get]
func (s *Server) openAPI(c *gin.Context) {
	s.answerBytes(c, http.StatusOK, "application/json", docs.OpenAPI)
}

// docs serves a browsable page of the OpenAPI document.
//
//	@Summary		API documentation page
//	@Description	A page that lists every path with its parameters, request and response schemas, read from /openapi.json.
//	@Tags			operations
//	@Produce		html
//	@Success		200	{string}	string	"HTML page"
//	@Router			/docs/ [get]
func (s *Server) docs(c *gin.Context) {
	c.Header("Content-Security-Policy", "default-src 'self'; style-src 'self' 'unsafe-inline'; script-src 'self' 'unsafe-inline'")
	s.answerBytes(c, http.StatusOK, "text/html; charset=utf-8", docsPage)
}
