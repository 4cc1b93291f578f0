package parquet

import (
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/geom"
)

const geoWKB = `{"version":"1.1.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","geometry_types":[]}}}`

// wkbGeoFile writes a GeoParquet file whose rows hold the given WKB values
// (nil for null) and a timestamp each.
func wkbGeoFile(t testing.TB, geo string, values [][]byte) []byte {
	t.Helper()
	mem := memory.NewGoAllocator()
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "id", Type: arrow.PrimitiveTypes.Int32},
		{Name: "geometry", Type: arrow.BinaryTypes.Binary, Nullable: true},
		{Name: "timestamp", Type: tsUTC, Nullable: true},
	}, nil)
	if geo != "" {
		md := arrow.NewMetadata([]string{"geo"}, []string{geo})
		sc = arrow.NewSchema(sc.Fields(), &md)
	}
	b := array.NewRecordBuilder(mem, sc)
	defer b.Release()
	for i, v := range values {
		b.Field(0).(*array.Int32Builder).Append(int32(i + 1))
		if v == nil {
			b.Field(1).AppendNull()
		} else {
			b.Field(1).(*array.BinaryBuilder).Append(v)
		}
		b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(1718971200000)) // 2024-06-21T12:00:00Z
	}
	rec := b.NewRecordBatch()
	defer rec.Release()
	return writeRecords(t, sc, fileSpec{}, rec)
}

func mustWKB(t testing.TB, g orb.Geometry, order binary.ByteOrder) []byte {
	t.Helper()
	b, err := wkb.Marshal(g, order)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// isoZ writes a 3D ISO WKB geometry (type + 1000) of a point or a polygon.
func isoZ(typ uint32, rings [][][3]float64) []byte {
	b := []byte{1}
	b = binary.LittleEndian.AppendUint32(b, typ+1000)
	coord := func(c [3]float64) {
		for _, v := range c {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(v))
		}
	}
	if typ == 1 {
		coord(rings[0][0])
		return b
	}
	b = binary.LittleEndian.AppendUint32(b, uint32(len(rings)))
	for _, r := range rings {
		b = binary.LittleEndian.AppendUint32(b, uint32(len(r)))
		for _, c := range r {
			coord(c)
		}
	}
	return b
}

// TestGeoParquetWKB reads representative points from WKB geometries in
// every byte order and dimension, and the per-row problems.
func TestGeoParquetWKB(t *testing.T) {
	square := orb.Polygon{{{10, 40}, {12, 40}, {12, 44}, {10, 44}, {10, 40}}}
	lshape := orb.Polygon{{{0, 0}, {4, 0}, {4, 1}, {1, 1}, {1, 4}, {0, 4}, {0, 0}}}
	multi := orb.MultiPolygon{square, {{{-70, -30}, {-69, -30}, {-69, -29}, {-70, -29}, {-70, -30}}}}
	line := orb.LineString{{0, 0}, {2, 0}, {2, 2}}
	rep := func(g orb.Geometry) orb.Point {
		p, err := geom.Representative(g)
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	ewkb := mustWKB(t, orb.Point{-87.63, 41.88}, binary.LittleEndian)
	// EWKB with an SRID: the type's 0x20000000 flag, then the SRID.
	ewkb = append(append(append([]byte{1}, binary.LittleEndian.AppendUint32(nil, 0x20000001)...), binary.LittleEndian.AppendUint32(nil, 4326)...), ewkb[5:]...)
	rows := []struct {
		name  string
		wkb   []byte
		want  orb.Point
		cause error
	}{
		{"point, little-endian", mustWKB(t, orb.Point{-87.63, 41.88}, binary.LittleEndian), orb.Point{-87.63, 41.88}, nil},
		{"point, big-endian", mustWKB(t, orb.Point{151.2, -33.9}, binary.BigEndian), orb.Point{151.2, -33.9}, nil},
		{"ISO point Z", isoZ(1, [][][3]float64{{{2.35, 48.85, 35}}}), orb.Point{2.35, 48.85}, nil},
		{"EWKB point with SRID", ewkb, orb.Point{-87.63, 41.88}, nil},
		{"polygon: area centroid", mustWKB(t, square, binary.LittleEndian), rep(square), nil},
		{"concave polygon", mustWKB(t, lshape, binary.BigEndian), rep(lshape), nil},
		{"ISO polygon Z", isoZ(3, [][][3]float64{{{10, 40, 1}, {12, 40, 1}, {12, 44, 1}, {10, 44, 1}, {10, 40, 1}}}), rep(square), nil},
		{"multipolygon", mustWKB(t, multi, binary.LittleEndian), rep(multi), nil},
		{"linestring: halfway along", mustWKB(t, line, binary.LittleEndian), rep(line), nil},
		{"null geometry", nil, orb.Point{}, ErrGeometry},
		{"empty point (NaN coordinates)", mustWKB(t, orb.Point{math.NaN(), math.NaN()}, binary.LittleEndian), orb.Point{}, geom.ErrEmpty},
		{"empty polygon", mustWKB(t, orb.Polygon{}, binary.LittleEndian), orb.Point{}, geom.ErrEmpty},
		{"not WKB", []byte("POINT (1 2)"), orb.Point{}, ErrGeometry},
		{"cut short", mustWKB(t, square, binary.LittleEndian)[:30], orb.Point{}, ErrGeometry},
		{"infinite coordinate", mustWKB(t, orb.Point{math.Inf(1), 0}, binary.LittleEndian), orb.Point{}, ErrGeometry},
	}
	var values [][]byte
	for _, r := range rows {
		values = append(values, r.wkb)
	}
	got, err := extractAll(t, wkbGeoFile(t, geoWKB, values), enrich.Select{})
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range rows {
		if r.cause != nil {
			var re *enrich.RowError
			if !errors.As(got.Err[i], &re) || re.Column != "geometry" || !errors.Is(re, r.cause) {
				t.Errorf("%s: error %v; want a row error in column \"geometry\" matching %v", r.name, got.Err[i], r.cause)
			}
			continue
		}
		if got.Err[i] != nil {
			t.Errorf("%s: %v", r.name, got.Err[i])
			continue
		}
		if math.Abs(got.Lon[i]-r.want[0]) > 1e-12 || math.Abs(got.Lat[i]-r.want[1]) > 1e-12 {
			t.Errorf("%s: (lon %v, lat %v), want (%v, %v)", r.name, got.Lon[i], got.Lat[i], r.want[0], r.want[1])
		}
	}
}

// TestGeoParquetNativePoint reads GeoParquet 1.1's native point encoding.
func TestGeoParquetNativePoint(t *testing.T) {
	pt := arrow.StructOf(arrow.Field{Name: "x", Type: f64}, arrow.Field{Name: "y", Type: f64})
	geo := `{"version":"1.1.0","primary_column":"geom","columns":{"geom":{"encoding":"point","crs":{"id":{"authority":"OGC","code":"CRS84"},"name":"WGS 84 (CRS84)"}}}}`
	sc := arrow.NewSchema([]arrow.Field{fld("geom", pt), fld("timestamp", tsUTC)}, nil)
	in := makeFile(t, fileSpec{schema: sc, kv: map[string]string{"geo": geo}, json: `[
		{"geom": {"x": -87.63, "y": 41.88}, "timestamp": "2024-06-21T12:00:00Z"},
		{"geom": null, "timestamp": "2024-06-21T12:00:00Z"},
		{"geom": {"x": 151.2, "y": -33.9}, "timestamp": "2024-06-21T12:00:00Z"}]`})
	got, err := extractAll(t, in, enrich.Select{})
	if err != nil {
		t.Fatal(err)
	}
	if got.Err[0] != nil || got.Err[2] != nil || got.Lon[0] != -87.63 || got.Lat[0] != 41.88 || got.Lon[2] != 151.2 || got.Lat[2] != -33.9 {
		t.Errorf("points: lon %v lat %v errors %v", got.Lon, got.Lat, got.Err)
	}
	if !errors.Is(got.Err[1], ErrGeometry) {
		t.Errorf("null point: %v, want ErrGeometry", got.Err[1])
	}
}

// TestGeoParquetMetadata checks the crs and encoding rules, and the choice
// between the geometry and --lat/--lon.
func TestGeoParquetMetadata(t *testing.T) {
	point := mustWKB(t, orb.Point{-87.63, 41.88}, binary.LittleEndian)
	cases := []struct {
		name  string
		geo   string
		sel   enrich.Select
		cause error // nil: the point is read
	}{
		{"crs absent", geoWKB, enrich.Select{}, nil},
		{"crs OGC:CRS84 as PROJJSON", `{"version":"1.0.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","crs":{"type":"GeographicCRS","name":"WGS 84 (CRS84)","id":{"authority":"OGC","code":"CRS84"}}}}}`, enrich.Select{}, nil},
		{"crs EPSG:4326 as PROJJSON", `{"version":"1.0.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","crs":{"name":"WGS 84","id":{"authority":"EPSG","code":4326}}}}}`, enrich.Select{}, nil},
		{"crs as text", `{"version":"1.1.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","crs":"OGC:CRS84"}}}`, enrich.Select{}, nil},
		{"crs UTM", `{"version":"1.0.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","crs":{"name":"WGS 84 / UTM zone 33N","id":{"authority":"EPSG","code":32633}}}}}`, enrich.Select{}, ErrCRS},
		{"crs null (undefined)", `{"version":"1.0.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","crs":null}}}`, enrich.Select{}, ErrCRS},
		{"native linestring encoding", `{"version":"1.1.0","primary_column":"geometry","columns":{"geometry":{"encoding":"linestring"}}}`, enrich.Select{}, ErrGeo},
		{"geo metadata not JSON", `{"version":`, enrich.Select{}, ErrGeo},
		{"primary column missing", `{"version":"1.1.0","primary_column":"geom","columns":{"geom":{"encoding":"WKB"}}}`, enrich.Select{}, enrich.ErrUsage},
		{"--geometry on a file without geo metadata", "", enrich.Select{Geometry: "geometry"}, nil},
		{"--geometry on a non-binary column", "", enrich.Select{Geometry: "id"}, ErrColumnType},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := extractAll(t, wkbGeoFile(t, tc.geo, [][]byte{point}), tc.sel)
			if tc.cause != nil {
				if !errors.Is(err, tc.cause) {
					t.Fatalf("error %v, want %v", err, tc.cause)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if got.Err[0] != nil || got.Lon[0] != -87.63 || got.Lat[0] != 41.88 {
				t.Errorf("point (%v, %v), error %v", got.Lon[0], got.Lat[0], got.Err[0])
			}
		})
	}
}

// TestGeoParquetOutput enriches a GeoParquet file and checks that its "geo"
// metadata is written back byte for byte, and that the sun columns match a
// run on the same points given as --lat/--lon columns.
func TestGeoParquetOutput(t *testing.T) {
	geo := `{"version":"1.1.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","geometry_types":["Point","Polygon"],"bbox":[10,40,12,44]}},"creator":{"library":"test"}}`
	square := orb.Polygon{{{10, 40}, {12, 40}, {12, 44}, {10, 44}, {10, 40}}}
	in := wkbGeoFile(t, geo, [][]byte{mustWKB(t, orb.Point{11, 42}, binary.LittleEndian), mustWKB(t, square, binary.LittleEndian)})
	r := enrichFile(t, in, runOpts{})
	if r.err != nil {
		t.Fatal(r.err)
	}
	pf, err := file.NewParquetReader(bytes.NewReader(r.out))
	if err != nil {
		t.Fatal(err)
	}
	defer pf.Close()
	if v := pf.MetaData().KeyValueMetadata().FindValue("geo"); v == nil || *v != geo {
		t.Errorf("geo metadata %v, want it unchanged: %s", v, geo)
	}
	mem := checkedMem(t)
	tbl := readTable(t, r.out, mem)
	defer tbl.Release()
	alt := column(t, tbl, "sun_altitude_deg", mem)
	defer alt.Release()
	// The square's representative point is its centroid (11, 42): the same sun as row 1.
	a := alt.(*array.Float64)
	if a.IsNull(0) || a.Value(0) != a.Value(1) {
		t.Errorf("altitudes %v: the point and the square around it must give the same sun", a)
	}
}
