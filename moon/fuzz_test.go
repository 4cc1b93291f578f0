package moon

import (
	"math"
	"testing"

	"github.com/heliotag/heliotag/solar"
)

// deltaTSeam is the instant where the ΔT model of solar.DeltaT passes from Espenak's 2014 curve to the
// long-term parabola (decimal year 3000) and steps by about 150 s: the Moon moves about 0.02° in that time,
// and the batch path, which interpolates across the step, may differ from the reference by that much in the
// hours around it.
var deltaTSeam = (3000 - 1970) * 365.2425 * 86400

// FuzzKernel compares the batch path with Position for one row, and checks that the row's result does not
// change when it shares a batch with another row (spread seconds later, at another place). Normal test runs
// use the seed corpus only; run go test -fuzz FuzzKernel ./moon/ to explore.
func FuzzKernel(f *testing.F) {
	f.Add(1.7e9, 45.0, 7.0, 60.0)
	f.Add(0.0, 90.0, 180.0, 1e9)
	f.Add(-2.2e9, -90.0, -180.0, -3600.0)
	f.Add(solar.MinUnix, 0.0, 0.0, 1.0)
	f.Add(solar.MaxUnix-1, 66.5, -12.0, -1e11)
	f.Add(7.258e11/10, -33.9, 151.2, 0.5)
	f.Add(math.NaN(), 10.0, 10.0, 0.0)
	f.Add(1.7e9, 91.0, 0.0, 0.0)
	f.Add(1.7e9, 0.0, -181.0, 0.0)
	f.Add(deltaTSeam, 40.0, 40.0, 7200.0)
	f.Fuzz(func(t *testing.T, unix, lat, lon, spread float64) {
		k := NewKernel(Options{})
		var alone, pair Positions
		k.Positions([]float64{unix}, []float64{lat}, []float64{lon}, &alone)
		NewKernel(Options{}).Positions([]float64{unix + spread, unix}, []float64{lon / 2, lat},
			[]float64{lat, lon}, &pair)
		if math.Float64bits(alone.Altitude[0]) != math.Float64bits(pair.Altitude[1]) ||
			math.Float64bits(alone.Azimuth[0]) != math.Float64bits(pair.Azimuth[1]) ||
			math.Float64bits(alone.Illumination[0]) != math.Float64bits(pair.Illumination[1]) ||
			alone.Phase[0] != pair.Phase[1] {
			t.Fatalf("row differs with a neighbour: %v %v %v %v vs %v %v %v %v", alone.Altitude[0],
				alone.Azimuth[0], alone.Illumination[0], alone.Phase[0], pair.Altitude[1], pair.Azimuth[1],
				pair.Illumination[1], pair.Phase[1])
		}

		p, err := Position(unix, lat, lon, Options{})
		if err != nil {
			if !math.IsNaN(alone.Altitude[0]) || !math.IsNaN(alone.Azimuth[0]) ||
				!math.IsNaN(alone.Illumination[0]) || alone.Phase[0] != PhaseUnknown {
				t.Fatalf("invalid row (%v): got %v %v %v %v, want NaN and PhaseUnknown", err, alone.Altitude[0],
					alone.Azimuth[0], alone.Illumination[0], alone.Phase[0])
			}
			return
		}
		if math.Abs(unix-deltaTSeam) < 3*3600 {
			return
		}
		var d diffs
		d.compare(p, &alone, 0)
		if d.alt > maxAngle || d.arc > maxAngle || d.az > maxAngle || d.illum > 1e-6 || d.phase > 0 {
			t.Fatalf("unix %v lat %v lon %v: batch %v %v %v %v, reference %v %v %v %v", unix, lat, lon,
				alone.Altitude[0], alone.Azimuth[0], alone.Illumination[0], alone.Phase[0], p.Altitude, p.Azimuth,
				p.Illumination, p.Phase)
		}
	})
}
