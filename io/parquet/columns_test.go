package parquet

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
	"github.com/paulmach/orb"
	"go.uber.org/goleak"

	"github.com/heliotag/heliotag/enrich"
)

// flatGenerated writes n seeded random rows of flat columns only (no list or
// struct): every 97th row has a latitude out of range and every 89th a null
// longitude (bad rows), the count is null in a tenth of the rows, the
// species is a dictionary column and the flag a nullable boolean; input row
// groups of 7,000 rows.
func flatGenerated(t testing.TB, n int, seed uint64) []byte {
	t.Helper()
	mem := memory.NewGoAllocator()
	dict := &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int16, ValueType: str}
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: f64}, fld("lon", f64), {Name: "timestamp", Type: tsUTC},
		fld("name", str), fld("count", arrow.PrimitiveTypes.Int64), fld("species", dict),
		fld("flag", arrow.FixedWidthTypes.Boolean), {Name: "id", Type: arrow.PrimitiveTypes.Int32},
	}, nil)
	b := array.NewRecordBuilder(mem, sc)
	defer b.Release()
	rng := rand.New(rand.NewPCG(seed, 11))
	for i := range n {
		lat := -60 + 120*rng.Float64()
		if i%97 == 13 {
			lat = 95
		}
		b.Field(0).(*array.Float64Builder).Append(lat)
		if i%89 == 5 {
			b.Field(1).AppendNull()
		} else {
			b.Field(1).(*array.Float64Builder).Append(-180 + 360*rng.Float64())
		}
		b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(1.6e12 + rng.Int64N(3e11)))
		b.Field(3).(*array.StringBuilder).Append(fmt.Sprintf("n%d", rng.IntN(5000)))
		if rng.IntN(10) == 0 {
			b.Field(4).AppendNull()
		} else {
			b.Field(4).(*array.Int64Builder).Append(rng.Int64N(1000))
		}
		if err := b.Field(5).(*array.BinaryDictionaryBuilder).AppendString(fmt.Sprintf("s%02d", rng.IntN(40))); err != nil {
			t.Fatal(err)
		}
		if rng.IntN(7) == 0 {
			b.Field(6).AppendNull()
		} else {
			b.Field(6).(*array.BooleanBuilder).Append(rng.IntN(2) == 0)
		}
		b.Field(7).(*array.Int32Builder).Append(int32(i))
	}
	rec := b.NewRecordBatch()
	defer rec.Release()
	return writeRecords(t, sc, fileSpec{rowGroupLen: 7000, codec: compress.Codecs.Zstd}, rec)
}

// flatAllTypes is allTypes without its nested columns (list, struct, map):
// every flat Arrow type the package keeps.
func flatAllTypes(t testing.TB, stored bool) []byte {
	t.Helper()
	var fs []arrow.Field
	for _, f := range allTypes.schema.Fields() {
		if flatType(f.Type) {
			fs = append(fs, f)
		}
	}
	spec := allTypes
	spec.schema = arrow.NewSchema(fs, nil)
	spec.noSchema = !stored
	spec.rowGroupLen = 3
	spec.codec = compress.Codecs.Zstd
	return makeFile(t, spec)
}

// int96File is a flat input whose timestamps are legacy INT96, over several
// input row groups.
func int96File(t testing.TB, n int) []byte {
	t.Helper()
	mem := memory.NewGoAllocator()
	sc := arrow.NewSchema([]arrow.Field{fld("lat", f64), fld("lon", f64), fld("timestamp", &arrow.TimestampType{Unit: arrow.Nanosecond, TimeZone: "UTC"})}, nil)
	b := array.NewRecordBuilder(mem, sc)
	defer b.Release()
	rng := rand.New(rand.NewPCG(3, 96))
	for range n {
		b.Field(0).(*array.Float64Builder).Append(-60 + 120*rng.Float64())
		b.Field(1).(*array.Float64Builder).Append(-180 + 360*rng.Float64())
		b.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(1.6e18 + rng.Int64N(3e17)))
	}
	rec := b.NewRecordBatch()
	defer rec.Release()
	var buf bytes.Buffer
	w, err := pqarrow.NewFileWriter(sc, &buf, pq.NewWriterProperties(pq.WithMaxRowGroupLength(2000)),
		pqarrow.NewArrowWriterProperties(pqarrow.WithDeprecatedInt96Timestamps(true), pqarrow.WithStoreSchema()))
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Write(rec); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// geoFile is a GeoParquet file of n WKB points (every 50th null) with its
// "geo" metadata.
func geoFile(t testing.TB, n int) []byte {
	t.Helper()
	geo := `{"version":"1.1.0","primary_column":"geometry","columns":{"geometry":{"encoding":"WKB","geometry_types":["Point"]}}}`
	rng := rand.New(rand.NewPCG(5, 50))
	values := make([][]byte, n)
	for i := range values {
		if i%50 != 7 {
			values[i] = mustWKB(t, orb.Point{-180 + 360*rng.Float64(), -60 + 120*rng.Float64()}, binary.LittleEndian)
		}
	}
	return wkbGeoFile(t, geo, values)
}

// TestParallelWriterSameBytes: encoding the columns on several goroutines
// writes the same bytes as on one, for every flat input the package
// preserves (all flat Arrow types with and without a stored Arrow schema,
// dictionaries, nulls, INT96 timestamps, GeoParquet), the default and all
// column groups, rows kept with nulls or skipped, several batch, row-group
// and page sizes and every codec. Inputs with nested columns stay on one
// goroutine.
func TestParallelWriterSameBytes(t *testing.T) {
	flat := flatGenerated(t, 5000, 1)
	type input struct {
		name  string
		in    []byte
		small bool // 8 rows: batches of 2, row groups of 3
	}
	inputs := []input{
		{"flat", flat, false},
		{"all flat types, stored schema", flatAllTypes(t, true), true},
		{"all flat types, no stored schema", flatAllTypes(t, false), true},
		{"int96", int96File(t, 2500), false},
		{"geoparquet", geoFile(t, 3000), false},
	}
	type run struct {
		add    string
		policy enrich.Policy
		batch  int
		writer WriterOptions
	}
	runs := []run{
		{"", enrich.PolicyKeep, 997, WriterOptions{}},
		{"", enrich.PolicyKeep, 4103, WriterOptions{RowGroupRows: 3000, dataPageSize: 4 << 10}},
		{"all", enrich.PolicySkip, 333, WriterOptions{RowGroupRows: 700, Compression: "snappy"}},
		{"", enrich.PolicySkip, 1000, WriterOptions{RowGroupRows: 4096, Compression: "none", dataPageSize: 1 << 10}},
		{"none", enrich.PolicyKeep, 5000, WriterOptions{RowGroupRows: 6000, Compression: "gzip"}},
		{"position,phase", enrich.PolicyKeep, 3000, WriterOptions{Compression: "lz4", dataPageSize: 8 << 10}},
		{"", enrich.PolicyKeep, 4096, WriterOptions{Compression: "brotli", RowGroupRows: 2500}},
		// Row groups closed early by their compressed size.
		{"", enrich.PolicyKeep, 1500, WriterOptions{groupBytes: 20 << 10, dataPageSize: 2 << 10}},
	}
	for _, in := range inputs {
		for k, r := range runs {
			if in.small {
				r.batch = 2
				if r.writer.RowGroupRows > 0 {
					r.writer.RowGroupRows = 3
				}
			}
			workers := []int{1, 2}
			if k == 0 {
				workers = append(workers, 3, 16) // 16: more than the columns
			}
			t.Run(fmt.Sprintf("%s/%d", in.name, k), func(t *testing.T) {
				var want []byte
				for _, workers := range workers {
					o := r.writer
					o.Workers = workers
					got := enrichFile(t, in.in, runOpts{add: r.add, policy: r.policy, batch: r.batch, workers: 2, writer: o})
					if got.err != nil {
						t.Fatalf("%d writer workers: %v", workers, got.err)
					}
					if got.parallel != (workers > 1) {
						t.Fatalf("%d writer workers: columns encoded in parallel: %v", workers, got.parallel)
					}
					if workers == 1 {
						want = got.out
						continue
					}
					if !bytes.Equal(got.out, want) {
						t.Errorf("%d writer workers: %d bytes differing from one worker's %d bytes", workers, len(got.out), len(want))
					}
				}
			})
		}
	}

	// Nested columns: one goroutine whatever the setting.
	nested := enrichFile(t, generated(t, 3000, 4), runOpts{policy: enrich.PolicyKeep, writer: WriterOptions{Workers: 4}})
	if nested.err != nil {
		t.Fatal(nested.err)
	}
	if nested.parallel {
		t.Error("an input with a list column was encoded in parallel")
	}
}

// TestParallelWriterStoredSchema: the stored Arrow schema and the other
// key-value metadata are the ones pqarrow writes, compared on their own (the
// test above compares whole files).
func TestParallelWriterStoredSchema(t *testing.T) {
	in := makeFile(t, fileSpec{schema: schemaOf(fld("timestamp", tsUTC)), kv: map[string]string{"owner": "field team"},
		json: `[{"lat": 41.88, "lon": -87.63, "timestamp": "2024-06-21T12:00:00Z"}]`})
	kv := func(workers int) map[string]string {
		r := enrichFile(t, in, runOpts{writer: WriterOptions{Workers: workers}})
		if r.err != nil {
			t.Fatal(r.err)
		}
		md, err := pqarrowMetadata(r.out)
		if err != nil {
			t.Fatal(err)
		}
		return md
	}
	one, two := kv(1), kv(2)
	if one["ARROW:schema"] == "" || one["owner"] != "field team" {
		t.Fatalf("serial writer metadata %v: want the stored schema and the input's", one)
	}
	if len(one) != len(two) {
		t.Errorf("metadata keys %d vs %d", len(one), len(two))
	}
	for k, v := range one {
		if two[k] != v {
			t.Errorf("metadata %q differs: %q vs %q", k, v, two[k])
		}
	}
}

func pqarrowMetadata(b []byte) (map[string]string, error) {
	rd, err := NewReader(bytes.NewReader(b), Options{})
	if err != nil {
		return nil, err
	}
	defer rd.Close()
	m := map[string]string{}
	for _, kv := range rd.kv {
		m[kv.key] = kv.value
	}
	return m, nil
}

// TestParallelWriterColumnError: an error in one column's goroutine (one
// column of one block, in the middle of a row group) ends the run with that
// error; no goroutine is left, and all Arrow memory is released (the checked
// allocator fails the test otherwise). A failing output under the parallel
// writer is in TestFailedRunsReleaseMemory.
func TestParallelWriterColumnError(t *testing.T) {
	defer goleak.VerifyNone(t)
	in := flatGenerated(t, 20_000, 6)
	errColumn := errors.New("column encoder failed")
	for _, col := range []int{0, 3, 9} {
		t.Run(fmt.Sprintf("column %d", col), func(t *testing.T) {
			mem := checkedMem(t)
			rd, err := NewReader(bytes.NewReader(in), Options{Allocator: mem})
			if err != nil {
				t.Fatal(err)
			}
			defer rd.Close()
			plan, err := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns()})
			if err != nil {
				t.Fatal(err)
			}
			w, err := NewWriter(io.Discard, rd, plan, WriterOptions{RowGroupRows: 10_000, Workers: 3})
			if err != nil {
				t.Fatal(err)
			}
			if w.cols == nil {
				t.Fatal("the writer is not parallel")
			}
			calls := 0
			w.cols.fail = func(c int) error {
				if c != col {
					return nil
				}
				if calls++; calls == 4 { // the fourth block: 12,288 rows in, in the second row group
					return errColumn
				}
				return nil
			}
			_, err = enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan, Policy: enrich.PolicySkip, Rejects: io.Discard, Workers: 2, BatchRows: 1000})
			if cerr := w.Close(); err == nil {
				err = cerr
			}
			if !errors.Is(err, errColumn) {
				t.Fatalf("error %v, want %v", err, errColumn)
			}
			if calls != 4 {
				t.Errorf("column %d written %d times; the run must stop at the failing block", col, calls)
			}
		})
	}
}

// BenchmarkParallelWriter measures the writer alone (as BenchmarkWriter: one
// 65,536-row batch of the benchmark file's shape with the default columns)
// with the columns encoded on 1 and 2 goroutines.
func BenchmarkParallelWriter(b *testing.B) {
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", workers), func(b *testing.B) {
			benchWriter(b, "", WriterOptions{Workers: workers})
		})
	}
}

// BenchmarkWriterWorkers runs, in each iteration and on the same generated
// file as BenchmarkEnrichVsPassthrough (output to io.Discard), interleaved so
// that a shared machine's load falls on all of them alike:
//
//   - enrich (default columns), 2 workers, columns written serially;
//   - enrich, 2 workers, columns written on 2 goroutines;
//   - enrich, 1 worker (columns written serially, as always with 1);
//   - passthrough (--add none), 2 workers, serial and on 2 goroutines.
//
// It reports the wall-time ratios: 1 worker over 2 (the speed-up of a second
// worker) and enrich over passthrough, with the serial and the parallel
// column writer, and serial over parallel for the 2-worker enrich.
//
//	go test ./io/parquet -run XXX -bench WriterWorkers -benchtime 3x -parquet.rows 5000000
func BenchmarkWriterWorkers(b *testing.B) {
	path := filepath.Join(b.TempDir(), "events.parquet")
	writeBenchFile(b, path, *benchRows)
	type cfg struct {
		name                   string
		add                    string
		workers, writerWorkers int
	}
	cfgs := []cfg{
		{"enrich-w2-serial", "", 2, 1},
		{"enrich-w2-parallel", "", 2, 2},
		{"enrich-w1", "", 1, 1},
		{"passthrough-w2-serial", "none", 2, 1},
		{"passthrough-w2-parallel", "none", 2, 2},
	}
	wall := make([]time.Duration, len(cfgs))
	cpu := make([]time.Duration, len(cfgs))
	run := func(k int) {
		c := cfgs[k]
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		defer f.Close()
		rd, err := NewReader(f, Options{})
		if err != nil {
			b.Fatal(err)
		}
		defer rd.Close()
		w0, c0 := time.Now(), cpuTime()
		plan, err := enrich.NewPlan(enrich.PlanOptions{Add: c.add, Input: rd.Columns()})
		if err != nil {
			b.Fatal(err)
		}
		w, err := NewWriter(io.Discard, rd, plan, WriterOptions{Workers: c.writerWorkers})
		if err != nil {
			b.Fatal(err)
		}
		if _, err := enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan, Workers: c.workers}); err != nil {
			b.Fatal(err)
		}
		if err := w.Close(); err != nil {
			b.Fatal(err)
		}
		wall[k] += time.Since(w0)
		cpu[k] += cpuTime() - c0
	}
	b.ResetTimer()
	for range b.N {
		for k := range cfgs {
			run(k)
		}
	}
	rows := float64(*benchRows * b.N)
	for k, c := range cfgs {
		b.ReportMetric(rows/wall[k].Seconds(), c.name+"-rows/s")
		b.ReportMetric(cpu[k].Seconds()/float64(b.N), c.name+"-cpu-s")
	}
	b.ReportMetric(wall[2].Seconds()/wall[0].Seconds(), "w1/w2-serial")
	b.ReportMetric(wall[2].Seconds()/wall[1].Seconds(), "w1/w2-parallel")
	b.ReportMetric(wall[0].Seconds()/wall[3].Seconds(), "enrich/passthrough-serial")
	b.ReportMetric(wall[1].Seconds()/wall[4].Seconds(), "enrich/passthrough-parallel")
	b.ReportMetric(wall[0].Seconds()/wall[1].Seconds(), "serial/parallel-w2")
}
