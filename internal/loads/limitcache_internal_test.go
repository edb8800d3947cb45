package loads

import (
	"fmt"
	"hash/maphash"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/facilities"
	"scalematch/similarity"
)

// limitQuery is one question put to a load limit: a scale and a Mach number.
type limitQuery struct{ scale, mach float64 }

// limitQueries returns seeded random scales (1e-3 to 2, log-uniform) and Mach
// numbers (0 to 1.3), with the edges a limit answers apart: scale 0, a negative
// and an infinite scale, Mach 0 and 1.
func limitQueries(seed uint64, n int) []limitQuery {
	rng := rand.New(rand.NewPCG(seed, 17))
	qs := []limitQuery{{0, 0.3}, {-0.1, 0.3}, {math.Inf(1), 0.3}, {0.05, 0}, {0.05, 1}}
	for range n {
		qs = append(qs, limitQuery{math.Pow(10, -3+3.3*rng.Float64()), 1.3 * rng.Float64()})
	}
	return qs
}

// limitAnswers returns everything l answers at the queries, as bits (and the
// balance ids): MaxDynamicPressure, MinDynamicPressure, Windows and Balance.
func limitAnswers(l *Limit, qs []limitQuery) []string {
	out := make([]string, 0, len(qs))
	for _, q := range qs {
		st := facilities.State{Mach: q.mach}
		id, qb := l.Balance(q.scale, st)
		s := fmt.Sprintf("max %x min %x balance %s %x windows", math.Float64bits(l.MaxDynamicPressure(q.scale, st)),
			math.Float64bits(l.MinDynamicPressure(q.scale, st)), id, math.Float64bits(qb))
		for _, w := range l.Windows(nil, q.scale, st) {
			s += fmt.Sprintf(" [%x %x]", math.Float64bits(w.Lo), math.Float64bits(w.Hi))
		}
		out = append(out, s)
	}
	return out
}

// limitInputs are the inputs of LimitCache.Limits.
type limitInputs struct {
	Art similarity.Article
	Fac facilities.Facility
	In  Installation
	Pts []facilities.Point
	Res *Resolution
}

func (x *limitInputs) cached(c *LimitCache) (base, resolved *Limit, err error) {
	return c.Limits(&x.Art, &x.Fac, x.In, similarity.Matrix{Points: x.Pts}, x.Res)
}

// fresh builds x's limits without a cache, as the planner did before.
func (x *limitInputs) fresh() (base, resolved *Limit, err error) {
	base, err = NewLimit(&x.Art, &x.Fac, x.In, similarity.Matrix{Points: x.Pts})
	if err != nil {
		return nil, nil, err
	}
	return base, base.Resolved(x.Res), nil
}

// randomInputs returns seeded random inputs (pruneCase's matrices, balances
// and installations in every demo facility), with balance accuracies, a
// required resolution, a given test-section area and a load fraction now and
// then.
func randomInputs(rng *rand.Rand, i int) *limitInputs {
	art, f, in, mx := pruneCase(rng, i)
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	for k := range f.Balances {
		if rng.IntN(3) > 0 {
			f.Balances[k].Accuracy = &facilities.Accuracy{FractionOfRating: u(1e-4, 3e-3)}
		}
	}
	if rng.IntN(3) == 0 {
		a := u(0.5, 1.5) * f.TestSection.Width * f.TestSection.Height
		f.TestSection.Area = &a
	}
	if rng.IntN(3) == 0 {
		v := u(0.5, 1)
		in.LoadFraction = &v
	}
	in = in.WithBuoyancy(f)
	x := &limitInputs{Art: *art, Fac: *f, In: in, Pts: mx.Points}
	switch rng.IntN(3) {
	case 1:
		cl, cd := u(1e-3, 1e-2), u(0.2, 3)
		x.Res = &Resolution{CL: &cl, CDCounts: &cd}
	case 2:
		cm := u(1e-3, 1e-2)
		x.Res = &Resolution{Cm: &cm}
	}
	return x
}

// TestLimitCacheAnswersAsFresh: over seeded random inputs, a limit from the
// cache (built on a miss, then found on a hit) answers every query exactly as a
// limit built afresh, with and without its resolution; and after 400 other
// inputs have gone through the cache and evicted it, every limit it returned
// still answers as it did (nothing writes a returned limit).
func TestLimitCacheAnswersAsFresh(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(17, 2026))
	qs := limitQueries(5, 60)
	c := NewLimitCache(16)
	type kept struct {
		base, resolved *Limit
		want           [2][]string
	}
	var all []kept
	for i := range 400 {
		x := randomInputs(rng, i)
		fb, fr, ferr := x.fresh()
		b1, r1, err := x.cached(c)
		if ferr != nil {
			require.Error(t, err, "case %d", i)
			continue
		}
		require.NoError(t, err, "case %d", i)
		b2, r2, err := x.cached(c)
		require.NoError(t, err)
		require.True(t, b1 == b2 && r1 == r2, "case %d: a hit returns the stored limits", i)
		if x.Res.Empty() {
			require.True(t, b1 == r1, "case %d: no resolution, one limit", i)
		}
		want := [2][]string{limitAnswers(fb, qs), limitAnswers(fr, qs)}
		require.Equal(t, want[0], limitAnswers(b1, qs), "case %d: limit without the resolution", i)
		require.Equal(t, want[1], limitAnswers(r1, qs), "case %d: resolved limit", i)
		all = append(all, kept{b1, r1, want})
	}
	require.Greater(t, len(all), 300, "most random cases are valid")
	for i, k := range all {
		assert.Equal(t, k.want[0], limitAnswers(k.base, qs), "kept limit %d", i)
		assert.Equal(t, k.want[1], limitAnswers(k.resolved, qs), "kept limit %d, resolved", i)
	}
}

// TestLimitResolvedLeavesLimit: Resolved returns a new limit and leaves its
// receiver as it was, so the unresolved fallback of a plan reads the limit
// without a floor while other plans read the resolved one.
func TestLimitResolvedLeavesLimit(t *testing.T) {
	t.Parallel()
	x := keyBase(t)
	qs := limitQueries(9, 40)
	base, err := NewLimit(&x.Art, &x.Fac, x.In, similarity.Matrix{Points: x.Pts})
	require.NoError(t, err)
	before := limitAnswers(base, qs)
	r := base.Resolved(x.Res)
	require.True(t, base != r)
	require.NotEqual(t, before, limitAnswers(r, qs), "the resolution changes the answers (a floor)")
	assert.Equal(t, before, limitAnswers(base, qs))
	assert.Equal(t, before, limitAnswers(r.Resolved(nil), qs), "resolving to nothing removes the floor")
	assert.Equal(t, limitAnswers(r, qs), limitAnswers(base.Resolved(x.Res), qs))
}

// keyBase returns the inputs TestLimitCacheKeyComplete perturbs: the Pellin P3
// on lsw-2 (closed walls: the blockage and so the section's dimensions count),
// with a third balance of gauge rows and per-component accuracies, a given
// section area, offsets, a mass, a volume's buoyancy, a load fraction and a
// required resolution, so that every field holds a value a limit reads.
func keyBase(t *testing.T) *limitInputs {
	t.Helper()
	f, ok := facilities.DemoFacility("lsw-2")
	require.True(t, ok)
	v := func(x float64) *float64 { return &x }
	f.Balances = append(f.Balances, facilities.Balance{ID: "gauges", Name: "gauge balance", SafetyFactor: 1.25,
		Limits: facilities.Limits{Normal: v(4000), Axial: v(900), PitchingMoment: v(500)},
		Combined: []facilities.CombinedLimit{
			{Name: "front", Limit: 3000, Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": 5}},
			{Name: "rear", Limit: 3000, Coefficients: map[string]float64{"normal": 0.5, "pitching_moment": -5, "axial": 0.1}},
		},
		Accuracy: &facilities.Accuracy{FractionOfRating: 0.001, Components: &facilities.Limits{Normal: v(2), Side: v(1.5)}}})
	f.TestSection.Area = v(4.7)
	art := similarity.Article{ReferenceLength: 1.42, ReferenceArea: 13.4, Span: 9.6, Length: 7.9,
		FrontalArea: 1.7, WettedArea: 45, Aero: similarity.Aero{LiftSlope: 5.1, ZeroLiftAlpha: -2.4,
			CLMax: 1.55, CDMin: 0.029, CLAtCDMin: 0.12, InducedDragFactor: 0.052, CmZero: 0.04, CmSlope: -0.75}}
	mx, err := art.Aero.Matrix(similarity.Sweep{From: -4, To: 12, Step: 4}, &similarity.Sweep{From: 0, To: 4, Step: 4})
	require.NoError(t, err)
	for i := range mx.Points {
		p := &mx.Points[i]
		p.CY, p.Cl, p.Cn, p.DynamicPressureFactor = 0.01*p.Beta, -0.002*p.Beta, 0.003*p.Beta, 1
	}
	in := Installation{BalanceOffset: Offset{X: 0.03, Z: -0.01}, ModelMass: 35, CGOffset: Offset{X: -0.02, Z: 0.01},
		ModelVolume: 0.01, LoadFraction: v(0.9), Buoyancy: 5}
	return &limitInputs{Art: art, Fac: f, In: in, Pts: mx.Points,
		Res: &Resolution{CL: v(0.004), CDCounts: v(2), Cm: v(0.003), CY: v(0.01), Cl: v(0.01), Cn: v(0.01)}}
}

// keyFields are the inputs a limit reads, by their paths in limitInputs (a path
// and all under it): the cache's key must hold every one of them.
var keyFields = []string{"Art.ReferenceArea", "Art.ReferenceLength", "Art.FrontalArea",
	"Fac.TestSection", "Fac.Balances", "In", "Pts", "Res"}

func inKey(path string) bool {
	for _, k := range keyFields {
		if path == k || strings.HasPrefix(path, k+".") || strings.HasPrefix(path, k+"[") {
			return true
		}
	}
	return false
}

// TestLimitCacheKeyComplete changes every field of the inputs, one at a
// time, each in several ways (a number up, down, negated or to −0; an optional
// one removed or given; a string, a list's length, a gauge row's
// coefficients), found by walking the input types, so that a field added to
// them later is changed too. For each change that leaves the inputs valid, a
// cache that holds the unchanged inputs answers with the stored entry only
// when the field is not one a limit reads (keyFields), and its answers equal a
// fresh build's either way. A field left out of the key fails here: its change
// finds the stored entry.
func TestLimitCacheKeyComplete(t *testing.T) {
	t.Parallel()
	base := keyBase(t)
	qs := limitQueries(3, 24)
	var muts []mutation
	collectMutations(t, reflect.ValueOf(base).Elem(), "", func(r reflect.Value) reflect.Value { return r }, &muts)
	valid := map[string]int{}
	for _, m := range muts {
		x := cloneInputs(base)
		m.apply(reflect.ValueOf(x).Elem())
		c := NewLimitCache(4)
		b0, r0, err := base.cached(c)
		require.NoError(t, err)
		fb, fr, ferr := x.fresh()
		b, r, err := x.cached(c)
		if ferr != nil {
			require.Error(t, err, "%s: the fresh build fails, so must the cache", m.path)
			continue
		}
		require.NoError(t, err, m.path)
		valid[m.leaf]++
		// (Pointers compared with ==: testify's Same prints whole limits.)
		if inKey(m.leaf) {
			assert.True(t, b0 != b && r0 != r, "%s: a field the limit reads makes a new entry", m.path)
		} else {
			assert.True(t, b0 == b && r0 == r, "%s: a field the limit does not read keeps the entry", m.path)
		}
		assert.Equal(t, limitAnswers(fb, qs), limitAnswers(b, qs), m.path)
		assert.Equal(t, limitAnswers(fr, qs), limitAnswers(r, qs), m.path)
	}
	// Every field was changed validly at least once, and the walk reached them
	// all (5 inputs; 45 leaves of the matrix's 9 points of 9 numbers...).
	for _, m := range muts {
		assert.Positive(t, valid[m.leaf], "%s: no change of it left the inputs valid", m.leaf)
	}
	for _, p := range []string{"Art.FrontalArea", "Fac.TestSection.Area", "Fac.TestSection.Width", "Fac.TestSection.Walls",
		"Fac.Balances[0].Limits.Normal", "Fac.Balances[1].SafetyFactor", "Fac.Balances[2].Combined[1].Coefficients[axial]",
		"Fac.Balances[2].Accuracy.Components.Side", "Fac.Balances[0].Accuracy.FractionOfRating", "Fac.Balances[1].ID",
		"In.BalanceOffset.X", "In.CGOffset.Z", "In.LoadFraction", "In.Buoyancy", "In.BalanceID",
		"Pts[3].CD", "Pts[8].DynamicPressureFactor", "Pts", "Res.Cn", "Fac.Medium.Kind", "Art.Aero.CLMax"} {
		assert.Positive(t, valid[p], "%s changed", p)
	}
}

// mutation is one change of one field of limitInputs: leaf names the field,
// path the field and the change's kind.
type mutation struct {
	leaf, path string
	apply      func(root reflect.Value)
}

// collectMutations appends the changes of every field under v (at path; at
// finds it in a copy of the inputs) to out. It fails on a kind of field it
// does not know how to change.
func collectMutations(t *testing.T, v reflect.Value, path string, at func(reflect.Value) reflect.Value, out *[]mutation) {
	t.Helper()
	add := func(leaf, kind string, apply func(reflect.Value)) {
		*out = append(*out, mutation{leaf: leaf, path: leaf + " " + kind, apply: apply})
	}
	switch v.Kind() {
	case reflect.Float64:
		for i, c := range floatChanges(v.Float()) {
			add(path, fmt.Sprintf("float %d", i), func(r reflect.Value) { at(r).SetFloat(c) })
		}
	case reflect.Int:
		add(path, "int", func(r reflect.Value) { at(r).SetInt(v.Int() + 1) })
	case reflect.Bool:
		add(path, "bool", func(r reflect.Value) { at(r).SetBool(!v.Bool()) })
	case reflect.String:
		for i, s := range []string{v.String() + "x", "", "int-a", "closed", "open"} {
			if s != v.String() {
				add(path, fmt.Sprintf("string %d", i), func(r reflect.Value) { at(r).SetString(s) })
			}
		}
	case reflect.Pointer:
		if v.IsNil() {
			add(path, "given", func(r reflect.Value) {
				p := reflect.New(v.Type().Elem())
				if p.Elem().Kind() == reflect.Float64 {
					p.Elem().SetFloat(0.5)
				}
				at(r).Set(p)
			})
			return
		}
		add(path, "nil", func(r reflect.Value) { at(r).Set(reflect.Zero(v.Type())) })
		collectMutations(t, v.Elem(), path, func(r reflect.Value) reflect.Value { return at(r).Elem() }, out)
	case reflect.Struct:
		for i := range v.NumField() {
			if !v.Type().Field(i).IsExported() {
				continue
			}
			name := v.Type().Field(i).Name
			p := name
			if path != "" {
				p = path + "." + name
			}
			if v.Type().Field(i).Anonymous {
				p = path // an embedded struct's fields are the outer's
			}
			collectMutations(t, v.Field(i), p, func(r reflect.Value) reflect.Value { return at(r).Field(i) }, out)
		}
	case reflect.Slice:
		n := v.Len()
		for i := range n {
			collectMutations(t, v.Index(i), fmt.Sprintf("%s[%d]", path, i), func(r reflect.Value) reflect.Value { return at(r).Index(i) }, out)
		}
		if n > 0 {
			add(path, "shorter", func(r reflect.Value) { at(r).Set(at(r).Slice(0, n-1)) })
			add(path, "longer", func(r reflect.Value) { at(r).Set(reflect.Append(at(r), at(r).Index(n-1))) })
		}
	case reflect.Map:
		require.Equal(t, reflect.TypeFor[map[string]float64](), v.Type(), "%s: a map the test cannot change", path)
		for c := range 6 {
			name := ComponentName(c)
			leaf := fmt.Sprintf("%s[%s]", path, name)
			if x, ok := v.Interface().(map[string]float64)[name]; ok {
				for i, f := range floatChanges(x) {
					add(leaf, fmt.Sprintf("float %d", i), func(r reflect.Value) { at(r).Interface().(map[string]float64)[name] = f })
				}
				add(leaf, "removed", func(r reflect.Value) { delete(at(r).Interface().(map[string]float64), name) })
			} else {
				add(leaf, "added", func(r reflect.Value) { at(r).Interface().(map[string]float64)[name] = 0.25 })
			}
		}
	default:
		t.Fatalf("%s: a field of kind %s the test cannot change", path, v.Kind())
	}
}

// floatChanges returns the changed values of a number x: up and down by 0.1 %,
// and negated (a zero becomes ±1e-3, 0.5 and the zero of the other sign).
func floatChanges(x float64) []float64 {
	if x == 0 {
		return []float64{1e-3, -1e-3, 0.5, -x}
	}
	return []float64{x * 1.001, x * 0.999, -x}
}

// cloneInputs returns a deep copy of x: a change of the copy reaches none of
// x's pointers, slices or maps.
func cloneInputs(x *limitInputs) *limitInputs {
	return deepCopy(reflect.ValueOf(x)).Interface().(*limitInputs)
}

func deepCopy(v reflect.Value) reflect.Value {
	switch v.Kind() {
	case reflect.Pointer:
		if v.IsNil() {
			return v
		}
		p := reflect.New(v.Type().Elem())
		p.Elem().Set(deepCopy(v.Elem()))
		return p
	case reflect.Struct:
		s := reflect.New(v.Type()).Elem()
		s.Set(v)
		for i := range v.NumField() {
			if v.Type().Field(i).IsExported() {
				s.Field(i).Set(deepCopy(v.Field(i)))
			}
		}
		return s
	case reflect.Slice:
		if v.IsNil() {
			return v
		}
		s := reflect.MakeSlice(v.Type(), v.Len(), v.Len())
		for i := range v.Len() {
			s.Index(i).Set(deepCopy(v.Index(i)))
		}
		return s
	case reflect.Map:
		if v.IsNil() {
			return v
		}
		m := reflect.MakeMapWithSize(v.Type(), v.Len())
		for it := v.MapRange(); it.Next(); {
			m.SetMapIndex(it.Key(), deepCopy(it.Value()))
		}
		return m
	}
	return v
}

// TestLimitCacheComparesKeys: an entry whose hash equals a key's but whose
// stored key differs is not taken for it; the hash only picks the keys to
// compare.
func TestLimitCacheComparesKeys(t *testing.T) {
	t.Parallel()
	x := keyBase(t)
	c := NewLimitCache(4)
	b, _, err := x.cached(c)
	require.NoError(t, err)
	e := c.ring[0]
	require.True(t, b == e.base)
	y := cloneInputs(x)
	y.In.ModelMass++
	key := appendLimitKey(nil, &y.Art, &y.Fac, &y.In, y.Pts, y.Res)
	got, _ := c.find(e.hash, key)
	require.Nil(t, got, "same hash, another key")
	got, _ = c.find(e.hash, e.key)
	require.True(t, e == got)
}

// TestLimitCacheBounded: the cache keeps at most its entries, the oldest
// replaced first, and does not keep an entry larger than its share of
// limitCacheBytes (a matrix of thousands of points), which it still answers.
func TestLimitCacheBounded(t *testing.T) {
	t.Parallel()
	x := keyBase(t)
	c := NewLimitCache(3)
	var firsts []*Limit
	for i := range 5 {
		y := cloneInputs(x)
		y.In.ModelMass = float64(10 + i)
		b, _, err := y.cached(c)
		require.NoError(t, err)
		firsts = append(firsts, b)
	}
	held := 0
	for _, e := range c.ring {
		require.NotNil(t, e)
		held++
	}
	assert.Equal(t, 3, held)
	for i, want := range []bool{false, false, true, true, true} {
		y := cloneInputs(x)
		y.In.ModelMass = float64(10 + i)
		e := c.holds(appendLimitKey(nil, &y.Art, &y.Fac, &y.In, y.Pts, y.Res))
		assert.Equal(t, want, e != nil && e.base == firsts[i], "entry %d kept", i)
	}
	big := cloneInputs(x)
	for len(big.Pts) < 40000 {
		big.Pts = append(big.Pts, big.Pts...)
	}
	b1, _, err := big.cached(c)
	require.NoError(t, err)
	b2, _, err := big.cached(c)
	require.NoError(t, err)
	assert.True(t, b1 != b2, "an entry this large is built each time")
}

// TestLimitCacheConcurrent: plans on several goroutines ask a small cache for
// a few inputs in turn (misses, evictions and hits racing), and every limit
// they get answers as a fresh build does. Run with -race.
func TestLimitCacheConcurrent(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(4, 4))
	qs := limitQueries(11, 12)
	var xs []*limitInputs
	var want [][2][]string
	for i := 0; len(xs) < 6; i++ {
		x := randomInputs(rng, i)
		fb, fr, err := x.fresh()
		if err != nil {
			continue
		}
		xs = append(xs, x)
		want = append(want, [2][]string{limitAnswers(fb, qs), limitAnswers(fr, qs)})
	}
	c := NewLimitCache(4)
	var wg sync.WaitGroup
	errs := make(chan string, 64)
	for g := range 8 {
		wg.Go(func() {
			for i := range 60 {
				k := (g + i) % len(xs)
				b, r, err := xs[k].cached(c)
				if err != nil {
					errs <- err.Error()
					return
				}
				if got := limitAnswers(b, qs); !slices.Equal(got, want[k][0]) {
					errs <- fmt.Sprintf("goroutine %d, inputs %d: base answers differ", g, k)
					return
				}
				if got := limitAnswers(r, qs); !slices.Equal(got, want[k][1]) {
					errs <- fmt.Sprintf("goroutine %d, inputs %d: resolved answers differ", g, k)
					return
				}
			}
		})
	}
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
}

// holds returns c's entry of key, or nil.
func (c *LimitCache) holds(key []byte) *limitEntry {
	for _, e := range c.ring {
		if e != nil && string(e.key) == string(key) {
			return e
		}
	}
	return nil
}

// TestLimitCacheKeepsFirst: when two plans miss the same key at once, the one
// that adds its entry second gets the first one's limits, and the cache holds
// the key once.
func TestLimitCacheKeepsFirst(t *testing.T) {
	t.Parallel()
	x := keyBase(t)
	c := NewLimitCache(4)
	key := appendLimitKey(nil, &x.Art, &x.Fac, &x.In, x.Pts, x.Res)
	h := maphash.Bytes(c.seed, key)
	got, added := c.find(h, key)
	require.Nil(t, got)
	first, _, err := x.cached(c) // the other plan, between find and add
	require.NoError(t, err)
	late, err := NewLimit(&x.Art, &x.Fac, x.In, similarity.Matrix{Points: x.Pts})
	require.NoError(t, err)
	b, _, err := c.add(&limitEntry{hash: h, key: key, base: late, resolved: late}, added)
	require.NoError(t, err)
	assert.True(t, b == first, "the first entry's limit")
	n := 0
	for _, e := range c.ring {
		if e != nil {
			n++
		}
	}
	assert.Equal(t, 1, n)
}
