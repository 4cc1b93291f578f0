package zone

import (
	"errors"
	"slices"
	"testing"
	"time"

	"github.com/heliotag/heliotag/io/internal/stamp"
)

// Seed corpora live in testdata/fuzz/<FuzzName>/; `go test` runs them, `go test -fuzz=FuzzName`
// explores further.

// fuzzZones are zones with unusual rules: 30-minute DST, date-line jumps, double summer time,
// permanent offset changes, no rules at all.
var fuzzZones = []string{
	"America/New_York", "Europe/London", "Australia/Lord_Howe", "Pacific/Apia", "Asia/Pyongyang",
	"Europe/Moscow", "America/Caracas", "Pacific/Kiritimati", "Antarctica/Troll", "Africa/Casablanca",
	"America/St_Johns", "Asia/Kathmandu", "UTC", "Etc/GMT+12", "America/Sao_Paulo", "Europe/Dublin",
}

// FuzzTable: for any zone and wall clock, the table agrees with search and with the brute-force
// oracle, and Resolve's answer is consistent with them.
func FuzzTable(f *testing.F) {
	type z struct {
		loc *time.Location
		tab *table
		r   *Resolver
	}
	zones := make([]z, len(fuzzZones))
	for i, name := range fuzzZones {
		loc, err := time.LoadLocation(name)
		if err != nil {
			f.Fatal(err)
		}
		r, err := NewResolver(Options{Mode: Fixed, Name: name})
		if err != nil {
			f.Fatal(err)
		}
		zones[i] = z{loc, buildTable(loc), r}
	}
	f.Fuzz(func(t *testing.T, zi uint8, w int64) {
		zz := zones[int(zi)%len(zones)]
		w = w%(stampMaxWall-stampMinWall) + stampMinWall // years 1..9999
		if w < stampMinWall {
			w += stampMaxWall - stampMinWall
		}
		got := zz.tab.lookup(zz.loc, w)
		want := search(zz.loc, w)
		if got.kind != want.kind || !slices.Equal(instants(got, w), instants(want, w)) {
			t.Fatalf("%s wall %s: table %+v, search %+v", zz.loc, time.Unix(w, 0).UTC(), got, want)
		}
		if brute := bruteForce(zz.loc, w); !slices.Equal(instants(got, w), brute) {
			t.Fatalf("%s wall %s: table %+v, brute force %v", zz.loc, time.Unix(w, 0).UTC(), got, brute)
		}
		s, err := stamp.FromUnix(w, 0)
		if err != nil {
			t.Fatal(err)
		}
		s.HasOffset = false
		inst, _, note, err := zz.r.Resolve(s, "", 0, 0)
		switch ins := instants(got, w); {
		case len(ins) == 0:
			if !errors.Is(err, ErrNonexistent) {
				t.Fatalf("%s wall %s: Resolve %v, %v; want ErrNonexistent", zz.loc, s, inst, err)
			}
		case err != nil || inst.Unix() != ins[0] || (note == NoteAmbiguous) != (len(ins) > 1):
			t.Fatalf("%s wall %s: Resolve %v %q %v; want %v", zz.loc, s, inst, note, err, ins)
		}
	})
}

// Walls of 0001-01-01T00:00:00 and 9999-12-31T23:59:59.
const (
	stampMinWall = -62135596800
	stampMaxWall = 253402300799
)

// FuzzLoad: any name either loads or fails with ErrUnknownZone, without panicking.
func FuzzLoad(f *testing.F) {
	f.Fuzz(func(t *testing.T, name string) {
		loc, err := Load(name)
		if err != nil {
			if !errors.Is(err, ErrUnknownZone) {
				t.Fatalf("Load(%q): %v, want ErrUnknownZone", name, err)
			}
			return
		}
		if loc == nil {
			t.Fatalf("Load(%q) returned a nil zone", name)
		}
	})
}
