package solar

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

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

// BenchmarkKernel measures the batch path (altitude, azimuth and phase) on batches of random places and
// instants within one year, with one kernel reused across batches as a pipeline worker does.
func BenchmarkKernel(b *testing.B) {
	for _, n := range []int{1024, 65536} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			unix, lat, lon := benchRows(n)
			k := NewKernel(Options{})
			var out Positions
			k.Positions(unix, lat, lon, &out)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				k.Positions(unix, lat, lon, &out)
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}
