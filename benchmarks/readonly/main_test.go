package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// writeParquet writes n rows of lat, lon and a UTC timestamp.
func writeParquet(t *testing.T, path string, n int) {
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64},
		{Name: "lon", Type: arrow.PrimitiveTypes.Float64},
		{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}},
	}, nil)
	b := array.NewRecordBuilder(memory.DefaultAllocator, sc)
	defer b.Release()
	for i := range n {
		b.Field(0).(*array.Float64Builder).Append(float64(i % 90))
		b.Field(1).(*array.Float64Builder).Append(float64(i % 180))
		b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(int64(i) * 1e6))
	}
	rec := b.NewRecordBatch()
	defer rec.Release()
	f, err := os.Create(path)
	require.NoError(t, err)
	w, err := pqarrow.NewFileWriter(sc, f, nil, pqarrow.DefaultWriterProps())
	require.NoError(t, err)
	require.NoError(t, w.Write(rec))
	require.NoError(t, w.Close())
}

func TestRun(t *testing.T) {
	dir := t.TempDir()
	csvPath := filepath.Join(dir, "x.csv")
	require.NoError(t, os.WriteFile(csvPath, []byte("id,lat,lon,timestamp\n1,1,2,2024-01-01T00:00:00Z\n2,1,2,2024-01-01T00:00:00Z\n\n3,1,2,2024-01-01T00:00:00Z\n"), 0o644))
	pqPath := filepath.Join(dir, "x.parquet")
	writeParquet(t, pqPath, 2500)
	cases := []struct {
		name string
		args []string
		code int
		say  string
	}{
		{"csv", []string{"-rows", "3", csvPath}, 0, "3 rows"},
		{"csv, flags after the file", []string{csvPath, "-batch-rows", "2", "-rows", "3"}, 0, "3 rows"},
		{"parquet, several batches", []string{"-batch-rows", "1000", "-rows", "2500", pqPath}, 0, "2500 rows"},
		{"wrong count", []string{"-rows", "4", csvPath}, 1, "3 rows read, 4 expected"},
		{"no file", []string{"-rows", "4"}, 2, "give one input file"},
		{"missing file", []string{filepath.Join(dir, "none.csv")}, 1, "none.csv"},
		{"unknown extension", []string{filepath.Join(dir, "x.xyz")}, 2, "--from"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var stderr bytes.Buffer
			assert.Equal(t, c.code, run(context.Background(), c.args, &stderr), stderr.String())
			assert.Contains(t, stderr.String(), c.say)
		})
	}
}
