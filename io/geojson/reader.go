package geojson

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/internal/fields"
)

// lookaheadBytes bounds the bytes read ahead for the property names.
const lookaheadBytes = 8 << 20

// Reader reads the features of a FeatureCollection or a text sequence. Its
// chunks implement enrich.Chunk.
type Reader struct {
	seq  bool
	cr   *countReader
	size int64

	cols     []string       // property names seen in the first features
	colIndex map[string]int // name → index in cols
	columns  []string       // cols, then the feature column
	x        *fields.Extractor
	need     []need // properties the extractor reads

	headingFromGeometry bool // the glare group's heading is the line geometry's direction
	choices             []enrich.Choice

	nread   int64 // features read from the input (pending included)
	count   int64 // features handed out in chunks
	pending []rawFeature

	// FeatureCollection
	dec     *json.Decoder
	raw     json.RawMessage
	head    []rawMember // members before "features"
	tail    []rawMember // members after it
	typ     string
	hasType bool
	end     bool

	// text sequence
	br        *bufio.Reader
	rs        bool        // records are split by RS rather than by line ends
	outRS     bool        // the writer frames records with RS (set by NewWriter)
	added     [][]byte    // the added columns' names as JSON strings (set by NewWriter)
	free      chan *chunk // written chunks, for reuse (see recycle)
	off       int64       // bytes consumed
	line      int64       // line ends consumed
	lineStart int64       // offset where the current line starts
	eof       bool
}

type peeker interface {
	io.Reader
	Peek(n int) ([]byte, error)
	Discard(n int) (int, error)
}

type rawMember struct {
	key   string
	value []byte
}

type need struct {
	name string
	idx  int
}

type rawFeature struct {
	b              []byte
	off, line, col int64
}

// NewReader reads the start of the input: a FeatureCollection's members up
// to "features", then the first features (up to LookaheadFeatures) to learn
// the property names and choose the time properties. size is the input's
// size in bytes for progress (0 when unknown). Usage problems wrap
// enrich.ErrUsage; malformed input is a *SyntaxError.
func NewReader(r io.Reader, size int64, o Options) (*Reader, error) {
	s := o.Select
	if s.Lat != "" || s.Lon != "" || s.Geometry != "" {
		return nil, fmt.Errorf("%w: GeoJSON takes the location from each feature's geometry; --lat, --lon and --geometry do not apply", enrich.ErrUsage)
	}
	// RFC 8259 §8.1: a parser may ignore a byte order mark (and a writer
	// must not add one). It is counted in byte offsets, not in columns.
	var base int64
	pr, ok := r.(peeker)
	if !ok {
		pr = bufio.NewReader(r)
	}
	if b, err := pr.Peek(3); err == nil && string(b) == "\xEF\xBB\xBF" {
		_, _ = pr.Discard(3)
		base = 3
	}
	rd := &Reader{seq: o.Sequence, cr: newCountReader(pr), size: size, colIndex: map[string]int{},
		free: make(chan *chunk, freeChunks), off: base, lineStart: base}
	rd.cr.base = base
	if rd.seq {
		rd.br = bufio.NewReaderSize(rd.cr, 1<<20)
		if b, err := rd.br.Peek(1); err == nil && b[0] == 0x1E {
			rd.rs = true
		}
	} else {
		rd.cr.limit = MaxFeatureBytes
		rd.dec = json.NewDecoder(rd.cr)
		if err := rd.open(); err != nil {
			return nil, err
		}
	}
	var bytesAhead int
	for len(rd.pending) < LookaheadFeatures && bytesAhead < lookaheadBytes {
		b, off, line, col, err := rd.read(nil)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		rd.pending = append(rd.pending, rawFeature{b, off, line, col})
		bytesAhead += len(b)
		rd.learnKeys(b)
	}
	rd.columns = append(append([]string(nil), rd.cols...), featureColumn(rd.colIndex))
	if len(rd.pending) == 0 {
		return rd, nil // no features: nothing to read the time from
	}
	x, err := fields.NewTime(rd.cols, s)
	if err != nil {
		return nil, fmt.Errorf("reading the time from the features' properties: %w", err)
	}
	rd.x = x
	for _, i := range x.Indexes() {
		if i >= 0 {
			rd.need = append(rd.need, need{name: rd.cols[i], idx: i})
		}
	}
	rd.headingFromGeometry = s.HeadingFromGeometry
	rd.choices = append(x.Choices(), enrich.Choice{
		Role: "location", Column: "geometry", Index: len(rd.cols),
		How: "each feature's geometry (representative point)",
	})
	return rd, nil
}

// featureColumn names the last column of Columns, which holds each feature's
// JSON text in the rejects file: "feature", unless a property has that name.
func featureColumn(taken map[string]int) string {
	name := "feature"
	for {
		if _, ok := taken[name]; !ok {
			return name
		}
		name = "_" + name
	}
}

// learnKeys adds the property names of feature b to the columns.
func (rd *Reader) learnKeys(b []byte) {
	if rd.seq && !json.Valid(b) {
		return
	}
	inf := scanFeature(b)
	if inf.props != propsObject {
		return
	}
	for p := inf.p0 + 1; ; {
		m, end, ok := nextMember(b, p)
		if !ok {
			return
		}
		p = end
		k := unquote(b[m.key0:m.key1])
		if _, seen := rd.colIndex[k]; !seen {
			rd.colIndex[k] = len(rd.cols)
			rd.cols = append(rd.cols, k)
		}
	}
}

// Columns returns the property names found in the first features, in order
// of first appearance, followed by one column that holds the whole feature
// as JSON text (named "feature"; see Values).
func (rd *Reader) Columns() []string { return rd.columns }

// Roles names the inputs of the computation for messages: the location is
// the "geometry".
func (rd *Reader) Roles() enrich.Roles {
	r := enrich.Roles{Lat: "geometry", Lon: "geometry"}
	if rd.x != nil {
		r.Time = rd.x.Roles().Time
	}
	return r
}

// Choices says which properties are used and how each was chosen.
func (rd *Reader) Choices() []enrich.Choice { return rd.choices }

// Position reports the bytes read and the input's size.
// It may be called on another goroutine than Next.
func (rd *Reader) Position() (done, total int64) { return rd.cr.base + rd.cr.done.Load(), rd.size }

// Close does nothing: the caller owns the underlying reader.
func (rd *Reader) Close() error { return nil }

// Next reads up to max features.
func (rd *Reader) Next(ctx context.Context, max int) (enrich.Chunk, error) {
	if err := ctx.Err(); err != nil {
		return nil, context.Cause(ctx)
	}
	c := rd.newChunk(max)
	for c.Len() < max && len(rd.pending) > 0 {
		f := rd.pending[0]
		rd.pending[0] = rawFeature{}
		rd.pending = rd.pending[1:]
		c.buf = append(c.buf, f.b...)
		c.add(f.off, f.line, f.col)
	}
	for c.Len() < max {
		var off, line, col int64
		var err error
		c.buf, off, line, col, err = rd.read(c.buf)
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		c.add(off, line, col)
	}
	if c.Len() == 0 {
		return nil, io.EOF
	}
	rd.count += int64(c.Len())
	return c, nil
}

// read appends the next feature's JSON text to dst and returns its byte
// offset, line and column in the input; io.EOF after the last feature.
func (rd *Reader) read(dst []byte) (b []byte, off, line, col int64, err error) {
	if rd.seq {
		return rd.readRecord(dst)
	}
	b, off, line, err = rd.readFeature(dst)
	return b, off, line, 0, err
}

// open reads a collection up to the start of its features array.
func (rd *Reader) open() error {
	tok, err := rd.dec.Token()
	if err != nil {
		if err == io.EOF {
			return rd.cr.syntaxAt(0, 0, fmt.Errorf("%w: the input is empty; expected a FeatureCollection {\"type\": \"FeatureCollection\", \"features\": [...]}", ErrNotCollection))
		}
		return rd.fail(err, 0)
	}
	if tok != json.Delim('{') {
		return rd.cr.syntaxAt(rd.dec.InputOffset()-1, 0, fmt.Errorf("%w: the input starts with %s; expected a FeatureCollection object {\"type\": \"FeatureCollection\", \"features\": [...]}", ErrNotCollection, tokenName(tok)))
	}
	for {
		rd.cr.valueStart = rd.dec.InputOffset()
		tok, err := rd.dec.Token()
		if err != nil {
			return rd.fail(err, 0)
		}
		if tok == json.Delim('}') {
			if rd.typ == "Feature" {
				return rd.notCollection(0)
			}
			return rd.cr.syntaxAt(rd.dec.InputOffset()-1, 0, fmt.Errorf("%w: the top-level object has no \"features\" member", ErrNotCollection))
		}
		key, _ := tok.(string)
		if key == "features" {
			at := rd.valueOffset()
			tok, err := rd.dec.Token()
			if err != nil {
				return rd.fail(err, 0)
			}
			if tok != json.Delim('[') {
				return rd.cr.syntaxAt(at, 0, fmt.Errorf("%w: \"features\" is %s; expected an array of Features", ErrNotCollection, tokenName(tok)))
			}
			return nil
		}
		m, err := rd.member(key)
		if err != nil {
			return err
		}
		rd.head = append(rd.head, m)
	}
}

// member reads the value of a collection member other than "features".
func (rd *Reader) member(key string) (rawMember, error) {
	rd.cr.valueStart = rd.dec.InputOffset()
	if err := rd.dec.Decode(&rd.raw); err != nil {
		return rawMember{}, rd.fail(err, 0)
	}
	m := rawMember{key: key, value: bytes.Clone(rd.raw)}
	if key == "type" {
		rd.hasType = true
		rd.typ = valueText(m.value)
		if rd.typ != "FeatureCollection" {
			return m, rd.notCollection(rd.dec.InputOffset() - int64(len(rd.raw)))
		}
	}
	return m, nil
}

// valueOffset returns the offset of the next value after a member's key
// (past the colon and white space), when the decoder has it buffered, and
// else the decoder's position.
func (rd *Reader) valueOffset() int64 {
	at := rd.dec.InputOffset()
	b, _ := rd.dec.Buffered().(*bytes.Reader)
	if b == nil {
		return at
	}
	colon := false
	for i := int64(0); ; i++ {
		c, err := b.ReadByte()
		switch {
		case err != nil:
			return at
		case isSpace(c):
		case c == ':' && !colon:
			colon = true
		default:
			return at + i
		}
	}
}

func (rd *Reader) notCollection(at int64) error {
	hint := ""
	if rd.typ == "Feature" {
		hint = "; a file of Features, one per line, is read with --from geojsonseq"
	}
	return rd.cr.syntaxAt(at, 0, fmt.Errorf("%w: the top-level \"type\" is %q; expected \"FeatureCollection\"%s", ErrNotCollection, rd.typ, hint))
}

func tokenName(t json.Token) string {
	switch v := t.(type) {
	case json.Delim:
		if v == '[' {
			return "an array"
		}
		return "an object"
	case string:
		return "a string"
	case nil:
		return "null"
	case bool:
		return "a boolean"
	}
	return "a number"
}

// readFeature reads the next item of the features array.
func (rd *Reader) readFeature(dst []byte) ([]byte, int64, int64, error) {
	if rd.end {
		return dst, 0, 0, io.EOF
	}
	rd.cr.valueStart = rd.dec.InputOffset()
	if !rd.dec.More() {
		if err := rd.finish(); err != nil {
			return dst, 0, 0, err
		}
		return dst, 0, 0, io.EOF
	}
	rd.cr.valueStart = rd.dec.InputOffset()
	if err := rd.dec.Decode(&rd.raw); err != nil {
		return dst, 0, 0, rd.fail(err, rd.nread+1)
	}
	end := rd.dec.InputOffset()
	start := end - int64(len(rd.raw))
	line, _ := rd.cr.at(start)
	rd.nread++
	return append(dst, rd.raw...), rd.cr.base + start, line, nil
}

// finish reads the end of the features array and the members after it.
func (rd *Reader) finish() error {
	rd.end = true
	if _, err := rd.dec.Token(); err != nil { // ']' (More saw it)
		return rd.fail(err, 0)
	}
	for {
		rd.cr.valueStart = rd.dec.InputOffset()
		tok, err := rd.dec.Token()
		if err != nil {
			return rd.fail(err, 0)
		}
		if tok == json.Delim('}') {
			break
		}
		key, _ := tok.(string)
		if key == "features" {
			return rd.cr.syntaxAt(rd.dec.InputOffset(), 0, fmt.Errorf("%w: a second \"features\" member", ErrNotCollection))
		}
		m, err := rd.member(key)
		if err != nil {
			return err
		}
		rd.tail = append(rd.tail, m)
	}
	more := rd.dec.More()
	at := rd.dec.InputOffset()
	if _, err := rd.dec.Token(); err != io.EOF || more {
		if ioErr := rd.cr.ioError(); ioErr != nil {
			return ioErr
		}
		return rd.cr.syntaxAt(at, 0, fmt.Errorf("%w: data after the end of the FeatureCollection", ErrSyntax))
	}
	if !rd.hasType {
		return rd.cr.syntaxAt(at, 0, fmt.Errorf("%w: the top-level object has no \"type\": \"FeatureCollection\"", ErrNotCollection))
	}
	return nil
}

// fail turns a decoder error into a fatal error with its place.
func (rd *Reader) fail(err error, feature int64) error {
	if ioErr := rd.cr.ioError(); ioErr != nil {
		return ioErr
	}
	if errors.Is(err, ErrTooLarge) {
		return rd.cr.syntaxAt(rd.cr.valueStart, feature, fmt.Errorf("%w: the value starting here is larger than %d MiB", ErrTooLarge, MaxFeatureBytes>>20))
	}
	var se *json.SyntaxError
	if !errors.As(err, &se) && !errors.Is(err, io.ErrUnexpectedEOF) && !errors.Is(err, io.EOF) {
		return fmt.Errorf("reading GeoJSON: %w", err)
	}
	// The decoder's own offsets skip the delimiters it consumed as tokens;
	// find the place by scanning again from the value the decoder was at.
	start := rd.dec.InputOffset()
	rest, _ := io.ReadAll(rd.dec.Buffered())
	off, _, found := firstProblem(rest, false)
	switch {
	case found:
		off += start
	case se != nil:
		off = se.Offset
	default:
		off = start + int64(len(rest))
	}
	msg := "unexpected end of input; the file looks cut off"
	if se != nil {
		msg = se.Error()
	}
	return rd.cr.syntaxAt(off, feature, fmt.Errorf("%w: %s", ErrSyntax, msg))
}

// readRecord reads the next record of a text sequence.
func (rd *Reader) readRecord(dst []byte) ([]byte, int64, int64, int64, error) {
	delim := byte('\n')
	if rd.rs {
		delim = 0x1E
	}
	for !rd.eof {
		start := len(dst)
		recOff, recLine, lineStart := rd.off, rd.line+1, rd.lineStart
		for {
			part, err := rd.br.ReadSlice(delim)
			dst = append(dst, part...)
			rd.off += int64(len(part))
			if len(dst)-start > MaxFeatureBytes {
				return dst, 0, 0, 0, &SyntaxError{Offset: recOff, Line: recLine, Column: 1, Feature: rd.nread + 1,
					Err: fmt.Errorf("%w: the record starting here is larger than %d MiB", ErrTooLarge, MaxFeatureBytes>>20)}
			}
			if err == bufio.ErrBufferFull {
				continue
			}
			if err == io.EOF {
				rd.eof = true
				break
			}
			if err != nil {
				return dst, 0, 0, 0, fmt.Errorf("reading input: %w", err)
			}
			break
		}
		rec := dst[start:]
		lines := int64(bytes.Count(rec, []byte{'\n'}))
		// Trim the delimiter, a leading record separator and white space.
		lead := 0
		for lead < len(rec) && (isSpace(rec[lead]) || rec[lead] == 0x1E) {
			lead++
		}
		tail := len(rec)
		for tail > lead && (isSpace(rec[tail-1]) || rec[tail-1] == 0x1E) {
			tail--
		}
		off := recOff + int64(lead)
		line := recLine + int64(bytes.Count(rec[:lead], []byte{'\n'}))
		col := off - lineStart + 1
		if j := bytes.LastIndexByte(rec[:lead], '\n'); j >= 0 {
			col = int64(lead - j)
		}
		if j := bytes.LastIndexByte(rec, '\n'); j >= 0 {
			rd.lineStart = recOff + int64(j) + 1
		}
		rd.line += lines
		if tail == lead {
			dst = dst[:start]
			continue
		}
		n := copy(dst[start:], rec[lead:tail])
		rd.nread++
		return dst[:start+n], off, line, col, nil
	}
	return dst, 0, 0, 0, io.EOF
}

// freeChunks is how many written chunks a reader keeps for reuse: more than
// the batches in flight in a run with a few workers.
const freeChunks = 8

// maxReuseBytes: a chunk whose buffers grew larger (very large features) is
// not kept.
const maxReuseBytes = 16 << 20

// newChunk returns an empty chunk for up to max features, reusing a written
// one when there is one: its buffers and index slices keep their memory.
func (rd *Reader) newChunk(max int) *chunk {
	var c *chunk
	select {
	case c = <-rd.free:
		*c = chunk{rd: rd, buf: c.buf[:0], ends: c.ends[:0], offs: c.offs[:0], lines: c.lines[:0],
			cols: c.cols[:0], info: c.info[:0], out: c.out[:0]}
	default:
		c = &chunk{rd: rd, buf: make([]byte, 0, 160*max), ends: make([]int, 0, max),
			offs: make([]int64, 0, max), lines: make([]int64, 0, max)}
		if rd.seq {
			c.cols = make([]int64, 0, max)
		}
	}
	c.first = rd.count
	return c
}

// recycle keeps a written chunk for reuse by newChunk.
func (rd *Reader) recycle(c *chunk) {
	if cap(c.buf) > maxReuseBytes || cap(c.out) > maxReuseBytes {
		return
	}
	select {
	case rd.free <- c:
	default:
	}
}
