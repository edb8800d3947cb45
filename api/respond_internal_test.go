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

	"scalematch/facilities"
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

func TestCheckFinite(t *testing.T) {
	type inner struct {
		Values []float64 `json:"values"`
	}
	type resp struct {
		Mach  float64  `json:"mach"`
		Loads *inner   `json:"loads"`
		Other *float64 `json:"other,omitempty"`
	}
	inf := math.Inf(-1)
	cases := []struct {
		name  string
		v     resp
		path  string // "" when finite
		input string
	}{
		{"finite", resp{Mach: 0.8, Loads: &inner{Values: []float64{1, 2}}}, "", ""},
		{"NaN at the top", resp{Mach: math.NaN()}, "mach", "test"},
		{"deep in a list", resp{Loads: &inner{Values: []float64{1, math.Inf(1)}}}, "loads.values[1]", "installation"},
		{"behind a pointer", resp{Other: &inf}, "other", "test"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			err := checkFinite(tc.v, loadsInputs)
			if tc.path == "" {
				require.NoError(t, err)
				return
			}
			var de *facilities.Error
			require.ErrorAs(t, err, &de)
			assert.Equal(t, facilities.CodeUnprocessable, de.Code)
			assert.Contains(t, de.Message, tc.path)
			require.Len(t, de.Fields, 1)
			assert.Equal(t, tc.input, de.Fields[0].Field)
		})
	}
}

func TestCollapseWarnings(t *testing.T) {
	cases := []struct {
		name string
		in   []string
		want []string
	}{
		{"none", nil, nil},
		{"distinct stay", []string{"a", "b"}, []string{"a", "b"}},
		{"repeats become one with a count", []string{"a", "b", "a", "a"}, []string{"a (given 3 times)", "b"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			assert.Equal(t, tc.want, collapseWarnings(tc.in))
		})
	}
}
