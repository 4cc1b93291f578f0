package zone

import (
	"math"
	"slices"
	"time"
)

// A table maps wall-clock seconds (the local date and time counted as if it were UTC, see
// stamp.Stamp.Wall) of one zone to instants, exactly, using the zone's real rules as the time package
// holds them.
//
// Every offset change at instant T from offset a to offset b shows on the wall clock as
//   - a gap when b > a: the walls [T+a, T+b) never happen (spring forward);
//   - an overlap when b < a: the walls [T+b, T+a) happen twice, first at offset a, then at offset b.
//
// Between such ranges each wall happens exactly once. The table lists the ranges' boundaries in
// ascending wall order, from the zone's first rule up to transitions in the year 2100 or so, so
// resolving a wall clock is one binary search. Walls past the table (or in a zone whose boundaries
// would not be ascending) are resolved by search, a direct scan of the rules around the wall.

const (
	kindUnique  = iota // one instant: wall - off
	kindOverlap        // two instants: wall - off (earlier) and wall - off2 (later)
	kindGap            // no instant: clocks jump from the segment start (offset off) to its end (offset off2)
)

// seg is one range of walls. off and off2 are offsets in seconds east of UTC.
type seg struct {
	off, off2 int32
	kind      uint8
}

type table struct {
	starts []int64 // wall second at which segment i starts; starts[0] is math.MinInt64
	segs   []seg
	hi     int64 // walls >= hi are resolved by search
	// buckets[k] is the segment holding wall bucketBase + k<<bucketShift: a wall's segment is found
	// from its bucket's, mostly at once (a bucket spans about 24 days).
	buckets []int32
}

const (
	bucketBase  = -3786825600 // 1850-01-01 00:00:00 as a wall
	bucketShift = 21
)

// tableEnd is the instant (2101-01-01T00:00:00Z) after which tables stop listing transitions.
const tableEnd = 4133980800

// minStart is an instant before year 1 (in any zone's offset), where tables start.
const minStart = -62135596800 - 2*86400

// offsetAt returns the offset in effect at Unix time sec.
func offsetAt(loc *time.Location, sec int64) int {
	_, off := time.Unix(sec, 0).In(loc).Zone()
	return off
}

// buildTable lists loc's wall-clock segments and indexes them.
func buildTable(loc *time.Location) *table {
	t := listSegments(loc)
	end := min(t.hi, tableEnd+86400)
	if end > bucketBase && len(t.starts) > 1 { // a zone with one offset needs no index
		n := int((end-bucketBase)>>bucketShift) + 1
		t.buckets = make([]int32, n)
		i := 0
		for k := range t.buckets {
			w := bucketBase + int64(k)<<bucketShift
			for i+1 < len(t.starts) && t.starts[i+1] <= w {
				i++
			}
			t.buckets[k] = int32(i)
		}
	}
	return t
}

// listSegments lists loc's wall-clock segments.
func listSegments(loc *time.Location) *table {
	t := time.Unix(minStart, 0).In(loc)
	_, prev := t.Zone()
	tab := &table{starts: []int64{math.MinInt64}, segs: []seg{{off: int32(prev), kind: kindUnique}}}
	broken := false
	for {
		end := periodEnd(t)
		if end.IsZero() {
			if !broken {
				tab.hi = math.MaxInt64
			}
			return tab
		}
		t = end
		T := end.Unix()
		_, next := t.Zone()
		if next == prev {
			continue // only the abbreviation or the DST flag changed
		}
		lo := T + int64(min(prev, next))
		last := len(tab.starts) - 1
		switch {
		case broken:
			tab.hi = min(tab.hi, lo)
		case lo < tab.starts[last]:
			// The change reaches back over walls already listed: stop the table below every wall this
			// or a later change can reach, and resolve those walls by search.
			broken = true
			tab.hi = lo
		default:
			if lo == tab.starts[last] { // an empty segment: replace it
				tab.starts, tab.segs = tab.starts[:last], tab.segs[:last]
			}
			if next > prev {
				tab.add(T+int64(prev), seg{off: int32(prev), off2: int32(next), kind: kindGap})
				tab.add(T+int64(next), seg{off: int32(next), kind: kindUnique})
			} else {
				tab.add(T+int64(next), seg{off: int32(prev), off2: int32(next), kind: kindOverlap})
				tab.add(T+int64(prev), seg{off: int32(next), kind: kindUnique})
			}
		}
		prev = next
		if T > tableEnd {
			if !broken {
				tab.hi = tab.starts[len(tab.starts)-1]
			}
			return tab
		}
	}
}

func (t *table) add(start int64, s seg) {
	t.starts = append(t.starts, start)
	t.segs = append(t.segs, s)
}

// find returns the index of the segment holding wall w (w < t.hi).
func (t *table) find(w int64) int {
	if k := (w - bucketBase) >> bucketShift; w >= bucketBase && k < int64(len(t.buckets)) {
		i := int(t.buckets[k])
		for i+1 < len(t.starts) && t.starts[i+1] <= w {
			i++
		}
		return i
	}
	lo, hi := 0, len(t.starts) // starts[lo] <= w < starts[hi]
	for hi-lo > 1 {
		mid := int(uint(lo+hi) >> 1)
		if t.starts[mid] <= w {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// result describes how a wall clock maps to instants.
type result struct {
	kind     uint8
	off      int   // unique: the offset; overlap: the earlier instant's offset; gap: offset before
	off2     int   // overlap: the later instant's offset; gap: offset after
	from, to int64 // gap: the walls the clocks jump from and to
}

// lookup resolves wall w with the table, or by search past it.
func (t *table) lookup(loc *time.Location, w int64) result {
	if w >= t.hi {
		return search(loc, w)
	}
	i := t.find(w)
	s := t.segs[i]
	r := result{kind: s.kind, off: int(s.off), off2: int(s.off2)}
	if s.kind == kindGap {
		r.from, r.to = t.starts[i], t.starts[i+1]
	}
	return r
}

// periodEnd returns the end of the period of constant offset rules that holds t (the zero Time when
// it has none), as ZoneBounds does. Where ZoneBounds reports an end at or before t (Go 1.26 does so in
// the rule-based years past a zone's listed transitions, on the last day of leap years, where it puts
// the year's end a day early), the end is found with Zone alone: the first offset change in the next
// three days (hourly probes, then bisection to the second), or the first instant where ZoneBounds
// answers sensibly again.
func periodEnd(t time.Time) time.Time {
	_, end := t.ZoneBounds()
	if end.IsZero() || end.After(t) {
		return end
	}
	loc := t.Location()
	_, off := t.Zone()
	sec := t.Unix()
	for p := sec + 3600; p <= sec+3*86400; p += 3600 {
		tp := time.Unix(p, 0).In(loc)
		if _, o := tp.Zone(); o != off {
			lo, hi := p-3600, p // offset off at lo, another at hi
			for hi-lo > 1 {
				mid := lo + (hi-lo)/2
				if offsetAt(loc, mid) == off {
					lo = mid
				} else {
					hi = mid
				}
			}
			return time.Unix(hi, 0).In(loc)
		}
		if _, e := tp.ZoneBounds(); e.IsZero() || e.After(tp) {
			return tp
		}
	}
	return time.Unix(sec+3*86400, 0).In(loc)
}

// searchReach bounds how far in time search looks for rules around a wall (real offsets stay well
// within ±26 h).
const searchReach = 30 * 3600

// search resolves wall w directly: it collects the offsets in effect over the instants
// [w-searchReach, w+searchReach] and keeps each offset o whose instant w-o really has offset o. No such
// offset means a gap, located by the change that skips over w.
func search(loc *time.Location, w int64) result {
	t := time.Unix(w-searchReach, 0).In(loc)
	var offs [8]int
	n := 0
	_, prev := t.Zone()
	offs[n] = prev
	n++
	var gap result
	for {
		end := periodEnd(t)
		if end.IsZero() || end.Unix() > w+searchReach {
			break
		}
		t = end
		_, off := t.Zone()
		if off == prev {
			continue
		}
		if T := end.Unix(); off > prev && T+int64(prev) <= w && w < T+int64(off) {
			gap = result{kind: kindGap, off: prev, off2: off, from: T + int64(prev), to: T + int64(off)}
		}
		if n < len(offs) && !slices.Contains(offs[:n], off) {
			offs[n] = off
			n++
		}
		prev = off
	}
	var cands [8]int64
	k := 0
	for _, o := range offs[:n] {
		if c := w - int64(o); offsetAt(loc, c) == o {
			cands[k] = c
			k++
		}
	}
	slices.Sort(cands[:k])
	switch k {
	case 0:
		gap.kind = kindGap
		return gap
	case 1:
		return result{kind: kindUnique, off: int(w - cands[0])}
	}
	return result{kind: kindOverlap, off: int(w - cands[0]), off2: int(w - cands[1])}
}
