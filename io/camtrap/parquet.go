package camtrap

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/heliotag/heliotag/io/parquet"
)

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

// pqFile is the open Parquet file of a table: its text reader and the rows
// of the current batch.
type pqFile struct {
	f     *os.File
	tr    *parquet.TextReader
	names []string // the file's top-level fields
	total int64    // rows the footer declares
	read  int64    // rows handed out
	size  int64    // bytes of the file
	base  int64    // bytes of the resource's files before this one

	selected bool       // the header's fields are chosen in tr
	rows     [][]string // the current batch's rows
	pos      int        // next row of rows
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
	// io/parquet checks the Arrow schema a writer may store in the file's
	// metadata before the Arrow library decodes it (without bounds checks:
	// a damaged one could make it allocate without limit), and refuses a
	// file whose stored schema cannot be right. The stored schema gives the
	// columns' Arrow types: an instant column keeps its zone's name.
	if x.tr, err = parquet.OpenText(x.f, parquet.TextOptions{BatchRows: ParquetBatchRows, Allocator: t.mem}); err != nil {
		return fmt.Errorf("%w: resource %q: %s (%d bytes) is not a readable Parquet file: %w", ErrResource, t.name, path, x.size, err)
	}
	x.total = x.tr.NumRows()
	x.names = x.tr.Fields()
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
		if !x.selected {
			// Decode only the fields in the header.
			if err := x.tr.Select(t.header...); err != nil {
				if errors.Is(err, parquet.ErrNoField) {
					return nil, 0, fmt.Errorf("%w: resource %q: %s has not every field of %s (%s): %w", ErrResource, t.name, t.path, t.paths[0], strings.Join(t.header, ", "), err)
				}
				return nil, 0, fmt.Errorf("%w: resource %q: %s: %w", ErrResource, t.name, t.path, err)
			}
			x.selected = true
		}
		if !x.tr.Next() {
			if err := x.tr.Err(); err != nil {
				return nil, 0, fmt.Errorf("%w: resource %q: %s: %w", ErrResource, t.name, t.path, err)
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
		x.rows, x.pos = x.tr.Batch(), 0
		// Progress: the file's bytes in proportion to the rows decoded.
		t.count.n.Store(x.base + int64(float64(x.size)*float64(x.read+int64(len(x.rows)))/float64(max(x.total, 1))))
	}
}

func (x *pqFile) close() {
	if x.tr != nil {
		x.tr.Close()
		x.tr = nil
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

// allocator is o.Allocator; nil means Go's heap.
func (o Options) allocator() parquet.Allocator {
	return o.Allocator // nil: io/parquet uses Go's heap
}
