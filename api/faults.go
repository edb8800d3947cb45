package api

import (
	"errors"
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"sync/atomic"
	"syscall"
	"time"
)

// StatusClientClosed is the status logged and counted for a request whose client
// went away before its answer (no answer is sent); the number is the one nginx
// uses for it (common practice).
const StatusClientClosed = 499

// RetryAfterSeconds is the Retry-After of a 503, in seconds.
const RetryAfterSeconds = 5

// fullHold is how long after a full-disk error /readyz reports the service
// unready, unless a write succeeds first.
const fullHold = 30 * time.Second

// errClientGone is a request whose client closed its connection.
var errClientGone = errors.New("the client went away")

// clientFault is a request that failed by the client's doing: a body shorter than
// its Content-Length, a malformed chunk, a body that did not arrive in time.
type clientFault struct {
	kind problemKind
	msg  string
	// metric is the kind label of scalematch_http_client_faults_total.
	metric string
}

func (e *clientFault) Error() string { return e.msg }

// bodyReadError classifies an error reading the request body: a body past the limit
// stays *http.MaxBytesError (413); a read that timed out is a 408; a connection
// reset or closed by the client errClientGone; a body that ends before its
// Content-Length or a malformed chunked encoding a 400.
func bodyReadError(err error, declared int64) error {
	var ne net.Error
	switch {
	case err == nil:
		return nil
	case isMaxBytes(err):
		return err
	case errors.Is(err, os.ErrDeadlineExceeded), errors.As(err, &ne) && ne.Timeout():
		return &clientFault{kindRequestTimeout, "the request body did not arrive in time", "body_timeout"}
	case errors.Is(err, syscall.ECONNRESET), errors.Is(err, net.ErrClosed), errors.Is(err, syscall.EPIPE):
		return errClientGone
	case errors.Is(err, io.ErrUnexpectedEOF) && declared > 0:
		return &clientFault{kindInvalid, fmt.Sprintf("the body ended before its Content-Length of %d bytes", declared), "short_body"}
	}
	return &clientFault{kindInvalid, "the request body could not be read: " + err.Error(), "malformed_body"}
}

// storeState remembers when the store last answered that it had no space.
type storeState struct {
	fullAt atomic.Int64 // UnixNano; 0: not full
}

// storeFull records a full-disk error (problem calls it for a 507).
func (s *Server) storeFull() { s.store.fullAt.Store(time.Now().UnixNano()) }

// storeWritten records a write that succeeded: the disk has space again.
func (s *Server) storeWritten() { s.store.fullAt.Store(0) }

// storeIsFull reports whether a full-disk error was seen within fullHold and no
// write has succeeded since.
func (s *Server) storeIsFull() bool {
	at := s.store.fullAt.Load()
	return at != 0 && time.Since(time.Unix(0, at)) < fullHold
}

// isMaxBytes reports whether err is a body past the limit.
func isMaxBytes(err error) bool {
	var mbe *http.MaxBytesError
	return errors.As(err, &mbe)
}
