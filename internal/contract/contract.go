// Package contract checks HTTP requests and answers against the service's
// OpenAPI 3 document (docs.OpenAPI3) with kin-openapi's openapi3filter: the
// status must be documented for the operation, the documented headers present
// and the body must match the documented schema of its content type.
package contract

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"strings"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/getkin/kin-openapi/openapi3filter"
	"github.com/getkin/kin-openapi/routers"
	"github.com/getkin/kin-openapi/routers/legacy"

	"scalematch/docs"
)

// Validator checks requests and answers against one OpenAPI 3 document. It is
// safe for concurrent use.
type Validator struct {
	doc    *openapi3.T
	router routers.Router
}

func init() {
	// The answers that are not JSON are checked for their type and headers;
	// their bytes are taken as they are.
	for _, ct := range []string{"text/html", "text/csv", "application/x-ndjson", "image/svg+xml", "image/png", "application/pdf"} {
		openapi3filter.RegisterBodyDecoder(ct, openapi3filter.FileBodyDecoder)
	}
}

// New returns a Validator of the served document, docs.OpenAPI3.
func New() (*Validator, error) {
	return FromDocument(docs.OpenAPI3)
}

// FromDocument returns a Validator of the OpenAPI 3 document in JSON.
func FromDocument(doc []byte) (*Validator, error) {
	d, err := openapi3.NewLoader().LoadFromData(doc)
	if err != nil {
		return nil, fmt.Errorf("contract: reading the document: %w", err)
	}
	if err := d.Validate(context.Background()); err != nil {
		return nil, fmt.Errorf("contract: the document is not valid: %w", err)
	}
	// The paths are matched on any host: the document's one server is "/".
	d.Servers = nil
	r, err := legacy.NewRouter(d)
	if err != nil {
		return nil, fmt.Errorf("contract: %w", err)
	}
	return &Validator{doc: d, router: r}, nil
}

func options() *openapi3filter.Options {
	return &openapi3filter.Options{
		IncludeResponseStatus: true,
		MultiError:            true,
		// The write token is the service's to check; the document only names it.
		AuthenticationFunc: func(context.Context, *openapi3filter.AuthenticationInput) error { return nil },
	}
}

// Request checks a request, with its body, against the operation it names.
func (v *Validator) Request(r *http.Request, body []byte) error {
	route, params, err := v.router.FindRoute(r)
	if err != nil {
		return fmt.Errorf("%s %s: %w", r.Method, r.URL.Path, err)
	}
	r2 := r.Clone(r.Context())
	r2.Body = io.NopCloser(bytes.NewReader(body))
	if mt, _, err := mime.ParseMediaType(r.Header.Get("Content-Type")); err == nil && strings.HasPrefix(mt, "application/") && strings.HasSuffix(mt, "+json") {
		// The service reads any application/…+json type as application/json.
		r2.Header.Set("Content-Type", "application/json")
	}
	in := &openapi3filter.RequestValidationInput{Request: r2, PathParams: params, Route: route, Options: options()}
	if err := openapi3filter.ValidateRequest(r.Context(), in); err != nil {
		return fmt.Errorf("request %s %s: %w", r.Method, r.URL.Path, err)
	}
	return nil
}

// Response checks the answer (status, header, body) to the request r. An
// answer to a path the document does not have must be the not-found problem
// (404), one to a method the path does not serve the method-not-allowed
// problem (405).
func (v *Validator) Response(r *http.Request, status int, header http.Header, body []byte) error {
	route, params, err := v.router.FindRoute(r)
	if err == nil && strings.HasSuffix(r.URL.Path, "/") != strings.HasSuffix(route.Path, "/") {
		// The router forgives a trailing slash; the service does not.
		err = routers.ErrPathNotFound
	}
	switch {
	case isRouteError(err, routers.ErrPathNotFound):
		return v.problem(r, "not-found", http.StatusNotFound, status, header, body)
	case isRouteError(err, routers.ErrMethodNotAllowed):
		return v.problem(r, "method-not-allowed", http.StatusMethodNotAllowed, status, header, body)
	case err != nil:
		return fmt.Errorf("%s %s: %w", r.Method, r.URL.Path, err)
	}
	in := &openapi3filter.ResponseValidationInput{
		RequestValidationInput: &openapi3filter.RequestValidationInput{Request: r, PathParams: params, Route: route, Options: options()},
		Status:                 status,
		Header:                 header,
		Options:                options(),
	}
	in.SetBodyBytes(body)
	if err := openapi3filter.ValidateResponse(r.Context(), in); err != nil {
		return fmt.Errorf("answer %d to %s %s: %w", status, r.Method, r.URL.Path, err)
	}
	return nil
}

// isRouteError reports whether err is the router's error like want.
func isRouteError(err, want error) bool {
	var re *routers.RouteError
	return errors.As(err, &re) && re.Reason == want.Error()
}

// problem checks an answer outside every operation against the problem schema
// of kind.
func (v *Validator) problem(r *http.Request, kind string, want, status int, header http.Header, body []byte) error {
	what := fmt.Sprintf("answer %d to %s %s (no such operation)", status, r.Method, r.URL.Path)
	if status != want {
		return fmt.Errorf("%s: want the %s problem, %d", what, kind, want)
	}
	if ct := header.Get("Content-Type"); ct != "application/problem+json" {
		return fmt.Errorf("%s: Content-Type %q, want application/problem+json", what, ct)
	}
	for _, h := range []string{"X-Request-ID", "X-Content-Type-Options", "Cache-Control"} {
		if header.Get(h) == "" {
			return fmt.Errorf("%s: no %s header", what, h)
		}
	}
	s := v.doc.Components.Schemas["problem."+kind]
	if s == nil {
		return fmt.Errorf("%s: the document has no schema problem.%s", what, kind)
	}
	var value any
	if err := json.Unmarshal(body, &value); err != nil {
		return fmt.Errorf("%s: %w", what, err)
	}
	if err := s.Value.VisitJSON(value, openapi3.MultiErrors(), openapi3.VisitAsResponse()); err != nil {
		return fmt.Errorf("%s: %w", what, err)
	}
	return nil
}

// Result is what Handler saw of one exchange.
type Result struct {
	Method, Path string
	Status       int
	// Err is the mismatch with the document; nil when the answer matches.
	Err error
}

// Handler serves next and checks every exchange: the answer always, and the
// request too when it was answered 2xx (what the service took, the document
// must take), except a plan batch's, whose items are answered one by one and may
// each be refused. report receives each result. An exchange is not checked when
// skip says so, or when the client went away before the answer (it never
// receives one).
func (v *Validator) Handler(next http.Handler, skip func(*http.Request) bool, report func(Result)) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if skip != nil && skip(r) {
			next.ServeHTTP(w, r)
			return
		}
		var reqBody bytes.Buffer
		if r.Body != nil && r.Body != http.NoBody {
			r.Body = teeBody{io.TeeReader(r.Body, &reqBody), r.Body}
		}
		tw := &teeWriter{ResponseWriter: w}
		next.ServeHTTP(tw, r)
		if r.Context().Err() != nil {
			return
		}
		status := tw.status
		if status == 0 {
			status = http.StatusOK
		}
		res := Result{Method: r.Method, Path: r.URL.Path, Status: status}
		res.Err = v.Response(r, status, w.Header(), tw.body.Bytes())
		if res.Err == nil && status >= 200 && status < 300 && !strings.HasSuffix(r.URL.Path, "/batch") {
			res.Err = v.Request(r, reqBody.Bytes())
		}
		report(res)
	})
}

// teeBody copies what the handler reads of a request body.
type teeBody struct {
	io.Reader
	io.Closer
}

// teeWriter passes an answer on and keeps a copy of its status and body.
type teeWriter struct {
	http.ResponseWriter
	status int
	body   bytes.Buffer
}

func (w *teeWriter) WriteHeader(code int) {
	if w.status == 0 || w.status < 200 {
		w.status = code
	}
	w.ResponseWriter.WriteHeader(code)
}

func (w *teeWriter) Write(b []byte) (int, error) {
	if w.status == 0 {
		w.status = http.StatusOK
	}
	w.body.Write(b)
	return w.ResponseWriter.Write(b)
}

// Flush passes a flush on, when the writer below can.
func (w *teeWriter) Flush() {
	if f, ok := w.ResponseWriter.(http.Flusher); ok {
		f.Flush()
	}
}

// Unwrap gives http.ResponseController the writer below.
func (w *teeWriter) Unwrap() http.ResponseWriter { return w.ResponseWriter }
