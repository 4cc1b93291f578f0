package solar

import "math/bits"

// dayCache remembers a kernel's Days: a four-way set-associative cache keyed by the bits of (lat, lon,
// start, end). A full set replaces by the clock rule: a hand goes round its ways, sparing once each way
// used since it last passed.
//
// It starts with minDaySets sets and grows fourfold, up to maxDaySets, only when growing would pay: it
// keeps the hashes of the keys it evicted in a "ghost" table four times its size, and grows when, within
// one epoch (four look-ups per entry), misses on keys found there (keys a larger cache would still hold)
// number at least a quarter of its entries. Rows that never come back to a place and date (each crash its
// own) and rows in time order (camera traps, whose old dates are not asked for again) keep it small, so
// that its look-ups stay in the processor's caches; rows that revisit more places and dates than it holds
// make it grow.
type dayCache struct {
	entries []dayEntry // dayWays per set
	used    []uint8    // per set: bit w set when way w was used since the hand last passed it
	hand    []uint8    // per set: the next way the hand looks at
	ghost   []uint64   // hashes of evicted keys, direct-mapped; 0 is empty
	shift   uint       // 64 − log2(number of sets)

	// Counts of the current epoch.
	epochLookups, epochGhostHits int

	lookups, misses int // since the kernel was made, for the tests and benchmarks
}

// dayKey holds the bits of a Day's inputs. The zero key stands for an empty entry: it is (0, 0, 0, 0), a
// window that ends where it starts, which is never valid.
type dayKey struct{ lat, lon, start, end uint64 }

type dayEntry struct {
	key dayKey
	day Day
}

const (
	dayWays    = 4
	minDaySets = 1 << 9  // 2048 entries, 280 kB, and a 64 kB ghost table
	maxDaySets = 1 << 13 // 32768 entries, 4.5 MB, and a 1 MB ghost table
)

// hash mixes the words of a key; the result is never 0.
func (k dayKey) hash() uint64 {
	const m1, m2, m3, m4 = 0x9e3779b97f4a7c15, 0xc2b2ae3d27d4eb4f, 0x165667b19e3779f9, 0xd6e8feb86659fd93
	h := k.lat*m1 ^ k.lon*m2 ^ k.start*m3 ^ k.end*m4
	h ^= h >> 31
	h *= m1
	h ^= h >> 29
	return h | 1
}

// allocate replaces the cache with an empty one of n sets, n a power of two.
func (c *dayCache) allocate(n int) {
	c.entries = make([]dayEntry, dayWays*n)
	c.used = make([]uint8, n)
	c.hand = make([]uint8, n)
	c.ghost = make([]uint64, 4*dayWays*n)
	c.shift = uint(64 - bits.TrailingZeros(uint(n)))
	c.epochLookups, c.epochGhostHits = 0, 0
}

// get returns the Day cached for key, whose hash is h.
func (c *dayCache) get(h uint64, key dayKey) (Day, bool) {
	if c.entries == nil {
		c.allocate(minDaySets)
	}
	c.lookups++
	c.epochLookups++
	set := int(h >> c.shift)
	e := c.entries[dayWays*set : dayWays*set+dayWays : dayWays*set+dayWays]
	for w := range e {
		if e[w].key == key {
			c.used[set] |= 1 << w
			return e[w].day, true
		}
	}
	return Day{}, false
}

// put caches d for key, whose hash is h, after get missed it, remembering the key it evicts in the ghost
// table. It then grows the cache if the epoch's misses show that a larger one would pay.
func (c *dayCache) put(h uint64, key dayKey, d Day) {
	c.misses++
	gmask := uint64(len(c.ghost) - 1)
	if c.ghost[h&gmask] == h {
		c.epochGhostHits++
	}
	set := int(h >> c.shift)
	w := int(c.hand[set])
	for c.used[set]&(1<<w) != 0 { // at most one round: the bits are cleared as the hand passes
		c.used[set] &^= 1 << w
		w = (w + 1) % dayWays
	}
	e := &c.entries[dayWays*set+w]
	if e.key != (dayKey{}) {
		old := e.key.hash()
		c.ghost[old&gmask] = old
	}
	e.key, e.day = key, d
	c.used[set] |= 1 << w
	c.hand[set] = uint8((w + 1) % dayWays)
	n := len(c.used)
	switch {
	case 4*c.epochGhostHits >= len(c.entries) && n < maxDaySets:
		c.allocate(min(4*n, maxDaySets))
	case c.epochLookups >= 4*len(c.entries):
		c.epochLookups, c.epochGhostHits = 0, 0
	}
}
