package parquet

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/solar"
)

// benchResults fills Results for n rows as the kernel would: seeded random
// positions and phases, every 50th row kept with an error.
func benchResults(n int, plan *enrich.Plan) *enrich.Results {
	rng := rand.New(rand.NewPCG(1, 2))
	res := &enrich.Results{Plan: plan, Status: make([]enrich.Status, n), Err: make([]error, n),
		Altitude: make([]float64, n), Azimuth: make([]float64, n), Phase: make([]solar.Phase, n),
		Zone: make([]*time.Location, n), Note: make([]string, n)}
	for i := range n {
		res.Altitude[i] = -90 + 180*rng.Float64()
		res.Azimuth[i] = 360 * rng.Float64()
		res.Phase[i] = solar.Phase(1 + rng.IntN(solar.NumPhases-1))
		if i%50 == 7 {
			res.Status[i] = enrich.RowKept
			res.Err[i] = &enrich.RowError{Column: "lat", Err: solar.ErrLatitude}
		}
	}
	return res
}

// BenchmarkColumnBuilders measures building the added columns' Arrow arrays
// from a batch's results, per column kind.
func BenchmarkColumnBuilders(b *testing.B) {
	plan, err := enrich.NewPlan(enrich.PlanOptions{ErrorColumn: true})
	if err != nil {
		b.Fatal(err)
	}
	for _, pc := range plan.Columns {
		for _, n := range []int{1024, 8192, 65536} {
			b.Run(fmt.Sprintf("%s/n=%d", pc.Name, n), func(b *testing.B) {
				mem := memory.NewGoAllocator()
				res := benchResults(n, plan)
				var cat *category
				if pc.Kind == enrich.KindCategory {
					b := array.NewStringBuilder(mem)
					b.AppendValues(vocabulary(pc.Field), nil)
					cat = &category{words: vocabulary(pc.Field), dict: b.NewArray()}
					b.Release()
				}
				b.ReportAllocs()
				b.ResetTimer()
				for range b.N {
					buildColumn(mem, pc, res, n, cat).Release()
				}
				b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
			})
		}
	}
}

// BenchmarkEncode measures a whole chunk's Encode (input columns kept, the
// default columns built), with no row rejected and with one row in 50
// rejected (the input columns are then gathered).
func BenchmarkEncode(b *testing.B) {
	in := generated(b, 65536, 9)
	for _, rejected := range []bool{false, true} {
		b.Run(fmt.Sprintf("rejected=%v/n=65536", rejected), func(b *testing.B) {
			rd, err := NewReader(bytes.NewReader(in), Options{})
			if err != nil {
				b.Fatal(err)
			}
			defer rd.Close()
			c, err := rd.Next(context.Background(), 65536)
			if err != nil {
				b.Fatal(err)
			}
			plan, _ := enrich.NewPlan(enrich.PlanOptions{Input: rd.Columns()})
			res := benchResults(c.Len(), plan)
			if rejected {
				for i := range res.Status {
					if res.Status[i] == enrich.RowKept {
						res.Status[i] = enrich.RowRejected
					}
				}
			}
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				if err := c.Encode(res); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(c.Len()*b.N)/b.Elapsed().Seconds(), "rows/s")
			c.(*chunk).release()
		})
	}
}

// BenchmarkExtract measures reading locations and times from a batch: float
// coordinates with a UTC timestamp column (the fast path), and with a local
// timestamp resolved in a --tz zone.
func BenchmarkExtract(b *testing.B) {
	const n = 65536
	mem := memory.NewGoAllocator()
	for _, local := range []bool{false, true} {
		b.Run(fmt.Sprintf("local=%v/n=%d", local, n), func(b *testing.B) {
			tsType := tsUTC
			sel := enrich.Select{}
			if local {
				tsType = &arrow.TimestampType{Unit: arrow.Millisecond}
				sel.TZ = "America/Chicago"
			}
			sc := schemaOf(fld("timestamp", tsType))
			bld := array.NewRecordBuilder(mem, sc)
			rng := rand.New(rand.NewPCG(3, 4))
			for range n {
				bld.Field(0).(*array.Float64Builder).Append(-60 + 120*rng.Float64())
				bld.Field(1).(*array.Float64Builder).Append(-180 + 360*rng.Float64())
				bld.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp(1.6e12 + rng.Int64N(3e11)))
			}
			rec := bld.NewRecordBatch()
			bld.Release()
			file := writeRecords(b, sc, fileSpec{}, rec)
			rec.Release()
			rd, err := NewReader(bytes.NewReader(file), Options{Select: sel})
			if err != nil {
				b.Fatal(err)
			}
			defer rd.Close()
			c, err := rd.Next(context.Background(), n)
			if err != nil {
				b.Fatal(err)
			}
			in := new(enrich.Inputs)
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				in.Reset(n)
				c.Extract(in)
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
			c.(*chunk).release()
		})
	}
}

var benchRows = flag.Int("parquet.rows", 200_000, "rows of the generated file for BenchmarkEnrichVsPassthrough")

// BenchmarkEnrichVsPassthrough runs, in each iteration and on the same
// generated file (lat, lon, a UTC timestamp, a string and an int column,
// zstd): a read-only pass, a passthrough (the same reader and writer with no
// added columns) and an enrich with the default columns, output to
// io.Discard. It reports each one's rate and the enrich/passthrough ratios of
// wall time and of CPU time (user+system), measured in the same run.
//
//	go test ./io/parquet -run XXX -bench EnrichVsPassthrough -benchtime 3x -parquet.rows 5000000
func BenchmarkEnrichVsPassthrough(b *testing.B) {
	path := filepath.Join(b.TempDir(), "events.parquet")
	writeBenchFile(b, path, *benchRows)
	open := func() (*os.File, *Reader) {
		f, err := os.Open(path)
		if err != nil {
			b.Fatal(err)
		}
		rd, err := NewReader(f, Options{})
		if err != nil {
			b.Fatal(err)
		}
		return f, rd
	}
	var wall, cpu [3]time.Duration
	run := func(k int) {
		f, rd := open()
		defer f.Close()
		defer rd.Close()
		w0, c0 := time.Now(), cpuTime()
		switch k {
		case 0: // read only
			for {
				c, err := rd.Next(context.Background(), enrich.DefaultBatchRows)
				if err == io.EOF {
					break
				}
				if err != nil {
					b.Fatal(err)
				}
				c.(*chunk).release()
			}
		default:
			add := "none"
			if k == 2 {
				add = ""
			}
			plan, err := enrich.NewPlan(enrich.PlanOptions{Add: add, Input: rd.Columns()})
			if err != nil {
				b.Fatal(err)
			}
			w, err := NewWriter(io.Discard, rd, plan, WriterOptions{})
			if err != nil {
				b.Fatal(err)
			}
			if _, err := enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan}); err != nil {
				b.Fatal(err)
			}
			if err := w.Close(); err != nil {
				b.Fatal(err)
			}
		}
		wall[k] += time.Since(w0)
		cpu[k] += cpuTime() - c0
	}
	b.ResetTimer()
	for range b.N {
		for k := range 3 {
			run(k)
		}
	}
	rows := float64(*benchRows * b.N)
	b.ReportMetric(rows/wall[0].Seconds(), "read-rows/s")
	b.ReportMetric(rows/wall[1].Seconds(), "passthrough-rows/s")
	b.ReportMetric(rows/wall[2].Seconds(), "enrich-rows/s")
	b.ReportMetric(wall[2].Seconds()/wall[1].Seconds(), "enrich/passthrough-wall")
	b.ReportMetric(cpu[2].Seconds()/cpu[1].Seconds(), "enrich/passthrough-cpu")
}

// cpuTime is the process's user+system CPU time so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// writeBenchFile writes n rows shaped like benchmarks/parquetgen's (lat,
// lon, timestamp, species, count; zstd; row groups of 1,048,576 rows).
func writeBenchFile(b *testing.B, path string, n int) {
	mem := memory.NewGoAllocator()
	sc := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: f64}, {Name: "lon", Type: f64},
		{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}},
		{Name: "species", Type: str}, {Name: "count", Type: arrow.PrimitiveTypes.Int64},
	}, nil)
	f, err := os.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	props := pq.NewWriterProperties(pq.WithCompression(compress.Codecs.Zstd), pq.WithMaxRowGroupLength(1<<20),
		pq.WithDictionaryFor("lat", false), pq.WithDictionaryFor("lon", false))
	w, err := pqarrow.NewFileWriter(sc, f, props, pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema()))
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 0x5eed))
	bld := array.NewRecordBuilder(mem, sc)
	defer bld.Release()
	for done := 0; done < n; done += 65536 {
		for range min(65536, n-done) {
			bld.Field(0).(*array.Float64Builder).Append(-60 + 130*rng.Float64())
			bld.Field(1).(*array.Float64Builder).Append(-180 + 360*rng.Float64())
			bld.Field(2).(*array.TimestampBuilder).Append(arrow.Timestamp((1420070400 + rng.Int64N(10*365*86400)) * 1e6))
			bld.Field(3).(*array.StringBuilder).Append(fmt.Sprintf("species_%03d", rng.IntN(500)))
			bld.Field(4).(*array.Int64Builder).Append(rng.Int64N(1000))
		}
		rec := bld.NewRecordBatch()
		err := w.WriteBuffered(rec)
		rec.Release()
		if err != nil {
			b.Fatal(err)
		}
	}
	if err := w.Close(); err != nil { // closes f
		b.Fatal(err)
	}
}

// BenchmarkWriter measures the writer alone (encoding, statistics and zstd
// compression of one 65,536-row batch of the benchmark file's shape), as a
// passthrough (no added columns) and with the default columns.
func BenchmarkWriter(b *testing.B) {
	for _, add := range []string{"none", "position,phase"} {
		b.Run(fmt.Sprintf("add=%s/n=%d", add, benchWriterRows), func(b *testing.B) {
			benchWriter(b, add, WriterOptions{Workers: 1})
		})
	}
}

const benchWriterRows = 65536

// benchWriter writes one encoded batch of benchWriterRows rows of the
// benchmark file's shape, with the columns of add, b.N times.
func benchWriter(b *testing.B, add string, o WriterOptions) {
	const n = benchWriterRows
	path := filepath.Join(b.TempDir(), "events.parquet")
	writeBenchFile(b, path, n)
	in, err := os.ReadFile(path)
	if err != nil {
		b.Fatal(err)
	}
	rd, err := NewReader(bytes.NewReader(in), Options{})
	if err != nil {
		b.Fatal(err)
	}
	defer rd.Close()
	ch, err := rd.Next(context.Background(), n)
	if err != nil {
		b.Fatal(err)
	}
	c := ch.(*chunk)
	defer c.release()
	plan, _ := enrich.NewPlan(enrich.PlanOptions{Add: add, Input: rd.Columns()})
	res := benchResults(n, plan)
	clear(res.Status)
	if err := c.Encode(res); err != nil {
		b.Fatal(err)
	}
	w, err := NewWriter(io.Discard, rd, plan, o)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		// A chunk sharing the encoded batch; Write releases its references.
		c.rec.Retain()
		c.out.Retain()
		cc := &chunk{rd: rd, rec: c.rec, out: c.out}
		rd.mu.Lock()
		rd.live[cc] = struct{}{}
		rd.mu.Unlock()
		if err := w.Write(context.Background(), cc); err != nil {
			b.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		b.Fatal(err)
	}
	b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
}
