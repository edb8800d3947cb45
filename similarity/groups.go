package similarity

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math/big"
	"strconv"
	"strings"

	"scalematch/internal/check"
)

// MaxVariables is the largest number of variables Groups accepts.
const MaxVariables = 64

// Variable is one physical quantity of a problem: its name (as the caller writes it,
// "rho", "V", "mu") and its dimension.
type Variable struct {
	Name string    // Name identifies the variable in the groups; unique, not empty.
	Dim  Dimension // Dim is its dimension; the zero value makes it its own group.
}

// Exponent is the power of one variable in a dimensionless group.
type Exponent struct {
	Name  string   // Name is the variable's name.
	Power Rational // Power is its exact exponent, never 0 in a Group.
}

// Group is one dimensionless group, the product of its variables raised to their
// exponents. The first exponent belongs to the group's one non-repeating variable and
// is 1; the others belong to repeating variables, in the order of the repeating list,
// and variables with exponent 0 are left out. KnownAs names the group when it is
// recognised ("Reynolds number"), else it is "". In JSON it is
// {"exponents": {"R": 1, "rho": -1, ...}, "known_as": "..."}, the object in the
// order above.
type Group struct {
	Exponents []Exponent
	KnownAs   string
}

// GroupsResult is the outcome of the Π theorem: the rank of the dimension matrix and
// the n − rank independent groups.
type GroupsResult struct {
	// Rank is the rank r of the dimension matrix (base dimensions × variables).
	Rank int `json:"rank"`
	// Repeating are the r repeating variables used, as given or as chosen.
	Repeating []string `json:"repeating"`
	// Groups are the n − r independent dimensionless groups, one per non-repeating
	// variable in the order the variables were given; empty when n ≤ r.
	Groups []Group `json:"groups"`
}

// Power returns the exponent of the named variable, 0 when it is absent.
func (g Group) Power(name string) Rational {
	for _, e := range g.Exponents {
		if e.Name == name {
			return e.Power
		}
	}
	return Rational{}
}

// String writes the group as a product, "R rho^-1 V^-2 L^-2", "V g^-1/2 L^-1/2".
func (g Group) String() string {
	var b strings.Builder
	for i, e := range g.Exponents {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(e.Name)
		if e.Power != Int(1) {
			b.WriteByte('^')
			b.WriteString(e.Power.String())
		}
	}
	return b.String()
}

// Integer returns the group raised to the smallest positive whole power that makes
// every exponent an integer: V·g^-1/2·L^-1/2 becomes V²·g^-1·L^-1. A group whose
// exponents are whole is returned unchanged. The result is as dimensionless as g
// and names the same group.
func (g Group) Integer() Group {
	l := int64(1)
	for _, e := range g.Exponents {
		d := e.Power.Den()
		l = l / gcd(l, d) * d
	}
	if l == 1 {
		return g
	}
	out := Group{Exponents: make([]Exponent, len(g.Exponents)), KnownAs: g.KnownAs}
	for i, e := range g.Exponents {
		p, _ := NewRational(e.Power.Num()*(l/e.Power.Den()), 1)
		out.Exponents[i] = Exponent{Name: e.Name, Power: p}
	}
	return out
}

// MarshalJSON writes {"exponents": {name: exponent, ...}, "known_as": "..."} with the
// exponents in order.
func (g Group) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteString(`{"exponents":{`)
	for i, e := range g.Exponents {
		if i > 0 {
			b.WriteByte(',')
		}
		name, err := json.Marshal(e.Name)
		if err != nil {
			return nil, err
		}
		b.Write(name)
		b.WriteByte(':')
		p, _ := e.Power.MarshalJSON()
		b.Write(p)
	}
	b.WriteString(`},"known_as":`)
	k, err := json.Marshal(g.KnownAs)
	if err != nil {
		return nil, err
	}
	b.Write(k)
	b.WriteByte('}')
	return b.Bytes(), nil
}

// UnmarshalJSON reads what MarshalJSON writes, keeping the order of the exponents.
func (g *Group) UnmarshalJSON(data []byte) error {
	var raw struct {
		Exponents json.RawMessage `json:"exponents"`
		KnownAs   string          `json:"known_as"`
	}
	if err := json.Unmarshal(data, &raw); err != nil {
		return err
	}
	var out Group
	out.KnownAs = raw.KnownAs
	if len(raw.Exponents) > 0 && string(raw.Exponents) != "null" {
		dec := json.NewDecoder(bytes.NewReader(raw.Exponents))
		if t, err := dec.Token(); err != nil || t != json.Delim('{') {
			return fmt.Errorf("group exponents must be an object of name: exponent")
		}
		for dec.More() {
			t, err := dec.Token()
			if err != nil {
				return err
			}
			name, _ := t.(string)
			var p Rational
			if err := dec.Decode(&p); err != nil {
				return fmt.Errorf("exponent of %q: %w", name, err)
			}
			out.Exponents = append(out.Exponents, Exponent{Name: name, Power: p})
		}
	}
	*g = out
	return nil
}

// Groups applies the Buckingham Π theorem (Buckingham 1914, Phys. Rev. 4:345) to the
// variables: with r the rank of their dimension matrix, computed by exact rational
// Gaussian elimination, it returns n − r independent dimensionless groups. Each group
// holds one non-repeating variable with exponent 1 and the r repeating variables with
// the exact exponents that cancel its dimension, found by solving the r-column linear
// system exactly:
//
//	Π_j = x_j · Π_k q_k^(e_jk),  Σ_k e_jk·dim(q_k) = −dim(x_j)
//
// repeating names the r repeating variables; they must be dimensionally independent.
// When it is empty they are chosen automatically: the first variable is taken to be
// the dependent one and is repeated only if nothing else reaches the rank; among the
// others, variables recognised as a density come first, then a speed, then a length
// (the classic ρ, V, L), then the rest in the order given; each is taken when it
// raises the rank, until the rank is reached.
//
// Groups are named (KnownAs) by the rules of recognise. When n ≤ r there are no groups:
// the result holds the rank and an empty list. Bad input is a *check.Error
// (CodeInvalid) naming each bad field by its JSON path ("variables[2].name",
// "repeating[0]").
func Groups(vars []Variable, repeating []string) (GroupsResult, error) {
	var bad []check.FieldError
	if len(vars) > MaxVariables {
		bad = append(bad, check.FieldError{Field: "variables",
			Message: fmt.Sprintf("%d variables given; at most %d are allowed", len(vars), MaxVariables)})
		return GroupsResult{}, check.Invalid("too many variables", bad)
	}
	index := make(map[string]int, len(vars))
	for i, v := range vars {
		field := "variables[" + strconv.Itoa(i) + "].name"
		switch {
		case strings.TrimSpace(v.Name) == "":
			bad = append(bad, check.FieldError{Field: field, Message: "is empty; every variable needs a name"})
		default:
			if j, dup := index[v.Name]; dup {
				bad = append(bad, check.FieldError{Field: field,
					Message: fmt.Sprintf("%q is also the name of variables[%d]; names must be unique", v.Name, j)})
				continue
			}
			index[v.Name] = i
		}
	}
	rep := make([]int, 0, len(repeating))
	seen := make(map[string]bool, len(repeating))
	for j, name := range repeating {
		field := "repeating[" + strconv.Itoa(j) + "]"
		i, ok := index[name]
		switch {
		case !ok:
			bad = append(bad, check.FieldError{Field: field, Message: fmt.Sprintf("%q is not one of the variables", name)})
		case seen[name]:
			bad = append(bad, check.FieldError{Field: field, Message: fmt.Sprintf("%q is listed twice", name)})
		default:
			seen[name] = true
			rep = append(rep, i)
		}
	}
	if len(bad) > 0 {
		return GroupsResult{}, check.Invalid("bad variables for the Π theorem", bad)
	}

	dims := make([]Dimension, len(vars))
	for i, v := range vars {
		dims[i] = v.Dim
	}
	r := rank(dims)
	res := GroupsResult{Rank: r, Repeating: []string{}, Groups: []Group{}}

	if len(repeating) > 0 {
		sub := make([]Dimension, len(rep))
		for k, i := range rep {
			sub[k] = dims[i]
		}
		if len(rep) != r {
			return GroupsResult{}, check.Invalid("wrong number of repeating variables", []check.FieldError{{Field: "repeating",
				Message: fmt.Sprintf("%d repeating variables given (%s); the dimension matrix has rank %d, so exactly %d are needed",
					len(rep), strings.Join(repeating, ", "), r, r)}})
		}
		if sr := rank(sub); sr != r {
			return GroupsResult{}, check.Invalid("repeating variables are not independent", []check.FieldError{{Field: "repeating",
				Message: fmt.Sprintf("%s are not dimensionally independent (their dimensions have rank %d, %d needed); choose variables that together span %s",
					strings.Join(repeating, ", "), sr, r, spanned(dims))}})
		}
	} else {
		rep = chooseRepeating(vars, r)
	}
	for _, i := range rep {
		res.Repeating = append(res.Repeating, vars[i].Name)
	}

	isRep := make([]bool, len(vars))
	for _, i := range rep {
		isRep[i] = true
	}
	for j, v := range vars {
		if isRep[j] {
			continue
		}
		x, err := solve(dims, rep, v.Dim)
		if err != nil {
			return GroupsResult{}, check.Invalid("no exact group", []check.FieldError{{Field: "variables[" + strconv.Itoa(j) + "]", Message: err.Error()}})
		}
		g := Group{Exponents: []Exponent{{Name: v.Name, Power: Int(1)}}}
		for k, i := range rep {
			if x[k].Sign() != 0 {
				g.Exponents = append(g.Exponents, Exponent{Name: vars[i].Name, Power: x[k]})
			}
		}
		g.KnownAs = recognise(g, vars, index)
		res.Groups = append(res.Groups, g)
	}
	return res, nil
}

// spanned lists the base dimensions the variables involve, "M, L, T".
func spanned(dims []Dimension) string {
	var used []string
	for b := range baseSymbols {
		for _, d := range dims {
			if d[b] != 0 {
				used = append(used, baseSymbols[b])
				break
			}
		}
	}
	return strings.Join(used, ", ")
}

// matrix returns the dimension matrix of the columns as big.Rat rows (M, L, T, Θ).
func matrix(cols []Dimension, extra int) [][]*big.Rat {
	m := make([][]*big.Rat, len(Dimension{}))
	for b := range m {
		m[b] = make([]*big.Rat, len(cols)+extra)
		for c := range m[b] {
			m[b][c] = new(big.Rat)
			if c < len(cols) {
				m[b][c].SetInt64(int64(cols[c][b]))
			}
		}
	}
	return m
}

// eliminate brings m to reduced row echelon form over its first ncols columns and
// returns the pivot column of each pivot row, in order.
func eliminate(m [][]*big.Rat, ncols int) []int {
	var pivots []int
	row := 0
	tmp := new(big.Rat)
	for c := 0; c < ncols && row < len(m); c++ {
		p := -1
		for i := row; i < len(m); i++ {
			if m[i][c].Sign() != 0 {
				p = i
				break
			}
		}
		if p < 0 {
			continue
		}
		m[row], m[p] = m[p], m[row]
		inv := new(big.Rat).Inv(m[row][c])
		for k := range m[row] {
			m[row][k].Mul(m[row][k], inv)
		}
		for i := range m {
			if i == row || m[i][c].Sign() == 0 {
				continue
			}
			f := new(big.Rat).Set(m[i][c])
			for k := range m[i] {
				m[i][k].Sub(m[i][k], tmp.Mul(f, m[row][k]))
			}
		}
		pivots = append(pivots, c)
		row++
	}
	return pivots
}

// rank returns the rank of the dimension matrix whose columns are dims.
func rank(dims []Dimension) int {
	return len(eliminate(matrix(dims, 0), len(dims)))
}

// chooseRepeating picks r dimensionally independent variables as documented at Groups.
func chooseRepeating(vars []Variable, r int) []int {
	if r == 0 {
		return nil
	}
	order := make([]int, 0, len(vars))
	for _, want := range []role{roleDensity, roleSpeed, roleLength} {
		for i := 1; i < len(vars); i++ {
			if roleOf(vars[i]) == want {
				order = append(order, i)
			}
		}
	}
	for i := 1; i < len(vars); i++ {
		switch roleOf(vars[i]) {
		case roleDensity, roleSpeed, roleLength:
		default:
			order = append(order, i)
		}
	}
	order = append(order, 0)
	var chosen []Dimension
	var idx []int
	for _, i := range order {
		if len(idx) == r {
			break
		}
		try := append(append([]Dimension(nil), chosen...), vars[i].Dim)
		if rank(try) == len(try) {
			chosen, idx = try, append(idx, i)
		}
	}
	// Report them in the order the variables were given.
	for a := 1; a < len(idx); a++ {
		for b := a; b > 0 && idx[b] < idx[b-1]; b-- {
			idx[b], idx[b-1] = idx[b-1], idx[b]
		}
	}
	return idx
}

// solve returns the exponents e of the repeating variables rep with
// Σ_k e_k·dims[rep[k]] = −d, exactly.
func solve(dims []Dimension, rep []int, d Dimension) ([]Rational, error) {
	cols := make([]Dimension, len(rep))
	for k, i := range rep {
		cols[k] = dims[i]
	}
	m := matrix(cols, 1)
	for b := range m {
		m[b][len(rep)].SetInt64(-int64(d[b]))
	}
	pivots := eliminate(m, len(rep))
	if len(pivots) != len(rep) {
		return nil, fmt.Errorf("the repeating variables are not independent")
	}
	for b := len(rep); b < len(m); b++ {
		if m[b][len(rep)].Sign() != 0 {
			return nil, fmt.Errorf("dimension %v is not a product of powers of the repeating variables", d)
		}
	}
	x := make([]Rational, len(rep))
	for k := range rep {
		v, ok := fromRat(m[k][len(rep)])
		if !ok {
			return nil, fmt.Errorf("an exponent is too large to hold exactly")
		}
		x[k] = v
	}
	return x, nil
}

// role is the physical role of a variable, inferred from its name and dimension.
type role int

const (
	roleNone role = iota
	roleDensity
	roleSpeed
	roleSoundSpeed
	roleLength
	roleViscosity
	roleKinematicViscosity
	roleGravity
	roleFrequency
	roleRotationRate
	roleSurfaceTension
	rolePressure
	roleForce
)

// roleNames lists, for each role, its dimension and the names (lower case) that
// mark it. A variable takes a role only when both its name and its dimension agree,
// so "D" is a drag when it is a force and a diameter when it is a length, and "c" a
// chord or a speed of sound.
var roleNames = []struct {
	role  role
	dim   Dimension
	names []string
}{
	{roleDensity, DimDensity, []string{"rho", "ρ", "density"}},
	{roleSpeed, DimVelocity, []string{"v", "u", "speed", "velocity", "vel", "tas", "airspeed"}},
	{roleSoundSpeed, DimVelocity, []string{"a", "c", "sound", "speed_of_sound", "sound_speed", "soundspeed"}},
	{roleLength, DimLength, []string{"l", "d", "c", "b", "h", "r", "x", "length", "chord", "diameter", "span", "radius", "height", "depth", "mac", "lref"}},
	{roleViscosity, DimViscosity, []string{"mu", "μ", "eta", "η", "viscosity"}},
	{roleKinematicViscosity, DimKinematicVisc, []string{"nu", "ν", "kinematic_viscosity"}},
	{roleGravity, DimAcceleration, []string{"g", "gn", "gravity"}},
	{roleFrequency, DimFrequency, []string{"f", "freq", "frequency"}},
	{roleRotationRate, DimFrequency, []string{"n", "rps", "rpm", "rotation", "rotation_rate", "revs"}},
	{roleSurfaceTension, DimSurfaceTension, []string{"sigma", "σ", "surface_tension"}},
	{rolePressure, DimPressure, []string{"p", "dp", "δp", "Δp", "delta_p", "deltap", "pressure"}},
	{roleForce, DimForce, []string{"f", "r", "d", "l", "t", "n", "y", "force", "lift", "drag", "thrust", "normal", "axial", "side"}},
}

// roleOf infers the role of v from its name and dimension. The name is compared in
// lower case, whole, without a subscript after '_' ("rho_inf", "V_ref") and without
// trailing digits ("g0", "p1").
func roleOf(v Variable) role {
	full := strings.ToLower(strings.TrimSpace(v.Name))
	head, _, _ := strings.Cut(full, "_")
	bare := strings.TrimRight(head, "0123456789")
	for _, rn := range roleNames {
		if rn.dim != v.Dim {
			continue
		}
		for _, n := range rn.names {
			if n == full || n == head || n == bare && bare != "" {
				return rn.role
			}
		}
	}
	return roleNone
}

// namedGroup is a recognised group: the roles with their exponents in its usual
// form, and the powers of that form that still carry its name.
type namedGroup struct {
	name   string
	symbol string // the usual symbol, for the names of powers ("Re")
	form   map[role]Rational
	powers []Rational
}

var (
	half      = Rational{num: 1, den: 2}
	minusHalf = Rational{num: -1, den: 2}
	plusMinus = []Rational{Int(1), Int(-1)}
)

// namedGroups are the groups recognise knows, with their usual forms:
//
//	Reynolds number      ρ·V·L/μ, or V·L/ν     (and its inverse)
//	Mach number          V/a                    (and its inverse)
//	Froude number        V/√(g·L)               (its inverse, square and inverse square)
//	force coefficient    F/(ρ·V²·L²)            (and its inverse)
//	pressure coefficient Δp/(ρ·V²)              (and its inverse)
//	Strouhal number      f·L/V                  (and its inverse)
//	Weber number         ρ·V²·L/σ               (and its inverse)
//	advance ratio        V/(n·D)                (and its inverse)
var namedGroups = []namedGroup{
	{"Reynolds number", "Re", map[role]Rational{roleDensity: Int(1), roleSpeed: Int(1), roleLength: Int(1), roleViscosity: Int(-1)}, plusMinus},
	{"Reynolds number", "Re", map[role]Rational{roleSpeed: Int(1), roleLength: Int(1), roleKinematicViscosity: Int(-1)}, plusMinus},
	{"Mach number", "M", map[role]Rational{roleSpeed: Int(1), roleSoundSpeed: Int(-1)}, plusMinus},
	{"Froude number", "Fr", map[role]Rational{roleSpeed: Int(1), roleGravity: minusHalf, roleLength: minusHalf}, []Rational{Int(1), Int(-1), Int(2), Int(-2)}},
	{"force coefficient", "C_F", map[role]Rational{roleForce: Int(1), roleDensity: Int(-1), roleSpeed: Int(-2), roleLength: Int(-2)}, plusMinus},
	{"pressure coefficient", "C_p", map[role]Rational{rolePressure: Int(1), roleDensity: Int(-1), roleSpeed: Int(-2)}, plusMinus},
	{"Strouhal number", "St", map[role]Rational{roleFrequency: Int(1), roleLength: Int(1), roleSpeed: Int(-1)}, plusMinus},
	{"Weber number", "We", map[role]Rational{roleDensity: Int(1), roleSpeed: Int(2), roleLength: Int(1), roleSurfaceTension: Int(-1)}, plusMinus},
	{"advance ratio", "J", map[role]Rational{roleSpeed: Int(1), roleRotationRate: Int(-1), roleLength: Int(-1)}, plusMinus},
}

// recognise names g when every variable in it has a role (see roleNames), no role
// appears twice, and its exponents are one of the allowed powers of a named group's
// usual form (namedGroups). Otherwise it returns "": a group is never given a name it
// might not deserve. A power other than the first is named as such (powerName):
// μ/(ρ·V·L) is "inverse Reynolds number (1/Re)", g·L/V² "inverse square of the
// Froude number (1/Fr²)".
func recognise(g Group, vars []Variable, index map[string]int) string {
	roles := make(map[role]Rational, len(g.Exponents))
	for _, e := range g.Exponents {
		ro := roleOf(vars[index[e.Name]])
		if ro == roleNone {
			return ""
		}
		if _, dup := roles[ro]; dup {
			return ""
		}
		roles[ro] = e.Power
	}
	for _, ng := range namedGroups {
		if len(ng.form) != len(roles) {
			continue
		}
		for _, k := range ng.powers {
			if matches(roles, ng.form, k) {
				return powerName(ng, k)
			}
		}
	}
	return ""
}

// powerName names the power k of a named group: the name itself for 1, and
// otherwise the power in words with the symbol's power in brackets.
func powerName(ng namedGroup, k Rational) string {
	switch k {
	case Int(1):
		return ng.name
	case Int(-1):
		return "inverse " + ng.name + " (1/" + ng.symbol + ")"
	case Int(2):
		return "square of the " + ng.name + " (" + ng.symbol + "²)"
	case Int(-2):
		return "inverse square of the " + ng.name + " (1/" + ng.symbol + "²)"
	}
	return ng.name + " to the power " + k.String() + " (" + ng.symbol + "^" + k.String() + ")"
}

// matches reports whether roles holds exactly the roles of form, each with the
// exponent of form times k.
func matches(roles, form map[role]Rational, k Rational) bool {
	for ro, p := range form {
		got, ok := roles[ro]
		if !ok || !equalProduct(got, p, k) {
			return false
		}
	}
	return true
}

// equalProduct reports whether got = p·k exactly.
func equalProduct(got, p, k Rational) bool {
	prod := new(big.Rat).Mul(p.rat(), k.rat())
	return prod.Cmp(got.rat()) == 0
}
