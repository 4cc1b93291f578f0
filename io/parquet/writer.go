package parquet

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"sort"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
	"github.com/apache/arrow-go/v18/parquet/schema"

	"github.com/heliotag/heliotag/enrich"
)

// DefaultRowGroupRows is the number of rows per output row group when
// WriterOptions.RowGroupRows is 0.
const DefaultRowGroupRows = 256 * 1024

// maxRowGroupBytes starts a new row group early when the current one holds
// this many compressed bytes (wide rows), bounding the writer's memory.
const maxRowGroupBytes = 128 << 20

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
	// DefaultRowGroupRows. A row group is also closed early when it reaches
	// 128 MiB compressed.
	RowGroupRows int
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
	rd     *Reader
	bw     *bufio.Writer
	fw     *pqarrow.FileWriter
	schema *arrow.Schema
	rows   int64
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
	out := rd.output(plan)
	arrProps := pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema(), pqarrow.WithAllocator(rd.mem))

	// The leaves of the output schema, to set codecs and dictionaries per column.
	leaves, err := pqarrow.ToParquet(out.schema, pq.NewWriterProperties(), arrProps)
	if err != nil {
		return nil, fmt.Errorf("parquet: output schema: %w", err)
	}
	opts := []pq.WriterProperty{
		pq.WithAllocator(rd.mem),
		pq.WithMaxRowGroupLength(int64(rows)),
		pq.WithDictionaryDefault(true),
		pq.WithStats(true),
	}
	codecs, fallback := rd.codecs()
	if o.Compression != "" {
		c, err := ParseCompression(o.Compression)
		if err != nil {
			return nil, err
		}
		codecs, fallback = nil, c
	}
	opts = append(opts, pq.WithCompression(fallback))
	for i := range leaves.NumColumns() {
		col := leaves.Column(i)
		path := col.ColumnPath().String()
		if c, ok := codecs[path]; ok {
			opts = append(opts, pq.WithCompressionFor(path, c))
		}
		if pt := col.PhysicalType(); pt == pq.Types.Float || pt == pq.Types.Double {
			// Measured here: float columns of measurements rarely repeat, and a
			// dictionary attempt costs time and makes the footer vary.
			opts = append(opts, pq.WithDictionaryFor(path, false))
		}
	}
	if rd.allInt96() && !hasInstants(plan) {
		arrProps = pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema(), pqarrow.WithAllocator(rd.mem), pqarrow.WithDeprecatedInt96Timestamps(true))
	}
	bw := bufio.NewWriterSize(w, 1<<20)
	fw, err := pqarrow.NewFileWriter(out.schema, hideClose{bw}, pq.NewWriterProperties(opts...), arrProps)
	if err != nil {
		return nil, fmt.Errorf("parquet: starting the output: %w", err)
	}
	return &Writer{rd: rd, bw: bw, fw: fw, schema: out.schema}, nil
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

// Write appends an encoded chunk to the current row group and releases the
// chunk's Arrow memory.
func (w *Writer) Write(_ context.Context, ch enrich.Chunk) (err error) {
	c, ok := ch.(*chunk)
	if !ok || c.out == nil {
		return fmt.Errorf("parquet: chunk %T was not encoded by this package", ch)
	}
	defer c.release()
	defer recoverInto(&err)
	if c.out.NumRows() == 0 {
		return nil
	}
	if err := w.fw.WriteBuffered(c.out); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	w.rows += c.out.NumRows()
	if w.fw.RowGroupTotalCompressedBytes() >= maxRowGroupBytes {
		if err := w.fw.NewBufferedRowGroupChecked(); err != nil {
			return fmt.Errorf("writing output: %w", err)
		}
	}
	return nil
}

// Close writes the last row group and the footer, and flushes. It does not
// close the underlying writer.
func (w *Writer) Close() (err error) {
	defer recoverInto(&err)
	if err := w.fw.Close(); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	if err := w.bw.Flush(); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}
