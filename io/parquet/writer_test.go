package parquet

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/heliotag/heliotag/enrich"
)

// generated writes n seeded random rows (every 97th with a latitude out of
// range) with a nested list column, in input row groups of 30,000 rows.
func generated(t testing.TB, n int, seed uint64) []byte {
	t.Helper()
	mem := memory.NewGoAllocator()
	sc := arrow.NewSchema([]arrow.Field{
		fld("lat", f64), fld("lon", f64), fld("timestamp", tsUTC),
		fld("tags", arrow.ListOf(arrow.PrimitiveTypes.Int32)), fld("name", str),
	}, nil)
	b := array.NewRecordBuilder(mem, sc)
	defer b.Release()
	rng := rand.New(rand.NewPCG(seed, 7))
	tags := b.Field(3).(*array.ListBuilder)
	tagv := tags.ValueBuilder().(*array.Int32Builder)
	for i := range n {
		lat := -60 + 120*rng.Float64()
		if i%97 == 13 {
			lat = 95
		}
		b.Field(0).(*array.Float64Builder).Append(lat)
		b.Field(1).(*array.Float64Builder).Append(-180 + 360*rng.Float64())
		b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(1.6e12 + rng.Int64N(3e11)))
		tags.Append(true)
		for range rng.IntN(4) {
			tagv.Append(rng.Int32N(100))
		}
		b.Field(4).(*array.StringBuilder).Append(fmt.Sprintf("n%d", rng.IntN(5000)))
	}
	rec := b.NewRecordBatch()
	defer rec.Release()
	return writeRecords(t, sc, fileSpec{rowGroupLen: 30000, codec: compress.Codecs.Zstd}, rec)
}

// TestOutputIndependentOfBatching: the output's bytes do not depend on the
// batch size or the number of workers (row groups and pages are cut by row
// counts), with rejected rows shifting the batches and a nested column, over
// several pages and row groups.
func TestOutputIndependentOfBatching(t *testing.T) {
	in := generated(t, 12_000, 1)
	var first []byte
	for _, run := range []struct{ batch, workers int }{{1000, 1}, {4103, 2}, {997, 2}} {
		r := enrichFile(t, in, runOpts{policy: enrich.PolicySkip, batch: run.batch, workers: run.workers,
			writer: WriterOptions{RowGroupRows: 5000, dataPageSize: 4 << 10}})
		if r.err != nil {
			t.Fatal(r.err)
		}
		if first != nil {
			if !bytes.Equal(first, r.out) {
				t.Errorf("batch %d, %d workers: output differs from batch 1000, 1 worker", run.batch, run.workers)
			}
			continue
		}
		first = r.out
		pf, err := file.NewParquetReader(bytes.NewReader(r.out))
		if err != nil {
			t.Fatal(err)
		}
		if pf.NumRowGroups() != 3 || pf.NumRows() != r.sum.Written {
			t.Errorf("%d row groups, %d rows; want 3 groups of at most 5,000 rows, %d rows", pf.NumRowGroups(), pf.NumRows(), r.sum.Written)
		}
		// Several data pages per column chunk: page boundaries are tested too.
		pr, err := pf.RowGroup(0).GetColumnPageReader(0)
		if err != nil {
			t.Fatal(err)
		}
		pages := 0
		for pr.Next() {
			pages++
		}
		if pages < 4 {
			t.Errorf("%d pages in the first column chunk; the test needs several", pages)
		}
		pf.Close()
	}
}

// TestWriterOptions checks --compression and the row-group size.
func TestWriterOptions(t *testing.T) {
	in := generated(t, 5000, 2)
	for _, tc := range []struct {
		codec string
		want  compress.Compression
	}{{"", compress.Codecs.Zstd}, {"snappy", compress.Codecs.Snappy}, {"none", compress.Codecs.Uncompressed}, {"GZIP", compress.Codecs.Gzip}, {"lz4", compress.Codecs.Lz4Raw}, {"brotli", compress.Codecs.Brotli}} {
		t.Run(tc.codec, func(t *testing.T) {
			r := enrichFile(t, in, runOpts{policy: enrich.PolicyKeep, writer: WriterOptions{Compression: tc.codec, RowGroupRows: 1000}, batch: 700})
			if r.err != nil {
				t.Fatal(r.err)
			}
			pf, err := file.NewParquetReader(bytes.NewReader(r.out))
			if err != nil {
				t.Fatal(err)
			}
			defer pf.Close()
			if pf.NumRowGroups() != 5 {
				t.Errorf("%d row groups of 5000 rows, want 5 of 1000", pf.NumRowGroups())
			}
			md := pf.MetaData()
			for g := range md.NumRowGroups() {
				for i := range md.Schema.NumColumns() {
					cc, _ := md.RowGroup(g).ColumnChunk(i)
					if cc.Compression() != tc.want {
						t.Fatalf("row group %d column %s: codec %s, want %s", g, md.Schema.Column(i).ColumnPath(), cc.Compression(), tc.want)
					}
				}
			}
		})
	}
	if _, err := ParseCompression("lzo"); err == nil {
		t.Error("lzo accepted")
	}
}

// TestFloatColumnsPlain: float columns are written without a dictionary,
// other columns with one.
func TestFloatColumnsPlain(t *testing.T) {
	r := enrichFile(t, generated(t, 3000, 3), runOpts{policy: enrich.PolicyKeep})
	if r.err != nil {
		t.Fatal(r.err)
	}
	pf, err := file.NewParquetReader(bytes.NewReader(r.out))
	if err != nil {
		t.Fatal(err)
	}
	defer pf.Close()
	md := pf.MetaData()
	for i := range md.Schema.NumColumns() {
		cc, _ := md.RowGroup(0).ColumnChunk(i)
		col := md.Schema.Column(i)
		isFloat := col.PhysicalType().String() == "DOUBLE"
		if cc.HasDictionaryPage() == isFloat {
			t.Errorf("column %s (%s): dictionary page %v", col.ColumnPath(), col.PhysicalType(), cc.HasDictionaryPage())
		}
	}
}

// TestDictionaryFollowsInput: a column the input's writer had to store plain
// (its dictionary outgrew the limit: unique timestamps) is written plain; a
// column it kept dictionary-encoded keeps a dictionary.
func TestDictionaryFollowsInput(t *testing.T) {
	mem := memory.NewGoAllocator()
	sc := arrow.NewSchema([]arrow.Field{fld("lat", f64), fld("lon", f64), fld("timestamp", tsUTC), fld("site", arrow.PrimitiveTypes.Int64)}, nil)
	b := array.NewRecordBuilder(mem, sc)
	for i := range 4000 {
		b.Field(0).(*array.Float64Builder).Append(40)
		b.Field(1).(*array.Float64Builder).Append(-80)
		b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(1.7e12 + int64(i)*61_000))
		b.Field(3).(*array.Int64Builder).Append(int64(i % 7))
	}
	rec := b.NewRecordBatch()
	b.Release()
	in := writeRecords(t, sc, fileSpec{dictLimit: 4096}, rec) // 512 int64 values fit the dictionary
	rec.Release()
	r := enrichFile(t, in, runOpts{batch: 1000})
	if r.err != nil {
		t.Fatal(r.err)
	}
	for _, c := range []struct {
		file []byte
		what string
	}{{in, "input"}, {r.out, "output"}} {
		pf, err := file.NewParquetReader(bytes.NewReader(c.file))
		if err != nil {
			t.Fatal(err)
		}
		ts, _ := pf.MetaData().RowGroup(0).ColumnChunk(2)
		site, _ := pf.MetaData().RowGroup(0).ColumnChunk(3)
		plainTS := false
		for _, st := range ts.EncodingStats() {
			if st.PageType.String() == "DATA_PAGE" && st.Encoding.String() == "PLAIN" {
				plainTS = true
			}
		}
		if !plainTS || !site.HasDictionaryPage() {
			t.Errorf("%s: timestamp has plain pages %v (want true), site has a dictionary %v (want true)", c.what, plainTS, site.HasDictionaryPage())
		}
		if c.what == "output" && ts.HasDictionaryPage() {
			t.Errorf("output: the timestamp column still tries a dictionary")
		}
		pf.Close()
	}
}

// TestInt96Kept: legacy INT96 timestamps stay INT96 unless the output adds
// instant columns (which are INT64 microseconds), when they become INT64
// nanoseconds; the Arrow type is timestamp[ns] either way.
func TestInt96Kept(t *testing.T) {
	mem := memory.NewGoAllocator()
	sc := arrow.NewSchema([]arrow.Field{fld("lat", f64), fld("lon", f64), fld("timestamp", &arrow.TimestampType{Unit: arrow.Nanosecond, TimeZone: "UTC"})}, nil)
	b := array.NewRecordBuilder(mem, sc)
	b.Field(0).(*array.Float64Builder).Append(40)
	b.Field(1).(*array.Float64Builder).Append(-80)
	b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(1.7e18))
	rec := b.NewRecordBatch()
	b.Release()
	defer rec.Release()
	var buf bytes.Buffer
	w, err := pqarrow.NewFileWriter(sc, &buf, pq.NewWriterProperties(), pqarrow.NewArrowWriterProperties(pqarrow.WithDeprecatedInt96Timestamps(true)))
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Write(rec); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		add  string
		want pq.Type
	}{{"", pq.Types.Int96}, {"position,events", pq.Types.Int64}} {
		r := enrichFile(t, buf.Bytes(), runOpts{add: tc.add})
		if r.err != nil {
			t.Fatal(r.err)
		}
		pf, err := file.NewParquetReader(bytes.NewReader(r.out))
		if err != nil {
			t.Fatal(err)
		}
		if got := pf.MetaData().Schema.Column(2).PhysicalType(); got != tc.want {
			t.Errorf("--add %q: timestamp stored as %s, want %s", tc.add, got, tc.want)
		}
		pf.Close()
		tbl := readTable(t, r.out, mem)
		if typ := tbl.Schema().Field(2).Type; !arrow.TypeEqual(typ, &arrow.TimestampType{Unit: arrow.Nanosecond, TimeZone: "UTC"}) {
			t.Errorf("--add %q: timestamp read back as %s", tc.add, typ)
		}
		tbl.Release()
	}
}
