package formats

import (
	"fmt"
	"io"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/parquet"
)

// openParquet opens a Parquet input: it is read at random offsets, so it must
// be a file, not a stream.
func openParquet(in *Input, r io.Reader, path string, o Options) (*Input, error) {
	f, ok := r.(parquet.ReaderAtSeeker)
	if !ok || path == "-" {
		in.Close()
		return nil, fmt.Errorf("%w: Parquet is read from a file, not from stdin; give its path", enrich.ErrUsage)
	}
	if o.Compression != "" {
		if _, err := parquet.ParseCompression(o.Compression); err != nil {
			in.Close()
			return nil, err
		}
	}
	rd, err := parquet.NewReader(f, parquet.Options{Select: o.Select})
	if err != nil {
		in.Close()
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	in.Source = rd
	in.closer = closers{rd, in.closer}
	in.newSink = func(w io.Writer, plan *enrich.Plan) (enrich.Sink, error) {
		return parquet.NewWriter(w, rd, plan, parquet.WriterOptions{Compression: o.Compression, Workers: o.Workers})
	}
	return in, nil
}

// closers closes the Parquet reader, then the file.
type closers []io.Closer

func (cs closers) Close() error {
	var first error
	for _, c := range cs {
		if c == nil {
			continue
		}
		if err := c.Close(); err != nil && first == nil {
			first = err
		}
	}
	return first
}
