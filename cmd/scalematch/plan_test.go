package main

import (
	"bytes"
	"context"
	"io"
	"log/slog"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"scalematch/internal/check"
	"scalematch/internal/testfixture"
	"slices"
	"strings"
	"testing"

	"scalematch/api"
	"scalematch/facilities"
	"scalematch/facilities/sqlite"
)

const dragGroups = `{"variables": [{"name": "R", "unit": "N"}, {"name": "rho", "unit": "kg/m^3"},
  {"name": "V", "unit": "m/s"}, {"name": "L", "unit": "m"}, {"name": "mu", "unit": "Pa*s"}],
  "repeating": ["rho", "V", "L"]}`

// runCmd runs the command line with stdin and returns stdout and the error.
func runCmd(t *testing.T, stdin string, args ...string) (string, error) {
	t.Helper()
	var out, errOut bytes.Buffer
	err := run(args, strings.NewReader(stdin), &out, &errOut)
	return out.String(), err
}

// writeFile writes body to a file in a new temporary directory and returns its path.
func writeFile(t *testing.T, name, body string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(body), 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// postBody answers body at path from a service over catalog c (nil: the demo
// facilities) and returns the status and the body.
func postBody(t *testing.T, c facilities.Catalog, path, body string) (int, []byte) {
	t.Helper()
	s, err := api.New(api.Config{Catalog: c, Logger: slog.New(slog.NewTextHandler(io.Discard, nil))})
	if err != nil {
		t.Fatal(err)
	}
	rec := httptest.NewRecorder()
	req := httptest.NewRequest(http.MethodPost, path, strings.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	s.Handler().ServeHTTP(rec, req)
	return rec.Code, rec.Body.Bytes()
}

func TestPlanCommandTable(t *testing.T) {
	file := writeFile(t, "j16.json", testfixture.J16Plan)
	noStore := t.TempDir()
	cases := []struct {
		name  string
		args  []string
		stdin string
		want  []string
	}{
		{"SI from a file", []string{"plan", "--data", noStore, file}, "", []string{
			"facility tsw-1 (demo catalog, version 1)",
			"\nFlight\n", "\nModel\n", "\nTest\n", "\nMismatch\n",
			// +0.499 % is a regression value (the program's own output); 54000 Pa
			// is tsw-1's q limit and 66.7 % is 1/1.5, the safety factor's share.
			"Binding limits", "balance ", "max_dynamic_pressure", "+0.499 %",
			"Loads on balance int-b1 at q 54000 Pa (safety factor 1.5: at most 66.7 % of any rating)",
			"worst 66.7 % (axial at α 16°)",
			"Reynolds effects", "trips recommended", "\nSchedule\n", "\nWarnings\n", "\nCautions\n",
			"estimates",
			// Each group with the answer's own verdict (mach_matched, reynolds_matched).
			"(matched within ±0.005)", "(not matched within 0.1 %)",
			"within the allowed loads by this estimate",
		}},
		{"US from stdin", []string{"plan", "--data", noStore, "--units", "us", "-"}, testfixture.J16Plan, []string{
			"ft)", "kt)", "psf)", "°R)", "ft²)", "slug/ft³)",
			// U.S. customary units beside SI everywhere, the loads table included:
			// stagnation and static pressures in psia, speeds in ft/s.
			"normal N", "pitching N·m", "normal lbf", "pitching ft·lbf",
			// 191 040 Pa (the planner's own output: regression value) ÷ 6894.757 Pa
			// per psi (NIST SP 811) = 27.708 psia.
			"psia)", "ft/s)", "stagnation pressure     1.9104e+05 Pa (27.708 psia)",
			// 54 000 Pa / 47.880259 Pa/psf (NIST SP 811)
			"54000 Pa (1127.8 psf)",
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, err := runCmd(t, c.stdin, c.args...)
			if err != nil {
				t.Fatal(err)
			}
			for _, w := range c.want {
				if !strings.Contains(out, w) {
					t.Errorf("output lacks %q:\n%s", w, out)
				}
			}
		})
	}
}

// TestCommandJSONIsTheServiceBody checks --json against the service's answer to the
// same request, byte for byte.
func TestCommandJSONIsTheServiceBody(t *testing.T) {
	noStore := t.TempDir()
	cases := []struct {
		name, cmd, path, body string
	}{
		{"plan", "plan", "/v1/plans", testfixture.J16Plan},
		{"plan with unit strings", "plan", "/v1/plans", strings.Replace(testfixture.J16Plan, `"span": 16.4`, `"span": "19 m"`, 1)},
		{"loads, every balance", "loads", "/v1/loads", testfixture.J16Loads},
		{"loads, one balance", "loads", "/v1/loads", strings.Replace(testfixture.J16Loads, `{"model_mass": 20}`, `{"balance_id": "int-b2", "model_mass": 20}`, 1)},
		{"groups", "groups", "/v1/groups", dragGroups},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, want := postBody(t, nil, c.path, c.body)
			if code != http.StatusOK {
				t.Fatalf("service: status %d: %s", code, want)
			}
			args := []string{c.cmd, "--json", "-"}
			if c.cmd != "groups" {
				args = append(args, "--data", noStore)
			}
			out, err := runCmd(t, c.body, args...)
			if err != nil {
				t.Fatal(err)
			}
			if out != string(want) {
				t.Errorf("--json differs from the service's body:\n%s\n%s", out, want)
			}
		})
	}
}

// TestPlanCommandStore checks that facility ids resolve against the store under
// --data, that a plan stored by the service is answered with its stored bytes, and
// that the command line stores nothing.
func TestPlanCommandStore(t *testing.T) {
	ctx := context.Background()
	dir := t.TempDir()
	db, err := sqlite.Open(ctx, sqlite.Path(dir))
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	if _, err := facilities.SeedDemo(ctx, db, true); err != nil {
		t.Fatal(err)
	}
	f, _ := facilities.DemoFacility("tsw-1")
	f.ID, f.Name = "tsw-1x", "transonic tunnel, store-only copy"
	if _, err := db.CreateFacility(ctx, f, "test"); err != nil {
		t.Fatal(err)
	}
	stored := strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"tsw-1x"`, 1)
	code, want := postBody(t, db, "/v1/plans", stored)
	if code != http.StatusOK {
		t.Fatalf("service: status %d: %s", code, want)
	}

	out, err := runCmd(t, "", "plan", "--json", "--data", dir, writeFile(t, "x.json", stored))
	if err != nil {
		t.Fatal(err)
	}
	if out != string(want) {
		t.Errorf("--json differs from the stored plan:\n%s\n%s", out, want)
	}
	out, err = runCmd(t, "", "plan", "--data", dir, writeFile(t, "x.json", stored))
	if err != nil || !strings.Contains(out, "facility tsw-1x (sqlite "+sqlite.Path(dir)+", version 1)") {
		t.Errorf("table: %v\n%s", err, out)
	}
	// Without the store the id names nothing.
	if _, err := runCmd(t, stored, "plan", "--data", t.TempDir(), "-"); check.ErrorCode(err) != check.CodeNotFound {
		t.Errorf("without the store: %v, want not found", err)
	}
	// A new plan is answered but not stored.
	fresh := strings.Replace(stored, `"step": 1`, `"step": 2`, 1)
	out, err = runCmd(t, fresh, "plan", "--json", "--data", dir, "-")
	if err != nil {
		t.Fatal(err)
	}
	id := out[strings.Index(out, `"id":"`)+6:]
	id = id[:strings.IndexByte(id, '"')]
	if _, err := db.Plan(ctx, id); check.ErrorCode(err) != check.CodeNotFound {
		t.Errorf("plan %s: %v, want it not stored", id, err)
	}
}

func TestCommandErrors(t *testing.T) {
	noStore := t.TempDir()
	cases := []struct {
		name  string
		args  []string
		stdin string
		code  check.Code // "" when not a domain error
		want  []string   // fragments of the message
	}{
		{"bad fields are each named", []string{"plan", "--data", noStore, "-"},
			strings.NewReplacer(`"12000 m"`, `"12000 kg"`, `"span": 16.4`, `"span": "19 s"`).Replace(testfixture.J16Plan),
			check.CodeInvalid, []string{"invalid input", "\n  flight.altitude: ", "\n  article.span: "}},
		{"out-of-range values are each named", []string{"plan", "--data", noStore, "-"},
			strings.NewReplacer(`"12000 m"`, `"99000 m"`, `"span": 16.4`, `"span": -1`).Replace(testfixture.J16Plan),
			check.CodeInvalid, []string{"\n  flight.altitude: ", "\n  article.span: "}},
		{"unknown field", []string{"plan", "--data", noStore, "-"}, strings.Replace(testfixture.J16Plan, `"cl_max"`, `"cl_maks"`, 1),
			check.CodeInvalid, []string{"article.aero.cl_maks"}},
		{"groups has no --units: its groups are dimensionless", []string{"groups", "--units", "us", "-"}, dragGroups,
			"", []string{"unknown flag: --units"}},
		{"broken JSON", []string{"loads", "--data", noStore, "-"}, `{"article": `,
			check.CodeInvalid, []string{"(body): "}},
		{"unknown facility", []string{"plan", "--data", noStore, "-"}, strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"no-such"`, 1),
			check.CodeNotFound, []string{"not found", "no-such"}},
		{"no feasible plan", []string{"plan", "--data", noStore, "-"}, strings.Replace(testfixture.J16Plan, `{"scale_min": 0.01, "scale_max": 0.5}`, `{"scale": 0.2}`, 1),
			check.CodeUnprocessable, []string{"no feasible plan", "conflicting limits: "}},
		{"a finite input that overflowed: +Inf counts, exit 0", []string{"plan", "--data", noStore, "-"},
			strings.Replace(testfixture.J16Plan, `"wetted_area": 228`, `"wetted_area": 228, "form_factor": 1e308`, 1),
			check.CodeInvalid, []string{"\n  article.form_factor: "}},
		{"a finite load input that overflowed", []string{"loads", "--data", noStore, "-"},
			strings.Replace(testfixture.J16Loads, `"1.5 bar"`, `1e308`, 1),
			check.CodeInvalid, []string{"\n  test.stagnation_pressure: "}},
		{"a tiny reference area", []string{"plan", "--json", "--data", noStore, "-"},
			strings.Replace(testfixture.J16Plan, `"reference_area": 36.5`, `"reference_area": 1e-310`, 1),
			check.CodeInvalid, []string{"\n  article.reference_area: "}},
		{"groups without variables", []string{"groups", "-"}, `{"variables": []}`,
			check.CodeInvalid, []string{"\n  variables: "}},
		{"bad units flag", []string{"plan", "--units", "imperial", "-"}, testfixture.J16Plan, "", []string{"--units"}},
		{"missing file", []string{"loads", filepath.Join(noStore, "none.json")}, "", "", []string{"none.json"}},
		{"no argument", []string{"groups"}, "", "", []string{"arg"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, err := runCmd(t, c.stdin, c.args...)
			if err == nil {
				t.Fatalf("no error; output:\n%s", out)
			}
			if got := check.ErrorCode(err); got != c.code {
				t.Errorf("code %q, want %q (%v)", got, c.code, err)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error lacks %q:\n%v", w, err)
				}
			}
			if out != "" {
				t.Errorf("stdout not empty on error: %q", out)
			}
		})
	}
}

func TestLoadsAndGroupsCommandTables(t *testing.T) {
	noStore := t.TempDir()
	cases := []struct {
		name  string
		args  []string
		stdin string
		want  []string
	}{
		{"loads on every balance", []string{"loads", "--data", noStore, "-"}, testfixture.J16Loads, []string{
			"Load check: facility tsw-1", "Loads on balance int-b1", "Loads on balance int-b2",
			"Facility limits broken\n  none\n", "\nCautions\n",
		}},
		{"loads US", []string{"loads", "--data", noStore, "--units", "us", "-"}, testfixture.J16Loads, []string{"axial N", "axial lbf", "psf)", "psia)"}},
		{"groups", []string{"groups", "-"}, dragGroups, []string{
			"rank 3; repeating variables: rho, V, L\n",
			"Π1 = R rho^-1 V^-2 L^-2  (force coefficient)\n",
			// μ/(ρVL) is the inverse of the Reynolds number and is named so.
			"Π2 = mu rho^-1 V^-1 L^-1  (inverse Reynolds number (1/Re))\n",
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, err := runCmd(t, c.stdin, c.args...)
			if err != nil {
				t.Fatal(err)
			}
			for _, w := range c.want {
				if !strings.Contains(out, w) {
					t.Errorf("output lacks %q:\n%s", w, out)
				}
			}
		})
	}
}

// TestExamplesPlan plans every example plan request under examples/ (the
// campaign requests, campaign-*.json, are run by TestCampaignExamples).
func TestExamplesPlan(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "..", "examples", "*.json"))
	if err != nil {
		t.Fatal(err)
	}
	files = slices.DeleteFunc(files, func(f string) bool { return strings.HasPrefix(filepath.Base(f), "campaign-") })
	if len(files) == 0 {
		t.Skip("no examples/*.json yet")
	}
	noStore := t.TempDir()
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			out, err := runCmd(t, "", "plan", "--data", noStore, f)
			if err != nil {
				t.Fatalf("%v", err)
			}
			if !strings.Contains(out, "\nBinding limits") {
				t.Errorf("no plan printed:\n%s", out)
			}
		})
	}
}
