package solar

import (
	"math"
	"testing"
)

// below returns the next float64 below v, above the next one above.
func below(v float64) float64 { return math.Nextafter(v, math.Inf(-1)) }
func above(v float64) float64 { return math.Nextafter(v, math.Inf(1)) }

func TestPhaseOf(t *testing.T) {
	// Thresholds: USNO "Rise, Set, and Twilight Definitions" — sunrise/sunset with the centre at −0°50′,
	// civil twilight to −6°, nautical to −12°, astronomical to −18° (geometric centre). Boundaries belong to
	// the darker phase. Morning when the hour angle is negative.
	const am, pm = -45.0, 45.0
	tests := []struct {
		name     string
		alt, h   float64
		want     Phase
		wantCond Condition
	}{
		{"zenith", 90, 0, Daytime, Daylight},
		{"high morning", 30, am, Daytime, Daylight},
		{"just above sunrise altitude", above(SunriseAltitude), am, Daytime, Daylight},
		{"horizon 0°", 0, pm, Daytime, Daylight},
		{"−0.833° (PRODUCT.md's rounding) is still day", -0.833, pm, Daytime, Daylight},
		{"at sunrise altitude, morning", SunriseAltitude, am, MorningCivil, Dawn},
		{"at sunset altitude, evening", SunriseAltitude, pm, EveningCivil, Dusk},
		{"−3° morning", -3, am, MorningCivil, Dawn},
		{"−3° evening", -3, pm, EveningCivil, Dusk},
		{"at −6° morning", -6, am, MorningCivil, Dawn},
		{"at −6° evening", -6, pm, EveningCivil, Dusk},
		{"just below −6° morning", below(-6), am, MorningNautical, Dark},
		{"just below −6° evening", below(-6), pm, EveningNautical, Dark},
		{"at −12° morning", -12, am, MorningNautical, Dark},
		{"at −12° evening", -12, pm, EveningNautical, Dark},
		{"just below −12° morning", below(-12), am, MorningAstronomical, Dark},
		{"just below −12° evening", below(-12), pm, EveningAstronomical, Dark},
		{"at −18° morning", -18, am, MorningAstronomical, Dark},
		{"at −18° evening", -18, pm, EveningAstronomical, Dark},
		{"just below −18°", below(-18), am, Night, Dark},
		{"nadir", -90, pm, Night, Dark},
		{"hour angle 0 is evening", -3, 0, EveningCivil, Dusk},
		{"hour angle 180 is evening", -3, 180, EveningCivil, Dusk},
		{"hour angle just below 0 is morning", -3, below(0), MorningCivil, Dawn},
		{"hour angle −179.9 is morning", -3, -179.9, MorningCivil, Dawn},
		{"hour angle 270 is −90: morning", -3, 270, MorningCivil, Dawn},
		{"NaN altitude", math.NaN(), 0, PhaseUnknown, ConditionUnknown},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := PhaseOf(tc.alt, tc.h)
			if got != tc.want {
				t.Errorf("PhaseOf(%v, %v) = %v, want %v", tc.alt, tc.h, got, tc.want)
			}
			if c := got.Condition(); c != tc.wantCond {
				t.Errorf("Condition = %v, want %v", c, tc.wantCond)
			}
		})
	}
}

func TestPhaseStrings(t *testing.T) {
	// The words of PRODUCT.md's sun_phase and sun_light_condition columns.
	phases := []struct {
		p    Phase
		word string
		cond string
	}{
		{PhaseUnknown, "", ""},
		{Daytime, "day", "daylight"},
		{MorningCivil, "morning_civil", "dawn"},
		{EveningCivil, "evening_civil", "dusk"},
		{MorningNautical, "morning_nautical", "dark"},
		{EveningNautical, "evening_nautical", "dark"},
		{MorningAstronomical, "morning_astronomical", "dark"},
		{EveningAstronomical, "evening_astronomical", "dark"},
		{Night, "night", "dark"},
		{Phase(200), "", ""},
	}
	for _, tc := range phases {
		if got := tc.p.String(); got != tc.word {
			t.Errorf("Phase(%d).String() = %q, want %q", tc.p, got, tc.word)
		}
		if got := tc.p.Condition().String(); got != tc.cond {
			t.Errorf("Phase(%d).Condition() = %q, want %q", tc.p, got, tc.cond)
		}
	}
	if NumPhases != 9 {
		t.Errorf("NumPhases = %d, want 9", NumPhases)
	}
	if got := Condition(99).String(); got != "" {
		t.Errorf("Condition(99).String() = %q", got)
	}
}

// TestKernelPhaseAtThresholds runs rows whose geometric altitude lies just above and just below each
// threshold (found on the reference path) through the batch path: both must agree away from 1e-6° of it.
func TestKernelPhaseAtThresholds(t *testing.T) {
	k := NewKernel(Options{})
	lat, lon := 52.0, 5.0
	day := unixOf(2024, 3, 5, 0, 0, 0, 0)
	var unix []float64
	for _, thr := range []float64{SunriseAltitude, CivilTwilightAltitude, NauticalTwilightAltitude, AstronomicalTwilightAltitude} {
		for _, morning := range []bool{true, false} {
			tc := crossing(day, lat, lon, thr, morning)
			// The altitude changes by about 0.0025° per second here, far more than the 1e-6° rounding band.
			for _, dt := range []float64{-60, -1, 1, 60} {
				unix = append(unix, tc+dt)
			}
		}
	}
	lats, lons := make([]float64, len(unix)), make([]float64, len(unix))
	for i := range unix {
		lats[i], lons[i] = lat, lon
	}
	var out Positions
	k.Positions(unix, lats, lons, &out)
	for i, u := range unix {
		ref, _ := Position(u, lat, lon, Options{})
		want := PhaseOf(ref.GeometricAltitude, ref.HourAngle)
		if i%4 == 2 && want == out.Phase[i-1] { // the rows 1 s either side of the crossing
			t.Errorf("%s: the phase (%v) does not change across the threshold", fmtInstant(u), want)
		}
		if out.Phase[i] != want {
			t.Errorf("%s: kernel phase %v, reference %v (geometric altitude %.6f)", fmtInstant(u), out.Phase[i], want, ref.GeometricAltitude)
		}
	}
}

// crossing returns the instant on the day starting at day0 (UTC) when the geometric altitude crosses thr,
// rising in the morning or setting in the evening, by bisection on the reference path.
func crossing(day0, lat, lon, thr float64, morning bool) float64 {
	// Local solar noon is near 12:00 UTC − lon/15 h.
	noon := day0 + 43200 - lon/15*3600
	lo, hi := noon-43200, noon
	if !morning {
		lo, hi = noon, noon+43200
	}
	geo := func(u float64) float64 {
		p, _ := Position(u, lat, lon, Options{})
		return p.GeometricAltitude - thr
	}
	for hi-lo > 1e-4 {
		mid := (lo + hi) / 2
		if (geo(mid) < 0) == morning {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}
