package solar

import "math"

const (
	deg = math.Pi / 180 // radians per degree
	rad = 180 / math.Pi // degrees per radian

	// StandardPressure is the pressure, hPa (mbar), that an [Options] Pressure of 0 stands for.
	StandardPressure = 1010.0
	// StandardTemperature is the temperature, °C, that a nil [Options] Temperature stands for.
	StandardTemperature = 10.0

	// earthRadius is the equatorial radius of the Earth in metres and earthAxisRatio the polar/equatorial
	// axis ratio 1 − f, as used by NREL/TP-560-34302, §3.12 (Eq. 38–40).
	earthRadius    = 6378140.0
	earthAxisRatio = 0.99664719
	// parallaxArcsec is the sun's equatorial horizontal parallax at 1 AU, arcseconds (NREL/TP-560-34302 Eq. 37).
	parallaxArcsec = 8.794
	// aberrationArcsec is the constant of the aberration correction at 1 AU, arcseconds (Eq. 23).
	aberrationArcsec = 20.4898
)

// Options tune the position computation. The zero value gives the defaults: standard atmosphere for
// refraction, sea level, and the built-in ΔT model.
type Options struct {
	// Pressure is the local air pressure in hPa (= mbar) for the refraction correction; 0 means
	// [StandardPressure] (1010 hPa).
	Pressure float64
	// Temperature is the local air temperature in °C for the refraction correction; nil means
	// [StandardTemperature] (10 °C).
	Temperature *float64
	// Elevation is the observer's height above sea level in metres; it enters the parallax correction.
	Elevation float64
	// NoRefraction makes Altitude the geometric (unrefracted) altitude.
	NoRefraction bool
	// DeltaT is ΔT = TT − UT in seconds, used for every instant; nil means the model of [DeltaT].
	DeltaT *float64
}

// DeltaTAt returns the ΔT (seconds, TT − UT) that o uses at a Unix instant: o.DeltaT when set, else
// DeltaT(DecimalYear(unix)).
func (o Options) DeltaTAt(unix float64) float64 {
	if o.DeltaT != nil {
		return *o.DeltaT
	}
	return DeltaT(DecimalYear(unix))
}

// refractionScale returns (P/1010)·(283/(273+T)) for o's pressure and temperature.
func (o Options) refractionScale() float64 {
	p, t := o.Pressure, StandardTemperature
	if p == 0 {
		p = StandardPressure
	}
	if o.Temperature != nil {
		t = *o.Temperature
	}
	return p / StandardPressure * 283 / (273 + t)
}

// RefractionCutoff is the geometric altitude of the sun's centre, degrees, below which no refraction is
// added: the sunrise altitude [SunriseAltitude], where the upper limb meets the horizon under standard
// refraction (NREL/TP-560-34302 applies Eq. 42 only while the sun is above the horizon). Apparent altitude
// therefore jumps by about 0.6° there; the light phase, computed from the geometric altitude, does not.
const RefractionCutoff = SunriseAltitude

// Refraction returns the atmospheric refraction in degrees to add to a geometric (true) altitude of the sun's
// centre, in degrees, under o's pressure and temperature: NREL/TP-560-34302 Eq. 42, Saemundsson's formula
// (Meeus, Astronomical Algorithms, eq. 16.4) 1.02′/tan(h + 10.3/(h + 5.11)) scaled by (P/1010)·(283/(273+T)).
// It is 0 when o.NoRefraction is set or the altitude is below [RefractionCutoff].
func Refraction(geometricAltitude float64, o Options) float64 {
	if o.NoRefraction || !(geometricAltitude >= RefractionCutoff) {
		return 0
	}
	h := geometricAltitude
	return o.refractionScale() * 1.02 / (60 * math.Tan((h+10.3/(h+5.11))*deg))
}

// Geocentric holds the quantities of the NREL Solar Position Algorithm that depend only on the instant: the
// sun as seen from the Earth's centre. Angles are degrees, the distance is in astronomical units.
type Geocentric struct {
	JD  float64 // Julian day (UT)
	JDE float64 // Julian ephemeris day (TT = UT + ΔT)

	HeliocentricLongitude float64 // L, Earth's heliocentric longitude, [0, 360)
	HeliocentricLatitude  float64 // B, Earth's heliocentric latitude
	Distance              float64 // R, Earth–sun distance, AU

	NutationLongitude float64 // Δψ, nutation in longitude
	NutationObliquity float64 // Δε, nutation in obliquity
	MeanObliquity     float64 // ε0, mean obliquity of the ecliptic
	Obliquity         float64 // ε = ε0 + Δε, true obliquity of the ecliptic
	Aberration        float64 // Δτ, aberration correction to the longitude
	ApparentLongitude float64 // λ, apparent geocentric longitude of the sun, [0, 360)

	RightAscension float64 // α, apparent geocentric right ascension, [0, 360)
	Declination    float64 // δ, apparent geocentric declination

	MeanSiderealTime float64 // ν0, Greenwich mean sidereal time, [0, 360)
	SiderealTime     float64 // ν, Greenwich apparent sidereal time, [0, 360)

	EquationOfTime float64 // E, apparent minus mean solar time, minutes, in [-20, 20]
}

// GeocentricAt computes the geocentric quantities of the sun for Julian day jd (UT, see [JulianDay]) and
// ΔT = TT − UT in seconds (see [Options.DeltaTAt]), following NREL/TP-560-34302 §3.1–3.9 and Appendix A.1
// (equation of time). It does not check its inputs; see [Check] for the valid range.
func GeocentricAt(jd, deltaT float64) Geocentric {
	g := Geocentric{JD: jd, JDE: JulianEphemerisDay(jd, deltaT)}
	jc := (jd - j2000JD) / 36525
	jce := (g.JDE - j2000JD) / 36525
	jme := jce / 10

	// Earth heliocentric position (§3.2).
	l := series(jme, earthL0[:], earthL1[:], earthL2[:], earthL3[:], earthL4[:], earthL5[:])
	b := series(jme, earthB0[:], earthB1[:])
	r := series(jme, earthR0[:], earthR1[:], earthR2[:], earthR3[:], earthR4[:])
	g.HeliocentricLongitude = wrap360(l * rad)
	g.HeliocentricLatitude = b * rad
	g.Distance = r

	// Geocentric longitude and latitude (§3.3), nutation (§3.4), obliquity (§3.5), aberration (§3.6).
	theta := wrap360(g.HeliocentricLongitude + 180)
	beta := -g.HeliocentricLatitude
	g.NutationLongitude, g.NutationObliquity = nutation(jce)
	u := jme / 10
	g.MeanObliquity = poly(u, 84381.448, -4680.93, -1.55, 1999.25, -51.38, -249.67, -39.05, 7.12, 27.87,
		5.79, 2.45) / 3600
	g.Obliquity = g.MeanObliquity + g.NutationObliquity
	g.Aberration = -aberrationArcsec / (3600 * r)
	g.ApparentLongitude = wrap360(theta + g.NutationLongitude + g.Aberration)

	// Sidereal time (§3.8) and right ascension and declination (§3.9, §3.10).
	sinEps, cosEps := math.Sincos(g.Obliquity * deg)
	nutRA := g.NutationLongitude * cosEps // equation of the equinoxes, degrees
	g.MeanSiderealTime = meanSiderealTime(jd, jc)
	g.SiderealTime = wrap360(g.MeanSiderealTime + nutRA)
	sinLam, cosLam := math.Sincos(g.ApparentLongitude * deg)
	sinBeta, cosBeta := math.Sincos(beta * deg)
	g.RightAscension = wrap360(math.Atan2(sinLam*cosEps-sinBeta/cosBeta*sinEps, cosLam) * rad)
	g.Declination = math.Asin(sinBeta*cosEps+cosBeta*sinEps*sinLam) * rad

	// Equation of time (Appendix A.1, Eq. A1–A2), limited to ±20 minutes.
	m := poly(jme, 280.4664567, 360007.6982779, 0.03032028, 1.0/49931, -1.0/15300, -1.0/2000000)
	g.EquationOfTime = 4 * wrap180(m-0.0057183-g.RightAscension+nutRA)
	return g
}

// series sums periodic-term tables: Σ_i τ^i · Σ_terms A·cos(B + C·τ), divided by 10⁸ (NREL/TP-560-34302
// Eq. 9–11).
func series(tau float64, tables ...[][3]float64) float64 {
	sum, p := 0.0, 1.0
	for _, tab := range tables {
		s := 0.0
		for _, t := range tab {
			s += t[0] * math.Cos(t[1]+t[2]*tau)
		}
		sum += s * p
		p *= tau
	}
	return sum / 1e8
}

// meanSiderealTime returns the Greenwich mean sidereal time ν0 in degrees, [0, 360), for Julian day jd (UT)
// and its Julian century jc (NREL/TP-560-34302 Eq. 28; Meeus eq. 12.4). The whole days are split off before
// multiplying by 360.98564736629°/day so that the rotation keeps full precision.
func meanSiderealTime(jd, jc float64) float64 {
	d := jd - j2000JD
	whole := math.Floor(d)
	v := 280.46061837 + 360*(d-whole) + 0.98564736629*d + jc*jc*(0.000387933-jc/38710000)
	return wrap360(v)
}

// Pos is the sun's position for one instant and place, from [Position] or [Geocentric.Topocentric]. Angles
// are degrees; topocentric means as seen from the observer (with parallax), geocentric from the Earth's centre.
type Pos struct {
	// Altitude is the topocentric altitude of the sun's centre above the horizon, corrected for refraction
	// (GeometricAltitude + Refraction); with Options.NoRefraction it equals GeometricAltitude.
	Altitude float64
	// Azimuth is the topocentric azimuth of the sun's centre, clockwise from true north, [0, 360).
	Azimuth float64
	// GeometricAltitude is the topocentric altitude without refraction (e0 of NREL/TP-560-34302 Eq. 41).
	GeometricAltitude float64
	// Refraction is the refraction correction added to GeometricAltitude (see [Refraction]).
	Refraction float64
	// HourAngle is the topocentric local hour angle H′, (-180, 180]: negative before the meridian (morning).
	HourAngle float64
	// Declination is the topocentric declination δ′.
	Declination float64
	// RightAscension is the topocentric right ascension α′, [0, 360).
	RightAscension float64
	// EquationOfTime is apparent minus mean solar time in minutes (the same as Geocentric.EquationOfTime).
	EquationOfTime float64
	// GeocentricHourAngle is the local hour angle H of the geocentric sun, (-180, 180].
	GeocentricHourAngle float64
	// Geocentric holds the geocentric quantities of the instant.
	Geocentric Geocentric
}

// Position computes the sun's position with the full NREL Solar Position Algorithm (Reda & Andreas,
// NREL/TP-560-34302, 2008; stated uncertainty ±0.0003° for the years -2000 to 6000) at a Unix instant (seconds
// since 1970-01-01T00:00:00Z, UTC, fractional allowed) for an observer at latitude lat and longitude lon
// (degrees, east positive). It returns an error wrapping ErrNotFinite, ErrTimeRange, ErrLatitude, ErrLongitude
// (see [Check]) or ErrOption (see [Options.Validate]).
func Position(unix float64, lat, lon float64, o Options) (Pos, error) {
	if err := Check(unix, lat, lon); err != nil {
		return Pos{}, err
	}
	if err := o.Validate(); err != nil {
		return Pos{}, err
	}
	return GeocentricAt(JulianDay(unix), o.DeltaTAt(unix)).Topocentric(lat, lon, o), nil
}

// Topocentric completes the position for an observer at latitude lat and longitude lon (degrees, east
// positive) with o's elevation and refraction settings (NREL/TP-560-34302 §3.11–3.15). It does not check its
// inputs (see [Check] and [Options.Validate]).
func (g Geocentric) Topocentric(lat, lon float64, o Options) Pos {
	p := Pos{EquationOfTime: g.EquationOfTime, Geocentric: g}
	h := wrap360(g.SiderealTime + lon - g.RightAscension) // local hour angle (Eq. 32)
	p.GeocentricHourAngle = wrap180(h)

	// Parallax (§3.12): equatorial horizontal parallax, observer's geocentric coordinates.
	sinXi := math.Sin(parallaxArcsec / (3600 * g.Distance) * deg)
	phi := lat * deg
	sinPhi, cosPhi := math.Sincos(phi)
	uu := math.Atan(earthAxisRatio * math.Tan(phi))
	sinU, cosU := math.Sincos(uu)
	x := cosU + o.Elevation/earthRadius*cosPhi
	y := earthAxisRatio*sinU + o.Elevation/earthRadius*sinPhi
	sinH, cosH := math.Sincos(h * deg)
	sinDec, cosDec := math.Sincos(g.Declination * deg)
	dAlpha := math.Atan2(-x*sinXi*sinH, cosDec-x*sinXi*cosH)
	decT := math.Atan2((sinDec-y*sinXi)*math.Cos(dAlpha), cosDec-x*sinXi*cosH)
	p.RightAscension = wrap360(g.RightAscension + dAlpha*rad)
	p.Declination = decT * rad
	hT := h*deg - dAlpha // topocentric local hour angle (Eq. 40)
	p.HourAngle = wrap180(hT * rad)

	// Altitude (§3.14) and azimuth (§3.15).
	sinDecT, cosDecT := math.Sincos(decT)
	sinHT, cosHT := math.Sincos(hT)
	p.GeometricAltitude = math.Asin(sinPhi*sinDecT+cosPhi*cosDecT*cosHT) * rad
	p.Refraction = Refraction(p.GeometricAltitude, o)
	p.Altitude = p.GeometricAltitude + p.Refraction
	gamma := math.Atan2(sinHT, cosHT*sinPhi-sinDecT/cosDecT*cosPhi) * rad // westward from south
	p.Azimuth = wrap360(gamma + 180)
	return p
}
