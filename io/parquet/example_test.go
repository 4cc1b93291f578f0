package parquet_test

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/parquet"
)

// A Parquet file of camera-trap detections with a local (zone-less)
// timestamp column, enriched with the default columns in Europe/Berlin. (At
// midsummer Berlin's sun culminates near 90° − |52.5° − 23.4°| = 60.9°,
// common practice, at about 13:07 CEST; by 23:30 it is in nautical twilight.)
func Example() {
	// The input: two rows, written with arrow-go.
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64},
		{Name: "lon", Type: arrow.PrimitiveTypes.Float64},
		{Name: "seen", Type: &arrow.TimestampType{Unit: arrow.Millisecond}}, // not adjusted to UTC
	}, nil)
	rec, _, err := array.RecordFromJSON(memory.DefaultAllocator, sc, strings.NewReader(`[
		{"lat": 52.52, "lon": 13.40, "seen": "2024-06-21T12:00:00"},
		{"lat": 52.52, "lon": 13.40, "seen": "2024-06-21T23:30:00"}]`))
	if err != nil {
		fmt.Println(err)
		return
	}
	var in bytes.Buffer
	if err := pqarrow.WriteTable(array.NewTableFromRecords(sc, []arrow.RecordBatch{rec}), &in, 1024, nil, pqarrow.DefaultWriterProps()); err != nil {
		fmt.Println(err)
		return
	}

	// Read, enrich, write.
	rd, err := parquet.NewReader(bytes.NewReader(in.Bytes()), parquet.Options{
		Select: enrich.Select{Time: "seen", TZ: "Europe/Berlin"},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer rd.Close()
	plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns()})
	if err != nil {
		fmt.Println(err)
		return
	}
	var out bytes.Buffer
	w, err := parquet.NewWriter(&out, rd, plan, parquet.WriterOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	sum, err := enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan})
	if err == nil {
		err = w.Close()
	}
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(sum.Read, "rows read,", sum.Written, "written")

	// The output read back.
	back, err := parquet.NewReader(bytes.NewReader(out.Bytes()), parquet.Options{Select: enrich.Select{Time: "seen", TZ: "Europe/Berlin"}})
	if err != nil {
		fmt.Println(err)
		return
	}
	defer back.Close()
	for _, f := range back.Schema().Fields()[3:] {
		fmt.Printf("%s: %s\n", f.Name, f.Type)
	}
	c, err := back.Next(context.Background(), 100)
	if err != nil && err != io.EOF {
		fmt.Println(err)
		return
	}
	for i := range c.Len() {
		v := c.Values(i)
		fmt.Printf("%s alt %.1f %s %s\n", v[2], mustFloat(v[3]), v[5], v[6])
	}
	// Output:
	// 2 rows read, 2 written
	// sun_altitude_deg: float64
	// sun_azimuth_deg: float64
	// sun_phase: dictionary<values=utf8, indices=int32, ordered=false>
	// sun_light_condition: dictionary<values=utf8, indices=int32, ordered=false>
	// 2024-06-21T12:00:00 alt 58.1 day daylight
	// 2024-06-21T23:30:00 alt -11.1 evening_nautical dark
}

func mustFloat(s string) float64 {
	var v float64
	fmt.Sscan(s, &v)
	return v
}
