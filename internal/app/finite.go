package app

import (
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"

	"scalematch/internal/check"
	"scalematch/internal/loads"
)

// CheckFinite returns nil when every number in v (a response, walked by its JSON
// field names) is finite, and otherwise a CodeUnprocessable error: the inputs lie
// inside their documented ranges but the models still overflow. It names the
// first non-finite result by its JSON path and the input that produced it, which
// input maps from the result's top-level field ("test" → "test"); nil input or an
// unmapped field names the body as a whole ("").
func CheckFinite(v any, input func(top string) string) error {
	rv := reflect.ValueOf(v)
	if allFinite(rv) {
		return nil
	}
	path, _ := nonFinite(rv, "")
	field := ""
	if input != nil {
		top, _, _ := strings.Cut(path, ".")
		top, _, _ = strings.Cut(top, "[")
		field = input(top)
	}
	return &check.Error{Code: check.CodeUnprocessable,
		Message: fmt.Sprintf("the result %s is not a finite number: the inputs are inside their ranges but too extreme together for the models", path),
		Fields:  []check.FieldError{{Field: field, Message: fmt.Sprintf("makes %s overflow; bring it nearer to the usual range", path)}},
		Limits:  []string{"finite_result"}}
}

// ceilingType is loads.Ceiling, whose +Inf is no bound (JSON null).
var ceilingType = reflect.TypeFor[loads.Ceiling]()

// finite reports whether the float v is a finite number or a Ceiling's +Inf.
func finite(v reflect.Value) bool {
	f := v.Float()
	if math.IsInf(f, 1) && v.Type() == ceilingType {
		return true
	}
	return !math.IsNaN(f) && !math.IsInf(f, 0)
}

// allFinite reports whether every float in v is finite. It walks v as nonFinite
// does but builds no paths, which cost most of the walk (a plan answer has
// thousands of numbers); nonFinite names the culprit when there is one.
func allFinite(v reflect.Value) bool {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		return finite(v)
	case reflect.Pointer, reflect.Interface:
		return v.IsNil() || allFinite(v.Elem())
	case reflect.Struct:
		t := v.Type()
		for i := range t.NumField() {
			sf := t.Field(i)
			if !sf.IsExported() || sf.Tag.Get("json") == "-" {
				continue
			}
			if !allFinite(v.Field(i)) {
				return false
			}
		}
	case reflect.Slice, reflect.Array:
		for i := range v.Len() {
			if !allFinite(v.Index(i)) {
				return false
			}
		}
	case reflect.Map:
		iter := v.MapRange()
		for iter.Next() {
			if !allFinite(iter.Value()) {
				return false
			}
		}
	}
	return true
}

// nonFinite walks v and returns the JSON path of its first NaN or infinite float,
// and false; true when there is none.
func nonFinite(v reflect.Value, path string) (string, bool) {
	switch v.Kind() {
	case reflect.Float32, reflect.Float64:
		if !finite(v) {
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
				p = check.JoinPath(path, name)
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
			if q, ok := nonFinite(iter.Value(), check.JoinPath(path, fmt.Sprint(iter.Key()))); !ok {
				return q, false
			}
		}
	}
	return "", true
}
