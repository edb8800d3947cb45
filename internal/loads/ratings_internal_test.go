package loads

import (
	"math"
	"math/rand/v2"
	"slices"
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
	overs := 0
	for range 200 {
		var l Vector
		for k := range l {
			l[k] = 2000 * (rng.Float64() - 0.5)
		}
		rows := make([]Row, nrow)
		u, row, over := rs.fillRows(rows, &l)
		wu, wrow := rs.Utilization(&l)
		require.Equal(t, wu, u)
		require.Equal(t, wrow, row)
		require.Equal(t, fillRowsLiteral(&rs, nrow, &l), rows, "the rows as Row literals give them")
		overs += boolInt(over)
		require.Equal(t, slices.ContainsFunc(rows, func(r Row) bool { return r.ShareOfAllowed > 1+1e-12 }), over)
		limiting := 0
		for _, r := range rows {
			if r.Limiting {
				limiting++
				assert.Equal(t, rs.RowName(row), r.Name)
			}
		}
		require.Equal(t, 1, limiting)
	}
	require.Positive(t, overs)
	require.Less(t, overs, 200)
}

// fillRowsLiteral is the rows fillRows wrote as Row literals (before it
// wrote them field by field into zero rows).
func fillRowsLiteral(rs *Ratings, nrow int, l *Vector) []Row {
	rows := make([]Row, nrow)
	limit := -1
	var u float64
	k, at0 := 6, -1
	for i := range rs.rows {
		r := &rs.rows[i]
		at := k
		if r.index >= 0 {
			at = r.index
		} else {
			k++
		}
		v := r.value(l)
		rows[at] = Row{Name: r.name, Load: v, Rated: true, Covered: true, Rating: r.limit, Allowed: r.allowed,
			ShareOfAllowed: math.Abs(v) / r.allowed}
		if x := math.Abs(v) / r.limit; x > u || limit < 0 {
			u, limit, at0 = x, i, at
		}
	}
	if at0 >= 0 {
		rows[at0].Limiting = true
	}
	for c := range 6 {
		if rs.single[c] < 0 {
			rows[c] = Row{Name: ComponentName(c), Load: l[c], Covered: rs.covered[c]}
		}
	}
	return rows
}

func boolInt(b bool) int {
	if b {
		return 1
	}
	return 0
}

// TestMaxDynamicPressureWrittenOut: Ratings.MaxDynamicPressure, with
// SafeDynamicPressure written out in its loop, gives what the loop over
// SafeDynamicPressure gives, to the bit, over random loads per pascal and
// weights (some breaking a row alone, some rows not growing with q).
func TestMaxDynamicPressureWrittenOut(t *testing.T) {
	t.Parallel()
	n, a, pm := 4000.0, 800.0, 300.0
	b := facilities.Balance{ID: "b", SafetyFactor: 1.5,
		Limits: facilities.Limits{Normal: &n, Axial: &a, PitchingMoment: &pm},
		Combined: []facilities.CombinedLimit{
			{Name: "fwd", Limit: 3000, Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": 10}},
			{Name: "side", Limit: 900, Coefficients: map[string]float64{"side": 1, "yawing_moment": 4}},
		}}
	rs, err := NewRatings(&b)
	require.NoError(t, err)
	rng := rand.New(rand.NewPCG(3, 4))
	kinds := map[string]int{}
	for range 2000 {
		var perQ, w Vector
		grows, heavy := rng.IntN(4) > 0, []float64{5, 300}[rng.IntN(2)]
		for k := range perQ {
			if grows && rng.IntN(3) > 0 {
				perQ[k] = rng.NormFloat64()
			}
			w[k] = heavy * rng.NormFloat64()
		}
		q, row := rs.MaxDynamicPressure(&perQ, &w)
		wq, wrow := math.Inf(1), -1
		for i := range rs.rows {
			r := &rs.rows[i]
			qi := SafeDynamicPressure(r.value(&perQ), r.value(&w), r.allowed)
			if qi < wq {
				wq, wrow = qi, i
			}
			if qi == 0 {
				break
			}
		}
		require.Equal(t, math.Float64bits(wq), math.Float64bits(q))
		require.Equal(t, wrow, row)
		switch {
		case q == 0:
			kinds["weight breaks"]++
		case math.IsInf(q, 1):
			kinds["none grows"]++
		default:
			kinds["finite"]++
		}
	}
	require.Len(t, kinds, 3, "%v", kinds)
}
