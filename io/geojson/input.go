package geojson

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"
	"sync/atomic"
)

// countReader counts the bytes read through it, remembers where line ends
// are (for line numbers of positions not yet passed), bounds the size of one
// value, and keeps the first I/O error of the underlying reader so that a
// failing input is not mistaken for truncated JSON.
type countReader struct {
	r    io.Reader
	n    int64        // bytes read so far
	done atomic.Int64 // n, for Position on another goroutine

	nl     []int64 // offsets of '\n' at or after the last position asked about
	head   int     // nl[:head] have been passed
	passed int64   // newlines before the last position asked about
	lastNL int64   // offset of the last passed newline, -1 if none

	base       int64 // bytes before what the reader sees: a byte order mark
	valueStart int64 // offset where the current value starts (for MaxFeatureBytes)
	limit      int64 // 0 disables the size check
	err        error // first error of r other than io.EOF
}

func newCountReader(r io.Reader) *countReader {
	return &countReader{r: r, lastNL: -1}
}

func (c *countReader) Read(p []byte) (int, error) {
	if c.limit > 0 && c.n-c.valueStart > c.limit {
		return 0, ErrTooLarge
	}
	n, err := c.r.Read(p)
	for i := 0; i < n; {
		j := bytes.IndexByte(p[i:n], '\n')
		if j < 0 {
			break
		}
		c.nl = append(c.nl, c.n+int64(i+j))
		i += j + 1
	}
	c.n += int64(n)
	c.done.Store(c.n)
	if err != nil && err != io.EOF && c.err == nil {
		c.err = err
	}
	return n, err
}

// at returns the 1-based line and column (in bytes) of offset off. Calls
// must ask about non-decreasing offsets.
func (c *countReader) at(off int64) (line, col int64) {
	for c.head < len(c.nl) && c.nl[c.head] < off {
		c.lastNL = c.nl[c.head]
		c.passed++
		c.head++
	}
	if c.head == len(c.nl) {
		c.nl, c.head = c.nl[:0], 0
	} else if c.head > 1024 && c.head > len(c.nl)/2 {
		c.nl = c.nl[:copy(c.nl, c.nl[c.head:])]
		c.head = 0
	}
	return c.passed + 1, off - c.lastNL
}

// ioError reports a read failure of the underlying input, if there was one.
func (c *countReader) ioError() error {
	if c.err != nil {
		return fmt.Errorf("reading input: %w", c.err)
	}
	return nil
}

// syntaxAt builds the fatal error for a problem at offset off.
func (c *countReader) syntaxAt(off, feature int64, cause error) *SyntaxError {
	line, col := c.at(off)
	return &SyntaxError{Offset: c.base + off, Line: line, Column: col, Feature: feature, Err: cause}
}

// firstProblem returns where the JSON value at the start of b goes wrong:
// the 0-based offset within b and the scanner's message. With whole, b must
// hold exactly one value (a sequence record); otherwise anything may follow
// the value (the rest of a collection). ok is false when nothing is wrong.
func firstProblem(b []byte, whole bool) (off int64, msg string, ok bool) {
	var err error
	if whole {
		var v json.RawMessage
		err = json.Unmarshal(b, &v)
	} else {
		err = json.NewDecoder(bytes.NewReader(b)).Decode(new(json.RawMessage))
	}
	var se *json.SyntaxError
	switch {
	case err == nil:
		return 0, "", false
	case errors.As(err, &se):
		if strings.HasPrefix(se.Error(), "unexpected end") {
			return se.Offset, "unexpected end of input", true
		}
		return se.Offset - 1, se.Error(), true
	}
	return int64(len(b)), "unexpected end of input", true
}
