package api

import (
	"io"
	"log/slog"
	"math"
	"net/http"
	"net/http/httptest"
	"testing"

	"github.com/gin-gonic/gin"
	"github.com/prometheus/client_golang/prometheus"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestNoEmptyOK: a handler whose answer cannot be encoded, or that writes
// nothing, does not produce a 200 without a body.
func TestNoEmptyOK(t *testing.T) {
	s, err := New(Config{Registry: prometheus.NewRegistry(), Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	require.NoError(t, err)
	type result struct {
		Test struct {
			DynamicPressure float64 `json:"dynamic_pressure"`
		} `json:"test"`
	}
	g := s.engine.Group("/test")
	g.GET("/nan", func(c *gin.Context) {
		var r result
		r.Test.DynamicPressure = math.Inf(1)
		s.answer(c, http.StatusOK, r)
	})
	g.GET("/gin-json-inf", func(c *gin.Context) { c.JSON(http.StatusOK, map[string]float64{"q": math.Inf(1)}) })
	g.GET("/nothing", func(c *gin.Context) {})
	g.GET("/empty", func(c *gin.Context) { s.answerBytes(c, http.StatusOK, "application/json", nil) })
	cases := []struct {
		path   string
		status int
		kind   string
	}{
		{"/test/nan", http.StatusUnprocessableEntity, "/problems/unprocessable"},
		{"/test/gin-json-inf", http.StatusInternalServerError, "/problems/internal"},
		{"/test/nothing", http.StatusInternalServerError, "/problems/internal"},
		{"/test/empty", http.StatusInternalServerError, "/problems/internal"},
	}
	for _, tc := range cases {
		t.Run(tc.path, func(t *testing.T) {
			rec := httptest.NewRecorder()
			s.Handler().ServeHTTP(rec, httptest.NewRequest(http.MethodGet, tc.path, nil))
			assert.Equal(t, tc.status, rec.Code)
			assert.Contains(t, rec.Body.String(), `"type":"`+tc.kind+`"`)
		})
	}
}
