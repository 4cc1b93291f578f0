package zone

import (
	"archive/zip"
	"errors"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/heliotag/heliotag/io/internal/stamp"
)

func wall(t testing.TB, text string) stamp.Stamp {
	t.Helper()
	p, err := stamp.NewParser(stamp.Options{})
	if err != nil {
		t.Fatal(err)
	}
	s, err := p.Parse(text)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func utc(text string) time.Time {
	t, err := time.Parse(time.RFC3339Nano, text)
	if err != nil {
		panic(err)
	}
	return t
}

func fixed(t testing.TB, name string) *Resolver {
	t.Helper()
	r, err := NewResolver(Options{Mode: Fixed, Name: name})
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// TestResolveRules checks gaps, overlaps and plain times against the published rules of real zones.
func TestResolveRules(t *testing.T) {
	tests := []struct {
		name, zone, local string
		want              string // UTC instant; "" for a gap
		note              string
		gapMsg            string
	}{
		// US rule since 2007 (Energy Policy Act of 2005, §110: DST from 02:00 on the second Sunday of
		// March to 02:00 on the first Sunday of November), from memory.
		{"NY gap", "America/New_York", "2024-03-10 02:30", "", "",
			"2024-03-10 02:30 does not exist in America/New_York (clocks jump from 02:00 to 03:00)"},
		{"NY gap start", "America/New_York", "2024-03-10 02:00", "", "", "clocks jump from 02:00 to 03:00"},
		{"NY gap last second", "America/New_York", "2024-03-10 02:59:59.5", "", "",
			"2024-03-10 02:59:59.5 does not exist in America/New_York (clocks jump from 02:00 to 03:00)"},
		{"NY before gap", "America/New_York", "2024-03-10 01:59:59", "2024-03-10T06:59:59Z", "", ""},
		{"NY after gap", "America/New_York", "2024-03-10 03:00", "2024-03-10T07:00:00Z", "", ""},
		{"NY overlap", "America/New_York", "2024-11-03 01:30", "2024-11-03T05:30:00Z", NoteAmbiguous, ""},
		{"NY overlap start", "America/New_York", "2024-11-03 01:00", "2024-11-03T05:00:00Z", NoteAmbiguous, ""},
		{"NY before overlap", "America/New_York", "2024-11-03 00:59:59", "2024-11-03T04:59:59Z", "", ""},
		{"NY after overlap", "America/New_York", "2024-11-03 02:00", "2024-11-03T07:00:00Z", "", ""},
		{"NY winter", "America/New_York", "2024-01-15 12:00:00.25", "2024-01-15T17:00:00.25Z", "", ""},
		{"NY summer", "America/New_York", "2024-06-21 12:00", "2024-06-21T16:00:00Z", "", ""},
		// EU rule (Directive 2000/84/EC: summer time from 01:00 UTC on the last Sunday of March to
		// 01:00 UTC on the last Sunday of October), from memory.
		{"London gap", "Europe/London", "2024-03-31 01:30", "", "",
			"2024-03-31 01:30 does not exist in Europe/London (clocks jump from 01:00 to 02:00)"},
		{"London overlap", "Europe/London", "2024-10-27 01:30", "2024-10-27T00:30:00Z", NoteAmbiguous, ""},
		{"London winter", "Europe/London", "2024-12-21 15:00", "2024-12-21T15:00:00Z", "", ""},
		// Lord Howe Island shifts by 30 minutes: +10:30 standard, +11:00 from 02:00 on the first Sunday
		// of October to 02:00 on the first Sunday of April (from memory).
		{"Lord Howe gap", "Australia/Lord_Howe", "2024-10-06 02:15", "", "",
			"2024-10-06 02:15 does not exist in Australia/Lord_Howe (clocks jump from 02:00 to 02:30)"},
		{"Lord Howe overlap", "Australia/Lord_Howe", "2024-04-07 01:45", "2024-04-06T14:45:00Z", NoteAmbiguous, ""},
		{"Lord Howe after overlap", "Australia/Lord_Howe", "2024-04-07 02:00", "2024-04-06T15:30:00Z", "", ""},
		// Southern hemisphere, New South Wales: +10 standard, +11 from 02:00 standard time on the first
		// Sunday of October to 03:00 summer time on the first Sunday of April (from memory).
		{"Sydney gap", "Australia/Sydney", "2024-10-06 02:30", "", "",
			"2024-10-06 02:30 does not exist in Australia/Sydney (clocks jump from 02:00 to 03:00)"},
		{"Sydney overlap", "Australia/Sydney", "2024-04-07 02:30", "2024-04-06T15:30:00Z", NoteAmbiguous, ""},
		{"Sydney summer", "Australia/Sydney", "2024-01-01 12:00", "2024-01-01T01:00:00Z", "", ""},
		// Offset changes that are not daylight saving (from memory): Moscow moved from permanent +04 to
		// +03 at 02:00 on 2014-10-26; Pyongyang moved from +09 to +08:30 at 00:00 on 2015-08-15 and
		// back at 23:30 on 2018-05-04; Samoa skipped 2011-12-30 moving across the date line.
		{"Moscow 2014", "Europe/Moscow", "2014-10-26 01:30", "2014-10-25T21:30:00Z", NoteAmbiguous, ""},
		{"Moscow 2014 after", "Europe/Moscow", "2014-10-26 02:00", "2014-10-25T23:00:00Z", "", ""},
		{"Pyongyang 2015", "Asia/Pyongyang", "2015-08-14 23:45", "2015-08-14T14:45:00Z", NoteAmbiguous, ""},
		{"Pyongyang 2018", "Asia/Pyongyang", "2018-05-04 23:45", "", "",
			"2018-05-04 23:45 does not exist in Asia/Pyongyang (clocks jump from 23:30 to 2018-05-05 00:00)"},
		{"Samoa skipped day", "Pacific/Apia", "2011-12-30 12:00", "", "",
			"2011-12-30 12:00 does not exist in Pacific/Apia (clocks jump from 00:00 to 2011-12-31 00:00)"},
		// A zone without rules, and local mean time before standard time (New York LMT −4:56:02).
		{"UTC", "UTC", "2024-03-10 02:30", "2024-03-10T02:30:00Z", "", ""},
		{"NY LMT", "America/New_York", "1850-01-01 12:00", "1850-01-01T16:56:02Z", "", ""},
		{"year 1", "America/New_York", "0001-01-01 00:00", "0001-01-01T04:56:02Z", "", ""},
		// Far future: past the table, by search over the zone's rule.
		{"NY 2200 gap", "America/New_York", "2200-03-09 02:30", "", "", "clocks jump from 02:00 to 03:00"},
		{"NY 9999 overlap", "America/New_York", "9999-11-07 01:30", "9999-11-07T05:30:00Z", NoteAmbiguous, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r := fixed(t, tc.zone)
			inst, dz, note, err := r.Resolve(wall(t, tc.local), "", 0, 0)
			if tc.want == "" {
				if !errors.Is(err, ErrNonexistent) {
					t.Fatalf("Resolve(%s in %s) = %v, %v; want ErrNonexistent", tc.local, tc.zone, inst, err)
				}
				if !strings.Contains(err.Error(), tc.gapMsg) {
					t.Errorf("message %q, want it to contain %q", err, tc.gapMsg)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if want := utc(tc.want); !inst.Equal(want) || inst.Location() != time.UTC {
				t.Errorf("instant = %v, want %v (UTC)", inst, want)
			}
			if note != tc.note {
				t.Errorf("note = %q, want %q", note, tc.note)
			}
			if dz == nil || dz.String() != tc.zone {
				t.Errorf("date zone = %v, want %s", dz, tc.zone)
			}
		})
	}
}

// zoneNames lists the zones of the Go distribution's zone database.
func zoneNames(t testing.TB) []string {
	t.Helper()
	zr, err := zip.OpenReader(filepath.Join(runtime.GOROOT(), "lib", "time", "zoneinfo.zip"))
	if err != nil {
		t.Skipf("no zone list: %v", err)
	}
	defer zr.Close()
	var names []string
	for _, f := range zr.File {
		if !strings.HasSuffix(f.Name, "/") {
			names = append(names, f.Name)
		}
	}
	slices.Sort(names)
	return names
}

// bruteForce resolves wall w in loc independently of tables and ZoneBounds: it gathers the offsets
// seen every 30 minutes over ±30 h and keeps each offset o whose instant w−o really shows offset o.
func bruteForce(loc *time.Location, w int64) []int64 {
	seen := map[int]bool{}
	var out []int64
	for d := int64(-30 * 3600); d <= 30*3600; d += 1800 {
		o := offsetAt(loc, w+d)
		if seen[o] {
			continue
		}
		seen[o] = true
		if c := w - int64(o); offsetAt(loc, c) == o {
			out = append(out, c)
		}
	}
	slices.Sort(out)
	return out
}

// instants lists the instants a result stands for.
func instants(r result, w int64) []int64 {
	switch r.kind {
	case kindUnique:
		return []int64{w - int64(r.off)}
	case kindOverlap:
		return []int64{w - int64(r.off), w - int64(r.off2)}
	}
	return nil
}

// TestTablesAllZones builds the table of every zone in the database and checks it around every
// boundary and at random walls: against search everywhere, and against the brute-force oracle on a
// sample.
func TestTablesAllZones(t *testing.T) {
	names := zoneNames(t)
	if len(names) < 300 {
		t.Fatalf("only %d zones found", len(names))
	}
	rng := rand.New(rand.NewPCG(7, 8))
	broken := 0
	step := 1
	if raceEnabled {
		step = 7 // the race detector slows this tenfold and it has no concurrency to check
	}
	for zi := 0; zi < len(names); zi += step {
		name := names[zi]
		loc, err := time.LoadLocation(name)
		if err != nil {
			t.Errorf("LoadLocation(%q): %v", name, err)
			continue
		}
		tab := buildTable(loc)
		if tab.hi < tableEnd {
			broken++
			t.Logf("%s: table stops at wall %d", name, tab.hi)
		}
		for i := 1; i < len(tab.starts); i++ {
			if tab.starts[i] <= tab.starts[i-1] {
				t.Fatalf("%s: boundaries not ascending at %d", name, i)
			}
		}
		var walls []int64
		for _, b := range tab.starts[1:] {
			walls = append(walls, b-1, b, b+1)
		}
		for i := 0; i < 50; i++ {
			walls = append(walls, rng.Int64N(9000000000)-5000000000) // years 1811..2255
		}
		for k, w := range walls {
			got := tab.lookup(loc, w)
			want := search(loc, w)
			if got.kind != want.kind || !slices.Equal(instants(got, w), instants(want, w)) ||
				(got.kind == kindGap && (got.from != want.from || got.to != want.to)) {
				t.Fatalf("%s: wall %s: table %+v, search %+v", name, time.Unix(w, 0).UTC(), got, want)
			}
			if (zi%8 == 0 || k%16 == 0) && !slices.Equal(instants(got, w), bruteForce(loc, w)) {
				t.Fatalf("%s: wall %s: table %+v, brute force %v", name, time.Unix(w, 0).UTC(), got, bruteForce(loc, w))
			}
		}
	}
	if broken > 0 {
		t.Logf("%d of %d zones resolve part of their walls by search", broken, len(names))
	}
}

func TestLoad(t *testing.T) {
	for _, name := range []string{"UTC", "America/Chicago", " Europe/London ", "Etc/GMT+5", "Australia/Lord_Howe"} {
		loc, err := Load(name)
		if err != nil || loc.String() != strings.TrimSpace(name) {
			t.Errorf("Load(%q) = %v, %v", name, loc, err)
		}
	}
	errTests := []struct{ name, part string }{
		{"", "empty time zone name; expected an IANA name such as \"America/Chicago\""},
		{"   ", "empty time zone name"},
		{"Local", "is not accepted"},
		{"America/Chicgo", `unknown time zone "America/Chicgo"; expected an IANA name such as "America/Chicago", or UTC`},
		{"america/new_york", `did you mean "America/New_York"?`},
		{"utc", `did you mean "UTC"?`},
		{"etc/gmt+5", `did you mean "Etc/GMT+5"?`},
		{"PST", "abbreviations such as CST are ambiguous"},
		{"../../etc/passwd", "unknown time zone"},
		{"+02:00", "unknown time zone"},
	}
	for _, tc := range errTests {
		_, err := Load(tc.name)
		if !errors.Is(err, ErrUnknownZone) || !strings.Contains(err.Error(), tc.part) {
			t.Errorf("Load(%q) error = %v, want ErrUnknownZone containing %q", tc.name, err, tc.part)
		}
	}
}

func TestNewResolverErrors(t *testing.T) {
	tests := []struct {
		o    Options
		want error
	}{
		{Options{Mode: Fixed, Name: "Mars/Olympus_Mons"}, ErrUnknownZone},
		{Options{Mode: Fixed}, ErrUnknownZone},
		{Options{Mode: None, Name: "UTC"}, ErrOptions},
		{Options{Mode: Column, Name: "UTC"}, ErrOptions},
		{Options{Mode: Mode(9)}, ErrOptions},
	}
	for _, tc := range tests {
		if _, err := NewResolver(tc.o); !errors.Is(err, tc.want) {
			t.Errorf("NewResolver(%+v) error = %v, want %v", tc.o, err, tc.want)
		}
	}
	if got := OptionsFromFlag("Auto"); got != (Options{Mode: Auto}) {
		t.Errorf("OptionsFromFlag(auto) = %+v", got)
	}
	if got := OptionsFromFlag("Europe/Paris"); got != (Options{Mode: Fixed, Name: "Europe/Paris"}) {
		t.Errorf("OptionsFromFlag(Europe/Paris) = %+v", got)
	}
	if got := OptionsFromFlag(""); got != (Options{}) {
		t.Errorf("OptionsFromFlag(\"\") = %+v", got)
	}
}

func TestModeNone(t *testing.T) {
	r, err := NewResolver(Options{})
	if err != nil {
		t.Fatal(err)
	}
	_, _, _, err = r.Resolve(wall(t, "2024-06-21 18:30"), "", 0, 0)
	if !errors.Is(err, ErrNoTimeZone) {
		t.Fatalf("offset-less stamp in mode None: %v, want ErrNoTimeZone", err)
	}
	for _, part := range []string{"--tz ZONE", "--tz-column COL", "--tz auto", "2024-06-21 18:30"} {
		if !strings.Contains(err.Error(), part) {
			t.Errorf("message %q lacks %q", err, part)
		}
	}
	inst, dz, note, err := r.Resolve(wall(t, "2024-06-21T18:30:00Z"), "", 0, 0)
	if err != nil || dz != nil || note != "" || !inst.Equal(utc("2024-06-21T18:30:00Z")) {
		t.Errorf("Z stamp: %v %v %q %v; want instant, nil date zone", inst, dz, note, err)
	}
	inst, dz, _, err = r.Resolve(wall(t, "2024-06-21T18:30:00.5+05:30"), "", 0, 0)
	if err != nil || !inst.Equal(utc("2024-06-21T13:00:00.5Z")) {
		t.Fatalf("offset stamp: %v, %v", inst, err)
	}
	if _, off := inst.In(dz).Zone(); off != 19800 || dz.String() != "+05:30" {
		t.Errorf("date zone %v has offset %d, want +05:30", dz, off)
	}
	_, dz2, _, _ := r.Resolve(wall(t, "2024-01-01T00:00:00+05:30"), "", 0, 0)
	if dz2 != dz {
		t.Error("date zone for the same offset is not cached")
	}
	_, dz3, _, _ := r.Resolve(wall(t, "2024-01-01T00:00:00-09:30"), "", 0, 0)
	if dz3.String() != "-09:30" {
		t.Errorf("date zone name %q, want -09:30", dz3)
	}
	lmt := stamp.Stamp{Year: 1880, Month: 1, Day: 1, HasOffset: true, Offset: -(4*3600 + 56*60 + 2)}
	if _, dz, _, err := r.Resolve(lmt, "", 0, 0); err != nil || dz.String() != "-04:56:02" {
		t.Errorf("offset with seconds: %v %v", dz, err)
	}
}

func TestModesWithOffsetStamp(t *testing.T) {
	// A stamp with an offset keeps its instant; the mode's zone only decides the date.
	s := wall(t, "2024-06-21T23:30:00Z")
	want := utc("2024-06-21T23:30:00Z")
	r := fixed(t, "America/Chicago")
	inst, dz, note, err := r.Resolve(s, "", 0, 0)
	if err != nil || !inst.Equal(want) || dz.String() != "America/Chicago" || note != "" {
		t.Errorf("Fixed: %v %v %q %v", inst, dz, note, err)
	}
	c, _ := NewResolver(Options{Mode: Column})
	inst, dz, _, err = c.Resolve(s, "Asia/Tokyo", 0, 0)
	if err != nil || !inst.Equal(want) || dz.String() != "Asia/Tokyo" {
		t.Errorf("Column: %v %v %v", inst, dz, err)
	}
	// An offset stamp whose wall clock falls in the zone's gap is still fine: the offset decides.
	inst, _, _, err = fixed(t, "America/New_York").Resolve(wall(t, "2024-03-10T02:30:00-05:00"), "", 0, 0)
	if err != nil || !inst.Equal(utc("2024-03-10T07:30:00Z")) {
		t.Errorf("offset stamp in gap: %v %v", inst, err)
	}
}

func TestModeColumn(t *testing.T) {
	r, err := NewResolver(Options{Mode: Column})
	if err != nil {
		t.Fatal(err)
	}
	s := wall(t, "2024-11-03 01:30")
	inst, dz, note, err := r.Resolve(s, "America/New_York", 0, 0)
	if err != nil || !inst.Equal(utc("2024-11-03T05:30:00Z")) || note != NoteAmbiguous || dz.String() != "America/New_York" {
		t.Errorf("New York: %v %v %q %v", inst, dz, note, err)
	}
	inst, _, note, err = r.Resolve(s, "Europe/Berlin", 0, 0)
	if err != nil || !inst.Equal(utc("2024-11-03T00:30:00Z")) || note != "" {
		t.Errorf("Berlin: %v %q %v", inst, note, err)
	}
	_, dz2, _, _ := r.Resolve(s, "America/New_York", 0, 0)
	if dz2 != dz {
		t.Error("zone of a repeated name is not cached")
	}
	if _, _, _, err := r.Resolve(s, "Atlantis/Capital", 0, 0); !errors.Is(err, ErrUnknownZone) {
		t.Errorf("unknown name: %v", err)
	}
	if _, _, _, err := r.Resolve(s, "Atlantis/Capital", 0, 0); !errors.Is(err, ErrUnknownZone) {
		t.Errorf("unknown name, cached: %v", err)
	}
	// An empty value is a bad row (ErrUnknownZone), not a missing option (ErrNoTimeZone).
	if _, _, _, err := r.Resolve(s, " ", 0, 0); !errors.Is(err, ErrUnknownZone) || errors.Is(err, ErrNoTimeZone) ||
		!strings.Contains(err.Error(), "empty --tz-column value") {
		t.Errorf("empty name: %v", err)
	}
	// Unknown names beyond the cache bound are still errors.
	for i := 0; i < maxBadNames+10 && !raceEnabled; i++ {
		if _, _, _, err := r.Resolve(s, fmt.Sprintf("Nowhere/%d", i), 0, 0); !errors.Is(err, ErrUnknownZone) {
			t.Fatalf("name %d: %v", i, err)
		}
	}
	if n := len(*r.names.Load()); n > maxBadNames+10 {
		t.Errorf("name cache holds %d entries, want at most %d", n, maxBadNames+10)
	}
	// A huge value is an error with a bounded message, and is not remembered.
	long := strings.Repeat("x", 10<<20)
	before := len(*r.names.Load())
	if _, _, _, err := r.Resolve(s, long, 0, 0); !errors.Is(err, ErrUnknownZone) || len(err.Error()) > 300 {
		t.Errorf("10 MB name: error of %d bytes, %v", len(err.Error()), errors.Is(err, ErrUnknownZone))
	}
	if after := len(*r.names.Load()); after != before {
		t.Errorf("10 MB name was cached (%d → %d entries)", before, after)
	}
	if loc, err := r.Zone("Asia/Kolkata", 0, 0); err != nil || loc.String() != "Asia/Kolkata" {
		t.Errorf("Zone: %v %v", loc, err)
	}
}

// TestConcurrentResolve shares one Resolver per mode among goroutines (run with -race).
func TestConcurrentResolve(t *testing.T) {
	col, _ := NewResolver(Options{Mode: Column})
	fix := fixed(t, "Europe/London")
	none, _ := NewResolver(Options{})
	zones := []string{"America/New_York", "Europe/London", "Australia/Lord_Howe", "Asia/Kolkata", "Nowhere/Else"}
	s := wall(t, "2024-06-21 18:30")
	so := wall(t, "2024-06-21T18:30:00+03:00")
	var wg sync.WaitGroup
	for g := 0; g < 4; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := 0; i < 500; i++ {
				name := zones[(i+g)%len(zones)]
				_, dz, _, err := col.Resolve(s, name, 0, 0)
				if name == "Nowhere/Else" {
					if !errors.Is(err, ErrUnknownZone) {
						t.Errorf("%s: %v", name, err)
					}
				} else if err != nil || dz.String() != name {
					t.Errorf("%s: %v %v", name, dz, err)
				}
				if _, _, _, err := fix.Resolve(s, "", 0, 0); err != nil {
					t.Error(err)
				}
				if _, dz, _, err := none.Resolve(so, "", 0, 0); err != nil || dz.String() != "+03:00" {
					t.Error(dz, err)
				}
			}
		}()
	}
	wg.Wait()
}

func TestNoAllocs(t *testing.T) {
	if raceEnabled {
		t.Skip("allocation counts differ under -race")
	}
	s := wall(t, "2024-06-21 18:30")
	so := wall(t, "2024-06-21T18:30:00+02:00")
	amb := wall(t, "2024-11-03 01:30")
	far := wall(t, "2500-06-21 12:00")
	fix := fixed(t, "America/New_York")
	col, _ := NewResolver(Options{Mode: Column})
	none, _ := NewResolver(Options{})
	_, _, _, _ = col.Resolve(s, "Europe/Paris", 0, 0)
	_, _, _, _ = none.Resolve(so, "", 0, 0)
	cases := map[string]func(){
		"fixed":         func() { _, _, _, _ = fix.Resolve(s, "", 0, 0) },
		"fixed offset":  func() { _, _, _, _ = fix.Resolve(so, "", 0, 0) },
		"column":        func() { _, _, _, _ = col.Resolve(s, "Europe/Paris", 0, 0) },
		"none offset":   func() { _, _, _, _ = none.Resolve(so, "", 0, 0) },
		"fixed overlap": func() { _, _, _, _ = fix.Resolve(amb, "", 0, 0) },
		"far future":    func() { _, _, _, _ = fix.Resolve(far, "", 0, 0) },
	}
	for name, f := range cases {
		if n := testing.AllocsPerRun(100, f); n != 0 {
			t.Errorf("%s: %v allocations per Resolve, want 0", name, n)
		}
	}
}

func ExampleResolver_Resolve() {
	p, _ := stamp.NewParser(stamp.Options{})
	r, _ := NewResolver(Options{Mode: Fixed, Name: "America/New_York"})
	for _, text := range []string{"2024-06-21 18:30", "2024-11-03 01:30", "2024-03-10 02:30", "2024-06-21T18:30:00Z"} {
		s, _ := p.Parse(text)
		instant, dateZone, note, err := r.Resolve(s, "", 0, 0)
		if err != nil {
			fmt.Println("error:", err)
			continue
		}
		fmt.Println(instant.Format(time.RFC3339), dateZone, "note:"+note)
	}
	// Output:
	// 2024-06-21T22:30:00Z America/New_York note:
	// 2024-11-03T05:30:00Z America/New_York note:ambiguous_local_time
	// error: 2024-03-10 02:30 does not exist in America/New_York (clocks jump from 02:00 to 03:00)
	// 2024-06-21T18:30:00Z America/New_York note:
}

func ExampleResolver_Resolve_noZone() {
	p, _ := stamp.NewParser(stamp.Options{})
	r, _ := NewResolver(Options{})
	for _, text := range []string{"2024-06-21T18:30:00+02:00", "2024-06-21T18:30:00Z", "2024-06-21 18:30"} {
		s, _ := p.Parse(text)
		instant, dateZone, _, err := r.Resolve(s, "", 0, 0)
		if err != nil {
			fmt.Println("error:", err)
			continue
		}
		if dateZone == nil {
			fmt.Println(instant.Format(time.RFC3339), "no date zone: use mean solar time")
			continue
		}
		fmt.Println(instant.Format(time.RFC3339), dateZone)
	}
	// Output:
	// 2024-06-21T16:30:00Z +02:00
	// 2024-06-21T18:30:00Z no date zone: use mean solar time
	// error: 2024-06-21 18:30 has no UTC offset and no time zone was given: use --tz ZONE (e.g. --tz America/Chicago), --tz-column COL or --tz auto
}

func ExampleLoad() {
	_, err := Load("america/chicago")
	fmt.Println(err)
	// Output:
	// unknown time zone "america/chicago"; did you mean "America/Chicago"?
}

// TestPeriodEnd walks the rule-based future of zones period by period and checks, hour by hour, that
// no offset change is skipped or invented: periodEnd must stay correct where ZoneBounds misreports the
// end of leap years (Go 1.26 puts it a day early for such zones, e.g. New York at 2040-12-31).
func TestPeriodEnd(t *testing.T) {
	zones := []string{"America/New_York", "Australia/Lord_Howe", "Europe/London"}
	if raceEnabled {
		zones = zones[:1]
	}
	for _, name := range zones {
		loc, _ := time.LoadLocation(name)
		start, stop := utc("2030-01-01T00:00:00Z").Unix(), utc("2101-01-01T00:00:00Z").Unix()
		tm := time.Unix(start, 0).In(loc)
		var ends []int64
		for tm.Unix() < stop {
			end := periodEnd(tm)
			if end.IsZero() || !end.After(tm) {
				t.Fatalf("%s: periodEnd(%v) = %v", name, tm, end)
			}
			ends = append(ends, end.Unix())
			tm = end
		}
		// Every offset change (found hourly, then to the second) must be one of the ends.
		for h := start; h+3600 <= stop; h += 3600 {
			if offsetAt(loc, h) == offsetAt(loc, h+3600) {
				continue
			}
			lo, hi := h, h+3600
			for hi-lo > 1 {
				if mid := lo + (hi-lo)/2; offsetAt(loc, mid) == offsetAt(loc, h) {
					lo = mid
				} else {
					hi = mid
				}
			}
			if !slices.Contains(ends, hi) {
				t.Fatalf("%s: offset change at %v is not a period end", name, time.Unix(hi, 0).UTC())
			}
		}
	}
}

// TestAgreesWithTimeDate compares Resolve with the standard library's time.Date on random local
// times in many zones: where the time happened once they must agree; in an overlap time.Date's
// choice must be one of the two instants.
func TestAgreesWithTimeDate(t *testing.T) {
	names := zoneNames(t)
	rng := rand.New(rand.NewPCG(21, 22))
	resolvers := map[string]*Resolver{}
	for i := 0; i < 20000; i++ {
		name := names[rng.IntN(len(names))]
		r := resolvers[name]
		if r == nil {
			r = fixed(t, name)
			resolvers[name] = r
		}
		s, _ := stamp.FromUnix(rng.Int64N(7258118400)-2208988800, rng.Int64N(1e9)) // 1900..2200
		s.HasOffset = false
		inst, _, note, err := r.Resolve(s, "", 0, 0)
		if errors.Is(err, ErrNonexistent) {
			continue
		}
		if err != nil {
			t.Fatalf("%s %v: %v", name, s, err)
		}
		loc := r.fixed.loc
		td := time.Date(s.Year, s.Month, s.Day, s.Hour, s.Minute, s.Second, s.Nanosecond, loc)
		if note == "" && !td.Equal(inst) {
			t.Fatalf("%s %v: Resolve %v, time.Date %v", name, s, inst, td.UTC())
		}
		if note == NoteAmbiguous {
			_, o1 := inst.In(loc).Zone()
			if !td.Equal(inst) && td.Sub(inst) <= 0 {
				t.Fatalf("%s %v: ambiguous: Resolve %v (offset %d) is not the earlier of it and time.Date's %v", name, s, inst, o1, td.UTC())
			}
		}
	}
}
