// Command parquetgen writes a deterministic Parquet file of located, timed
// events for benchmarks: lat and lon (float64 degrees), timestamp
// (timestamp[us, UTC]), species (a string from 500 values) and count (int64).
//
//	go run ./benchmarks/parquetgen -rows 5000000 -o /tmp/events.parquet
//
// The same -seed and -rows always give the same rows; rows are written in
// row groups of -rowgroup rows (1,048,576 by default, as pyarrow does) with
// the -compression codec.
package main

import (
	"flag"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stderr))
}

func run(args []string, stderr io.Writer) int {
	fs := flag.NewFlagSet("parquetgen", flag.ContinueOnError)
	fs.SetOutput(stderr)
	rows := fs.Int64("rows", 1_000_000, "number of `N` rows")
	seed := fs.Uint64("seed", 1, "random `SEED`")
	out := fs.String("o", "events.parquet", "output `FILE`")
	rowGroup := fs.Int64("rowgroup", 1<<20, "rows per row `GROUP`")
	codec := fs.String("compression", "zstd", "`CODEC`: snappy, zstd, gzip or uncompressed")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if err := generate(*out, *rows, *seed, *rowGroup, *codec); err != nil {
		fmt.Fprintln(stderr, "parquetgen:", err)
		return 1
	}
	return 0
}

func generate(path string, rows int64, seed uint64, rowGroup int64, codecName string) error {
	var codec compress.Compression
	switch strings.ToLower(codecName) {
	case "zstd":
		codec = compress.Codecs.Zstd
	case "snappy":
		codec = compress.Codecs.Snappy
	case "gzip":
		codec = compress.Codecs.Gzip
	case "uncompressed", "none":
		codec = compress.Codecs.Uncompressed
	default:
		return fmt.Errorf("compression %q; valid: snappy, zstd, gzip, uncompressed", codecName)
	}
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64},
		{Name: "lon", Type: arrow.PrimitiveTypes.Float64},
		{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}},
		{Name: "species", Type: arrow.BinaryTypes.String},
		{Name: "count", Type: arrow.PrimitiveTypes.Int64},
	}, nil)
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	defer f.Close()
	props := pq.NewWriterProperties(pq.WithCompression(codec), pq.WithMaxRowGroupLength(rowGroup),
		pq.WithDictionaryFor("lat", false), pq.WithDictionaryFor("lon", false))
	w, err := pqarrow.NewFileWriter(sc, f, props, pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema()))
	if err != nil {
		return err
	}
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	species := make([]string, 500)
	for i := range species {
		species[i] = fmt.Sprintf("species_%03d", i)
	}
	const start = 1420070400 // 2015-01-01T00:00:00Z
	const span = 10 * 365 * 86400
	b := array.NewRecordBuilder(memory.DefaultAllocator, sc)
	defer b.Release()
	const batch = 65536
	for done := int64(0); done < rows; {
		n := min(batch, rows-done)
		lat := b.Field(0).(*array.Float64Builder)
		lon := b.Field(1).(*array.Float64Builder)
		ts := b.Field(2).(*array.TimestampBuilder)
		sp := b.Field(3).(*array.StringBuilder)
		ct := b.Field(4).(*array.Int64Builder)
		for range n {
			lat.Append(-60 + 130*rng.Float64())
			lon.Append(-180 + 360*rng.Float64())
			ts.Append(arrow.Timestamp((start + rng.Int64N(span)) * 1e6))
			sp.Append(species[rng.IntN(len(species))])
			ct.Append(rng.Int64N(1000))
		}
		rec := b.NewRecordBatch()
		err := w.WriteBuffered(rec)
		rec.Release()
		if err != nil {
			return err
		}
		done += n
	}
	return w.Close() // closes f too
}
