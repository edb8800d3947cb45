package similarity_test

import (
	"encoding/json"
	"math/big"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/check"
	"scalematch/similarity"
)

func mustDim(t testing.TB, s string) similarity.Dimension {
	t.Helper()
	d, err := similarity.ParseDimension(s)
	require.NoError(t, err)
	return d
}

func vars(t testing.TB, nameDim ...string) []similarity.Variable {
	t.Helper()
	var out []similarity.Variable
	for i := 0; i < len(nameDim); i += 2 {
		out = append(out, similarity.Variable{Name: nameDim[i], Dim: mustDim(t, nameDim[i+1])})
	}
	return out
}

func TestGroups(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name      string
		vars      []similarity.Variable
		repeating []string
		rank      int
		want      []string // Group.String of each group, in order
		known     []string
	}{
		{
			// physics.md §5: the textbook force on a body, ρ, V, L repeating.
			name:      "force on a body",
			vars:      vars(t, "R", "M L T^-2", "rho", "M L^-3", "V", "L T^-1", "L", "L", "mu", "M L^-1 T^-1"),
			repeating: []string{"rho", "V", "L"},
			rank:      3,
			want:      []string{"R rho^-1 V^-2 L^-2", "mu rho^-1 V^-1 L^-1"},
			known:     []string{"force coefficient", "inverse Reynolds number (1/Re)"},
		},
		{
			name:  "force on a body, automatic choice",
			vars:  vars(t, "R", "M L T^-2", "rho", "M L^-3", "V", "L T^-1", "L", "L", "mu", "M L^-1 T^-1"),
			rank:  3,
			want:  []string{"R rho^-1 V^-2 L^-2", "mu rho^-1 V^-1 L^-1"},
			known: []string{"force coefficient", "inverse Reynolds number (1/Re)"},
		},
		{
			// White, Fluid Mechanics, ch. 5 (from memory): Δp in a pipe depends on
			// ρ, V, d, μ, the roughness ε and the length ℓ; Δp/(ρV²) = f(Re, ε/d, ℓ/d).
			name:      "pipe pressure drop with roughness",
			vars:      vars(t, "dp", "M L^-1 T^-2", "rho", "M L^-3", "V", "L T^-1", "d", "L", "mu", "M L^-1 T^-1", "eps", "L", "ell", "L"),
			repeating: []string{"rho", "V", "d"},
			rank:      3,
			want:      []string{"dp rho^-1 V^-2", "mu rho^-1 V^-1 d^-1", "eps d^-1", "ell d^-1"},
			known:     []string{"pressure coefficient", "inverse Reynolds number (1/Re)", "", ""},
		},
		{
			// White, Fluid Mechanics, ch. 5 (from memory): the period of a pendulum
			// depends on its length, its mass and g; T·√(g/L) is a constant (2π for small
			// swings), and the mass drops out.
			name:  "pendulum period",
			vars:  vars(t, "T", "T", "L", "L", "m", "M", "g", "L T^-2"),
			rank:  3,
			want:  []string{"T L^-1/2 g^1/2"},
			known: []string{""},
		},
		{
			// Froude number with g: fractional exponents are exact.
			name:      "Froude number",
			vars:      vars(t, "V", "L T^-1", "g", "L T^-2", "L", "L"),
			repeating: []string{"g", "L"},
			rank:      2,
			want:      []string{"V g^-1/2 L^-1/2"},
			known:     []string{"Froude number"},
		},
		{
			// g·L/V² is a power of the Froude number and is named as that power.
			name:      "inverse square of the Froude number",
			vars:      vars(t, "V", "L T^-1", "g", "L T^-2", "L", "L"),
			repeating: []string{"V", "L"},
			rank:      2,
			want:      []string{"g V^-2 L"},
			known:     []string{"inverse square of the Froude number (1/Fr²)"},
		},
		{
			name:  "Mach and Reynolds with subscripts",
			vars:  vars(t, "D", "M L T^-2", "rho_inf", "M L^-3", "V_inf", "L T^-1", "c", "L", "mu_inf", "M L^-1 T^-1", "a_inf", "L T^-1"),
			rank:  3,
			want:  []string{"D rho_inf^-1 V_inf^-2 c^-2", "mu_inf rho_inf^-1 V_inf^-1 c^-1", "a_inf V_inf^-1"},
			known: []string{"force coefficient", "inverse Reynolds number (1/Re)", "inverse Mach number (1/M)"},
		},
		{
			name:  "kinematic viscosity",
			vars:  vars(t, "nu", "L^2 T^-1", "V", "L T^-1", "L", "L"),
			rank:  2,
			want:  []string{"nu V^-1 L^-1"},
			known: []string{"inverse Reynolds number (1/Re)"},
		},
		{
			name:  "vortex shedding",
			vars:  vars(t, "f", "T^-1", "V", "L T^-1", "d", "L"),
			rank:  2,
			want:  []string{"f V^-1 d"},
			known: []string{"Strouhal number"},
		},
		{
			name:  "droplet",
			vars:  vars(t, "sigma", "M T^-2", "rho", "M L^-3", "V", "L T^-1", "d", "L"),
			rank:  3,
			want:  []string{"sigma rho^-1 V^-2 d^-1"},
			known: []string{"inverse Weber number (1/We)"},
		},
		{
			name:  "propeller",
			vars:  vars(t, "n", "T^-1", "V", "L T^-1", "D", "L"),
			rank:  2,
			want:  []string{"n V^-1 D"},
			known: []string{"inverse advance ratio (1/J)"},
		},
		{
			// An angular frequency ω gives ωD/V = 2π·St: not named.
			name:  "angular frequency is not a Strouhal number",
			vars:  vars(t, "omega", "T^-1", "V", "L T^-1", "D", "L"),
			rank:  2,
			want:  []string{"omega V^-1 D"},
			known: []string{""},
		},
		{
			// Right dimensions, unknown names: not named.
			name:  "unrecognised names",
			vars:  vars(t, "Q", "M L T^-2", "k", "M L^-3", "w", "L T^-1", "z", "L", "eta2x", "M L^-1 T^-1"),
			rank:  3,
			want:  []string{"Q k^-1 w^-2 z^-2", "eta2x k^-1 w^-1 z^-1"},
			known: []string{"", ""},
		},
		{
			// Same names, a length where the speed should be: not a Mach number.
			name:  "sound speed with the wrong partner",
			vars:  vars(t, "a", "L T^-1", "V", "L T^-1", "x", "L", "t", "T"),
			rank:  2,
			want:  []string{"a V^-1", "t V x^-1"},
			known: []string{"inverse Mach number (1/M)", ""},
		},
		{
			name:  "dimensionless variable is its own group",
			vars:  vars(t, "alpha", "dimensionless", "V", "L T^-1", "L", "L"),
			rank:  2,
			want:  []string{"alpha"},
			known: []string{""},
		},
		{
			name: "no groups when n equals r",
			vars: vars(t, "rho", "M L^-3", "V", "L T^-1", "L", "L"),
			rank: 3,
		},
		{
			name: "no variables",
			rank: 0,
		},
		{
			// Heat transfer: temperature is a fourth base dimension; the groups are
			// the Nusselt, Reynolds and Péclet numbers.
			name:      "temperature enters",
			vars:      vars(t, "h", "M T^-3 Θ^-1", "k", "M L T^-3 Θ^-1", "rho", "M L^-3", "V", "L T^-1", "L", "L", "mu", "M L^-1 T^-1", "cp", "L^2 T^-2 Θ^-1"),
			repeating: []string{"rho", "V", "L", "k"},
			rank:      4,
			want:      []string{"h L k^-1", "mu rho^-1 V^-1 L^-1", "cp rho V L k^-1"},
			known:     []string{"", "inverse Reynolds number (1/Re)", ""},
		},
		{
			// k/(μ·c_p) is the Prandtl number: k, μ, c_p are not independent.
			name:  "dependent set of four",
			vars:  vars(t, "k", "M L T^-3 Θ^-1", "mu", "M L^-1 T^-1", "cp", "L^2 T^-2 Θ^-1", "L", "L"),
			rank:  3,
			want:  []string{"k mu^-1 cp^-1"},
			known: []string{""},
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			res, err := similarity.Groups(c.vars, c.repeating)
			require.NoError(t, err)
			assert.Equal(t, c.rank, res.Rank, "rank")
			require.Len(t, res.Groups, len(c.want), "groups %v, want %v", res.Groups, c.want)
			assert.Len(t, res.Repeating, res.Rank, "repeating variables, one per rank")
			for i, g := range res.Groups {
				assert.Equal(t, c.want[i], g.String(), "group %d", i)
				assert.Equal(t, c.known[i], g.KnownAs, "group %d (%s) known as", i, g)
				checkDimensionless(t, c.vars, g)
			}
		})
	}
}

func TestGroupsErrors(t *testing.T) {
	t.Parallel()
	base := vars(t, "R", "M L T^-2", "rho", "M L^-3", "V", "L T^-1", "L", "L", "mu", "M L^-1 T^-1")
	many := make([]similarity.Variable, similarity.MaxVariables+1)
	for i := range many {
		many[i] = similarity.Variable{Name: "x" + strconv.Itoa(i), Dim: similarity.DimLength}
	}
	cases := []struct {
		name      string
		vars      []similarity.Variable
		repeating []string
		field     string
		msg       string
	}{
		{"empty name", append(vars(t, " ", "L"), base...), nil, "variables[0].name", "empty"},
		{"duplicate name", append(base, similarity.Variable{Name: "V", Dim: similarity.DimVelocity}), nil, "variables[5].name", "variables[2]"},
		{"unknown repeating", base, []string{"rho", "U", "L"}, "repeating[1]", `"U" is not one of the variables`},
		{"repeating twice", base, []string{"rho", "V", "V"}, "repeating[2]", "twice"},
		{"too few repeating", base, []string{"rho", "V"}, "repeating", "rank 3, so exactly 3"},
		{"too many repeating", base, []string{"rho", "V", "L", "mu"}, "repeating", "exactly 3"},
		{"dependent repeating", append(vars(t, "U", "L T^-1"), base...), []string{"rho", "V", "U"}, "repeating", "rho, V, U are not dimensionally independent"},
		{"too many variables", many, nil, "variables", "at most 64"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			_, err := similarity.Groups(c.vars, c.repeating)
			var fe *check.Error
			require.ErrorAs(t, err, &fe)
			require.Equal(t, check.CodeInvalid, fe.Code, "%v", err)
			assert.Condition(t, func() bool {
				for _, f := range fe.Fields {
					if f.Field == c.field && strings.Contains(f.Message, c.msg) {
						return true
					}
				}
				return false
			}, "fields %+v, want %s: ...%s...", fe.Fields, c.field, c.msg)
		})
	}
}

// checkDimensionless verifies Σ exponent·dimension = 0 exactly.
func checkDimensionless(t *testing.T, vs []similarity.Variable, g similarity.Group) {
	t.Helper()
	dim := map[string]similarity.Dimension{}
	for _, v := range vs {
		dim[v.Name] = v.Dim
	}
	var sum [4]big.Rat
	for _, e := range g.Exponents {
		d := dim[e.Name]
		for b := range sum {
			x := new(big.Rat).SetFrac64(e.Power.Num()*int64(d[b]), e.Power.Den())
			sum[b].Add(&sum[b], x)
		}
	}
	for b := range sum {
		assert.Zero(t, sum[b].Sign(), "group %s is not dimensionless: base %d exponent %s", g, b, sum[b].RatString())
	}
}

// ratRank is an exact rank for the property test, written independently of the
// package's elimination.
func ratRank(rows [][]*big.Rat) int {
	if len(rows) == 0 {
		return 0
	}
	r := 0
	for c := 0; c < len(rows[0]) && r < len(rows); c++ {
		p := -1
		for i := r; i < len(rows); i++ {
			if rows[i][c].Sign() != 0 {
				p = i
				break
			}
		}
		if p < 0 {
			continue
		}
		rows[r], rows[p] = rows[p], rows[r]
		for i := r + 1; i < len(rows); i++ {
			f := new(big.Rat).Quo(rows[i][c], rows[r][c])
			for k := c; k < len(rows[i]); k++ {
				rows[i][k] = new(big.Rat).Sub(rows[i][k], new(big.Rat).Mul(f, rows[r][k]))
			}
		}
		r++
	}
	return r
}

// TestGroupsProperties draws random problems (seeded) and checks the Π theorem's
// promises: n − r groups, each dimensionless with one non-repeating variable at
// exponent 1, and the groups independent (their exponent matrix has rank n − r).
func TestGroupsProperties(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1914, 345))
	for trial := 0; trial < 500; trial++ {
		n := 1 + rng.IntN(9)
		vs := make([]similarity.Variable, n)
		dimRows := make([][]*big.Rat, 4)
		for i := range vs {
			var d similarity.Dimension
			for b := range d {
				if rng.IntN(3) > 0 {
					d[b] = int8(rng.IntN(7) - 3)
				}
			}
			vs[i] = similarity.Variable{Name: "q" + strconv.Itoa(i), Dim: d}
		}
		for b := range dimRows {
			for i := range vs {
				dimRows[b] = append(dimRows[b], big.NewRat(int64(vs[i].Dim[b]), 1))
			}
		}
		r := ratRank(dimRows)
		res, err := similarity.Groups(vs, nil)
		require.NoError(t, err, "trial %d %v", trial, vs)
		require.Equal(t, r, res.Rank, "trial %d: rank", trial)
		require.Len(t, res.Groups, n-r, "trial %d: groups, want n − r", trial)
		isRep := map[string]bool{}
		for _, name := range res.Repeating {
			isRep[name] = true
		}
		rows := make([][]*big.Rat, len(res.Groups))
		for gi, g := range res.Groups {
			checkDimensionless(t, vs, g)
			nonRep := 0
			for _, e := range g.Exponents {
				if !isRep[e.Name] {
					nonRep++
					assert.Equal(t, similarity.Int(1), e.Power, "trial %d: group %s: exponent of non-repeating %s", trial, g, e.Name)
				}
			}
			assert.Equal(t, 1, nonRep, "trial %d: group %s: non-repeating variables", trial, g)
			rows[gi] = make([]*big.Rat, n)
			for i, v := range vs {
				p := g.Power(v.Name)
				rows[gi][i] = big.NewRat(p.Num(), p.Den())
			}
		}
		assert.Equal(t, n-r, ratRank(rows), "trial %d: rank of the groups", trial)
		// The chosen repeating variables, given back explicitly, give the same groups.
		again, err := similarity.Groups(vs, res.Repeating)
		require.NoError(t, err, "trial %d: with repeating %v", trial, res.Repeating)
		for gi := range again.Groups {
			assert.Equal(t, res.Groups[gi].String(), again.Groups[gi].String(), "trial %d: group %d", trial, gi)
		}
	}
}

func TestGroupJSON(t *testing.T) {
	t.Parallel()
	res, err := similarity.Groups(vars(t, "V", "L T^-1", "g", "L T^-2", "L", "L"), []string{"g", "L"})
	require.NoError(t, err)
	b, err := json.Marshal(res)
	require.NoError(t, err)
	const want = `{"rank":2,"repeating":["g","L"],"groups":[{"exponents":{"V":1,"g":"-1/2","L":"-1/2"},"known_as":"Froude number"}]}`
	assert.Equal(t, want, string(b), "JSON, keys in order")
	var back similarity.GroupsResult
	require.NoError(t, json.Unmarshal(b, &back))
	require.Len(t, back.Groups, 1, "round trip %+v", back)
	assert.Equal(t, res.Groups[0].String(), back.Groups[0].String(), "round trip")
	assert.Equal(t, "Froude number", back.Groups[0].KnownAs, "round trip")
	assert.Equal(t, "V^2 g^-1 L^-1", res.Groups[0].Integer().String(), "Integer()")
}

func TestRational(t *testing.T) {
	t.Parallel()
	cases := []struct {
		in   string
		want string
		json string
		f    float64
	}{
		{"3", "3", "3", 3},
		{"-1/2", "-1/2", `"-1/2"`, -0.5},
		{"2/-4", "", "", 0},
		{"4/6", "2/3", `"2/3"`, 2.0 / 3},
		{"+3/4", "3/4", `"3/4"`, 0.75},
		{"0/5", "0", "0", 0},
		{"1/0", "", "", 0},
		{"x", "", "", 0},
	}
	for _, c := range cases {
		t.Run(c.in, func(t *testing.T) {
			t.Parallel()
			r, err := similarity.ParseRational(c.in)
			if c.want == "" {
				require.ErrorIs(t, err, similarity.ErrRational, "ParseRational(%q) = %v", c.in, r)
				return
			}
			require.NoError(t, err, "ParseRational(%q)", c.in)
			require.Equal(t, c.want, r.String(), "ParseRational(%q)", c.in)
			require.Equal(t, c.f, r.Float64(), "ParseRational(%q) as a float", c.in) // exact: a ratio of small integers
			b, err := json.Marshal(r)
			require.NoError(t, err)
			assert.Equal(t, c.json, string(b), "JSON")
			var back similarity.Rational
			require.NoError(t, json.Unmarshal(b, &back), "round trip")
			assert.Equal(t, r, back, "round trip")
		})
	}
	var zero similarity.Rational
	assert.Equal(t, int64(1), zero.Den(), "zero value's denominator")
	assert.Equal(t, "0", zero.String(), "zero value")
	assert.Zero(t, zero.Sign(), "zero value's sign")
}
