package postgres

import (
	"errors"
	"io"
	"net"
	"strings"
	"syscall"

	"github.com/jackc/pgx/v5/pgconn"

	"scalematch/facilities"
)

// ClassifyError marks the errors of a server that does not answer now with
// facilities.ErrUnavailable, and those of a full disk with
// facilities.ErrStorageFull, by SQLSTATE (PostgreSQL documentation, appendix A
// "PostgreSQL Error Codes"):
//
//	53100 disk_full                                  ErrStorageFull
//	08xxx connection exception                       ErrUnavailable
//	53000, 53200, 53300 insufficient resources,
//	  out of memory, too many connections            ErrUnavailable
//	57P01, 57P02, 57P03 admin or crash shutdown,
//	  cannot connect now                             ErrUnavailable
//
// and a connection that cannot be made or was cut (refused, reset, closed, end of
// stream) with ErrUnavailable. Anything else is returned as it is.
func (db *DB) ClassifyError(err error) error { return classify(err) }

func classify(err error) error {
	if err == nil {
		return nil
	}
	var pe *pgconn.PgError
	if errors.As(err, &pe) {
		return facilities.Classify(err, sqlStateClass(pe.Code))
	}
	var ce *pgconn.ConnectError
	var ne net.Error
	var oe *net.OpError
	switch {
	case errors.As(err, &ce), errors.As(err, &oe), errors.As(err, &ne) && !ne.Timeout(),
		errors.Is(err, syscall.ECONNREFUSED), errors.Is(err, syscall.ECONNRESET), errors.Is(err, syscall.EPIPE),
		errors.Is(err, io.ErrUnexpectedEOF), errors.Is(err, io.EOF), errors.Is(err, net.ErrClosed):
		return facilities.Classify(err, facilities.ErrUnavailable)
	}
	// pgx reports a connection that died under a query, and a closed pool, with
	// these words and no exported error value.
	if msg := err.Error(); strings.Contains(msg, "conn closed") || strings.Contains(msg, "connection refused") ||
		strings.Contains(msg, "failed to connect") || strings.Contains(msg, "broken pipe") || strings.Contains(msg, "closed pool") {
		return facilities.Classify(err, facilities.ErrUnavailable)
	}
	return err
}

// sqlStateClass returns the class of a SQLSTATE, or nil.
func sqlStateClass(code string) error {
	switch {
	case code == "53100":
		return facilities.ErrStorageFull
	case strings.HasPrefix(code, "08"), code == "53000", code == "53200", code == "53300",
		code == "57P01", code == "57P02", code == "57P03":
		return facilities.ErrUnavailable
	}
	return nil
}
