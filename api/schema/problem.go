package schema

import "scalematch/internal/check"

// ContentTypeProblem is the media type of error responses (RFC 9457).
const ContentTypeProblem = "application/problem+json"

// Problem is an error response: RFC 9457 problem details with two extensions,
// Errors (every bad field by its JSON path) and RequestID.
//
// Type is a relative URI, "/problems/" followed by one of these kinds, each always
// with the same status and title:
//
//	invalid-input          400  the request is malformed or a field is out of range
//	unauthorized           401  a write needs a bearer token (WWW-Authenticate: Bearer)
//	forbidden              403  the token may not do this, or writes are switched off
//	not-found              404  no such facility, plan or route
//	method-not-allowed     405  the route exists but not for this method
//	not-acceptable         406  Accept names no format the answer is written in
//	conflict               409  the id exists already
//	request-timeout        408  the request body did not arrive in time
//	precondition-failed    412  If-Match names a version that is no longer current
//	body-too-large         413  the request body is larger than BodyLimit
//	unsupported-media-type 415  the body is not JSON (Content-Type), or is encoded
//	unprocessable          422  the input is valid but no plan satisfies the hard limits
//	precondition-required  428  a change needs If-Match
//	internal               500  a fault of the service; the log has the details
//	unavailable            503  the store does not answer, or the request ran out of time
//	                            (Retry-After: seconds to wait)
//	insufficient-storage   507  the store's disk is full; the service reports itself
//	                            unready (/readyz) until a write succeeds
type Problem struct {
	// Type identifies the kind of problem: "/problems/invalid-input" and so on.
	Type string `json:"type" example:"/problems/invalid-input"`
	// Title is the kind's short, fixed summary.
	Title string `json:"title" example:"Invalid input"`
	// Status is the HTTP status code.
	Status int `json:"status" example:"400"`
	// Detail explains this occurrence.
	Detail string `json:"detail,omitempty" example:"2 fields are invalid"`
	// Instance is the request path of this occurrence.
	Instance string `json:"instance,omitempty" example:"/v1/plans"`
	// Errors names every bad field by its JSON path ("flight.altitude",
	// "balances[1].limits.normal"); "" names the body as a whole.
	Errors []check.FieldError `json:"errors,omitempty"`
	// Limits names the limits that conflict, for unprocessable.
	Limits []string `json:"limits,omitempty"`
	// RequestID is the request's X-Request-ID, to find the request in the log.
	RequestID string `json:"request_id,omitempty" example:"3f2a9c0e5b7d41e8a6c2d9f01b3e7a54"`
}
