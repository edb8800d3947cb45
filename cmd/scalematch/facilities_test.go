package main

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"

	"scalematch/facilities"
	"scalematch/facilities/sqlite"
)

func TestFacilitiesCommand(t *testing.T) {
	empty := t.TempDir()
	stored := t.TempDir()
	db, err := sqlite.Open(context.Background(), sqlite.Path(stored))
	if err != nil {
		t.Fatal(err)
	}
	f, _ := facilities.DemoFacility("wtn-04")
	f.ID, f.Name = "wtn-05", "second water tunnel"
	if _, err := db.CreateFacility(context.Background(), f, "staff"); err != nil {
		t.Fatal(err)
	}
	db.Close()

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
			if (err != nil) != tt.wantErr {
				t.Fatalf("error %v, want error %v", err, tt.wantErr)
			}
			for _, w := range tt.want {
				if !strings.Contains(out.String(), w) {
					t.Errorf("output lacks %q:\n%s", w, out.String())
				}
			}
		})
	}
}

func TestFacilitiesCommandJSONIsTheAPIList(t *testing.T) {
	t.Setenv("SCALEMATCH_DATABASE_URL", "")
	var out bytes.Buffer
	if err := run([]string{"facilities", "--json", "--data", t.TempDir()}, strings.NewReader(""), &out, &out); err != nil {
		t.Fatal(err)
	}
	var list struct {
		Facilities []facilities.Facility `json:"facilities"`
	}
	dec := json.NewDecoder(&out)
	dec.DisallowUnknownFields()
	if err := dec.Decode(&list); err != nil {
		t.Fatal(err)
	}
	if len(list.Facilities) != len(facilities.Demo()) {
		t.Errorf("listed %d facilities, want %d", len(list.Facilities), len(facilities.Demo()))
	}
}
