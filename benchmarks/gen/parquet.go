package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// parquetOptions are the Parquet writer's settings.
type parquetOptions struct {
	batch       int   // rows per Arrow record batch handed to the writer
	rowGroup    int64 // rows per row group
	compression string
}

// parquetWriter writes rows as Parquet through arrow-go's pqarrow: record
// batches of an explicit size, buffered into row groups. Float columns are
// written without dictionary encoding (their values hardly repeat); the
// other columns keep the library's default (dictionary, falling back to
// plain when the dictionary outgrows its page).
//
// Crash rows keep their local wall clock in a timestamp[us] column that is
// not adjusted to UTC (enrich it with --tz America/Chicago); camera rows hold
// the instant in a timestamp[us, UTC] column.
type parquetWriter struct {
	w     *pqarrow.FileWriter
	b     *array.RecordBuilder
	shape string
	wide  bool
	batch int
}

func newParquetWriter(out io.Writer, shape string, wide bool, o parquetOptions) (*parquetWriter, error) {
	codec, err := parseCodec(o.compression)
	if err != nil {
		return nil, err
	}
	if o.batch <= 0 || o.rowGroup <= 0 {
		return nil, fmt.Errorf("batch (%d) and row group (%d) sizes must be positive", o.batch, o.rowGroup)
	}
	str, f64, i64 := arrow.BinaryTypes.String, arrow.PrimitiveTypes.Float64, arrow.PrimitiveTypes.Int64
	var fields []arrow.Field
	if shape == "crash" {
		fields = []arrow.Field{
			{Name: "id", Type: str},
			{Name: "lat", Type: f64},
			{Name: "lon", Type: f64},
			{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Microsecond}},
			{Name: "severity", Type: str},
			{Name: "vehicles", Type: i64},
		}
	} else {
		fields = []arrow.Field{
			{Name: "id", Type: str},
			{Name: "site", Type: str},
			{Name: "lat", Type: f64},
			{Name: "lon", Type: f64},
			{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}},
			{Name: "species", Type: str},
			{Name: "count", Type: i64},
		}
	}
	props := []pq.WriterProperty{pq.WithCompression(codec), pq.WithMaxRowGroupLength(o.rowGroup),
		pq.WithDictionaryFor("lat", false), pq.WithDictionaryFor("lon", false)}
	if wide {
		for j := range wideColumns {
			var t arrow.DataType
			switch kindOf(j) {
			case wideText:
				t = str
			case wideInt:
				t = i64
			case wideFloat:
				t = f64
				props = append(props, pq.WithDictionaryFor(wideName(j), false))
			case wideBool:
				t = arrow.FixedWidthTypes.Boolean
			case wideDate:
				t = arrow.FixedWidthTypes.Date32
			}
			fields = append(fields, arrow.Field{Name: wideName(j), Type: t})
		}
	}
	sc := arrow.NewSchema(fields, nil)
	w, err := pqarrow.NewFileWriter(sc, out, pq.NewWriterProperties(props...),
		pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema()))
	if err != nil {
		return nil, err
	}
	return &parquetWriter{w: w, b: array.NewRecordBuilder(memory.DefaultAllocator, sc),
		shape: shape, wide: wide, batch: o.batch}, nil
}

func parseCodec(name string) (compress.Compression, error) {
	switch strings.ToLower(name) {
	case "zstd":
		return compress.Codecs.Zstd, nil
	case "snappy":
		return compress.Codecs.Snappy, nil
	case "gzip":
		return compress.Codecs.Gzip, nil
	case "uncompressed", "none":
		return compress.Codecs.Uncompressed, nil
	}
	return compress.Codecs.Uncompressed, fmt.Errorf("compression %q; valid: zstd, snappy, gzip, uncompressed", name)
}

func (p *parquetWriter) write(r *row) error {
	b := p.b
	var buf [16]byte
	f := 0
	str := func(s []byte) { b.Field(f).(*array.StringBuilder).BinaryBuilder.Append(s); f++ }
	flt := func(x float64) { b.Field(f).(*array.Float64Builder).Append(x); f++ }
	i64 := func(x int64) { b.Field(f).(*array.Int64Builder).Append(x); f++ }
	if p.shape == "crash" {
		str(strconv.AppendInt(append(buf[:0], 'c'), int64(r.id), 10))
		flt(asWritten(r.lat, coordDecimals))
		flt(asWritten(r.lon, coordDecimals))
		b.Field(f).(*array.TimestampBuilder).Append(arrow.Timestamp(wallMicros(r.t)))
		f++
		str([]byte(r.label))
		i64(int64(r.count))
	} else {
		str(strconv.AppendInt(append(buf[:0], 'd'), int64(r.id), 10))
		str(appendSite(buf[:0], r.site))
		flt(asWritten(r.lat, coordDecimals))
		flt(asWritten(r.lon, coordDecimals))
		b.Field(f).(*array.TimestampBuilder).Append(arrow.Timestamp(r.t.UnixMicro()))
		f++
		str([]byte(r.label))
		i64(int64(r.count))
	}
	if p.wide {
		for j := range wideColumns {
			v := r.wide[j]
			switch kindOf(j) {
			case wideText:
				str([]byte(v.text))
			case wideInt:
				i64(v.i)
			case wideFloat:
				flt(asWritten(v.f, wideDecimals))
			case wideBool:
				b.Field(f).(*array.BooleanBuilder).Append(v.i == 1)
				f++
			case wideDate:
				b.Field(f).(*array.Date32Builder).Append(arrow.Date32(v.i))
				f++
			}
		}
	}
	if b.Field(0).Len() >= p.batch {
		return p.flush()
	}
	return nil
}

// flush hands the rows built so far to the writer as one record batch.
func (p *parquetWriter) flush() error {
	if p.b.Field(0).Len() == 0 {
		return nil
	}
	rec := p.b.NewRecordBatch()
	defer rec.Release()
	return p.w.WriteBuffered(rec)
}

func (p *parquetWriter) close() error {
	defer p.b.Release()
	if err := p.flush(); err != nil {
		p.w.Close()
		return err
	}
	return p.w.Close()
}
