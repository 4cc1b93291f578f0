package parquet

import (
	"fmt"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/stretchr/testify/assert"
)

// TestBatchRows: narrow tables keep enrich's default batch; wider ones get smaller batches, so that a batch
// stays near batchBytes decoded, but never below minBatchRows.
func TestBatchRows(t *testing.T) {
	narrow := []arrow.Field{ // the benchmark's crash table: about 64 bytes a row
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64}, {Name: "lon", Type: arrow.PrimitiveTypes.Float64},
		{Name: "ts", Type: &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}},
		{Name: "severity", Type: arrow.BinaryTypes.String}, {Name: "vehicles", Type: arrow.PrimitiveTypes.Int64},
	}
	wide := append([]arrow.Field(nil), narrow...)
	for i := range 6 { // 30 more columns of five types, as benchmarks/gen -wide writes: about 380 bytes a row
		wide = append(wide,
			arrow.Field{Name: fmt.Sprint("s", i), Type: arrow.BinaryTypes.String},
			arrow.Field{Name: fmt.Sprint("i", i), Type: arrow.PrimitiveTypes.Int64},
			arrow.Field{Name: fmt.Sprint("f", i), Type: arrow.PrimitiveTypes.Float64},
			arrow.Field{Name: fmt.Sprint("b", i), Type: arrow.FixedWidthTypes.Boolean},
			arrow.Field{Name: fmt.Sprint("d", i), Type: arrow.FixedWidthTypes.Date32})
	}
	embedding := append([]arrow.Field(nil), narrow...) // 2,048 bytes of values a row
	embedding = append(embedding, arrow.Field{Name: "v", Type: arrow.FixedSizeListOf(512, arrow.PrimitiveTypes.Float32)})
	var huge []arrow.Field
	for i := range 400 {
		huge = append(huge, arrow.Field{Name: fmt.Sprint("c", i), Type: arrow.ListOf(arrow.BinaryTypes.String)})
	}
	nested := []arrow.Field{
		{Name: "p", Type: arrow.StructOf(arrow.Field{Name: "x", Type: arrow.PrimitiveTypes.Float64}, arrow.Field{Name: "y", Type: arrow.PrimitiveTypes.Float64})},
		{Name: "tag", Type: &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int8, ValueType: arrow.BinaryTypes.String}},
	}
	for _, c := range []struct {
		name   string
		fields []arrow.Field
		rows   int
	}{{"narrow", narrow, 8192}, {"wide", wide, 4096}, {"embedding", embedding, minBatchRows}, {"huge", huge, minBatchRows}, {"nested", nested, 8192}} {
		t.Run(c.name, func(t *testing.T) {
			rd := &Reader{schema: arrow.NewSchema(c.fields, nil)}
			assert.Equal(t, c.rows, rd.BatchRows(), "%d bytes a row", rowBytes(c.fields))
		})
	}
	assert.Equal(t, 17, rowBytes([]arrow.Field{{Name: "p", Type: arrow.StructOf(
		arrow.Field{Name: "x", Type: arrow.PrimitiveTypes.Float64}, arrow.Field{Name: "y", Type: arrow.PrimitiveTypes.Float64})},
		{Name: "tag", Type: &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int8, ValueType: arrow.BinaryTypes.String}}}))
}
