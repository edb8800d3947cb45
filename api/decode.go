package api

import (
	"bytes"
	"encoding"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"sync"

	"github.com/gin-gonic/gin"

	"scalematch/facilities"
	"scalematch/similarity"
)

// Unit tags. A struct field's `unit:"..."` tag names its SI unit (see
// similarity.ToSI for the names); these two are special.
const (
	// UnitScale marks a model scale: a number, or a ratio string such as "1:16".
	UnitScale = "scale"
	// UnitNone marks a dimensionless float inside a struct whose field carries a unit
	// tag, so that the unit is not inherited.
	UnitNone = "-"
)

// maxFieldErrors caps the field errors one body can produce; the rest are counted.
const maxFieldErrors = 50

// Decode reads the JSON object in body into dst, a non-nil pointer to a struct,
// strictly and with units:
//
//   - an object key that matches no field (exactly, by its json tag) is an error
//     naming its path ("article.aero.cl_maks: unknown field");
//   - a float field with a `unit:"..."` tag takes a JSON number (SI) or a string with
//     a unit, converted by similarity.ToSI with the tag as the field's unit ("2.5 bar"
//     into a "Pa" field gives 250000). The tag is inherited: on a struct-typed field it
//     applies to the untagged floats inside it (Range.Min and Range.Max), on a slice,
//     array, map or pointer to each element. A float tagged UnitNone inherits nothing.
//     A float tagged UnitScale takes a number or a ratio "1:16" (0.0625);
//   - a value of the wrong JSON type names its path and the type wanted;
//   - types with their own UnmarshalJSON or UnmarshalText (facilities.Medium) are
//     decoded by it, and its error is reported at the value's path;
//   - numbers must be finite and fit their field; the body must be one JSON value
//     with nothing after it, and not empty. JSON null leaves a field as it is.
//
// Every problem is collected, and all are returned at once as a *facilities.Error
// with Code facilities.CodeInvalid whose Fields name the JSON paths
// ("balances[1].limits.normal"); the path "" is the body as a whole. Any other
// error means dst is not a pointer to a struct. dst is changed only when Decode
// returns nil.
func Decode(body []byte, dst any) error {
	rv := reflect.ValueOf(dst)
	if rv.Kind() != reflect.Pointer || rv.IsNil() || rv.Elem().Kind() != reflect.Struct {
		return fmt.Errorf("api: Decode needs a non-nil pointer to a struct, not %T", dst)
	}
	if len(bytes.TrimSpace(body)) == 0 {
		return bodyError("the body is empty: want a JSON object")
	}
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.UseNumber()
	var tree any
	if err := dec.Decode(&tree); err != nil {
		return bodyError(syntaxMessage(err))
	}
	if _, err := dec.Token(); err != io.EOF {
		return bodyError("there is data after the JSON value")
	}
	w := walker{}
	tree = w.walk(tree, rv.Elem().Type(), "", "")
	if len(w.errs) > 0 {
		msg := countFields(len(w.errs) + w.dropped)
		if w.dropped > 0 {
			msg += fmt.Sprintf(" (the first %d are listed)", len(w.errs))
		}
		return &facilities.Error{Code: facilities.CodeInvalid, Message: msg, Fields: w.errs}
	}
	raw := body
	if w.changed {
		var err error
		if raw, err = json.Marshal(tree); err != nil {
			return bodyError(err.Error())
		}
	}
	// The walk has checked every key and type; this strict pass fills dst with
	// encoding/json's semantics and catches whatever the walk did not foresee.
	fresh := reflect.New(rv.Elem().Type())
	fresh.Elem().Set(rv.Elem())
	sd := json.NewDecoder(bytes.NewReader(raw))
	sd.DisallowUnknownFields()
	if err := sd.Decode(fresh.Interface()); err != nil {
		var ute *json.UnmarshalTypeError
		if errors.As(err, &ute) {
			return fieldError(ute.Field, fmt.Sprintf("want %s, got a JSON %s", ute.Type, ute.Value))
		}
		return bodyError(err.Error())
	}
	rv.Elem().Set(fresh.Elem())
	return nil
}

func bodyError(msg string) error { return fieldError("", msg) }

func fieldError(path, msg string) error {
	return &facilities.Error{Code: facilities.CodeInvalid, Message: countFields(1),
		Fields: []facilities.FieldError{{Field: path, Message: msg}}}
}

// syntaxMessage turns a JSON syntax error into a message with the byte offset.
func syntaxMessage(err error) string {
	var se *json.SyntaxError
	switch {
	case errors.As(err, &se):
		return fmt.Sprintf("the body is not valid JSON at byte %d: %v", se.Offset, se)
	case errors.Is(err, io.ErrUnexpectedEOF):
		return "the body ends in the middle of a JSON value"
	}
	return "the body is not valid JSON: " + err.Error()
}

// walker walks a decoded JSON tree alongside a Go type, rewrites unit strings into
// numbers and collects problems.
type walker struct {
	errs    []facilities.FieldError
	dropped int
	changed bool
}

func (w *walker) add(path, msg string) {
	if len(w.errs) >= maxFieldErrors {
		w.dropped++
		return
	}
	w.errs = append(w.errs, facilities.FieldError{Field: path, Message: msg})
}

func joinKey(path, key string) string {
	if path == "" {
		return key
	}
	return path + "." + key
}

func joinIndex(path string, i int) string {
	return path + "[" + strconv.Itoa(i) + "]"
}

// jsonKind names a decoded JSON value's type for messages.
func jsonKind(v any) string {
	switch v.(type) {
	case map[string]any:
		return "an object"
	case []any:
		return "an array"
	case string:
		return "a string"
	case json.Number:
		return "a number"
	case bool:
		return "a boolean"
	}
	return "null"
}

var (
	jsonUnmarshaler = reflect.TypeFor[json.Unmarshaler]()
	textUnmarshaler = reflect.TypeFor[encoding.TextUnmarshaler]()
)

// walk checks v against t and returns v with unit strings replaced by numbers.
// unit is the unit tag in force ("" none).
func (w *walker) walk(v any, t reflect.Type, unit, path string) any {
	if v == nil {
		return nil
	}
	for t.Kind() == reflect.Pointer && !t.Implements(jsonUnmarshaler) && !t.Implements(textUnmarshaler) {
		t = t.Elem()
	}
	pt := t // the pointer type whose methods decode t
	if t.Kind() != reflect.Pointer {
		pt = reflect.PointerTo(t)
	}
	switch {
	case pt.Implements(jsonUnmarshaler):
		raw, err := json.Marshal(v)
		if err == nil {
			err = reflect.New(pt.Elem()).Interface().(json.Unmarshaler).UnmarshalJSON(raw)
		}
		if err != nil {
			w.add(path, err.Error())
		}
		return v
	case pt.Implements(textUnmarshaler):
		s, ok := v.(string)
		if !ok {
			w.add(path, "want a string, got "+jsonKind(v))
			return v
		}
		if err := reflect.New(pt.Elem()).Interface().(encoding.TextUnmarshaler).UnmarshalText([]byte(s)); err != nil {
			w.add(path, err.Error())
		}
		return v
	}
	switch t.Kind() {
	case reflect.Bool:
		if _, ok := v.(bool); !ok {
			w.add(path, "want true or false, got "+jsonKind(v))
		}
	case reflect.String:
		if _, ok := v.(string); !ok {
			w.add(path, "want a string, got "+jsonKind(v))
		}
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		n, ok := v.(json.Number)
		if !ok {
			w.add(path, "want an integer, got "+jsonKind(v))
			break
		}
		if _, err := strconv.ParseInt(string(n), 10, t.Bits()); err != nil {
			w.add(path, fmt.Sprintf("want an integer from %d to %d, got %s", int64(-1)<<(t.Bits()-1), uint64(1)<<(t.Bits()-1)-1, n))
		}
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		n, ok := v.(json.Number)
		if !ok {
			w.add(path, "want an integer, got "+jsonKind(v))
			break
		}
		if _, err := strconv.ParseUint(string(n), 10, t.Bits()); err != nil {
			w.add(path, fmt.Sprintf("want an integer from 0 to %d, got %s", uint64(math.MaxUint64)>>(64-t.Bits()), n))
		}
	case reflect.Float32, reflect.Float64:
		return w.float(v, t.Bits(), unit, path)
	case reflect.Struct:
		return w.object(v, t, unit, path)
	case reflect.Slice, reflect.Array:
		if t.Kind() == reflect.Slice && t.Elem().Kind() == reflect.Uint8 {
			if _, ok := v.(string); !ok {
				w.add(path, "want a base64 string, got "+jsonKind(v))
			}
			break
		}
		a, ok := v.([]any)
		if !ok {
			w.add(path, "want an array, got "+jsonKind(v))
			break
		}
		if t.Kind() == reflect.Array && len(a) > t.Len() {
			w.add(path, fmt.Sprintf("want at most %d elements, got %d", t.Len(), len(a)))
			break
		}
		for i, e := range a {
			a[i] = w.walk(e, t.Elem(), unit, joinIndex(path, i))
		}
	case reflect.Map:
		m, ok := v.(map[string]any)
		if !ok {
			w.add(path, "want an object, got "+jsonKind(v))
			break
		}
		keys := make([]string, 0, len(m))
		for k := range m {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			if !w.mapKey(k, t.Key(), joinKey(path, k)) {
				continue
			}
			m[k] = w.walk(m[k], t.Elem(), unit, joinKey(path, k))
		}
	case reflect.Interface:
		// Any JSON value; encoding/json checks what remains.
	default:
		w.add(path, "this field cannot be set from JSON")
	}
	return v
}

// mapKey checks that k can be a key of type kt.
func (w *walker) mapKey(k string, kt reflect.Type, path string) bool {
	var err error
	switch {
	case reflect.PointerTo(kt).Implements(textUnmarshaler):
		err = reflect.New(kt).Interface().(encoding.TextUnmarshaler).UnmarshalText([]byte(k))
	case kt.Kind() == reflect.String:
	case kt.Kind() >= reflect.Int && kt.Kind() <= reflect.Int64:
		_, err = strconv.ParseInt(k, 10, kt.Bits())
	case kt.Kind() >= reflect.Uint && kt.Kind() <= reflect.Uintptr:
		_, err = strconv.ParseUint(k, 10, kt.Bits())
	default:
		err = errors.New("this key type cannot be set from JSON")
	}
	if err != nil {
		w.add(path, "bad key: "+err.Error())
		return false
	}
	return true
}

// float checks a number, or converts a unit string, for a float field of the given
// size in bits.
func (w *walker) float(v any, bits int, unit, path string) any {
	switch x := v.(type) {
	case json.Number:
		if _, err := strconv.ParseFloat(string(x), bits); err != nil {
			w.add(path, fmt.Sprintf("the number %s is out of range", x))
		}
		return v
	case string:
		var f float64
		var err error
		switch unit {
		case "", UnitNone:
			w.add(path, "want a number, got a string")
			return v
		case UnitScale:
			f, err = parseScale(x)
		default:
			f, err = similarity.ToSI(x, unit)
		}
		if err != nil {
			w.add(path, err.Error())
			return v
		}
		if math.IsNaN(f) || math.IsInf(f, 0) || (bits == 32 && math.Abs(f) > math.MaxFloat32) {
			w.add(path, fmt.Sprintf("%q is out of range", x))
			return v
		}
		w.changed = true
		return json.Number(strconv.FormatFloat(f, 'g', -1, bits))
	}
	switch unit {
	case "", UnitNone:
		w.add(path, "want a number, got "+jsonKind(v))
	case UnitScale:
		w.add(path, `want a number or a ratio such as "1:16", got `+jsonKind(v))
	default:
		w.add(path, fmt.Sprintf("want a number (in %s) or a string with a unit, got %s", unit, jsonKind(v)))
	}
	return v
}

// parseScale reads a model scale "a:b" (a/b, both positive and finite).
func parseScale(s string) (float64, error) {
	a, b, ok := strings.Cut(s, ":")
	if ok {
		x, errA := strconv.ParseFloat(strings.TrimSpace(a), 64)
		y, errB := strconv.ParseFloat(strings.TrimSpace(b), 64)
		if errA == nil && errB == nil && x > 0 && y > 0 && !math.IsInf(x, 0) && !math.IsInf(y, 0) {
			return x / y, nil
		}
	}
	return 0, fmt.Errorf(`scale %q: want a number or a ratio of two positive numbers such as "1:16"`, s)
}

// object checks a JSON object against struct type t.
func (w *walker) object(v any, t reflect.Type, unit, path string) any {
	m, ok := v.(map[string]any)
	if !ok {
		w.add(path, "want an object, got "+jsonKind(v))
		return v
	}
	fields := structFields(t)
	seen := 0
	for _, f := range fields.list {
		fv, ok := m[f.name]
		if !ok {
			continue
		}
		seen++
		u := f.unit
		if !f.tagged {
			u = unit
		}
		m[f.name] = w.walk(fv, f.typ, u, joinKey(path, f.name))
	}
	if seen < len(m) {
		var unknown []string
		for k := range m {
			if _, ok := fields.byName[k]; !ok {
				unknown = append(unknown, k)
			}
		}
		sort.Strings(unknown)
		for _, k := range unknown {
			w.add(joinKey(path, k), "unknown field")
		}
	}
	return v
}

// field is one JSON-visible field of a struct, with embedded structs flattened.
type field struct {
	name   string
	typ    reflect.Type
	unit   string
	tagged bool
}

type fieldSet struct {
	list   []field
	byName map[string]int
}

// fieldCache holds the fields of each struct type seen, as encoding/json does; it
// only grows, and its entries never change.
var fieldCache sync.Map // reflect.Type → *fieldSet

func structFields(t reflect.Type) *fieldSet {
	if fs, ok := fieldCache.Load(t); ok {
		return fs.(*fieldSet)
	}
	fs := &fieldSet{byName: map[string]int{}}
	collectFields(t, fs, map[reflect.Type]bool{})
	actual, _ := fieldCache.LoadOrStore(t, fs)
	return actual.(*fieldSet)
}

// collectFields adds t's fields to fs; fields of embedded structs follow the
// outer ones and never shadow them.
func collectFields(t reflect.Type, fs *fieldSet, visiting map[reflect.Type]bool) {
	if visiting[t] {
		return
	}
	visiting[t] = true
	var embedded []reflect.Type
	for i := 0; i < t.NumField(); i++ {
		sf := t.Field(i)
		tag, hasTag := sf.Tag.Lookup("json")
		name, _, _ := strings.Cut(tag, ",")
		if name == "-" && tag == "-" {
			continue
		}
		if sf.Anonymous && name == "" {
			et := sf.Type
			if et.Kind() == reflect.Pointer {
				et = et.Elem()
			}
			if et.Kind() == reflect.Struct {
				embedded = append(embedded, et)
				continue
			}
		}
		if !sf.IsExported() {
			continue
		}
		if !hasTag || name == "" {
			name = sf.Name
		}
		if _, dup := fs.byName[name]; dup {
			continue
		}
		unit, tagged := sf.Tag.Lookup("unit")
		fs.byName[name] = len(fs.list)
		fs.list = append(fs.list, field{name: name, typ: sf.Type, unit: unit, tagged: tagged})
	}
	for _, et := range embedded {
		collectFields(et, fs, visiting)
	}
}

// decodeBody reads the request body (at most BodyLimit bytes) into dst with Decode.
// On failure it answers the request with the problem (400 for bad input, 413 for a
// body too large) and returns false; the handler then just returns.
func (s *Server) decodeBody(c *gin.Context, dst any) bool {
	if c.Request.Body == nil {
		s.fail(c, bodyError("the body is empty: want a JSON object"))
		return false
	}
	body, err := io.ReadAll(c.Request.Body)
	if err == nil {
		err = Decode(body, dst)
	}
	if err != nil {
		s.fail(c, err)
		return false
	}
	return true
}
