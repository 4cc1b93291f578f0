package parquet

import (
	"bufio"
	"cmp"
	"context"
	"fmt"
	"io"
	"math"
	"runtime"
	"sort"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
	"github.com/apache/arrow-go/v18/parquet/schema"

	"github.com/heliotag/heliotag/enrich"
)

// DefaultRowGroupRows is the number of rows per output row group when
// WriterOptions.RowGroupRows is 0.
const DefaultRowGroupRows = 128 * 1024

// maxRowGroupBytes starts a new row group early when the current one holds
// this many compressed bytes (wide rows), bounding the writer's memory: a
// row group's compressed pages stay in memory until it is closed, in
// buffers that grow by doubling. The bytes are those of the pages cut so
// far, so a group may pass the bound by up to one page per column.
// Measured on the benchmark files (5M rows, 2 workers, 256 KiB pages), 4 MiB
// instead of 128 MiB cut the peak RSS of an enrich by 10 to 40 MiB (groups
// of 64Ki rows instead of 128Ki for 36 or 48 columns, of 32Ki to 40Ki rows
// with --add all), making the output 0.1% to 1.3% larger, at no measurable
// cost in enrich time (a 36-column passthrough took about 5% longer).
const maxRowGroupBytes = 4 << 20

// defaultDataPageSize is the size at which a data page is cut. Every column
// writer of a row group holds its page being filled, and that page again
// assembled and compressed: with arrow-go's 1 MiB pages, 3 MiB per column.
// Measured on the benchmark files (5M rows, 2 workers), pages of 256 KiB
// instead of 1 MiB cut the peak RSS of an enrich by 80 to 120 MiB, and made
// the output 0.6% to 1.8% larger, 8.4% with camera --add all (event times
// that repeat across rows find fewer matches within a smaller page), at no
// cost in time.
const defaultDataPageSize = 256 << 10

// Compressions lists the codec names WriterOptions.Compression accepts.
var Compressions = []string{"uncompressed", "snappy", "gzip", "brotli", "zstd", "lz4"}

// WriterOptions configures a Writer. The zero value keeps the input's codecs
// and writes DefaultRowGroupRows rows per row group.
type WriterOptions struct {
	// Compression is the codec of every output column: one of Compressions
	// ("lz4" is LZ4_RAW). "" keeps each input column's codec (from the first
	// row group) and gives the added columns the codec most input columns use
	// (zstd for a file with no row groups).
	Compression string
	// RowGroupRows is the number of rows per output row group; 0 means
	// DefaultRowGroupRows. A row group is also closed early when its pages
	// reach 4 MiB compressed.
	RowGroupRows int
	// Workers is the number of goroutines that encode and compress the
	// columns of each block of rows at once (the goroutine calling Write
	// among them); 0 means runtime.NumCPU(), as in enrich.Options, and 1
	// encodes the columns one after another. The output's bytes do not
	// depend on it. Schemas with nested (list, struct, map) or extension
	// columns are always encoded one column after another.
	Workers int

	// dataPageSize is the target data page size in bytes, 0 meaning
	// defaultDataPageSize; tests make it small to cut many pages.
	dataPageSize int64
	// groupBytes is the compressed size at which a row group is closed
	// early, 0 meaning maxRowGroupBytes; tests make it small.
	groupBytes int64
}

// ParseCompression checks a codec name (case-insensitive; "none" is
// "uncompressed", "lz4_raw" is "lz4"). The error wraps enrich.ErrUsage.
func ParseCompression(name string) (compress.Compression, error) {
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "uncompressed", "none":
		return compress.Codecs.Uncompressed, nil
	case "snappy":
		return compress.Codecs.Snappy, nil
	case "gzip":
		return compress.Codecs.Gzip, nil
	case "brotli":
		return compress.Codecs.Brotli, nil
	case "zstd":
		return compress.Codecs.Zstd, nil
	case "lz4", "lz4_raw":
		return compress.Codecs.Lz4Raw, nil
	}
	return 0, fmt.Errorf("%w: compression %q; valid: %s", enrich.ErrUsage, name, strings.Join(Compressions, ", "))
}

// Writer writes the enriched chunks of a Reader as one Parquet file.
type Writer struct {
	rd          *Reader
	bw          *bufio.Writer
	fw          *pqarrow.FileWriter // one goroutine; nil when cols is set
	cols        *columnSet          // several goroutines
	schema      *arrow.Schema
	rows        int64 // rows written
	groupRows   int64 // rows per row group
	rowsInGroup int64 // rows in the current row group
	groupBytes  int64 // compressed bytes that close a row group early
	pend        []arrow.RecordBatch
	pendRows    int64
	closed      bool
}

// hideClose keeps pqarrow from closing the caller's writer (it closes any
// io.Closer it writes to): the caller commits or removes the file.
type hideClose struct{ io.Writer }

// NewWriter prepares the output: the input's schema with the plan's columns,
// the input's metadata, and the codecs. Nothing is written before the first
// row group is complete, except through Close.
func NewWriter(w io.Writer, rd *Reader, plan *enrich.Plan, o WriterOptions) (*Writer, error) {
	rows := o.RowGroupRows
	if rows < 0 {
		return nil, fmt.Errorf("%w: row group size %d; it must be positive", enrich.ErrUsage, rows)
	}
	if rows == 0 {
		rows = DefaultRowGroupRows
	}
	if o.Workers < 0 {
		return nil, fmt.Errorf("%w: %d writer workers; it must be positive", enrich.ErrUsage, o.Workers)
	}
	workers := o.Workers
	if workers == 0 {
		workers = runtime.NumCPU()
	}
	out := rd.output(plan)
	arrProps := pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema(), pqarrow.WithAllocator(rd.mem))

	// The leaves of the output schema, to set codecs and dictionaries per column.
	leaves, err := pqarrow.ToParquet(out.schema, pq.NewWriterProperties(), arrProps)
	if err != nil {
		return nil, fmt.Errorf("parquet: output schema: %w", err)
	}
	opts := []pq.WriterProperty{
		pq.WithAllocator(rd.mem),
		pq.WithMaxRowGroupLength(math.MaxInt64), // row groups are cut by Write
		pq.WithDictionaryDefault(true),
		pq.WithStats(true),
	}
	opts = append(opts, pq.WithDataPageSize(cmp.Or(o.dataPageSize, defaultDataPageSize)))
	codecs, fallback := rd.codecs()
	if o.Compression != "" {
		c, err := ParseCompression(o.Compression)
		if err != nil {
			return nil, err
		}
		codecs, fallback = nil, c
	}
	opts = append(opts, pq.WithCompression(fallback))
	dicts := rd.dictionaries()
	added := map[string]enrich.Kind{}
	for _, c := range plan.Columns {
		added[c.Name] = c.Kind
	}
	for i := range leaves.NumColumns() {
		col := leaves.Column(i)
		path := col.ColumnPath().String()
		if c, ok := codecs[path]; ok {
			opts = append(opts, pq.WithCompressionFor(path, c))
		}
		switch pt := col.PhysicalType(); {
		case pt == pq.Types.Float || pt == pq.Types.Double:
			// Measured here: float columns of measurements rarely repeat, and a
			// dictionary attempt costs time and makes the footer vary.
			opts = append(opts, pq.WithDictionaryFor(path, false))
		case added[path] == enrich.KindInstant:
			opts = append(opts, pq.WithDictionaryFor(path, false)) // event times rarely repeat
		case added[path] == enrich.KindCategory:
			// No min/max statistics: arrow-go computes them by hashing every
			// index of every write (15% of the writer's time in an enrich,
			// measured by BenchmarkWriter), and a handful of words present in
			// almost every row group lets no reader skip one.
			opts = append(opts, pq.WithStatsFor(path, false))
		default:
			if d, ok := dicts[path]; ok {
				opts = append(opts, pq.WithDictionaryFor(path, d))
			}
		}
	}
	if rd.allInt96() && !hasInstants(plan) {
		arrProps = pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema(), pqarrow.WithAllocator(rd.mem), pqarrow.WithDeprecatedInt96Timestamps(true))
	}
	bw := bufio.NewWriterSize(w, 1<<20)
	props := pq.NewWriterProperties(opts...)
	wr := &Writer{rd: rd, bw: bw, schema: out.schema, groupRows: int64(rows), groupBytes: cmp.Or(o.groupBytes, maxRowGroupBytes)}
	if workers > 1 {
		cols, ok, err := newColumnSet(out.schema, hideClose{bw}, props, arrProps, true, workers)
		if err != nil {
			return nil, fmt.Errorf("parquet: starting the output: %w", err)
		}
		if ok {
			wr.cols = cols
			return wr, nil
		}
	}
	if wr.fw, err = pqarrow.NewFileWriter(out.schema, hideClose{bw}, props, arrProps); err != nil {
		return nil, fmt.Errorf("parquet: starting the output: %w", err)
	}
	return wr, nil
}

func hasInstants(plan *enrich.Plan) bool {
	for _, c := range plan.Columns {
		if c.Kind == enrich.KindInstant {
			return true
		}
	}
	return false
}

// codecs returns each input leaf column's codec by path, and the codec most
// leaves use (zstd when the file has no row groups).
func (rd *Reader) codecs() (map[string]compress.Compression, compress.Compression) {
	md := rd.pf.MetaData()
	if md.NumRowGroups() == 0 {
		return nil, compress.Codecs.Zstd
	}
	rg := md.RowGroup(0)
	m := map[string]compress.Compression{}
	count := map[compress.Compression]int{}
	for i := range md.Schema.NumColumns() {
		cc, err := rg.ColumnChunk(i)
		if err != nil {
			continue
		}
		c := cc.Compression()
		if _, err := compress.GetCodec(c); err != nil {
			c = compress.Codecs.Zstd
		}
		m[md.Schema.Column(i).ColumnPath().String()] = c
		count[c]++
	}
	best, n := compress.Codecs.Zstd, 0
	// Ties go to the lower codec number, so the choice does not depend on map order.
	keys := make([]compress.Compression, 0, len(count))
	for c := range count {
		keys = append(keys, c)
	}
	sort.Slice(keys, func(i, j int) bool { return keys[i] < keys[j] })
	for _, c := range keys {
		if count[c] > n {
			best, n = c, count[c]
		}
	}
	return m, best
}

// dictionaries returns, for each input leaf column whose first column chunk
// records its page encodings, whether the input's writer kept it
// dictionary-encoded: true when every data page uses the dictionary, false
// when it fell back to plain pages (high-cardinality values such as
// timestamps) or never tried. The output follows the input's choice: a
// dictionary attempt on unique values costs time (a third of a passthrough's
// CPU on the benchmark file's timestamps, measured here) and saves nothing.
func (rd *Reader) dictionaries() map[string]bool {
	md := rd.pf.MetaData()
	m := map[string]bool{}
	if md.NumRowGroups() == 0 {
		return m
	}
	rg := md.RowGroup(0)
	for i := range md.Schema.NumColumns() {
		cc, err := rg.ColumnChunk(i)
		if err != nil {
			continue
		}
		stats := cc.EncodingStats()
		if len(stats) == 0 {
			continue // not recorded: the writer's default
		}
		dict := cc.HasDictionaryPage()
		for _, st := range stats {
			switch st.PageType.String() {
			case "DATA_PAGE", "DATA_PAGE_V2":
				if st.Encoding != pq.Encodings.PlainDict && st.Encoding != pq.Encodings.RLEDict {
					dict = false
				}
			}
		}
		m[md.Schema.Column(i).ColumnPath().String()] = dict
	}
	return m
}

// allInt96 reports whether the input has timestamp columns and stores all
// of them as legacy INT96, which the output then keeps.
func (rd *Reader) allInt96() bool {
	sc := rd.pf.MetaData().Schema
	n96, nts := 0, 0
	for i := range sc.NumColumns() {
		col := sc.Column(i)
		if col.PhysicalType() == pq.Types.Int96 {
			n96++
			continue
		}
		if _, ok := col.LogicalType().(*schema.TimestampLogicalType); ok {
			nts++
		}
	}
	return n96 > 0 && nts == 0
}

// Write appends an encoded chunk's rows to the output and releases the
// chunk's Arrow memory.
//
// Rows reach the Parquet column writers in blocks of exactly writeBlock rows
// (fewer only at the end of a row group or of the file), whatever the chunk
// sizes: page and row-group boundaries then depend on the rows alone, so the
// output's bytes do not depend on the batch size or the number of workers. A
// block that spans two chunks is copied together (at most writeBlock-1 rows
// per chunk).
func (w *Writer) Write(_ context.Context, ch enrich.Chunk) (err error) {
	c, ok := ch.(*chunk)
	if !ok || c.out == nil {
		return fmt.Errorf("parquet: chunk %T was not encoded by this package", ch)
	}
	defer c.release()
	defer recoverInto(&err)
	rec := c.out
	n := rec.NumRows()
	for off := int64(0); off < n; {
		need := w.blockRows() - w.pendRows
		take := min(need, n-off)
		part := rec.NewSlice(off, off+take)
		off += take
		if w.pendRows == 0 && take == need {
			err = w.writeBlock(part)
			part.Release()
		} else {
			w.pend = append(w.pend, part)
			w.pendRows += take
			if w.pendRows == w.blockRows() {
				err = w.flushPending()
			}
		}
		if err != nil {
			return err
		}
	}
	return nil
}

// writeBlock is the number of rows passed to the column writers at once.
const writeBlock = 4096

// blockRows is the size of the block being filled: writeBlock, or what is
// left of the row group.
func (w *Writer) blockRows() int64 {
	return min(writeBlock, w.groupRows-w.rowsInGroup)
}

// flushPending writes the pieces of a block gathered from several chunks.
func (w *Writer) flushPending() error {
	if w.pendRows == 0 {
		return nil
	}
	defer func() {
		for _, p := range w.pend {
			p.Release()
		}
		w.pend, w.pendRows = w.pend[:0], 0
	}()
	if len(w.pend) == 1 {
		return w.writeBlock(w.pend[0])
	}
	cols := make([]arrow.Array, w.schema.NumFields())
	defer func() {
		for _, a := range cols {
			if a != nil {
				a.Release()
			}
		}
	}()
	parts := make([]arrow.Array, len(w.pend))
	for j := range cols {
		for k, p := range w.pend {
			parts[k] = p.Column(j)
		}
		a, err := array.Concatenate(parts, w.rd.mem)
		if err != nil {
			return fmt.Errorf("parquet: gathering rows: %w", err)
		}
		cols[j] = a
	}
	rec := array.NewRecordBatch(w.schema, cols, w.pendRows)
	defer rec.Release()
	return w.writeBlock(rec)
}

// writeBlock writes one block into the current row group, starting a new
// group when the current one is full (in rows, or in compressed bytes).
func (w *Writer) writeBlock(rec arrow.RecordBatch) error {
	if w.cols != nil {
		full := w.rowsInGroup+rec.NumRows() == w.groupRows
		if err := w.cols.write(rec, w.rowsInGroup == 0, full); err != nil {
			return fmt.Errorf("writing output: %w", err)
		}
		w.rows += rec.NumRows()
		w.rowsInGroup += rec.NumRows()
		if full {
			w.rowsInGroup = 0
		} else if w.cols.rowGroupCompressedBytes() >= w.groupBytes {
			w.rowsInGroup = 0
			if err := w.cols.finishGroup(); err != nil {
				return fmt.Errorf("writing output: %w", err)
			}
		}
		return nil
	}
	if w.rowsInGroup == 0 {
		if err := w.fw.NewBufferedRowGroupChecked(); err != nil {
			return fmt.Errorf("writing output: %w", err)
		}
	}
	if err := w.fw.WriteBuffered(rec); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	w.rows += rec.NumRows()
	w.rowsInGroup += rec.NumRows()
	if w.rowsInGroup == w.groupRows || w.fw.RowGroupTotalCompressedBytes() >= w.groupBytes {
		w.rowsInGroup = 0
	}
	return nil
}

// Close writes the last rows, the last row group and the footer, and
// flushes. It does not close the underlying writer.
func (w *Writer) Close() (err error) {
	defer recoverInto(&err)
	if w.closed {
		return nil
	}
	w.closed = true
	ferr := w.flushPending()
	var err2 error
	if w.cols != nil {
		err2 = w.cols.close()
	} else {
		err2 = w.fw.Close()
	}
	if err2 != nil && ferr == nil {
		ferr = err2
	}
	if ferr != nil {
		return fmt.Errorf("writing output: %w", ferr)
	}
	if err := w.bw.Flush(); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}
