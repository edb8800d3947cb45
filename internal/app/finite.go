package app

import (
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"
	"sync"
	"unsafe"

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
// thousands of numbers); nonFinite names the culprit when there is one. The walk
// of each type is compiled once (finiteWalker): reading the fields' JSON tags at
// every visit cost 38 % of a whole air plan (BenchmarkCheckFinite).
func allFinite(v reflect.Value) bool {
	if !v.IsValid() {
		return true
	}
	return finiteWalker(v.Type()).check(v)
}

// walker checks the floats of one type; fn nil means the type holds none.
type walker struct {
	fn func(reflect.Value) bool
	// building marks a walker whose type is being compiled (a recursive type
	// refers to it before its fn is known).
	building bool
	// flat are a struct's own float64 fields; flatOnly is set when they are
	// all the numbers it holds.
	flat     []flatFloat
	flatOnly bool
	// at checks a value of the type at its address without reflect: set for
	// float64, and for pointers, structs, slices and arrays whose parts all
	// have one (no interface, map or recursion inside); nil otherwise.
	at func(unsafe.Pointer) bool
}

func (w *walker) check(v reflect.Value) bool { return w.fn == nil || w.fn(v) }

// none reports whether the type can hold no float at all.
func (w *walker) none() bool { return !w.building && w.fn == nil }

var (
	walkers   sync.Map // reflect.Type → *walker, compiled
	compiling sync.Mutex
)

// finiteWalker returns the compiled walker of t.
func finiteWalker(t reflect.Type) *walker {
	if w, ok := walkers.Load(t); ok {
		return w.(*walker)
	}
	compiling.Lock()
	defer compiling.Unlock()
	seen := map[reflect.Type]*walker{}
	w := compileWalker(t, seen)
	for t, w := range seen {
		walkers.Store(t, w)
	}
	return w
}

// compileWalker builds t's walker; seen holds the walkers built in this
// compilation, so that a recursive type refers to its own.
func compileWalker(t reflect.Type, seen map[reflect.Type]*walker) *walker {
	if w, ok := walkers.Load(t); ok {
		return w.(*walker)
	}
	if w, ok := seen[t]; ok {
		return w
	}
	w := &walker{building: true}
	seen[t] = w
	defer func() { w.building = false }()
	switch t.Kind() {
	case reflect.Float32, reflect.Float64:
		w.fn = finite
		if t.Kind() == reflect.Float64 {
			ceiling := t == ceilingType
			w.at = func(p unsafe.Pointer) bool { return finiteFloat(*(*float64)(p), ceiling) }
		}
	case reflect.Pointer:
		e := compileWalker(t.Elem(), seen)
		if !e.none() {
			w.fn = func(v reflect.Value) bool { return v.IsNil() || e.check(v.Elem()) }
			if e.at != nil {
				w.fn = func(v reflect.Value) bool { return v.IsNil() || e.at(v.UnsafePointer()) }
				w.at = func(p unsafe.Pointer) bool {
					q := *(*unsafe.Pointer)(p)
					return q == nil || e.at(q)
				}
			}
		}
	case reflect.Interface:
		w.fn = func(v reflect.Value) bool {
			if v.IsNil() {
				return true
			}
			d := v.Elem()
			return finiteWalker(d.Type()).check(d)
		}
	case reflect.Struct:
		var idx []int
		var ws []*walker
		// flat are the float64 fields straight in the struct, read through
		// the struct's address when it has one (every value reached from a
		// pointer or a slice does): a reflect.Value per number was most of the
		// walk (BenchmarkCheckFinite).
		var flat []flatFloat
		for i := range t.NumField() {
			sf := t.Field(i)
			if !sf.IsExported() || sf.Tag.Get("json") == "-" {
				continue
			}
			if sf.Type.Kind() == reflect.Float64 {
				flat = append(flat, flatFloat{off: sf.Offset, field: i, ceiling: sf.Type == ceilingType})
				continue
			}
			if e := compileWalker(sf.Type, seen); !e.none() {
				idx, ws = append(idx, i), append(ws, e)
			}
		}
		if len(idx) > 0 || len(flat) > 0 {
			w.at = structAt(t, flat, idx, ws)
			at := w.at
			w.flat, w.fn = flat, func(v reflect.Value) bool {
				if at != nil && v.CanAddr() {
					return at(v.Addr().UnsafePointer())
				}
				if v.CanAddr() {
					if !floatsFinite(v.Addr().UnsafePointer(), flat) {
						return false
					}
				} else {
					for _, f := range flat {
						if !finiteFloat(v.Field(f.field).Float(), f.ceiling) {
							return false
						}
					}
				}
				for k, i := range idx {
					if !ws[k].check(v.Field(i)) {
						return false
					}
				}
				return true
			}
			if len(idx) == 0 {
				w.flatOnly = true
			}
		}
	case reflect.Slice:
		e := compileWalker(t.Elem(), seen)
		if e.flatOnly {
			// A slice of structs of float64 alone (and numberless fields):
			// every element's floats read in place.
			size := t.Elem().Size()
			w.fn = func(v reflect.Value) bool {
				n := v.Len()
				if n == 0 {
					return true
				}
				p := v.UnsafePointer()
				for i := range n {
					if !floatsFinite(unsafe.Add(p, uintptr(i)*size), e.flat) {
						return false
					}
				}
				return true
			}
			w.at = func(p unsafe.Pointer) bool { return sliceAt(p, size, e.flat) }
		} else if e.at != nil {
			// A slice of values that are walked in place.
			size := t.Elem().Size()
			w.fn = func(v reflect.Value) bool {
				if v.Len() == 0 {
					return true
				}
				return sliceEach(v.UnsafePointer(), v.Len(), size, e.at)
			}
			w.at = func(p unsafe.Pointer) bool {
				s := *(*[]byte)(p) // the header of any slice: its data and length
				return len(s) == 0 || sliceEach(unsafe.Pointer(unsafe.SliceData(s)), len(s), size, e.at)
			}
		} else if !e.none() {
			w.fn = func(v reflect.Value) bool {
				for i := range v.Len() {
					if !e.check(v.Index(i)) {
						return false
					}
				}
				return true
			}
		}
	case reflect.Array:
		e := compileWalker(t.Elem(), seen)
		if !e.none() {
			w.fn = func(v reflect.Value) bool {
				for i := range v.Len() {
					if !e.check(v.Index(i)) {
						return false
					}
				}
				return true
			}
		}
	case reflect.Map:
		e := compileWalker(t.Elem(), seen)
		if !e.none() {
			w.fn = func(v reflect.Value) bool {
				iter := v.MapRange()
				for iter.Next() {
					if !e.check(iter.Value()) {
						return false
					}
				}
				return true
			}
		}
	}
	return w
}

// structAt returns the in-place walk of a struct of type t with the float64
// fields flat and the other fields idx walked by ws, or nil when one of those
// has none (or is still being compiled: a recursive type).
func structAt(t reflect.Type, flat []flatFloat, idx []int, ws []*walker) func(unsafe.Pointer) bool {
	offs := make([]uintptr, len(idx))
	ats := make([]func(unsafe.Pointer) bool, len(idx))
	for k, i := range idx {
		if ws[k].building || ws[k].at == nil {
			return nil
		}
		offs[k], ats[k] = t.Field(i).Offset, ws[k].at
	}
	return func(p unsafe.Pointer) bool {
		if !floatsFinite(p, flat) {
			return false
		}
		for k, at := range ats {
			if !at(unsafe.Add(p, offs[k])) {
				return false
			}
		}
		return true
	}
}

// sliceAt reports whether every element of the slice whose header is at p,
// of elements of size bytes holding the float64 fields flat alone, is finite.
func sliceAt(p unsafe.Pointer, size uintptr, flat []flatFloat) bool {
	s := *(*[]byte)(p) // the header of any slice: its data and length
	if len(s) == 0 {
		return true
	}
	d := unsafe.Pointer(unsafe.SliceData(s))
	for i := range len(s) {
		if !floatsFinite(unsafe.Add(d, uintptr(i)*size), flat) {
			return false
		}
	}
	return true
}

// sliceEach reports whether at holds for each of the n elements of size bytes
// from p.
func sliceEach(p unsafe.Pointer, n int, size uintptr, at func(unsafe.Pointer) bool) bool {
	for i := range n {
		if !at(unsafe.Add(p, uintptr(i)*size)) {
			return false
		}
	}
	return true
}

// flatFloat is a float64 field of a struct: its offset and index, and whether
// it is a loads.Ceiling (whose +Inf is no bound).
type flatFloat struct {
	off     uintptr
	field   int
	ceiling bool
}

// floatsFinite reports whether the float64 fields flat of the struct at p are
// finite (a Ceiling's +Inf counting as finite).
func floatsFinite(p unsafe.Pointer, flat []flatFloat) bool {
	for _, f := range flat {
		if !finiteFloat(*(*float64)(unsafe.Add(p, f.off)), f.ceiling) {
			return false
		}
	}
	return true
}

// finiteFloat is finite for a number read in place: x − x is 0 for every
// finite x and NaN for a NaN or an infinity.
func finiteFloat(x float64, ceiling bool) bool {
	return x-x == 0 || ceiling && x > math.MaxFloat64
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
