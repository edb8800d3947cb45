package unitjson

import (
	"bytes"
	"encoding"
	"encoding/base64"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"maps"
	"math"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"unicode/utf8"

	"scalematch/internal/check"
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
//   - an array (or an object read into a map) may hold at most the field's
//     `maxItems:"n"` elements, DefaultMaxItems when it sets none;
//   - numbers must be finite and fit their field; the body must be one JSON value
//     with nothing after it, and not empty. JSON null leaves a field as it is.
//
// Every problem is collected, and all are returned at once as a *check.Error
// with Code check.CodeInvalid whose Fields name the JSON paths
// ("balances[1].limits.normal"); the path "" is the body as a whole. Any other
// error means dst is not a pointer to a struct. dst is changed only when Decode
// returns nil.
func Decode(body []byte, dst any) error {
	rv := reflect.ValueOf(dst)
	if rv.Kind() != reflect.Pointer || rv.IsNil() || rv.Elem().Kind() != reflect.Struct {
		return fmt.Errorf("unitjson: Decode needs a non-nil pointer to a struct, not %T", dst)
	}
	if len(bytes.TrimSpace(body)) == 0 {
		return BodyError("the body is empty: want a JSON object")
	}
	tree, ok := parseTree(body)
	if !ok {
		// What the fast parser leaves (invalid JSON, \u escapes, invalid UTF-8,
		// deep nesting) encoding/json decodes, with its error messages.
		dec := json.NewDecoder(bytes.NewReader(body))
		dec.UseNumber()
		if err := dec.Decode(&tree); err != nil {
			return BodyError(syntaxMessage(err))
		}
		if _, err := dec.Token(); err != io.EOF {
			return BodyError("there is data after the JSON value")
		}
	}
	// The walk fills a copy, so that dst is changed only when all is well.
	fresh := reflect.New(rv.Elem().Type()).Elem()
	fresh.Set(rv.Elem())
	w := walker{path: make([]byte, 0, 64)}
	w.walk(tree, fresh, "")
	if len(w.errs) > 0 {
		msg := check.InvalidCount(len(w.errs) + w.dropped)
		if w.dropped > 0 {
			msg += fmt.Sprintf(" (the first %d are listed)", len(w.errs))
		}
		return &check.Error{Code: check.CodeInvalid, Message: msg, Fields: w.errs}
	}
	rv.Elem().Set(fresh)
	return nil
}

// maxTreeDepth is the deepest nesting of objects and arrays parseTree handles;
// deeper bodies go to encoding/json.
const maxTreeDepth = 64

// parseTree parses body, one JSON value (RFC 8259) with optional white space
// around it, into the tree encoding/json's Decoder with UseNumber gives:
// map[string]any for objects (a repeated key keeps its last value), []any
// (never nil) for arrays, json.Number holding a number's text, string, bool and
// nil. It is the common case made fast: ok is false, and the caller decodes with
// encoding/json, for anything it does not take as it is: invalid JSON, strings
// with \u escapes or invalid UTF-8, nesting deeper than maxTreeDepth.
func parseTree(body []byte) (tree any, ok bool) {
	p := treeParser{b: body}
	v, ok := p.value(0)
	if !ok {
		return nil, false
	}
	p.space()
	return v, p.i == len(p.b)
}

// treeParser reads b from offset i.
type treeParser struct {
	b []byte
	i int
}

// space skips JSON white space.
func (p *treeParser) space() {
	for p.i < len(p.b) {
		switch p.b[p.i] {
		case ' ', '\t', '\n', '\r':
			p.i++
		default:
			return
		}
	}
}

func (p *treeParser) value(depth int) (any, bool) {
	p.space()
	if p.i >= len(p.b) {
		return nil, false
	}
	switch c := p.b[p.i]; {
	case c == '{':
		return p.object(depth + 1)
	case c == '[':
		return p.array(depth + 1)
	case c == '"':
		return p.str(false)
	case c == '-' || ('0' <= c && c <= '9'):
		return p.number()
	case c == 't':
		return true, p.literal("true")
	case c == 'f':
		return false, p.literal("false")
	case c == 'n':
		return nil, p.literal("null")
	}
	return nil, false
}

func (p *treeParser) literal(word string) bool {
	if !bytes.HasPrefix(p.b[p.i:], []byte(word)) {
		return false
	}
	p.i += len(word)
	return true
}

func (p *treeParser) object(depth int) (any, bool) {
	if depth > maxTreeDepth {
		return nil, false
	}
	p.i++ // {
	m := make(map[string]any)
	p.space()
	if p.i < len(p.b) && p.b[p.i] == '}' {
		p.i++
		return m, true
	}
	for {
		p.space()
		if p.i >= len(p.b) || p.b[p.i] != '"' {
			return nil, false
		}
		k, ok := p.str(true)
		if !ok {
			return nil, false
		}
		p.space()
		if p.i >= len(p.b) || p.b[p.i] != ':' {
			return nil, false
		}
		p.i++
		v, ok := p.value(depth)
		if !ok {
			return nil, false
		}
		m[k] = v
		p.space()
		if p.i >= len(p.b) {
			return nil, false
		}
		switch p.b[p.i] {
		case ',':
			p.i++
		case '}':
			p.i++
			return m, true
		default:
			return nil, false
		}
	}
}

func (p *treeParser) array(depth int) (any, bool) {
	if depth > maxTreeDepth {
		return nil, false
	}
	p.i++ // [
	a := make([]any, 0)
	p.space()
	if p.i < len(p.b) && p.b[p.i] == ']' {
		p.i++
		return a, true
	}
	for {
		v, ok := p.value(depth)
		if !ok {
			return nil, false
		}
		a = append(a, v)
		p.space()
		if p.i >= len(p.b) {
			return nil, false
		}
		switch p.b[p.i] {
		case ',':
			p.i++
		case ']':
			p.i++
			return a, true
		default:
			return nil, false
		}
	}
}

// str reads a string without \u escapes whose bytes are valid UTF-8. An
// object key (key) that names a field of a struct type decoded before is the
// name kept in keyNames, not a new string.
func (p *treeParser) str(key bool) (string, bool) {
	p.i++ // "
	start := p.i
	ascii := true
	for p.i < len(p.b) {
		c := p.b[p.i]
		switch {
		case c == '"':
			s := p.b[start:p.i]
			p.i++
			if key {
				if names := keyNames.Load(); names != nil {
					if name, ok := (*names)[string(s)]; ok {
						return name, true
					}
				}
			}
			if !ascii && !utf8.Valid(s) {
				return "", false
			}
			return string(s), true
		case c == '\\':
			return p.escaped(start)
		case c < 0x20:
			return "", false
		case c >= utf8.RuneSelf:
			ascii = false
		}
		p.i++
	}
	return "", false
}

// escaped finishes a string that started at start and has a backslash at p.i.
func (p *treeParser) escaped(start int) (string, bool) {
	out := append([]byte(nil), p.b[start:p.i]...)
	for p.i < len(p.b) {
		c := p.b[p.i]
		switch {
		case c == '"':
			p.i++
			if !utf8.Valid(out) {
				return "", false
			}
			return string(out), true
		case c == '\\':
			if p.i+1 >= len(p.b) {
				return "", false
			}
			var r byte
			switch p.b[p.i+1] {
			case '"', '\\', '/':
				r = p.b[p.i+1]
			case 'b':
				r = '\b'
			case 'f':
				r = '\f'
			case 'n':
				r = '\n'
			case 'r':
				r = '\r'
			case 't':
				r = '\t'
			default: // \u and invalid escapes
				return "", false
			}
			out = append(out, r)
			p.i += 2
			continue
		case c < 0x20:
			return "", false
		}
		out = append(out, c)
		p.i++
	}
	return "", false
}

// number reads a number as RFC 8259 writes it:
// -?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?
func (p *treeParser) number() (any, bool) {
	start := p.i
	if p.b[p.i] == '-' {
		p.i++
	}
	switch {
	case p.i < len(p.b) && p.b[p.i] == '0':
		p.i++
	case p.digits() == 0:
		return nil, false
	}
	if p.i < len(p.b) && p.b[p.i] == '.' {
		p.i++
		if p.digits() == 0 {
			return nil, false
		}
	}
	if p.i < len(p.b) && (p.b[p.i] == 'e' || p.b[p.i] == 'E') {
		p.i++
		if p.i < len(p.b) && (p.b[p.i] == '+' || p.b[p.i] == '-') {
			p.i++
		}
		if p.digits() == 0 {
			return nil, false
		}
	}
	return json.Number(p.b[start:p.i]), true
}

// digits skips decimal digits and returns how many.
func (p *treeParser) digits() int {
	start := p.i
	for p.i < len(p.b) && '0' <= p.b[p.i] && p.b[p.i] <= '9' {
		p.i++
	}
	return p.i - start
}

// BodyError is the CodeInvalid error of a body as a whole (JSON path "").
func BodyError(msg string) error { return fieldError("", msg) }

func fieldError(path, msg string) error {
	return &check.Error{Code: check.CodeInvalid, Message: check.InvalidCount(1),
		Fields: []check.FieldError{{Field: path, Message: msg}}}
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

// walker walks a decoded JSON tree alongside a settable Go value, converts unit
// strings, stores what fits and collects the problems.
type walker struct {
	errs    []check.FieldError
	dropped int
	// path is the JSON path of the value being walked ("article.aero",
	// "alpha.values[3]"), extended on the way down (key, index) and cut back on
	// the way up (up): a problem's path is made a string only when one is found.
	path []byte
}

// add records a problem at the current path.
func (w *walker) add(msg string) {
	if len(w.errs) >= check.MaxListed {
		w.dropped++
		return
	}
	w.errs = append(w.errs, check.FieldError{Field: string(w.path), Message: msg})
}

// key extends the path by an object key and returns the length to go back to.
func (w *walker) key(k string) int {
	n := len(w.path)
	if n > 0 {
		w.path = append(w.path, '.')
	}
	w.path = append(w.path, k...)
	return n
}

// index extends the path by an array index and returns the length to go back to.
func (w *walker) index(i int) int {
	n := len(w.path)
	w.path = append(w.path, '[')
	w.path = strconv.AppendInt(w.path, int64(i), 10)
	w.path = append(w.path, ']')
	return n
}

// up cuts the path back to length n (what key or index returned).
func (w *walker) up(n int) { w.path = w.path[:n] }

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

// How a type's values are read: by the walk, or by the type's own
// UnmarshalJSON or UnmarshalText (on its pointer).
const (
	byWalk = iota
	byJSON
	byText
)

// unmarshalers holds unmarshalerOf's answer for each type seen (reflect.Type →
// int); like fieldCache it only grows, by the request types' few dozen types.
var unmarshalers sync.Map

// unmarshalerOf says how values of type t are read (byWalk, byJSON or byText),
// once per type: reflect.PointerTo and Implements cost more than the walk of
// most values.
func unmarshalerOf(t reflect.Type) int {
	if u, ok := unmarshalers.Load(t); ok {
		return u.(int)
	}
	u := byWalk
	switch pt := reflect.PointerTo(t); {
	case pt.Implements(jsonUnmarshaler):
		u = byJSON
	case pt.Implements(textUnmarshaler):
		u = byText
	}
	unmarshalers.Store(t, u)
	return u
}

// walk stores the JSON value v in dst, a settable value. unit is the unit tag in
// force ("" none). JSON null sets pointers, slices, maps and interfaces to nil and
// leaves other kinds as they are.
func (w *walker) walk(v any, dst reflect.Value, unit string) {
	t := dst.Type()
	if v == nil {
		switch t.Kind() {
		case reflect.Pointer, reflect.Slice, reflect.Map, reflect.Interface:
			dst.SetZero()
		}
		return
	}
	if t.Kind() == reflect.Pointer {
		// Copy on write: a pointer dst already holds may be shared with the caller's
		// value, which must not change unless Decode succeeds.
		p := reflect.New(t.Elem())
		if !dst.IsNil() {
			p.Elem().Set(dst.Elem())
		}
		dst.Set(p)
		w.walk(v, p.Elem(), unit)
		return
	}
	switch unmarshalerOf(t) {
	case byJSON:
		raw, err := json.Marshal(v)
		if err == nil {
			err = dst.Addr().Interface().(json.Unmarshaler).UnmarshalJSON(raw)
		}
		if err != nil {
			w.add(err.Error())
		}
		return
	case byText:
		s, ok := v.(string)
		if !ok {
			w.add("want a string, got " + jsonKind(v))
			return
		}
		if err := dst.Addr().Interface().(encoding.TextUnmarshaler).UnmarshalText([]byte(s)); err != nil {
			w.add(err.Error())
		}
		return
	}
	switch t.Kind() {
	case reflect.Bool:
		b, ok := v.(bool)
		if !ok {
			w.add("want true or false, got " + jsonKind(v))
			return
		}
		dst.SetBool(b)
	case reflect.String:
		s, ok := v.(string)
		if !ok {
			w.add("want a string, got " + jsonKind(v))
			return
		}
		dst.SetString(s)
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		n, ok := v.(json.Number)
		if !ok {
			w.add("want an integer, got " + jsonKind(v))
			return
		}
		i, err := strconv.ParseInt(string(n), 10, t.Bits())
		if err != nil {
			w.add(fmt.Sprintf("want an integer from %d to %d, got %s", int64(-1)<<(t.Bits()-1), uint64(1)<<(t.Bits()-1)-1, n))
			return
		}
		dst.SetInt(i)
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		n, ok := v.(json.Number)
		if !ok {
			w.add("want an integer, got " + jsonKind(v))
			return
		}
		u, err := strconv.ParseUint(string(n), 10, t.Bits())
		if err != nil {
			w.add(fmt.Sprintf("want an integer from 0 to %d, got %s", uint64(math.MaxUint64)>>(64-t.Bits()), n))
			return
		}
		dst.SetUint(u)
	case reflect.Float32, reflect.Float64:
		if f, ok := w.float(v, t.Bits(), unit); ok {
			dst.SetFloat(f)
		}
	case reflect.Struct:
		w.object(v, dst, unit)
	case reflect.Slice:
		if t.Elem().Kind() == reflect.Uint8 {
			s, ok := v.(string)
			if !ok {
				w.add("want a base64 string, got " + jsonKind(v))
				return
			}
			b, err := base64.StdEncoding.DecodeString(s)
			if err != nil {
				w.add("want a base64 string: " + err.Error())
				return
			}
			dst.SetBytes(b)
			return
		}
		a, ok := v.([]any)
		if !ok {
			w.add("want an array, got " + jsonKind(v))
			return
		}
		s := reflect.MakeSlice(t, len(a), len(a))
		for i, e := range a {
			n := w.index(i)
			w.walk(e, s.Index(i), unit)
			w.up(n)
		}
		dst.Set(s)
	case reflect.Array:
		a, ok := v.([]any)
		if !ok {
			w.add("want an array, got " + jsonKind(v))
			return
		}
		if len(a) > t.Len() {
			w.add(fmt.Sprintf("want at most %d elements, got %d", t.Len(), len(a)))
			return
		}
		dst.SetZero()
		for i, e := range a {
			n := w.index(i)
			w.walk(e, dst.Index(i), unit)
			w.up(n)
		}
	case reflect.Map:
		w.mapValue(v, dst, unit)
	case reflect.Interface:
		if t.NumMethod() > 0 {
			w.add("this field cannot be set from JSON")
			return
		}
		if x, ok := w.plain(v); ok {
			dst.Set(reflect.ValueOf(&x).Elem())
		}
	default:
		w.add("this field cannot be set from JSON")
	}
}

// mapValue stores a JSON object in a map, into a copy of the map dst holds.
func (w *walker) mapValue(v any, dst reflect.Value, unit string) {
	m, ok := v.(map[string]any)
	if !ok {
		w.add("want an object, got " + jsonKind(v))
		return
	}
	t := dst.Type()
	nm := reflect.MakeMapWithSize(t, dst.Len()+len(m))
	if !dst.IsNil() {
		iter := dst.MapRange()
		for iter.Next() {
			nm.SetMapIndex(iter.Key(), iter.Value())
		}
	}
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		n := w.key(k)
		if key, ok := w.mapKey(k, t.Key()); ok {
			elem := reflect.New(t.Elem()).Elem()
			w.walk(m[k], elem, unit)
			nm.SetMapIndex(key, elem)
		}
		w.up(n)
	}
	dst.Set(nm)
}

// mapKey converts an object key to a map key of type kt.
func (w *walker) mapKey(k string, kt reflect.Type) (reflect.Value, bool) {
	key := reflect.New(kt).Elem()
	var err error
	switch {
	case reflect.PointerTo(kt).Implements(textUnmarshaler):
		err = key.Addr().Interface().(encoding.TextUnmarshaler).UnmarshalText([]byte(k))
	case kt.Kind() == reflect.String:
		key.SetString(k)
	case kt.Kind() >= reflect.Int && kt.Kind() <= reflect.Int64:
		var i int64
		if i, err = strconv.ParseInt(k, 10, kt.Bits()); err == nil {
			key.SetInt(i)
		}
	case kt.Kind() >= reflect.Uint && kt.Kind() <= reflect.Uintptr:
		var u uint64
		if u, err = strconv.ParseUint(k, 10, kt.Bits()); err == nil {
			key.SetUint(u)
		}
	default:
		err = errors.New("this key type cannot be set from JSON")
	}
	if err != nil {
		w.add("bad key: " + err.Error())
		return key, false
	}
	return key, true
}

// plain converts a decoded JSON value to what encoding/json stores in an any:
// float64 numbers, map[string]any, []any, string, bool.
func (w *walker) plain(v any) (any, bool) {
	switch x := v.(type) {
	case json.Number:
		f, err := strconv.ParseFloat(string(x), 64)
		if err != nil {
			w.add(fmt.Sprintf("the number %s is out of range", x))
			return nil, false
		}
		return f, true
	case map[string]any:
		ok := true
		keys := make([]string, 0, len(x))
		for k := range x {
			keys = append(keys, k)
		}
		sort.Strings(keys) // errors in a stable order
		for _, k := range keys {
			var eok bool
			n := w.key(k)
			x[k], eok = w.plain(x[k])
			w.up(n)
			ok = ok && eok
		}
		return x, ok
	case []any:
		ok := true
		for i, e := range x {
			var eok bool
			n := w.index(i)
			x[i], eok = w.plain(e)
			w.up(n)
			ok = ok && eok
		}
		return x, ok
	}
	return v, true
}

// float reads a number, or converts a unit string, for a float field of the given
// size in bits.
func (w *walker) float(v any, bits int, unit string) (float64, bool) {
	switch x := v.(type) {
	case json.Number:
		f, err := strconv.ParseFloat(string(x), bits)
		if err != nil {
			w.add(fmt.Sprintf("the number %s is out of range", x))
			return 0, false
		}
		return f, true
	case string:
		var f float64
		var err error
		switch unit {
		case "", UnitNone:
			w.add("want a number, got a string")
			return 0, false
		case UnitScale:
			f, err = parseScale(x)
		default:
			f, err = similarity.ToSI(x, unit)
		}
		if err != nil {
			w.add(err.Error())
			return 0, false
		}
		if math.IsNaN(f) || math.IsInf(f, 0) || (bits == 32 && math.Abs(f) > math.MaxFloat32) {
			w.add(fmt.Sprintf("%q is out of range", x))
			return 0, false
		}
		return f, true
	}
	switch unit {
	case "", UnitNone:
		w.add("want a number, got " + jsonKind(v))
	case UnitScale:
		w.add(`want a number or a ratio such as "1:16", got ` + jsonKind(v))
	default:
		w.add(fmt.Sprintf("want a number (in %s) or a string with a unit, got %s", unit, jsonKind(v)))
	}
	return 0, false
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

// object stores a JSON object in struct dst.
func (w *walker) object(v any, dst reflect.Value, unit string) {
	m, ok := v.(map[string]any)
	if !ok {
		w.add("want an object, got " + jsonKind(v))
		return
	}
	fields := structFields(dst.Type())
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
		n := w.key(f.name)
		if items := jsonLen(fv); items > f.maxItems {
			w.add(fmt.Sprintf("%d items: at most %d", items, f.maxItems))
		} else if fd, ok := fieldAlloc(dst, f.index); ok && fd.CanSet() {
			w.walk(fv, fd, u)
		} else {
			w.add("this field cannot be set from JSON")
		}
		w.up(n)
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
			n := w.key(k)
			w.add("unknown field")
			w.up(n)
		}
	}
}

// fieldAlloc returns the field of v at index, allocating embedded struct pointers on
// the way (copying any they already point to); false when an embedded pointer is to
// an unexported type and cannot be allocated.
func fieldAlloc(v reflect.Value, index []int) (reflect.Value, bool) {
	for i, x := range index {
		if i > 0 && v.Kind() == reflect.Pointer {
			if !v.CanSet() {
				return v, false
			}
			p := reflect.New(v.Type().Elem())
			if !v.IsNil() {
				p.Elem().Set(v.Elem())
			}
			v.Set(p)
			v = p.Elem()
		}
		v = v.Field(x)
	}
	return v, true
}

// field is one JSON-visible field of a struct, with embedded structs flattened.
type field struct {
	name   string
	index  []int // as reflect.Value.FieldByIndex takes it
	unit   string
	tagged bool
	// maxItems caps the elements of an array or the keys of an object: the
	// field's `maxItems:"n"` tag (which the OpenAPI document publishes), else
	// DefaultMaxItems.
	maxItems int
}

// DefaultMaxItems caps every list (and object of values by name) of a request
// whose field sets no `maxItems` tag of its own.
const DefaultMaxItems = 10000

// jsonLen is the number of elements of a decoded JSON array or keys of an
// object; 0 for anything else.
func jsonLen(v any) int {
	switch x := v.(type) {
	case []any:
		return len(x)
	case map[string]any:
		return len(x)
	}
	return 0
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
	collectFields(t, nil, fs, map[reflect.Type]bool{})
	actual, loaded := fieldCache.LoadOrStore(t, fs)
	if !loaded {
		addKeyNames(fs)
	}
	return actual.(*fieldSet)
}

// keyNames holds the field names of every struct type structFields has met,
// each by itself: parseTree takes an object key that is one of them without
// allocating a string for it. It is replaced, never changed, when a type
// brings new names (a few dozen types, once each).
var keyNames atomic.Pointer[map[string]string]

// addKeyNames adds the field names of fs to keyNames.
func addKeyNames(fs *fieldSet) {
	for {
		old := keyNames.Load()
		names := map[string]string{}
		if old != nil {
			maps.Copy(names, *old)
		}
		for _, f := range fs.list {
			names[f.name] = f.name
		}
		if keyNames.CompareAndSwap(old, &names) {
			return
		}
	}
}

// collectFields adds t's fields to fs; fields of embedded structs follow the
// outer ones and never shadow them.
func collectFields(t reflect.Type, prefix []int, fs *fieldSet, visiting map[reflect.Type]bool) {
	if visiting[t] {
		return
	}
	visiting[t] = true
	type embed struct {
		t     reflect.Type
		index []int
	}
	var embedded []embed
	for i := 0; i < t.NumField(); i++ {
		sf := t.Field(i)
		tag, hasTag := sf.Tag.Lookup("json")
		name, _, _ := strings.Cut(tag, ",")
		if name == "-" && tag == "-" {
			continue
		}
		index := append(append([]int(nil), prefix...), i)
		if sf.Anonymous && name == "" {
			et := sf.Type
			if et.Kind() == reflect.Pointer {
				et = et.Elem()
			}
			if et.Kind() == reflect.Struct {
				embedded = append(embedded, embed{et, index})
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
		maxItems := DefaultMaxItems
		if m, err := strconv.Atoi(sf.Tag.Get("maxItems")); err == nil && m > 0 {
			maxItems = m
		}
		fs.byName[name] = len(fs.list)
		fs.list = append(fs.list, field{name: name, index: index, unit: unit, tagged: tagged, maxItems: maxItems})
	}
	for _, e := range embedded {
		collectFields(e.t, e.index, fs, visiting)
	}
}
