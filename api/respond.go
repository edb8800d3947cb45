package api

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"net/http"
	"reflect"
	"strconv"
	"strings"

	"github.com/gin-gonic/gin"

	"scalematch/facilities"
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
			err = checkFinite(v, nil)
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

// checkFinite returns nil when every number in v (a response, walked by its JSON
// field names) is finite, and otherwise a CodeUnprocessable error: the inputs lie
// inside their documented ranges but the models still overflow. It names the
// first non-finite result by its JSON path and the input that produced it, which
// input maps from the result's top-level field ("test" → "test"); nil input or an
// unmapped field names the body as a whole ("").
func checkFinite(v any, input func(top string) string) error {
	path, ok := nonFinite(reflect.ValueOf(v), "")
	if ok {
		return nil
	}
	field := ""
	if input != nil {
		top, _, _ := strings.Cut(path, ".")
		top, _, _ = strings.Cut(top, "[")
		field = input(top)
	}
	return &facilities.Error{Code: facilities.CodeUnprocessable,
		Message: fmt.Sprintf("the result %s is not a finite number: the inputs are inside their ranges but too extreme together for the models", path),
		Fields:  []facilities.FieldError{{Field: field, Message: fmt.Sprintf("makes %s overflow; bring it nearer to the usual range", path)}},
		Limits:  []string{"finite_result"}}
}

// nonFinite walks v and returns the JSON path of its first NaN or infinite float,
// and false; true when there is none.
func nonFinite(v reflect.Value, path string) (string, bool) {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		f := v.Float()
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return path, false
		}
	case reflect.Pointer, reflect.Interface:
		if !v.IsNil() {
			return nonFinite(v.Elem(), path)
		}
	case reflect.Struct:
		t := v.Type()
		for i := range t.NumField() {
			sf := t.Field(i)
			if !sf.IsExported() {
				continue
			}
			tag := sf.Tag.Get("json")
			if tag == "-" {
				continue
			}
			name, _, _ := strings.Cut(tag, ",")
			p := path
			if !sf.Anonymous || name != "" {
				if name == "" {
					name = sf.Name
				}
				p = joinPath(path, name)
			}
			if q, ok := nonFinite(v.Field(i), p); !ok {
				return q, false
			}
		}
	case reflect.Slice, reflect.Array:
		for i := range v.Len() {
			if q, ok := nonFinite(v.Index(i), path+"["+strconv.Itoa(i)+"]"); !ok {
				return q, false
			}
		}
	case reflect.Map:
		iter := v.MapRange()
		for iter.Next() {
			if q, ok := nonFinite(iter.Value(), joinPath(path, fmt.Sprint(iter.Key()))); !ok {
				return q, false
			}
		}
	}
	return "", true
}
