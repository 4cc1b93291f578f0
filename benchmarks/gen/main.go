// Command gen writes deterministic synthetic inputs for heliotag's
// benchmarks: N rows of one shape, from a seed, as CSV, a GeoJSON
// FeatureCollection, a GeoJSON text sequence or Parquet. The records are
// generated, not real: random places and times in shapes that resemble the
// two main uses. One seed gives the same rows in every format.
//
//	go run ./benchmarks/gen -n 1000000 -shape crash -o benchmarks/data/crash_1000000.csv
//	go run ./benchmarks/gen -n 5000000 -shape camera -wide -o benchmarks/data/camera-wide_5000000.parquet
//
// Shapes:
//   - crash: every row its own place (a 4°×6° box at mid latitude), a local
//     date and minute over ten years on the wall clock of America/Chicago.
//     CSV and GeoJSON hold them in separate columns (crash_date as
//     2016-05-04, crash_time as HHMM: enrich with --date crash_date --time
//     crash_time --tz America/Chicago); Parquet in one timestamp[us] column
//     not adjusted to UTC (enrich with --tz America/Chicago).
//   - camera: 40 fixed sites, instants over three years: RFC 3339 with the
//     site's offset in text, timestamp[us, UTC] in Parquet (no flags needed).
//
// -wide adds 30 passthrough columns of mixed types (text, integers,
// decimals, booleans, dates; typed in Parquet and GeoJSON) so that the cost
// of carrying realistic rows is measured.
//
// The format follows the output's extension (.csv, .geojson, .geojsonl,
// .parquet) unless -format names it. A file is written under a temporary
// name and renamed when complete, so a file that exists is whole.
package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// config is what the flags ask for.
type config struct {
	n       int
	shape   string
	wide    bool
	seed    uint64
	format  string
	parquet parquetOptions
}

func run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("gen", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var c config
	fs.IntVar(&c.n, "n", 1_000_000, "number of `ROWS`")
	fs.StringVar(&c.shape, "shape", "crash", "`SHAPE` of the rows: crash or camera")
	fs.BoolVar(&c.wide, "wide", false, "add 30 passthrough columns of mixed types")
	fs.Uint64Var(&c.seed, "seed", 1, "random `SEED`")
	fs.StringVar(&c.format, "format", "", "`FORMAT`: csv, geojson, geojsonseq or parquet (default: from -o's extension; csv on stdout)")
	out := fs.String("o", "-", "output `FILE` (- for stdout, text formats only)")
	fs.IntVar(&c.parquet.batch, "batch", 65536, "Parquet: rows per Arrow record `BATCH` handed to the writer")
	fs.Int64Var(&c.parquet.rowGroup, "rowgroup", 1<<20, "Parquet: rows per row `GROUP`")
	fs.StringVar(&c.parquet.compression, "compression", "zstd", "Parquet: `CODEC`, zstd, snappy, gzip or uncompressed")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "gen: unexpected argument %q\n", fs.Arg(0))
		return 2
	}
	if c.format == "" {
		c.format = formatOf(*out)
	}
	if err := generateFile(*out, stdout, c); err != nil {
		fmt.Fprintln(stderr, "gen:", err)
		return 1
	}
	return 0
}

// formatOf names the format of path by its extension.
func formatOf(path string) string {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".geojson", ".json":
		return "geojson"
	case ".geojsonl", ".geojsons", ".ndjson", ".jsonl":
		return "geojsonseq"
	case ".parquet":
		return "parquet"
	}
	return "csv"
}

// generateFile writes to path ("-" for stdout) under a temporary name,
// renamed on success.
func generateFile(path string, stdout io.Writer, c config) error {
	if path == "-" {
		if c.format == "parquet" {
			return fmt.Errorf("Parquet needs an output file (-o)")
		}
		return generate(stdout, c)
	}
	tmp := path + ".part"
	f, err := os.Create(tmp)
	if err != nil {
		return err
	}
	err = generate(f, c)
	if cerr := f.Close(); err == nil && cerr != nil && c.format != "parquet" {
		err = cerr // the Parquet writer closes the file itself
	}
	if err != nil {
		os.Remove(tmp)
		return err
	}
	return os.Rename(tmp, path)
}

// sink is one output format.
type sink interface {
	write(r *row) error
	close() error
}

// generate writes c.n rows to w.
func generate(w io.Writer, c config) error {
	if c.n < 0 {
		return fmt.Errorf("-n %d: the number of rows cannot be negative", c.n)
	}
	s, err := newShape(c.shape, c.wide, c.seed)
	if err != nil {
		return err
	}
	var out sink
	switch c.format {
	case "csv":
		out, err = newCSVWriter(w, c.shape, c.wide)
	case "geojson", "geojsonseq":
		out, err = newGeoJSONWriter(w, c.shape, c.wide, c.format == "geojsonseq")
	case "parquet":
		out, err = newParquetWriter(w, c.shape, c.wide, c.parquet)
	default:
		return fmt.Errorf("format %q; valid: csv, geojson, geojsonseq, parquet", c.format)
	}
	if err != nil {
		return err
	}
	var r row
	for i := range c.n {
		s.fill(i, &r)
		if err := out.write(&r); err != nil {
			out.close()
			return err
		}
	}
	return out.close()
}
