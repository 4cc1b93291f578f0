package solar

import (
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/soniakeys/meeus/v3/coord"
	"github.com/soniakeys/meeus/v3/sidereal"
	meeussolar "github.com/soniakeys/meeus/v3/solar"
	"github.com/soniakeys/unit"
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
			for b.Loop() {
				k.Positions(unix, lat, lon, &out)
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}

// BenchmarkKernelCold measures the batch path with a new kernel for every batch: the cost of building the
// caches (about 370 reference evaluations for a year of instants) is included.
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

// BenchmarkKernelSpread measures the batch path on 64k rows whose instants spread over two centuries
// (1900–2100) and over the whole valid range (-2000…6000), in random order, with a kernel reused across
// batches: the worst cases for its caches.
func BenchmarkKernelSpread(b *testing.B) {
	for _, span := range []struct {
		name   string
		lo, hi float64
	}{
		{"1900-2100", yearUnix(1900), yearUnix(2100)},
		{"-2000-6000", MinUnix, MaxUnix - 1},
	} {
		b.Run(span.name, func(b *testing.B) {
			const n = 65536
			unix, lat, lon := benchRows(n)
			rng := rand.New(rand.NewPCG(8, 8))
			for i := range unix {
				unix[i] = span.lo + rng.Float64()*(span.hi-span.lo)
			}
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

// meeusRow computes altitude, azimuth and phase for one row with github.com/soniakeys/meeus/v3: chapter 25's
// apparent position of the sun, chapter 12's apparent sidereal time and chapter 13's equatorial-to-horizontal
// conversion (longitude positive west, azimuth from the south), then PhaseOf from the hour angle.
func meeusRow(unix, lat, lon float64) (alt, az float64, ph Phase) {
	jd := JulianDay(unix)
	ra, dec := meeussolar.ApparentEquatorial(jd + DeltaT(DecimalYear(unix))/86400)
	st := sidereal.Apparent(jd)
	psi := unit.AngleFromDeg(-lon)
	a, h := coord.EqToHz(ra, dec, unit.AngleFromDeg(lat), psi, st)
	hourAngle := (st.Rad() - psi.Rad() - ra.Rad()) * rad
	return h.Deg(), wrap360(a.Deg() + 180), PhaseOf(h.Deg(), hourAngle)
}

// BenchmarkCompare runs three computations of altitude, azimuth and phase over the same 64k rows of random
// places and instants within one year: the batch path (a warm kernel, as a pipeline worker has after its
// first batch), the reference path (Position and PhaseOf) and the meeus library chain. The slow paths run on
// a rotating sixteenth of the rows per iteration. It reports each path's rate and the batch path's speed-up
// over the other two, all measured in the same run.
func BenchmarkCompare(b *testing.B) {
	const n = 65536
	const sample = 16
	unix, lat, lon := benchRows(n)
	k := NewKernel(Options{})
	var out Positions
	k.Positions(unix, lat, lon, &out)
	var fast, ref, chain time.Duration
	var fastRows, slowRows int
	var sink float64
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		t0 := time.Now()
		k.Positions(unix, lat, lon, &out)
		t1 := time.Now()
		for j := i % sample; j < n; j += sample {
			p, _ := Position(unix[j], lat[j], lon[j], Options{})
			sink += p.Altitude + p.Azimuth + float64(PhaseOf(p.GeometricAltitude, p.HourAngle))
		}
		t2 := time.Now()
		for j := i % sample; j < n; j += sample {
			alt, az, ph := meeusRow(unix[j], lat[j], lon[j])
			sink += alt + az + float64(ph)
		}
		t3 := time.Now()
		fast, ref, chain = fast+t1.Sub(t0), ref+t2.Sub(t1), chain+t3.Sub(t2)
		fastRows += n
		slowRows += (n - i%sample + sample - 1) / sample
	}
	fastRate := float64(fastRows) / fast.Seconds()
	refRate := float64(slowRows) / ref.Seconds()
	chainRate := float64(slowRows) / chain.Seconds()
	b.ReportMetric(fastRate, "kernel_rows/s")
	b.ReportMetric(refRate, "reference_rows/s")
	b.ReportMetric(chainRate, "meeus_rows/s")
	b.ReportMetric(fastRate/refRate, "x_reference")
	b.ReportMetric(fastRate/chainRate, "x_meeus")
	_ = sink
}

// BenchmarkKernelStart measures what two pipeline workers pay to fill their caches: 262,144 rows of random
// places and instants over ten years (2014–2023, as the generated crash records), in batches of 8,192 rows
// handed to the two kernels in turn, with new kernels every iteration. "private" kernels compute every grid
// node each; "grid" kernels come from one Grid and compute each node once between them.
func BenchmarkKernelStart(b *testing.B) {
	const n, batch = 1 << 18, 8192
	unix, lat, lon := benchRows(n)
	rng := rand.New(rand.NewPCG(9, 9))
	lo, hi := yearUnix(2014), yearUnix(2024)
	for i := range unix {
		unix[i] = lo + rng.Float64()*(hi-lo)
	}
	for _, shared := range []bool{false, true} {
		name := "private"
		if shared {
			name = "grid"
		}
		b.Run(name, func(b *testing.B) {
			var out Positions
			b.ReportAllocs()
			for b.Loop() {
				var ks [2]*Kernel
				g := NewGrid(Options{})
				for j := range ks {
					if shared {
						ks[j] = g.NewKernel()
					} else {
						ks[j] = NewKernel(Options{})
					}
				}
				for at := 0; at < n; at += batch {
					ks[at/batch%2].Positions(unix[at:at+batch], lat[at:at+batch], lon[at:at+batch], &out)
				}
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(n*b.N), "ns/row")
		})
	}
}
