package parquet

import (
	"bytes"
	"encoding/base64"
	"encoding/binary"
	"errors"
	"fmt"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/flight"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestCellText renders one value of each Arrow type a Camtrap DP table's
// Parquet file may hold, and a null, as the text a CSV file would hold.
func TestCellText(t *testing.T) {
	mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
	defer mem.AssertSize(t, 0)
	// 2024-06-12T20:47:05.123456Z in microseconds since the Unix epoch.
	us := time.Date(2024, 6, 12, 20, 47, 5, 123456000, time.UTC).UnixMicro()
	cases := []struct {
		name string
		ty   arrow.DataType
		add  func(b array.Builder)
		want string
	}{
		{"string", arrow.BinaryTypes.String, func(b array.Builder) { b.(*array.StringBuilder).Append("obs-1, \"x\"") }, "obs-1, \"x\""},
		{"large string", arrow.BinaryTypes.LargeString, func(b array.Builder) { b.(*array.LargeStringBuilder).Append("dep-1") }, "dep-1"},
		{"binary utf-8", arrow.BinaryTypes.Binary, func(b array.Builder) { b.(*array.BinaryBuilder).Append([]byte("med-1")) }, "med-1"},
		{"binary other", arrow.BinaryTypes.Binary, func(b array.Builder) { b.(*array.BinaryBuilder).Append([]byte{0xff, 0x01}) }, "ff01"},
		{"bool", arrow.FixedWidthTypes.Boolean, func(b array.Builder) { b.(*array.BooleanBuilder).Append(true) }, "true"},
		{"int8", arrow.PrimitiveTypes.Int8, func(b array.Builder) { b.(*array.Int8Builder).Append(-5) }, "-5"},
		{"int32", arrow.PrimitiveTypes.Int32, func(b array.Builder) { b.(*array.Int32Builder).Append(360) }, "360"},
		{"int64", arrow.PrimitiveTypes.Int64, func(b array.Builder) { b.(*array.Int64Builder).Append(-9007199254740993) }, "-9007199254740993"},
		{"uint16", arrow.PrimitiveTypes.Uint16, func(b array.Builder) { b.(*array.Uint16Builder).Append(270) }, "270"},
		{"uint64", arrow.PrimitiveTypes.Uint64, func(b array.Builder) { b.(*array.Uint64Builder).Append(18446744073709551615) }, "18446744073709551615"},
		{"float64", arrow.PrimitiveTypes.Float64, func(b array.Builder) { b.(*array.Float64Builder).Append(54.512) }, "54.512"},
		{"float64 small", arrow.PrimitiveTypes.Float64, func(b array.Builder) { b.(*array.Float64Builder).Append(0.00001) }, "0.00001"}, // as valueText: plain between 1e-6 and 1e21
		{"float64 tiny", arrow.PrimitiveTypes.Float64, func(b array.Builder) { b.(*array.Float64Builder).Append(1e-9) }, "1e-09"},
		{"float32", arrow.PrimitiveTypes.Float32, func(b array.Builder) { b.(*array.Float32Builder).Append(-2.931) }, "-2.931"},
		{"timestamp UTC", &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"},
			func(b array.Builder) { b.(*array.TimestampBuilder).Append(arrow.Timestamp(us)) }, "2024-06-12T20:47:05.123456Z"},
		{"timestamp s UTC", &arrow.TimestampType{Unit: arrow.Second, TimeZone: "UTC"},
			func(b array.Builder) { b.(*array.TimestampBuilder).Append(arrow.Timestamp(us / 1e6)) }, "2024-06-12T20:47:05Z"},
		{"timestamp ms +01:00", &arrow.TimestampType{Unit: arrow.Millisecond, TimeZone: "+01:00"},
			func(b array.Builder) { b.(*array.TimestampBuilder).Append(arrow.Timestamp(us / 1e3)) }, "2024-06-12T21:47:05.123+01:00"},
		// Pacific/Auckland is UTC+12 in June (common practice: New Zealand Standard Time; daylight saving is September to April).
		{"timestamp ns Pacific/Auckland", &arrow.TimestampType{Unit: arrow.Nanosecond, TimeZone: "Pacific/Auckland"},
			func(b array.Builder) { b.(*array.TimestampBuilder).Append(arrow.Timestamp(us * 1e3)) }, "2024-06-13T08:47:05.123456+12:00"},
		{"timestamp without zone", &arrow.TimestampType{Unit: arrow.Microsecond},
			func(b array.Builder) { b.(*array.TimestampBuilder).Append(arrow.Timestamp(us)) }, "2024-06-12T20:47:05.123456"},
		{"date32", arrow.FixedWidthTypes.Date32, func(b array.Builder) { b.(*array.Date32Builder).Append(arrow.Date32(19886)) }, "2024-06-12"},
		{"date64", arrow.FixedWidthTypes.Date64, func(b array.Builder) { b.(*array.Date64Builder).Append(arrow.Date64(19886 * 86400000)) }, "2024-06-12"},
		{"time32 s", arrow.FixedWidthTypes.Time32s, func(b array.Builder) { b.(*array.Time32Builder).Append(arrow.Time32(75600 + 125)) }, "21:02:05"},
		{"time64 us", arrow.FixedWidthTypes.Time64us, func(b array.Builder) { b.(*array.Time64Builder).Append(arrow.Time64(75600e6 + 5e5)) }, "21:00:00.5"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := array.NewBuilder(mem, c.ty)
			defer b.Release()
			c.add(b)
			b.AppendNull()
			a := b.NewArray()
			defer a.Release()
			var loc *time.Location
			if tt, ok := c.ty.(*arrow.TimestampType); ok && tt.TimeZone != "" {
				var err error
				loc, err = columnZone(tt.TimeZone)
				require.NoError(t, err)
			}
			assert.Equal(t, c.want, cellText(a, 0, loc))
			assert.Equal(t, "", cellText(a, 1, loc), "null")
		})
	}
	t.Run("dictionary", func(t *testing.T) {
		ty := &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int8, ValueType: arrow.BinaryTypes.String}
		b := array.NewDictionaryBuilder(mem, ty).(*array.BinaryDictionaryBuilder)
		defer b.Release()
		require.NoError(t, b.AppendString("dep-north"))
		require.NoError(t, b.AppendString("dep-south"))
		require.NoError(t, b.AppendString("dep-north"))
		a := b.NewArray()
		defer a.Release()
		assert.Equal(t, []string{"dep-north", "dep-south", "dep-north"}, []string{cellText(a, 0, nil), cellText(a, 1, nil), cellText(a, 2, nil)})
	})
	_, err := columnZone("Mars/Olympus")
	assert.Error(t, err)
}

// readText reads every batch of a file with a TextReader over the fields
// given (all when none), and returns the batches.
func readText(t *testing.T, file []byte, o TextOptions, fields ...string) [][][]string {
	t.Helper()
	tr, err := OpenText(bytes.NewReader(file), o)
	require.NoError(t, err)
	defer func() { require.NoError(t, tr.Close()) }()
	if fields != nil {
		require.NoError(t, tr.Select(fields...))
	}
	var out [][][]string
	for tr.Next() {
		out = append(out, slices.Clone(tr.Batch())) // Next reuses the slice, not the rows
	}
	require.NoError(t, tr.Err())
	return out
}

// textSpec is a file with a column of each kind a Camtrap DP table's
// Parquet file commonly holds, and a row of nulls.
var textSpec = fileSpec{
	schema: arrow.NewSchema([]arrow.Field{
		fld("id", str),
		fld("count", arrow.PrimitiveTypes.Int32),
		fld("lat", f64),
		fld("flag", arrow.FixedWidthTypes.Boolean),
		fld("start", &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "Pacific/Auckland"}),
		fld("utc", tsUTC),
		fld("wall", tsLocal),
		fld("day", arrow.FixedWidthTypes.Date32),
	}, nil),
	json: `[
		{"id": "obs-1", "count": 3, "lat": 54.512, "flag": true, "start": "2024-06-12T20:47:05.123456Z",
		 "utc": "2024-06-12T20:47:05.25Z", "wall": "2024-06-12T20:47:05", "day": "2024-06-12"},
		{"id": null, "count": null, "lat": null, "flag": null, "start": null, "utc": null, "wall": null, "day": null}
	]`,
}

// TestTextReader reads typed columns and nulls as text, with the zone of a
// timestamp column taken from the stored Arrow schema, and only the fields
// selected, in the order asked.
func TestTextReader(t *testing.T) {
	file := makeFile(t, textSpec)
	mem := checkedMem(t)
	tr, err := OpenText(bytes.NewReader(file), TextOptions{BatchRows: 10, Allocator: mem})
	require.NoError(t, err)
	assert.Equal(t, []string{"id", "count", "lat", "flag", "start", "utc", "wall", "day"}, tr.Fields())
	assert.Equal(t, int64(2), tr.NumRows())
	require.True(t, tr.Next())
	assert.Equal(t, [][]string{
		// Pacific/Auckland is UTC+12 in June (common practice: New Zealand Standard Time; daylight saving is September to April).
		{"obs-1", "3", "54.512", "true", "2024-06-13T08:47:05.123456+12:00", "2024-06-12T20:47:05.25Z", "2024-06-12T20:47:05", "2024-06-12"},
		{"", "", "", "", "", "", "", ""},
	}, tr.Batch())
	assert.False(t, tr.Next())
	assert.NoError(t, tr.Err())
	assert.Empty(t, tr.Batch())
	require.NoError(t, tr.Close())
	mem.AssertSize(t, 0)

	got := readText(t, file, TextOptions{BatchRows: 10, Allocator: mem}, "wall", "id")
	assert.Equal(t, [][][]string{{{"2024-06-12T20:47:05", "obs-1"}, {"", ""}}}, got, "the selected fields, in the order asked")

	// Without a stored Arrow schema the zone's name is not in the file
	// (Parquet keeps only that the instant is adjusted to UTC): UTC.
	spec := textSpec
	spec.noSchema = true
	got = readText(t, makeFile(t, spec), TextOptions{BatchRows: 10, Allocator: mem}, "start")
	assert.Equal(t, [][][]string{{{"2024-06-12T20:47:05.123456Z"}, {""}}}, got)
}

// TestTextReaderBatches reads 25 rows in row groups of 7 in batches of 10,
// and the rows own their strings after the next batch is decoded.
func TestTextReaderBatches(t *testing.T) {
	var js strings.Builder
	js.WriteString("[")
	for i := range 25 {
		if i > 0 {
			js.WriteString(",")
		}
		fmt.Fprintf(&js, `{"id": "o%d", "n": %d}`, i, i*i)
	}
	js.WriteString("]")
	file := makeFile(t, fileSpec{schema: arrow.NewSchema([]arrow.Field{fld("id", str), fld("n", arrow.PrimitiveTypes.Int64)}, nil), json: js.String(), rowGroupLen: 7})
	batches := readText(t, file, TextOptions{BatchRows: 10, Allocator: checkedMem(t)})
	var sizes []int
	row := 0
	for _, b := range batches {
		sizes = append(sizes, len(b))
		for _, r := range b {
			assert.Equal(t, []string{fmt.Sprintf("o%d", row), fmt.Sprint(row * row)}, r)
			row++
		}
	}
	assert.Equal(t, []int{10, 10, 5}, sizes)
	assert.Equal(t, 25, row)

	_, err := OpenText(bytes.NewReader(file), TextOptions{})
	assert.ErrorContains(t, err, "batch size 0; it must be positive")
}

// TestTextReaderErrors: a field the file lacks (ErrNoField), Select after
// Next, a file that is not Parquet, and a damaged stored Arrow schema
// (ErrFile, before the Arrow library decodes it).
func TestTextReaderErrors(t *testing.T) {
	mem := checkedMem(t)
	file := makeFile(t, textSpec)
	tr, err := OpenText(bytes.NewReader(file), TextOptions{BatchRows: 1, Allocator: mem})
	require.NoError(t, err)
	err = tr.Select("id", "eventStart")
	assert.ErrorIs(t, err, ErrNoField)
	assert.ErrorContains(t, err, `"eventStart"; the fields are id, count, lat, flag, start, utc, wall, day`)
	require.True(t, tr.Next(), "a failed Select leaves every field selected")
	assert.Len(t, tr.Batch()[0], 8)
	assert.Error(t, tr.Select("id"), "Select after Next")
	require.NoError(t, tr.Close())

	_, err = OpenText(bytes.NewReader([]byte("observationID\no1\n")), TextOptions{BatchRows: 1, Allocator: mem})
	assert.ErrorIs(t, err, ErrFile)
	_, err = FooterRows(bytes.NewReader([]byte("observationID\no1\n")))
	assert.ErrorIs(t, err, ErrFile)
	n, err := FooterRows(bytes.NewReader(file))
	require.NoError(t, err)
	assert.Equal(t, int64(2), n)

	blob := flight.SerializeSchema(textSpec.schema, memory.DefaultAllocator)
	pos := vectorCounts(t, blob)[0]
	binary.LittleEndian.PutUint32(blob[pos:], 0x40000000) // 2^30 fields
	md := arrow.NewMetadata([]string{"ARROW:schema"}, []string{base64.StdEncoding.EncodeToString(blob)})
	spec := textSpec
	spec.schema = arrow.NewSchema(textSpec.schema.Fields(), &md)
	spec.noSchema = true
	_, err = OpenText(bytes.NewReader(makeFile(t, spec)), TextOptions{BatchRows: 1, Allocator: mem})
	assert.True(t, errors.Is(err, ErrFile) && errors.Is(err, errSchemaBlob), "%v", err)
}
