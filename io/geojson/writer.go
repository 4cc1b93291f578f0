package geojson

import (
	"bufio"
	"context"
	"fmt"
	"io"

	"github.com/heliotag/heliotag/enrich"
)

// Writer writes the enriched features of chunks from a Reader, in the
// reader's form: a FeatureCollection (header, features, footer) or a text
// sequence.
type Writer struct {
	w       *bufio.Writer
	rd      *Reader
	written int64 // features written
}

// NewWriter writes a collection's header at once: its members before
// "features" as read, then the start of the features array. RS applies to
// sequences only.
func NewWriter(w io.Writer, rd *Reader, plan *enrich.Plan, o WriterOptions) (*Writer, error) {
	if o.RS && !rd.seq {
		return nil, fmt.Errorf("%w: --rs writes GeoJSON text sequences; the output is a FeatureCollection", enrich.ErrUsage)
	}
	// Chunks encode themselves on the workers and know only their reader:
	// the output framing goes there (the input's framing does not decide it).
	rd.outRS = o.RS
	rd.added = rd.added[:0]
	for _, name := range plan.Names() {
		rd.added = append(rd.added, appendString(nil, name))
	}
	wr := &Writer{w: bufio.NewWriterSize(w, 1<<20), rd: rd}
	if !rd.seq {
		b := []byte{'{'}
		for _, m := range rd.head {
			b = appendString(b, m.key)
			b = append(b, ':')
			b = append(b, m.value...)
			b = append(b, ',')
		}
		b = append(b, `"features":[`...)
		if _, err := wr.w.Write(b); err != nil {
			return nil, fmt.Errorf("writing output: %w", err)
		}
	}
	return wr, nil
}

// Write writes a chunk encoded by Encode.
func (w *Writer) Write(_ context.Context, ch enrich.Chunk) error {
	c, ok := ch.(*chunk)
	if !ok {
		return fmt.Errorf("geojson: chunk %T was not read by this package", ch)
	}
	if c.nout == 0 {
		return nil
	}
	var err error
	if !w.rd.seq {
		sep := ",\n"
		if w.written == 0 {
			sep = "\n"
		}
		_, err = w.w.WriteString(sep)
	}
	if err == nil {
		_, err = w.w.Write(c.out)
	}
	w.written += int64(c.nout)
	// The chunk is done with (enrich does not touch it after Write): its
	// memory serves a later chunk.
	w.rd.recycle(c)
	if err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}

// Close ends a collection (the features array, then the members that came
// after it in the input) and flushes. When the input was not read to its end
// (the run failed) the collection is left unclosed, so that output that went
// to a stream is not mistaken for a whole document.
func (w *Writer) Close() error {
	if !w.rd.seq && w.rd.end {
		var b []byte
		if w.written > 0 {
			b = append(b, '\n')
		}
		b = append(b, ']')
		for _, m := range w.rd.tail {
			b = append(b, ',')
			b = appendString(b, m.key)
			b = append(b, ':')
			b = append(b, m.value...)
		}
		b = append(b, "}\n"...)
		if _, err := w.w.Write(b); err != nil {
			return fmt.Errorf("writing output: %w", err)
		}
	}
	if err := w.w.Flush(); err != nil {
		return fmt.Errorf("writing output: %w", err)
	}
	return nil
}
