// Package moon computes the position, illuminated fraction and phase of the Moon for an observer on the
// Earth, with the conventions of package solar:
//   - Instants are UTC, given as Unix time (seconds since 1970-01-01T00:00:00Z, fractional allowed); UT1 is
//     taken equal to UTC. ΔT = TT − UT comes from [solar.Options.DeltaTAt].
//   - Latitude and longitude are WGS84 geodetic degrees, latitude positive north in [-90, 90], longitude
//     positive east in [-180, 180]; valid instants are the years -2000 to 6000 ([solar.Check]).
//   - Angles out are degrees: altitude above the horizon, azimuth clockwise from true north in [0, 360).
//   - [Options] are solar's: pressure and temperature for refraction, NoRefraction, elevation, ΔT.
//
// The Moon's geocentric place is Meeus, Astronomical Algorithms (2nd ed., 1998), chapter 47: the published
// truncation of the ELP-2000/82 theory, good to about 10″ in longitude and 4″ in latitude near the present
// (the book's figures, from memory; the error grows far from 2000). Nutation, the obliquity, the sidereal
// time and the Sun's place are solar's ([solar.GeocentricAt], NREL/TP-560-34302). The topocentric position applies the Moon's parallax (up to
// about 1°) for an observer on the Earth ellipsoid, then refraction exactly as for the sun
// ([solar.Refraction]: the same options, none below the same cutoff). The phase angle and the illuminated
// fraction follow chapter 48 (eq. 48.1–48.3), geocentric.
//
// The phase word comes from the elongation of the Moon from the Sun in ecliptic longitude (apparent Moon
// minus apparent Sun, [0, 360)): new, first_quarter, full and last_quarter within ±[QuarterWindow] (6.0°,
// boundaries included) of 0°, 90°, 180° and 270°, each about 23.6 hours long; waxing_crescent, waxing_gibbous,
// waning_gibbous and waning_crescent between them.
//
// Two paths compute the same quantities. [Position] is the reference, computing everything for one instant
// and place. [Kernel] is the batch path: it evaluates the reference's geocentric quantities on an hourly grid
// aligned to the Unix epoch, interpolates them to each row and does only the observer-dependent part per row;
// it stays within 0.001° of the reference in altitude and azimuth (altitude about 1e-7° in the tests), and a row's
// result never depends on the other rows of its batch.
//
// The package is pure computation: no I/O and no package-level mutable state. Everything is safe for
// concurrent use except a [Kernel], which holds caches and scratch space and belongs to one goroutine at a
// time.
package moon
