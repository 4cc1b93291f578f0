package zone

import (
	"github.com/heliotag/heliotag/internal/benchclock"
	"math/rand/v2"
	"runtime"
	"testing"
	"time"

	"github.com/heliotag/heliotag/io/internal/stamp"
	"github.com/ringsaturn/tzf"
)

// rowsPerOp is how many stamps one benchmark op resolves; rates are rows per second.
const rowsPerOp = 1024

// localStamps returns n offset-less stamps spread over 2024 (random minutes), so every benchmark row
// needs a real lookup.
func localStamps(n int) []stamp.Stamp {
	rng := rand.New(rand.NewPCG(1, 1))
	out := make([]stamp.Stamp, n)
	for i := range out {
		s, _ := stamp.FromUnix(1704067200+rng.Int64N(366*86400)/60*60, 0)
		s.HasOffset = false
		out[i] = s
	}
	return out
}

func report(b *testing.B) {
	b.ReportMetric(float64(rowsPerOp*b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkResolve measures Resolve per mode over 1024 rows per op, beside time.Date (the standard
// library's wall-clock conversion, which does not detect gaps or overlaps) as a baseline.
func BenchmarkResolve(b *testing.B) {
	stamps := localStamps(rowsPerOp)
	withOffset := make([]stamp.Stamp, rowsPerOp)
	for i, s := range stamps {
		s.HasOffset, s.Offset = true, 3600*(i%5-2)
		withOffset[i] = s
	}
	fix, _ := NewResolver(Options{Mode: Fixed, Name: "America/New_York"})
	none, _ := NewResolver(Options{})
	col, _ := NewResolver(Options{Mode: Column})
	names := []string{"America/New_York", "America/Chicago", "Europe/London", "Australia/Sydney"}

	b.Run("fixed", func(b *testing.B) {
		b.ReportAllocs()
		cpu := benchclock.Start()
		for b.Loop() {
			for _, s := range stamps {
				_, _, _, _ = fix.Resolve(s, "", 0, 0)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
	b.Run("fixed_with_offset", func(b *testing.B) {
		b.ReportAllocs()
		cpu := benchclock.Start()
		for b.Loop() {
			for _, s := range withOffset {
				_, _, _, _ = fix.Resolve(s, "", 0, 0)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
	b.Run("none_with_offset", func(b *testing.B) {
		b.ReportAllocs()
		cpu := benchclock.Start()
		for b.Loop() {
			for _, s := range withOffset {
				_, _, _, _ = none.Resolve(s, "", 0, 0)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
	b.Run("column_4_zones", func(b *testing.B) {
		b.ReportAllocs()
		cpu := benchclock.Start()
		for b.Loop() {
			for i, s := range stamps {
				_, _, _, _ = col.Resolve(s, names[i&3], 0, 0)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
	b.Run("baseline_time.Date", func(b *testing.B) {
		loc, _ := time.LoadLocation("America/New_York")
		b.ReportAllocs()
		cpu := benchclock.Start()
		for b.Loop() {
			for _, s := range stamps {
				_ = time.Date(s.Year, s.Month, s.Day, s.Hour, s.Minute, s.Second, s.Nanosecond, loc).UTC()
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
}

// BenchmarkResolveAuto measures --tz auto: the same coordinates again (exact cache), distinct
// coordinates inside one region (map-cell cache), and distinct coordinates each needing a lookup,
// beside tzf's DefaultFinder on the same distinct points (no cache) as a baseline.
func BenchmarkResolveAuto(b *testing.B) {
	stamps := localStamps(rowsPerOp)
	rng := rand.New(rand.NewPCG(2, 2))
	type pt struct{ lat, lon float64 }
	region := make([]pt, rowsPerOp) // inland Iowa: one zone, a handful of map cells
	for i := range region {
		region[i] = pt{41.5 + rng.Float64()*0.2, -93.7 + rng.Float64()*0.2}
	}
	world := make([]pt, 64*rowsPerOp) // distinct points worldwide, cycled so each op sees new ones
	for i := range world {
		world[i] = pt{rng.Float64()*140 - 60, rng.Float64()*360 - 180}
	}
	r, _ := NewResolver(Options{Mode: Auto})
	if err := r.Prepare(); err != nil {
		b.Fatal(err)
	}
	b.Run("same_point", func(b *testing.B) {
		b.ReportAllocs()
		cpu := benchclock.Start()
		for b.Loop() {
			for _, s := range stamps {
				_, _, _, _ = r.Resolve(s, "", 40.7128, -74.0060)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
	b.Run("one_region", func(b *testing.B) {
		b.ReportAllocs()
		cpu := benchclock.Start()
		for b.Loop() {
			for i, s := range stamps {
				_, _, _, _ = r.Resolve(s, "", region[i].lat, region[i].lon)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
	b.Run("worldwide_distinct", func(b *testing.B) {
		b.ReportAllocs()
		k := 0
		cpu := benchclock.Start()
		for b.Loop() {
			for _, s := range stamps {
				p := world[k%len(world)]
				k++
				_, _, _, _ = r.Resolve(s, "", p.lat+float64(k/len(world))*1e-9, p.lon)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
	b.Run("baseline_tzf_DefaultFinder_worldwide", func(b *testing.B) {
		ref, err := tzf.NewDefaultFinder()
		if err != nil {
			b.Fatal(err)
		}
		b.ReportAllocs()
		k := 0
		cpu := benchclock.Start()
		for b.Loop() {
			for range stamps {
				p := world[k%len(world)]
				k++
				_ = ref.GetTimezoneName(p.lon, p.lat)
			}
		}
		cpu.Report(b, rowsPerOp)
		report(b)
	})
}

func BenchmarkBuildTable(b *testing.B) {
	for _, name := range []string{"America/New_York", "Australia/Lord_Howe", "Asia/Kolkata"} {
		loc, _ := time.LoadLocation(name)
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				buildTable(loc)
			}
		})
	}
}

// BenchmarkSearch measures the table-free path used for walls past 2100.
func BenchmarkSearch(b *testing.B) {
	loc, _ := time.LoadLocation("America/New_York")
	b.ReportAllocs()
	cpu := benchclock.Start()
	for b.Loop() {
		search(loc, 7000000000) // 2191
	}
	cpu.Report(b, 1)
}

// BenchmarkFinderBuild measures building the --tz auto finder (done once per process) and the heap it
// keeps. Run with -benchtime 1x.
func BenchmarkFinderBuild(b *testing.B) {
	var f *finder
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	for b.Loop() {
		var err error
		if f, err = newFinder(); err != nil {
			b.Fatal(err)
		}
	}
	runtime.GC()
	runtime.ReadMemStats(&after)
	runtime.KeepAlive(f)
	b.ReportMetric(float64(int64(after.HeapAlloc)-int64(before.HeapAlloc))/(1<<20), "heap-MiB")
}

// BenchmarkParseAndResolve is the per-row cost of time handling for a CSV of local times: parse the
// text, then resolve it in a fixed zone.
func BenchmarkParseAndResolve(b *testing.B) {
	stamps := localStamps(rowsPerOp)
	texts := make([]string, len(stamps))
	for i, s := range stamps {
		texts[i] = s.String()[:16] // 2024-03-10T02:30
	}
	p, _ := stamp.NewParser(stamp.Options{})
	r, _ := NewResolver(Options{Mode: Fixed, Name: "America/New_York"})
	b.ReportAllocs()
	cpu := benchclock.Start()
	for b.Loop() {
		for _, text := range texts {
			s, err := p.Parse(text)
			if err == nil {
				_, _, _, _ = r.Resolve(s, "", 0, 0)
			}
		}
	}
	cpu.Report(b, rowsPerOp)
	report(b)
}
