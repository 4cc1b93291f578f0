package solar

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Facts of the trade (common practice), REFERENCE-VALUES.md §6.

// TestEquinoxRiseSetAzimuth: at an equinox the sun rises close to azimuth 90° and sets close to 270°
// everywhere outside the polar regions (common practice). The sun's centre is at −0.833° then, not on the
// horizon, and the declination moves by up to 0.2° within the day, which together shift the azimuth by up to
// about 2° at 60° latitude: allow 2.5°.
func TestEquinoxRiseSetAzimuth(t *testing.T) {
	for _, day := range []float64{unixOf(2024, 3, 20, 0, 0, 0, 0), unixOf(2024, 9, 22, 0, 0, 0, 0)} {
		for _, lat := range []float64{-60, -45, -30, -10, 0, 10, 30, 45, 60} {
			for _, lon := range []float64{-120, 0, 100} {
				rise := crossing(day, lat, lon, SunriseAltitude, true)
				set := crossing(day, lat, lon, SunriseAltitude, false)
				pr, _ := Position(rise, lat, lon, Options{})
				ps, _ := Position(set, lat, lon, Options{})
				if math.Abs(pr.Azimuth-90) > 2.5 || math.Abs(ps.Azimuth-270) > 2.5 {
					t.Errorf("%s lat %v lon %v: rise azimuth %.2f, set azimuth %.2f; want about 90 and 270",
						fmtInstant(day), lat, lon, pr.Azimuth, ps.Azimuth)
				}
			}
		}
	}
}

// transit returns the instant near local noon of the day starting at day0 when the topocentric hour angle
// is 0, by bisection.
func transit(day0, lat, lon float64) float64 {
	noon := day0 + 43200 - lon/15*3600
	lo, hi := noon-3*3600, noon+3*3600
	for hi-lo > 1e-4 {
		mid := (lo + hi) / 2
		if p, _ := Position(mid, lat, lon, Options{}); p.HourAngle < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// TestNoonAltitude: the altitude of the sun's centre at the meridian is 90° − |φ − δ| (common practice), with
// δ the declination as seen by the observer.
func TestNoonAltitude(t *testing.T) {
	rng := rand.New(rand.NewPCG(90, 1))
	lo, hi := yearUnix(1950), yearUnix(2050)
	for i := 0; i < 200; i++ {
		day0 := math.Floor((lo+rng.Float64()*(hi-lo))/86400) * 86400
		lat, lon := rng.Float64()*170-85, rng.Float64()*340-170
		tr := transit(day0, lat, lon)
		p, _ := Position(tr, lat, lon, Options{NoRefraction: true})
		if want := 90 - math.Abs(lat-p.Declination); !within(p.Altitude, want, 1e-5) {
			t.Errorf("%s lat %v lon %v: noon altitude %.6f, 90 − |φ − δ| = %.6f", fmtInstant(tr), lat, lon, p.Altitude, want)
		}
	}
	// Between the tropics and the polar circles the yearly range of the noon altitude is twice the obliquity,
	// about 46.9° (common practice).
	lat, lon := 45.0, 7.0
	june, _ := Position(transit(unixOf(2024, 6, 20, 0, 0, 0, 0), lat, lon), lat, lon, Options{NoRefraction: true})
	dec, _ := Position(transit(unixOf(2024, 12, 21, 0, 0, 0, 0), lat, lon), lat, lon, Options{NoRefraction: true})
	if r := june.Altitude - dec.Altitude; !within(r, 46.9, 0.05) {
		t.Errorf("yearly range of noon altitude at 45° N = %.3f°, want about 46.9°", r)
	}
}

// TestPolarNight: at 80° N on the December solstice the sun does not rise (common practice: poleward of the
// polar circle); its altitude peaks at 90° − 80° − 23.44° = −13.44° and bottoms out at −33.44°, so the day
// has only astronomical twilight and night, and the light condition is dark all day.
func TestPolarNight(t *testing.T) {
	lat, lon := 80.0, 15.0
	day0 := unixOf(2024, 12, 21, 0, 0, 0, 0)
	var unix, lats, lons []float64
	for m := 0.0; m < 1440; m += 5 {
		unix = append(unix, day0+m*60)
		lats, lons = append(lats, lat), append(lons, lon)
	}
	var out Positions
	NewKernel(Options{}).Positions(unix, lats, lons, &out)
	highest := math.Inf(-1)
	seen := map[Phase]bool{}
	for i, u := range unix {
		p, _ := Position(u, lat, lon, Options{})
		highest = max(highest, p.GeometricAltitude)
		if p.GeometricAltitude > SunriseAltitude {
			t.Errorf("%s: the sun is up (%.3f°) in polar night", fmtInstant(u), p.GeometricAltitude)
		}
		ph := out.Phase[i]
		seen[ph] = true
		if ph.Condition() != Dark || (ph != MorningAstronomical && ph != EveningAstronomical && ph != Night) {
			t.Errorf("%s: phase %v (%v), want astronomical twilight or night, dark", fmtInstant(u), ph, ph.Condition())
		}
	}
	if !seen[Night] || !seen[MorningAstronomical] || !seen[EveningAstronomical] {
		t.Errorf("phases seen %v, want night and both astronomical twilights", seen)
	}
	if !within(highest, -13.44, 0.05) {
		t.Errorf("highest altitude %.3f°, want about −13.44°", highest)
	}
}
