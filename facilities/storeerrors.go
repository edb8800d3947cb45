package facilities

import "errors"

// Classes of store errors that are not faults of the request nor of the service's
// code: the API answers them with their own statuses.
var (
	// ErrUnavailable marks a store error that means the store does not answer now
	// (stopped, restarting, unreachable, out of connections, locked too long); the
	// request may succeed later. The API answers 503 with Retry-After.
	ErrUnavailable = errors.New("the store is unavailable")
	// ErrStorageFull marks a store error of a full disk or an exhausted quota. The
	// API answers 507 and reports itself unready for writes until a write succeeds.
	ErrStorageFull = errors.New("the store has no space left")
)

// ErrorClassifier is a Catalog that can tell which of its errors are of a class
// above: ClassifyError returns err wrapped with ErrUnavailable or ErrStorageFull
// (errors.Is finds both the class and the original), or err unchanged.
type ErrorClassifier interface {
	ClassifyError(err error) error
}

// classified wraps a store error with its class.
type classified struct {
	class, err error
}

func (c classified) Error() string   { return c.class.Error() + ": " + c.err.Error() }
func (c classified) Unwrap() []error { return []error{c.class, c.err} }

// Classify returns err marked with class (ErrUnavailable or ErrStorageFull), for
// the stores' ClassifyError; nil stays nil, a nil class leaves err as it is, and
// an error already of a class keeps it.
func Classify(err, class error) error {
	if err == nil || class == nil || errors.Is(err, ErrUnavailable) || errors.Is(err, ErrStorageFull) {
		return err
	}
	return classified{class: class, err: err}
}
