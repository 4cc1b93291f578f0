// Package csv reads and writes delimited text (CSV, TSV) for heliotag.
//
// The reader finds record boundaries only (a quote-aware scan for line ends)
// and hands raw record bytes to the workers, which split fields, read the
// location and time, and write each original record back byte for byte with
// the added columns appended. A record may span lines inside a quoted field;
// empty lines are passed over and are not rows. The first record is the
// header. A UTF-8 byte order mark is removed on input and written back on
// output; the output uses the input's line ending (LF or CRLF).
//
// Quoting follows RFC 4180: a field holding the delimiter, a quote or a line
// break is quoted, and quotes inside it are doubled. TSV uses the same rules
// with a tab as the delimiter.
package csv

import (
	"bufio"
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math/bits"
	"strings"
	"sync/atomic"
	"time"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/internal/freelist"
	"github.com/heliotag/heliotag/io/internal/fields"
	"github.com/heliotag/heliotag/io/internal/num"
)

// MaxRecordBytes bounds one record's size; a longer one is a fatal error
// (it usually means an unclosed quote swallowing the rest of the file).
const MaxRecordBytes = 64 << 20

// Sentinel errors for whole-file problems.
var (
	ErrNoHeader       = errors.New("no header row")
	ErrRecordTooLarge = errors.New("record too large")
	ErrUnclosedQuote  = errors.New("quoted field not closed")
)

// Options configures a Reader.
type Options struct {
	// Delimiter separates fields; 0 means ','.
	Delimiter byte
	// Select names the location and time columns (empty names are detected).
	Select enrich.Select
}

// Reader reads records from delimited text. Its chunks implement enrich.Chunk.
type Reader struct {
	r       *bufio.Reader
	delim   byte
	header  []string
	headRaw []byte
	bom     bool
	crlf    bool
	x       *fields.Extractor
	need    int   // fields the extractor reads: one past its highest column index
	line    int64 // lines consumed so far
	counter *countingReader
	size    int64
	outPool *freelist.List[*[]byte] // encoded output buffers, returned once written
	inPool  *freelist.List[*chunk]  // chunks with their buffers, returned once written
}

// countingReader counts the bytes read; the count is read from the writer
// goroutine (progress), so it is atomic.
type countingReader struct {
	r io.Reader
	n atomic.Int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n.Add(int64(n))
	return n, err
}

// NewReader reads the header from r and resolves the columns. size is the
// input's size in bytes for progress (0 when unknown). Problems with the
// header or the column choice are returned here, before any row is read.
func NewReader(r io.Reader, size int64, o Options) (*Reader, error) {
	d := o.Delimiter
	if d == 0 {
		d = ','
	}
	if d == '"' || d == '\n' || d == '\r' {
		return nil, fmt.Errorf("%w: delimiter %q cannot be used; use ',', ';', '|' or tab", enrich.ErrUsage, d)
	}
	cr := &countingReader{r: r}
	rd := &Reader{r: bufio.NewReaderSize(cr, 1<<20), delim: d, counter: cr, size: size}
	// Free lists rather than sync.Pool: their buffers survive collections,
	// so a long run stops allocating once its batches in flight have theirs.
	rd.outPool = freelist.New(freeListSize, func() *[]byte { return new([]byte) })
	rd.inPool = freelist.New(freeListSize, func() *chunk { return new(chunk) })
	if b, err := rd.r.Peek(3); err == nil && bytes.Equal(b, []byte{0xEF, 0xBB, 0xBF}) {
		rd.bom = true
		_, _ = rd.r.Discard(3)
	}
	var raw []byte
	for {
		rec, lines, _, err := rd.readRecord(nil)
		if err == io.EOF {
			return nil, fmt.Errorf("%w: the input is empty; the first line must name the columns", ErrNoHeader)
		}
		if err != nil {
			return nil, err
		}
		rd.line += lines
		if len(trimEOL(rec)) > 0 {
			raw = rec
			break
		}
	}
	rd.crlf = bytes.HasSuffix(raw, []byte("\r\n"))
	rd.headRaw = append([]byte(nil), trimEOL(raw)...)
	h, err := splitRecord(nil, rd.headRaw, d)
	if err != nil {
		return nil, fmt.Errorf("header (line %d): %w", rd.line, err)
	}
	rd.header = make([]string, len(h))
	copy(rd.header, h) // views into headRaw, which is never changed
	seen := map[string]int{}
	for i, name := range rd.header {
		if j, dup := seen[name]; dup {
			return nil, fmt.Errorf("%w: header has the column name %q twice (columns %d and %d); names must be unique", enrich.ErrUsage, name, j+1, i+1)
		}
		seen[name] = i
	}
	if len(rd.header) == 1 && d == ',' {
		for _, alt := range []byte{';', '\t', '|'} {
			if bytes.IndexByte(rd.headRaw, alt) >= 0 {
				return nil, fmt.Errorf("%w: the header has one column %q; the file looks %q-delimited: give --delimiter %s", enrich.ErrUsage, rd.header[0], alt, delimName(alt))
			}
		}
	}
	if rd.x, err = fields.New(rd.header, o.Select); err != nil {
		return nil, err
	}
	for _, i := range rd.x.Indexes() {
		rd.need = max(rd.need, i+1)
	}
	return rd, nil
}

func delimName(b byte) string {
	if b == '\t' {
		return "tab"
	}
	return string(b)
}

// readRecord appends the next record's raw bytes (with its line terminator)
// to dst; lines is the number of line breaks it spans. A record continues over
// line breaks while a quote is open (odd number of quotes so far).
func (rd *Reader) readRecord(dst []byte) (rec []byte, lines int64, quoted bool, err error) {
	start := len(dst)
	quotes := 0
	for {
		part, err := rd.r.ReadSlice('\n')
		if len(part) > 0 {
			dst = append(dst, part...)
			quotes += bytes.Count(part, []byte{'"'})
			if part[len(part)-1] == '\n' {
				lines++
			}
			if len(dst)-start > MaxRecordBytes {
				return dst, lines, quotes > 0, fmt.Errorf("%w: a record starting at line %d is longer than %d MiB; is a quote left open?", ErrRecordTooLarge, rd.line+1, MaxRecordBytes>>20)
			}
		}
		switch {
		case err == bufio.ErrBufferFull:
			continue
		case err == io.EOF:
			if len(dst) == start {
				return dst, lines, quotes > 0, io.EOF
			}
			if quotes%2 == 1 {
				return dst, lines, quotes > 0, fmt.Errorf("%w: the quoted field of the record starting at line %d runs to the end of the input; close it with \"", ErrUnclosedQuote, rd.line+1)
			}
			return dst, lines, quotes > 0, nil
		case err != nil:
			return dst, lines, quotes > 0, fmt.Errorf("reading input: %w", err)
		}
		if quotes%2 == 0 {
			return dst, lines, quotes > 0, nil
		}
	}
}

func trimEOL(b []byte) []byte {
	if n := len(b); n > 0 && b[n-1] == '\n' {
		b = b[:n-1]
	}
	if n := len(b); n > 0 && b[n-1] == '\r' {
		b = b[:n-1]
	}
	return b
}

// Columns returns the header's column names.
func (rd *Reader) Columns() []string { return rd.header }

// Roles names the location and time columns in use.
func (rd *Reader) Roles() enrich.Roles { return rd.x.Roles() }

// Choices says which columns are used and how each was chosen.
func (rd *Reader) Choices() []enrich.Choice { return rd.x.Choices() }

// Position reports bytes read and the input size (for progress).
func (rd *Reader) Position() (done, total int64) { return rd.counter.n.Load(), rd.size }

// Close does nothing: the caller owns the underlying reader.
func (rd *Reader) Close() error { return nil }

// Next reads up to max records.
func (rd *Reader) Next(ctx context.Context, max int) (enrich.Chunk, error) {
	if err := ctx.Err(); err != nil {
		return nil, context.Cause(ctx)
	}
	// Chunks come back to the pool once written, with their buffers.
	c := rd.inPool.Get()
	c.rd = rd
	c.buf, c.starts, c.ends, c.lines, c.quoted = c.buf[:0], c.starts[:0], c.ends[:0], c.lines[:0], false
	if cap(c.buf) == 0 {
		c.buf = make([]byte, 0, 64*max)
		c.starts, c.ends, c.lines = make([]int, 0, max), make([]int, 0, max), make([]int64, 0, max)
	}
	for len(c.ends) < max {
		startLine := rd.line + 1
		before := len(c.buf)
		var lines int64
		var quoted bool
		var err error
		c.buf, lines, quoted, err = rd.readRecord(c.buf)
		rd.line += lines
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		body := len(trimEOL(c.buf[before:]))
		if body == 0 { // empty line: not a row
			c.buf = c.buf[:before]
			continue
		}
		c.quoted = c.quoted || quoted
		c.starts = append(c.starts, before)
		c.ends = append(c.ends, before+body)
		c.lines = append(c.lines, startLine)
	}
	if len(c.ends) == 0 {
		rd.inPool.Put(c)
		return nil, io.EOF
	}
	return c, nil
}

// chunk is a run of raw records.
type chunk struct {
	rd     *Reader
	buf    []byte
	starts []int // record i is buf[starts[i]:ends[i]], line terminator excluded
	ends   []int
	lines  []int64
	quoted bool    // some record holds a quote
	out    *[]byte // the encoded rows, set by Encode
}

// Release hands back a chunk that will not be written (a reader drained
// without a writer, as the read-only benchmark does), so that its buffers
// are reused; a written chunk is handed back by Writer.Write. The chunk must
// not be used afterwards.
func (c *chunk) Release() {
	if c.out != nil {
		c.rd.outPool.Put(c.out)
		c.out = nil
	}
	c.rd.inPool.Put(c)
}

func (c *chunk) Len() int            { return len(c.ends) }
func (c *chunk) Line(i int) int64    { return c.lines[i] }
func (c *chunk) record(i int) []byte { return c.buf[c.starts[i]:c.ends[i]] }

func (c *chunk) Extract(in *enrich.Inputs) {
	var rec []string
	var err error
	want := len(c.rd.header)
	d := c.rd.delim
	for i := range c.ends {
		r := c.record(i)
		n := 0
		if !c.quoted || bytes.IndexByte(r, '"') < 0 {
			// No quotes: count the fields, and split only as far as the
			// last column the extractor reads (the rest stay unsplit).
			if rec, n = splitCount(rec, r, d, want, c.rd.need); n == want {
				c.rd.x.Row(rec, i, in)
				continue
			}
		} else {
			rec, err = splitRecord(rec, r, d)
			if err != nil {
				in.Err[i] = &enrich.RowError{Err: err}
				continue
			}
			n = len(rec)
			if n == want {
				c.rd.x.Row(rec, i, in)
				continue
			}
		}
		msg := "missing fields are written empty"
		if n > want {
			msg = fmt.Sprintf("fields %d to %d are kept joined into the last column", want, n)
		}
		in.Err[i] = &enrich.RowError{Err: fmt.Errorf("%w: the row has %d fields, the header has %d (under --on-bad-row keep, %s)", ErrFieldCount, n, want, msg)}
	}
}

// splitCount counts the fields of rec, a record without quotes, and when
// there are want of them fills dst (resized to want) with the first need
// fields, the others left empty; the fields are views into rec. With another
// count, dst's contents are unspecified. It reads eight bytes at a time: the
// delimiters of a word are the zero bytes of the word XOR the delimiter in
// every byte, found exactly (no carry crosses a byte) and taken lowest
// first.
func splitCount(dst []string, rec []byte, d byte, want, need int) ([]string, int) {
	if cap(dst) < want {
		dst = make([]string, want)
	}
	dst = dst[:want]
	const low7 = 0x7f7f7f7f7f7f7f7f
	pat := 0x0101010101010101 * uint64(d)
	need = min(need, want)
	start, j := 0, 0 // j fields split, each ended by a delimiter
	k := 0
	for ; j < need && k+8 <= len(rec); k += 8 {
		x := binary.LittleEndian.Uint64(rec[k:]) ^ pat
		m := ^((x&low7 + low7) | x | low7) // high bit of each zero byte
		for ; m != 0 && j < need; m &= m - 1 {
			at := k + bits.TrailingZeros64(m)>>3
			dst[j] = view(rec[start:at])
			start = at + 1
			j++
		}
		if m != 0 { // delimiters after the last field needed
			j += bits.OnesCount64(m)
		}
	}
	for ; j < need && k < len(rec); k++ {
		if rec[k] == d {
			dst[j] = view(rec[start:k])
			start = k + 1
			j++
		}
	}
	// j counts every delimiter before k; the rest are only counted.
	delims := j + bytes.Count(rec[k:], []byte{d})
	j = min(j, need)
	n := delims + 1
	if n != want {
		return dst, n
	}
	if j < need {
		dst[j] = view(rec[start:]) // the last field
		j++
	}
	clear(dst[j:])
	return dst, n
}

func (c *chunk) Values(i int) []string {
	rec, err := splitRecord(nil, c.record(i), c.rd.delim)
	if err != nil {
		return []string{string(c.record(i))}
	}
	out := make([]string, len(rec))
	for j, f := range rec {
		out[j] = string([]byte(f)) // copy out of the chunk's buffer
	}
	return out
}

func (c *chunk) Encode(res *enrich.Results) error {
	out := c.rd.outPool.Get()
	b := (*out)[:0]
	// Room for the records and the added columns (about 26 bytes each at
	// most: an RFC 3339 instant with offset), so that appending never grows.
	// A new buffer gets a quarter more, so that a reused one nearly always
	// fits the next chunk.
	if need := len(c.buf) + len(c.ends)*(2+26*len(res.Plan.Columns)); cap(b) < need {
		b = make([]byte, 0, need+need/4)
	}
	eol := c.rd.eol()
	d := c.rd.delim
	for i := range c.ends {
		if res.Status[i] == enrich.RowRejected {
			continue
		}
		if res.Status[i] == enrich.RowKept && errors.Is(res.Err[i], ErrFieldCount) {
			b = c.appendRealigned(b, i)
		} else {
			b = append(b, c.record(i)...)
		}
		b = appendColumns(b, res, i, d)
		b = append(b, eol...)
	}
	*out = b
	c.out = out
	return nil
}

// appendRealigned writes a record whose field count differs from the
// header's (kept under the keep policy) with exactly the header's number of
// fields, so that the added columns line up: a short record is padded with
// empty fields; a long one has its surplus fields joined, with the
// delimiter, into its last column. Nothing is dropped.
func (c *chunk) appendRealigned(b []byte, i int) []byte {
	rec, err := splitRecord(nil, c.record(i), c.rd.delim)
	if err != nil {
		return append(b, c.record(i)...)
	}
	want := len(c.rd.header)
	if len(rec) > want {
		last := strings.Join(rec[want-1:], string(c.rd.delim))
		rec = append(rec[:want-1], last)
	}
	for j := 0; j < want; j++ {
		if j > 0 {
			b = append(b, c.rd.delim)
		}
		if j < len(rec) {
			b = appendField(b, rec[j], c.rd.delim)
		}
	}
	return b
}

func (rd *Reader) eol() string {
	if rd.crlf {
		return "\r\n"
	}
	return "\n"
}

// appendColumns appends the delimiter and each added column's value of row i.
func appendColumns(b []byte, res *enrich.Results, i int, d byte) []byte {
	for _, col := range res.Plan.Columns {
		b = append(b, d)
		switch col.Kind {
		case enrich.KindFloat:
			if v, ok := res.Float(col.Field, i); ok {
				b = num.AppendFixed(b, v, col.Decimals)
			}
		case enrich.KindCategory:
			b = append(b, res.Word(col.Field, i)...)
		case enrich.KindText:
			b = appendField(b, res.Text(col.Field, i), d)
		case enrich.KindInstant:
			if t, ok := res.Instant(col.Field, i); ok {
				b = t.AppendFormat(b, time.RFC3339)
			}
		}
	}
	return b
}

// freeListSize bounds the chunks and buffers kept for reuse; a run keeps only
// as many as it had in use at once (its batches in flight).
const freeListSize = 256

// directWrite is the size from which an encoded chunk bypasses the output
// buffer.
const directWrite = 64 << 10

// Writer writes the enriched records of chunks from a Reader.
type Writer struct {
	w   *bufio.Writer
	dst io.Writer // under w: large chunks are written to it directly
	rd  *Reader
}

// NewWriter writes the header at once: the input's header with the added names.
func NewWriter(w io.Writer, rd *Reader, plan *enrich.Plan) (*Writer, error) {
	wr := &Writer{w: bufio.NewWriterSize(w, 1<<20), dst: w, rd: rd}
	var b []byte
	if rd.bom {
		b = append(b, 0xEF, 0xBB, 0xBF)
	}
	b = append(b, rd.headRaw...)
	for _, name := range plan.Names() {
		b = append(b, rd.delim)
		b = appendField(b, name, rd.delim)
	}
	b = append(b, rd.eol()...)
	if _, err := wr.w.Write(b); err != nil {
		return nil, fmt.Errorf("writing output: %w", err)
	}
	return wr, nil
}

// Write writes a chunk encoded by Encode.
func (w *Writer) Write(_ context.Context, ch enrich.Chunk) error {
	c, ok := ch.(*chunk)
	if !ok || c.out == nil {
		return fmt.Errorf("csv: chunk %T was not encoded by this package", ch)
	}
	var err error
	if out := *c.out; len(out) >= directWrite {
		// A large chunk goes straight to the file, without a copy through
		// the buffer (this goroutine is the pipeline's one writer).
		if err = w.w.Flush(); err == nil {
			_, err = w.dst.Write(out)
		}
	} else {
		_, err = w.w.Write(out)
	}
	c.rd.outPool.Put(c.out)
	c.out = nil
	// The chunk is done: nothing refers to its records after Write (the
	// rejects file was written before, Inputs hold no views into them).
	c.rd.inPool.Put(c)
	if err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}

// Close flushes buffered output.
func (w *Writer) Close() error {
	if err := w.w.Flush(); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}
