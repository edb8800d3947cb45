package main

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/facilities/sqlite"
)

// TestFacilitiesCommand and TestFacilitiesCommandJSONIsTheAPIList are not
// parallel: they clear SCALEMATCH_DATABASE_URL, which the command reads.
func TestFacilitiesCommand(t *testing.T) {
	empty := t.TempDir()
	stored := t.TempDir()
	db, err := sqlite.Open(context.Background(), sqlite.Path(stored))
	require.NoError(t, err)
	f, ok := facilities.DemoFacility("wtn-04")
	require.True(t, ok)
	f.ID, f.Name = "wtn-05", "second water tunnel"
	_, err = db.CreateFacility(context.Background(), f, "staff")
	require.NoError(t, err)
	require.NoError(t, db.Close())

	tests := []struct {
		name    string
		args    []string
		want    []string
		wantErr bool
	}{
		{"demo list", []string{"facilities", "--data", empty}, []string{"Facilities of the demo catalog: 6 facilities\n  id  ", "  version  ", "tsw-1", "cn2-05"}, false},
		{"demo show", []string{"facilities", "show", "tsw-1", "--data", empty}, []string{"int-b2", "27000", "45000–205000"}, false},
		{"store list", []string{"facilities", "list", "--data", stored}, []string{"1 facilities", "wtn-05"}, false},
		{"store show json", []string{"facilities", "show", "wtn-05", "--json", "--data", stored}, []string{`"version": 1`, `"second water tunnel"`}, false},
		{"unknown id", []string{"facilities", "show", "nope", "--data", empty}, nil, true},
		{"unknown action", []string{"facilities", "remove", "--data", empty}, nil, true},
		{"show without id", []string{"facilities", "show", "--data", empty}, nil, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Setenv("SCALEMATCH_DATABASE_URL", "")
			var out, errOut bytes.Buffer
			err := run(tt.args, strings.NewReader(""), &out, &errOut)
			if tt.wantErr {
				require.Error(t, err)
			} else {
				require.NoError(t, err)
			}
			for _, w := range tt.want {
				assert.Contains(t, out.String(), w, "output")
			}
		})
	}
}

func TestFacilitiesCommandJSONIsTheAPIList(t *testing.T) {
	t.Setenv("SCALEMATCH_DATABASE_URL", "")
	var out bytes.Buffer
	require.NoError(t, run([]string{"facilities", "--json", "--data", t.TempDir()}, strings.NewReader(""), &out, &out))
	var list struct {
		Facilities []facilities.Facility `json:"facilities"`
	}
	dec := json.NewDecoder(&out)
	dec.DisallowUnknownFields()
	require.NoError(t, dec.Decode(&list))
	assert.Len(t, list.Facilities, len(facilities.Demo()), "the demo's facilities")
}
