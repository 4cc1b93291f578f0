package parquet

import (
	"cmp"
	"context"
	"encoding/base64"
	"fmt"
	"io"
	"slices"
	"sync"
	"sync/atomic"
	"time"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/bitutil"
	"github.com/apache/arrow-go/v18/arrow/flight"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/metadata"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
	"github.com/apache/arrow-go/v18/parquet/schema"
)

// columnSet writes the blocks of a flat schema (every column one top-level
// Parquet leaf) with several goroutines, each column of a block encoded and
// compressed by one of them, and produces the same bytes as
// pqarrow.FileWriter.WriteBuffered does with one goroutine:
//
//   - the file writer is arrow-go's file.Writer, made with the schema,
//     properties and key-value metadata pqarrow.NewFileWriter gives it;
//   - each block goes into a buffered row group (file.BufferedRowGroupWriter),
//     whose column writers each keep their pages in their own memory until
//     the row group is closed, then write them in column order;
//   - each column of a block is handed to pqarrow.WriteArrowToColumn with the
//     definition levels pqarrow's own path builder makes for a top-level leaf
//     (none for a required column; for an optional one, 1 where a value is
//     present and 0 where it is null).
//
// A column writer is used by one goroutine at a time: the goroutines of a
// block claim whole columns, and the next block starts after all of them are
// done (a block is 4,096 rows, a few milliseconds of work). The row-group
// writer, the file writer and the output are used by the calling goroutine
// only, between blocks. Closing a row group (the dictionary pages, the
// statistics, the copy of each column chunk to the output) is serial, after
// the goroutines have cut each column's last data page (see lastPage).
//
// What the goroutines share is safe for concurrent use: the allocator
// (arrow's Go and checked allocators are), the writer properties (read
// only), and the codecs (arrow-go's snappy is stateless, its gzip, brotli and
// lz4 encoders come from pools, and this package's zstd codec uses
// zstd.Encoder.EncodeAll, which is safe for concurrent use). Page indexes and
// bloom filters are not enabled (arrow-go's default); their builders are
// made per column anyway, before the goroutines start.
type columnSet struct {
	fw  *file.Writer
	rgw file.BufferedRowGroupWriter
	cws []file.ColumnChunkWriter // the current row group's column writers

	optional []bool // per column: a nullable (OPTIONAL) leaf
	slots    []columnSlot
	order    []int           // columns in the order they are claimed: costliest first
	cost     []time.Duration // per column: time spent on the last block
	errs     []error         // per column: the last block's error
	next     atomic.Int64    // the next position in order to claim
	pending  bool            // the current row group's last pages are not cut
	failed   error           // a write failed: the file is abandoned

	// fail, set by tests, is called before each column of each block is
	// written; an error it returns is that column's error.
	fail func(col int) error
}

// columnSlot is what one goroutine of a block works with.
type columnSlot struct {
	// actx carries pqarrow's per-writer settings and scratch buffers (the
	// Arrow writer properties), which pqarrow.WriteArrowToColumn reads from a
	// context; it carries no deadline or cancellation. One per goroutine,
	// as pqarrow's scratch buffers are not safe for concurrent use.
	actx   context.Context
	levels []int16
}

// flatLeaves reports whether every field of sc is exactly one top-level
// Parquet leaf of pqs whose definition levels pqarrow derives from the
// field's validity alone, and returns which fields are optional. Nested
// types (list, struct, map, union, run-end encoded), extension types (their
// storage might be nested), null-typed columns and dictionaries of those
// are left to pqarrow.
func flatLeaves(sc *arrow.Schema, pqs *schema.Schema) ([]bool, bool) {
	if pqs.NumColumns() != sc.NumFields() {
		return nil, false
	}
	optional := make([]bool, sc.NumFields())
	for i, f := range sc.Fields() {
		if !flatType(f.Type) {
			return nil, false
		}
		col := pqs.Column(i)
		if col.MaxRepetitionLevel() != 0 || len(col.ColumnPath()) != 1 || col.Name() != f.Name {
			return nil, false
		}
		switch col.MaxDefinitionLevel() {
		case 0:
			if f.Nullable {
				return nil, false
			}
		case 1:
			if !f.Nullable {
				return nil, false
			}
		default:
			return nil, false
		}
		optional[i] = f.Nullable
	}
	return optional, true
}

func flatType(dt arrow.DataType) bool {
	if _, ok := dt.(arrow.ExtensionType); ok {
		return false
	}
	if d, ok := dt.(*arrow.DictionaryType); ok {
		return d.ValueType.ID() != arrow.DICTIONARY && flatType(d.ValueType)
	}
	if _, ok := dt.(arrow.NestedType); ok {
		return false
	}
	switch dt.ID() {
	case arrow.NULL, arrow.EXTENSION, arrow.STRUCT, arrow.LIST, arrow.LARGE_LIST, arrow.FIXED_SIZE_LIST,
		arrow.MAP, arrow.SPARSE_UNION, arrow.DENSE_UNION, arrow.RUN_END_ENCODED, arrow.LIST_VIEW,
		arrow.LARGE_LIST_VIEW, arrow.DICTIONARY:
		return false
	}
	return true
}

// newColumnSet starts a Parquet file on w as pqarrow.NewFileWriter(sc, w,
// props, arrProps) would (the same schema, the same key-value metadata with
// the stored Arrow schema, the same magic bytes), to be written by up to
// goroutines goroutines. It returns ok false, writing nothing, when sc is
// not flat (see flatLeaves).
func newColumnSet(sc *arrow.Schema, w io.Writer, props *pq.WriterProperties, arrProps pqarrow.ArrowWriterProperties, storeSchema bool, goroutines int) (*columnSet, bool, error) {
	pqs, err := pqarrow.ToParquet(sc, props, arrProps)
	if err != nil {
		return nil, false, err
	}
	optional, ok := flatLeaves(sc, pqs)
	if !ok {
		return nil, false, nil
	}
	// pqarrow.NewFileWriter: the schema's metadata, then the Arrow schema
	// (with list element fields renamed, which a flat schema has none of)
	// serialized as an IPC message, in base64.
	meta := make(metadata.KeyValueMetadata, 0)
	smd := sc.Metadata()
	for i := range smd.Len() {
		meta.Append(smd.Keys()[i], smd.Values()[i])
	}
	if storeSchema {
		stored := arrow.NewSchema(sc.Fields(), &smd)
		meta.Append("ARROW:schema", base64.StdEncoding.EncodeToString(flight.SerializeSchema(stored, props.Allocator())))
	}
	fw, err := file.NewParquetWriterWithError(w, pqs.Root(), file.WithWriterProps(props), file.WithWriteMetadata(meta))
	if err != nil {
		return nil, false, err
	}
	n := sc.NumFields()
	s := &columnSet{
		fw:       fw,
		cws:      make([]file.ColumnChunkWriter, n),
		optional: optional,
		slots:    make([]columnSlot, max(1, min(goroutines, n))),
		order:    make([]int, n),
		cost:     make([]time.Duration, n),
		errs:     make([]error, n),
	}
	for k := range s.slots {
		s.slots[k].actx = pqarrow.NewArrowWriteContext(context.Background(), &arrProps)
	}
	for i := range s.order {
		s.order[i] = i
	}
	return s, true, nil
}

// write writes one block of rows, in a new row group when newGroup is set,
// and cuts the columns' last pages when last is set (the block ends the row
// group).
func (s *columnSet) write(rec arrow.RecordBatch, newGroup, last bool) error {
	if s.failed != nil {
		return s.failed
	}
	if newGroup {
		rgw, err := s.fw.AppendBufferedRowGroupChecked()
		if err != nil {
			s.failed = err
			return err
		}
		s.rgw = rgw
		s.pending = false
		for i := range s.cws {
			if s.cws[i], err = rgw.Column(i); err != nil {
				s.failed = err
				return err
			}
		}
	}
	if int(rec.NumCols()) != len(s.cws) {
		s.failed = fmt.Errorf("a block of %d columns for a schema of %d", rec.NumCols(), len(s.cws))
		return s.failed
	}
	s.pending = !last
	return s.each(func(slot *columnSlot, j int) error {
		if err := s.writeColumn(slot, j, rec.Column(j)); err != nil || !last {
			return err
		}
		return s.lastPage(j)
	})
}

// finishGroup cuts the last page of each column of the current row group,
// if write has not: the row group is complete.
func (s *columnSet) finishGroup() error {
	if s.failed != nil {
		return s.failed
	}
	if !s.pending {
		return nil
	}
	return s.each(func(_ *columnSlot, j int) error { return s.lastPage(j) })
}

// each calls do for every column, on len(s.slots) goroutines (the caller's
// among them), and returns the first column's error.
func (s *columnSet) each(do func(slot *columnSlot, j int) error) error {
	// Longest columns first, each claimed by the first free goroutine: the
	// block ends soon after its costliest column does.
	slices.SortStableFunc(s.order, func(a, b int) int { return cmp.Compare(s.cost[b], s.cost[a]) })
	s.next.Store(0)
	var wg sync.WaitGroup
	for k := 1; k < len(s.slots); k++ {
		wg.Go(func() { s.run(&s.slots[k], do) })
	}
	s.run(&s.slots[0], do)
	wg.Wait()
	for _, err := range s.errs {
		if err != nil {
			s.failed = err
			return err
		}
	}
	return nil
}

// run calls do for the columns slot claims, until none is left.
func (s *columnSet) run(slot *columnSlot, do func(slot *columnSlot, j int) error) {
	for {
		i := int(s.next.Add(1)) - 1
		if i >= len(s.order) {
			return
		}
		j := s.order[i]
		start := time.Now()
		s.errs[j] = do(slot, j)
		s.cost[j] = time.Since(start)
	}
}

// pageCutter is implemented by arrow-go's column chunk writers.
type pageCutter interface{ FlushCurrentPage() error }

// lastPage cuts, encodes and compresses column j's last data page of the
// row group, as the column writer's Close would first do (Close then writes
// the dictionary page, then the buffered data pages in order; cutting the
// page earlier changes none of them): the costly part of closing a row
// group is then done on several goroutines. Close cuts a last page only when
// values are buffered; the page statistics count them (values and nulls,
// reset when a page is cut, updated before the values are buffered), so
// without statistics the page is left to Close.
func (s *columnSet) lastPage(j int) (err error) {
	defer recoverInto(&err)
	cw := s.cws[j]
	st := cw.PageStatistics()
	if st == nil || st.NumValues()+st.NullCount() == 0 {
		return nil
	}
	if pc, ok := cw.(pageCutter); ok {
		return pc.FlushCurrentPage()
	}
	return nil
}

// writeColumn writes one column of a block as pqarrow's arrowColumnWriter
// does for a top-level leaf.
func (s *columnSet) writeColumn(slot *columnSlot, j int, arr arrow.Array) (err error) {
	defer recoverInto(&err)
	if s.fail != nil {
		if err := s.fail(j); err != nil {
			return err
		}
	}
	if arr.Len() == 0 {
		return nil // pqarrow writes nothing for an empty column chunk
	}
	if d, ok := arr.(*array.Dictionary); ok && d.Dictionary().NullN() > 0 {
		// pqarrow's path builder refuses these with this error.
		return fmt.Errorf("%w: writing DictionaryArray with null encoded in dictionary not yet supported", arrow.ErrNotImplemented)
	}
	var levels []int16
	leafNullable := false
	if s.optional[j] {
		levels, leafNullable = slot.defLevels(arr)
	}
	values := array.NewSlice(arr, 0, int64(arr.Len()))
	defer values.Release()
	return pqarrow.WriteArrowToColumn(slot.actx, s.cws[j], values, levels, nil, leafNullable)
}

// defLevels returns the definition levels of an optional top-level leaf,
// and whether the leaf counts as nullable, as pqarrow's path builder makes
// them: all 1 and not nullable when no value is null, all 0 when all are,
// else 1 or 0 from the validity bitmap.
func (slot *columnSlot) defLevels(arr arrow.Array) ([]int16, bool) {
	n := arr.Len()
	if cap(slot.levels) < n {
		slot.levels = make([]int16, n)
	}
	lv := slot.levels[:n]
	switch nulls := arr.Data().NullN(); {
	case nulls == 0:
		fill(lv, 1)
		return lv, false
	case nulls == n:
		fill(lv, 0)
		return lv, true
	}
	bits, off := arr.NullBitmapBytes(), arr.Data().Offset()
	for i := range lv {
		lv[i] = 0
		if bitutil.BitIsSet(bits, off+i) {
			lv[i] = 1
		}
	}
	return lv, true
}

func fill(lv []int16, v int16) {
	for i := range lv {
		lv[i] = v
	}
}

// rowGroupCompressedBytes is pqarrow.FileWriter.RowGroupTotalCompressedBytes.
func (s *columnSet) rowGroupCompressedBytes() int64 {
	if s.rgw == nil {
		return 0
	}
	return s.rgw.TotalCompressedBytes()
}

// close writes the last row group and the footer; after a failed write it
// only releases the column writers' memory.
func (s *columnSet) close() (err error) {
	defer recoverInto(&err)
	if s.failed != nil {
		s.abandon()
		return nil
	}
	if err := s.finishGroup(); err != nil {
		s.abandon()
		return err
	}
	if err := s.fw.Close(); err != nil {
		s.abandon()
		return err
	}
	return nil
}

// abandon releases the memory of a file that failed: closing each column
// writer frees its buffers (what it writes to the output is discarded with
// the output), then the file writer.
func (s *columnSet) abandon() {
	for _, cw := range s.cws {
		if cw != nil {
			func() {
				defer func() { _ = recover() }()
				_ = cw.Close()
			}()
		}
	}
	func() {
		defer func() { _ = recover() }()
		_ = s.fw.Close()
	}()
}
