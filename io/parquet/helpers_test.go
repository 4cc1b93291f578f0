package parquet

import (
	"bytes"
	"context"
	"flag"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/heliotag/heliotag/enrich"
)

// checkedMem is an allocator that fails the test if any Arrow memory it
// handed out is still held when the test ends.
func checkedMem(t testing.TB) *memory.CheckedAllocator {
	t.Helper()
	mem := memory.NewCheckedAllocator(memory.NewGoAllocator())
	t.Cleanup(func() { mem.AssertSize(t, 0) })
	return mem
}

// fileSpec describes a test input file.
type fileSpec struct {
	schema      *arrow.Schema
	json        string            // rows as a JSON array of objects (arrow's JSON reader)
	kv          map[string]string // extra file metadata (written as Arrow schema metadata)
	noSchema    bool              // do not store the Arrow schema (as non-Arrow writers do)
	codec       compress.Compression
	rowGroupLen int64
	dictLimit   int64 // dictionary page size limit; 0 = the library's
}

// makeFile writes a Parquet file from a spec with arrow-go's writer.
func makeFile(t testing.TB, s fileSpec) []byte {
	t.Helper()
	mem := memory.NewGoAllocator()
	sc := s.schema
	if len(s.kv) > 0 {
		var keys, values []string
		for k, v := range s.kv {
			keys, values = append(keys, k), append(values, v)
		}
		md := arrow.NewMetadata(keys, values)
		sc = arrow.NewSchema(sc.Fields(), &md)
	}
	rec, _, err := array.RecordFromJSON(mem, sc, strings.NewReader(s.json))
	if err != nil {
		t.Fatalf("test data: %v", err)
	}
	defer rec.Release()
	return writeRecords(t, sc, s, rec)
}

func writeRecords(t testing.TB, sc *arrow.Schema, s fileSpec, recs ...arrow.RecordBatch) []byte {
	t.Helper()
	codec := s.codec
	if codec == 0 {
		codec = compress.Codecs.Snappy
	}
	opts := []pq.WriterProperty{pq.WithCompression(codec)}
	if s.rowGroupLen > 0 {
		opts = append(opts, pq.WithMaxRowGroupLength(s.rowGroupLen))
	}
	if s.dictLimit > 0 {
		opts = append(opts, pq.WithDictionaryPageSizeLimit(s.dictLimit))
	}
	var aopts []pqarrow.WriterOption
	if !s.noSchema {
		aopts = append(aopts, pqarrow.WithStoreSchema())
	}
	var buf bytes.Buffer
	w, err := pqarrow.NewFileWriter(sc, &buf, pq.NewWriterProperties(opts...), pqarrow.NewArrowWriterProperties(aopts...))
	if err != nil {
		t.Fatal(err)
	}
	for _, rec := range recs {
		if err := w.Write(rec); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// runOpts configures enrichFile.
type runOpts struct {
	sel       enrich.Select
	add       string
	policy    enrich.Policy
	workers   int
	batch     int
	writer    WriterOptions
	solar     func(*enrich.Options)
	mem       memory.Allocator
	wantUsage bool
}

// runResult is what an enrich run over a Parquet input produced.
type runResult struct {
	out     []byte
	sum     enrich.Summary
	rejects string
	err     error
	// parallel: the writer encoded columns on several goroutines.
	parallel bool
}

// enrichFile runs the enrich pipeline over a Parquet input held in memory
// and returns the output file's bytes, with a checked allocator.
func enrichFile(t testing.TB, in []byte, o runOpts) runResult {
	t.Helper()
	mem := o.mem
	if mem == nil {
		mem = checkedMem(t)
	}
	rd, err := NewReader(bytes.NewReader(in), Options{Select: o.sel, Allocator: mem})
	if err != nil {
		return runResult{err: err}
	}
	defer rd.Close()
	plan, err := enrich.NewPlan(enrich.PlanOptions{Add: o.add, Input: rd.Columns(),
		TimeNote: o.sel.ZoneMode(), ErrorColumn: o.policy == enrich.PolicyKeep, Heading: o.sel.HasHeading()})
	if err != nil {
		t.Fatal(err)
	}
	var out, rej bytes.Buffer
	w, err := NewWriter(&out, rd, plan, o.writer)
	if err != nil {
		return runResult{err: err}
	}
	eo := enrich.Options{Plan: plan, Policy: o.policy, Workers: o.workers, BatchRows: o.batch}
	if o.policy == enrich.PolicySkip {
		eo.Rejects = &rej
	}
	if eo.Workers == 0 {
		eo.Workers = 2
	}
	if eo.BatchRows == 0 {
		eo.BatchRows = 3 // several batches even in small tests
	}
	if o.solar != nil {
		o.solar(&eo)
	}
	sum, err := enrich.Run(context.Background(), rd, w, eo)
	if cerr := w.Close(); err == nil {
		err = cerr
	}
	return runResult{out: out.Bytes(), sum: sum, rejects: rej.String(), err: err, parallel: w.cols != nil}
}

// readTable reads a whole Parquet file back with pqarrow (the caller
// releases the table).
func readTable(t testing.TB, b []byte, mem memory.Allocator) arrow.Table {
	t.Helper()
	tbl, err := pqarrow.ReadTable(context.Background(), bytes.NewReader(b), pq.NewReaderProperties(mem),
		pqarrow.ArrowReadProperties{BatchSize: 1024}, mem)
	if err != nil {
		t.Fatalf("reading the output back: %v", err)
	}
	return tbl
}

// column returns the named column of tbl as one array (released by the caller).
func column(t testing.TB, tbl arrow.Table, name string, mem memory.Allocator) arrow.Array {
	t.Helper()
	idx := tbl.Schema().FieldIndices(name)
	if len(idx) != 1 {
		t.Fatalf("output has %d columns named %q; columns: %v", len(idx), name, tbl.Schema())
	}
	a, err := array.Concatenate(tbl.Column(idx[0]).Data().Chunks(), mem)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// updateSeeds rewrites the fuzz seed corpus files that tests make
// (go test ./io/parquet -run Damaged -update-seeds).
var updateSeeds = flag.Bool("update-seeds", false, "rewrite the fuzz seed files made by tests")
