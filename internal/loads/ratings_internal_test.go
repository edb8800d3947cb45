package loads

import (
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
)

// TestFillRowsUtilization: the rows filled for a load give the same
// utilisation and limiting row as Ratings.Utilization, and exactly that row is
// marked limiting, on a balance of single ratings and gauge rows.
func TestFillRowsUtilization(t *testing.T) {
	t.Parallel()
	n, a, pm := 4000.0, 800.0, 300.0
	b := facilities.Balance{ID: "b", SafetyFactor: 1.5,
		Limits: facilities.Limits{Normal: &n, Axial: &a, PitchingMoment: &pm},
		Combined: []facilities.CombinedLimit{
			{Name: "fwd", Limit: 3000, Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": 10}},
			{Name: "aft", Limit: 3000, Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": -10}},
			{Name: "side", Limit: 900, Coefficients: map[string]float64{"side": 1, "yawing_moment": 4}},
		}}
	rs, err := NewRatings(&b)
	require.NoError(t, err)
	rng := rand.New(rand.NewPCG(1, 2))
	nrow := 6 + rs.Rows() - countSingle(&rs)
	for range 200 {
		var l Vector
		for k := range l {
			l[k] = 2000 * (rng.Float64() - 0.5)
		}
		rows := make([]Row, nrow)
		u, row := rs.fillRows(rows, &l)
		wu, wrow := rs.Utilization(&l)
		require.Equal(t, wu, u)
		require.Equal(t, wrow, row)
		limiting := 0
		for _, r := range rows {
			if r.Limiting {
				limiting++
				assert.Equal(t, rs.RowName(row), r.Name)
			}
		}
		require.Equal(t, 1, limiting)
	}
}
