package parquet

import (
	"bytes"
	"errors"
	"strings"
	"sync"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// largestAlloc is an allocator that records the largest single buffer
// asked of it.
type largestAlloc struct {
	memory.Allocator
	mu      sync.Mutex
	largest int
}

func (a *largestAlloc) note(n int) {
	a.mu.Lock()
	a.largest = max(a.largest, n)
	a.mu.Unlock()
}

func (a *largestAlloc) Allocate(n int) []byte {
	a.note(n)
	return a.Allocator.Allocate(n)
}

func (a *largestAlloc) Reallocate(n int, b []byte) []byte {
	a.note(n)
	return a.Allocator.Reallocate(n, b)
}

// declaredPageSize is the uncompressed size the damaged files' first data
// page header declares.
const declaredPageSize = 120 << 20

// oversizedPageFile is repetitiveFile(sc, rows) with the header of the
// first column's data page rewritten to declare declaredPageSize bytes
// uncompressed: a small damaged file whose page header asks for a large
// buffer.
func oversizedPageFile(t testing.TB, sc *arrow.Schema, rows int) []byte {
	t.Helper()
	return damagePageSize(t, repetitiveFile(t, sc, rows))
}

// repetitiveFile writes rows of the columns of sc (zero values, and strings
// of 1 MiB of 'a') as one Zstandard-compressed row group without
// dictionaries, so each column's single data page holds a MiB or more in a
// few hundred bytes.
func repetitiveFile(t testing.TB, sc *arrow.Schema, rows int) []byte {
	t.Helper()
	mem := memory.NewGoAllocator()
	b := array.NewRecordBuilder(mem, sc)
	defer b.Release()
	for _, fb := range b.Fields() {
		switch fb := fb.(type) {
		case *array.Float64Builder:
			fb.AppendValues(make([]float64, rows), nil)
		case *array.TimestampBuilder:
			fb.AppendValues(make([]arrow.Timestamp, rows), nil)
		case *array.StringBuilder:
			for range rows {
				fb.Append(strings.Repeat("a", 1<<20))
			}
		default:
			t.Fatalf("test data: no values for %T", fb)
		}
	}
	rec := b.NewRecordBatch()
	defer rec.Release()
	var buf bytes.Buffer
	props := pq.NewWriterProperties(pq.WithCompression(compress.Codecs.Zstd), pq.WithDictionaryDefault(false),
		pq.WithDataPageSize(8<<20))
	w, err := pqarrow.NewFileWriter(sc, &buf, props, pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema()))
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Write(rec); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// damagePageSize rewrites the header of the first column's first data page
// to declare declaredPageSize bytes uncompressed.
func damagePageSize(t testing.TB, data []byte) []byte {
	t.Helper()
	data = bytes.Clone(data)
	pf, err := file.NewParquetReader(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	cc, err := pf.MetaData().RowGroup(0).ColumnChunk(0)
	if err != nil {
		t.Fatal(err)
	}
	off := int(cc.DataPageOffset())
	pf.Close()
	// The page header is a Thrift compact struct: field 1 (type, i32), then
	// field 2 (uncompressed_page_size, i32), each a field header byte 0x15
	// and a zigzag varint.
	p := off
	varint := func() int {
		start := p
		for data[p]&0x80 != 0 {
			p++
		}
		p++
		return p - start
	}
	if data[p] != 0x15 {
		t.Fatalf("page header at %d starts with %#x, want field 1 (0x15)", off, data[p])
	}
	p++
	varint()
	if data[p] != 0x15 {
		t.Fatalf("page header field 2 header %#x, want 0x15", data[p])
	}
	p++
	at := p
	n := varint()
	enc := make([]byte, n)
	v := uint32(declaredPageSize) << 1 // zigzag of a positive value
	for i := range n {
		enc[i] = byte(v&0x7f) | 0x80
		v >>= 7
	}
	enc[n-1] &^= 0x80
	if v != 0 {
		t.Fatalf("the page size field has %d bytes: too short for %d", n, declaredPageSize)
	}
	copy(data[at:], enc)
	return data
}

// TestDeclaredPageSize: a page header of a small file that declares a page
// far larger than the file could decode to is refused as a damaged file
// before its buffer is allocated, by both readers.
func TestDeclaredPageSize(t *testing.T) {
	geo := arrow.NewSchema([]arrow.Field{
		{Name: "lat", Type: arrow.PrimitiveTypes.Float64},
		{Name: "lon", Type: arrow.PrimitiveTypes.Float64},
		{Name: "timestamp", Type: &arrow.TimestampType{Unit: arrow.Microsecond, TimeZone: "UTC"}},
	}, nil)
	data := oversizedPageFile(t, geo, 1<<17)
	if len(data) > 64<<10 {
		t.Fatalf("the damaged file has %d bytes; the test wants a small one", len(data))
	}
	// The largest buffer the file may need: its size times Zstandard's
	// bound in maxExpansion (64 KiB per byte), far below the declared size.
	limit := len(data) * (64 << 10)
	if limit >= declaredPageSize {
		t.Fatalf("limit %d is not below the declared page size", limit)
	}
	check := func(t *testing.T, err error, mem *largestAlloc) {
		t.Helper()
		if !errors.Is(err, ErrFile) {
			t.Fatalf("error %v, want ErrFile", err)
		}
		if !strings.Contains(err.Error(), "uncompressed page size 125829120 exceeds") {
			t.Errorf("message %q should give the declared page size", err)
		}
		if mem.largest > limit {
			t.Errorf("largest buffer %d bytes, want at most %d (the file has %d)", mem.largest, limit, len(data))
		}
	}
	t.Run("Reader", func(t *testing.T) {
		mem := &largestAlloc{Allocator: checkedMem(t)}
		rd, err := NewReader(bytes.NewReader(data), Options{Allocator: mem})
		if err != nil {
			t.Fatal(err)
		}
		defer rd.Close()
		for {
			c, err := rd.Next(t.Context(), 1024)
			if err != nil {
				check(t, err, mem)
				return
			}
			c.(*chunk).release()
		}
	})
	t.Run("TextReader", func(t *testing.T) {
		mem := &largestAlloc{Allocator: checkedMem(t)}
		tr, err := OpenText(bytes.NewReader(data), TextOptions{BatchRows: 1024, Allocator: mem})
		if err != nil {
			t.Fatal(err)
		}
		defer tr.Close()
		for tr.Next() {
		}
		check(t, tr.Err(), mem)
	})
	t.Run("undamaged", func(t *testing.T) {
		// The same file before the damage reads whole: the bound leaves
		// room for what the pages really hold.
		mem := &largestAlloc{Allocator: checkedMem(t)}
		sc := arrow.NewSchema([]arrow.Field{{Name: "s", Type: arrow.BinaryTypes.String}}, nil)
		good := repetitiveFile(t, sc, 2)
		tr, err := OpenText(bytes.NewReader(good), TextOptions{BatchRows: 1, Allocator: mem})
		if err != nil {
			t.Fatal(err)
		}
		defer tr.Close()
		n := 0
		for tr.Next() {
			for _, row := range tr.Batch() {
				if len(row[0]) != 1<<20 {
					t.Errorf("row %d: %d bytes, want %d", n, len(row[0]), 1<<20)
				}
				n++
			}
		}
		if err := tr.Err(); err != nil || n != 2 {
			t.Errorf("read %d rows, error %v; want 2 rows and no error", n, err)
		}
	})
}
