package solar

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"testing"
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
// iterations as a pipeline worker reuses it across batches. It reports rows per second of wall-clock time
// and rows per second of the thread's CPU time (rows/cpu_s; see threadCPU), which depends much less on
// other jobs sharing the machine:
//   - crash: every row its own place and date (65536 rows, far more than the Day cache holds, so nearly
//     every row is computed; the hit ratio is reported);
//   - camera: 40 places over a year (14,640 place-dates), 2^20 rows in time order and shuffled, on a new
//     kernel per iteration ("cold": every place-date computed at least once per iteration, the kernel's
//     grid built) and on a reused kernel ("warm").
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
		runtime.LockOSThread()
		defer runtime.UnlockOSThread()
		b.ReportAllocs()
		cpu := threadCPU()
		for b.Loop() {
			if fresh {
				k = NewKernel(Options{})
			}
			for i := range r.start {
				sink += k.Day(r.start[i], r.end[i], r.lat[i], r.lon[i]).Rise
			}
		}
		cpu = threadCPU() - cpu
		n := len(r.start)
		b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		b.ReportMetric(float64(n*b.N)/cpu, "rows/cpu_s")
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
		for _, fresh := range []bool{true, false} {
			cache := "warm"
			if fresh {
				cache = "cold"
			}
			b.Run(fmt.Sprintf("camera/%s/%s/n=%d", order, cache, 1<<20), func(b *testing.B) {
				run(b, cameraRows(1<<20, shuffled), fresh)
			})
		}
	}
}

// BenchmarkDayCompare times, in the same loop and on one kernel, the position-only batch path
// (Kernel.Positions on 65536 random rows of one year, the workload of BenchmarkKernel/n=65536), Kernel.Day
// on 65536 crash-like rows and on 2^20 camera-trap-like rows (time-ordered, warm cache), and the reference
// path (Events) on a rotating 1/256 of the crash rows. It reports each rate per second of the thread's
// CPU time (see threadCPU) and the ratios of the Day rates to the position-only rate, all measured in one
// run; ratios change little with the load of a shared machine.
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
	day(crash) // the kernel's grid grows to the rows' ten years
	day(camera)
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	var cPos, cCrash, cCamera, cRef float64
	var refRows int
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		c0 := threadCPU()
		k.Positions(unix, lat, lon, &out)
		c1 := threadCPU()
		day(crash)
		c2 := threadCPU()
		day(camera)
		c3 := threadCPU()
		for j := i % 256; j < len(crash.start); j += 256 {
			d, _ := Events(crash.start[j], crash.end[j], crash.lat[j], crash.lon[j], Options{})
			sink += d.Rise
			refRows++
		}
		c4 := threadCPU()
		cPos, cCrash, cCamera, cRef = cPos+c1-c0, cCrash+c2-c1, cCamera+c3-c2, cRef+c4-c3
	}
	pos := float64(len(unix)*b.N) / cPos
	crashRate := float64(len(crash.start)*b.N) / cCrash
	cameraRate := float64(len(camera.start)*b.N) / cCamera
	refRate := float64(refRows) / cRef
	b.ReportMetric(pos, "positions_rows/cpu_s")
	b.ReportMetric(crashRate, "day_crash_rows/cpu_s")
	b.ReportMetric(cameraRate, "day_camera_rows/cpu_s")
	b.ReportMetric(refRate, "events_reference_rows/cpu_s")
	b.ReportMetric(crashRate/pos, "crash/positions")
	b.ReportMetric(cameraRate/pos, "camera/positions")
	b.ReportMetric(crashRate/refRate, "crash/reference")
	_ = sink
}
