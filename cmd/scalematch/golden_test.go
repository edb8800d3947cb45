package main

import (
	"bytes"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// updateGolden rewrites the golden files under testdata/golden from what the
// commands print now: `go test ./cmd/scalematch -run TestGolden -update`. Review
// the diff before committing it: every changed figure is a changed answer.
var updateGolden = flag.Bool("update", false, "rewrite testdata/golden from the commands' current output")

// goldenCases lists every request the repository ships for users to run, each
// with the command lines whose output is pinned: the example plan requests
// (examples/*.json) and the requests the documents use (docs/requests/*.json),
// each as the CLI prints its table and as its JSON answer.
func goldenCases(t *testing.T) []goldenCase {
	t.Helper()
	var cases []goldenCase
	for _, dir := range []string{"examples", "docs/requests"} {
		files, err := filepath.Glob(filepath.Join("..", "..", dir, "*.json"))
		require.NoError(t, err)
		require.NotEmpty(t, files, "no requests in %s", dir)
		for _, f := range files {
			if strings.HasPrefix(filepath.Base(f), "campaign") {
				continue // campaign requests are pinned by the campaign command's tests
			}
			name := strings.TrimSuffix(filepath.Base(f), ".json")
			cases = append(cases,
				goldenCase{golden: name + ".txt", args: []string{"plan", f}},
				goldenCase{golden: name + ".json", args: []string{"plan", "--json", f}})
		}
	}
	return cases
}

type goldenCase struct {
	golden string   // file name under testdata/golden
	args   []string // command line after "scalematch"
}

// TestGolden runs every shipped request through the CLI and compares the output,
// byte for byte, with its golden file (regression values: the program's own
// earlier output, reviewed when it changes). A plan whose verdict is not "within
// the allowed loads" exits non-zero by design; its output is pinned all the same.
func TestGolden(t *testing.T) {
	t.Parallel()
	for _, c := range goldenCases(t) {
		t.Run(c.golden, func(t *testing.T) {
			t.Parallel()
			var out, errOut bytes.Buffer
			err := run(c.args, strings.NewReader(""), &out, &errOut)
			if err != nil {
				var v verdictError
				require.ErrorAs(t, err, &v, "scalematch %s: %v\n%s", strings.Join(c.args, " "), err, errOut.String())
			}
			require.NotEmpty(t, out.String(), "scalematch %s printed nothing", strings.Join(c.args, " "))
			path := filepath.Join("testdata", "golden", c.golden)
			if *updateGolden {
				require.NoError(t, os.MkdirAll(filepath.Dir(path), 0o755))
				require.NoError(t, os.WriteFile(path, out.Bytes(), 0o644))
				return
			}
			want, err := os.ReadFile(path)
			require.NoError(t, err, "no golden file: run go test ./cmd/scalematch -run TestGolden -update")
			if got := out.String(); got != string(want) {
				t.Errorf("scalematch %s differs from %s at %s\nif the change is intended, run go test ./cmd/scalematch -run TestGolden -update and review the diff",
					strings.Join(c.args, " "), path, firstDifference(string(want), got))
			}
		})
	}
}

// TestGoldenFilesHaveCases fails on a golden file whose request is gone, so the
// directory never keeps answers nobody checks.
func TestGoldenFilesHaveCases(t *testing.T) {
	t.Parallel()
	want := map[string]bool{}
	for _, c := range goldenCases(t) {
		want[c.golden] = true
	}
	files, err := filepath.Glob(filepath.Join("testdata", "golden", "*"))
	require.NoError(t, err)
	for _, f := range files {
		assert.True(t, want[filepath.Base(f)], "%s pins no shipped request: remove it", f)
	}
}

// firstDifference describes where got first differs from want: the line and
// column, and up to 80 bytes of each around it (a JSON answer is one long line).
func firstDifference(want, got string) string {
	i := 0
	for i < len(want) && i < len(got) && want[i] == got[i] {
		i++
	}
	line := strings.Count(want[:i], "\n") + 1
	col := i - strings.LastIndex(want[:i], "\n")
	around := func(s string) string {
		from, to := max(0, i-40), min(len(s), i+40)
		return fmt.Sprintf("%q", s[from:to])
	}
	return fmt.Sprintf("line %d, column %d:\n  golden %s\n  now    %s", line, col, around(want), around(got))
}
