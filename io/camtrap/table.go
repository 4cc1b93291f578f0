package camtrap

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync/atomic"

	"github.com/heliotag/heliotag/io/parquet"
)

// table reads the records of a resource, file after file. A CSV file starts
// with a header line, which must equal the first file's. A Parquet file's
// top-level fields are its header; after project, only the projected fields
// are decoded, and each later file must have them.
type table struct {
	name   string
	dir    string
	delim  rune
	paths  []string
	header []string
	next   int // index of the next file to open

	file  *os.File
	gz    *gzip.Reader
	r     *csv.Reader
	path  string // the open file's path, for messages
	count *counter

	size int64 // bytes of every file (0 when some are gzipped: unknown)

	parquet bool              // the files are Parquet
	mem     parquet.Allocator // Arrow memory of Parquet batches
	pq      *pqFile           // the open Parquet file
	keep    []string          // the projected fields (nil: all)
}

// counter counts bytes read; it is read from the writing goroutine (progress).
type counter struct {
	r io.Reader
	n *atomic.Int64
}

func (c counter) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n.Add(int64(n))
	return n, err
}

// openTable opens the resource's first file and reads its header. mem holds
// the Arrow memory of a Parquet resource.
func openTable(p *Package, r *Resource, mem parquet.Allocator) (*table, error) {
	if err := r.checkFormats(); err != nil {
		return nil, err
	}
	t := &table{name: r.Name, dir: p.Dir, delim: r.Delimiter, paths: r.Paths, count: &counter{n: new(atomic.Int64)},
		parquet: len(r.Paths) > 0 && r.IsParquet(r.Paths[0]), mem: mem}
	if t.delim == 0 {
		t.delim = ','
	}
	for _, path := range r.Paths {
		st, err := os.Stat(filepath.Join(p.Dir, filepath.FromSlash(path)))
		if err != nil {
			return nil, fmt.Errorf("%w: resource %q: %w", ErrResource, r.Name, err)
		}
		t.size += st.Size()
	}
	if err := t.open(); err != nil {
		t.Close()
		return nil, err
	}
	return t, nil
}

// open opens file t.next, reads its header and checks it.
func (t *table) open() error {
	t.closeFile()
	path := t.paths[t.next]
	t.next++
	t.path = path
	if t.parquet {
		return t.openParquet(path)
	}
	f, err := os.Open(filepath.Join(t.dir, filepath.FromSlash(path)))
	if err != nil {
		return fmt.Errorf("%w: resource %q: %w", ErrResource, t.name, err)
	}
	t.file = f
	br := bufio.NewReaderSize(counter{r: f, n: t.count.n}, 1<<16)
	var src io.Reader = br
	if magic, _ := br.Peek(2); len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		if t.gz, err = gzip.NewReader(br); err != nil {
			return fmt.Errorf("%w: resource %q: %s: %w", ErrResource, t.name, path, err)
		}
		t.size = 0 // progress in compressed bytes would mislead
		src = bufio.NewReaderSize(t.gz, 1<<16)
	}
	bom := bufio.NewReader(src)
	if b, err := bom.Peek(3); err == nil && bytes.Equal(b, []byte{0xEF, 0xBB, 0xBF}) {
		_, _ = bom.Discard(3)
	}
	t.r = csv.NewReader(bom)
	t.r.Comma = t.delim
	t.r.FieldsPerRecord = -1
	h, err := t.r.Read()
	if err == io.EOF {
		return fmt.Errorf("%w: resource %q: %s is empty; its first line must name the fields", ErrResource, t.name, path)
	}
	if err != nil {
		return fmt.Errorf("%w: resource %q: %s: %w", ErrResource, t.name, path, err)
	}
	if t.header == nil {
		return t.setHeader(h, path)
	} else if !slices.Equal(h, t.header) {
		return fmt.Errorf("%w: resource %q: the header of %s differs from that of %s; every file of a resource needs the same fields in the same order", ErrResource, t.name, path, t.paths[0])
	}
	return nil
}

// setHeader sets the first file's fields, which must be distinct.
func (t *table) setHeader(h []string, path string) error {
	seen := map[string]bool{}
	for _, name := range h {
		if seen[name] {
			return fmt.Errorf("%w: resource %q: %s: the header has the field %q twice", ErrResource, t.name, path, name)
		}
		seen[name] = true
	}
	t.header = h
	return nil
}

// project limits a Parquet table to the fields at idx (indexes into the
// header; -1 stays -1) and returns their indexes in the new header, which
// keeps the fields in the file's order. Only those fields are decoded. A CSV
// table reads whole lines: its header and idx are left as they are.
func (t *table) project(idx []int) []int {
	if !t.parquet {
		return idx
	}
	var keep []string
	for j, name := range t.header {
		if slices.Contains(idx, j) {
			keep = append(keep, name)
		}
	}
	out := make([]int, len(idx))
	for i, j := range idx {
		out[i] = -1
		if j >= 0 {
			out[i] = slices.Index(keep, t.header[j])
		}
	}
	t.header, t.keep = keep, keep
	return out
}

// where names a record for messages: the file and its line (CSV) or row (Parquet).
func (t *table) where(line int64) string {
	if t.parquet {
		return fmt.Sprintf("%s row %d", t.path, line)
	}
	return fmt.Sprintf("%s line %d", t.path, line)
}

// read returns the next record and its 1-based line in its file (for
// Parquet, its 1-based row in its file), or io.EOF after the last file.
func (t *table) read() (rec []string, line int64, err error) {
	if t.parquet {
		return t.readParquet()
	}
	for {
		rec, err = t.r.Read()
		if err == nil {
			l, _ := t.r.FieldPos(0)
			return rec, int64(l), nil
		}
		if err != io.EOF {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				return nil, 0, fmt.Errorf("resource %q: %s line %d: %w", t.name, t.path, pe.StartLine, pe.Err)
			}
			return nil, 0, fmt.Errorf("resource %q: %s: %w", t.name, t.path, err)
		}
		if t.next >= len(t.paths) {
			return nil, 0, io.EOF
		}
		if err := t.open(); err != nil {
			return nil, 0, err
		}
	}
}

// column returns the index of the header field name, or -1.
func (t *table) column(name string) int { return slices.Index(t.header, name) }

// need returns the indexes of the named fields, or an error naming the
// missing ones and the fields there are.
func (t *table) need(names ...string) ([]int, error) {
	idx := make([]int, len(names))
	var missing []string
	for i, n := range names {
		if idx[i] = t.column(n); idx[i] < 0 {
			missing = append(missing, n)
		}
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("%w: resource %q (%s) has no field %s; its fields are %s", ErrResource, t.name, t.paths[0], strings.Join(missing, ", "), strings.Join(t.header, ", "))
	}
	return idx, nil
}

func (t *table) closeFile() {
	if t.pq != nil {
		t.pq.close()
		t.pq = nil
	}
	if t.gz != nil {
		t.gz.Close()
		t.gz = nil
	}
	if t.file != nil {
		t.file.Close()
		t.file = nil
	}
}

// Close closes the open file.
func (t *table) Close() error {
	t.closeFile()
	return nil
}
