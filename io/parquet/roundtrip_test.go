package parquet

import (
	"bytes"
	"fmt"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"

	"github.com/heliotag/heliotag/enrich"
)

// allTypes is an input with a column of every kind issue 5 lists: nested
// (list, struct, map), dictionary, decimal, date, time, and timestamps with
// and without a zone, nullable and not.
var allTypes = fileSpec{
	schema: arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64},
		{Name: "lon", Type: arrow.PrimitiveTypes.Float64},
		{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Millisecond, TimeZone: "UTC"}},
		{Name: "i8", Type: arrow.PrimitiveTypes.Int8, Nullable: true},
		{Name: "i16", Type: arrow.PrimitiveTypes.Int16, Nullable: true},
		{Name: "i32", Type: arrow.PrimitiveTypes.Int32},
		{Name: "i64", Type: arrow.PrimitiveTypes.Int64, Nullable: true},
		{Name: "u8", Type: arrow.PrimitiveTypes.Uint8, Nullable: true},
		{Name: "u16", Type: arrow.PrimitiveTypes.Uint16, Nullable: true},
		{Name: "u32", Type: arrow.PrimitiveTypes.Uint32, Nullable: true},
		{Name: "u64", Type: arrow.PrimitiveTypes.Uint64, Nullable: true},
		{Name: "f32", Type: arrow.PrimitiveTypes.Float32, Nullable: true},
		{Name: "f64", Type: arrow.PrimitiveTypes.Float64, Nullable: true},
		{Name: "flag", Type: arrow.FixedWidthTypes.Boolean, Nullable: true},
		{Name: "text", Type: arrow.BinaryTypes.String, Nullable: true},
		{Name: "large_text", Type: arrow.BinaryTypes.LargeString, Nullable: true},
		{Name: "blob", Type: arrow.BinaryTypes.Binary, Nullable: true},
		{Name: "fixed", Type: &arrow.FixedSizeBinaryType{ByteWidth: 3}, Nullable: true},
		{Name: "dec", Type: &arrow.Decimal128Type{Precision: 12, Scale: 3}, Nullable: true},
		{Name: "dec256", Type: &arrow.Decimal256Type{Precision: 40, Scale: 5}, Nullable: true},
		{Name: "d32", Type: arrow.FixedWidthTypes.Date32, Nullable: true},
		{Name: "d64", Type: arrow.FixedWidthTypes.Date64, Nullable: true},
		{Name: "t32", Type: arrow.FixedWidthTypes.Time32ms, Nullable: true},
		{Name: "t64", Type: arrow.FixedWidthTypes.Time64us, Nullable: true},
		{Name: "ts_local", Type: &arrow.TimestampType{Unit: arrow.Microsecond}, Nullable: true},
		{Name: "ts_ns_zone", Type: &arrow.TimestampType{Unit: arrow.Nanosecond, TimeZone: "America/Chicago"}, Nullable: true},
		{Name: "ts_s", Type: &arrow.TimestampType{Unit: arrow.Second, TimeZone: "UTC"}, Nullable: true},
		{Name: "list", Type: arrow.ListOf(arrow.PrimitiveTypes.Int32), Nullable: true},
		{Name: "strct", Type: arrow.StructOf(
			arrow.Field{Name: "a", Type: arrow.PrimitiveTypes.Int32, Nullable: true},
			arrow.Field{Name: "b", Type: arrow.BinaryTypes.String, Nullable: true}), Nullable: true},
		{Name: "mp", Type: arrow.MapOf(arrow.BinaryTypes.String, arrow.PrimitiveTypes.Int32), Nullable: true},
		{Name: "dict", Type: &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int16, ValueType: arrow.BinaryTypes.String}, Nullable: true},
		{Name: "list_struct", Type: arrow.ListOf(arrow.StructOf(arrow.Field{Name: "x", Type: arrow.PrimitiveTypes.Float64, Nullable: true})), Nullable: true},
	}, nil),
	json: `[
{"lat": 51.4769, "lon": 0, "timestamp": "2024-06-21T12:00:00Z", "i8": -8, "i16": 1600, "i32": 32, "i64": -64, "u8": 8, "u16": 16, "u32": 4000000000, "u64": 18000000000000000000,
 "f32": 1.5, "f64": 2.25, "flag": true, "text": "ä", "large_text": "big", "blob": "AAEC", "fixed": "YWJj", "dec": "123.456", "dec256": "1234567890.12345",
 "d32": "2024-06-21", "d64": "2024-06-21", "t32": "12:30:00.250", "t64": "23:59:59.999999", "ts_local": "2024-06-21T18:30:00", "ts_ns_zone": "2024-06-21T18:30:00.123456789Z", "ts_s": "2024-06-21T18:30:00Z",
 "list": [1, 2, null], "strct": {"a": 1, "b": "x"}, "mp": [{"key": "k", "value": 1}], "dict": "red", "list_struct": [{"x": 1.5}]},
{"lat": 40, "lon": -105, "timestamp": "2024-06-21T20:45:00Z", "i32": 0, "list": [], "strct": {"a": null, "b": null}, "mp": [], "dict": "blue", "list_struct": []},
{"lat": 40, "lon": -105, "timestamp": "2024-06-22T20:45:00Z", "i8": 127, "i16": -32768, "i32": -2147483648, "i64": 9223372036854775807, "u8": 255, "u16": 65535, "u32": 0, "u64": 0,
 "f32": -0.0, "f64": 1e300, "flag": false, "text": "", "large_text": "", "blob": "", "fixed": "AAAA", "dec": "-999999999.999", "dec256": "-0.00001",
 "d32": "1970-01-01", "d64": "1900-01-01", "t32": "00:00:00", "t64": "00:00:00", "ts_local": "1969-12-31T23:59:59.5", "ts_ns_zone": "1970-01-01T00:00:00Z", "ts_s": "2038-01-19T03:14:08Z",
 "list": null, "strct": null, "mp": null, "dict": null, "list_struct": null},
{"lat": 95, "lon": 10, "timestamp": "2024-01-01T00:00:00Z", "i32": 4, "dict": "red"},
{"lat": -33.9, "lon": 151.2, "timestamp": "2024-12-21T00:00:00Z", "i32": 5, "text": "keep me", "dict": "green", "list": [7]},
{"lat": 0, "lon": 0, "timestamp": "2024-03-20T03:06:00Z", "i32": 6, "text": "row 6", "mp": [{"key": "a", "value": null}, {"key": "b", "value": 2}]},
{"lat": 89.9, "lon": -179.9, "timestamp": "2024-06-21T00:00:00Z", "i32": 7, "dec": "0.001"},
{"lat": -89.9, "lon": 179.9, "timestamp": "2024-06-21T00:00:00Z", "i32": 8, "t64": "12:00:00"}
]`,
	kv: map[string]string{"owner": "field team", "pandas": `{"index_columns": []}`},
}

// TestRoundTripTypes writes inputs with every column type, enriches them
// (with a rejected row in the middle, so kept rows are gathered from several
// slices), and compares every original column of the output with the input:
// Arrow type, nullability, values; and, at the Parquet level, each leaf's
// path, physical and logical type and repetition.
func TestRoundTripTypes(t *testing.T) {
	for _, stored := range []bool{true, false} {
		for _, policy := range []enrich.Policy{enrich.PolicySkip, enrich.PolicyKeep} {
			name := fmt.Sprintf("stored_schema=%v/%s", stored, policy)
			t.Run(name, func(t *testing.T) {
				spec := allTypes
				spec.noSchema = !stored
				spec.rowGroupLen = 3
				spec.codec = compress.Codecs.Zstd
				in := makeFile(t, spec)
				r := enrichFile(t, in, runOpts{policy: policy, batch: 2})
				if r.err != nil {
					t.Fatal(r.err)
				}
				wantRejected := int64(0)
				keep := []int{0, 1, 2, 3, 4, 5, 6, 7}
				if policy == enrich.PolicySkip {
					wantRejected = 1
					keep = []int{0, 1, 2, 4, 5, 6, 7} // row 4 (index 3) has latitude 95
				}
				if r.sum.Read != 8 || r.sum.Rejected != wantRejected || r.sum.Written != int64(len(keep)) {
					t.Fatalf("summary %+v; want 8 read, %d rejected", r.sum, wantRejected)
				}
				compareColumns(t, in, r.out, keep)
				compareLeaves(t, in, r.out)
				compareMetadata(t, in, r.out)
			})
		}
	}
}

// compareColumns checks that each input column is in the output with the
// same type and nullability, holding the input's rows keep.
func compareColumns(t *testing.T, in, out []byte, keep []int) {
	t.Helper()
	mem := checkedMem(t)
	it := readTable(t, in, mem)
	defer it.Release()
	ot := readTable(t, out, mem)
	defer ot.Release()
	if ot.NumRows() != int64(len(keep)) {
		t.Fatalf("output has %d rows, want %d", ot.NumRows(), len(keep))
	}
	for j, f := range it.Schema().Fields() {
		of := ot.Schema().Field(j)
		if of.Name != f.Name || !arrow.TypeEqual(of.Type, f.Type) || of.Nullable != f.Nullable {
			t.Errorf("column %d: output %s (nullable %v), input %s (nullable %v)", j, of, of.Nullable, f, f.Nullable)
			continue
		}
		ia := column(t, it, f.Name, mem)
		oa := column(t, ot, f.Name, mem)
		var parts []arrow.Array
		for _, i := range keep {
			parts = append(parts, array.NewSlice(ia, int64(i), int64(i+1)))
		}
		want, err := array.Concatenate(parts, mem)
		if err != nil {
			t.Fatal(err)
		}
		if !array.Equal(want, oa) {
			t.Errorf("column %q:\n got %v\nwant %v", f.Name, oa, want)
		}
		for _, p := range parts {
			p.Release()
		}
		want.Release()
		ia.Release()
		oa.Release()
	}
}

// compareLeaves checks the Parquet schema: every input leaf column is in
// the output with the same path, physical type, logical type and repetition.
func compareLeaves(t *testing.T, in, out []byte) {
	t.Helper()
	ir, err := file.NewParquetReader(bytes.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	defer ir.Close()
	or, err := file.NewParquetReader(bytes.NewReader(out))
	if err != nil {
		t.Fatal(err)
	}
	defer or.Close()
	is, os := ir.MetaData().Schema, or.MetaData().Schema
	for i := range is.NumColumns() {
		ic, oc := is.Column(i), os.Column(i)
		if ic.ColumnPath().String() != oc.ColumnPath().String() || ic.PhysicalType() != oc.PhysicalType() ||
			!ic.LogicalType().Equals(oc.LogicalType()) || ic.MaxDefinitionLevel() != oc.MaxDefinitionLevel() ||
			ic.MaxRepetitionLevel() != oc.MaxRepetitionLevel() {
			t.Errorf("leaf %d: output %s %s %s (def %d rep %d), input %s %s %s (def %d rep %d)", i,
				oc.ColumnPath(), oc.PhysicalType(), oc.LogicalType(), oc.MaxDefinitionLevel(), oc.MaxRepetitionLevel(),
				ic.ColumnPath(), ic.PhysicalType(), ic.LogicalType(), ic.MaxDefinitionLevel(), ic.MaxRepetitionLevel())
		}
	}
	// The input's codec is kept (first row group, every column).
	icc, _ := ir.MetaData().RowGroup(0).ColumnChunk(0)
	for i := range os.NumColumns() {
		occ, err := or.MetaData().RowGroup(0).ColumnChunk(i)
		if err != nil {
			t.Fatal(err)
		}
		if occ.Compression() != icc.Compression() {
			t.Errorf("leaf %s: codec %s, input's %s", os.Column(i).ColumnPath(), occ.Compression(), icc.Compression())
		}
	}
}

// compareMetadata checks that the file's key-value metadata is carried over
// in order, the stored Arrow schema excepted (it describes the new columns).
func compareMetadata(t *testing.T, in, out []byte) {
	t.Helper()
	ir, err := file.NewParquetReader(bytes.NewReader(in))
	if err != nil {
		t.Fatal(err)
	}
	defer ir.Close()
	or, err := file.NewParquetReader(bytes.NewReader(out))
	if err != nil {
		t.Fatal(err)
	}
	defer or.Close()
	list := func(r *file.Reader) []string {
		var kv []string
		md := r.MetaData().KeyValueMetadata()
		for i, k := range md.Keys() {
			if k != "ARROW:schema" {
				kv = append(kv, k+"="+md.Values()[i])
			}
		}
		return kv
	}
	got, want := list(or), list(ir)
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("key-value metadata\n got %q\nwant %q", got, want)
	}
	if or.MetaData().KeyValueMetadata().FindValue("ARROW:schema") == nil {
		t.Error("the output does not store its Arrow schema")
	}
}

// TestAddedColumnTypes checks the types of the added columns (instants as
// timestamp[us, UTC]), under keep (which adds sun_error) with a zone (which
// adds sun_time_note).
func TestAddedColumnTypes(t *testing.T) {
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64, Nullable: true},
		{Name: "lon", Type: arrow.PrimitiveTypes.Float64, Nullable: true},
		{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Microsecond}, Nullable: true},
	}, nil)
	in := makeFile(t, fileSpec{schema: sc, json: `[
		{"lat": 41.88, "lon": -87.63, "timestamp": "2024-11-03T01:30:00"},
		{"lat": 41.88, "lon": -87.63, "timestamp": "2024-03-10T02:30:00"},
		{"lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T12:00:00"}]`})
	r := enrichFile(t, in, runOpts{policy: enrich.PolicyKeep, sel: enrich.Select{TZ: "America/Chicago"}, add: "position,phase,events"})
	if r.err != nil {
		t.Fatal(r.err)
	}
	mem := checkedMem(t)
	tbl := readTable(t, r.out, mem)
	defer tbl.Release()
	want := map[string]arrow.DataType{
		"sun_altitude_deg":    arrow.PrimitiveTypes.Float64,
		"sun_azimuth_deg":     arrow.PrimitiveTypes.Float64,
		"sun_phase":           &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int32, ValueType: arrow.BinaryTypes.String},
		"sun_light_condition": &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int32, ValueType: arrow.BinaryTypes.String},
		"sun_rise":            &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"},
		"sun_day_length_min":  arrow.PrimitiveTypes.Float64,
		"sun_time_note":       arrow.BinaryTypes.String,
		"sun_error":           arrow.BinaryTypes.String,
	}
	for name, typ := range want {
		idx := tbl.Schema().FieldIndices(name)
		if len(idx) != 1 {
			t.Errorf("no column %q in %s", name, tbl.Schema())
			continue
		}
		if f := tbl.Schema().Field(idx[0]); !arrow.TypeEqual(f.Type, typ) || !f.Nullable {
			t.Errorf("column %q is %s (nullable %v), want nullable %s", name, f.Type, f.Nullable, typ)
		}
	}
	// Row 1 is in the fall-back overlap (noted), row 2 in the spring-forward
	// gap (kept with its error, sun columns null), row 3 is ordinary.
	note := column(t, tbl, "sun_time_note", mem)
	defer note.Release()
	errs := column(t, tbl, "sun_error", mem)
	defer errs.Release()
	alt := column(t, tbl, "sun_altitude_deg", mem)
	defer alt.Release()
	phase := column(t, tbl, "sun_phase", mem)
	defer phase.Release()
	if got := valueText(note, 0); got != "ambiguous_local_time" {
		t.Errorf("row 1 sun_time_note %q, want ambiguous_local_time", got)
	}
	if !note.IsNull(2) || !errs.IsNull(0) || !errs.IsNull(2) {
		t.Errorf("empty notes and errors must be null: note %v, error %v", note, errs)
	}
	if errs.IsNull(1) || !strings.Contains(valueText(errs, 1), "does not exist") {
		t.Errorf("row 2 sun_error %q; want the spring-forward gap", valueText(errs, 1))
	}
	if !alt.IsNull(1) || !phase.IsNull(1) || alt.IsNull(0) || phase.IsNull(2) {
		t.Errorf("sun columns must be null exactly on the kept bad row: altitude %v, phase %v", alt, phase)
	}
}
