package parquet

import (
	"bytes"
	"errors"
	"io"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/arrow/array"
	pqgo "github.com/parquet-go/parquet-go"

	"github.com/heliotag/heliotag/enrich"
)

// TestReadBackWithParquetGo reads the output with a second, independent
// Parquet implementation (github.com/parquet-go/parquet-go) and compares
// every row of the flat columns with what arrow-go reads.
func TestReadBackWithParquetGo(t *testing.T) {
	in := generated(t, 5000, 4)
	r := enrichFile(t, in, runOpts{policy: enrich.PolicyKeep, batch: 999, writer: WriterOptions{RowGroupRows: 2000}})
	if r.err != nil {
		t.Fatal(r.err)
	}
	f, err := pqgo.OpenFile(bytes.NewReader(r.out), int64(len(r.out)))
	if err != nil {
		t.Fatalf("parquet-go cannot open the output: %v", err)
	}
	if f.NumRows() != 5000 || len(f.RowGroups()) != 3 {
		t.Fatalf("parquet-go sees %d rows in %d row groups; want 5000 in 3", f.NumRows(), len(f.RowGroups()))
	}
	// Leaf columns, in order, as parquet-go names them.
	var leaves []string
	for _, path := range f.Schema().Columns() {
		leaves = append(leaves, strings.Join(path, "."))
	}
	wantLeaves := "lat lon timestamp tags.list.element name sun_altitude_deg sun_azimuth_deg sun_phase sun_light_condition sun_error"
	if strings.Join(leaves, " ") != wantLeaves {
		t.Fatalf("parquet-go leaves %q, want %q", leaves, wantLeaves)
	}
	for _, name := range []string{"sun_phase", "sun_light_condition", "sun_error"} {
		col, _ := f.Schema().Lookup(name)
		if lt := col.Node.Type().LogicalType(); lt == nil || lt.String() != "STRING" {
			t.Errorf("parquet-go: %s is %v, want a UTF-8 string", name, col.Node.Type())
		}
	}
	col, _ := f.Schema().Lookup("timestamp")
	if lt := col.Node.Type().LogicalType(); lt == nil || lt.String() != "TIMESTAMP(isAdjustedToUTC=true,unit=MILLIS)" {
		t.Errorf("parquet-go: timestamp is %v, want a UTC-adjusted timestamp", col.Node.Type())
	}

	// The same values through arrow-go.
	mem := checkedMem(t)
	tbl := readTable(t, r.out, mem)
	defer tbl.Release()
	names := []string{"lat", "lon", "timestamp", "name", "sun_altitude_deg", "sun_azimuth_deg", "sun_phase", "sun_light_condition", "sun_error"}
	leafOf := map[string]int{}
	for i, l := range leaves {
		leafOf[l] = i
	}
	cols := map[string][]string{}
	for _, n := range names {
		a := column(t, tbl, n, mem)
		for i := range a.Len() {
			cols[n] = append(cols[n], valueText(a, i))
		}
		if n == "timestamp" {
			raw := array.NewInt64Data(a.Data()) // parquet-go gives the stored count
			for i := range a.Len() {
				cols[n][i] = valueText(raw, i)
			}
			raw.Release()
		}
		a.Release()
	}

	row := 0
	buf := make([]pqgo.Row, 256)
	for _, rg := range f.RowGroups() {
		rows := rg.Rows()
		for {
			n, err := rows.ReadRows(buf)
			for _, pr := range buf[:n] {
				got := map[int]string{}
				for _, v := range pr {
					got[v.Column()] = pqgoText(v)
				}
				for _, name := range names {
					if g, w := got[leafOf[name]], cols[name][row]; g != w {
						t.Fatalf("row %d column %s: parquet-go %q, arrow-go %q", row+1, name, g, w)
					}
				}
				row++
			}
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
		}
		rows.Close()
	}
	if row != 5000 {
		t.Errorf("parquet-go read %d rows, want 5000", row)
	}
}

// pqgoText renders a parquet-go value like valueText renders Arrow values
// for the flat column types of the test.
func pqgoText(v pqgo.Value) string {
	if v.IsNull() {
		return ""
	}
	switch v.Kind() {
	case pqgo.Double:
		return formatFloat(v.Double(), 64)
	case pqgo.ByteArray:
		return string(v.ByteArray())
	}
	return v.String()
}
