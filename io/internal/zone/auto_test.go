package zone

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"
	"time"

	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/paulmach/orb/maptile"
	"github.com/ringsaturn/tzf"
)

func autoResolver(t testing.TB) *Resolver {
	t.Helper()
	r, err := NewResolver(Options{Mode: Auto})
	if err != nil {
		t.Fatal(err)
	}
	if err := r.Prepare(); err != nil {
		t.Fatal(err)
	}
	return r
}

func TestAutoCities(t *testing.T) {
	r := autoResolver(t)
	// City-centre coordinates and the zones those cities keep: common practice.
	tests := []struct {
		city     string
		lat, lon float64
		zone     string
	}{
		{"New York", 40.7128, -74.0060, "America/New_York"},
		{"Chicago", 41.8781, -87.6298, "America/Chicago"},
		{"London", 51.5072, -0.1276, "Europe/London"},
		{"Sydney", -33.8688, 151.2093, "Australia/Sydney"},
		{"Lord Howe Island", -31.5553, 159.0821, "Australia/Lord_Howe"},
		{"Tokyo", 35.6895, 139.6917, "Asia/Tokyo"},
		{"Kolkata", 22.5726, 88.3639, "Asia/Kolkata"},
		{"São Paulo", -23.5505, -46.6333, "America/Sao_Paulo"},
		{"Nairobi", -1.2921, 36.8219, "Africa/Nairobi"},
	}
	for _, tc := range tests {
		t.Run(tc.city, func(t *testing.T) {
			for pass := 0; pass < 2; pass++ { // the second pass is served by the caches
				loc, err := r.Zone("", tc.lat, tc.lon)
				if err != nil || loc.String() != tc.zone {
					t.Fatalf("pass %d: Zone(%v, %v) = %v, %v; want %s", pass, tc.lat, tc.lon, loc, err, tc.zone)
				}
			}
		})
	}
	// A local time resolved at New York's coordinates follows New York's rules (see TestResolveRules).
	inst, dz, note, err := r.Resolve(wall(t, "2024-11-03 01:30"), "", 40.7128, -74.0060)
	if err != nil || !inst.Equal(utc("2024-11-03T05:30:00Z")) || note != NoteAmbiguous || dz.String() != "America/New_York" {
		t.Errorf("New York overlap: %v %v %q %v", inst, dz, note, err)
	}
	if _, _, _, err := r.Resolve(wall(t, "2024-03-10 02:30"), "", 40.7128, -74.0060); !errors.Is(err, ErrNonexistent) {
		t.Errorf("New York gap: %v", err)
	}
}

// TestAutoOceanAndPoles pins the documented behaviour of the bundled boundaries (tzf-rel-lite 2025b)
// away from land, so that a data upgrade that changes it is noticed.
func TestAutoOceanAndPoles(t *testing.T) {
	r := autoResolver(t)
	tests := []struct {
		name     string
		lat, lon float64
		zone     string
		offset   int // seconds east of UTC, in June 2024
	}{
		// Nautical zones: 15° wide, centred on multiples of 15°; POSIX sign, so Etc/GMT+10 is UTC−10.
		{"central Pacific", 0, -150, "Etc/GMT+10", -10 * 3600},
		{"mid Atlantic", 30, -30, "Etc/GMT+2", -2 * 3600},
		{"Indian Ocean", -30, 75, "Etc/GMT-5", 5 * 3600},
		{"date line east side", 0, -179.99, "Etc/GMT+12", -12 * 3600},
		{"date line west side", 0, 179.99, "Etc/GMT-12", 12 * 3600},
		{"North Pole", 90, 0, "Etc/GMT", 0},
		{"South Pole", -90, 0, "Antarctica/McMurdo", 12 * 3600},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			inst, dz, _, err := r.Resolve(wall(t, "2024-06-21 12:00"), "", tc.lat, tc.lon)
			if err != nil {
				t.Fatal(err)
			}
			if dz.String() != tc.zone {
				t.Errorf("zone %v, want %s", dz, tc.zone)
			}
			if want := time.Date(2024, 6, 21, 12, 0, 0, 0, time.UTC).Add(-time.Duration(tc.offset) * time.Second); !inst.Equal(want) {
				t.Errorf("instant %v, want %v", inst, want)
			}
		})
	}
}

func TestAutoInvalidCoordinates(t *testing.T) {
	r, _ := NewResolver(Options{Mode: Auto})
	s := wall(t, "2024-06-21 12:00")
	for _, c := range [][2]float64{{91, 0}, {-90.5, 0}, {0, 180.1}, {0, -200}, {math.NaN(), 0}, {0, math.Inf(1)}} {
		_, _, _, err := r.Resolve(s, "", c[0], c[1])
		if !errors.Is(err, ErrNoZoneFound) {
			t.Errorf("Resolve at %v: %v, want ErrNoZoneFound", c, err)
		}
	}
}

// TestAutoMatchesTzf checks the cached lookup against tzf's own DefaultFinder on random points
// worldwide and clustered near zone borders, each looked up twice (cold, then from the caches).
func TestAutoMatchesTzf(t *testing.T) {
	if raceEnabled {
		t.Skip("builds a second finder; too slow under -race (TestAutoConcurrent covers races)")
	}
	ref, err := tzf.NewDefaultFinder()
	if err != nil {
		t.Fatal(err)
	}
	r := autoResolver(t)
	rng := rand.New(rand.NewPCG(11, 12))
	type pt struct{ lat, lon float64 }
	var pts []pt
	for i := 0; i < 3000; i++ {
		pts = append(pts, pt{rng.Float64()*180 - 90, rng.Float64()*360 - 180})
	}
	// Small boxes around borders: Indiana/Kentucky/Ohio, the Arizona/Navajo Nation enclave,
	// Spain/Portugal, the Chinese/Afghan border, Lord Howe, the Swiss/Italian/French corner.
	boxes := [][4]float64{{38, 40, -87, -84}, {35, 37, -112, -109}, {38, 43, -9, -6}, {36.5, 38.5, 72, 75.5},
		{-31.7, -31.4, 158.9, 159.2}, {45.5, 46.5, 6.5, 8}}
	for _, b := range boxes {
		for i := 0; i < 1000; i++ {
			pts = append(pts, pt{b[0] + rng.Float64()*(b[1]-b[0]), b[2] + rng.Float64()*(b[3]-b[2])})
		}
	}
	// Points just inside and just outside the edges of preindexed tiles and of grid cells, where the
	// cell and tile caches must hand over exactly.
	f, err := sharedFinder()
	if err != nil {
		t.Fatal(err)
	}
	keys := make([]maptile.Tile, 0, len(f.tiles))
	for k := range f.tiles {
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(a, b maptile.Tile) int {
		return cmp.Or(cmp.Compare(a.Z, b.Z), cmp.Compare(a.X, b.X), cmp.Compare(a.Y, b.Y))
	})
	for i := 0; i < 400; i++ {
		b := keys[rng.IntN(len(keys))].Bound()
		for _, d := range []float64{-1e-9, -1e-12, 0, 1e-12, 1e-9} {
			pts = append(pts, pt{b.Min.Lat() + d, b.Min.Lon() + d}, pt{b.Max.Lat() + d, b.Max.Lon() + d},
				pt{b.Min.Lat() + d, b.Max.Lon() - d}, pt{b.Max.Lat() - d, b.Min.Lon() + d})
		}
	}
	for i := 0; i < 400; i++ {
		lat, lon := float64(rng.IntN(180*64)-90*64)/64, float64(rng.IntN(360*64)-180*64)/64
		for _, d := range []float64{-1e-12, 0, 1e-12} {
			pts = append(pts, pt{lat + d, lon + d})
		}
	}
	// A point in a sliver the simplified polygons leave uncovered (Sea of Azov), where the lookup falls
	// back to the points 0.02° around, as tzf does.
	sliver := pt{46.33188149734352, 37.66383149268768}
	if f.poly.GetTimezoneName(sliver.lon, sliver.lat) != "" {
		t.Errorf("the polygons now cover %v; pick another uncovered point to keep the fallback tested", sliver)
	}
	pts = append(pts, sliver)
	for pass := 0; pass < 2; pass++ {
		for _, p := range pts {
			if !validCoords(p.lat, p.lon) {
				continue
			}
			loc, err := r.Zone("", p.lat, p.lon)
			want := ref.GetTimezoneName(p.lon, p.lat)
			if err != nil || loc.String() != want {
				t.Fatalf("pass %d: Zone(%v, %v) = %v, %v; tzf says %q", pass, p.lat, p.lon, loc, err, want)
			}
		}
	}
}

// TestAutoConcurrent shares one Auto resolver among goroutines (run with -race).
func TestAutoConcurrent(t *testing.T) {
	r := autoResolver(t)
	s := wall(t, "2024-06-21 12:00")
	var wg sync.WaitGroup
	for g := 0; g < 4; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			rng := rand.New(rand.NewPCG(uint64(g), 99))
			for i := 0; i < 300; i++ {
				lat, lon := 38+rng.Float64()*2, -87+rng.Float64()*2 // Indiana and Kentucky: many zones and borders
				if _, dz, _, err := r.Resolve(s, "", lat, lon); err != nil || dz == nil {
					t.Errorf("Resolve(%v, %v): %v %v", lat, lon, dz, err)
					return
				}
			}
		}()
	}
	wg.Wait()
}

func TestAutoNoAllocs(t *testing.T) {
	if raceEnabled {
		t.Skip("allocation counts differ under -race")
	}
	r := autoResolver(t)
	s := wall(t, "2024-06-21 12:00")
	_, _, _, _ = r.Resolve(s, "", 40.7128, -74.0060)
	if n := testing.AllocsPerRun(100, func() { _, _, _, _ = r.Resolve(s, "", 40.7128, -74.0060) }); n != 0 {
		t.Errorf("%v allocations per cached Auto Resolve, want 0", n)
	}
	// A different point in the same map cell is served by the cell cache.
	_, _, _, _ = r.Resolve(s, "", 40.71281, -74.00601)
	if n := testing.AllocsPerRun(100, func() { _, _, _, _ = r.Resolve(s, "", 40.71282, -74.00602) }); n != 0 {
		t.Errorf("%v allocations per Auto Resolve in a cached cell, want 0", n)
	}
}

func ExampleResolver_Resolve_auto() {
	r, _ := NewResolver(Options{Mode: Auto})
	parser, _ := stamp.NewParser(stamp.Options{})
	p, _ := parser.Parse("2024-06-21 12:00")
	for _, c := range []struct{ lat, lon float64 }{{51.5072, -0.1276}, {-31.5553, 159.0821}, {0, -150}} {
		instant, dateZone, _, err := r.Resolve(p, "", c.lat, c.lon)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Println(dateZone, instant.Format(time.RFC3339))
	}
	// Output:
	// Europe/London 2024-06-21T11:00:00Z
	// Australia/Lord_Howe 2024-06-21T01:30:00Z
	// Etc/GMT+10 2024-06-21T22:00:00Z
}
