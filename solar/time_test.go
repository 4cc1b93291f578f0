package solar

import (
	"math"
	"testing"
	"time"
)

func TestJulianDay(t *testing.T) {
	tests := []struct {
		name string
		unix float64
		want float64
		tol  float64
	}{
		// NREL/TP-560-34302, Table A4.1 (the same values as Meeus, Astronomical Algorithms, p. 62).
		{"2000-01-01 12:00", unixOf(2000, 1, 1, 12, 0, 0, 0), 2451545.0, 1e-9},
		{"1999-01-01 0h", unixOf(1999, 1, 1, 0, 0, 0, 0), 2451179.5, 1e-9},
		{"1987-01-27 0h", unixOf(1987, 1, 27, 0, 0, 0, 0), 2446822.5, 1e-9},
		{"1987-06-19 12h", unixOf(1987, 6, 19, 12, 0, 0, 0), 2446966.0, 1e-9},
		{"1988-01-27 0h", unixOf(1988, 1, 27, 0, 0, 0, 0), 2447187.5, 1e-9},
		{"1988-06-19 12h", unixOf(1988, 6, 19, 12, 0, 0, 0), 2447332.0, 1e-9},
		{"1900-01-01 0h", unixOf(1900, 1, 1, 0, 0, 0, 0), 2415020.5, 1e-9},
		{"1600-01-01 0h", unixOf(1600, 1, 1, 0, 0, 0, 0), 2305447.5, 1e-9},
		{"1600-12-31 0h", unixOf(1600, 12, 31, 0, 0, 0, 0), 2305812.5, 1e-9},
		// Meeus, Astronomical Algorithms, Example 7.a: 1957 October 4.81 → JD 2436116.31 (printed to 0.01).
		{"1957-10-04.81", unixOf(1957, 10, 4, 0, 0, 0, 0.81*86400), 2436116.31, 0.005},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := JulianDay(tc.unix); !within(got, tc.want, tc.tol) {
				t.Errorf("JulianDay = %.9f, want %.9f", got, tc.want)
			}
			if got := UnixTime(tc.want); !within(got, tc.unix, tc.tol*86400) {
				t.Errorf("UnixTime(%v) = %v, want %v", tc.want, got, tc.unix)
			}
		})
	}
	// JDE = JD + ΔT: the SPA example (NREL/TP-560-34302 §A.5, ΔT = 67 s).
	if got, want := JulianEphemerisDay(2452930.312847, 67), 2452930.312847+67.0/86400; got != want {
		t.Errorf("JulianEphemerisDay = %v, want %v", got, want)
	}
}

func TestValidRangeConstants(t *testing.T) {
	// The valid years -2000 to 6000 of NREL/TP-560-34302, as Unix instants (proleptic Gregorian calendar).
	if want := float64(time.Date(-2000, 1, 1, 0, 0, 0, 0, time.UTC).Unix()); MinUnix != want {
		t.Errorf("MinUnix = %v, want %v", MinUnix, want)
	}
	if want := float64(time.Date(6001, 1, 1, 0, 0, 0, 0, time.UTC).Unix()); MaxUnix != want {
		t.Errorf("MaxUnix = %v, want %v", MaxUnix, want)
	}
}

func TestDeltaT(t *testing.T) {
	tests := []struct {
		name       string
		year, want float64
		tol        float64
	}{
		// Espenak & Meeus (2006), NASA/TP-2006-214141: each polynomial's constant term is ΔT at its t = 0.
		{"1900 (1900–1920 piece)", 1900, -2.79, 1e-9},
		{"1920 (1920–1941 piece)", 1920, 21.20, 1e-9},
		{"1950 (1941–1961 piece)", 1950, 29.07, 1e-9},
		{"1975 (1961–1986 piece)", 1975, 45.45, 1e-9},
		{"2000 (1986–2005 piece)", 2000, 63.86, 1e-9},
		// Espenak's 2014 revision: 2005–2015 ΔT = 64.69 + 0.2930t; 2015–3000 ΔT = 67.62 + 0.3645t + 0.0039755t².
		{"2005 (2014 revision)", 2005, 64.69, 1e-9},
		{"2015 (2014 revision)", 2015, 67.62, 1e-9},
		{"2115 (2014 revision)", 2115, 67.62 + 36.45 + 39.755, 1e-9},
		// Long-term parabola −20 + 32u², u = (y − 1820)/100 (NASA/TP-2006-214141), outside the tables.
		{"-1000 (parabola)", -1000, -20 + 32*28.2*28.2, 1e-6},
		{"4000 (parabola)", 4000, -20 + 32*21.8*21.8, 1e-6},
		// Measured ΔT (IERS/USNO), REFERENCE-VALUES §5: the model stays within half a second.
		{"measured 2000-01-01", DecimalYear(unixOf(2000, 1, 1, 0, 0, 0, 0)), 63.8285, 0.5},
		{"measured 2010-01-01", DecimalYear(unixOf(2010, 1, 1, 0, 0, 0, 0)), 66.0699, 0.5},
		{"measured 2020-01-01", DecimalYear(unixOf(2020, 1, 1, 0, 0, 0, 0)), 69.3612, 0.5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := DeltaT(tc.year); !within(got, tc.want, tc.tol) {
				t.Errorf("DeltaT(%v) = %.6f, want %.6f ± %g", tc.year, got, tc.want, tc.tol)
			}
		})
	}
}

// TestDeltaTJoins checks that consecutive pieces of the ΔT model meet: the polynomials of Espenak & Meeus
// (2006) were fitted to join, so a jump would reveal a wrong coefficient. The join at 3000, between the 2014
// revision and the long-term parabola, is the documented exception.
func TestDeltaTJoins(t *testing.T) {
	for _, y := range []float64{-500, 500, 1600, 1700, 1800, 1860, 1900, 1920, 1941, 1961, 1986, 2005, 2015} {
		before, after := DeltaT(math.Nextafter(y, math.Inf(-1))), DeltaT(y)
		if math.Abs(after-before) > 0.5 {
			t.Errorf("ΔT jumps by %.3f s at %v (%.3f → %.3f)", after-before, y, before, after)
		}
	}
	if jump := DeltaT(3000) - DeltaT(math.Nextafter(3000, 0)); jump < 100 || jump > 200 {
		t.Errorf("ΔT jump at 3000 = %.1f s, documented as about 150 s", jump)
	}
}

func TestDecimalYear(t *testing.T) {
	for _, y := range []int{-2000, 1900, 1970, 2000, 2024, 6000} {
		got := DecimalYear(unixOf(y, 7, 2, 12, 0, 0, 0))
		if !within(got, float64(y)+0.5, 0.02) { // mid-year, within a week
			t.Errorf("DecimalYear(%d-07-02) = %v", y, got)
		}
	}
}

func TestOptionsDeltaTAt(t *testing.T) {
	unix := unixOf(2024, 6, 1, 0, 0, 0, 0)
	if got, want := (Options{}).DeltaTAt(unix), DeltaT(DecimalYear(unix)); got != want {
		t.Errorf("model ΔT = %v, want %v", got, want)
	}
	if got := (Options{DeltaT: ptr(42)}).DeltaTAt(unix); got != 42 {
		t.Errorf("override ΔT = %v, want 42", got)
	}
}
