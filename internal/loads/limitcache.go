package loads

import (
	"bytes"
	"encoding/binary"
	"hash/maphash"
	"math"
	"sync"

	"scalematch/facilities"
	"scalematch/similarity"
)

// LimitCache keeps the load limits (NewLimit, with Resolved) of the last few
// distinct inputs, so that plans of one article, test matrix, installation and
// facility over many flight conditions (a campaign, the load tool's distinct
// plans) build and resolve their limit once. It is safe for concurrent use; the
// limits it returns are shared and never written (Limit).
//
// An entry is found by the exact bytes of every input the limit reads
// (appendLimitKey): floats by their bits, pointers by presence and pointee,
// strings and counts in full; the hash only chooses which stored keys to compare.
// The limit keeps no pointer into its inputs, so a later change to a caller's
// facility or installation cannot reach a stored limit.
type LimitCache struct {
	mu   sync.Mutex
	seed maphash.Seed
	// ring holds the entries, replaced oldest first once full.
	ring []*limitEntry
	next int
	// added counts the entries kept, so that a miss looks for its key again
	// only when another plan kept one since (add).
	added uint64
}

// limitEntry is one cached input: its key and its hash, and its limits.
type limitEntry struct {
	hash uint64
	key  []byte
	// base is NewLimit's limit; resolved is base.Resolved of the key's
	// resolution, or base when it asks nothing.
	base, resolved *Limit
}

// limitCacheBytes bounds a LimitCache's entries together, keys and tables, in
// bytes: an entry larger than its share (limitCacheBytes over the entries) is
// not kept (a matrix of several thousand points, or many balances).
const limitCacheBytes = 8 << 20

// NewLimitCache returns a cache of at most n limits (n ≥ 1).
func NewLimitCache(n int) *LimitCache {
	return &LimitCache{seed: maphash.MakeSeed(), ring: make([]*limitEntry, max(n, 1))}
}

// keyScratch holds the keys of lookups (*[]byte).
var keyScratch = sync.Pool{New: func() any { b := make([]byte, 0, 2048); return &b }}

// Limits returns the load limit of article art on facility f with installation
// in (after WithBuoyancy) over the test matrix mx, as NewLimit builds it, and
// that limit Resolved to res (the same limit when res asks nothing): from the
// cache when the same inputs were asked before, else built and kept. Errors are
// NewLimit's, and are not kept.
func (c *LimitCache) Limits(art *similarity.Article, f *facilities.Facility, in Installation, mx similarity.Matrix, res *Resolution) (base, resolved *Limit, err error) {
	buf := keyScratch.Get().(*[]byte)
	defer keyScratch.Put(buf)
	key := appendLimitKey((*buf)[:0], art, f, &in, mx.Points, res)
	*buf = key[:0]
	h := maphash.Bytes(c.seed, key)
	e, added := c.find(h, key)
	if e != nil {
		return e.base, e.resolved, nil
	}
	base, err = NewLimit(art, f, in, mx)
	if err != nil {
		return nil, nil, err
	}
	resolved = base
	if !res.Empty() {
		resolved = base.Resolved(res)
	}
	e = &limitEntry{hash: h, base: base, resolved: resolved}
	size := len(key) + base.size()
	if resolved != base {
		size += resolved.size()
	}
	if size > limitCacheBytes/len(c.ring) {
		return base, resolved, nil
	}
	e.key = bytes.Clone(key)
	return c.add(e, added)
}

// find returns the entry of key (hash h), or nil, and the count of entries
// kept so far.
func (c *LimitCache) find(h uint64, key []byte) (*limitEntry, uint64) {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.findLocked(h, key), c.added
}

func (c *LimitCache) findLocked(h uint64, key []byte) *limitEntry {
	for _, e := range c.ring {
		if e != nil && e.hash == h && bytes.Equal(e.key, key) {
			return e
		}
	}
	return nil
}

// add keeps e, unless another plan has kept the same key since find counted
// added entries, and returns the kept entry's limits.
func (c *LimitCache) add(e *limitEntry, added uint64) (base, resolved *Limit, err error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.added != added {
		if o := c.findLocked(e.hash, e.key); o != nil {
			return o.base, o.resolved, nil
		}
	}
	c.ring[c.next] = e
	c.next = (c.next + 1) % len(c.ring)
	c.added++
	return e.base, e.resolved, nil
}

// size returns the bytes of l's tables, about.
func (l *Limit) size() int {
	n := 8 * (len(l.cd) + len(l.alpha))
	for k := range l.balances {
		br := &l.balances[k]
		n += 8*(len(br.allowed)+len(br.force)+len(br.moment)+len(br.up)+len(br.down)+len(br.needForce)+len(br.needMoment)) +
			4*len(br.livePoint) + len(br.id)
	}
	return n
}

// appendLimitKey appends to dst the bytes of every input a load limit reads
// (newLimit, Resolved and the Limit's methods), in a form where equal bytes
// mean equal inputs: each number by its bits, each optional number by a
// presence byte and its bits, each string and list by its length first. They
// are:
//   - the article's reference area, reference length and frontal area (the
//     limit's geometry, and all that GeometryErrors is asked to check);
//   - every field of every point of the matrix, in order;
//   - every field of the installation (after WithBuoyancy);
//   - the facility's test section (the blockage factors read its area or
//     width and height, and its walls) and every field of every balance
//     (limits, gauge rows, safety factor, accuracy, id and name);
//   - the required resolution's six figures.
//
// A gauge row's coefficients are written as their count and, for each of the
// six component names in order, presence and value: a row with a key that
// names no component makes NewLimit fail, so it is never stored, and a map
// with the same count and the same six entries as a stored one has no other
// key either. Nothing else of the facility is read by a limit (its blockage
// factors read the test section only; the medium and temperatures enter
// through the installation's Buoyancy).
func appendLimitKey(dst []byte, art *similarity.Article, f *facilities.Facility, in *Installation, pts []facilities.Point, res *Resolution) []byte {
	k := keyBytes(dst)
	k = k.float(art.ReferenceArea).float(art.ReferenceLength).float(art.FrontalArea)
	k = k.count(len(pts))
	for i := range pts {
		p := &pts[i]
		k = k.float(p.Alpha).float(p.Beta).float(p.CL).float(p.CD).float(p.Cm).float(p.CY).float(p.Cl).float(p.Cn).
			float(p.DynamicPressureFactor)
	}
	k = k.str(in.BalanceID).float(in.BalanceOffset.X).float(in.BalanceOffset.Z).float(in.ModelMass).
		float(in.CGOffset.X).float(in.CGOffset.Z).float(in.ModelVolume).opt(in.LoadFraction).float(in.Buoyancy)
	ts := &f.TestSection
	k = k.float(ts.Width).float(ts.Height).float(ts.Length).opt(ts.Area).str(ts.Walls)
	k = k.count(len(f.Balances))
	for i := range f.Balances {
		b := &f.Balances[i]
		k = k.str(b.ID).str(b.Name).limits(&b.Limits).float(b.SafetyFactor)
		k = k.count(len(b.Combined))
		for j := range b.Combined {
			row := &b.Combined[j]
			k = k.str(row.Name).float(row.Limit).count(len(row.Coefficients))
			for c := range 6 {
				v, ok := row.Coefficients[ComponentName(c)]
				if !ok {
					k = append(k, 0)
					continue
				}
				k = append(k, 1).float(v)
			}
		}
		if a := b.Accuracy; a == nil {
			k = append(k, 0)
		} else {
			k = append(k, 1).float(a.FractionOfRating)
			if a.Components == nil {
				k = append(k, 0)
			} else {
				k = append(k, 1).limits(a.Components)
			}
		}
	}
	if res == nil {
		return append(k, 0)
	}
	return append(k, 1).opt(res.CL).opt(res.CDCounts).opt(res.Cm).opt(res.CY).opt(res.Cl).opt(res.Cn)
}

// keyBytes is a limit key being written (appendLimitKey).
type keyBytes []byte

func (k keyBytes) float(v float64) keyBytes {
	return binary.LittleEndian.AppendUint64(k, math.Float64bits(v))
}

func (k keyBytes) opt(v *float64) keyBytes {
	if v == nil {
		return append(k, 0)
	}
	return append(k, 1).float(*v)
}

func (k keyBytes) count(n int) keyBytes { return binary.AppendUvarint(k, uint64(n)) }

func (k keyBytes) str(s string) keyBytes { return append(k.count(len(s)), s...) }

func (k keyBytes) limits(l *facilities.Limits) keyBytes {
	return k.opt(l.Normal).opt(l.Axial).opt(l.Side).opt(l.RollingMoment).opt(l.PitchingMoment).opt(l.YawingMoment)
}
