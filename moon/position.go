package moon

import (
	"math"

	"github.com/heliotag/heliotag/solar"
)

// Options tune the computation; they are the sun's options (see [solar.Options]) with the same meaning and
// defaults: Pressure (hPa, 0 = 1010) and Temperature (°C, nil = 10) scale the refraction, NoRefraction turns it
// off, Elevation (metres above sea level) enters the parallax, and DeltaT (seconds, nil = the model of
// [solar.DeltaT]) sets TT − UT. Validate them with [solar.Options.Validate].
type Options = solar.Options

// Pos is the Moon's position and phase for one instant and place, from [Position]. Angles are degrees.
type Pos struct {
	// Altitude is the topocentric apparent altitude of the Moon's centre above the horizon: parallax
	// applied, and refraction added as for the sun ([solar.Refraction], the same options and the same cutoff
	// below which none is added); with Options.NoRefraction it equals GeometricAltitude.
	Altitude float64
	// Azimuth is the topocentric azimuth of the Moon's centre, clockwise from true north, [0, 360).
	Azimuth float64
	// Illumination is the illuminated fraction of the Moon's disk, [0, 1] (Meeus chapter 48, geocentric).
	Illumination float64
	// PhaseAngle is the selenocentric angle between the Sun and the Earth, [0, 180]: 0 at full moon.
	PhaseAngle float64
	// Elongation is the Moon's apparent ecliptic longitude minus the Sun's, [0, 360), which sets Phase.
	Elongation float64
	// Phase is PhaseOf(Elongation).
	Phase Phase
	// Distance is the geocentric distance of the Moon's centre, km.
	Distance float64
	// RightAscension, [0, 360), and Declination are the Moon's apparent geocentric equatorial coordinates.
	RightAscension, Declination float64

	// GeometricAltitude is the topocentric altitude without refraction.
	GeometricAltitude float64
	// Refraction is the correction added to GeometricAltitude.
	Refraction float64
	// HourAngle is the topocentric local hour angle, (-180, 180]: negative before the meridian.
	HourAngle float64
	// Geocentric holds the geocentric quantities of the instant.
	Geocentric Geocentric
}

// Position computes the Moon's position and phase directly (the reference for [Kernel]) at a Unix instant
// (seconds since 1970-01-01T00:00:00Z, UTC, fractional allowed) for an observer at latitude lat and longitude
// lon (WGS84 degrees, east positive), with o's elevation, refraction and ΔT settings: [GeocentricAt], then the
// topocentric correction for parallax (Meeus, Astronomical Algorithms, eq. 40.2–40.3, the observer on the
// ellipsoid of NREL/TP-560-34302) and the horizontal coordinates. It returns an error wrapping
// solar.ErrNotFinite, solar.ErrTimeRange, solar.ErrLatitude or solar.ErrLongitude (see [solar.Check]) or
// solar.ErrOption (see [solar.Options.Validate]). The instants accepted are those of the sun, the years
// -2000 to 6000, but chapter 47's series are meant for a few millennia around 2000: far from it the Moon's
// place loses accuracy (its error grows with the square of the time from 2000).
func Position(unix, lat, lon float64, o Options) (Pos, error) {
	if err := solar.Check(unix, lat, lon); err != nil {
		return Pos{}, err
	}
	if err := o.Validate(); err != nil {
		return Pos{}, err
	}
	return GeocentricAt(solar.JulianDay(unix), o.DeltaTAt(unix)).Topocentric(lat, lon, o), nil
}

// Topocentric completes the position for an observer at latitude lat and longitude lon (degrees, east
// positive) with o's elevation and refraction settings. It does not check its inputs (see [solar.Check] and
// [solar.Options.Validate]).
func (g Geocentric) Topocentric(lat, lon float64, o Options) Pos {
	p := Pos{
		Illumination:   g.Illumination,
		PhaseAngle:     g.PhaseAngle,
		Elongation:     g.Elongation,
		Phase:          phaseOf(g.Elongation),
		Distance:       g.Distance,
		RightAscension: g.RightAscension,
		Declination:    g.Declination,
		Geocentric:     g,
	}
	h := wrap360(g.Sun.SiderealTime + lon - g.RightAscension) // geocentric local hour angle

	// Parallax in right ascension and declination (Meeus eq. 40.2, 40.3) with the observer's geocentric
	// coordinates ρ sin φ′, ρ cos φ′ (Meeus chapter 11; NREL/TP-560-34302 Eq. 38–40).
	sinPi := EarthRadius / g.Distance
	phi := lat * deg
	sinPhi, cosPhi := math.Sincos(phi)
	u := math.Atan(earthAxisRatio * math.Tan(phi))
	sinU, cosU := math.Sincos(u)
	elev := o.Elevation / (EarthRadius * 1000)
	x := cosU + elev*cosPhi                // ρ cos φ′
	y := earthAxisRatio*sinU + elev*sinPhi // ρ sin φ′
	sinH, cosH := math.Sincos(h * deg)
	sinDec, cosDec := math.Sincos(g.Declination * deg)
	dAlpha := math.Atan2(-x*sinPi*sinH, cosDec-x*sinPi*cosH)
	decT := math.Atan2((sinDec-y*sinPi)*math.Cos(dAlpha), cosDec-x*sinPi*cosH)
	hT := h*deg - dAlpha
	p.HourAngle = wrap180(hT * rad)

	// Horizontal coordinates (Meeus eq. 13.5, 13.6).
	sinDecT, cosDecT := math.Sincos(decT)
	sinHT, cosHT := math.Sincos(hT)
	p.GeometricAltitude = math.Asin(sinPhi*sinDecT+cosPhi*cosDecT*cosHT) * rad
	p.Refraction = solar.Refraction(p.GeometricAltitude, o)
	p.Altitude = p.GeometricAltitude + p.Refraction
	p.Azimuth = wrap360(math.Atan2(sinHT, cosHT*sinPhi-sinDecT/cosDecT*cosPhi)*rad + 180)
	return p
}
