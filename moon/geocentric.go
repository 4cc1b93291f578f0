package moon

import (
	"math"

	"github.com/heliotag/heliotag/solar"
)

const (
	deg = math.Pi / 180 // radians per degree
	rad = 180 / math.Pi // degrees per radian

	// j2000JD is the Julian day of the epoch J2000.0, 2000-01-01T12:00:00 TT.
	j2000JD = 2451545.0

	// EarthRadius is the Earth's equatorial radius in km used for the Moon's parallax, as in Meeus,
	// Astronomical Algorithms, chapter 47 (sin π = 6378.14/Δ) and NREL/TP-560-34302 (6378140 m).
	EarthRadius = 6378.14
	// earthAxisRatio is the polar/equatorial axis ratio b/a of the same ellipsoid (NREL/TP-560-34302 Eq. 38;
	// Meeus chapter 11: 0.99664719).
	earthAxisRatio = 0.99664719
	// eSq is the squared eccentricity 1 − (b/a)² of that ellipsoid.
	eSq = 1 - earthAxisRatio*earthAxisRatio

	// AstronomicalUnit is the astronomical unit in km (IAU 2012 Resolution B2), to turn the Sun's distance of
	// [solar.Geocentric] into km.
	AstronomicalUnit = 149597870.7
)

// Geocentric holds the Moon's place as seen from the Earth's centre at one instant, with the Sun's place at
// the same instant for the illumination. Angles are degrees, distances km.
type Geocentric struct {
	// Longitude and Latitude are the Moon's geocentric ecliptic coordinates λ, β referred to the mean
	// equinox of date, as Meeus chapter 47 gives them (λ in [0, 360)).
	Longitude, Latitude float64
	// Distance is Δ, between the centres of the Earth and the Moon, km.
	Distance float64
	// Parallax is the equatorial horizontal parallax π: sin π = EarthRadius/Δ.
	Parallax float64
	// ApparentLongitude is λ + Δψ (nutation in longitude), [0, 360).
	ApparentLongitude float64
	// RightAscension α, [0, 360), and Declination δ are the apparent geocentric equatorial coordinates, from
	// the apparent longitude, β and the true obliquity of the ecliptic.
	RightAscension, Declination float64
	// Elongation is the apparent longitude of the Moon minus that of the Sun, [0, 360): 0 at new moon, 90 at
	// first quarter, 180 at full moon, 270 at last quarter. It sets the [Phase].
	Elongation float64
	// Separation is the geocentric angular distance ψ between the centres of the Moon and the Sun, [0, 180]
	// (Meeus eq. 48.2).
	Separation float64
	// PhaseAngle is the selenocentric angle i between the Sun and the Earth, [0, 180] (Meeus eq. 48.3).
	PhaseAngle float64
	// Illumination is the illuminated fraction of the disk k = (1 + cos i)/2, [0, 1] (Meeus eq. 48.1).
	Illumination float64
	// Sun holds the Sun's geocentric quantities at the same instant, and with them the instant (JD, JDE), the
	// nutation, the obliquity and the sidereal time used above.
	Sun solar.Geocentric
}

// GeocentricAt computes the Moon's geocentric place for Julian day jd (UT, see [solar.JulianDay]) and
// ΔT = TT − UT in seconds (see [solar.Options.DeltaTAt]): Meeus, Astronomical Algorithms, chapter 47 for λ,
// β and Δ (at the ephemeris instant), the nutation, true obliquity and the Sun's apparent place of
// [solar.GeocentricAt] (NREL/TP-560-34302) for the apparent coordinates, and chapter 48 (eq. 48.1–48.3) for
// the phase angle and illuminated fraction. It does not check its inputs (see [solar.Check]).
func GeocentricAt(jd, deltaT float64) Geocentric {
	sun := solar.GeocentricAt(jd, deltaT)
	g := Geocentric{Sun: sun}
	g.Longitude, g.Latitude, g.Distance = elp((sun.JDE - j2000JD) / 36525)
	g.Parallax = math.Asin(EarthRadius/g.Distance) * rad
	g.ApparentLongitude = wrap360(g.Longitude + sun.NutationLongitude)

	g.RightAscension, g.Declination = equatorial(g.ApparentLongitude, g.Latitude, sun.Obliquity)

	g.Elongation = wrap360(g.ApparentLongitude - sun.ApparentLongitude)
	g.Separation, g.PhaseAngle = phaseAngle(g.RightAscension, g.Declination, g.Distance,
		sun.RightAscension, sun.Declination, sun.Distance*AstronomicalUnit)
	g.Illumination = (1 + math.Cos(g.PhaseAngle*deg)) / 2
	return g
}

// equatorial converts ecliptic longitude lam and latitude beta to right ascension, [0, 360), and declination
// for the obliquity eps, all in degrees (Meeus eq. 13.3, 13.4).
func equatorial(lam, beta, eps float64) (ra, dec float64) {
	sinEps, cosEps := math.Sincos(eps * deg)
	sinLam, cosLam := math.Sincos(lam * deg)
	sinBeta, cosBeta := math.Sincos(beta * deg)
	ra = wrap360(math.Atan2(sinLam*cosBeta*cosEps-sinBeta*sinEps, cosLam*cosBeta) * rad)
	dec = math.Asin(sinBeta*cosEps+cosBeta*sinEps*sinLam) * rad
	return ra, dec
}

// phaseAngle returns the geocentric elongation ψ of the Moon from the Sun and the Moon's phase angle i, in
// degrees [0, 180], from the apparent right ascensions and declinations (degrees) and distances (km) of the
// Moon (α, δ, Δ) and the Sun (α0, δ0, R): Meeus eq. 48.2 (cos ψ = sin δ0 sin δ + cos δ0 cos δ cos(α0 − α),
// computed here from the cross and dot products of the two directions, which keeps full precision near 0° and
// 180°) and eq. 48.3 (tan i = R sin ψ / (Δ − R cos ψ)).
func phaseAngle(ra, dec, dist, ra0, dec0, r float64) (psi, i float64) {
	m := unitVector(ra, dec)
	s := unitVector(ra0, dec0)
	cosPsi := m[0]*s[0] + m[1]*s[1] + m[2]*s[2]
	cx := m[1]*s[2] - m[2]*s[1]
	cy := m[2]*s[0] - m[0]*s[2]
	cz := m[0]*s[1] - m[1]*s[0]
	sinPsi := math.Sqrt(cx*cx + cy*cy + cz*cz)
	psi = math.Atan2(sinPsi, cosPsi) * rad
	i = math.Atan2(r*sinPsi, dist-r*cosPsi) * rad
	return psi, i
}

// unitVector returns the direction of right ascension ra and declination dec (degrees) as a unit vector.
func unitVector(ra, dec float64) [3]float64 {
	sa, ca := math.Sincos(ra * deg)
	sd, cd := math.Sincos(dec * deg)
	return [3]float64{cd * ca, cd * sa, sd}
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
