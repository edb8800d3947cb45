package similarity

import (
	"os"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestUnitTableCovered makes sure that every unit name of the table is checked
// against GNU units: each must appear alone in the fixture's quantity column.
func TestUnitTableCovered(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("../testdata/reference/units/factors.tsv")
	require.NoError(t, err)
	seen := map[string]bool{}
	for _, line := range strings.Split(string(b), "\n") {
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		q, _, _ := strings.Cut(line, "\t")
		if _, unit, ok := strings.Cut(q, " "); ok {
			seen[unit] = true
		}
	}
	for name := range unitTable {
		assert.True(t, seen[name], "unit %q is not in factors.tsv: add it to testdata/reference/units/gen.sh and regenerate", name)
	}
}
