package facilities_test

import (
	"reflect"
	"testing"

	"scalematch/facilities"
)

func TestChangedFields(t *testing.T) {
	tests := []struct {
		name          string
		before, after string
		want          []string
	}{
		{"equal despite key order and spacing", `{"a":1,"b":{"c":"x"}}`, `{ "b": {"c":"x"}, "a": 1 }`, []string{}},
		{"number spelled differently", `{"q":4200}`, `{"q":4.2e3}`, []string{}},
		{"nested scalar", `{"balances":[{"limits":{"normal":7000}}]}`, `{"balances":[{"limits":{"normal":7500}}]}`, []string{"balances[0].limits.normal"}},
		{"added and removed keys", `{"a":1,"b":2}`, `{"a":1,"c":3}`, []string{"b", "c"}},
		{"array length differs", `{"balances":[1]}`, `{"balances":[1,2]}`, []string{"balances"}},
		{"type changes", `{"mach":{"min":0.1}}`, `{"mach":null}`, []string{"mach"}},
		{"creation lists top-level fields", ``, `{"id":"x","name":"y"}`, []string{"id", "name"}},
		{"root type differs", `{"a":1}`, `[1]`, []string{"$"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := facilities.ChangedFields([]byte(tt.before), []byte(tt.after))
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(got, tt.want) {
				t.Errorf("ChangedFields = %q, want %q", got, tt.want)
			}
		})
	}
}

func TestChangedFieldsBadDocument(t *testing.T) {
	if _, err := facilities.ChangedFields([]byte(`{"a":`), []byte(`{}`)); err == nil {
		t.Error("ChangedFields accepted a truncated document")
	}
}

func TestCanonicalJSONDropsVersion(t *testing.T) {
	f, ok := facilities.DemoFacility("lsw-2")
	if !ok {
		t.Fatal("demo facility lsw-2 missing")
	}
	a, err := facilities.CanonicalJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	f.Version = 7
	b, err := facilities.CanonicalJSON(f)
	if err != nil {
		t.Fatal(err)
	}
	if string(a) != string(b) {
		t.Errorf("version leaked into the canonical form:\n%s\n%s", a, b)
	}
}
