package solar

import "math"

const (
	// unixEpochJD is the Julian day of 1970-01-01T00:00:00Z.
	unixEpochJD = 2440587.5
	// j2000JD is the Julian day of the epoch J2000.0, 2000-01-01T12:00:00.
	j2000JD = 2451545.0
	// secondsPerDay is the length of a day of Unix time.
	secondsPerDay = 86400.0
	// secondsPerYear is the mean Gregorian year (365.2425 days), used for decimal years.
	secondsPerYear = 365.2425 * secondsPerDay

	// MinUnix is the first valid instant: -2000-01-01T00:00:00Z (astronomical year -2000, proleptic
	// Gregorian calendar).
	MinUnix = -125281123200.0
	// MaxUnix is the end of the valid range, exclusive: 6001-01-01T00:00:00Z. Valid instants t satisfy
	// MinUnix <= t < MaxUnix, i.e. they fall in the years -2000 to 6000.
	MaxUnix = 127206115200.0
)

// JulianDay returns the Julian day (UT) of a Unix instant: days since noon of 4713 BC January 1 (Julian
// calendar). Unix time is read as UT1 (ΔUT1 = 0, see the package comment).
func JulianDay(unix float64) float64 {
	return unix/secondsPerDay + unixEpochJD
}

// UnixTime returns the Unix instant of a Julian day (UT); it inverts [JulianDay].
func UnixTime(jd float64) float64 {
	return (jd - unixEpochJD) * secondsPerDay
}

// JulianEphemerisDay returns the Julian ephemeris day (TT) for Julian day jd (UT) and ΔT = TT - UT in seconds.
func JulianEphemerisDay(jd, deltaT float64) float64 {
	return jd + deltaT/secondsPerDay
}

// DecimalYear returns the year of a Unix instant as a decimal number (2000.5 is about 2000 July 2), counting
// mean Gregorian years of 365.2425 days from 1970.0. It is the year argument [DeltaT] expects.
func DecimalYear(unix float64) float64 {
	return 1970 + unix/secondsPerYear
}

// DeltaT returns the modelled ΔT = TT − UT in seconds for a decimal year (see [DecimalYear]).
//
// From 1900 to 2005 it is the polynomials of Espenak & Meeus (2006), "Polynomial Expressions for Delta T",
// NASA/TP-2006-214141; from 2005 to 3000 Espenak's 2014 revision of the recent and near-future pieces
// (2005–2015: 64.69 + 0.2930t; 2015–3000: 67.62 + 0.3645t + 0.0039755t²), which track the measured values
// better than the 2006 extrapolation. From -500 to 1900 it is the 2006 polynomials for those centuries
// (coefficients from memory of the same publication; the tests check that consecutive pieces join). Outside
// -500…3000 it is the long-term parabola −20 + 32u², u = (year − 1820)/100. The pieces join within about a
// second, except at 3000 where the 2014 curve and the parabola differ by about 150 s (about 0.002° of solar
// longitude).
//
// The publication's argument is y = year + (month − 0.5)/12; a decimal year is the continuous form of it.
func DeltaT(year float64) float64 {
	y := year
	switch {
	case y < -500 || y >= 3000:
		u := (y - 1820) / 100
		return -20 + 32*u*u
	case y < 500:
		// From memory (Espenak & Meeus 2006, -500 to +500).
		u := y / 100
		return poly(u, 10583.6, -1014.41, 33.78311, -5.952053, -0.1798452, 0.022174192, 0.0090316521)
	case y < 1600:
		// From memory (Espenak & Meeus 2006, +500 to +1600).
		u := (y - 1000) / 100
		return poly(u, 1574.2, -556.01, 71.23472, 0.319781, -0.8503463, -0.005050998, 0.0083572073)
	case y < 1700:
		// From memory (Espenak & Meeus 2006, 1600 to 1700).
		t := y - 1600
		return poly(t, 120, -0.9808, -0.01532, 1.0/7129)
	case y < 1800:
		// From memory (Espenak & Meeus 2006, 1700 to 1800).
		t := y - 1700
		return poly(t, 8.83, 0.1603, -0.0059285, 0.00013336, -1.0/1174000)
	case y < 1860:
		// From memory (Espenak & Meeus 2006, 1800 to 1860).
		t := y - 1800
		return poly(t, 13.72, -0.332447, 0.0068612, 0.0041116, -0.00037436, 0.0000121272, -0.0000001699,
			0.000000000875)
	case y < 1900:
		// From memory (Espenak & Meeus 2006, 1860 to 1900).
		t := y - 1860
		return poly(t, 7.62, 0.5737, -0.251754, 0.01680668, -0.0004473624, 1.0/233174)
	case y < 1920:
		t := y - 1900
		return poly(t, -2.79, 1.494119, -0.0598939, 0.0061966, -0.000197)
	case y < 1941:
		t := y - 1920
		return poly(t, 21.20, 0.84493, -0.076100, 0.0020936)
	case y < 1961:
		t := y - 1950
		return poly(t, 29.07, 0.407, -1.0/233, 1.0/2547)
	case y < 1986:
		t := y - 1975
		return poly(t, 45.45, 1.067, -1.0/260, -1.0/718)
	case y < 2005:
		t := y - 2000
		return poly(t, 63.86, 0.3345, -0.060374, 0.0017275, 0.000651814, 0.00002373599)
	case y < 2015:
		t := y - 2005
		return 64.69 + 0.2930*t
	default:
		t := y - 2015
		return poly(t, 67.62, 0.3645, 0.0039755)
	}
}

// poly evaluates c[0] + c[1]x + c[2]x² + ... by Horner's rule.
func poly(x float64, c ...float64) float64 {
	s := 0.0
	for i := len(c) - 1; i >= 0; i-- {
		s = s*x + c[i]
	}
	return s
}

// wrap360 reduces an angle in degrees to [0, 360).
func wrap360(a float64) float64 {
	a -= 360 * math.Floor(a/360)
	if a >= 360 { // a was a tiny negative number
		a -= 360
	}
	return a
}

// wrap180 reduces an angle in degrees to (-180, 180].
func wrap180(a float64) float64 {
	a = wrap360(a)
	if a > 180 {
		a -= 360
	}
	return a
}
