package check

import (
	"fmt"
	"strings"
)

// MaxListed caps the field errors one error lists (a request body's, or a
// request's validation); the rest are counted in its message.
const MaxListed = 50

// Fields collects the field problems of one request or record, each named by
// its JSON path.
type Fields []FieldError

// Add appends the problem of field, its message formatted as fmt.Sprintf does.
func (fe *Fields) Add(field, format string, args ...any) {
	*fe = append(*fe, FieldError{Field: field, Message: fmt.Sprintf(format, args...)})
}

// Merge appends the field errors of err, each path prefixed by prefix (with a dot
// between when both are non-empty), and reports whether err was a CodeInvalid
// domain error. Other errors are left to the caller.
func (fe *Fields) Merge(prefix string, err error) bool {
	de, ok := err.(*Error)
	if !ok || de.Code != CodeInvalid {
		return false
	}
	if len(de.Fields) == 0 {
		fe.Add(prefix, "%s", de.Message)
		return true
	}
	for _, f := range de.Fields {
		*fe = append(*fe, FieldError{Field: JoinPath(prefix, f.Field), Message: f.Message})
	}
	return true
}

// Err returns the collected problems as one CodeInvalid error, or nil. It lists
// at most MaxListed of them and counts the rest.
func (fe Fields) Err() error {
	if len(fe) == 0 {
		return nil
	}
	msg := InvalidCount(len(fe))
	if len(fe) > MaxListed {
		msg += fmt.Sprintf(" (the first %d are listed)", MaxListed)
		fe = fe[:MaxListed:MaxListed]
	}
	return &Error{Code: CodeInvalid, Message: msg, Fields: fe}
}

// JoinPath joins JSON paths: "facility" + "balances[0].id", or "" + "x" = "x".
func JoinPath(prefix, path string) string {
	switch {
	case prefix == "":
		return path
	case path == "":
		return prefix
	case strings.HasPrefix(path, "["):
		return prefix + path
	}
	return prefix + "." + path
}
