package solar

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"
)

// meanSolarWindow returns the day window of the date containing instant t at the mean solar time of
// longitude lon (UTC + lon/15 h): the window PRODUCT.md gives rows without a zone.
func meanSolarWindow(t, lon float64) (start, end float64) {
	shift := lon * 240 // seconds
	start = math.Floor((t+shift)/secondsPerDay)*secondsPerDay - shift
	return start, start + secondsPerDay
}

// dayRows holds the inputs of Kernel.Day for a batch of rows.
type dayRows struct {
	start, end, lat, lon []float64
}

func (r *dayRows) add(t, lat, lon float64) {
	s, e := meanSolarWindow(t, lon)
	r.start, r.end = append(r.start, s), append(r.end, e)
	r.lat, r.lon = append(r.lat, lat), append(r.lon, lon)
}

// crashRows returns n rows that each have their own place, in a mid-latitude box (25°–50° N,
// 125°–65° W), at random instants over the ten years 2015–2024: road-crash-like data.
func crashRows(n int, seed uint64) dayRows {
	rng := rand.New(rand.NewPCG(seed, 10))
	lo, hi := yearUnix(2015), yearUnix(2025)
	var r dayRows
	for range n {
		r.add(lo+rng.Float64()*(hi-lo), 25+rng.Float64()*25, -125+rng.Float64()*60)
	}
	return r
}

// cameraRows returns n rows from 40 places (camera traps in a 2° box around 1° S, 36° E) at random instants
// within 2024, in time order as detections are usually listed; shuffled puts them in random order.
func cameraRows(n int, shuffled bool) dayRows {
	rng := rand.New(rand.NewPCG(40, 2024))
	var lat, lon [40]float64
	for i := range lat {
		lat[i], lon[i] = -2+rng.Float64()*2, 35+rng.Float64()*2
	}
	lo, hi := yearUnix(2024), yearUnix(2025)
	ts := make([]float64, n)
	for i := range ts {
		ts[i] = lo + rng.Float64()*(hi-lo)
	}
	if !shuffled {
		slices.Sort(ts)
	}
	var r dayRows
	for _, t := range ts {
		c := rng.IntN(40)
		r.add(t, lat[c], lon[c])
	}
	return r
}

// BenchmarkDay measures Kernel.Day, one call per row computing every event, with a kernel reused across
// iterations as a pipeline worker reuses it across batches:
//   - crash: every row its own place and date (65536 rows, far more than the Day cache holds, so nearly
//     every row is computed; the hit ratio is reported);
//   - camera: 40 places over a year (14,640 place-dates), in time order and shuffled, on a new kernel per
//     iteration over 2^20 rows ("cold", every place-date computed once per iteration) and on a reused
//     kernel ("warm").
//
// Run it with BenchmarkKernel for the position-only rate of the same run; BenchmarkDayCompare measures the
// ratio within one benchmark.
func BenchmarkDay(b *testing.B) {
	run := func(b *testing.B, r dayRows, fresh bool) {
		k := NewKernel(Options{})
		var sink float64
		for i := range r.start {
			sink += k.Day(r.start[i], r.end[i], r.lat[i], r.lon[i]).Rise
		}
		k.days.misses, k.days.lookups = 0, 0
		b.ReportAllocs()
		for b.Loop() {
			if fresh {
				k = NewKernel(Options{})
			}
			for i := range r.start {
				sink += k.Day(r.start[i], r.end[i], r.lat[i], r.lon[i]).Rise
			}
		}
		n := len(r.start)
		b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		if !fresh {
			b.ReportMetric(1-float64(k.days.misses)/float64(k.days.lookups), "hit_ratio")
		}
		_ = sink
	}
	b.Run("crash/n=65536", func(b *testing.B) { run(b, crashRows(65536, 1), false) })
	for _, shuffled := range []bool{false, true} {
		order := "time-ordered"
		if shuffled {
			order = "shuffled"
		}
		r := cameraRows(1<<20, shuffled)
		b.Run(fmt.Sprintf("camera/%s/cold/n=%d", order, len(r.start)), func(b *testing.B) { run(b, r, true) })
		b.Run(fmt.Sprintf("camera/%s/warm/n=%d", order, len(r.start)), func(b *testing.B) { run(b, r, false) })
	}
}

// BenchmarkDayCompare times, in the same loop over the same kernel, the position-only batch path
// (Kernel.Positions on 65536 random rows of one year, as BenchmarkKernel) and Kernel.Day on 65536
// crash-like rows and on 2^20 camera-trap-like rows (time-ordered, warm cache), and on a sixteenth of the
// crash rows the reference path (Events). It reports each rate and the ratios of the Day rates to the
// position-only rate, all measured in one run on a shared machine.
func BenchmarkDayCompare(b *testing.B) {
	unix, lat, lon := benchRows(65536)
	crash := crashRows(65536, 2)
	camera := cameraRows(1<<20, false)
	k := NewKernel(Options{})
	var out Positions
	k.Positions(unix, lat, lon, &out)
	var sink float64
	day := func(r dayRows) {
		for i := range r.start {
			sink += k.Day(r.start[i], r.end[i], r.lat[i], r.lon[i]).Set
		}
	}
	day(crash)
	day(camera)
	var tPos, tCrash, tCamera, tRef time.Duration
	var refRows int
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		t0 := time.Now()
		k.Positions(unix, lat, lon, &out)
		t1 := time.Now()
		day(crash)
		t2 := time.Now()
		day(camera)
		t3 := time.Now()
		for j := i % 16; j < len(crash.start); j += 16 * 16 {
			d, _ := Events(crash.start[j], crash.end[j], crash.lat[j], crash.lon[j], Options{})
			sink += d.Rise
			refRows++
		}
		t4 := time.Now()
		tPos, tCrash, tCamera, tRef = tPos+t1.Sub(t0), tCrash+t2.Sub(t1), tCamera+t3.Sub(t2), tRef+t4.Sub(t3)
	}
	pos := float64(len(unix)*b.N) / tPos.Seconds()
	crashRate := float64(len(crash.start)*b.N) / tCrash.Seconds()
	cameraRate := float64(len(camera.start)*b.N) / tCamera.Seconds()
	refRate := float64(refRows) / tRef.Seconds()
	b.ReportMetric(pos, "positions_rows/s")
	b.ReportMetric(crashRate, "day_crash_rows/s")
	b.ReportMetric(cameraRate, "day_camera_rows/s")
	b.ReportMetric(refRate, "events_reference_rows/s")
	b.ReportMetric(crashRate/pos, "crash/positions")
	b.ReportMetric(cameraRate/pos, "camera/positions")
	b.ReportMetric(crashRate/refRate, "crash/reference")
	_ = sink
}
