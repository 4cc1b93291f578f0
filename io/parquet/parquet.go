// Package parquet reads and writes Parquet and GeoParquet files for heliotag,
// with Apache Arrow's Go implementation (pqarrow).
//
// The reader decodes the file in record batches of an explicit size through
// pqarrow's record reader, one batch per chunk, so memory depends on the batch
// and row-group sizes, not on the file's length. Every column is decoded (the
// output keeps them all), and workers read the location and time from the
// typed Arrow arrays: latitude and longitude from float, decimal, integer or
// numeric-text columns, or the representative point of a geometry (WKB, or a
// GeoParquet 1.1 native point struct); the time from a timestamp column (an
// instant when it is adjusted to UTC, a local wall clock needing a zone when
// not), a date and a time-of-day column, Unix time numbers (--epoch), or text
// in every form the text formats accept.
//
// The writer keeps every input column with its Arrow type, nullability and
// field metadata (it stores the Arrow schema in the file, as Arrow writers
// do), carries the file's key-value metadata over unchanged (GeoParquet's
// "geo" included), keeps each column's compression codec unless told
// otherwise, and appends the added columns: float64 values, dictionary-encoded
// strings for categories, strings (null when empty) for text, and timestamps
// in microseconds, UTC, for instants. When every column is flat (no list,
// struct, map or extension type), it encodes and compresses the columns of
// each block of rows on several goroutines (WriterOptions.Workers), writing
// the same bytes as on one.
package parquet

import (
	"context"
	"errors"
	"fmt"
	"io"
	"sync"
	"sync/atomic"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/heliotag/heliotag/enrich"
)

// Sentinel errors for whole-file problems. Match them with errors.Is.
var (
	// ErrFile: the input is not a readable Parquet file (truncated, corrupted,
	// or another format).
	ErrFile = errors.New("unreadable Parquet file")
	// ErrColumnType: a chosen column's type cannot hold what it is used for
	// (a latitude in a list column, say). It comes with enrich.ErrUsage.
	ErrColumnType = errors.New("unsupported column type")
	// ErrGeo: the GeoParquet "geo" metadata cannot be used (malformed, or a
	// geometry encoding this version does not read).
	ErrGeo = errors.New("unusable GeoParquet metadata")
	// ErrCRS: the geometry column's coordinates are not longitude/latitude
	// degrees on WGS84 (its crs is other than absent, OGC:CRS84 or EPSG:4326).
	ErrCRS = errors.New("geometry is not in longitude/latitude WGS84")
)

// ReaderAtSeeker is what a Parquet file is read from (an *os.File is one).
type ReaderAtSeeker interface {
	io.ReaderAt
	io.Seeker
}

// Options configures a Reader.
type Options struct {
	// Select names the location and time columns (empty names are detected;
	// a GeoParquet file's primary geometry column is used when neither
	// --lat/--lon nor --geometry is given).
	Select enrich.Select
	// Allocator holds the Arrow memory of decoded and encoded batches; nil
	// means memory.DefaultAllocator (Go's heap).
	Allocator memory.Allocator
}

// Reader reads a Parquet file batch by batch. Its chunks implement
// enrich.Chunk: each holds one Arrow record batch and owns it until the
// writer has written it (or the Reader is closed).
type Reader struct {
	pf     *file.Reader
	fr     *pqarrow.FileReader
	rr     pqarrow.RecordReader
	mem    memory.Allocator
	schema *arrow.Schema
	names  []string
	kv     []keyValue // the file's key-value metadata, in order
	size   int64
	rows   int64        // total rows in the file
	read   atomic.Int64 // rows handed out so far (Position reads it from another goroutine)
	batch  int          // the record reader's batch size
	ext    *extractor

	pending    arrow.RecordBatch // a decoded batch not yet handed out in full
	pendingOff int64

	mu     sync.Mutex
	live   map[*chunk]struct{} // chunks whose Arrow memory is not yet released
	out    *outSchema          // the output schema for the plan in use
	closed bool
}

type keyValue struct{ key, value string }

// NewReader opens the Parquet file r, reads its footer and schema, and
// resolves the columns that hold the location and the time. Problems with the
// file, its metadata or the column choice are returned here, before any row
// is decoded.
func NewReader(r ReaderAtSeeker, o Options) (rd *Reader, err error) {
	defer recoverInto(&err)
	mem := o.Allocator
	if mem == nil {
		mem = memory.DefaultAllocator
	}
	size, err := r.Seek(0, io.SeekEnd)
	if err != nil {
		return nil, fmt.Errorf("reading input: %w", err)
	}
	props := pq.NewReaderProperties(mem)
	// Read each column chunk through a small buffer instead of loading it
	// whole: memory then depends on page sizes, not on row-group sizes.
	props.BufferedStreamEnabled = true
	props.BufferSize = 64 << 10
	pf, err := file.NewParquetReader(r, file.WithReadProps(props))
	if err != nil {
		return nil, fmt.Errorf("%w (%d bytes): %w; is it a complete Parquet file?", ErrFile, size, err)
	}
	rd = &Reader{pf: pf, mem: mem, size: size, rows: pf.NumRows(), live: map[*chunk]struct{}{}}
	defer func() {
		if err != nil {
			pf.Close()
		}
	}()
	boundPageSizes(pf, props)
	if v := pf.MetaData().KeyValueMetadata().FindValue("ARROW:schema"); v != nil {
		if err := checkStoredSchema(*v); err != nil {
			return nil, fmt.Errorf("%w: %w", ErrFile, err)
		}
	}
	// BatchSize is set again, to Next's max, before the record reader is made.
	rd.fr, err = pqarrow.NewFileReader(pf, pqarrow.ArrowReadProperties{BatchSize: enrich.DefaultBatchRows}, mem)
	if err != nil {
		return nil, fmt.Errorf("%w: reading the schema: %w", ErrFile, err)
	}
	if rd.schema, err = rd.fr.Schema(); err != nil {
		return nil, fmt.Errorf("%w: reading the schema: %w", ErrFile, err)
	}
	for _, f := range rd.schema.Fields() {
		rd.names = append(rd.names, f.Name)
	}
	if md := pf.MetaData().KeyValueMetadata(); md != nil {
		keys, values := md.Keys(), md.Values()
		for i := range keys {
			rd.kv = append(rd.kv, keyValue{keys[i], values[i]})
		}
	}
	if rd.ext, err = newExtractor(rd.schema, rd.names, rd.meta("geo"), o.Select); err != nil {
		return nil, err
	}
	return rd, nil
}

// meta returns the value of a file metadata key, "" when absent.
func (rd *Reader) meta(key string) string {
	for _, kv := range rd.kv {
		if kv.key == key {
			return kv.value
		}
	}
	return ""
}

// recoverInto turns a panic inside the Parquet library (it has some on
// corrupted input) into an ErrFile error: data problems are errors.
func recoverInto(err *error) {
	if p := recover(); p != nil {
		if e, ok := p.(error); ok {
			*err = fmt.Errorf("%w: %w", ErrFile, e)
		} else {
			*err = fmt.Errorf("%w: %s", ErrFile, fmt.Sprint(p))
		}
	}
}

// Columns returns the top-level column names.
func (rd *Reader) Columns() []string { return rd.names }

// Schema returns the input's Arrow schema.
func (rd *Reader) Schema() *arrow.Schema { return rd.schema }

// NumRows returns the number of rows the file's footer declares.
func (rd *Reader) NumRows() int64 { return rd.rows }

// Roles names the location and time columns in use.
func (rd *Reader) Roles() enrich.Roles { return rd.ext.roles() }

// Choices says which columns are used and how each was chosen.
func (rd *Reader) Choices() []enrich.Choice { return rd.ext.choices }

// Position reports progress as a share of the file's bytes: the rows handed
// out so far scaled to the file size (Parquet is not read front to back).
func (rd *Reader) Position() (done, total int64) {
	if rd.rows == 0 {
		return 0, rd.size
	}
	return int64(float64(rd.size) * float64(rd.read.Load()) / float64(rd.rows)), rd.size
}

// Next decodes up to max rows. The first call fixes the decoder's batch size
// at max; later calls with another max are served by slicing.
func (rd *Reader) Next(ctx context.Context, max int) (c enrich.Chunk, err error) {
	if err := ctx.Err(); err != nil {
		return nil, context.Cause(ctx)
	}
	if max <= 0 {
		return nil, fmt.Errorf("parquet: batch size %d; it must be positive", max)
	}
	defer recoverInto(&err)
	if rd.closed {
		return nil, errors.New("parquet: Next after Close")
	}
	if rd.pending == nil {
		if rd.rr == nil {
			rd.fr.Props.BatchSize = int64(max)
			rd.batch = max
			if rd.rr, err = rd.fr.GetRecordReader(ctx, nil, nil); err != nil {
				return nil, fmt.Errorf("%w: %w", ErrFile, err)
			}
		}
		if !rd.rr.Next() {
			if err := rd.rr.Err(); err != nil && err != io.EOF {
				return nil, fmt.Errorf("%w: decoding rows after row %d: %w", ErrFile, rd.read.Load(), err)
			}
			if got := rd.read.Load(); got != rd.rows {
				return nil, fmt.Errorf("%w: the footer declares %d rows but %d could be read", ErrFile, rd.rows, got)
			}
			return nil, io.EOF
		}
		rd.pending = rd.rr.RecordBatch()
		rd.pending.Retain()
		rd.pendingOff = 0
	}
	rec := rd.pending
	n := rec.NumRows() - rd.pendingOff
	if n > int64(max) || rd.pendingOff > 0 {
		n = min(n, int64(max))
		rec = rd.pending.NewSlice(rd.pendingOff, rd.pendingOff+n)
		rd.pendingOff += n
		if rd.pendingOff == rd.pending.NumRows() {
			rd.pending.Release()
			rd.pending = nil
		}
	} else {
		rd.pending = nil // handed over whole, with its reference
	}
	if n == 0 {
		rec.Release()
		return rd.Next(ctx, max)
	}
	ch := &chunk{rd: rd, rec: rec}
	rd.mu.Lock()
	rd.live[ch] = struct{}{}
	rd.mu.Unlock()
	rd.read.Add(n)
	return ch, nil
}

// Close releases the decoder and every chunk not yet written (after a failed
// or cancelled run), and closes the Parquet reader; it does not close the
// underlying file.
func (rd *Reader) Close() error {
	rd.mu.Lock()
	if rd.closed {
		rd.mu.Unlock()
		return nil
	}
	rd.closed = true
	live := rd.live
	rd.live = nil
	rd.mu.Unlock()
	for c := range live {
		c.releaseArrays()
	}
	if rd.pending != nil {
		rd.pending.Release()
		rd.pending = nil
	}
	if rd.rr != nil {
		rd.rr.Release()
		rd.rr = nil
	}
	if rd.out != nil {
		rd.out.release()
		rd.out = nil
	}
	return rd.pf.Close()
}

// chunk is one decoded record batch, and after Encode the batch to write.
type chunk struct {
	rd  *Reader
	rec arrow.RecordBatch // input rows
	out arrow.RecordBatch // output rows, made by Encode
}

func (c *chunk) Len() int                  { return int(c.rec.NumRows()) }
func (c *chunk) Line(int) int64            { return 0 }
func (c *chunk) Extract(in *enrich.Inputs) { c.rd.ext.extract(c.rec, in) }

// Values renders row i's original values as text (for the rejects file):
// see valueText for the forms.
func (c *chunk) Values(i int) []string {
	out := make([]string, c.rec.NumCols())
	for j, col := range c.rec.Columns() {
		out[j] = valueText(col, i)
	}
	return out
}

// release frees the chunk's Arrow memory once it has been written.
func (c *chunk) release() {
	rd := c.rd
	rd.mu.Lock()
	_, ok := rd.live[c]
	delete(rd.live, c)
	rd.mu.Unlock()
	if ok {
		c.releaseArrays()
	}
}

func (c *chunk) releaseArrays() {
	if c.rec != nil {
		c.rec.Release()
		c.rec = nil
	}
	if c.out != nil {
		c.out.Release()
		c.out = nil
	}
}
