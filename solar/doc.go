// Package solar computes the position of the sun and the natural-light phase for an observer on the Earth.
//
// Conventions, used by every function of the package:
//   - Instants are UTC, given as Unix time: seconds since 1970-01-01T00:00:00Z without leap seconds (POSIX
//     time), fractional seconds allowed. UT1 is taken equal to UTC (ΔUT1 = 0): the difference stays under
//     0.9 s, which is under 0.004° of hour angle.
//   - Latitude (Lat) and longitude (Lon) are WGS84 geodetic degrees, latitude positive north in [-90, 90],
//     longitude positive east in [-180, 180].
//   - Angles out are degrees: altitude above the horizon, azimuth clockwise from true north in [0, 360),
//     hour angle in (-180, 180] (negative before the meridian, i.e. in the morning).
//   - Valid instants are those of the years -2000 to 6000 (astronomical year numbering, proleptic Gregorian
//     calendar), the range over which the reference algorithm is published.
//
// Two paths compute the same quantities. [Position] is the reference: the full NREL Solar Position Algorithm
// (Reda & Andreas, NREL/TP-560-34302, 2008) for one instant and place. [Kernel] is the batch path: it evaluates
// the reference's geocentric quantities on a grid of instants, interpolates them to each row and does only
// the observer-dependent part per row; it stays within 0.0005° of the reference (see the package tests).
//
// The package is pure computation: no I/O and no package-level mutable state. Everything is safe for
// concurrent use except a [Kernel], which holds scratch space and belongs to one goroutine at a time.
package solar
