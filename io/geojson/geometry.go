package geojson

import (
	"encoding/json"
	"errors"
	"fmt"
	"strconv"

	"github.com/paulmach/orb"
	ogeojson "github.com/paulmach/orb/geojson"

	"github.com/heliotag/heliotag/io/internal/geom"
)

// maxCollectionDepth bounds GeometryCollections nested in one another.
const maxCollectionDepth = 32

// positionDepth is how deeply positions nest in each geometry type's
// "coordinates" (RFC 7946 §3.1).
var positionDepth = map[string]int{
	"Point": 1, "MultiPoint": 2, "LineString": 2,
	"MultiLineString": 3, "Polygon": 3, "MultiPolygon": 4,
}

// location returns the representative point of a geometry value (JSON
// text, not null). Errors wrap ErrGeometry.
//
// Geometries are decoded with orb's GeoJSON Geometry type, except Points:
// their two numbers are read here directly (the same values orb reads, as
// TestPointFastPath and FuzzPoint check), since decoding through
// encoding/json's reflection would cost more than the rest of the row.
func location(raw []byte) (orb.Point, error) {
	typ, coords, err := checkGeometry(raw, 0)
	if err != nil {
		return orb.Point{}, err
	}
	if typ == "Point" {
		return pointOf(coords)
	}
	return orbLocation(raw)
}

// orbLocation decodes a geometry with orb and takes its representative point.
func orbLocation(raw []byte) (orb.Point, error) {
	var g ogeojson.Geometry
	if err := json.Unmarshal(raw, &g); err != nil {
		return orb.Point{}, fmt.Errorf("%w: %w", ErrGeometry, err)
	}
	p, err := geom.Representative(g.Geometry())
	if err != nil {
		return orb.Point{}, fmt.Errorf("%w: %w", ErrGeometry, err)
	}
	return p, nil
}

// lineHeading returns the direction of a (Multi)LineString geometry at its
// representative point (geom.Heading); other types have none.
func lineHeading(raw []byte) (float64, error) {
	var g ogeojson.Geometry
	if err := json.Unmarshal(raw, &g); err != nil {
		return 0, fmt.Errorf("%w: %w", ErrGeometry, err)
	}
	return geom.Heading(g.Geometry())
}

// pointOf reads the first two numbers of a Point's coordinates, which
// checkGeometry has found to be an array of at least two numbers.
func pointOf(coords []byte) (orb.Point, error) {
	var p orb.Point
	i := 1
	for k := range 2 {
		i = skipSpace(coords, i)
		if i < len(coords) && coords[i] == ',' {
			i = skipSpace(coords, i+1)
		}
		j := skipValue(coords, i)
		v, err := strconv.ParseFloat(string(coords[i:j]), 64)
		if err != nil {
			// Only a number too large for a float64 gets here (1e400).
			return orb.Point{}, fmt.Errorf("%w: Point coordinate %s is out of the range of numbers", ErrGeometry, coords[i:j])
		}
		p[k] = v
		i = j
	}
	return p, nil
}

// checkGeometry checks the shape of a geometry object before orb reads it:
// orb reads a missing position as 0, 0, which would put the row at the
// wrong place instead of rejecting it.
// It returns the geometry's type and, for types other than
// GeometryCollection, its coordinates.
func checkGeometry(b []byte, depth int) (typ string, coords []byte, err error) {
	i := skipSpace(b, 0)
	if i >= len(b) {
		return "", nil, fmt.Errorf("%w: geometry is empty text", ErrGeometry)
	}
	if b[i] != '{' {
		return "", nil, fmt.Errorf("%w: geometry is %s; expected an object such as {\"type\": \"Point\", \"coordinates\": [lon, lat]}", ErrGeometry, kindName(b[i]))
	}
	var geoms []byte
	hasType := false
	for p := i + 1; ; {
		m, end, ok := nextMember(b, p)
		if !ok {
			break
		}
		p = end
		switch {
		case keyIs(b[m.key0:m.key1], "type"):
			hasType = true
			if b[m.val0] == '"' {
				typ = typeName(b[m.val0:m.val1])
			}
		case keyIs(b[m.key0:m.key1], "coordinates"):
			coords = b[m.val0:m.val1]
		case keyIs(b[m.key0:m.key1], "geometries"):
			geoms = b[m.val0:m.val1]
		}
	}
	if !hasType {
		return "", nil, fmt.Errorf("%w: geometry has no \"type\"", ErrGeometry)
	}
	if typ == "GeometryCollection" {
		if depth >= maxCollectionDepth {
			return "", nil, fmt.Errorf("%w: GeometryCollections nested more than %d deep", ErrGeometry, maxCollectionDepth)
		}
		if len(geoms) == 0 || geoms[0] != '[' {
			return "", nil, fmt.Errorf("%w: GeometryCollection needs a \"geometries\" array", ErrGeometry)
		}
		for p := 1; ; {
			p = skipSpace(geoms, p)
			if p < len(geoms) && geoms[p] == ',' {
				p = skipSpace(geoms, p+1)
			}
			if p >= len(geoms) || geoms[p] == ']' {
				return typ, nil, nil
			}
			end := skipValue(geoms, p)
			if geoms[p] == 'n' {
				return "", nil, fmt.Errorf("%w: a member of a GeometryCollection is null", ErrGeometry)
			}
			if _, _, err := checkGeometry(geoms[p:end], depth+1); err != nil {
				return "", nil, err
			}
			p = end
		}
	}
	want, known := positionDepth[typ]
	if !known {
		return "", nil, fmt.Errorf("%w: unknown geometry type %q; RFC 7946 types are Point, MultiPoint, LineString, MultiLineString, Polygon, MultiPolygon, GeometryCollection", ErrGeometry, typ)
	}
	if len(coords) == 0 || coords[0] != '[' {
		return "", nil, fmt.Errorf("%w: %s needs a \"coordinates\" array", ErrGeometry, typ)
	}
	if err := checkCoordinates(coords, want); err != nil {
		return "", nil, fmt.Errorf("%w: %s coordinates: %w", ErrGeometry, typ, err)
	}
	return typ, coords, nil
}

var (
	errPosition = errors.New("a position needs at least longitude and latitude, e.g. [8.54, 47.37]")
	errNesting  = errors.New("arrays nested at the wrong depth for this type")
)

// typeName returns the geometry type named by the JSON string q, without
// allocating for the RFC 7946 types.
func typeName(q []byte) string {
	switch string(q) {
	case `"Point"`:
		return "Point"
	case `"MultiPoint"`:
		return "MultiPoint"
	case `"LineString"`:
		return "LineString"
	case `"MultiLineString"`:
		return "MultiLineString"
	case `"Polygon"`:
		return "Polygon"
	case `"MultiPolygon"`:
		return "MultiPolygon"
	case `"GeometryCollection"`:
		return "GeometryCollection"
	}
	return unquote(q)
}

// checkCoordinates checks that positions sit at nesting depth want and hold
// at least two numbers each, and that nothing but arrays sits above them.
func checkCoordinates(b []byte, want int) error {
	depth, count := 0, 0
	for i := 0; i < len(b); i++ {
		switch c := b[i]; {
		case isSpace(c) || c == ',':
		case c == '[':
			depth++
			if depth > want {
				return errNesting
			}
			count = 0
		case c == ']':
			if depth == want && count < 2 {
				return errPosition
			}
			depth--
		case c == '-' || (c >= '0' && c <= '9'):
			if depth != want {
				return errNesting
			}
			count++
			i = skipValue(b, i) - 1
		default:
			return fmt.Errorf("%s where a number or an array was expected", kindName(c))
		}
	}
	return nil
}
