package api

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"fmt"
	"log/slog"
	"net/http"
	"runtime/debug"
	"strings"
	"time"

	"github.com/gin-gonic/gin"
)

// HeaderRequestID carries the request id in both directions. A caller may send its
// own (1 to 64 characters of letters, digits and "-_.:"); otherwise the service makes
// one. Every response and every log line of the request carry it.
const HeaderRequestID = "X-Request-ID"

const maxRequestIDLen = 64

// ctxKey keys the request id in a request's context.
type ctxKey struct{}

// RequestID returns the request id the middleware stored in ctx, or "" when there
// is none.
func RequestID(ctx context.Context) string {
	id, _ := ctx.Value(ctxKey{}).(string)
	return id
}

// validRequestID reports whether an incoming request id is safe to echo and log.
func validRequestID(id string) bool {
	if id == "" || len(id) > maxRequestIDLen {
		return false
	}
	for i := 0; i < len(id); i++ {
		c := id[i]
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9':
		case c == '-', c == '_', c == '.', c == ':':
		default:
			return false
		}
	}
	return true
}

// newRequestID returns 16 random bytes in hex.
func newRequestID() string {
	var b [16]byte
	rand.Read(b[:]) // crypto/rand.Read never returns an error (Go 1.24 and later).
	return hex.EncodeToString(b[:])
}

// requestID takes a sane incoming X-Request-ID or makes one, and puts it on the
// response and in the request context.
func (s *Server) requestID(c *gin.Context) {
	id := c.GetHeader(HeaderRequestID)
	if !validRequestID(id) {
		id = newRequestID()
	}
	c.Request = c.Request.WithContext(context.WithValue(c.Request.Context(), ctxKey{}, id))
	c.Header(HeaderRequestID, id)
	c.Next()
}

// logger returns the service's logger with the request's id attached; handlers log
// through it so that every line of a request carries the id.
func (s *Server) logger(c *gin.Context) *slog.Logger {
	return s.log.With("request_id", RequestID(c.Request.Context()))
}

// route is the route template of the request ("/v1/facilities/:id"), or
// "unmatched" for a path no route serves, so that metrics labels stay few.
func route(c *gin.Context) string {
	if r := c.FullPath(); r != "" {
		return r
	}
	return "unmatched"
}

// observe logs one JSON line per request and records the request metrics.
func (s *Server) observe(c *gin.Context) {
	start := time.Now()
	s.metrics.inFlight.Inc()
	defer s.metrics.inFlight.Dec()
	c.Next()
	d := time.Since(start)
	status := c.Writer.Status()
	r := route(c)
	s.metrics.observeRequest(c.Request.Method, r, status, d)
	level := slog.LevelInfo
	switch {
	case status == http.StatusServiceUnavailable, status == http.StatusInsufficientStorage:
		// The store's condition, logged when it was met; not a fault of the code.
		level = slog.LevelWarn
	case status >= 500:
		level = slog.LevelError
	case status < 300 && (r == "/v1/plans" || r == "/v1/plans/batch" || strings.HasPrefix(r, "/v1/facilities") && c.Request.Method != http.MethodGet):
		s.storeWritten()
	}
	s.log.LogAttrs(c.Request.Context(), level, "request",
		slog.String("request_id", RequestID(c.Request.Context())),
		slog.String("method", c.Request.Method),
		slog.String("route", r),
		slog.String("path", c.Request.URL.Path),
		slog.Int("status", status),
		slog.Float64("duration_ms", float64(d.Microseconds())/1000),
		slog.Int("bytes", c.Writer.Size()),
	)
}

// recoverPanic turns a panic in a handler into a 500 problem carrying the request id and
// logs the panic with its stack. http.ErrAbortHandler is passed on, as net/http
// expects.
func (s *Server) recoverPanic(c *gin.Context) {
	defer func() {
		v := recover()
		if v == nil {
			return
		}
		if v == http.ErrAbortHandler {
			panic(v)
		}
		s.logger(c).Error("panic", "panic", fmt.Sprint(v), "stack", string(debug.Stack()))
		if c.Writer.Written() {
			c.Abort()
			return
		}
		s.fail(c, fmt.Errorf("panic: %v", v))
	}()
	c.Next()
}

// limitBody refuses bodies that declare more than BodyLimit bytes and caps the rest,
// so a reader sees *http.MaxBytesError past the limit (fail answers it with 413).
func (s *Server) limitBody(c *gin.Context) {
	if c.Request.ContentLength > BodyLimit {
		s.fail(c, &http.MaxBytesError{Limit: BodyLimit})
		return
	}
	if c.Request.Body != nil {
		c.Request.Body = http.MaxBytesReader(c.Writer, c.Request.Body, BodyLimit)
	}
	c.Next()
}
