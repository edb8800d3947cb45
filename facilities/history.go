package facilities

import (
	"bytes"
	"encoding/json"
	"fmt"
	"sort"
	"strconv"
)

// CanonicalJSON returns the form in which catalog stores keep a facility: its JSON
// encoding without the Version field (the store owns the version), map keys sorted.
// Two facilities with equal fields have byte-equal canonical forms.
func CanonicalJSON(f Facility) ([]byte, error) {
	f.Version = 0
	b, err := json.Marshal(f)
	if err != nil {
		return nil, fmt.Errorf("facilities: encoding facility %q: %w", f.ID, err)
	}
	return b, nil
}

// ChangedFields returns the JSON paths whose values differ between two JSON
// documents, sorted: "max_dynamic_pressure", "balances[0].limits.normal". It compares
// the decoded trees, so key order and spacing do not count. A key present on one
// side only is reported by its own path; arrays of different lengths are reported by
// the array's path, arrays of equal length element by element. An empty or nil
// document counts as the empty object, so a creation lists every top-level field.
// The result is never nil.
func ChangedFields(before, after []byte) ([]string, error) {
	a, err := decodeTree(before)
	if err != nil {
		return nil, fmt.Errorf("facilities: comparing versions: old document: %w", err)
	}
	b, err := decodeTree(after)
	if err != nil {
		return nil, fmt.Errorf("facilities: comparing versions: new document: %w", err)
	}
	paths := []string{}
	diffTree("", a, b, &paths)
	sort.Strings(paths)
	return paths, nil
}

func decodeTree(doc []byte) (any, error) {
	if len(bytes.TrimSpace(doc)) == 0 {
		return map[string]any{}, nil
	}
	dec := json.NewDecoder(bytes.NewReader(doc))
	dec.UseNumber()
	var v any
	if err := dec.Decode(&v); err != nil {
		return nil, err
	}
	return v, nil
}

func diffTree(path string, a, b any, out *[]string) {
	switch av := a.(type) {
	case map[string]any:
		bv, ok := b.(map[string]any)
		if !ok {
			*out = append(*out, rootName(path))
			return
		}
		for k, x := range av {
			y, ok := bv[k]
			if !ok {
				*out = append(*out, joinKey(path, k))
				continue
			}
			diffTree(joinKey(path, k), x, y, out)
		}
		for k := range bv {
			if _, ok := av[k]; !ok {
				*out = append(*out, joinKey(path, k))
			}
		}
	case []any:
		bv, ok := b.([]any)
		if !ok || len(av) != len(bv) {
			*out = append(*out, rootName(path))
			return
		}
		for i := range av {
			diffTree(path+"["+strconv.Itoa(i)+"]", av[i], bv[i], out)
		}
	case json.Number:
		bv, ok := b.(json.Number)
		if !ok || !sameNumber(av, bv) {
			*out = append(*out, rootName(path))
		}
	default:
		// strings, booleans and null compare by value
		if a != b {
			*out = append(*out, rootName(path))
		}
	}
}

// sameNumber compares two JSON numbers by value, so 4200 and 4.2e3 are equal.
func sameNumber(a, b json.Number) bool {
	if a == b {
		return true
	}
	x, errA := a.Float64()
	y, errB := b.Float64()
	return errA == nil && errB == nil && x == y
}

func joinKey(path, k string) string {
	if path == "" {
		return k
	}
	return path + "." + k
}

// rootName names the whole document "$" when it, not a field, differs.
func rootName(path string) string {
	if path == "" {
		return "$"
	}
	return path
}
