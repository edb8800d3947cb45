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
	// flat are a struct's own float64 fields, and floats those with its
	// *float64 fields as the in-place walk reads them (floatLayout);
	// flatOnly is set when they are all the numbers it holds.
	flat     []flatFloat
	floats   floatLayout
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
		// ptrs are the *float64 fields (not *Ceiling), read in place too:
		// a wall correction's nine optional figures were a call each.
		var flat, ptrs []flatFloat
		for i := range t.NumField() {
			sf := t.Field(i)
			if !sf.IsExported() || sf.Tag.Get("json") == "-" {
				continue
			}
			if sf.Type.Kind() == reflect.Float64 {
				flat = append(flat, flatFloat{off: sf.Offset, field: i, ceiling: sf.Type == ceilingType})
				continue
			}
			if sf.Type.Kind() == reflect.Pointer && sf.Type.Elem().Kind() == reflect.Float64 && sf.Type.Elem() != ceilingType {
				ptrs = append(ptrs, flatFloat{off: sf.Offset, field: i})
				continue
			}
			if e := compileWalker(sf.Type, seen); !e.none() {
				idx, ws = append(idx, i), append(ws, e)
			}
		}
		if len(idx) > 0 || len(flat) > 0 || len(ptrs) > 0 {
			lay := newFloatLayout(flat, ptrs, t.Size())
			w.at = structAt(t, lay, idx, ws)
			at := w.at
			w.flat, w.floats, w.fn = flat, lay, func(v reflect.Value) bool {
				if at != nil && v.CanAddr() {
					return at(v.Addr().UnsafePointer())
				}
				if v.CanAddr() {
					if !lay.finite(v.Addr().UnsafePointer()) {
						return false
					}
				} else {
					for _, f := range flat {
						if !finiteFloat(v.Field(f.field).Float(), f.ceiling) {
							return false
						}
					}
					for _, f := range ptrs {
						if x := v.Field(f.field); !x.IsNil() && !finiteFloat(x.Elem().Float(), false) {
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
			// A slice of structs of float64 and *float64 alone (and
			// numberless fields): every element's floats read in place.
			size, lay := t.Elem().Size(), e.floats
			w.fn = func(v reflect.Value) bool {
				if v.Len() == 0 {
					return true
				}
				return lay.sliceFinite(v.UnsafePointer(), v.Len(), size)
			}
			w.at = func(p unsafe.Pointer) bool {
				s := *(*[]byte)(p) // the header of any slice: its data and length
				return len(s) == 0 || lay.sliceFinite(unsafe.Pointer(unsafe.SliceData(s)), len(s), size)
			}
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
// fields lay and the other fields idx walked by ws, or nil when one of those
// has none (or is still being compiled: a recursive type).
func structAt(t reflect.Type, lay floatLayout, idx []int, ws []*walker) func(unsafe.Pointer) bool {
	offs := make([]uintptr, len(idx))
	ats := make([]func(unsafe.Pointer) bool, len(idx))
	for k, i := range idx {
		if ws[k].building || ws[k].at == nil {
			return nil
		}
		offs[k], ats[k] = t.Field(i).Offset, ws[k].at
	}
	return func(p unsafe.Pointer) bool {
		if !lay.finite(p) {
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

// floatLayout is a struct's float64 fields as the in-place walk reads them:
// the offsets of the fields that are not a Ceiling (as one run when they are
// adjacent), and the Ceilings' offsets. The fields are summed as x − x (see
// runSum) with one test a struct, or a slice of structs, instead of one a
// field: the walk per field, with its offset and Ceiling flag, cost about 20
// instructions a number. A plan answer's numbers sit mostly in such structs
// (a trade point's seven figures in a run, a load row's four, an
// uncertainty's eight filling the struct, so that a slice of them is one run).
type floatLayout struct {
	offs []uintptr
	// run is offs as one run of adjacent fields, when they are (run.n > 0):
	// one loop over the run costs less than one over the offsets.
	run  floatRun
	ceil []uintptr
	// ptrs are the offsets of the *float64 fields (not *Ceiling).
	ptrs []uintptr
	// whole is set when the run covers the whole struct (no Ceiling, no
	// other field, no padding): a slice of it is one run.
	whole bool
	n     int // the float64 fields, Ceilings included
}

// floatRun is n adjacent float64 fields from offset off.
type floatRun struct {
	off uintptr
	n   int
}

// newFloatLayout returns the layout of the float64 fields flat (in field
// order, so by increasing offset) and the *float64 fields ptrs of a struct of
// size bytes.
func newFloatLayout(flat, ptrs []flatFloat, size uintptr) floatLayout {
	var l floatLayout
	for _, f := range ptrs {
		l.ptrs = append(l.ptrs, f.off)
	}
	for _, f := range flat {
		l.n++
		if f.ceiling {
			l.ceil = append(l.ceil, f.off)
			continue
		}
		l.offs = append(l.offs, f.off)
	}
	if k := len(l.offs); k > 0 && l.offs[k-1]-l.offs[0] == uintptr(k-1)*8 {
		l.run = floatRun{off: l.offs[0], n: k}
	}
	l.whole = len(l.ceil) == 0 && len(l.ptrs) == 0 && l.run.n > 0 && l.run.off == 0 && uintptr(l.run.n)*8 == size
	return l
}

// sum returns acc plus x − x for each float64 field of the struct at p that
// is not a Ceiling, and for each *float64 field that is not nil (see runSum).
func (l *floatLayout) sum(acc float64, p unsafe.Pointer) float64 {
	if l.run.n > 0 {
		acc = runSum(acc, unsafe.Add(p, l.run.off), l.run.n)
	} else {
		for _, off := range l.offs {
			x := *(*float64)(unsafe.Add(p, off))
			acc += x - x
		}
	}
	for _, off := range l.ptrs {
		if q := *(*unsafe.Pointer)(unsafe.Add(p, off)); q != nil {
			x := *(*float64)(q)
			acc += x - x
		}
	}
	return acc
}

// finite reports whether the float64 fields of the struct at p are finite
// (a Ceiling's +Inf counting as finite).
func (l *floatLayout) finite(p unsafe.Pointer) bool {
	return l.sum(0, p) == 0 && ceilingsFinite(p, l.ceil)
}

// sliceFinite reports whether every element of the n elements of size bytes
// from p, of a struct whose numbers are the layout's alone, is finite.
func (l *floatLayout) sliceFinite(p unsafe.Pointer, n int, size uintptr) bool {
	if l.whole {
		return runSum(0, p, n*l.n) == 0
	}
	var acc float64
	if l.run.n > 0 && len(l.ptrs) == 0 && len(l.ceil) == 0 {
		// One run an element (a trade point): summed without a call.
		for i := range n {
			acc = runSum(acc, unsafe.Add(p, uintptr(i)*size+l.run.off), l.run.n)
		}
		return acc == 0
	}
	if len(l.ptrs) == 0 && len(l.ceil) == 0 {
		// Fields apart (a load row's four): summed without a call too.
		for i := range n {
			e := unsafe.Add(p, uintptr(i)*size)
			for _, off := range l.offs {
				x := *(*float64)(unsafe.Add(e, off))
				acc += x - x
			}
		}
		return acc == 0
	}
	for i := range n {
		e := unsafe.Add(p, uintptr(i)*size)
		acc = l.sum(acc, e)
		if len(l.ceil) > 0 && !ceilingsFinite(e, l.ceil) {
			return false
		}
	}
	return acc == 0
}

// runSum returns acc plus x − x for each of the n float64s from p: x − x is
// +0 for every finite x and NaN for a NaN or an infinity, and a NaN stays in
// the sum, so the sum is 0 exactly when acc is and every x is finite. One
// sum in place of a test a number: the walk branches once a run.
func runSum(acc float64, p unsafe.Pointer, n int) float64 {
	// Offsets, not unsafe.Slice, whose length checks cost more than a short
	// run's sum.
	for k, end := uintptr(0), uintptr(n)*8; k < end; k += 8 {
		x := *(*float64)(unsafe.Add(p, k))
		acc += x - x
	}
	return acc
}

// ceilingsFinite reports whether the Ceilings at offsets ceil of the struct
// at p are finite numbers or +Inf (no bound).
func ceilingsFinite(p unsafe.Pointer, ceil []uintptr) bool {
	for _, off := range ceil {
		if !finiteFloat(*(*float64)(unsafe.Add(p, off)), true) {
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
