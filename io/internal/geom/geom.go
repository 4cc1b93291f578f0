// Package geom turns any geometry into the one point heliotag computes the
// sun for, and checks that coordinates are longitude/latitude degrees.
//
// The representative point of each geometry type:
//   - Point: the point itself.
//   - MultiPoint: its first point.
//   - LineString: the point halfway along its length (measured in degrees, as
//     drawn); MultiLineString: halfway along its longest line.
//   - Polygon and MultiPolygon: the area-weighted centroid of the shape
//     (planar, in degrees), which for strongly concave shapes may lie outside
//     them; a shape of zero area falls back to the centroid of its vertices.
//   - Collection: the representative point of its first non-empty member.
//
// Planar arithmetic in degrees is what these points need: a representative
// point only has to stand somewhere on or near a feature whose extent is small
// next to the distances over which the sun's position changes noticeably
// (0.01° of longitude moves local solar time by 2.4 s).
package geom

import (
	"errors"
	"fmt"
	"math"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

// ErrEmpty means a geometry has no coordinates.
var ErrEmpty = errors.New("geometry has no coordinates")

// Representative returns the point used for g (see the package doc).
func Representative(g orb.Geometry) (orb.Point, error) {
	switch v := g.(type) {
	case nil:
		return orb.Point{}, ErrEmpty
	case orb.Point:
		return v, nil
	case orb.MultiPoint:
		if len(v) == 0 {
			return orb.Point{}, ErrEmpty
		}
		return v[0], nil
	case orb.LineString:
		return halfway(v)
	case orb.MultiLineString:
		best, bestLen := -1, -1.0
		for i, ls := range v {
			if l := planar.Length(ls); len(ls) > 0 && l > bestLen {
				best, bestLen = i, l
			}
		}
		if best < 0 {
			return orb.Point{}, ErrEmpty
		}
		return halfway(v[best])
	case orb.Ring:
		return centroid(orb.Polygon{v})
	case orb.Polygon:
		return centroid(v)
	case orb.MultiPolygon:
		return centroid(v)
	case orb.Bound:
		return v.Center(), nil
	case orb.Collection:
		for _, m := range v {
			if p, err := Representative(m); err == nil {
				return p, nil
			}
		}
		return orb.Point{}, ErrEmpty
	}
	return orb.Point{}, fmt.Errorf("unsupported geometry type %T", g)
}

// halfway is the point at half the length of ls.
func halfway(ls orb.LineString) (orb.Point, error) {
	if len(ls) == 0 {
		return orb.Point{}, ErrEmpty
	}
	half := planar.Length(ls) / 2
	for i := 1; i < len(ls); i++ {
		d := planar.Distance(ls[i-1], ls[i])
		if d >= half && d > 0 {
			f := half / d
			return orb.Point{ls[i-1][0] + f*(ls[i][0]-ls[i-1][0]), ls[i-1][1] + f*(ls[i][1]-ls[i-1][1])}, nil
		}
		half -= d
	}
	return ls[len(ls)-1], nil
}

func centroid(g orb.Geometry) (orb.Point, error) {
	if countPoints(g) == 0 {
		return orb.Point{}, ErrEmpty
	}
	p, area := planar.CentroidArea(g)
	if area == 0 || math.IsNaN(p[0]) || math.IsNaN(p[1]) {
		return vertexMean(g), nil
	}
	return p, nil
}

func countPoints(g orb.Geometry) int {
	n := 0
	visit(g, func(orb.Point) { n++ })
	return n
}

func vertexMean(g orb.Geometry) orb.Point {
	var sx, sy float64
	n := 0
	visit(g, func(p orb.Point) { sx, sy, n = sx+p[0], sy+p[1], n+1 })
	return orb.Point{sx / float64(n), sy / float64(n)}
}

func visit(g orb.Geometry, f func(orb.Point)) {
	switch v := g.(type) {
	case orb.Ring:
		for _, p := range v {
			f(p)
		}
	case orb.Polygon:
		for _, r := range v {
			visit(r, f)
		}
	case orb.MultiPolygon:
		for _, p := range v {
			visit(p, f)
		}
	}
}

// Bearing returns the initial great-circle bearing from a to b, degrees
// clockwise from true north in [0, 360); points are (lon, lat) degrees.
func Bearing(a, b orb.Point) float64 {
	φ1, φ2 := a[1]*math.Pi/180, b[1]*math.Pi/180
	Δλ := (b[0] - a[0]) * math.Pi / 180
	y := math.Sin(Δλ) * math.Cos(φ2)
	x := math.Cos(φ1)*math.Sin(φ2) - math.Sin(φ1)*math.Cos(φ2)*math.Cos(Δλ)
	θ := math.Atan2(y, x) * 180 / math.Pi
	return math.Mod(θ+360, 360)
}

// ErrNotLine means a heading was asked of a geometry that has no direction.
var ErrNotLine = errors.New("geometry has no direction")

// Heading returns the direction of a line geometry at its representative
// point: the bearing (degrees clockwise from true north, [0, 360), on a local
// flat map at the segment's midpoint) of the segment that holds the point
// halfway along the line, in the direction the line is drawn. A MultiLineString uses its longest line. Other geometry
// types have no direction (ErrNotLine).
func Heading(g orb.Geometry) (float64, error) {
	var ls orb.LineString
	switch v := g.(type) {
	case orb.LineString:
		ls = v
	case orb.MultiLineString:
		best := -1.0
		for _, l := range v {
			if n := planar.Length(l); len(l) > 1 && n > best {
				ls, best = l, n
			}
		}
	default:
		return 0, fmt.Errorf("%w: a heading from the geometry needs a LineString or MultiLineString, got %s", ErrNotLine, typeName(g))
	}
	half := planar.Length(ls) / 2
	for i := 1; i < len(ls); i++ {
		d := planar.Distance(ls[i-1], ls[i])
		if d > 0 && (d >= half || i == len(ls)-1) {
			return localBearing(ls[i-1], ls[i]), nil
		}
		half -= d
	}
	return 0, fmt.Errorf("%w: the line has no length", ErrNotLine)
}

// localBearing is the direction from a to b on a local flat map around their
// midpoint (east distances scaled by the cosine of the latitude): for the
// short segments of roads and tracks it is the direction of travel, and a
// segment along a parallel heads exactly 90° or 270°.
func localBearing(a, b orb.Point) float64 {
	mid := (a[1] + b[1]) / 2 * math.Pi / 180
	θ := math.Atan2((b[0]-a[0])*math.Cos(mid), b[1]-a[1]) * 180 / math.Pi
	return math.Mod(θ+360, 360)
}

func typeName(g orb.Geometry) string {
	if g == nil {
		return "no geometry"
	}
	return g.GeoJSONType()
}
