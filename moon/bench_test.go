package moon

import (
	"fmt"
	"math/rand/v2"
	"runtime"
	"testing"
	"time"

	"github.com/heliotag/heliotag/solar"
)

// yearUnix returns the Unix time of January 1 of a year, 00:00 UTC.
func yearUnix(year int) float64 {
	return float64(time.Date(year, time.January, 1, 0, 0, 0, 0, time.UTC).Unix())
}

// benchRows returns n rows of random places and instants within the year 2024.
func benchRows(n int) (unix, lat, lon []float64) {
	rng := rand.New(rand.NewPCG(7, 2024))
	lo, hi := yearUnix(2024), yearUnix(2025)
	unix, lat, lon = make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range unix {
		unix[i] = lo + rng.Float64()*(hi-lo)
		lat[i] = rng.Float64()*180 - 90
		lon[i] = rng.Float64()*360 - 180
	}
	return unix, lat, lon
}

// BenchmarkKernel measures the batch path (altitude, azimuth, illumination and phase) on batches of random
// places and instants within one year, with one kernel reused across batches as a pipeline worker does.
func BenchmarkKernel(b *testing.B) {
	for _, n := range []int{1024, 65536} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			unix, lat, lon := benchRows(n)
			k := NewKernel(Options{})
			var out Positions
			k.Positions(unix, lat, lon, &out)
			b.ReportAllocs()
			for b.Loop() {
				k.Positions(unix, lat, lon, &out)
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}

// BenchmarkKernelCold measures the batch path with a new kernel for every batch of 64k rows within one year:
// the cost of filling the caches (about 8800 reference evaluations) is included.
func BenchmarkKernelCold(b *testing.B) {
	const n = 65536
	unix, lat, lon := benchRows(n)
	var out Positions
	b.ReportAllocs()
	for b.Loop() {
		NewKernel(Options{}).Positions(unix, lat, lon, &out)
	}
	b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
}

// BenchmarkKernelSpread measures the batch path on rows whose instants spread over 15 years, held by the
// grown caches of a warm kernel, and on rows spread over 1900–2100, thinner than the grid, whose instants move
// by 3 days before every batch so that most rows need a new cell, computed from its nodes.
func BenchmarkKernelSpread(b *testing.B) {
	for _, c := range []struct {
		name     string
		n        int
		from, to int
		shift    float64
	}{
		{"15y/n=65536", 65536, 2010, 2025, 0},
		{"1900-2100/n=4096", 4096, 1900, 2100, 3 * 86400},
	} {
		b.Run(c.name, func(b *testing.B) {
			unix, lat, lon := benchRows(c.n)
			rng := rand.New(rand.NewPCG(8, 8))
			lo, hi := yearUnix(c.from), yearUnix(c.to)
			for i := range unix {
				unix[i] = lo + rng.Float64()*(hi-lo)
			}
			k := NewKernel(Options{})
			var out Positions
			for range 3 { // let the caches grow and fill
				k.Positions(unix, lat, lon, &out)
			}
			b.ReportAllocs()
			for b.Loop() {
				for i := range unix {
					unix[i] += c.shift
				}
				k.Positions(unix, lat, lon, &out)
			}
			b.ReportMetric(float64(c.n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}

// BenchmarkPosition measures the reference path for one row.
func BenchmarkPosition(b *testing.B) {
	unix, lat, lon := benchRows(1024)
	var sink float64
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		p, _ := Position(unix[i&1023], lat[i&1023], lon[i&1023], Options{})
		sink += p.Altitude
		i++
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "rows/s")
	_ = sink
}

// BenchmarkVersusSun runs, over the same 64k rows of random places and instants within one year, the
// Moon's batch path (altitude, azimuth, illumination, phase) and the sun's (solar.Kernel: altitude, azimuth,
// light phase), both with warm kernels, alternating within each iteration so that both see the same machine
// load. It reports both rates and the Moon's rate as a fraction of the sun's, all measured in the same run:
// by the wall clock (rows/s) and, on Linux, by the CPU time of the benchmark's thread (rows/cpu-s, the rate
// per core that other work on the machine does not dilute).
func BenchmarkVersusSun(b *testing.B) {
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	const n = 65536
	unix, lat, lon := benchRows(n)
	mk, sk := NewKernel(Options{}), solar.NewKernel(solar.Options{})
	var mout Positions
	var sout solar.Positions
	mk.Positions(unix, lat, lon, &mout)
	sk.Positions(unix, lat, lon, &sout)
	var moonTime, sunTime time.Duration
	var moonCPU, sunCPU float64
	b.ReportAllocs()
	for b.Loop() {
		t0, c0 := time.Now(), threadCPU()
		mk.Positions(unix, lat, lon, &mout)
		t1, c1 := time.Now(), threadCPU()
		sk.Positions(unix, lat, lon, &sout)
		t2, c2 := time.Now(), threadCPU()
		moonTime, sunTime = moonTime+t1.Sub(t0), sunTime+t2.Sub(t1)
		moonCPU, sunCPU = moonCPU+c1-c0, sunCPU+c2-c1
	}
	rows := float64(n * b.N)
	b.ReportMetric(rows/moonTime.Seconds(), "moon_rows/s")
	b.ReportMetric(rows/sunTime.Seconds(), "sun_rows/s")
	b.ReportMetric(sunTime.Seconds()/moonTime.Seconds(), "moon/sun")
	if moonCPU > 0 && sunCPU > 0 {
		b.ReportMetric(rows/moonCPU, "moon_rows/cpu-s")
		b.ReportMetric(rows/sunCPU, "sun_rows/cpu-s")
		b.ReportMetric(sunCPU/moonCPU, "moon/sun_cpu")
	}
}
