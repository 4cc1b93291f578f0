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
