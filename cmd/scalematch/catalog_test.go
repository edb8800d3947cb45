package main

import (
	"context"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities/sqlite"
	"scalematch/internal/testfixture"
)

// TestEveryCommandReadsTheSameCatalog checks that plan, loads and facilities all
// honour SCALEMATCH_DATABASE_URL (a URL that is not PostgreSQL's is refused by
// each, so each reads it), and that a facility not found names the catalog the
// command looked in.
func TestEveryCommandReadsTheSameCatalog(t *testing.T) {
	store := t.TempDir()
	db, err := sqlite.Open(context.Background(), sqlite.Path(store))
	require.NoError(t, err)
	require.NoError(t, db.Close())
	noStore := t.TempDir()
	missing := strings.Replace(testfixture.J16Plan, `"tsw-1"`, `"no-such"`, 1)
	missingLoads := strings.Replace(testfixture.J16Loads, `"tsw-1"`, `"no-such"`, 1)
	cases := []struct {
		name     string
		database string
		args     []string
		stdin    string
		want     string
	}{
		{"plan reads the database URL", "mysql://x", []string{"plan", "--data", noStore, "-"}, testfixture.J16Plan, "SCALEMATCH_DATABASE_URL: want a postgres:// URL"},
		{"loads reads the database URL", "mysql://x", []string{"loads", "--data", noStore, "-"}, testfixture.J16Loads, "SCALEMATCH_DATABASE_URL: want a postgres:// URL"},
		{"facilities reads the database URL", "mysql://x", []string{"facilities", "--data", noStore}, "", "SCALEMATCH_DATABASE_URL: want a postgres:// URL"},
		{"plan: not found in the demo catalog", "", []string{"plan", "--data", noStore, "-"}, missing, `facility "no-such" not found (looked in the demo catalog)`},
		{"loads: not found in the demo catalog", "", []string{"loads", "--data", noStore, "-"}, missingLoads, `"no-such" not found (looked in the demo catalog)`},
		{"facilities: not found in the demo catalog", "", []string{"facilities", "--data", noStore, "show", "no-such"}, "", `no facility "no-such" in the catalog (looked in the demo catalog)`},
		{"plan: not found in a SQLite catalog", "", []string{"plan", "--data", store, "-"}, missing, `(looked in the catalog: sqlite ` + sqlite.Path(store) + `)`},
		{"facilities: not found in a SQLite catalog", "", []string{"facilities", "--data", store, "show", "no-such"}, "", `(looked in the catalog: sqlite ` + sqlite.Path(store) + `)`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Setenv("SCALEMATCH_DATABASE_URL", c.database)
			_, err := runCmd(t, c.stdin, c.args...)
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}
