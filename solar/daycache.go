package solar

import "math/bits"

// dayCache remembers a kernel's Days: a two-way set-associative cache keyed by the bits of (lat, lon,
// start, end), replacing the entry of a set used less recently. It grows fourfold, up to maxDaySets sets,
// when within one epoch (4 look-ups per entry) it has evicted as many entries as it holds and missed on
// more than half of the look-ups: the rows revisit more places and dates than it holds. Rows in time order,
// which evict dates they do not come back to but hit the dates in use, keep it small.
type dayCache struct {
	entries                   []dayEntry // two per set
	recent                    []uint8    // per set: the way used last
	shift                     uint       // 64 − log2(number of sets)
	evictions                 int        // since the cache was (re)built, as are sinceLookups and sinceMisses
	sinceLookups, sinceMisses int

	lookups, misses int // counted for the tests and benchmarks
}

// dayKey holds the bits of a Day's inputs. The zero key stands for an empty entry: it is (0, 0, 0, 0), a
// window that ends where it starts, which is never valid.
type dayKey struct{ lat, lon, start, end uint64 }

type dayEntry struct {
	key dayKey
	day Day
}

const (
	minDaySets = 1 << 10 // 2048 entries, 280 kB
	maxDaySets = 1 << 13 // 16384 entries, 2.3 MB
)

// allocate replaces the cache with an empty one of n sets, n a power of two.
func (c *dayCache) allocate(n int) {
	c.entries = make([]dayEntry, 2*n)
	c.recent = make([]uint8, n)
	c.shift = uint(64 - bits.TrailingZeros(uint(n)))
	c.evictions, c.sinceLookups, c.sinceMisses = 0, 0, 0
}

// set returns the set of a key: the top bits of a multiplicative hash of its words.
func (c *dayCache) set(k dayKey) int {
	const m1, m2, m3, m4 = 0x9e3779b97f4a7c15, 0xc2b2ae3d27d4eb4f, 0x165667b19e3779f9, 0xd6e8feb86659fd93
	h := k.lat*m1 ^ k.lon*m2 ^ k.start*m3 ^ k.end*m4
	h ^= h >> 31
	h *= m1
	return int(h >> c.shift)
}

// store puts a Day in the less recently used way of its set, then grows the cache if it thrashes.
func (c *dayCache) store(set int, key dayKey, d Day) {
	way := 1 - int(c.recent[set])
	e := &c.entries[2*set+way]
	if e.key != (dayKey{}) {
		c.evictions++
	}
	e.key, e.day = key, d
	c.recent[set] = uint8(way)
	c.sinceMisses++
	if n := len(c.recent); c.evictions >= len(c.entries) && 2*c.sinceMisses > c.sinceLookups && n < maxDaySets {
		c.allocate(min(4*n, maxDaySets))
	}
}

// newEpoch starts counting evictions, look-ups and misses afresh once an epoch of look-ups has passed.
func (c *dayCache) newEpoch() {
	if c.sinceLookups >= 4*len(c.entries) {
		c.evictions, c.sinceLookups, c.sinceMisses = 0, 0, 0
	}
}
