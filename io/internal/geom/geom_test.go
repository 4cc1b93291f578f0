package geom

import (
	"testing"

	"github.com/paulmach/orb"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestRepresentative(t *testing.T) {
	square := orb.Polygon{{{0, 0}, {2, 0}, {2, 2}, {0, 2}, {0, 0}}}
	cases := []struct {
		name string
		g    orb.Geometry
		want orb.Point
	}{
		{"point", orb.Point{10, 20}, orb.Point{10, 20}},
		{"multipoint first", orb.MultiPoint{{1, 2}, {3, 4}}, orb.Point{1, 2}},
		{"line halfway", orb.LineString{{0, 0}, {4, 0}}, orb.Point{2, 0}},
		{"bent line halfway along its length", orb.LineString{{0, 0}, {2, 0}, {2, 6}}, orb.Point{2, 2}},
		{"multiline longest", orb.MultiLineString{{{0, 0}, {1, 0}}, {{10, 10}, {10, 14}}}, orb.Point{10, 12}},
		{"square centroid", square, orb.Point{1, 1}},
		{"multipolygon", orb.MultiPolygon{square}, orb.Point{1, 1}},
		{"degenerate polygon", orb.Polygon{{{0, 0}, {2, 0}, {0, 0}}}, orb.Point{2.0 / 3, 0}},
		{"collection first non-empty", orb.Collection{orb.MultiPoint{}, orb.Point{5, 6}}, orb.Point{5, 6}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p, err := Representative(c.g)
			require.NoError(t, err)
			assert.InDelta(t, c.want[0], p[0], 1e-12)
			assert.InDelta(t, c.want[1], p[1], 1e-12)
		})
	}
}

func TestRepresentativeEmpty(t *testing.T) {
	for _, g := range []orb.Geometry{nil, orb.MultiPoint{}, orb.LineString{}, orb.Polygon{}, orb.Collection{}} {
		_, err := Representative(g)
		assert.ErrorIs(t, err, ErrEmpty, "%T", g)
	}
}

func TestBearing(t *testing.T) {
	// Common practice: due east along the equator is 90°, due north 0°.
	assert.InDelta(t, 90, Bearing(orb.Point{0, 0}, orb.Point{1, 0}), 1e-9)
	assert.InDelta(t, 0, Bearing(orb.Point{0, 0}, orb.Point{0, 1}), 1e-9)
	assert.InDelta(t, 270, Bearing(orb.Point{1, 0}, orb.Point{0, 0}), 1e-9)
	assert.InDelta(t, 180, Bearing(orb.Point{0, 1}, orb.Point{0, 0}), 1e-9)
}

func TestHeading(t *testing.T) {
	// Common practice: a line drawn west to east heads 90°, north to south 180°.
	cases := []struct {
		name string
		g    orb.Geometry
		want float64
	}{
		{"west to east", orb.LineString{{0, 10}, {1, 10}}, 90},
		{"north to south", orb.LineString{{5, 11}, {5, 10}}, 180},
		{"segment at the halfway point", orb.LineString{{0, 0}, {0, 1}, {3, 1}}, 90},
		{"longest line of a multiline", orb.MultiLineString{{{0, 0}, {0, 0.1}}, {{2, 0}, {0, 0}}}, 270},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h, err := Heading(c.g)
			require.NoError(t, err)
			assert.InDelta(t, c.want, h, 0.01)
		})
	}
	_, err := Heading(orb.Point{1, 2})
	assert.ErrorIs(t, err, ErrNotLine)
	_, err = Heading(orb.LineString{{1, 2}, {1, 2}})
	assert.ErrorIs(t, err, ErrNotLine)
}
