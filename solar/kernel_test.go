package solar

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// yearUnix returns the Unix instant of 00:00 UTC on January 1 of year y.
func yearUnix(y int) float64 { return unixOf(y, 1, 1, 0, 0, 0, 0) }

// accuracyBatch builds one batch of rows of the given kind.
func accuracyBatch(rng *rand.Rand, kind string, n int) (unix, lat, lon []float64) {
	lo, hi := yearUnix(1900), yearUnix(2100)
	unix, lat, lon = make([]float64, n), make([]float64, n), make([]float64, n)
	base := lo + rng.Float64()*(hi-lo-400*86400)
	t := base
	plat, plon := rng.Float64()*180-90, rng.Float64()*360-180
	for i := range unix {
		switch kind {
		case "minutes apart": // consecutive rows 0–10 minutes apart
			t += rng.Float64() * 600
			unix[i] = t
		case "same place minutes apart": // one camera, rows minutes apart
			t += rng.Float64() * 600
			unix[i] = t
		case "within a day":
			unix[i] = base + rng.Float64()*86400
		case "within a year":
			unix[i] = base + rng.Float64()*365*86400
		case "spanning decades": // anywhere in 1900–2100
			unix[i] = lo + rng.Float64()*(hi-lo)
		default:
			panic(kind)
		}
		lat[i], lon[i] = rng.Float64()*180-90, rng.Float64()*360-180
		if kind == "same place minutes apart" {
			lat[i], lon[i] = plat, plon
		}
		switch rng.IntN(200) { // the edges of the valid ranges
		case 0:
			lat[i] = 90
		case 1:
			lat[i] = -90
		case 2:
			lat[i] = 0
		case 3:
			lon[i] = 180
		case 4:
			lon[i] = -180
		}
	}
	return unix, lat, lon
}

// TestKernelAccuracy sweeps 110,000 seeded random rows through the batch path and the reference path and
// requires them to agree within 0.0005° in altitude and azimuth (azimuth not compared within 0.5° of the
// zenith, where it is ill-defined) over the years 1900–2100 and every latitude, and the phases to agree
// except within 1e-6° of a threshold.
func TestKernelAccuracy(t *testing.T) {
	const tol = 0.0005
	rng := rand.New(rand.NewPCG(2, 20240621))
	kinds := []string{"minutes apart", "same place minutes apart", "within a day", "within a year", "spanning decades"}
	optionSets := []Options{
		{},
		{NoRefraction: true},
		{Elevation: 2500, Pressure: 750, Temperature: ptr(-15)},
		{DeltaT: ptr(69.2)},
	}
	kernels := make([]*Kernel, len(optionSets))
	for i, o := range optionSets {
		kernels[i] = NewKernel(o)
	}
	var out Positions
	var maxAlt, maxAz float64
	var rows, skipped int
	for b := 0; b < 22*len(kinds); b++ {
		kind := kinds[b%len(kinds)]
		oi := (b / len(kinds)) % len(optionSets)
		o := optionSets[oi]
		k := kernels[oi]
		if b%7 == 0 {
			k = NewKernel(o) // a cold kernel now and then
		}
		unix, lat, lon := accuracyBatch(rng, kind, 1000)
		k.Positions(unix, lat, lon, &out)
		for i := range unix {
			ref, err := Position(unix[i], lat[i], lon[i], o)
			if err != nil {
				t.Fatal(err)
			}
			rows++
			where := fmt.Sprintf("%s batch %d row %d (t=%s lat=%v lon=%v, options %+v)", kind, b, i,
				fmtInstant(unix[i]), lat[i], lon[i], o)
			if math.Abs(ref.GeometricAltitude-RefractionCutoff) < 1e-6 {
				skipped++ // refraction switches on here: a 1e-9° difference can flip it
				continue
			}
			dAlt := math.Abs(out.Altitude[i] - ref.Altitude)
			maxAlt = max(maxAlt, dAlt)
			if !(dAlt <= tol) {
				t.Errorf("%s: altitude %v, reference %v", where, out.Altitude[i], ref.Altitude)
			}
			if !(out.Azimuth[i] >= 0 && out.Azimuth[i] < 360) {
				t.Errorf("%s: azimuth %v outside [0, 360)", where, out.Azimuth[i])
			}
			if ref.GeometricAltitude < 89.5 {
				dAz := math.Abs(wrap180(out.Azimuth[i] - ref.Azimuth))
				maxAz = max(maxAz, dAz)
				if !(dAz <= tol) {
					t.Errorf("%s: azimuth %v, reference %v", where, out.Azimuth[i], ref.Azimuth)
				}
			}
			if want := PhaseOf(ref.GeometricAltitude, ref.HourAngle); out.Phase[i] != want && !nearPhaseEdge(ref) {
				t.Errorf("%s: phase %v, reference %v", where, out.Phase[i], want)
			}
		}
	}
	t.Logf("%d rows (%d at the refraction cutoff skipped): max |Δaltitude| %.2g°, max |Δazimuth| %.2g°",
		rows, skipped, maxAlt, maxAz)
	// The reused kernels saw rows spanning two centuries: their caches have grown beyond the initial size.
	for i, k := range kernels {
		if len(k.cells) <= minCellSlots {
			t.Errorf("kernel %d kept %d cell slots after rows spanning decades", i, len(k.cells))
		}
	}
}

// nearPhaseEdge reports whether p is within 1e-6° of a phase threshold or of the meridian, where the two
// paths may legitimately disagree by rounding.
func nearPhaseEdge(p Pos) bool {
	const eps = 1e-6
	for _, a := range []float64{SunriseAltitude, CivilTwilightAltitude, NauticalTwilightAltitude, AstronomicalTwilightAltitude} {
		if math.Abs(p.GeometricAltitude-a) < eps {
			return true
		}
	}
	h := math.Abs(p.HourAngle)
	return h < eps || h > 180-eps
}

// TestKernelWholeRange compares the batch path with the reference over the whole valid range, years -2000 to
// 6000, with 10,000 seeded random rows in batches that span it all.
func TestKernelWholeRange(t *testing.T) {
	rng := rand.New(rand.NewPCG(6000, 2000))
	k := NewKernel(Options{})
	var out Positions
	var worstAlt, worstAz float64
	for b := 0; b < 10; b++ {
		n := 1000
		unix, lat, lon := make([]float64, n), make([]float64, n), make([]float64, n)
		for i := range unix {
			unix[i] = MinUnix + rng.Float64()*(MaxUnix-MinUnix)
			lat[i], lon[i] = rng.Float64()*180-90, rng.Float64()*360-180
		}
		k.Positions(unix, lat, lon, &out)
		for i := range unix {
			ref, err := Position(unix[i], lat[i], lon[i], Options{})
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(ref.GeometricAltitude-RefractionCutoff) < 1e-6 {
				continue
			}
			worstAlt = max(worstAlt, math.Abs(out.Altitude[i]-ref.Altitude))
			if ref.GeometricAltitude < 89.5 {
				worstAz = max(worstAz, math.Abs(wrap180(out.Azimuth[i]-ref.Azimuth)))
			}
		}
	}
	if worstAlt > 0.0005 || worstAz > 0.0005 {
		t.Errorf("largest differences from the reference: altitude %.3g°, azimuth %.3g°", worstAlt, worstAz)
	}
	// Rows spread over 8000 years outgrow the caches: the kernel has grown them to the limit and evaluates
	// such rows exactly.
	if len(k.cells) != maxCellSlots || k.exactRows == 0 {
		t.Errorf("after rows spread over 8000 years: %d cell slots (want %d), %d rows evaluated exactly (want some)",
			len(k.cells), maxCellSlots, k.exactRows)
	}
	t.Logf("%d of %d rows evaluated exactly", k.exactRows, 10*1000)
	t.Logf("largest differences from the reference: altitude %.3g°, azimuth %.3g°", worstAlt, worstAz)
}

func TestKernelInvalidRows(t *testing.T) {
	// 600 rows: three chunks, the last one partial; every 37th row is invalid in some way.
	n := 600
	unix, lat, lon := benchRows(n)
	bad := []struct {
		unix, lat, lon float64
	}{
		{math.NaN(), 0, 0},
		{MaxUnix, 0, 0},
		{MinUnix - 1, 0, 0},
		{0, 91, 0},
		{0, math.NaN(), 0},
		{0, 0, 180.5},
		{0, 0, math.Inf(-1)},
	}
	invalid := map[int]bool{}
	for j, i := 0, 0; i < n; i, j = i+37, j+1 {
		b := bad[j%len(bad)]
		unix[i], lat[i], lon[i] = b.unix, b.lat, b.lon
		invalid[i] = true
	}
	unix[n-1], lat[n-1] = math.Inf(1), 0 // the very last row too
	invalid[n-1] = true
	var out Positions
	NewKernel(Options{}).Positions(unix, lat, lon, &out)
	for i := range unix {
		if invalid[i] {
			if Check(unix[i], lat[i], lon[i]) == nil {
				t.Fatalf("row %d meant to be invalid passes Check", i)
			}
			if !math.IsNaN(out.Altitude[i]) || !math.IsNaN(out.Azimuth[i]) || out.Phase[i] != PhaseUnknown {
				t.Errorf("invalid row %d: %v %v %v, want NaN NaN unknown", i, out.Altitude[i], out.Azimuth[i], out.Phase[i])
			}
			continue
		}
		ref, err := Position(unix[i], lat[i], lon[i], Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !within(out.Altitude[i], ref.Altitude, 0.0005) || out.Phase[i] == PhaseUnknown {
			t.Errorf("row %d: altitude %v phase %v, reference %v", i, out.Altitude[i], out.Phase[i], ref.Altitude)
		}
	}
}

func TestKernelOutputSizing(t *testing.T) {
	k := NewKernel(Options{})
	unix, lat, lon := benchRows(300)
	var out Positions
	k.Positions(unix, lat, lon, &out)
	if len(out.Altitude) != 300 || len(out.Azimuth) != 300 || len(out.Phase) != 300 {
		t.Fatalf("lengths %d %d %d, want 300", len(out.Altitude), len(out.Azimuth), len(out.Phase))
	}
	first := &out.Altitude[0]
	k.Positions(unix[:100], lat, lon, &out) // lat and lon may be longer than unix
	if len(out.Altitude) != 100 || len(out.Azimuth) != 100 || len(out.Phase) != 100 {
		t.Fatalf("lengths %d %d %d, want 100", len(out.Altitude), len(out.Azimuth), len(out.Phase))
	}
	if &out.Altitude[0] != first {
		t.Error("a large enough Altitude array was not reused")
	}
	allocs := testing.AllocsPerRun(10, func() { k.Positions(unix, lat, lon, &out) })
	if allocs != 0 {
		t.Errorf("Positions allocates %v times per call with a reused output", allocs)
	}
	k.Positions(nil, nil, nil, &out)
	if len(out.Altitude) != 0 || len(out.Phase) != 0 {
		t.Errorf("empty batch left lengths %d, %d", len(out.Altitude), len(out.Phase))
	}
}

func TestKernelPanicsOnShortInputs(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Error("no panic with lat shorter than unix")
		}
	}()
	var out Positions
	NewKernel(Options{}).Positions([]float64{0, 1}, []float64{0}, []float64{0, 0}, &out)
}

func TestKernelKeepsItsOptions(t *testing.T) {
	dt, temp := 60.0, 30.0
	o := Options{DeltaT: &dt, Temperature: &temp}
	k := NewKernel(o)
	dt, temp = 1e6, -100 // changing the caller's values afterwards must not affect the kernel
	unix, lat, lon := benchRows(50)
	var out Positions
	k.Positions(unix, lat, lon, &out)
	for i := range unix {
		ref, _ := Position(unix[i], lat[i], lon[i], Options{DeltaT: ptr(60), Temperature: ptr(30)})
		if !within(out.Altitude[i], ref.Altitude, 0.0005) {
			t.Fatalf("row %d: altitude %v, reference with the original options %v", i, out.Altitude[i], ref.Altitude)
		}
	}
}

// TestLagrange checks that the interpolation matrix reproduces every polynomial of degree up to 5 from its
// values at the nodes u = −2…3.
func TestLagrange(t *testing.T) {
	for deg := 0; deg <= 5; deg++ {
		var f [6]float64
		for j := range f {
			f[j] = math.Pow(float64(j-2), float64(deg))
		}
		c := lagrange(f)
		for i, v := range c {
			want := 0.0
			if i == deg {
				want = 1
			}
			if !within(v, want, 1e-12) {
				t.Errorf("u^%d: coefficient %d = %v, want %v", deg, i, v, want)
			}
		}
	}
}

// FuzzKernel checks any single row against the reference path: both reject it, or they agree within the
// batch path's tolerance. Run with go test -fuzz FuzzKernel; the seeds run with the tests.
func FuzzKernel(f *testing.F) {
	f.Add(unixOf(2003, 10, 17, 19, 30, 30, 0), 39.742476, -105.1786)
	f.Add(0.0, 90.0, 180.0)
	f.Add(MinUnix, -90.0, -180.0)
	f.Add(MaxUnix, 0.0, 0.0)
	f.Add(math.NaN(), 0.0, 0.0)
	f.Add(unixOf(2024, 6, 21, 12, 0, 0, 0), 23.44, 0.0)
	f.Fuzz(func(t *testing.T, unix, lat, lon float64) {
		var out Positions
		NewKernel(Options{}).Positions([]float64{unix}, []float64{lat}, []float64{lon}, &out)
		ref, err := Position(unix, lat, lon, Options{})
		if err != nil {
			if !math.IsNaN(out.Altitude[0]) || !math.IsNaN(out.Azimuth[0]) || out.Phase[0] != PhaseUnknown {
				t.Fatalf("invalid row (%v) computed: %v %v %v", err, out.Altitude[0], out.Azimuth[0], out.Phase[0])
			}
			return
		}
		if math.Abs(ref.GeometricAltitude-RefractionCutoff) > 1e-6 && !within(out.Altitude[0], ref.Altitude, 0.0005) {
			t.Fatalf("altitude %v, reference %v", out.Altitude[0], ref.Altitude)
		}
		if ref.GeometricAltitude < 89.5 && math.Abs(wrap180(out.Azimuth[0]-ref.Azimuth)) > 0.0005 {
			t.Fatalf("azimuth %v, reference %v", out.Azimuth[0], ref.Azimuth)
		}
		if want := PhaseOf(ref.GeometricAltitude, ref.HourAngle); out.Phase[0] != want && !nearPhaseEdge(ref) {
			t.Fatalf("phase %v, reference %v", out.Phase[0], want)
		}
	})
}

// TestGridSharedKernels checks that kernels sharing a Grid, run at the same time on different goroutines
// (make test runs this under the race detector), give bit for bit what a kernel of its own gives, over
// rows spread across ten years so that most nodes are computed by one kernel and read by the other.
func TestGridSharedKernels(t *testing.T) {
	const n, batch = 40000, 4000
	unix, lat, lon := benchRows(n)
	rng := rand.New(rand.NewPCG(11, 11))
	lo, hi := yearUnix(2014), yearUnix(2024)
	for i := range unix {
		unix[i] = lo + rng.Float64()*(hi-lo)
	}
	dt := 69.0
	o := Options{DeltaT: &dt, Elevation: 300}
	var want Positions
	NewKernel(o).Positions(unix, lat, lon, &want)

	g := NewGrid(o)
	got := make([]Positions, n/batch)
	done := make(chan struct{})
	for w := range 2 {
		go func() {
			defer func() { done <- struct{}{} }()
			k := g.NewKernel()
			for b := w; b < n/batch; b += 2 {
				at := b * batch
				k.Positions(unix[at:at+batch], lat[at:at+batch], lon[at:at+batch], &got[b])
			}
		}()
	}
	<-done
	<-done
	for b := range got {
		for j := range batch {
			i := b*batch + j
			if got[b].Altitude[j] != want.Altitude[i] || got[b].Azimuth[j] != want.Azimuth[i] || got[b].Phase[j] != want.Phase[i] {
				t.Fatalf("row %d: shared kernels %v %v %v, own kernel %v %v %v", i,
					got[b].Altitude[j], got[b].Azimuth[j], got[b].Phase[j], want.Altitude[i], want.Azimuth[i], want.Phase[i])
			}
		}
	}
	if len(g.nodes) == 0 || len(g.nodes) > maxGridNodes {
		t.Fatalf("grid holds %d nodes, want 1..%d", len(g.nodes), maxGridNodes)
	}
}

// TestGridZeroValue: kernels from a zero Grid work, with the zero Options.
func TestGridZeroValue(t *testing.T) {
	var g Grid
	unix, lat, lon := benchRows(100)
	var got, want Positions
	g.NewKernel().Positions(unix, lat, lon, &got)
	NewKernel(Options{}).Positions(unix, lat, lon, &want)
	for i := range unix {
		if got.Altitude[i] != want.Altitude[i] || got.Azimuth[i] != want.Azimuth[i] {
			t.Fatalf("row %d: zero Grid's kernel %v %v, NewKernel %v %v", i, got.Altitude[i], got.Azimuth[i], want.Altitude[i], want.Azimuth[i])
		}
	}
}
