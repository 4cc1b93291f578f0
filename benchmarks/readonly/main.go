// Command readonly times a read-only pass over a benchmark input: the
// reader's share of an enrich run, with no sun columns computed and nothing
// written. It takes the input and the column flags of `heliotag enrich`.
//
//	go run ./benchmarks/readonly --date crash_date --time crash_time --tz America/Chicago benchmarks/data/crash_1000000.csv
//
// Text formats are opened with io/formats and their Source is drained with
// Next until io.EOF: CSV record scanning, or the GeoJSON walk that hands each
// feature over as raw bytes. Fields are not split and no value is parsed
// (that happens in the enrich workers). The text readers take their chunks
// back for reuse only through their writers, so here every batch allocates
// and grows fresh buffers, which an enrich run does not; a chunk with a
// Release method is released once counted.
//
// Parquet chunks keep their Arrow memory until the writer has written them,
// and a chunk that is never written is released only when the reader closes,
// so draining heliotag's Parquet reader without a writer would hold the whole
// file. A Parquet input is therefore decoded with pqarrow's record reader
// set up as io/parquet sets it up (a buffered stream of 64 KiB per column
// chunk, record batches of --batch-rows rows, every column, Go's allocator),
// each batch released once counted.
//
// It prints the rows read and the seconds on stderr, and fails when -rows is
// given and differs.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"runtime/pprof"
	"time"

	"github.com/apache/arrow-go/v18/arrow/memory"
	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/formats"
)

func main() {
	os.Exit(run(context.Background(), os.Args[1:], os.Stderr))
}

func run(ctx context.Context, args []string, stderr io.Writer) int {
	fs := flag.NewFlagSet("readonly", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var sel enrich.Select
	fs.StringVar(&sel.Lat, "lat", "", "latitude `COL`")
	fs.StringVar(&sel.Lon, "lon", "", "longitude `COL`")
	fs.StringVar(&sel.Time, "time", "", "timestamp or time-of-day `COL`")
	fs.StringVar(&sel.Date, "date", "", "date `COL`")
	fs.StringVar(&sel.TZ, "tz", "", "time `ZONE` of local times")
	from := fs.String("from", "", "input `FORMAT` (default: from the extension)")
	batch := fs.Int("batch-rows", 0, "rows per `BATCH` (default: the format's, as heliotag enrich)")
	want := fs.Int64("rows", -1, "fail unless exactly `N` rows are read")
	cpuprofile := fs.String("cpuprofile", "", "write a CPU profile to `FILE`")
	var files []string
	for {
		if err := fs.Parse(args); err != nil {
			return 2
		}
		if fs.NArg() == 0 {
			break
		}
		files = append(files, fs.Arg(0)) // flags may follow the file, as with heliotag
		args = fs.Args()[1:]
	}
	if len(files) != 1 {
		fmt.Fprintln(stderr, "readonly: give one input file")
		return 2
	}
	path := files[0]
	f, err := formats.Detect(path, *from)
	if err != nil {
		fmt.Fprintln(stderr, "readonly:", err)
		return 2
	}
	if *cpuprofile != "" {
		pf, err := os.Create(*cpuprofile)
		if err != nil {
			fmt.Fprintln(stderr, "readonly:", err)
			return 2
		}
		defer pf.Close()
		if err := pprof.StartCPUProfile(pf); err != nil {
			fmt.Fprintln(stderr, "readonly:", err)
			return 2
		}
		defer pprof.StopCPUProfile()
	}
	if *batch <= 0 { // the batch heliotag enrich would use (a Parquet reader chooses from the columns)
		in, err := formats.Open(path, f, nil, formats.Options{Select: sel})
		if err != nil {
			fmt.Fprintln(stderr, "readonly:", err)
			return 1
		}
		*batch = in.BatchRows()
		in.Close()
	}
	start := time.Now()
	var rows int64
	if f == formats.Parquet {
		rows, err = drainParquet(ctx, path, *batch)
	} else {
		rows, err = drainText(ctx, path, f, sel, *batch)
	}
	if err == nil && *want >= 0 && rows != *want {
		err = fmt.Errorf("%d rows read, %d expected", rows, *want)
	}
	if err != nil {
		fmt.Fprintln(stderr, "readonly:", err)
		return 1
	}
	sec := time.Since(start).Seconds()
	fmt.Fprintf(stderr, "readonly: %d rows in %.2f s (%.0f rows/s)\n", rows, sec, float64(rows)/sec)
	return 0
}

// drainText reads a text input through heliotag's reader.
func drainText(ctx context.Context, path string, f formats.Format, sel enrich.Select, batch int) (int64, error) {
	in, err := formats.Open(path, f, nil, formats.Options{Select: sel})
	if err != nil {
		return 0, err
	}
	defer in.Close()
	var rows int64
	for {
		c, err := in.Source.Next(ctx, batch)
		if errors.Is(err, io.EOF) {
			return rows, in.Source.Close()
		}
		if err != nil {
			in.Source.Close()
			return rows, err
		}
		rows += int64(c.Len())
		if r, ok := c.(interface{ Release() }); ok {
			r.Release()
		}
	}
}

// drainParquet decodes every column in record batches, as io/parquet's
// reader does.
func drainParquet(ctx context.Context, path string, batch int) (int64, error) {
	osf, err := os.Open(path)
	if err != nil {
		return 0, err
	}
	defer osf.Close()
	mem := memory.DefaultAllocator
	props := pq.NewReaderProperties(mem)
	props.BufferedStreamEnabled = true
	props.BufferSize = 64 << 10
	pf, err := file.NewParquetReader(osf, file.WithReadProps(props))
	if err != nil {
		return 0, err
	}
	defer pf.Close()
	fr, err := pqarrow.NewFileReader(pf, pqarrow.ArrowReadProperties{BatchSize: int64(batch)}, mem)
	if err != nil {
		return 0, err
	}
	rr, err := fr.GetRecordReader(ctx, nil, nil)
	if err != nil {
		return 0, err
	}
	defer rr.Release()
	var rows int64
	for rr.Next() {
		rows += rr.RecordBatch().NumRows()
	}
	if err := rr.Err(); err != nil && !errors.Is(err, io.EOF) {
		return rows, err
	}
	return rows, nil
}
