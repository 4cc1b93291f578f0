package solar

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/soniakeys/meeus/v3/coord"
	meeusnutation "github.com/soniakeys/meeus/v3/nutation"
	"github.com/soniakeys/meeus/v3/sidereal"
	meeussolar "github.com/soniakeys/meeus/v3/solar"
	"github.com/soniakeys/unit"
)

// meeusChain computes the sun's geocentric altitude and azimuth (degrees, azimuth clockwise from north) with
// github.com/soniakeys/meeus/v3: chapter 25's low-accuracy apparent position, chapter 12's apparent sidereal
// time and chapter 13's equatorial-to-horizontal conversion. The library takes longitude positive west and
// measures azimuth westward from south.
func meeusChain(unix, lat, lon, deltaT float64) (alt, az float64) {
	jd := JulianDay(unix)
	ra, dec := meeussolar.ApparentEquatorial(jd + deltaT/86400)
	st := sidereal.Apparent(jd)
	a, h := coord.EqToHz(ra, dec, unit.AngleFromDeg(lat), unit.AngleFromDeg(-lon), st)
	return h.Deg(), wrap360(a.Deg() + 180)
}

// separation returns the angle in degrees between two directions given as altitude and azimuth.
func separation(alt1, az1, alt2, az2 float64) float64 {
	s1, c1 := math.Sincos(alt1 * deg)
	s2, c2 := math.Sincos(alt2 * deg)
	cosSep := s1*s2 + c1*c2*math.Cos((az1-az2)*deg)
	return math.Acos(min(1, cosSep)) * rad
}

// TestAgainstMeeusChain compares the reference path with the meeus library's low-accuracy chain over 10,000
// seeded random instants (1900–2100) and places. Meeus gives chapter 25's method an accuracy of about 0.01°
// (it slightly exceeds that late in the 21st century): allow 0.0125° between the geocentric places. The
// chain's horizontal coordinates are geocentric too, so the observer's parallax (up to 8.8″ = 0.0024°) adds
// to the difference there: allow 0.015°.
func TestAgainstMeeusChain(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 1998))
	lo, hi := yearUnix(1900), yearUnix(2100)
	var worst, worstGeo float64
	for i := 0; i < 10000; i++ {
		unix := lo + rng.Float64()*(hi-lo)
		lat, lon := rng.Float64()*180-90, rng.Float64()*360-180
		p, err := Position(unix, lat, lon, Options{NoRefraction: true})
		if err != nil {
			t.Fatal(err)
		}
		dt := (Options{}).DeltaTAt(unix)
		ra, dec := meeussolar.ApparentEquatorial(JulianDay(unix) + dt/86400)
		g := p.Geocentric
		// Right ascension and declination are longitude and latitude on the celestial sphere.
		geo := separation(g.Declination, g.RightAscension, dec.Deg(), ra.Deg())
		worstGeo = max(worstGeo, geo)
		if geo > 0.0125 {
			t.Errorf("%s: α/δ %.5f/%.5f, meeus chapter 25 %.5f/%.5f (%.4f° apart)", fmtInstant(unix),
				g.RightAscension, g.Declination, ra.Deg(), dec.Deg(), geo)
		}
		alt, az := meeusChain(unix, lat, lon, dt)
		sep := separation(p.Altitude, p.Azimuth, alt, az)
		worst = max(worst, sep)
		if sep > 0.015 {
			t.Errorf("%s lat %v lon %v: altitude/azimuth %.5f/%.5f, meeus chain %.5f/%.5f (%.4f° apart)",
				fmtInstant(unix), lat, lon, p.Altitude, p.Azimuth, alt, az, sep)
		}
	}
	t.Logf("largest separation from the meeus chain: geocentric %.4f°, horizontal %.4f°", worstGeo, worst)
}

// TestNutationAndSiderealTimeAgainstMeeus compares nutation and sidereal time with the meeus library, which
// implements the same published series (Meeus Table 22.A, the SPA's Table A4.3; eq. 12.2–12.4), over 10,000
// seeded random instants in 1900–2100.
func TestNutationAndSiderealTimeAgainstMeeus(t *testing.T) {
	rng := rand.New(rand.NewPCG(22, 12))
	lo, hi := yearUnix(1900), yearUnix(2100)
	var worstNut, worstST float64
	for i := 0; i < 10000; i++ {
		jd := JulianDay(lo + rng.Float64()*(hi-lo))
		g := GeocentricAt(jd, 0)
		dpsi, deps := meeusnutation.Nutation(jd)
		worstNut = max(worstNut, math.Abs(g.NutationLongitude-dpsi.Deg()), math.Abs(g.NutationObliquity-deps.Deg()))
		mean := sidereal.Mean(jd).Sec() / 240 // seconds of time to degrees
		worstST = max(worstST, math.Abs(wrap180(g.MeanSiderealTime-mean)))
	}
	// The library's nutation differs only by its cubic coefficient of M′ (1/5620 instead of the book's
	// 1/56250), worth well under 1e-8° within two centuries of J2000.
	if worstNut > 1e-8 {
		t.Errorf("nutation differs from the meeus library by %.3g°", worstNut)
	}
	// Eq. 12.4 (used here and by the SPA) and eq. 12.2–12.3 (the library) are the same IAU 1982 expression;
	// a float64 Julian day near 2.4e6 is exact to 2.3e-10 days (8e-8° of rotation), and the two split it
	// differently: allow 2e-7°.
	if worstST > 2e-7 {
		t.Errorf("mean sidereal time differs from the meeus library by %.3g°", worstST)
	}
	t.Logf("largest differences: nutation %.3g°, mean sidereal time %.3g°", worstNut, worstST)
}

// TestWholeRangeAgainstMeeus checks the reference path's geocentric place over its whole valid range, years
// -2000 to 6000, against chapter 25's low-accuracy method from the meeus library (5,000 seeded random
// instants). That method's error grows slowly away from J2000; over this range it stayed within 0.026° of the
// SPA in a 20,000-instant trial: allow 0.03°. The check catches gross errors in the long-period terms, not
// fine ones.
func TestWholeRangeAgainstMeeus(t *testing.T) {
	rng := rand.New(rand.NewPCG(2000, 6000))
	var worst float64
	for i := 0; i < 5000; i++ {
		unix := MinUnix + rng.Float64()*(MaxUnix-MinUnix)
		g := GeocentricAt(JulianDay(unix), (Options{}).DeltaTAt(unix))
		ra, dec := meeussolar.ApparentEquatorial(g.JDE)
		sep := separation(g.Declination, g.RightAscension, dec.Deg(), ra.Deg())
		worst = max(worst, sep)
		if sep > 0.03 {
			t.Errorf("%s: α/δ %.4f/%.4f, meeus chapter 25 %.4f/%.4f (%.4f° apart)", fmtInstant(unix),
				g.RightAscension, g.Declination, ra.Deg(), dec.Deg(), sep)
		}
	}
	t.Logf("largest separation: %.4f°", worst)
}
