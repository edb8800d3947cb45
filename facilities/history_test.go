package facilities_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

func TestChangedFields(t *testing.T) {
	t.Parallel()
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
			t.Parallel()
			got, err := facilities.ChangedFields([]byte(tt.before), []byte(tt.after))
			require.NoError(t, err)
			assert.Equal(t, tt.want, got)
		})
	}
}

func TestChangedFieldsBadDocument(t *testing.T) {
	t.Parallel()
	_, err := facilities.ChangedFields([]byte(`{"a":`), []byte(`{}`))
	assert.Error(t, err, "a truncated document")
}

func TestCanonicalJSONDropsVersion(t *testing.T) {
	t.Parallel()
	f := mustDemo(t, "lsw-2")
	a, err := facilities.CanonicalJSON(f)
	require.NoError(t, err)
	f.Version = 7
	b, err := facilities.CanonicalJSON(f)
	require.NoError(t, err)
	assert.Equal(t, string(a), string(b), "the version stays out of the canonical form")
}
