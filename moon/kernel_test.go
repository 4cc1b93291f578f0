package moon

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"github.com/heliotag/heliotag/solar"
)

// rows is a set of kernel inputs.
type rows struct {
	unix, lat, lon []float64
}

func (r *rows) add(unix, lat, lon float64) {
	r.unix, r.lat, r.lon = append(r.unix, unix), append(r.lat, lat), append(r.lon, lon)
}

// randomLat returns a latitude in [-90, 90], now and then exactly a pole or the equator.
func randomLat(rng *rand.Rand) float64 {
	switch rng.IntN(100) {
	case 0:
		return 90
	case 1:
		return -90
	case 2:
		return 0
	}
	return rng.Float64()*180 - 90
}

// clusteredBatch returns n rows starting at a random instant in [lo, hi), each a random 0–10 minutes after
// the previous one, at random places.
func clusteredBatch(rng *rand.Rand, n int, lo, hi float64) rows {
	var r rows
	t := lo + rng.Float64()*(hi-lo)
	for range n {
		r.add(t, randomLat(rng), rng.Float64()*360-180)
		t += rng.Float64() * 600
	}
	return r
}

// spreadBatch returns n rows at random instants in [lo, hi) and random places.
func spreadBatch(rng *rand.Rand, n int, lo, hi float64) rows {
	var r rows
	for range n {
		r.add(lo+rng.Float64()*(hi-lo), randomLat(rng), rng.Float64()*360-180)
	}
	return r
}

// nearPhaseBoundary reports whether an elongation is within 1e-6° of a boundary of PhaseOf's windows.
func nearPhaseBoundary(e float64) bool {
	for q := 0.0; q <= 360; q += 90 {
		if math.Abs(math.Abs(e-q)-QuarterWindow) < 1e-6 {
			return true
		}
	}
	return false
}

// diffs accumulates the largest differences between the batch path and the reference.
type diffs struct {
	alt, az, arc, illum float64
	phase               int // rows whose phase differs (elongation not at a window boundary)
	n                   int
}

// compare adds the differences of row i of out from the reference p. The azimuth difference is taken as an
// angle (az, skipped within 0.1° of the zenith, where azimuth is undefined) and as the arc it spans on the
// Moon's circle of altitude (arc = Δazimuth·cos(altitude), everywhere). Altitude is skipped within 1e-5° of
// the refraction cutoff, where the refraction steps by about 0.6°.
func (d *diffs) compare(p Pos, out *Positions, i int) {
	d.n++
	if math.Abs(p.GeometricAltitude-solar.RefractionCutoff) > 1e-5 {
		d.alt = math.Max(d.alt, math.Abs(out.Altitude[i]-p.Altitude))
	}
	daz := math.Abs(wrap180(out.Azimuth[i] - p.Azimuth))
	if p.GeometricAltitude < 89.9 {
		d.az = math.Max(d.az, daz)
	}
	d.arc = math.Max(d.arc, daz*math.Cos(p.GeometricAltitude*deg))
	d.illum = math.Max(d.illum, math.Abs(out.Illumination[i]-p.Illumination))
	if out.Phase[i] != p.Phase && !nearPhaseBoundary(p.Elongation) {
		d.phase++
	}
	if !(out.Azimuth[i] >= 0 && out.Azimuth[i] < 360) {
		d.az = math.Inf(1)
	}
}

// The accuracy the batch path keeps against Position in the tests, degrees: the package promises 0.001° in
// altitude and azimuth (maxAngle); the tests hold altitude and the azimuth's arc to a hundredth of that
// (maxArc). The reference itself is only good to about 2e-7° there: a float64 Julian day resolves 40 µs, 2e-7°
// of the Earth's rotation.
const (
	maxAngle = 1e-3
	maxArc   = 1e-5
)

func (d *diffs) check(t *testing.T) {
	t.Helper()
	t.Logf("%d rows: largest differences altitude %.2g°, azimuth %.2g° (arc %.2g°), illumination %.2g; "+
		"%d phase words differ", d.n, d.alt, d.az, d.arc, d.illum, d.phase)
	if d.alt > maxArc || d.arc > maxArc || d.az > maxAngle || d.illum > 1e-7 || d.phase > 0 {
		t.Errorf("want altitude and azimuth arc within %g°, azimuth within %g°, illumination within 1e-7, "+
			"no phase word different", maxArc, maxAngle)
	}
}

// TestKernelAccuracy compares the batch path with Position on 100,000 rows of 1900–2100 at every latitude, in
// 100 batches of 1000 handled by one kernel: 90 batches of instants a few minutes apart, each at a random
// date, and 10 batches of instants spread over the two centuries.
func TestKernelAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 1))
	lo, hi := yearUnix(1900), yearUnix(2100)
	batches, clustered := 100, 90
	if testing.Short() || raceEnabled {
		batches, clustered = 20, 18
	}
	k := NewKernel(Options{})
	var out Positions
	var d diffs
	for b := range batches {
		var r rows
		if b < clustered {
			r = clusteredBatch(rng, 1000, lo, hi)
		} else {
			r = spreadBatch(rng, 1000, lo, hi)
		}
		k.Positions(r.unix, r.lat, r.lon, &out)
		for i := range r.unix {
			p, err := Position(r.unix[i], r.lat[i], r.lon[i], Options{})
			if err != nil {
				t.Fatal(err)
			}
			d.compare(p, &out, i)
		}
	}
	d.check(t)
}

// TestKernelOptions compares the batch path with Position under each option.
func TestKernelOptions(t *testing.T) {
	temp, cold, zero, big := 30.0, -20.0, 0.0, 300.0
	for _, c := range []struct {
		name string
		o    Options
	}{
		{"defaults", Options{}},
		{"no refraction", Options{NoRefraction: true}},
		{"hot, low pressure", Options{Pressure: 700, Temperature: &temp}},
		{"cold, high pressure", Options{Pressure: 1050, Temperature: &cold}},
		{"elevation 4000 m", Options{Elevation: 4000}},
		{"elevation -400 m", Options{Elevation: -400}},
		{"ΔT 0 s", Options{DeltaT: &zero}},
		{"ΔT 300 s", Options{DeltaT: &big}},
	} {
		t.Run(c.name, func(t *testing.T) {
			rng := rand.New(rand.NewPCG(9, 2))
			n := 2000
			if raceEnabled {
				n = 400
			}
			r := clusteredBatch(rng, n, yearUnix(1950), yearUnix(2050))
			s := spreadBatch(rng, n/10, yearUnix(1950), yearUnix(2050))
			r.unix, r.lat, r.lon = append(r.unix, s.unix...), append(r.lat, s.lat...), append(r.lon, s.lon...)
			var out Positions
			NewKernel(c.o).Positions(r.unix, r.lat, r.lon, &out)
			var d diffs
			for i := range r.unix {
				p, err := Position(r.unix[i], r.lat[i], r.lon[i], c.o)
				if err != nil {
					t.Fatal(err)
				}
				d.compare(p, &out, i)
			}
			d.check(t)
		})
	}
}

// sameBits reports whether two float64 slices are identical bit for bit (NaN included).
func sameBits(a, b []float64) bool {
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return len(a) == len(b)
}

// TestKernelBatchIndependence checks that a row's result does not depend on the rows around it, their order,
// the batch sizes or what the kernel computed before: the same rows computed in one batch by a new kernel,
// one at a time by another, shuffled into random batches by a kernel that has first worked on other decades
// (so its caches have grown and been refilled), give the same bits.
func TestKernelBatchIndependence(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 3))
	var r rows
	for _, b := range []rows{
		clusteredBatch(rng, 500, yearUnix(2020), yearUnix(2021)),
		spreadBatch(rng, 300, yearUnix(1900), yearUnix(2100)),
		clusteredBatch(rng, 200, yearUnix(1960), yearUnix(1961)),
	} {
		r.unix, r.lat, r.lon = append(r.unix, b.unix...), append(r.lat, b.lat...), append(r.lon, b.lon...)
	}
	r.add(math.NaN(), 0, 0) // an invalid row among them
	n := len(r.unix)

	var whole Positions
	NewKernel(Options{}).Positions(r.unix, r.lat, r.lon, &whole)

	single := Positions{make([]float64, n), make([]float64, n), make([]float64, n), make([]Phase, n)}
	k := NewKernel(Options{})
	var one Positions
	for i := range r.unix {
		k.Positions(r.unix[i:i+1], r.lat[i:i+1], r.lon[i:i+1], &one)
		single.Altitude[i], single.Azimuth[i] = one.Altitude[0], one.Azimuth[0]
		single.Illumination[i], single.Phase[i] = one.Illumination[0], one.Phase[0]
	}

	// A kernel that has worked on 3000 rows spread over 1800–2200 first (enough to make its caches grow),
	// then gets the rows shuffled in batches of random sizes.
	k = NewKernel(Options{})
	other := spreadBatch(rng, 3000, yearUnix(1800), yearUnix(2200))
	k.Positions(other.unix, other.lat, other.lon, &one)
	if len(k.cells) == minCellSlots {
		t.Fatal("the caches did not grow")
	}
	perm := rng.Perm(n)
	shuffled := Positions{make([]float64, n), make([]float64, n), make([]float64, n), make([]Phase, n)}
	for lo := 0; lo < n; {
		hi := min(n, lo+1+rng.IntN(300))
		var b rows
		for _, j := range perm[lo:hi] {
			b.add(r.unix[j], r.lat[j], r.lon[j])
		}
		k.Positions(b.unix, b.lat, b.lon, &one)
		for i, j := range perm[lo:hi] {
			shuffled.Altitude[j], shuffled.Azimuth[j] = one.Altitude[i], one.Azimuth[i]
			shuffled.Illumination[j], shuffled.Phase[j] = one.Illumination[i], one.Phase[i]
		}
		lo = hi
	}

	for _, c := range []struct {
		name string
		p    *Positions
	}{{"one row at a time", &single}, {"shuffled batches, warm kernel", &shuffled}} {
		if !sameBits(c.p.Altitude, whole.Altitude) || !sameBits(c.p.Azimuth, whole.Azimuth) ||
			!sameBits(c.p.Illumination, whole.Illumination) || !slices.Equal(c.p.Phase, whole.Phase) {
			t.Errorf("%s: results differ from one batch on a new kernel", c.name)
		}
	}
}

// TestKernelInvalidRows checks that rows failing solar.Check get NaN and PhaseUnknown, that the rows around
// them are computed as if alone, and that invalid options give NaN for every row.
func TestKernelInvalidRows(t *testing.T) {
	good := yearUnix(2024)
	bad := []struct {
		name           string
		unix, lat, lon float64
		cause          error
	}{
		{"NaN instant", math.NaN(), 10, 10, solar.ErrNotFinite},
		{"infinite instant", math.Inf(1), 10, 10, solar.ErrNotFinite},
		{"instant before -2000", solar.MinUnix - 1, 10, 10, solar.ErrTimeRange},
		{"instant after 6000", solar.MaxUnix, 10, 10, solar.ErrTimeRange},
		{"latitude 91.2", good, 91.2, 10, solar.ErrLatitude},
		{"latitude NaN", good, math.NaN(), 10, solar.ErrNotFinite},
		{"longitude -180.5", good, 10, -180.5, solar.ErrLongitude},
		{"longitude +Inf", good, 10, math.Inf(1), solar.ErrNotFinite},
	}
	var r rows
	for i, b := range bad {
		r.add(good+float64(i)*3600, 45, 7) // a valid row before each invalid one
		r.add(b.unix, b.lat, b.lon)
		if _, err := Position(b.unix, b.lat, b.lon, Options{}); !errors.Is(err, b.cause) {
			t.Errorf("%s: Position error %v, want one wrapping %v", b.name, err, b.cause)
		}
	}
	var out Positions
	NewKernel(Options{}).Positions(r.unix, r.lat, r.lon, &out)
	for i := range r.unix {
		if i%2 == 1 {
			if !math.IsNaN(out.Altitude[i]) || !math.IsNaN(out.Azimuth[i]) || !math.IsNaN(out.Illumination[i]) ||
				out.Phase[i] != PhaseUnknown {
				t.Errorf("%s: got %v %v %v %v, want NaN NaN NaN PhaseUnknown", bad[i/2].name, out.Altitude[i],
					out.Azimuth[i], out.Illumination[i], out.Phase[i])
			}
			continue
		}
		var alone Positions
		NewKernel(Options{}).Positions(r.unix[i:i+1], r.lat[i:i+1], r.lon[i:i+1], &alone)
		if out.Altitude[i] != alone.Altitude[0] || out.Azimuth[i] != alone.Azimuth[0] ||
			out.Illumination[i] != alone.Illumination[0] || out.Phase[i] != alone.Phase[0] {
			t.Errorf("valid row %d differs from the same row computed alone", i)
		}
	}

	// Invalid options: every row NaN, and Position reports the option.
	o := Options{Pressure: -1}
	NewKernel(o).Positions(r.unix[:1], r.lat[:1], r.lon[:1], &out)
	if !math.IsNaN(out.Altitude[0]) || out.Phase[0] != PhaseUnknown {
		t.Errorf("invalid options: got %v %v, want NaN PhaseUnknown", out.Altitude[0], out.Phase[0])
	}
	if _, err := Position(good, 45, 7, o); !errors.Is(err, solar.ErrOption) {
		t.Errorf("invalid options: Position error %v, want one wrapping solar.ErrOption", err)
	}
}

// TestKernelReuse checks that a warm kernel with a reused Positions makes no allocation, that a shorter batch
// shrinks the slices and that short lat or lon slices panic.
func TestKernelReuse(t *testing.T) {
	r := clusteredBatch(rand.New(rand.NewPCG(9, 4)), 1000, yearUnix(2024), yearUnix(2025))
	k := NewKernel(Options{})
	var out Positions
	k.Positions(r.unix, r.lat, r.lon, &out)
	if a := testing.AllocsPerRun(5, func() { k.Positions(r.unix, r.lat, r.lon, &out) }); a != 0 {
		t.Errorf("warm kernel: %v allocations per call, want 0", a)
	}
	k.Positions(r.unix[:10], r.lat, r.lon, &out)
	if len(out.Altitude) != 10 || len(out.Azimuth) != 10 || len(out.Illumination) != 10 || len(out.Phase) != 10 {
		t.Errorf("lengths %d %d %d %d after a batch of 10, want 10", len(out.Altitude), len(out.Azimuth),
			len(out.Illumination), len(out.Phase))
	}
	defer func() {
		if recover() == nil {
			t.Error("no panic with lat shorter than unix")
		}
	}()
	k.Positions(r.unix, r.lat[:5], r.lon, &out)
}

// fmtUnix formats a Unix instant as RFC 3339 in UTC.
func fmtUnix(unix float64) string {
	return time.Unix(int64(math.Floor(unix)), 0).UTC().Format(time.RFC3339)
}
