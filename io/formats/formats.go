// Package formats chooses a file format by name or extension and opens the
// matching reader and writer.
package formats

import (
	"bufio"
	"compress/gzip"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/csv"
	"github.com/heliotag/heliotag/io/geojson"
)

// Format names a file format.
type Format string

// Formats heliotag knows.
const (
	CSV        Format = "csv"
	TSV        Format = "tsv"
	GeoJSON    Format = "geojson"
	GeoJSONSeq Format = "geojsonseq"
	Parquet    Format = "parquet"
)

// supported lists the formats this build reads and writes.
var supported = []Format{CSV, TSV, GeoJSON, GeoJSONSeq, Parquet}

// Text reports whether f is a text format (may be gzipped, read from stdin).
func (f Format) Text() bool { return f != Parquet }

// CSVBatchRows is the default batch of CSV and TSV: a batch whose records,
// inputs and results stay in the processor's caches costs less CPU and
// memory than a large one, most of all on wide rows (benchmarks/RESULTS.md,
// "Batch size"). GeoJSON, which did not gain, keeps enrich.DefaultBatchRows.
const CSVBatchRows = 1024

// BatchRows is f's default number of rows per batch (enrich.Options.BatchRows):
// CSVBatchRows for CSV and TSV, enrich.DefaultBatchRows for the others (a
// Parquet reader may choose fewer for a wide table: see Input.BatchRows).
func (f Format) BatchRows() int {
	if f == CSV || f == TSV {
		return CSVBatchRows
	}
	return enrich.DefaultBatchRows
}

// Detect returns the format named by from, or else by path's extension
// (".gz" looked through).
func Detect(path, from string) (Format, error) {
	if from != "" {
		f := Format(strings.ToLower(from))
		switch f {
		case CSV, TSV, GeoJSON, GeoJSONSeq, Parquet:
			return f, checkSupported(f)
		}
		return "", fmt.Errorf("%w: --from %q; valid: csv, tsv, geojson, geojsonseq, parquet", enrich.ErrUsage, from)
	}
	if path == "-" {
		return "", fmt.Errorf("%w: reading stdin needs --from (csv, tsv, geojson or geojsonseq)", enrich.ErrUsage)
	}
	ext := strings.ToLower(filepath.Ext(strings.TrimSuffix(strings.ToLower(path), ".gz")))
	var f Format
	switch ext {
	case ".csv", ".txt":
		f = CSV
	case ".tsv", ".tab":
		f = TSV
	case ".geojson", ".json":
		f = GeoJSON
	case ".geojsonl", ".geojsons", ".ndjson", ".jsonl":
		f = GeoJSONSeq
	case ".parquet", ".pq", ".geoparquet":
		f = Parquet
	default:
		return "", fmt.Errorf("%w: cannot tell the format of %s from its extension; give --from csv|tsv|geojson|geojsonseq|parquet", enrich.ErrUsage, path)
	}
	return f, checkSupported(f)
}

func checkSupported(f Format) error {
	for _, s := range supported {
		if s == f {
			return nil
		}
	}
	names := make([]string, len(supported))
	for i, s := range supported {
		names[i] = string(s)
	}
	return fmt.Errorf("%w: the %s format is not supported by this version yet (supported: %s)", enrich.ErrUsage, f, strings.Join(names, ", "))
}

// Options configures opening an input.
type Options struct {
	Select enrich.Select
	// Delimiter for CSV: "", ",", ";", "|", "tab" or "\t"; "" means the
	// format's own (comma for CSV, tab for TSV).
	Delimiter string
	// RS writes a GeoJSON text sequence with RFC 8142 record separators (--rs).
	RS bool
	// Compression is the Parquet output codec (--compression); "" keeps the input's.
	Compression string
	// Workers is the run's number of workers (--workers); the Parquet writer
	// encodes that many columns at once. 0 means runtime.NumCPU().
	Workers int
}

// Input is an opened input file with the writer that matches it.
type Input struct {
	Format  Format
	Source  enrich.Source
	closer  io.Closer
	newSink func(w io.Writer, plan *enrich.Plan) (enrich.Sink, error)
}

// NewSink returns a writer of this input's format into w.
func (in *Input) NewSink(w io.Writer, plan *enrich.Plan) (enrich.Sink, error) {
	return in.newSink(w, plan)
}

// BatchRows is the default number of rows per batch for this input: the
// reader's own choice when it makes one (Parquet, from the file's columns),
// or else the format's.
func (in *Input) BatchRows() int {
	if s, ok := in.Source.(interface{ BatchRows() int }); ok {
		return s.BatchRows()
	}
	return in.Format.BatchRows()
}

// Close closes the input file.
func (in *Input) Close() error {
	if in.closer != nil {
		return in.closer.Close()
	}
	return nil
}

// Open opens path ("-" for stdin) in format f.
func Open(path string, f Format, stdin io.Reader, o Options) (*Input, error) {
	var r io.Reader
	var size int64
	in := &Input{Format: f}
	if path == "-" {
		r = stdin
	} else {
		file, err := os.Open(path)
		if err != nil {
			return nil, fmt.Errorf("opening input: %w", err)
		}
		if st, err := file.Stat(); err == nil {
			if st.IsDir() {
				file.Close()
				return nil, fmt.Errorf("opening input: %s is a directory", path)
			}
			size = st.Size()
		}
		r, in.closer = file, file
	}
	if f == Parquet {
		return openParquet(in, r, path, o)
	}
	br := bufio.NewReaderSize(r, 1<<16)
	if magic, _ := br.Peek(2); len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			in.Close()
			return nil, fmt.Errorf("opening gzip input %s: %w", path, err)
		}
		r = zr
		size = 0 // progress in compressed bytes would mislead
	} else {
		r = br
	}
	switch f {
	case CSV, TSV:
		d, err := delimiter(o.Delimiter, f)
		if err != nil {
			in.Close()
			return nil, err
		}
		rd, err := csv.NewReader(r, size, csv.Options{Delimiter: d, Select: o.Select})
		if err != nil {
			in.Close()
			return nil, fmt.Errorf("%s: %w", displayName(path), err)
		}
		in.Source = rd
		in.newSink = func(w io.Writer, plan *enrich.Plan) (enrich.Sink, error) {
			return csv.NewWriter(w, rd, plan)
		}
	case GeoJSON, GeoJSONSeq:
		rd, err := geojson.NewReader(r, size, geojson.Options{Sequence: f == GeoJSONSeq, Select: o.Select})
		if err != nil {
			in.Close()
			return nil, fmt.Errorf("%s: %w", displayName(path), err)
		}
		in.Source = rd
		in.newSink = func(w io.Writer, plan *enrich.Plan) (enrich.Sink, error) {
			return geojson.NewWriter(w, rd, plan, geojson.WriterOptions{RS: o.RS})
		}
	default:
		in.Close()
		return nil, checkSupported(f)
	}
	return in, nil
}

func displayName(path string) string {
	if path == "-" {
		return "stdin"
	}
	return path
}

func delimiter(s string, f Format) (byte, error) {
	switch s {
	case "":
		if f == TSV {
			return '\t', nil
		}
		return ',', nil
	case "tab", `\t`, "\t":
		return '\t', nil
	}
	if len(s) == 1 && s[0] < 0x80 {
		return s[0], nil
	}
	return 0, fmt.Errorf("%w: --delimiter %q; give one ASCII character such as , ; | or the word tab", enrich.ErrUsage, s)
}
