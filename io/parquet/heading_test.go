package parquet

import (
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/paulmach/orb"
	"github.com/paulmach/orb/encoding/wkb"

	"github.com/heliotag/heliotag/enrich"
)

// TestGlareHeadings: the glare group from a text heading column (compass
// words), a numeric one, and a WKB line geometry. At 17:30 CDT on 2024-03-20
// at 41.9° N the sun stands low in the west-south-west (about 17° up, azimuth
// 254°; the same case as the CSV golden glare.txtar).
func TestGlareHeadings(t *testing.T) {
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64},
		{Name: "lon", Type: arrow.PrimitiveTypes.Float64},
		{Name: "timestamp", Type: arrow.BinaryTypes.String},
		{Name: "dir", Type: arrow.BinaryTypes.String},
		{Name: "deg", Type: arrow.PrimitiveTypes.Float64},
	}, nil)
	in := makeFile(t, fileSpec{schema: sc, json: `[
		{"lat": 41.9, "lon": -88.8, "timestamp": "2024-03-20T17:30:00-05:00", "dir": "WB", "deg": 270},
		{"lat": 41.9, "lon": -88.8, "timestamp": "2024-03-20T17:30:00-05:00", "dir": "EB", "deg": 90},
		{"lat": 41.9, "lon": -88.8, "timestamp": "2024-03-20T17:30:00-05:00", "dir": "S", "deg": 180},
		{"lat": 41.9, "lon": -88.8, "timestamp": "2024-03-20T17:30:00-05:00", "dir": "400", "deg": 400}
	]`})
	for _, col := range []string{"dir", "deg"} {
		t.Run(col, func(t *testing.T) {
			r := enrichFile(t, in, runOpts{sel: enrich.Select{Heading: col}, add: "glare", policy: enrich.PolicyKeep})
			if r.err != nil {
				t.Fatal(r.err)
			}
			mem := checkedMem(t)
			tbl := readTable(t, r.out, mem)
			defer tbl.Release()
			g := column(t, tbl, "sun_glare", mem)
			defer g.Release()
			e := column(t, tbl, "sun_error", mem)
			defer e.Release()
			want := []string{"ahead", "behind", "none", ""}
			for i, w := range want {
				if got := valueText(g, i); got != w && !(w == "" && g.IsNull(i)) {
					t.Errorf("row %d: sun_glare %q, want %q", i+1, got, w)
				}
			}
			if e.IsNull(3) || valueText(e, 3) == "" {
				t.Errorf("row 4: a heading of 400 should be a bad row with sun_error")
			}
		})
	}
	t.Run("geometry", func(t *testing.T) {
		line := func(ls orb.LineString) []byte {
			b, err := wkb.Marshal(ls)
			if err != nil {
				t.Fatal(err)
			}
			return b
		}
		gsc := arrow.NewSchema([]arrow.Field{
			{Name: "timestamp", Type: arrow.BinaryTypes.String},
			{Name: "road", Type: arrow.BinaryTypes.Binary},
		}, nil)
		mem := checkedMem(t)
		bld := array.NewRecordBuilder(mem, gsc)
		defer bld.Release()
		bld.Field(0).(*array.StringBuilder).AppendValues([]string{"2024-03-20T17:30:00-05:00", "2024-03-20T17:30:00-05:00"}, nil)
		bld.Field(1).(*array.BinaryBuilder).AppendValues([][]byte{
			line(orb.LineString{{-88.80, 41.9}, {-88.81, 41.9}}), // drawn westwards
			line(orb.LineString{{-88.81, 41.9}, {-88.80, 41.9}}), // drawn eastwards
		}, nil)
		rec := bld.NewRecordBatch()
		defer rec.Release()
		in := writeRecords(t, gsc, fileSpec{}, rec)
		r := enrichFile(t, in, runOpts{sel: enrich.Select{Geometry: "road", HeadingFromGeometry: true}, add: "glare"})
		if r.err != nil {
			t.Fatal(r.err)
		}
		tbl := readTable(t, r.out, mem)
		defer tbl.Release()
		g := column(t, tbl, "sun_glare", mem)
		defer g.Release()
		if valueText(g, 0) != "ahead" || valueText(g, 1) != "behind" {
			t.Errorf("sun_glare %q, %q; want ahead, behind", valueText(g, 0), valueText(g, 1))
		}
	})
}
