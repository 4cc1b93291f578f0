package main

import (
	"fmt"
	"math/rand/v2"
	"strconv"
	"time"
)

// wideColumns is the number of passthrough columns the -wide variant adds.
const wideColumns = 30

// wideKind is the type of wide column j: text, integer, decimal, boolean or
// date, in turn.
type wideKind uint8

const (
	wideText wideKind = iota
	wideInt
	wideFloat
	wideBool
	wideDate
)

func kindOf(j int) wideKind { return wideKind(j % 5) }

// wideName is the name of wide column j in every format.
func wideName(j int) string { return fmt.Sprintf("x%02d", j) }

var wideWords = []string{"alpha", "bravo", "charlie", "delta", "echo", "foxtrot", "golf", "hotel"}

// wideValue is one wide field; which member is set depends on its column's kind.
type wideValue struct {
	i    int64 // wideInt, wideBool (0 or 1), wideDate (days since 1970-01-01)
	f    float64
	text string
}

// row is one generated record, the same in every output format.
type row struct {
	id  int
	lat float64 // degrees; text formats write 5 decimals (see asWritten)
	lon float64
	// t is the crash's local wall clock in America/Chicago, or the camera
	// detection's instant in its site's fixed offset.
	t     time.Time
	site  int    // camera: site number
	label string // crash: severity; camera: species
	count int    // crash: vehicles; camera: individuals
	wide  [wideColumns]wideValue
}

// shape draws rows of one kind from a seeded generator. The draws are made
// in the same order whatever the output format, so one seed gives the same
// rows in CSV, GeoJSON and Parquet.
type shape struct {
	name string
	rng  *rand.Rand
	wide bool
	next func(i int, r *row)
}

var (
	severities = []string{"property damage", "minor injury", "serious injury", "fatal"}
	species    = []string{"fox", "badger", "deer", "hare", "owl", "boar", "marten", "squirrel"}
)

// newShape returns the generator of shape name ("crash" or "camera").
//
//   - crash: every row its own place (a 4°×6° box at mid latitude, around
//     39–43° N, 85–91° W), a local date and minute over the ten years
//     2014–2023 on the wall clock of America/Chicago;
//   - camera: 40 sites drawn once (latitudes −40° to 60°, longitudes −150°
//     to 150°), instants over the three years 2020–2022 written with the
//     site's offset (longitude/15 h, truncated to whole hours).
func newShape(name string, wide bool, seed uint64) (*shape, error) {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	s := &shape{name: name, rng: rng, wide: wide}
	switch name {
	case "crash":
		chicago, err := time.LoadLocation("America/Chicago")
		if err != nil {
			return nil, err
		}
		start := time.Date(2014, 1, 1, 0, 0, 0, 0, chicago)
		s.next = func(i int, r *row) {
			r.id = i
			// Midnight of the day plus minutes of elapsed time: on the
			// spring-forward date this skips the missing hour, so no row
			// falls in the gap.
			r.t = start.AddDate(0, 0, rng.IntN(3652)).Add(time.Duration(rng.IntN(1440)) * time.Minute)
			r.lat = 39 + rng.Float64()*4
			r.lon = -91 + rng.Float64()*6
			r.label = severities[rng.IntN(len(severities))]
			r.count = 1 + rng.IntN(4)
		}
	case "camera":
		type site struct {
			lat, lon float64
			zone     *time.Location
		}
		sites := make([]site, 40)
		for i := range sites {
			lat, lon := -40+rng.Float64()*100, -150+rng.Float64()*300
			sites[i] = site{lat, lon, time.FixedZone("", 3600*int(lon/15))}
		}
		start := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)
		s.next = func(i int, r *row) {
			r.id = i
			r.site = rng.IntN(len(sites))
			st := sites[r.site]
			r.lat, r.lon = st.lat, st.lon
			r.t = start.Add(time.Duration(rng.Int64N(int64(3 * 365 * 24 * time.Hour)))).In(st.zone)
			r.label = species[rng.IntN(len(species))]
			r.count = 1 + rng.IntN(3)
		}
	default:
		return nil, fmt.Errorf("unknown shape %q; valid: crash, camera", name)
	}
	return s, nil
}

// fill draws row i (and its wide fields when the shape is wide).
func (s *shape) fill(i int, r *row) {
	s.next(i, r)
	if !s.wide {
		return
	}
	rng := s.rng
	for j := range wideColumns {
		v := &r.wide[j]
		switch kindOf(j) {
		case wideText:
			v.text = wideWords[rng.IntN(len(wideWords))]
		case wideInt:
			v.i = rng.Int64N(1_000_000)
		case wideFloat:
			v.f = rng.Float64() * 1000 // text formats write 3 decimals
		case wideBool:
			v.i = int64(rng.IntN(2) ^ 1) // 1 (true) when the draw is 0
		case wideDate:
			y := 2000 + rng.IntN(25)
			m := time.Month(1 + rng.IntN(12))
			d := 1 + rng.IntN(28)
			v.i = time.Date(y, m, d, 0, 0, 0, 0, time.UTC).Unix() / 86400
		}
	}
}

// Decimals the text formats write: coordinates to about a metre, the wide
// decimal columns to three places.
const (
	coordDecimals = 5
	wideDecimals  = 3
)

// asWritten returns x as the text formats write it (prec decimals), so that
// Parquet holds the same values as CSV and GeoJSON.
func asWritten(x float64, prec int) float64 {
	var buf [32]byte
	v, _ := strconv.ParseFloat(string(strconv.AppendFloat(buf[:0], x, 'f', prec, 64)), 64)
	return v
}

// wallMicros returns t's wall clock (in t's location) as microseconds since
// 1970-01-01T00:00 of the same wall clock: a Parquet timestamp that is not
// adjusted to UTC.
func wallMicros(t time.Time) int64 {
	y, m, d := t.Date()
	h, mi, sec := t.Clock()
	return time.Date(y, m, d, h, mi, sec, 0, time.UTC).UnixMicro()
}

// dateOf returns the date of days since 1970-01-01.
func dateOf(days int64) time.Time { return time.Unix(days*86400, 0).UTC() }
