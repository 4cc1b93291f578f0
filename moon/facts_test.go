package moon

import (
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/heliotag/heliotag/solar"
)

// elongationAt returns the Moon's elongation in longitude at a Unix instant, with the ΔT model.
func elongationAt(unix float64) float64 {
	return GeocentricAt(solar.JulianDay(unix), solar.DeltaT(solar.DecimalYear(unix))).Elongation
}

// crossings returns the instants in [lo, hi) at which the elongation passes target degrees, found by a scan
// every 6 hours (the elongation gains about 3° in that time) and bisection to a tenth of a second.
func crossings(lo, hi, target float64) []float64 {
	var out []float64
	off := func(t float64) float64 { return wrap180(elongationAt(t) - target) }
	prev := off(lo)
	for t := lo + 6*3600; t < hi; t += 6 * 3600 {
		cur := off(t)
		if prev < 0 && cur >= 0 && cur-prev < 90 {
			out = append(out, bisect(off, t-6*3600, t))
		}
		prev = cur
	}
	return out
}

// bisect returns the instant in [a, b] where off passes from negative to non-negative, to 0.1 s.
func bisect(off func(float64) float64, a, b float64) float64 {
	for b-a > 0.1 {
		m := (a + b) / 2
		if off(m) < 0 {
			a = m
		} else {
			b = m
		}
	}
	return (a + b) / 2
}

// decade is the span of the lunar-month tests: 2000–2010 (2000–2003 under the race detector, which slows
// the computation about tenfold).
var decade = func() [2]float64 {
	if raceEnabled {
		return [2]float64{yearUnix(2000), yearUnix(2003)}
	}
	return [2]float64{yearUnix(2000), yearUnix(2010)}
}()

// monthsInDecade is the number of synodic months in decade, rounded down.
var monthsInDecade = int((decade[1] - decade[0]) / 86400 / 29.530589)

// principalPhases returns the instants of new moon, first quarter, full moon and last quarter (elongation 0°,
// 90°, 180°, 270°) in decade, computed once.
var principalPhases = sync.OnceValue(func() [4][]float64 {
	var out [4][]float64
	for q := range out {
		out[q] = crossings(decade[0], decade[1], 90*float64(q))
	}
	return out
})

// TestSynodicMonth checks, over the decade, that new moons follow each other after 29.53 days on average and
// never less than 29.2 or more than 29.9 days (common practice: the synodic month averages 29.530589 days and
// varies between about 29.27 and 29.83 days), and that the full moons fall between them.
func TestSynodicMonth(t *testing.T) {
	news, fulls := principalPhases()[0], principalPhases()[2]
	if len(news) < monthsInDecade {
		t.Fatalf("%d new moons, want about %d", len(news), monthsInDecade+1)
	}
	minDays, maxDays := math.Inf(1), 0.0
	for i := 1; i < len(news); i++ {
		d := (news[i] - news[i-1]) / 86400
		minDays, maxDays = math.Min(minDays, d), math.Max(maxDays, d)
	}
	mean := (news[len(news)-1] - news[0]) / 86400 / float64(len(news)-1)
	t.Logf("%d new moons: mean interval %.4f days, shortest %.3f, longest %.3f", len(news), mean, minDays, maxDays)
	// Each new moon falls within about 14 hours of the mean lunation's (common practice), so the mean of n
	// intervals is within 2 × 14 h / n of the mean synodic month.
	tol := 2 * 14.0 / 24 / float64(len(news)-1)
	if math.Abs(mean-29.530589) > tol || minDays < 29.2 || maxDays > 29.9 {
		t.Errorf("mean %.4f days, range %.3f–%.3f; want 29.5306 ± %.4f, within 29.2–29.9", mean, minDays,
			maxDays, tol)
	}
	// Full moons alternate with new moons, about half a month after each.
	for _, f := range fulls {
		for i := 1; i < len(news); i++ {
			if f > news[i-1] && f < news[i] {
				if d := (f - news[i-1]) / 86400; d < 13 || d > 16.5 {
					t.Errorf("full moon %.1f days after new moon, want about 14.8", d)
				}
			}
		}
	}
}

// TestIlluminationAtPhases checks the illuminated fraction at the instants of the principal phases over
// the decade (common practice: near 1 at full moon, near 0 at new moon, about one half at the quarters). The
// bounds follow from the geometry: the Moon's ecliptic latitude stays within 5.3°, so the phase angle at
// full moon stays within about 5.4° of 0 (k ≥ 0.997) and at new moon within about 5.4° of 180° (k ≤ 0.003);
// at the quarters it stays within 0.2° of 90° (the Sun is 390 times farther than the Moon), so k is within
// 0.004 of 0.5.
func TestIlluminationAtPhases(t *testing.T) {
	for _, c := range []struct {
		name       string
		elongation float64
		lo, hi     float64
		phase      Phase
	}{
		{"new", 0, 0, 0.003, New},
		{"first quarter", 90, 0.496, 0.504, FirstQuarter},
		{"full", 180, 0.997, 1, Full},
		{"last quarter", 270, 0.496, 0.504, LastQuarter},
	} {
		t.Run(c.name, func(t *testing.T) {
			ts := principalPhases()[int(c.elongation/90)]
			if len(ts) < monthsInDecade {
				t.Fatalf("%d instants, want about %d", len(ts), monthsInDecade+1)
			}
			lo, hi := 1.0, 0.0
			for _, ts := range ts {
				p, err := Position(ts, 0, 0, Options{})
				if err != nil {
					t.Fatal(err)
				}
				lo, hi = math.Min(lo, p.Illumination), math.Max(hi, p.Illumination)
				if p.Phase != c.phase {
					t.Errorf("phase word %q at elongation %.4f°, want %q", p.Phase, p.Elongation, c.phase)
				}
			}
			t.Logf("%d instants: illumination %.4f–%.4f", len(ts), lo, hi)
			if lo < c.lo || hi > c.hi {
				t.Errorf("illumination %.4f–%.4f, want within %g–%g", lo, hi, c.lo, c.hi)
			}
		})
	}
}

// TestPhaseSequence samples the phase word every 3 hours over the decade: it must step through the eight words
// in their order (never skipping one: the shortest, the principal phases, last about 23.6 hours), once per
// synodic month, and repeat after a synodic month (common practice).
func TestPhaseSequence(t *testing.T) {
	const step = 3 * 3600
	prev := PhaseOf(elongationAt(decade[0]))
	cycles := 0
	var count [NumPhases]int
	for ts := decade[0] + step; ts < decade[1]; ts += step {
		p := PhaseOf(elongationAt(ts))
		count[p]++
		if p == prev {
			continue
		}
		next := prev%8 + 1 // WaningCrescent (8) is followed by New (1)
		if p != next {
			t.Fatalf("at %s the phase goes from %q to %q, want %q", fmtUnix(ts), prev, p, next)
		}
		if p == New {
			cycles++
		}
		prev = p
	}
	news := principalPhases()[0]
	if d := cycles - len(news); d < -1 || d > 1 {
		t.Errorf("%d entries into the new-moon window, %d new moons", cycles, len(news))
	}
	// Each principal window lasts 2·6.0°/(360°/29.53 d) ≈ 23.6 h on average: about 8 samples of 3 h.
	for _, p := range []Phase{New, FirstQuarter, Full, LastQuarter} {
		if per := float64(count[p]) / float64(cycles); per < 6.5 || per > 9.5 {
			t.Errorf("%q lasts %.1f samples of 3 h per month, want about 7.9", p, per)
		}
	}
}

// TestFullMoonOppositeSun checks that at full moon the Moon stands roughly opposite the Sun in every place's
// sky (common practice: the full moon rises near sunset and sets near sunrise). Geometric altitudes (no
// refraction) are compared. The Moon's ecliptic latitude (up to 5.3°) and its parallax (up to 1.0°) keep it
// within 6.5° of the point opposite the Sun; where the Sun is within 3° of the horizon, the Moon's azimuth is
// within 7° of the Sun's azimuth + 180°.
func TestFullMoonOppositeSun(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 5))
	o := Options{NoRefraction: true}
	so := solar.Options{NoRefraction: true}
	var maxSep, maxAz float64
	horizon := 0
	fulls := principalPhases()[2]
	for _, ts := range fulls {
		for range 5000/len(fulls) + 1 { // about 5000 rows in all
			lat, lon := rng.Float64()*178-89, rng.Float64()*360-180
			m, err := Position(ts, lat, lon, o)
			if err != nil {
				t.Fatal(err)
			}
			s, err := solar.Position(ts, lat, lon, so)
			if err != nil {
				t.Fatal(err)
			}
			// Angle between the Moon and the point opposite the Sun (altitude −h, azimuth A + 180°).
			cosSep := math.Sin(m.Altitude*deg)*math.Sin(-s.Altitude*deg) +
				math.Cos(m.Altitude*deg)*math.Cos(s.Altitude*deg)*math.Cos((m.Azimuth-s.Azimuth-180)*deg)
			maxSep = math.Max(maxSep, math.Acos(math.Min(1, cosSep))*rad)
			if math.Abs(s.Altitude) <= 3 {
				horizon++
				maxAz = math.Max(maxAz, math.Abs(wrap180(m.Azimuth-s.Azimuth-180)))
			}
		}
	}
	t.Logf("largest distance from the anti-solar point %.2f°; %d rows with the Sun near the horizon, largest "+
		"azimuth offset %.2f°", maxSep, horizon, maxAz)
	if maxSep > 6.5 || maxAz > 7 || horizon < 50 {
		t.Errorf("want the Moon within 6.5° of the anti-solar point and, with the Sun within 3° of the horizon " +
			"(at least 50 rows), its azimuth within 7° of the Sun's + 180°")
	}
}

// TestDistanceAndParallax checks the Moon's distance and horizontal parallax every 5 hours over the decade
// against their known ranges (common practice: perigee about 356,400 km, apogee about 406,700 km; the
// parallax between about 0.90° and 1.03°).
func TestDistanceAndParallax(t *testing.T) {
	lo, hi := math.Inf(1), 0.0
	for ts := decade[0]; ts < decade[1]; ts += 5 * 3600 {
		g := GeocentricAt(solar.JulianDay(ts), 64)
		lo, hi = math.Min(lo, g.Distance), math.Max(hi, g.Distance)
		if g.Parallax < 0.89 || g.Parallax > 1.03 {
			t.Fatalf("parallax %.4f° at %s, want within 0.89°–1.03°", g.Parallax, fmtUnix(ts))
		}
	}
	t.Logf("distance %.0f–%.0f km", lo, hi)
	if lo < 356000 || lo > 357500 || hi < 406000 || hi > 407000 {
		t.Errorf("distance %.0f–%.0f km, want a least near 356,400 and a greatest near 406,700", lo, hi)
	}
}

// TestPhaseOf checks the phase words and the window boundaries (the boundaries belong to the principal
// phases).
func TestPhaseOf(t *testing.T) {
	for _, c := range []struct {
		e    float64
		want Phase
	}{
		{0, New}, {6, New}, {6.000001, WaxingCrescent}, {45, WaxingCrescent}, {83.999999, WaxingCrescent},
		{84, FirstQuarter}, {90, FirstQuarter}, {96, FirstQuarter}, {96.000001, WaxingGibbous},
		{173.9, WaxingGibbous}, {174, Full}, {180, Full}, {186, Full}, {186.1, WaningGibbous},
		{263.9, WaningGibbous}, {264, LastQuarter}, {276, LastQuarter}, {276.1, WaningCrescent},
		{353.9, WaningCrescent}, {354, New}, {359.9999999, New}, {360, New}, {-3, New}, {-10, WaningCrescent},
		{720 + 90, FirstQuarter}, {math.NaN(), PhaseUnknown}, {math.Inf(1), PhaseUnknown},
	} {
		if got := PhaseOf(c.e); got != c.want {
			t.Errorf("PhaseOf(%v) = %q, want %q", c.e, got, c.want)
		}
	}
	want := []string{"", "new", "waxing_crescent", "first_quarter", "waxing_gibbous", "full", "waning_gibbous",
		"last_quarter", "waning_crescent", ""}
	for p, w := range want {
		if got := Phase(p).String(); got != w {
			t.Errorf("Phase(%d).String() = %q, want %q", p, got, w)
		}
	}
}

// TestPhaseInstants checks the instants of a few principal phases of early 2000, to the minute as published
// in tables of lunar phases (from memory): new moon 2000-01-06 18:14 UT, full moon 2000-01-21 04:40 UT (the
// night of a total lunar eclipse), new moon 2000-02-05 13:03 UT. Allow two minutes: the minute is rounded and
// chapter 47's truncation errs by up to about 10″ in longitude, some 20 seconds of the Moon's motion.
func TestPhaseInstants(t *testing.T) {
	jan := yearUnix(2000)
	for _, c := range []struct {
		name       string
		elongation float64
		want       float64
	}{
		{"new moon 2000-01-06 18:14 UT", 0, jan + (5*24+18)*3600 + 14*60},
		{"full moon 2000-01-21 04:40 UT", 180, jan + (20*24+4)*3600 + 40*60},
		{"new moon 2000-02-05 13:03 UT", 0, jan + (35*24+13)*3600 + 3*60},
	} {
		found := false
		for _, ts := range crossings(jan, jan+40*86400, c.elongation) {
			if math.Abs(ts-c.want) < 86400 {
				found = true
				if math.Abs(ts-c.want) > 120 {
					t.Errorf("%s: computed %s", c.name, fmtUnix(ts))
				}
			}
		}
		if !found {
			t.Errorf("%s: no such phase within a day", c.name)
		}
	}
}
