package main

import (
	"encoding/json"
	"path"
	"reflect"
	"strconv"
	"strings"
)

// field is one property a Go struct writes and reads as JSON.
type field struct {
	name      string       // JSON name
	omitempty bool         // absent when empty
	typ       reflect.Type // the field's Go type
	unit      string       // the `unit` tag: an SI unit, "scale", "-" or ""
	maxItems  int          // the `maxItems` tag; 0 when none
}

// schemaName is the name swag gives the schema of a named Go type:
// "facilities.Facility".
func schemaName(t reflect.Type) string {
	return path.Base(t.PkgPath()) + "." + t.Name()
}

// deref strips pointers.
func deref(t reflect.Type) reflect.Type {
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	return t
}

// element is the type a field finally holds: pointers, slices, arrays and maps
// stripped.
func element(t reflect.Type) reflect.Type {
	for {
		switch t.Kind() {
		case reflect.Pointer, reflect.Slice, reflect.Array, reflect.Map:
			t = t.Elem()
		default:
			return t
		}
	}
}

var marshaler = reflect.TypeFor[json.Marshaler]()

// customJSON reports whether t (or *t) writes its own JSON.
func customJSON(t reflect.Type) bool {
	return t.Implements(marshaler) || reflect.PointerTo(t).Implements(marshaler)
}

// fields returns the JSON properties of struct type t, with embedded structs
// flattened as encoding/json flattens them.
func fields(t reflect.Type) []field {
	var out []field
	for i := 0; i < t.NumField(); i++ {
		sf := t.Field(i)
		tag := sf.Tag.Get("json")
		if tag == "-" || sf.Tag.Get("swaggerignore") == "true" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		if sf.Anonymous && name == "" && deref(sf.Type).Kind() == reflect.Struct {
			out = append(out, fields(deref(sf.Type))...)
			continue
		}
		if !sf.IsExported() {
			continue
		}
		if name == "" {
			name = sf.Name
		}
		f := field{name: name, typ: sf.Type, unit: sf.Tag.Get("unit")}
		for _, o := range strings.Split(opts, ",") {
			if o == "omitempty" || o == "omitzero" {
				f.omitempty = true
			}
		}
		if m := sf.Tag.Get("maxItems"); m != "" {
			n, err := strconv.Atoi(m)
			if err == nil {
				f.maxItems = n
			}
		}
		out = append(out, f)
	}
	return out
}

// collect adds t and every named type reachable from its fields to types,
// keyed by schemaName.
func collect(types map[string]reflect.Type, t reflect.Type) {
	t = element(t)
	if t.Name() == "" || t.PkgPath() == "" {
		return
	}
	name := schemaName(t)
	if _, ok := types[name]; ok {
		return
	}
	types[name] = t
	if t.Kind() != reflect.Struct {
		return
	}
	for i := 0; i < t.NumField(); i++ {
		collect(types, t.Field(i).Type)
	}
}

// isFloat reports whether t holds floats: a float, or pointers, slices and maps
// of them.
func isFloat(t reflect.Type) bool {
	k := element(t).Kind()
	return k == reflect.Float64 || k == reflect.Float32
}

// nilable reports whether a field of type t can be nil, and so sent as null
// when it has no omitempty.
func nilable(t reflect.Type) bool {
	switch t.Kind() {
	case reflect.Pointer, reflect.Slice, reflect.Map, reflect.Interface:
		return true
	}
	return false
}
