package camtrap

import (
	"context"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/heliotag/heliotag/io/internal/zone"
)

// arrowSchemaKey is the file metadata key of the Arrow schema stored by Arrow writers.
const arrowSchemaKey = "ARROW:schema"

// ParquetBatchRows is the number of rows decoded at a time from a Parquet
// resource file.
const ParquetBatchRows = 8192

// IsParquet reports whether path is read as a Parquet file: its name ends
// in ".parquet" (any letter case), or the resource's format or mediatype
// names Parquet.
func (r *Resource) IsParquet(path string) bool {
	return strings.HasSuffix(strings.ToLower(path), ".parquet") ||
		strings.EqualFold(strings.TrimSpace(r.Format), "parquet") ||
		strings.Contains(strings.ToLower(r.Mediatype), "parquet")
}

// checkFormats refuses the file forms a resource cannot be read in: gzipped
// Parquet, and a resource whose files mix Parquet and CSV.
func (r *Resource) checkFormats() error {
	var csvPath, pqPath string
	for _, path := range r.Paths {
		lower := strings.ToLower(path)
		if strings.HasSuffix(lower, ".parquet.gz") || strings.HasSuffix(lower, ".parquet.gzip") {
			return fmt.Errorf("%w: resource %q: %s is gzipped Parquet; Parquet compresses its own pages: give the .parquet file", ErrUnsupported, r.Name, path)
		}
		if r.IsParquet(path) {
			pqPath = path
		} else {
			csvPath = path
		}
	}
	if csvPath != "" && pqPath != "" {
		return fmt.Errorf("%w: resource %q mixes Parquet (%s) and CSV (%s) files; every file of a resource must have one format", ErrUnsupported, r.Name, pqPath, csvPath)
	}
	return nil
}

// pqFile is the open Parquet file of a table: its decoder and the rows of
// the current record batch, rendered as text.
type pqFile struct {
	f     *os.File
	pf    *file.Reader
	fr    *pqarrow.FileReader
	rr    pqarrow.RecordReader
	names []string // the file's top-level fields
	total int64    // rows the footer declares
	read  int64    // rows handed out
	size  int64    // bytes of the file
	base  int64    // bytes of the resource's files before this one

	rows [][]string // the current batch's rows
	pos  int        // next row of rows
}

// openParquet opens the Parquet file t.paths[t.next-1] and reads its footer
// and schema; the first file's fields become the table's header.
func (t *table) openParquet(path string) (err error) {
	// t.pq is set at once, so that Close closes what is open after an error
	// or a panic in the library.
	x := &pqFile{base: t.count.n.Load()}
	t.pq = x
	defer recoverParquet(&err, t.name, path)
	if x.f, err = os.Open(filepath.Join(t.dir, filepath.FromSlash(path))); err != nil {
		return fmt.Errorf("%w: resource %q: %w", ErrResource, t.name, err)
	}
	st, err := x.f.Stat()
	if err != nil {
		return fmt.Errorf("%w: resource %q: %w", ErrResource, t.name, err)
	}
	x.size = st.Size()
	props := pq.NewReaderProperties(t.mem)
	props.BufferedStreamEnabled = true // read column chunks through a small buffer, not whole
	props.BufferSize = 64 << 10
	if x.pf, err = file.NewParquetReader(x.f, file.WithReadProps(props)); err != nil {
		return fmt.Errorf("%w: resource %q: %s (%d bytes) is not a readable Parquet file: %w", ErrResource, t.name, path, x.size, err)
	}
	x.total = x.pf.NumRows()
	// The Arrow schema a writer may store in the file's metadata is not
	// read: arrow-go decodes it without bounds checks, and a damaged one can
	// make it allocate without limit (found by FuzzParquetResource). The
	// Arrow types then come from the Parquet schema alone; for the values
	// read here this changes only the zone of an instant column (UTC).
	for _, kv := range x.pf.MetaData().KeyValueMetadata() {
		if kv.Key == arrowSchemaKey {
			kv.Key = arrowSchemaKey + " (not read)"
		}
	}
	if x.fr, err = pqarrow.NewFileReader(x.pf, pqarrow.ArrowReadProperties{BatchSize: ParquetBatchRows}, t.mem); err != nil {
		return fmt.Errorf("%w: resource %q: %s: reading the schema: %w", ErrResource, t.name, path, err)
	}
	sc, err := x.fr.Schema()
	if err != nil {
		return fmt.Errorf("%w: resource %q: %s: reading the schema: %w", ErrResource, t.name, path, err)
	}
	for _, fd := range sc.Fields() {
		x.names = append(x.names, fd.Name)
	}
	if t.header == nil {
		return t.setHeader(x.names, path)
	}
	if t.keep == nil && !slices.Equal(x.names, t.header) {
		return fmt.Errorf("%w: resource %q: the fields of %s differ from those of %s; every file of a resource needs the same fields in the same order", ErrResource, t.name, path, t.paths[0])
	}
	for _, name := range t.header {
		if !slices.Contains(x.names, name) {
			return fmt.Errorf("%w: resource %q: %s has no field %s, which %s has; its fields are %s", ErrResource, t.name, path, name, t.paths[0], strings.Join(x.names, ", "))
		}
	}
	return nil
}

// readParquet returns the next row and its 1-based row number in its file,
// or io.EOF after the last file.
func (t *table) readParquet() (rec []string, row int64, err error) {
	defer recoverParquet(&err, t.name, t.path)
	for {
		x := t.pq
		if x.pos < len(x.rows) {
			rec = x.rows[x.pos]
			x.rows[x.pos] = nil
			x.pos++
			x.read++
			return rec, x.read, nil
		}
		if x.rr == nil {
			// Decode only the leaf columns of the fields in the header.
			var leaves []int
			for i, name := range x.names {
				if slices.Contains(t.header, name) {
					leaves = appendLeaves(leaves, x.fr.Manifest.Fields[i])
				}
			}
			// The reader's context only cancels parallel column reads, which are off.
			if x.rr, err = x.fr.GetRecordReader(context.Background(), leaves, nil); err != nil {
				return nil, 0, fmt.Errorf("%w: resource %q: %s: %w", ErrResource, t.name, t.path, err)
			}
		}
		if !x.rr.Next() {
			if err := x.rr.Err(); err != nil && !errors.Is(err, io.EOF) {
				return nil, 0, fmt.Errorf("%w: resource %q: %s: decoding rows after row %d: %w", ErrResource, t.name, t.path, x.read, err)
			}
			if x.read != x.total {
				return nil, 0, fmt.Errorf("%w: resource %q: %s: the footer declares %d rows but %d could be read", ErrResource, t.name, t.path, x.total, x.read)
			}
			t.count.n.Store(x.base + x.size)
			if t.next >= len(t.paths) {
				return nil, 0, io.EOF
			}
			if err := t.open(); err != nil {
				return nil, 0, err
			}
			continue
		}
		if err := t.batchRows(x, x.rr.RecordBatch()); err != nil {
			return nil, 0, err
		}
		// Progress: the file's bytes in proportion to the rows decoded.
		t.count.n.Store(x.base + int64(float64(x.size)*float64(x.read+int64(len(x.rows)))/float64(max(x.total, 1))))
	}
}

// batchRows renders the header's fields of rec as text rows into x.rows.
// The rows own their strings: nothing refers to the batch's memory, which
// the record reader releases at its next Next.
func (t *table) batchRows(x *pqFile, rec arrow.RecordBatch) error {
	n, w := int(rec.NumRows()), len(t.header)
	cols := make([]arrow.Array, w)
	zones := make([]*time.Location, w)
	sc := rec.Schema()
	for j, name := range t.header {
		k := sc.FieldIndices(name)
		if len(k) != 1 {
			return fmt.Errorf("%w: resource %q: %s: field %q not decoded", ErrResource, t.name, t.path, name)
		}
		cols[j] = rec.Column(k[0])
		if tt, ok := storageType(cols[j].DataType()).(*arrow.TimestampType); ok && tt.TimeZone != "" {
			loc, err := timestampZone(tt.TimeZone)
			if err != nil {
				return fmt.Errorf("%w: resource %q: %s: field %q is %s: %w", ErrResource, t.name, t.path, name, tt, err)
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
	if cap(x.rows) < n {
		x.rows = make([][]string, n)
	}
	x.rows = x.rows[:n]
	for i := range n {
		x.rows[i] = flat[i*w : (i+1)*w : (i+1)*w]
	}
	x.pos = 0
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

func (x *pqFile) close() {
	if x.rr != nil {
		x.rr.Release()
		x.rr = nil
	}
	if x.pf != nil {
		x.pf.Close()
		x.pf = nil
	}
	if x.f != nil {
		x.f.Close()
		x.f = nil
	}
	x.rows = nil
}

// recoverParquet turns a panic inside the Parquet library (it has some on
// corrupted input) into an error: data problems are errors.
func recoverParquet(err *error, name, path string) {
	if p := recover(); p != nil {
		*err = fmt.Errorf("%w: resource %q: %s: %v", ErrResource, name, path, p)
	}
}

// timestampZone is the zone named by an Arrow timestamp type: UTC, a fixed
// offset ("+02:00") or an IANA name.
func timestampZone(tz string) (*time.Location, error) {
	switch strings.ToUpper(strings.TrimSpace(tz)) {
	case "UTC", "Z", "+00:00", "-00:00", "+0000", "+00", "ETC/UTC", "GMT", "ETC/GMT", "UCT", "ZULU", "ETC/UCT", "ETC/ZULU":
		return time.UTC, nil
	}
	if len(tz) >= 3 && (tz[0] == '+' || tz[0] == '-') {
		s := strings.ReplaceAll(tz[1:], ":", "")
		if v, err := strconv.Atoi(s); err == nil && len(s) <= 4 {
			h, m := v, 0
			if len(s) > 2 {
				h, m = v/100, v%100
			}
			if h <= 23 && m <= 59 {
				off := h*3600 + m*60
				if tz[0] == '-' {
					off = -off
				}
				return time.FixedZone(tz, off), nil
			}
		}
	}
	return zone.Load(tz)
}

func storageType(t arrow.DataType) arrow.DataType {
	if e, ok := t.(arrow.ExtensionType); ok {
		return e.StorageType()
	}
	return t
}

// Layouts of the text a Parquet value becomes.
const (
	instantLayout = "2006-01-02T15:04:05.999999999Z07:00"
	wallLayout    = "2006-01-02T15:04:05.999999999"
	clockLayout   = "15:04:05.999999999"
)

// cellText renders a[i] as the text the CSV path would read:
//   - null: "" (empty);
//   - strings as they are; binary as its bytes when they are UTF-8, else
//     lowercase hex;
//   - integers in decimal; floats with strconv's 'g' format, shortest form
//     (-1 precision); booleans true or false;
//   - timestamps with a zone (instants) in RFC 3339 with the fraction when
//     present, at the offset of the type's zone (loc: "Z" for UTC);
//     timestamps without one as local date-times without an offset
//     ("2024-06-21T18:30:00", which need --tz like offset-less CSV text);
//     dates as yyyy-mm-dd; times of day as HH:MM:SS[.fraction];
//   - dictionary values by their value; anything else in Arrow's own text
//     form (decimals in decimal notation).
func cellText(a arrow.Array, i int, loc *time.Location) string {
	if a.IsNull(i) {
		return ""
	}
	switch v := a.(type) {
	case *array.String:
		return strings.Clone(v.Value(i))
	case *array.LargeString:
		return strings.Clone(v.Value(i))
	case *array.StringView:
		return strings.Clone(v.Value(i))
	case *array.Binary:
		return bytesText(v.Value(i))
	case *array.LargeBinary:
		return bytesText(v.Value(i))
	case *array.BinaryView:
		return bytesText(v.Value(i))
	case *array.Boolean:
		return strconv.FormatBool(v.Value(i))
	case *array.Int8:
		return strconv.FormatInt(int64(v.Value(i)), 10)
	case *array.Int16:
		return strconv.FormatInt(int64(v.Value(i)), 10)
	case *array.Int32:
		return strconv.FormatInt(int64(v.Value(i)), 10)
	case *array.Int64:
		return strconv.FormatInt(v.Value(i), 10)
	case *array.Uint8:
		return strconv.FormatUint(uint64(v.Value(i)), 10)
	case *array.Uint16:
		return strconv.FormatUint(uint64(v.Value(i)), 10)
	case *array.Uint32:
		return strconv.FormatUint(uint64(v.Value(i)), 10)
	case *array.Uint64:
		return strconv.FormatUint(v.Value(i), 10)
	case *array.Float32:
		return strconv.FormatFloat(float64(v.Value(i)), 'g', -1, 32)
	case *array.Float64:
		return strconv.FormatFloat(v.Value(i), 'g', -1, 64)
	case *array.Timestamp:
		tt := v.DataType().(*arrow.TimestampType)
		tm := unitTime(int64(v.Value(i)), tt.Unit)
		if tt.TimeZone == "" {
			return tm.UTC().Format(wallLayout)
		}
		if loc == nil {
			loc = time.UTC
		}
		return tm.In(loc).Format(instantLayout)
	case *array.Date32:
		return time.Unix(int64(v.Value(i))*86400, 0).UTC().Format(time.DateOnly)
	case *array.Date64:
		return time.UnixMilli(int64(v.Value(i))).UTC().Format(time.DateOnly)
	case *array.Time32:
		return clockText(int64(v.Value(i)) * int64(v.DataType().(*arrow.Time32Type).Unit.Multiplier()))
	case *array.Time64:
		return clockText(int64(v.Value(i)) * int64(v.DataType().(*arrow.Time64Type).Unit.Multiplier()))
	case *array.Dictionary:
		return cellText(v.Dictionary(), v.GetValueIndex(i), loc)
	case array.ExtensionArray:
		return cellText(v.Storage(), i, loc)
	}
	return strings.Clone(a.ValueStr(i))
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

// clockText formats nanoseconds since midnight as HH:MM:SS[.fraction].
func clockText(ns int64) string {
	if ns < 0 || ns >= 86400e9 {
		return strconv.FormatInt(ns, 10) + "ns"
	}
	return time.Unix(0, ns).UTC().Format(clockLayout)
}

func bytesText(b []byte) string {
	if utf8.Valid(b) {
		return string(b)
	}
	return hex.EncodeToString(b)
}

// allocator is o.Allocator, or Go's heap.
func (o Options) allocator() memory.Allocator {
	if o.Allocator != nil {
		return o.Allocator
	}
	return memory.DefaultAllocator
}
