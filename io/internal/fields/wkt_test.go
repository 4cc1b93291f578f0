package fields

import (
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkt"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/geom"
)

func TestWKTPoint(t *testing.T) {
	tests := []struct {
		name, in string
		want     orb.Point // (lon, lat); representative points worked out by hand
	}{
		{"point", "POINT (8.5417 47.3769)", orb.Point{8.5417, 47.3769}},
		{"no space, lower case", "point(8.5417 47.3769)", orb.Point{8.5417, 47.3769}},
		{"extra white space", "  POINT  (  8.5417   47.3769 )\n", orb.Point{8.5417, 47.3769}},
		{"negative and exponent", "POINT (-1.05178e2 3.9742476E1)", orb.Point{-105.178, 39.742476}},
		{"Z", "POINT Z (8.5417 47.3769 408)", orb.Point{8.5417, 47.3769}},
		{"ZM joined", "POINTZM (8.5417 47.3769 408 7)", orb.Point{8.5417, 47.3769}},
		{"3 ordinates untagged", "POINT (8.5417 47.3769 408)", orb.Point{8.5417, 47.3769}},
		{"EWKT 4326", "SRID=4326;POINT (8.5417 47.3769)", orb.Point{8.5417, 47.3769}},
		{"multipoint, first point", "MULTIPOINT ((8.5417 47.3769), (2.3522 48.8566))", orb.Point{8.5417, 47.3769}},
		{"multipoint without inner parentheses", "MULTIPOINT (8.5417 47.3769, 2.3522 48.8566)", orb.Point{8.5417, 47.3769}},
		// Halfway along a 10-long line.
		{"linestring halfway", "LINESTRING (0 0, 10 0)", orb.Point{5, 0}},
		{"linestring Z", "LINESTRING Z (0 0 1, 4 0 2, 4 6 3)", orb.Point{4, 1}},
		// The longest of the lines (length 4), halfway.
		{"multilinestring", "MULTILINESTRING ((0 0, 1 0), (10 10, 10 14))", orb.Point{10, 12}},
		// Centroid of a square.
		{"polygon", "POLYGON ((0 0, 2 0, 2 2, 0 2, 0 0))", orb.Point{1, 1}},
		// Two equal squares: centroid between them.
		{"multipolygon", "MULTIPOLYGON (((0 0, 2 0, 2 2, 0 2, 0 0)), ((10 0, 12 0, 12 2, 10 2, 10 0)))", orb.Point{6, 1}},
		{"collection, first non-empty member", "GEOMETRYCOLLECTION (POINT EMPTY, LINESTRING EMPTY, POINT (5 6))", orb.Point{5, 6}},
		{"nested collection", "GEOMETRYCOLLECTION (GEOMETRYCOLLECTION (MULTIPOINT (1 2, 3 4)))", orb.Point{1, 2}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := WKTPoint(tc.in)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got[0]-tc.want[0]) > 1e-12 || math.Abs(got[1]-tc.want[1]) > 1e-12 {
				t.Errorf("WKTPoint(%q) = %v, want %v", tc.in, got, tc.want)
			}
		})
	}
}

func TestWKTPointErrors(t *testing.T) {
	tests := []struct {
		name, in string
		want     error
	}{
		{"empty text", "   ", ErrEmpty},
		{"point empty", "POINT EMPTY", ErrEmpty},
		{"linestring empty", "LINESTRING EMPTY", ErrEmpty},
		{"collection of empties", "GEOMETRYCOLLECTION (POINT EMPTY)", ErrEmpty},
		{"lat,lon text", "47.3769, 8.5417", ErrWKT},
		{"one ordinate", "POINT (8.5)", ErrWKT},
		{"unclosed", "POINT (8.5 47.3", ErrWKT},
		{"unbalanced", "POINT (8.5 47.3))", ErrWKT},
		{"two geometries", "POINT (1 2) POINT (3 4)", ErrWKT},
		{"comma in a point", "POINT (1 2, 3 4)", ErrWKT},
		{"NaN", "POINT (NaN 2)", ErrWKT},
		{"overflow", "POINT (1e999 2)", ErrWKT},
		{"unknown type", "CIRCLE (1 2)", ErrWKT},
		{"curve type", "CIRCULARSTRING (0 0, 1 1, 2 0)", ErrWKT},
		{"other SRID", "SRID=3857;POINT (949000 5995000)", ErrWKT},
		{"SRID without ;", "SRID=4326 POINT (1 2)", ErrWKT},
		{"type inside a point", "POINT (POINT (1 2))", ErrWKT},
		{"GeoJSON", `{"type":"Point","coordinates":[1,2]}`, ErrWKT},
		{"nested too deep", strings.Repeat("GEOMETRYCOLLECTION (", 40) + "POINT (1 2)" + strings.Repeat(")", 40), ErrWKT},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p, err := WKTPoint(tc.in)
			if !errors.Is(err, tc.want) {
				t.Errorf("WKTPoint(%q) = %v, %v; want an error wrapping %v", tc.in, p, err, tc.want)
			}
			if err != nil && !strings.Contains(err.Error(), "expected WKT such as POINT") && tc.want == ErrWKT {
				t.Errorf("message %q does not say what would be valid", err)
			}
		})
	}
}

// TestWKTSameAsOrb: on WKT that orb reads as it is, WKTPoint gives the
// representative point of orb's geometry.
func TestWKTSameAsOrb(t *testing.T) {
	for _, s := range []string{
		"POINT(1.5 -2.25)",
		"MULTIPOINT((1 2),(3 4))",
		"LINESTRING(0 0,3 4,3 10)",
		"POLYGON((0 0,4 0,4 3,0 0))",
		"POLYGON((0 0,10 0,10 10,0 10,0 0),(1 1,2 1,2 2,1 2,1 1))",
		"MULTIPOLYGON(((0 0,1 0,1 1,0 0)),((5 5,9 5,9 9,5 9,5 5)))",
	} {
		g, err := wkt.Unmarshal(s)
		if err != nil {
			t.Fatalf("orb: %q: %v", s, err)
		}
		want, err := geom.Representative(g)
		if err != nil {
			t.Fatal(err)
		}
		if got, err := WKTPoint(s); err != nil || got != want {
			t.Errorf("WKTPoint(%q) = %v, %v; orb and geom give %v", s, got, err, want)
		}
	}
}

func TestGeometryColumn(t *testing.T) {
	header := []string{"id", "wkt", "when"}
	x, err := New(header, enrich.Select{Geometry: "wkt", Time: "when"})
	if err != nil {
		t.Fatal(err)
	}
	if x.GeometryColumn() != 1 {
		t.Errorf("GeometryColumn = %d, want 1", x.GeometryColumn())
	}
	if r := x.Roles(); r.Lat != "wkt" || r.Lon != "wkt" || r.Time != "when" {
		t.Errorf("Roles = %+v; the location's messages should name the geometry column", r)
	}
	rows := [][]string{
		{"a", "POINT (-105.1786 39.742476)", "2003-10-17T12:30:30-07:00"},
		{"b", "POINT (1)", "2003-10-17T12:30:30-07:00"},
		{"c", "", "2003-10-17T12:30:30-07:00"},
		{"d", "POINT (1 2)", "not a time"},
	}
	var in enrich.Inputs
	in.Reset(len(rows))
	for i, r := range rows {
		x.Row(r, i, &in)
	}
	if in.Err[0] != nil || in.Lat[0] != 39.742476 || in.Lon[0] != -105.1786 ||
		!in.Time[0].Equal(time.Date(2003, 10, 17, 19, 30, 30, 0, time.UTC)) {
		t.Errorf("row 1: %v, lat %v, lon %v, time %v", in.Err[0], in.Lat[0], in.Lon[0], in.Time[0])
	}
	for i, want := range []struct {
		err error
		col string
	}{{ErrWKT, "wkt"}, {ErrEmpty, "wkt"}, {nil, "when"}} {
		var re *enrich.RowError
		if !errors.As(in.Err[i+1], &re) || re.Column != want.col || want.err != nil && !errors.Is(re, want.err) {
			t.Errorf("row %d: %v; want a row error in column %q wrapping %v", i+2, in.Err[i+1], want.col, want.err)
		}
	}

	for _, sel := range []enrich.Select{
		{Geometry: "wkt", Lat: "y", Time: "when"},
		{Geometry: "shape", Time: "when"},
	} {
		if _, err := New(header, sel); !errors.Is(err, enrich.ErrUsage) {
			t.Errorf("%+v: %v, want a usage error", sel, err)
		}
	}
}

// FuzzWKT: no panic and no hang on any text; a point read is finite.
func FuzzWKT(f *testing.F) {
	for _, s := range []string{"POINT (1 2)", "MULTIPOINT (1 2, 3 4)", "GEOMETRYCOLLECTION (POINT EMPTY, POINT Z (5 6 7))", "POLYGON ((0 0, 1 0, 1 1, 0 0))", "SRID=4326;LINESTRING (0 0, 1 1)"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		p, err := WKTPoint(s)
		if err != nil {
			if !errors.Is(err, ErrWKT) && !errors.Is(err, ErrEmpty) {
				t.Fatalf("%q: %v wraps neither ErrWKT nor ErrEmpty", s, err)
			}
			return
		}
		if math.IsNaN(p[0]) || math.IsNaN(p[1]) || math.IsInf(p[0], 0) || math.IsInf(p[1], 0) {
			t.Fatalf("%q: point %v is not finite", s, p)
		}
	})
}
