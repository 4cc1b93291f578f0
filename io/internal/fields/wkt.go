package fields

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkt"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/geom"
)

// ErrWKT means a --geometry field is not WKT that heliotag can read.
var ErrWKT = errors.New("not a WKT geometry")

// maxWKTDepth bounds parenthesis nesting in one WKT value (a polygon in a
// multipolygon in a collection is 4 deep).
const maxWKTDepth = 32

// pickGeometry chooses the --geometry column, which replaces --lat/--lon.
func (x *Extractor) pickGeometry(sel enrich.Select) error {
	if sel.Lat != "" || sel.Lon != "" {
		return fmt.Errorf("%w: --geometry and --lat/--lon both give the location; give one", enrich.ErrUsage)
	}
	var err error
	x.geom, err = x.pick("geometry", "--geometry", sel.Geometry, nil, true)
	return err
}

// GeometryColumn returns the index of the --geometry column, or -1 when the
// location comes from latitude and longitude columns.
func (x *Extractor) GeometryColumn() int { return x.geom }

// HeadingColumn returns the index of the --heading column, or -1.
func (x *Extractor) HeadingColumn() int { return x.heading }

// rowGeometry is Row for a WKT geometry column.
func (x *Extractor) rowGeometry(rec []string, i int, in *enrich.Inputs) {
	p, err := WKTPoint(rec[x.geom])
	if err != nil {
		in.Err[i] = &enrich.RowError{Column: x.names[x.geom], Err: err}
		return
	}
	lat, lon := p[1], p[0]
	in.Lat[i], in.Lon[i] = lat, lon
	x.Time(rec, i, lat, lon, in)
	if in.Err[i] != nil {
		return
	}
	if x.sel.HeadingFromGeometry {
		g, _ := WKTGeometry(rec[x.geom]) // parsed once already above
		h, err := geom.Heading(g)
		if err != nil {
			in.Err[i] = &enrich.RowError{Column: x.names[x.geom], Err: err}
			return
		}
		in.Heading[i] = h
		return
	}
	x.Heading(rec, i, in)
}

// WKTPoint reads a WKT geometry (OGC Simple Features well-known text, as in
// "POINT (8.54 47.37)", x = longitude and y = latitude in degrees) and
// returns its representative point (see package geom): the point itself, the
// first point of a MULTIPOINT, halfway along a LINESTRING, the centroid of a
// POLYGON, ... Z, M and ZM geometries are read in 2D (extra ordinates are
// dropped), a MULTIPOINT may list its points with or without parentheses,
// and an EWKT "SRID=4326;" prefix is accepted (other SRIDs are refused: the
// coordinates must be longitude and latitude). Errors wrap ErrEmpty (empty
// text or an EMPTY geometry) or ErrWKT.
func WKTPoint(s string) (orb.Point, error) {
	g, err := WKTGeometry(s)
	if err != nil {
		return orb.Point{}, err
	}
	p, err := geom.Representative(g)
	if errors.Is(err, geom.ErrEmpty) {
		return orb.Point{}, fmt.Errorf("%w: the geometry %q has no coordinates", ErrEmpty, clip(s))
	}
	if err != nil {
		return orb.Point{}, fmt.Errorf("%w: %w", ErrWKT, err)
	}
	if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
		return orb.Point{}, fmt.Errorf("%w: the representative point of %q is not finite", ErrWKT, clip(s))
	}
	return p, nil
}

// WKTGeometry parses WKT as WKTPoint does, and returns the geometry.
func WKTGeometry(s string) (orb.Geometry, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return nil, fmt.Errorf("%w: geometry is empty; expected WKT such as POINT (8.54 47.37) (longitude latitude)", ErrEmpty)
	}
	norm, err := normalizeWKT(t)
	if err != nil {
		return nil, fmt.Errorf("%w: %s; expected WKT such as POINT (8.54 47.37) (longitude latitude)", ErrWKT, err)
	}
	g, err := wkt.Unmarshal(norm)
	if err != nil {
		return nil, fmt.Errorf("%w: %q cannot be read (%w); expected WKT such as POINT (8.54 47.37) (longitude latitude)", ErrWKT, clip(s), err)
	}
	return g, nil
}

// clip shortens a value for a message.
func clip(s string) string {
	if len(s) > 60 {
		return s[:57] + "..."
	}
	return s
}

// wktTypes are the geometry keywords orb reads.
var wktTypes = []string{"GEOMETRYCOLLECTION", "MULTIPOLYGON", "MULTILINESTRING", "MULTIPOINT", "POLYGON", "LINESTRING", "POINT"}

// normalizeWKT rewrites WKT into the strict 2D form orb's parser reads:
// upper-case keywords, no dimension tags, two ordinates per position, one
// space between them, MULTIPOINT members in parentheses, and POINT EMPTY
// (which orb does not read) as MULTIPOINT EMPTY. Numbers are checked here.
func normalizeWKT(s string) (string, error) {
	if len(s) > 5 && strings.EqualFold(s[:5], "SRID=") {
		semi := strings.IndexByte(s, ';')
		if semi < 0 {
			return "", errors.New("EWKT SRID= prefix without ';'")
		}
		if srid := strings.TrimSpace(s[5:semi]); srid != "4326" {
			return "", fmt.Errorf("SRID=%s: coordinates must be WGS84 longitude/latitude (SRID 4326)", clip(srid))
		}
		s = s[semi+1:]
	}
	var b strings.Builder
	b.Grow(len(s))
	// types[d] is the geometry keyword that opened depth d+1.
	var types []string
	pending := ""    // the last keyword, waiting for its '(' or EMPTY
	nums := 0        // numbers in the current position
	wrapped := false // a MULTIPOINT member written without its parentheses
	closePos := func() {
		if wrapped {
			b.WriteByte(')')
			wrapped = false
		}
		nums = 0
	}
	done := false // one whole geometry has been read
	for i := 0; i < len(s); {
		c := s[i]
		if done && !isWKTSpace(c) {
			return "", errors.New("text after the end of the geometry")
		}
		switch {
		case isWKTSpace(c):
			i++
		case c == '(':
			if pending == "" && len(types) == 0 {
				return "", errors.New("'(' before a geometry keyword")
			}
			if len(types) >= maxWKTDepth {
				return "", fmt.Errorf("parentheses nested more than %d deep", maxWKTDepth)
			}
			t := pending
			if t == "" {
				t = types[len(types)-1]
			}
			types = append(types, t)
			b.WriteString(pending)
			pending = ""
			b.WriteByte('(')
			i++
		case c == ')':
			if len(types) == 0 {
				return "", errors.New("unbalanced ')'")
			}
			closePos()
			types = types[:len(types)-1]
			b.WriteByte(')')
			done = len(types) == 0
			i++
		case c == ',':
			if len(types) == 0 {
				return "", errors.New("',' outside parentheses")
			}
			closePos()
			b.WriteByte(',')
			i++
		case c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z':
			j := i
			for j < len(s) && (s[j] >= 'A' && s[j] <= 'Z' || s[j] >= 'a' && s[j] <= 'z') {
				j++
			}
			w := strings.ToUpper(s[i:j])
			i = j
			switch kw := kwOf(w); {
			case w == "Z" || w == "M" || w == "ZM":
				if pending == "" {
					return "", fmt.Errorf("dimension %s without a geometry keyword", w)
				}
			case w == "EMPTY":
				if pending == "" {
					return "", errors.New("EMPTY without a geometry keyword")
				}
				if pending == "POINT" {
					pending = "MULTIPOINT"
				}
				b.WriteString(pending)
				b.WriteString(" EMPTY")
				pending = ""
				done = len(types) == 0
			case kw == "":
				return "", fmt.Errorf("unknown word %q", clip(w))
			case pending != "" || nums > 0:
				return "", fmt.Errorf("%s where a '(' was expected", kw)
			case len(types) > 0 && types[len(types)-1] != "GEOMETRYCOLLECTION":
				return "", fmt.Errorf("%s inside %s", kw, types[len(types)-1])
			default:
				pending = kw
			}
		default:
			j := i
			for j < len(s) && strings.IndexByte("0123456789+-.eE", s[j]) >= 0 {
				j++
			}
			if j == i {
				return "", fmt.Errorf("unexpected character %q", s[i])
			}
			v, err := strconv.ParseFloat(s[i:j], 64)
			if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
				return "", fmt.Errorf("%q is not a finite number", clip(s[i:j]))
			}
			if len(types) == 0 || pending != "" {
				return "", errors.New("a number outside a geometry's parentheses")
			}
			if nums == 0 && types[len(types)-1] == "MULTIPOINT" && isMultiPointMember(types) {
				b.WriteByte('(')
				wrapped = true
			}
			switch nums {
			case 0:
				b.WriteString(s[i:j])
			case 1:
				b.WriteByte(' ')
				b.WriteString(s[i:j])
			}
			nums++
			i = j
		}
	}
	if len(types) != 0 {
		return "", errors.New("a '(' is not closed")
	}
	if pending != "" {
		return "", fmt.Errorf("%s has no coordinates", pending)
	}
	return b.String(), nil
}

// kwOf returns the geometry keyword that w names (with or without a
// dimension suffix), or "".
func kwOf(w string) string {
	for _, t := range wktTypes {
		if w == t || w == t+"Z" || w == t+"M" || w == t+"ZM" {
			return t
		}
	}
	return ""
}

// isMultiPointMember reports whether a number at the top of types stands
// directly inside a MULTIPOINT's own parentheses (its member points written
// without parentheses), not inside a member's.
func isMultiPointMember(types []string) bool {
	n := len(types)
	return n == 1 || types[n-2] != "MULTIPOINT"
}

func isWKTSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' }
