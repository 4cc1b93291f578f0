package solar

import (
	"math"
	"testing"
	"time"
)

// TestSunTimeAnchors checks the definition of the double-anchored sun time (Vazquez, Rowcliffe, Spoelstra &
// Jansen 2019, equinoctial anchoring, as issue 4 states it): sunrise maps to 6 h and sunset to 18 h, linear
// between; the night from sunset to the next sunrise maps linearly onto 18 → 30 h, mod 24.
func TestSunTimeAnchors(t *testing.T) {
	const h = 3600.0
	prevSet, rise, set, nextRise := -5.5*h, 6.5*h, 18.5*h, 30.5*h // a 12-hour day, 12-hour nights
	nan := math.NaN()
	tests := []struct {
		name string
		t    float64
		want float64
	}{
		{"sunrise", rise, 6},
		{"sunset", set, 18},
		{"middle of the day", 12.5 * h, 12},
		{"a quarter into the day", 9.5 * h, 9},
		{"an hour after sunset", 19.5 * h, 19},
		{"middle of the night after", 24.5 * h, 0},
		{"the next sunrise", nextRise, 6},
		{"middle of the night before", 0.5 * h, 0},
		{"the previous sunset", prevSet, 18},
		{"an hour before sunrise", 5.5 * h, 5},
	}
	for _, tc := range tests {
		if got := SunTime(tc.t, prevSet, rise, set, nextRise); !within(got, tc.want, 1e-12) {
			t.Errorf("%s: SunTime = %v, want %v", tc.name, got, tc.want)
		}
	}
	// Unequal day and nights are stretched separately: an 8-hour day and a 16-hour night after it.
	if got := SunTime(10*h, nan, 8*h, 16*h, 32*h); !within(got, 9, 1e-12) {
		t.Errorf("a quarter into an 8-hour day: %v, want 9", got)
	}
	if got := SunTime(24*h, nan, 8*h, 16*h, 32*h); !within(got, 0, 1e-12) {
		t.Errorf("halfway through a 16-hour night: %v, want 0", got)
	}

	nans := []struct {
		name                         string
		t, prevSet, rise, set, nextR float64
	}{
		{"no sunrise", 12 * h, prevSet, nan, set, nextRise},
		{"no sunset", 12 * h, prevSet, rise, nan, nextRise},
		{"NaN instant", nan, prevSet, rise, set, nextRise},
		{"before sunrise without the previous sunset", 3 * h, nan, rise, set, nextRise},
		{"after sunset without the next sunrise", 20 * h, prevSet, rise, set, nan},
		{"before the previous sunset", prevSet - 1, prevSet, rise, set, nextRise},
		{"after the next sunrise", nextRise + 1, prevSet, rise, set, nextRise},
		{"rise equal to set", rise, prevSet, rise, rise, nextRise},
		{"set before rise, t before the set", 0.5 * h, nan, 2 * h, 1 * h, nan},
		{"set before rise, t after the rise", 3 * h, nan, 2 * h, 1 * h, nan},
	}
	for _, tc := range nans {
		if got := SunTime(tc.t, tc.prevSet, tc.rise, tc.set, tc.nextR); !math.IsNaN(got) {
			t.Errorf("%s: SunTime = %v, want NaN", tc.name, got)
		}
	}
	// The anchors that t does not need may be NaN.
	if got := SunTime(12.5*h, nan, rise, set, nan); got != 12 {
		t.Errorf("midday with NaN night anchors: %v, want 12", got)
	}
	// A date whose sunset (just after midnight) comes before its sunrise: between them is night.
	if got := SunTime(1.5*h, nan, 2*h, 1*h, nan); !within(got, 0, 1e-12) { // 18 + 12·½ = 24 ≡ 0
		t.Errorf("between an early sunset and the sunrise after it: %v, want 0", got)
	}
}

// TestSunTimeOnRealDays puts three consecutive dates of Events at a camera-trap-like place and at 60° N in
// summer through SunTime: sunrise → 6, sunset → 18, noon between them, and the sun time continuous and
// increasing (unwrapped past 24) from the previous sunset to the next sunrise.
func TestSunTimeOnRealDays(t *testing.T) {
	for _, c := range []struct {
		lat, lon float64
		y, m, d  int
	}{{-1.5, 36.2, 2024, 3, 5}, {60, 10, 2024, 6, 10}, {-45, 170, 2024, 12, 1}} {
		var days [3]Day
		for i := range days {
			start, end := meanSolarWindow(unixOf(c.y, 1, 1, 12, 0, 0, 0)+float64(daysBefore(c.m, c.d)+i-1)*86400, c.lon)
			days[i] = mustEvents(t, start, end, c.lat, c.lon)
		}
		prevSet, d, nextRise := days[0].Set, days[1], days[2].Rise
		st := func(u float64) float64 { return SunTime(u, prevSet, d.Rise, d.Set, nextRise) }
		if st(d.Rise) != 6 || st(d.Set) != 18 {
			t.Errorf("lat %v: sunrise → %v, sunset → %v; want 6 and 18", c.lat, st(d.Rise), st(d.Set))
		}
		if n := st(d.Noon); !(n > 6 && n < 18) || !within(n, 12, 0.5) {
			t.Errorf("lat %v: noon → %v, want between 6 and 18, near 12", c.lat, n)
		}
		prev := math.Inf(-1)
		for u := prevSet; u <= nextRise; u += 30 {
			v := st(u)
			if math.IsNaN(v) {
				t.Fatalf("lat %v: NaN at %s", c.lat, fmtInstant(u))
			}
			// Unwrap: the night after the day's sunset runs 18 → 30, the night before it 18 (at the
			// previous sunset) → 30 (at the sunrise); the day runs 30 → 42 relative to the previous set.
			switch {
			case u < d.Rise && v < 18:
				v += 24
			case u >= d.Rise && u <= d.Set:
				v += 24
			case u > d.Set:
				v += 24
				if v < 42 {
					v += 24
				}
			}
			if !(v > prev) || (prev > math.Inf(-1) && v-prev > 0.05) {
				t.Fatalf("lat %v: sun time %v at %s after %v: not continuous and increasing", c.lat, v, fmtInstant(u), prev)
			}
			prev = v
		}
	}
}

// daysBefore returns the day of the year, from 0, of month m, day d in 2024.
func daysBefore(m, d int) int {
	return int((unixOf(2024, time.Month(m), d, 0, 0, 0, 0) - yearUnix(2024)) / 86400)
}
