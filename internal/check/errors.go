package check

import (
	"errors"
	"fmt"
	"strings"
)

// Code classifies a domain error; the API maps each code to one HTTP status in one place.
type Code string

// Error codes.
const (
	CodeInvalid              Code = "invalid"               // bad input: 400
	CodeNotFound             Code = "not_found"             // 404
	CodeConflict             Code = "conflict"              // 409 (e.g. id exists)
	CodeUnprocessable        Code = "unprocessable"         // valid input, no feasible answer: 422
	CodeUnauthorized         Code = "unauthorized"          // no credentials: 401
	CodeForbidden            Code = "forbidden"             // wrong credentials: 403
	CodePreconditionFailed   Code = "precondition_failed"   // stale If-Match: 412
	CodePreconditionRequired Code = "precondition_required" // missing If-Match: 428
)

// FieldError names one bad field by its JSON path ("flight.altitude") and says why.
type FieldError struct {
	Field   string `json:"field"`
	Message string `json:"message"`
}

// Error is the domain error of scalematch. Fields lists every bad field (for
// CodeInvalid); Limits names the limits that conflict (for CodeUnprocessable).
type Error struct {
	Code    Code
	Message string
	Fields  []FieldError
	Limits  []string
}

func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.Message)
	for i, f := range e.Fields {
		if i == 0 && e.Message != "" {
			b.WriteString(": ")
		} else if i > 0 {
			b.WriteString("; ")
		}
		b.WriteString(f.Field)
		b.WriteString(": ")
		b.WriteString(f.Message)
	}
	if len(e.Limits) > 0 {
		b.WriteString(" (limits: ")
		b.WriteString(strings.Join(e.Limits, ", "))
		b.WriteString(")")
	}
	return b.String()
}

// Invalid returns a CodeInvalid error listing the given field problems, or nil when
// there are none.
func Invalid(message string, fields []FieldError) error {
	if len(fields) == 0 {
		return nil
	}
	return &Error{Code: CodeInvalid, Message: message, Fields: fields}
}

// ErrorCode returns the code of a domain error in err's chain, or "" when there is none.
func ErrorCode(err error) Code {
	var e *Error
	if errors.As(err, &e) {
		return e.Code
	}
	return ""
}

// InvalidCount is the message of a CodeInvalid error that lists n bad fields:
// "1 field is invalid", "2 fields are invalid".
func InvalidCount(n int) string {
	if n == 1 {
		return "1 field is invalid"
	}
	return fmt.Sprintf("%d fields are invalid", n)
}
