package parquet

import (
	"context"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// Allocator is Arrow's memory allocator (memory.Allocator), named here so
// that packages reading Parquet through this one need not import Arrow.
type Allocator = memory.Allocator

// ErrNoField: a field asked of a TextReader is not a top-level field of the
// file. Match it with errors.Is.
var ErrNoField = errors.New("no such field")

// TextOptions configures a TextReader.
type TextOptions struct {
	// BatchRows is the number of rows decoded at a time; it must be positive.
	BatchRows int
	// Allocator holds the Arrow memory of a batch while it is turned into
	// text; nil means memory.DefaultAllocator (Go's heap).
	Allocator Allocator
}

// TextReader reads the rows of a Parquet file as text, batch by batch, the
// way a CSV file of the same table would read (see Batch for the forms).
// Only the fields chosen with Select are decoded (by default every
// top-level field). Like Reader, it checks the Arrow schema stored in the
// file's metadata before the Arrow library decodes it, and takes the
// column types from it.
type TextReader struct {
	pf    *file.Reader
	fr    *pqarrow.FileReader
	rr    pqarrow.RecordReader
	names []string   // the file's top-level fields
	sel   []string   // the fields read, in this order
	total int64      // rows the footer declares
	read  int64      // rows decoded
	batch [][]string // the current batch's rows; the slice is reused
	err   error
	done  bool
}

// OpenText opens the Parquet file r and reads its footer and schema. It
// does not close r.
func OpenText(r ReaderAtSeeker, o TextOptions) (_ *TextReader, err error) {
	if o.BatchRows <= 0 {
		return nil, fmt.Errorf("parquet: batch size %d; it must be positive", o.BatchRows)
	}
	mem := o.Allocator
	if mem == nil {
		mem = memory.DefaultAllocator
	}
	t := &TextReader{}
	defer func() {
		if err != nil && t.pf != nil {
			t.pf.Close()
		}
	}()
	defer recoverInto(&err)
	props := pq.NewReaderProperties(mem)
	// Read each column chunk through a small buffer instead of loading it
	// whole: memory then depends on page sizes, not on row-group sizes.
	props.BufferedStreamEnabled = true
	props.BufferSize = 64 << 10
	if t.pf, err = file.NewParquetReader(r, file.WithReadProps(props)); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrFile, err)
	}
	boundPageSizes(t.pf, props)
	t.total = t.pf.NumRows()
	if v := t.pf.MetaData().KeyValueMetadata().FindValue("ARROW:schema"); v != nil {
		if err := checkStoredSchema(*v); err != nil {
			return nil, fmt.Errorf("%w: %w", ErrFile, err)
		}
	}
	if t.fr, err = pqarrow.NewFileReader(t.pf, pqarrow.ArrowReadProperties{BatchSize: int64(o.BatchRows)}, mem); err != nil {
		return nil, fmt.Errorf("%w: reading the schema: %w", ErrFile, err)
	}
	sc, err := t.fr.Schema()
	if err != nil {
		return nil, fmt.Errorf("%w: reading the schema: %w", ErrFile, err)
	}
	for _, f := range sc.Fields() {
		t.names = append(t.names, f.Name)
	}
	t.sel = t.names
	return t, nil
}

// Fields returns the file's top-level fields, in order.
func (t *TextReader) Fields() []string { return t.names }

// NumRows returns the number of rows the file's footer declares.
func (t *TextReader) NumRows() int64 { return t.total }

// Select chooses the fields read and their order in each row; it must be
// called before the first Next. A name that is not a top-level field of the
// file is an error wrapping ErrNoField.
func (t *TextReader) Select(fields ...string) error {
	if t.rr != nil || t.done {
		return errors.New("parquet: Select after Next")
	}
	for _, name := range fields {
		if !slices.Contains(t.names, name) {
			return fmt.Errorf("%w: %q; the fields are %s", ErrNoField, name, strings.Join(t.names, ", "))
		}
	}
	t.sel = slices.Clone(fields)
	return nil
}

// Next decodes the next batch of rows. It returns false at the end of the
// file or on an error (see Err).
func (t *TextReader) Next() (ok bool) {
	t.batch = t.batch[:0]
	if t.err != nil || t.done {
		return false
	}
	defer func() {
		if p := recover(); p != nil {
			t.batch = nil
			if e, isErr := p.(error); isErr {
				t.err = fmt.Errorf("%w: %w", ErrFile, e)
			} else {
				t.err = fmt.Errorf("%w: %s", ErrFile, fmt.Sprint(p))
			}
			ok = false
		}
	}()
	if t.rr == nil {
		// Decode only the leaf columns of the selected fields.
		var leaves []int
		for i, name := range t.names {
			if slices.Contains(t.sel, name) {
				leaves = appendLeaves(leaves, t.fr.Manifest.Fields[i])
			}
		}
		// The reader's context only cancels parallel column reads, which are off.
		rr, err := t.fr.GetRecordReader(context.Background(), leaves, nil)
		if err != nil {
			t.err = fmt.Errorf("%w: %w", ErrFile, err)
			return false
		}
		t.rr = rr
	}
	if !t.rr.Next() {
		if err := t.rr.Err(); err != nil && !errors.Is(err, io.EOF) {
			t.err = fmt.Errorf("%w: decoding rows after row %d: %w", ErrFile, t.read, err)
			return false
		}
		if t.read != t.total {
			t.err = fmt.Errorf("%w: the footer declares %d rows but %d could be read", ErrFile, t.total, t.read)
			return false
		}
		t.done = true
		return false
	}
	if t.err = t.textRows(t.rr.RecordBatch()); t.err != nil {
		t.batch = t.batch[:0]
		return false
	}
	t.read += int64(len(t.batch))
	return true
}

// Batch returns the rows of the batch decoded by the last Next, each with
// the selected fields in order. The returned slice is reused by the next
// Next; the rows it holds own their strings (nothing refers to Arrow memory)
// and are the caller's to keep. Values become text as follows:
//   - null: "" (empty);
//   - strings as they are; binary as its bytes when they are UTF-8, else
//     lowercase hex;
//   - integers in decimal; floats in the shortest form that reads back to
//     the same value, without an exponent between 1e-6 and 1e21 (as
//     valueText writes them); booleans true or false;
//   - timestamps with a zone (instants) in RFC 3339 with the fraction when
//     present, at the offset of the type's zone ("Z" for UTC); timestamps
//     without one as local date-times without an offset
//     ("2024-06-21T18:30:00"); dates as yyyy-mm-dd; times of day as
//     HH:MM:SS[.fraction];
//   - dictionary values by their value; anything else in Arrow's own text
//     form (decimals in decimal notation).
func (t *TextReader) Batch() [][]string { return t.batch }

// Err returns the error that ended Next, nil at the end of the file. Errors
// of the file's content wrap ErrFile.
func (t *TextReader) Err() error { return t.err }

// Close releases the decoder and closes the Parquet reader; it does not
// close the underlying file.
func (t *TextReader) Close() error {
	t.batch = nil
	if t.rr != nil {
		t.rr.Release()
		t.rr = nil
	}
	if t.pf == nil {
		return nil
	}
	pf := t.pf
	t.pf = nil
	return pf.Close()
}

// textRows renders the selected fields of rec as text rows into t.batch.
func (t *TextReader) textRows(rec arrow.RecordBatch) error {
	n, w := int(rec.NumRows()), len(t.sel)
	cols := make([]arrow.Array, w)
	zones := make([]*time.Location, w)
	sc := rec.Schema()
	for j, name := range t.sel {
		k := sc.FieldIndices(name)
		if len(k) != 1 {
			return fmt.Errorf("%w: field %q not decoded", ErrFile, name)
		}
		cols[j] = rec.Column(k[0])
		if tt, ok := storageType(cols[j].DataType()).(*arrow.TimestampType); ok && tt.TimeZone != "" {
			loc, err := columnZone(tt.TimeZone)
			if err != nil {
				return fmt.Errorf("%w: field %q is %s: %w", ErrFile, name, tt, err)
			}
			zones[j] = loc
		}
	}
	flat := make([]string, n*w)
	for j, a := range cols {
		for i := range n {
			flat[i*w+j] = cellText(a, i, zones[j])
		}
	}
	if cap(t.batch) < n {
		t.batch = make([][]string, n)
	}
	t.batch = t.batch[:n]
	for i := range n {
		t.batch[i] = flat[i*w : (i+1)*w : (i+1)*w]
	}
	return nil
}

// appendLeaves appends the Parquet leaf column indexes of a field.
func appendLeaves(dst []int, f pqarrow.SchemaField) []int {
	if f.IsLeaf() {
		return append(dst, f.ColIndex)
	}
	for _, c := range f.Children {
		dst = appendLeaves(dst, c)
	}
	return dst
}

// FooterRows returns the number of rows the footer of the Parquet file r
// declares, reading nothing else. It does not close r.
func FooterRows(r ReaderAtSeeker) (n int64, err error) {
	defer recoverInto(&err)
	pf, err := file.NewParquetReader(r, file.WithReadProps(pq.NewReaderProperties(nil)))
	if err != nil {
		return 0, fmt.Errorf("%w: %w", ErrFile, err)
	}
	defer pf.Close()
	return pf.NumRows(), nil
}

// Layouts of the text a Parquet value becomes.
const (
	instantLayout = "2006-01-02T15:04:05.999999999Z07:00"
)

// cellText renders a[i] as text in the forms TextReader.Batch lists. loc is
// the zone of a timestamp column with a zone (nil: UTC).
func cellText(a arrow.Array, i int, loc *time.Location) string {
	if a.IsNull(i) {
		return ""
	}
	switch v := a.(type) {
	case *array.String, *array.LargeString, *array.StringView:
		return strings.Clone(valueText(a, i)) // the row outlives the batch
	case *array.Binary:
		return bytesText(v.Value(i))
	case *array.LargeBinary:
		return bytesText(v.Value(i))
	case *array.BinaryView:
		return bytesText(v.Value(i))
	case *array.Timestamp:
		tt := v.DataType().(*arrow.TimestampType)
		if tt.TimeZone == "" || loc == nil {
			return valueText(a, i)
		}
		return unitTime(int64(v.Value(i)), tt.Unit).In(loc).Format(instantLayout)
	case *array.Dictionary:
		return cellText(v.Dictionary(), v.GetValueIndex(i), loc)
	case array.ExtensionArray:
		return cellText(v.Storage(), i, loc)
	}
	return strings.Clone(valueText(a, i)) // numbers, dates, times: as valueText writes them
}

// unitTime is the instant of a timestamp value counted in unit since the Unix epoch.
func unitTime(v int64, unit arrow.TimeUnit) time.Time {
	switch unit {
	case arrow.Second:
		return time.Unix(v, 0)
	case arrow.Millisecond:
		return time.UnixMilli(v)
	case arrow.Microsecond:
		return time.UnixMicro(v)
	}
	return time.Unix(0, v)
}

// bytesText is b as text when it is UTF-8, else in lowercase hex.
func bytesText(b []byte) string {
	if utf8.Valid(b) {
		return string(b)
	}
	return hex.EncodeToString(b)
}
