package facilities

import (
	"errors"
	"fmt"

	"scalematch/internal/check"
)

// The domain error, its codes and its field errors are defined in internal/check,
// the project's one home for errors and validation reports; facilities names them
// again so that its own code and its callers read as before.
type (
	// Code is check.Code.
	Code = check.Code
	// FieldError is check.FieldError.
	FieldError = check.FieldError
	// Error is check.Error.
	Error = check.Error
)

// Error codes (check's).
const (
	CodeInvalid              = check.CodeInvalid
	CodeNotFound             = check.CodeNotFound
	CodeConflict             = check.CodeConflict
	CodeUnprocessable        = check.CodeUnprocessable
	CodeUnauthorized         = check.CodeUnauthorized
	CodeForbidden            = check.CodeForbidden
	CodePreconditionFailed   = check.CodePreconditionFailed
	CodePreconditionRequired = check.CodePreconditionRequired
)

// Invalid is check.Invalid.
func Invalid(message string, fields []FieldError) error { return check.Invalid(message, fields) }

// ErrorCode is check.ErrorCode.
func ErrorCode(err error) Code { return check.ErrorCode(err) }

// InvalidCount is check.InvalidCount.
func InvalidCount(n int) string { return check.InvalidCount(n) }

// CheckFacilityID returns a CodeInvalid error when a catalog write names no facility id.
func CheckFacilityID(id string) error {
	if id == "" {
		return Invalid("facility", []FieldError{{Field: "id", Message: "must not be empty"}})
	}
	return nil
}

// CheckRecord returns a CodeInvalid error when f may not be stored: it names no
// id, or a field lies outside its documented range (Validate). Both stores call it
// before every write, so that no record can poison the plans made against it.
func CheckRecord(f Facility) error {
	if err := CheckFacilityID(f.ID); err != nil {
		return err
	}
	f.Version = 0
	return f.Validate()
}

// StoredRecordInvalid is the CodeUnprocessable error of a catalog record, stored
// before its fields had their present ranges, that Validate now refuses: plans
// against it are refused, naming each field, until it is corrected.
func StoredRecordInvalid(f Facility, err error) error {
	var de *Error
	if !errors.As(err, &de) {
		return err
	}
	fields := make([]FieldError, len(de.Fields))
	for i, fe := range de.Fields {
		fields[i] = FieldError{Field: "facility." + fe.Field, Message: fe.Message}
	}
	return &Error{Code: CodeUnprocessable, Fields: fields, Limits: []string{"catalog_record"},
		Message: fmt.Sprintf("the catalog record of facility %q (version %d) has values outside their ranges; correct it with PUT /v1/facilities/%s", f.ID, f.Version, f.ID)}
}

// FacilityNotFound is the CodeNotFound error of a catalog that has no facility id.
func FacilityNotFound(id string) error {
	return &Error{Code: CodeNotFound, Message: fmt.Sprintf("no facility %q in the catalog", id)}
}

// StaleVersion is the CodePreconditionFailed error of a change whose If-Match
// version is not the facility's current one.
func StaleVersion(id string, current, ifMatch int) error {
	return &Error{Code: CodePreconditionFailed,
		Message: fmt.Sprintf("facility %q is at version %d, not %d: someone changed it; read it again and reapply your change", id, current, ifMatch)}
}
