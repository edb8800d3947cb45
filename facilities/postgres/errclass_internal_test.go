package postgres

import (
	"errors"
	"fmt"
	"io"
	"syscall"
	"testing"

	"github.com/jackc/pgx/v5/pgconn"
	"github.com/stretchr/testify/assert"

	"scalematch/facilities"
)

// TestClassify checks the classes by SQLSTATE (PostgreSQL documentation,
// appendix A) and for connections that cannot be made or were cut.
func TestClassify(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name string
		err  error
		want error // nil: no class
	}{
		{"disk full", &pgconn.PgError{Code: "53100"}, facilities.ErrStorageFull},
		{"too many connections", &pgconn.PgError{Code: "53300"}, facilities.ErrUnavailable},
		{"admin shutdown", fmt.Errorf("saving: %w", &pgconn.PgError{Code: "57P01"}), facilities.ErrUnavailable},
		{"cannot connect now", &pgconn.PgError{Code: "57P03"}, facilities.ErrUnavailable},
		{"connection failure", &pgconn.PgError{Code: "08006"}, facilities.ErrUnavailable},
		{"connection refused", fmt.Errorf("dial: %w", syscall.ECONNREFUSED), facilities.ErrUnavailable},
		{"cut mid-answer", fmt.Errorf("read: %w", io.ErrUnexpectedEOF), facilities.ErrUnavailable},
		{"unique violation is not a class", &pgconn.PgError{Code: "23505"}, nil},
		{"a plain error", errors.New("scan: bad column"), nil},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			got := classify(tc.err)
			assert.ErrorIs(t, got, tc.err, "the original stays in the chain")
			for _, class := range []error{facilities.ErrStorageFull, facilities.ErrUnavailable} {
				assert.Equal(t, class == tc.want, errors.Is(got, class), "%v", class)
			}
		})
	}
}
