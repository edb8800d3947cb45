package api

import (
	"encoding/json"
	"errors"
	"io"
	"net/http"
	"strconv"

	"github.com/gin-gonic/gin"

	"scalematch/internal/app"
	"scalematch/internal/unitjson"
)

// Every answer with a body goes through answer or answerBytes: the body is
// complete before the status line is written, so an encoding failure becomes a
// problem, never a 200 without a body; requireBody (middleware) catches a handler
// that writes nothing at all.

// answer encodes v as JSON and answers it with status. A value that cannot be
// encoded (a non-finite number the finite checks missed) is answered with the
// problem of its error.
func (s *Server) answer(c *gin.Context, status int, v any) {
	b, err := json.Marshal(v)
	if err != nil {
		var uve *json.UnsupportedValueError
		if errors.As(err, &uve) {
			err = app.CheckFinite(v, nil)
		}
		s.fail(c, err)
		return
	}
	s.answerBytes(c, status, "application/json; charset=utf-8", b)
}

// answerBytes answers status with body of the given content type and its
// Content-Length (a body larger than net/http's buffer would otherwise go out
// chunked, in more writes). An empty body is a fault of the service.
func (s *Server) answerBytes(c *gin.Context, status int, contentType string, body []byte) {
	if len(body) == 0 {
		s.fail(c, errors.New("a handler produced an empty body"))
		return
	}
	if status == http.StatusOK && (c.Request.Method == http.MethodGet || c.Request.Method == http.MethodHead) {
		// Every GET answer carries an entity tag, its own (a facility's version) or
		// one of its bytes, and a matching If-None-Match is a 304.
		etag := c.Writer.Header().Get("ETag")
		if etag == "" {
			etag = bodyETag(body)
			c.Header("ETag", etag)
		}
		if notModified(c, etag) {
			return
		}
	}
	c.Header("Content-Length", strconv.Itoa(len(body)))
	c.Data(status, contentType, body)
}

// errNoAnswer is the fault of a handler that returned without answering.
var errNoAnswer = errors.New("the handler returned without writing an answer")

// requireBody answers 500 when the handlers after it return without writing
// anything for a status that needs a body: no route can answer 200 without one.
func (s *Server) requireBody(c *gin.Context) {
	c.Next()
	if c.Writer.Written() || c.IsAborted() && c.Writer.Status() >= 400 {
		return
	}
	switch st := c.Writer.Status(); {
	case st == http.StatusNoContent, st == http.StatusNotModified, st < 200:
		return
	case c.Request.Method == http.MethodHead:
		return
	}
	s.fail(c, errNoAnswer)
}

// decodeBody reads the request body (at most BodyLimit bytes) into dst with unitjson.Decode.
// On failure it answers the request with the problem (400 for bad input, 413 for a
// body too large) and returns false; the handler then just returns.
func (s *Server) decodeBody(c *gin.Context, dst any) bool {
	_, ok := s.decodeBodyBytes(c, dst)
	return ok
}

// decodeBodyBytes is decodeBody that also returns the body as read, for a
// request kept to be run later (a campaign job).
func (s *Server) decodeBodyBytes(c *gin.Context, dst any) ([]byte, bool) {
	if c.Request.Body == nil {
		s.fail(c, unitjson.BodyError("the body is empty: want a JSON object"))
		return nil, false
	}
	var body []byte
	var err error
	if n := c.Request.ContentLength; n > 0 && n <= BodyLimit {
		// One allocation of the declared size (net/http's body reader stops there
		// and fails a shorter body with io.ErrUnexpectedEOF, as io.ReadAll would).
		body = make([]byte, n)
		_, err = io.ReadFull(c.Request.Body, body)
	} else {
		body, err = io.ReadAll(c.Request.Body)
	}
	err = bodyReadError(err, c.Request.ContentLength)
	if err == nil {
		err = unitjson.Decode(body, dst)
	}
	if err != nil {
		s.fail(c, err)
		return nil, false
	}
	return body, true
}
