package solar

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"testing"
	"time"
)

// event describes one event field of Day.
type event struct {
	name   string
	get    func(Day) float64
	alt    float64 // threshold, geometric altitude of the centre, degrees
	rising bool
}

// events lists the crossing events in their order within one day: dawns, rise, set, dusks.
var events = []event{
	{"astronomical dawn", func(d Day) float64 { return d.AstronomicalDawn }, AstronomicalTwilightAltitude, true},
	{"nautical dawn", func(d Day) float64 { return d.NauticalDawn }, NauticalTwilightAltitude, true},
	{"civil dawn", func(d Day) float64 { return d.CivilDawn }, CivilTwilightAltitude, true},
	{"rise", func(d Day) float64 { return d.Rise }, SunriseAltitude, true},
	{"set", func(d Day) float64 { return d.Set }, SunriseAltitude, false},
	{"civil dusk", func(d Day) float64 { return d.CivilDusk }, CivilTwilightAltitude, false},
	{"nautical dusk", func(d Day) float64 { return d.NauticalDusk }, NauticalTwilightAltitude, false},
	{"astronomical dusk", func(d Day) float64 { return d.AstronomicalDusk }, AstronomicalTwilightAltitude, false},
}

// eventByName returns the event named name.
func eventByName(name string) event {
	for _, e := range events {
		if e.name == name {
			return e
		}
	}
	if name == "noon" {
		return event{name: "noon", get: func(d Day) float64 { return d.Noon }}
	}
	panic(name)
}

// localMidnight returns the Unix instant of 00:00 on a date at a fixed UTC offset in hours.
func localMidnight(y int, m time.Month, d int, offsetHours float64) float64 {
	return unixOf(y, m, d, 0, 0, 0, 0) - offsetHours*3600
}

// fmtLocal formats an instant at a fixed UTC offset in hours, to the hundredth of a second.
func fmtLocal(unix, offsetHours float64) string {
	if math.IsNaN(unix) {
		return "NaN"
	}
	z := time.FixedZone("", int(offsetHours*3600))
	return time.Unix(0, int64(math.Round(unix*1e9))).In(z).Format("2006-01-02 15:04:05.00")
}

// bothPaths returns the Day of a window from Events (the reference path) and from a new kernel's Day.
func bothPaths(t *testing.T, start, end, lat, lon float64, o Options) (ref, fast Day) {
	t.Helper()
	ref, err := Events(start, end, lat, lon, o)
	if err != nil {
		t.Fatal(err)
	}
	return ref, NewKernel(o).Day(start, end, lat, lon)
}

func TestEventsPublished(t *testing.T) {
	type want struct {
		event string
		hhmm  string // published local clock time, to the minute
	}
	tests := []struct {
		name     string
		y        int
		m        time.Month
		d        int
		offset   float64 // hours east of UTC of the published times; the window is that local date
		lat, lon float64
		want     []want
	}{
		// NREL/TP-560-34302 (Reda & Andreas, rev. 2008), Table A2.1: Astronomical Almanac sunrise and sunset
		// at longitude 0°, UT (the table's third row has a misprinted sunset and is not used).
		{"NREL Table A2.1 1994-01-02 35° N", 1994, 1, 2, 0, 35, 0, []want{{"rise", "07:08"}, {"set", "17:00"}}},
		{"NREL Table A2.1 2004-12-04 35° S", 2004, 12, 4, 0, -35, 0, []want{{"rise", "04:39"}, {"set", "19:02"}}},
		// USNO sun rise/set table, San Francisco, CA (W122°26′, N37°46′), 2012, Pacific Standard Time.
		{"USNO San Francisco 2012-01-01", 2012, 1, 1, -8, sfLat, sfLon, []want{{"rise", "07:25"}, {"set", "17:01"}}},
		{"USNO San Francisco 2012-03-20", 2012, 3, 20, -8, sfLat, sfLon, []want{{"rise", "06:12"}, {"set", "18:22"}}},
		{"USNO San Francisco 2012-06-21", 2012, 6, 21, -8, sfLat, sfLon, []want{{"rise", "04:48"}, {"set", "19:35"}}},
		{"USNO San Francisco 2012-09-22", 2012, 9, 22, -8, sfLat, sfLon, []want{{"rise", "05:58"}, {"set", "18:06"}}},
		{"USNO San Francisco 2012-12-21", 2012, 12, 21, -8, sfLat, sfLon, []want{{"rise", "07:22"}, {"set", "16:55"}}},
		// USNO twilight tables, 2024-06-21, Eastern Standard Time (UTC−5).
		{"USNO Boston 2024-06-21", 2024, 6, 21, -5, 42.32, -71.09,
			[]want{{"civil dawn", "03:33"}, {"civil dusk", "19:59"}}},
		{"USNO Hartford 2024-06-21", 2024, 6, 21, -5, 41.76, -72.69,
			[]want{{"nautical dawn", "02:58"}, {"nautical dusk", "20:48"},
				{"astronomical dawn", "02:05"}, {"astronomical dusk", "21:41"}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			start := localMidnight(tc.y, tc.m, tc.d, tc.offset)
			ref, fast := bothPaths(t, start, start+secondsPerDay, tc.lat, tc.lon, Options{})
			for _, w := range tc.want {
				var hh, mm int
				fmt.Sscanf(w.hhmm, "%d:%d", &hh, &mm)
				published := start + float64(hh*3600+mm*60)
				e := eventByName(w.event)
				for _, path := range []struct {
					name string
					d    Day
				}{{"Events", ref}, {"Kernel.Day", fast}} {
					// The tables print the minute: allow ±1 minute.
					if got := e.get(path.d); !(math.Abs(got-published) <= 60) {
						t.Errorf("%s %s = %s, published %s", path.name, w.event, fmtLocal(got, tc.offset), w.hhmm)
					}
				}
			}
		})
	}
}

// San Francisco as given by the USNO table of REFERENCE-VALUES.md §4: W122°26′, N37°46′.
var sfLat, sfLon = dms(37, 46, 0), -dms(122, 26, 0)

// TestEventsSPAExample checks the sunrise, transit and sunset of the SPA report's example within 5 s of the
// published seconds (NREL/TP-560-34302, Table A5.1: 06:12:43.46 / 11:46:04.97 / 17:20:19.19 local standard
// time, UTC−7, for 2003-10-17 at 39.742476° N, 105.1786° W, ΔT = 67 s).
//
// The report's procedure (§A.2) computes the three events from the sun's place at 0 h UT of the input's UT
// date and keeps each event's day fraction within that UT day (from memory of the report: the fractions are
// limited to 0…1). The evening sunset in Colorado falls after 0 h UT, so the 17:20:19 it prints is the
// sunset at 00:20:19 UT on October 17, which is the evening of October 16 local time; the sunset of
// October 17 local time comes about 88 s earlier, as the days shorten. So the sunrise and transit are
// checked on the local date 2003-10-17 and the sunset on 2003-10-16.
//
// The example's pressure, temperature and elevation are passed too: the events do not depend on them (the
// report's rise and set ignore them as well), only NoonAltitude does.
func TestEventsSPAExample(t *testing.T) {
	o := Options{Pressure: 820, Temperature: ptr(11), Elevation: 1830.14, DeltaT: ptr(67)}
	lat, lon := 39.742476, -105.1786
	oct17 := localMidnight(2003, 10, 17, -7)
	oct16 := localMidnight(2003, 10, 16, -7)
	checks := []struct {
		event     string
		start     float64
		published float64
	}{
		{"rise", oct17, oct17 + 6*3600 + 12*60 + 43.46},
		{"noon", oct17, oct17 + 11*3600 + 46*60 + 4.97},
		{"set", oct16, oct16 + 17*3600 + 20*60 + 19.19},
	}
	for _, c := range checks {
		ref, fast := bothPaths(t, c.start, c.start+secondsPerDay, lat, lon, o)
		e := eventByName(c.event)
		for _, got := range []float64{e.get(ref), e.get(fast)} {
			if !(math.Abs(got-c.published) <= 5) {
				t.Errorf("%s = %s, published %s", c.event, fmtLocal(got, -7), fmtLocal(c.published, -7))
			}
		}
		t.Logf("%s: %s (published %s)", c.event, fmtLocal(e.get(ref), -7), fmtLocal(c.published, -7))
	}
}

// TestEventsIgnoreAtmosphereAndElevation: the events are for a sea-level observer at fixed altitudes, so
// pressure, temperature, elevation and NoRefraction change only NoonAltitude (USNO definitions,
// REFERENCE-VALUES.md §3).
func TestEventsIgnoreAtmosphereAndElevation(t *testing.T) {
	start := localMidnight(2024, 3, 5, 1)
	base := Options{DeltaT: ptr(69)}
	want, _ := Events(start, start+secondsPerDay, 52, 13, base)
	for _, o := range []Options{
		{DeltaT: ptr(69), Pressure: 700, Temperature: ptr(-20)},
		{DeltaT: ptr(69), Elevation: 3000},
		{DeltaT: ptr(69), NoRefraction: true},
	} {
		got, err := Events(start, start+secondsPerDay, 52, 13, o)
		if err != nil {
			t.Fatal(err)
		}
		noonAlt := got.NoonAltitude
		got.NoonAltitude = want.NoonAltitude
		if got != want {
			t.Errorf("options %+v change the events: %+v, want %+v", o, got, want)
		}
		pos, _ := Position(got.Noon, 52, 13, o)
		if noonAlt != pos.Altitude {
			t.Errorf("options %+v: NoonAltitude %v, Position at Noon %v", o, noonAlt, pos.Altitude)
		}
		fast := NewKernel(o).Day(start, start+secondsPerDay, 52, 13)
		if !within(fast.NoonAltitude, pos.Altitude, 0.0005) {
			t.Errorf("options %+v: Kernel.Day NoonAltitude %v, Position at Noon %v", o, fast.NoonAltitude, pos.Altitude)
		}
		for _, e := range append(slices.Clone(events), eventByName("noon")) {
			if a, b := e.get(want), e.get(fast); !within(a, b, 0.05) {
				t.Errorf("options %+v: %s: Events %s, Kernel.Day %s", o, e.name, fmtInstant(a), fmtInstant(b))
			}
		}
	}
}

// TestEventsPolar: poleward of the polar circles the sun stays up all day around the summer solstice and
// down around the winter one (common practice). At 70° N on the June solstice the lowest altitude is about
// 70 + 23.44 − 90 = 3.4°: no event but noon, day length 1440. On the December solstice the highest is about
// 90 − 70 − 23.44 = −3.4°: no rise or set, day length 0, but every twilight. At 80° S on the December
// solstice the lowest is about 13.4°: no event but noon. On the June solstice the highest is about −13.4°
// and the lowest −33.4°: only astronomical dawn and dusk (and noon).
func TestEventsPolar(t *testing.T) {
	all := []string{"astronomical dawn", "nautical dawn", "civil dawn", "rise", "set", "civil dusk",
		"nautical dusk", "astronomical dusk"}
	tests := []struct {
		name      string
		m         time.Month
		lat, lon  float64
		present   []string // the other events must be absent
		dayLength float64
	}{
		{"70° N polar day", 6, 70, 19, nil, 1440},
		{"70° N polar night", 12, 70, 19, []string{"astronomical dawn", "nautical dawn", "civil dawn",
			"civil dusk", "nautical dusk", "astronomical dusk"}, 0},
		{"80° S polar day", 12, -80, -60, nil, 1440},
		{"80° S polar night", 6, -80, -60, []string{"astronomical dawn", "astronomical dusk"}, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			start, end := meanSolarWindow(unixOf(2024, tc.m, 21, 12, 0, 0, 0), tc.lon)
			ref, fast := bothPaths(t, start, end, tc.lat, tc.lon, Options{})
			for _, d := range []Day{ref, fast} {
				for _, name := range all {
					want := false
					for _, p := range tc.present {
						want = want || p == name
					}
					if got := eventByName(name).get(d); math.IsNaN(got) == want {
						t.Errorf("%s = %s, want present %v", name, fmtLocal(got, 0), want)
					}
				}
				if math.IsNaN(d.Noon) {
					t.Error("no noon")
				}
				if d.DayLength != tc.dayLength {
					t.Errorf("day length %v, want %v", d.DayLength, tc.dayLength)
				}
			}
		})
	}
}

// TestEquatorEquinoxDayLength: at the equator on an equinox, sunrise to sunset lasts about 12 h 06 min under
// the USNO definitions (REFERENCE-VALUES.md §3, recomputed: the 2 × 50′ of extra hour angle add 6.7 min).
func TestEquatorEquinoxDayLength(t *testing.T) {
	for _, lon := range []float64{-120, 0, 37, 150} {
		start, end := meanSolarWindow(unixOf(2024, 3, 20, 12, 0, 0, 0), lon)
		ref, fast := bothPaths(t, start, end, 0, lon, Options{})
		for _, d := range []Day{ref, fast} {
			if !within(d.DayLength, 12*60+6, 1) || !within(d.Set-d.Rise, d.DayLength*60, 1e-6) {
				t.Errorf("lon %v: day length %.3f min (rise %s, set %s), want about 726", lon, d.DayLength,
					fmtLocal(d.Rise, 0), fmtLocal(d.Set, 0))
			}
		}
	}
}

// TestDayLengthGrowsWithLatitude: in the summer half-year the day lengthens with latitude, and the twilight
// (civil dawn to sunrise) lengthens with latitude all year (common practice, REFERENCE-VALUES.md §6).
func TestDayLengthGrowsWithLatitude(t *testing.T) {
	k := NewKernel(Options{})
	for _, c := range []struct {
		m    time.Month
		d    int
		sign float64 // +1: northern summer, −1: southern summer
	}{{5, 1, 1}, {6, 21, 1}, {8, 10, 1}, {11, 15, -1}, {12, 21, -1}, {2, 1, -1}} {
		prev, prevTwilight := -1.0, -1.0
		for lat := 0.0; lat <= 60; lat += 5 {
			start, end := meanSolarWindow(unixOf(2024, c.m, c.d, 12, 0, 0, 0), 10)
			for _, d := range []Day{k.Day(start, end, c.sign*lat, 10), mustEvents(t, start, end, c.sign*lat, 10)} {
				if !(d.DayLength > prev) {
					t.Errorf("2024-%02d-%02d latitude %v: day length %.2f min, not above %.2f at 5° less",
						c.m, c.d, c.sign*lat, d.DayLength, prev)
				}
				if tw := d.Rise - d.CivilDawn; !(tw > prevTwilight) {
					t.Errorf("2024-%02d-%02d latitude %v: civil twilight %.1f s, not above %.1f at 5° less",
						c.m, c.d, c.sign*lat, tw, prevTwilight)
				}
			}
			prev = k.Day(start, end, c.sign*lat, 10).DayLength
			prevTwilight = k.Day(start, end, c.sign*lat, 10).Rise - k.Day(start, end, c.sign*lat, 10).CivilDawn
		}
	}
	// Poleward of about 48.56° there are summer nights without astronomical darkness (common practice,
	// REFERENCE-VALUES.md §6): on the June solstice at 50° N the sun stays above −18°; at 47° N it does not.
	for _, c := range []struct {
		lat  float64
		dark bool
	}{{47, true}, {50, false}} {
		start, end := meanSolarWindow(unixOf(2024, 6, 21, 12, 0, 0, 0), 10)
		d := mustEvents(t, start, end, c.lat, 10)
		if dark := !math.IsNaN(d.AstronomicalDusk) && !math.IsNaN(d.AstronomicalDawn); dark != c.dark {
			t.Errorf("June solstice at %v° N: astronomical dawn %s, dusk %s; want both present %v", c.lat,
				fmtLocal(d.AstronomicalDawn, 0), fmtLocal(d.AstronomicalDusk, 0), c.dark)
		}
	}
}

func mustEvents(t *testing.T, start, end, lat, lon float64) Day {
	t.Helper()
	d, err := Events(start, end, lat, lon, Options{})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func TestEventsErrors(t *testing.T) {
	day := unixOf(2024, 1, 1, 0, 0, 0, 0)
	tests := []struct {
		name       string
		start, end float64
		lat, lon   float64
		o          Options
		want       error
	}{
		{"NaN start", math.NaN(), day, 0, 0, Options{}, ErrNotFinite},
		{"start before -2000", MinUnix - 1, MinUnix + 86399, 0, 0, Options{}, ErrTimeRange},
		{"latitude 91", day, day + 86400, 91, 0, Options{}, ErrLatitude},
		{"longitude -181", day, day + 86400, 0, -181, Options{}, ErrLongitude},
		{"NaN latitude", day, day + 86400, math.NaN(), 0, Options{}, ErrNotFinite},
		{"infinite end", day, math.Inf(1), 0, 0, Options{}, ErrNotFinite},
		{"end before start", day, day - 1, 0, 0, Options{}, ErrWindow},
		{"empty window", day, day, 0, 0, Options{}, ErrWindow},
		{"window over 48 h", day, day + 48*3600 + 1, 0, 0, Options{}, ErrWindow},
		{"end after 6000", MaxUnix - 3600, MaxUnix + 3600, 0, 0, Options{}, ErrTimeRange},
		{"negative pressure", day, day + 86400, 0, 0, Options{Pressure: -1}, ErrOption},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d, err := Events(tc.start, tc.end, tc.lat, tc.lon, tc.o)
			if !errors.Is(err, tc.want) {
				t.Errorf("error %v, want one wrapping %v", err, tc.want)
			}
			if fast := NewKernel(tc.o).Day(tc.start, tc.end, tc.lat, tc.lon); !allNaN(fast) || !allNaN(d) {
				t.Errorf("Events %+v, Kernel.Day %+v; want every field NaN", d, fast)
			}
		})
	}
	// A 48-hour window and one ending at MaxUnix are valid.
	for _, w := range [][2]float64{{day, day + 48*3600}, {MaxUnix - 86400, MaxUnix}} {
		if _, err := Events(w[0], w[1], 10, 10, Options{}); err != nil {
			t.Errorf("window [%s, %s): %v", fmtInstant(w[0]), fmtInstant(w[1]), err)
		}
	}
	// The message says what is valid.
	_, err := Events(day, day-1, 0, 0, Options{})
	if want := "day window [2024-01-01T00:00:00Z, 2023-12-31T23:59:59Z) invalid: want start < end <= start + 48 h"; err == nil || err.Error() != want {
		t.Errorf("message %q, want %q", err, want)
	}
}

// allNaN reports whether every field of d is NaN.
func allNaN(d Day) bool {
	for _, v := range []float64{d.Rise, d.Set, d.Noon, d.CivilDawn, d.CivilDusk, d.NauticalDawn,
		d.NauticalDusk, d.AstronomicalDawn, d.AstronomicalDusk, d.DayLength, d.NoonAltitude} {
		if !math.IsNaN(v) {
			return false
		}
	}
	return true
}

// sameDay reports whether a and b are equal field by field, NaN equal to NaN.
func sameDay(a, b Day) bool {
	fa := []float64{a.Rise, a.Set, a.Noon, a.CivilDawn, a.CivilDusk, a.NauticalDawn, a.NauticalDusk,
		a.AstronomicalDawn, a.AstronomicalDusk, a.DayLength, a.NoonAltitude}
	fb := []float64{b.Rise, b.Set, b.Noon, b.CivilDawn, b.CivilDusk, b.NauticalDawn, b.NauticalDusk,
		b.AstronomicalDawn, b.AstronomicalDusk, b.DayLength, b.NoonAltitude}
	for i := range fa {
		if fa[i] != fb[i] && !(math.IsNaN(fa[i]) && math.IsNaN(fb[i])) {
			return false
		}
	}
	return true
}

// TestKernelDayCache: a Day from the cache is the Day computed for the same inputs, whatever the order of
// the rows and however full the cache; the cache grows only when rows revisit more places and dates than it
// holds, and not beyond its bound; hits and misses do not allocate once it exists.
func TestKernelDayCache(t *testing.T) {
	// Rows of 40 places over a year in time order: each place and date is computed once (a miss), every
	// later row of it is a hit, but for the rare sets where three dates in use collide (allow 1%).
	rows := cameraRows(60000, false)
	k := NewKernel(Options{})
	got := make([]Day, len(rows.start))
	keys := map[[4]float64]bool{}
	for i := range rows.start {
		got[i] = k.Day(rows.start[i], rows.end[i], rows.lat[i], rows.lon[i])
		keys[[4]float64{rows.start[i], rows.end[i], rows.lat[i], rows.lon[i]}] = true
	}
	if k.days.lookups != len(rows.start) || k.days.misses < len(keys) || k.days.misses > len(keys)*101/100 {
		t.Errorf("%d misses in %d look-ups of rows with %d distinct places and dates in time order; want one "+
			"miss per place and date", k.days.misses, k.days.lookups, len(keys))
	}
	if n := len(k.days.entries); n != dayWays*minDaySets {
		t.Errorf("time-ordered rows grew the cache to %d entries", n)
	}
	// Each Day equals one computed by a kernel that has never seen any other row.
	for i := 0; i < len(rows.start); i += 97 {
		fresh := NewKernel(Options{}).Day(rows.start[i], rows.end[i], rows.lat[i], rows.lon[i])
		if !sameDay(got[i], fresh) {
			t.Fatalf("row %d: %+v from the cache, %+v computed alone", i, got[i], fresh)
		}
	}
	// Rows that each have their own place and date never come back: the cache does not grow.
	crash := crashRows(3*dayWays*maxDaySets, 9)
	for i := range crash.start {
		k.Day(crash.start[i], crash.end[i], crash.lat[i], crash.lon[i])
	}
	if n := len(k.days.entries); n != dayWays*minDaySets {
		t.Errorf("rows that never repeat grew the cache to %d entries", n)
	}
	// The same camera rows shuffled revisit 14,400 places and dates in random order: the cache grows to
	// its bound and no further, and then most look-ups hit.
	shuffled := cameraRows(60000, true)
	for range 3 {
		misses := k.days.misses
		for i := range shuffled.start {
			k.Day(shuffled.start[i], shuffled.end[i], shuffled.lat[i], shuffled.lon[i])
		}
		t.Logf("shuffled pass: %d misses in %d rows, %d entries", k.days.misses-misses, len(shuffled.start),
			len(k.days.entries))
	}
	if n := len(k.days.entries); n != dayWays*maxDaySets {
		t.Errorf("%d cache entries after rows revisiting %d places and dates at random, want the bound %d",
			n, len(keys), dayWays*maxDaySets)
	}
	for i := 0; i < len(rows.start); i += 101 { // still the same values after all those evictions
		if d := k.Day(rows.start[i], rows.end[i], rows.lat[i], rows.lon[i]); !sameDay(d, got[i]) {
			t.Fatalf("row %d: %+v after evictions, %+v before", i, d, got[i])
		}
	}
	i := 0
	if a := testing.AllocsPerRun(1000, func() {
		j := i % len(crash.start)
		k.Day(crash.start[j], crash.end[j], crash.lat[j], crash.lon[j]) // a hit or a miss
		k.Day(crash.start[j], crash.end[j], crash.lat[j], crash.lon[j]) // a hit
		i++
	}); a != 0 {
		t.Errorf("Kernel.Day allocates %v times per call", a)
	}
}

// TestAcosApprox checks the polynomial of Abramowitz & Stegun 4.4.46 against math.Acos: the handbook gives
// |error| <= 2e-8; its coefficients, printed to ten decimals, add about 0.2e-8.
func TestAcosApprox(t *testing.T) {
	worst := 0.0
	for i := -100000; i <= 100000; i++ {
		x := float64(i) / 100000
		worst = max(worst, math.Abs(acosApprox(x)-math.Acos(x)))
	}
	if worst > 2.5e-8 {
		t.Errorf("largest error %.3g rad, want at most 2.5e-8", worst)
	}
}

func TestSincosDeg(t *testing.T) {
	for i := -200000; i <= 200000; i++ {
		x := float64(i) * 0.0173
		s, c := sincosDeg(x)
		ws, wc := math.Sincos(x * deg)
		if !within(s, ws, 1e-10) || !within(c, wc, 1e-10) {
			t.Fatalf("sincosDeg(%v) = %v, %v; math %v, %v", x, s, c, ws, wc)
		}
	}
}
