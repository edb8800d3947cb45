package api_test

import (
	"context"
	"errors"
	"fmt"
	"net/http"
	"testing"

	"github.com/stretchr/testify/assert"

	"scalematch/api"
	"scalematch/atmosphere"
	"scalematch/facilities"
	"scalematch/internal/check"
)

// TestStatusOf checks the status the HTML pages answer each kind of error with:
// the API's own (the table in schema.Problem's doc comment), the store's 503 and
// 507 included, wrapped or not.
func TestStatusOf(t *testing.T) {
	cases := []struct {
		name string
		err  error
		want int
	}{
		{"nil", nil, http.StatusOK},
		{"invalid", check.Invalid("bad", []check.FieldError{{Field: "flight.mach", Message: "bad"}}), http.StatusBadRequest},
		{"not found", &check.Error{Code: check.CodeNotFound}, http.StatusNotFound},
		{"unprocessable", &check.Error{Code: check.CodeUnprocessable}, http.StatusUnprocessableEntity},
		{"atmosphere range", fmt.Errorf("flight: %w", atmosphere.ErrRange), http.StatusBadRequest},
		{"body too large", &http.MaxBytesError{Limit: api.BodyLimit}, http.StatusRequestEntityTooLarge},
		{"store unavailable", fmt.Errorf("reading tsw-1: %w", facilities.ErrUnavailable), http.StatusServiceUnavailable},
		{"store full", fmt.Errorf("saving: %w", facilities.ErrStorageFull), http.StatusInsufficientStorage},
		{"out of time", fmt.Errorf("planning: %w", context.DeadlineExceeded), http.StatusServiceUnavailable},
		{"anything else", errors.New("boom"), http.StatusInternalServerError},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			assert.Equal(t, tc.want, api.StatusOf(tc.err))
		})
	}
}
