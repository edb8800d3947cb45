package pages_test

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/api"
	"scalematch/api/schema"
	"scalematch/facilities"
	"scalematch/internal/pages"
)

// faultyStore is a Backend whose every call fails with err.
type faultyStore struct{ err error }

func (f faultyStore) Loads(context.Context, *schema.LoadsRequest) (*schema.LoadsResponse, error) {
	return nil, f.err
}

func (f faultyStore) StoredPlan(context.Context, string) (*schema.PlanResponse, *facilities.Facility, error) {
	return nil, nil, f.err
}

func (f faultyStore) Facilities(context.Context) ([]facilities.Facility, error) { return nil, f.err }

func (f faultyStore) Facility(context.Context, string) (facilities.Facility, error) {
	return facilities.Facility{}, f.err
}

func (f faultyStore) Versions(context.Context, string) ([]facilities.Change, error) {
	return nil, f.err
}

// TestStoreFaults checks that a page answers a store that does not answer with
// 503 and Retry-After, and a full one with 507, each saying so, as the API does;
// anything else is a 500 that shows nothing of the error.
func TestStoreFaults(t *testing.T) {
	cases := []struct {
		name       string
		err        error
		status     int
		retryAfter bool
		say        string
	}{
		{"unavailable", fmt.Errorf("listing: %w", facilities.ErrUnavailable), http.StatusServiceUnavailable, true, "the store does not answer"},
		{"full", fmt.Errorf("listing: %w", facilities.ErrStorageFull), http.StatusInsufficientStorage, false, "the store has no space left"},
		{"internal", fmt.Errorf("listing: a secret detail"), http.StatusInternalServerError, false, "internal error"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p, err := pages.New(faultyStore{tc.err}, slog.New(slog.NewTextHandler(io.Discard, nil)))
			require.NoError(t, err)
			for _, path := range []string{"/", "/facilities/tsw-1", "/plans/p-1"} {
				rec := httptest.NewRecorder()
				p.ServeHTTP(rec, httptest.NewRequest(http.MethodGet, path, nil))
				assert.Equal(t, tc.status, rec.Code, path)
				body, _ := io.ReadAll(rec.Body)
				assert.Contains(t, string(body), tc.say, path)
				assert.NotContains(t, string(body), "secret", path)
				if tc.retryAfter {
					assert.Equal(t, strconv.Itoa(api.RetryAfterSeconds), rec.Header().Get("Retry-After"), path)
				} else {
					assert.Empty(t, rec.Header().Get("Retry-After"), path)
				}
			}
		})
	}
}
