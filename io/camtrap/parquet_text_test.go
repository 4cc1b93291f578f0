package camtrap

import (
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestCellText renders one value of each Arrow type a Camtrap DP table's
// Parquet file may hold, and a null, as the text the CSV path reads.
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
		{"float64 small", arrow.PrimitiveTypes.Float64, func(b array.Builder) { b.(*array.Float64Builder).Append(0.00001) }, "1e-05"},
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
				loc, err = timestampZone(tt.TimeZone)
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
	_, err := timestampZone("Mars/Olympus")
	assert.Error(t, err)
}
