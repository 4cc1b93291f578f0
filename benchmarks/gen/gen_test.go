package main

import (
	"bytes"
	"context"
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	pq "github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/formats"
)

// selectFor returns the column flags a shape needs in a format.
func selectFor(shape, format string) enrich.Select {
	if shape != "crash" {
		return enrich.Select{}
	}
	if format == "parquet" {
		return enrich.Select{TZ: "America/Chicago"}
	}
	return enrich.Select{Date: "crash_date", Time: "crash_time", TZ: "America/Chicago"}
}

// TestFormats writes every shape, variant and format, reads it back with
// heliotag's readers and enriches it: the row count, the column count (plus
// 30 when wide) and the absence of bad rows are checked.
func TestFormats(t *testing.T) {
	const n = 1500 // more than one Parquet batch below
	dir := t.TempDir()
	exts := map[string]string{"csv": ".csv", "geojson": ".geojson", "geojsonseq": ".geojsonl", "parquet": ".parquet"}
	for _, shape := range []string{"crash", "camera"} {
		for _, wide := range []bool{false, true} {
			for format, ext := range exts {
				name := shape
				if wide {
					name += "-wide"
				}
				t.Run(name+ext, func(t *testing.T) {
					path := filepath.Join(dir, name+ext)
					c := config{n: n, shape: shape, wide: wide, seed: 3, format: formatOf(path),
						parquet: parquetOptions{batch: 1000, rowGroup: 1 << 20, compression: "zstd"}}
					require.NoError(t, generateFile(path, nil, c))
					_, err := os.Stat(path + ".part")
					assert.True(t, errors.Is(err, os.ErrNotExist), "no temporary file left")

					f, err := formats.Detect(path, "")
					require.NoError(t, err)
					in, err := formats.Open(path, f, nil, formats.Options{Select: selectFor(shape, format)})
					require.NoError(t, err)
					defer in.Close()
					cols := len(in.Source.Columns())
					want := 7
					if shape == "crash" && format == "parquet" {
						want = 6 // one timestamp column instead of date and time
					}
					if format == "geojson" || format == "geojsonseq" {
						want = 6 // five properties (lat and lon are the geometry) and "feature"
					}
					if wide {
						want += wideColumns
					}
					assert.Equal(t, want, cols, "columns %v", in.Source.Columns())

					plan, err := enrich.NewPlan(enrich.PlanOptions{Input: in.Source.Columns()})
					require.NoError(t, err)
					var out bytes.Buffer
					sink, err := in.NewSink(&out, plan)
					require.NoError(t, err)
					sum, err := enrich.Run(context.Background(), in.Source, sink, enrich.Options{Plan: plan, Workers: 2})
					require.NoError(t, err)
					require.NoError(t, sink.Close())
					assert.EqualValues(t, n, sum.Read)
					assert.EqualValues(t, n, sum.Written)
					assert.Zero(t, sum.Rejected+sum.Kept)
				})
			}
		}
	}
}

// TestDeterministic checks that one seed gives the same bytes and another
// seed different ones, and that the formats carry the same rows.
func TestDeterministic(t *testing.T) {
	gen := func(seed uint64, format string) string {
		var b strings.Builder
		require.NoError(t, generate(&b, config{n: 200, shape: "camera", wide: true, seed: seed, format: format}))
		return b.String()
	}
	assert.Equal(t, gen(1, "csv"), gen(1, "csv"))
	assert.NotEqual(t, gen(1, "csv"), gen(2, "csv"))
	// Row 199's timestamp and last wide date are the same in CSV and GeoJSON.
	csvLines := strings.Split(strings.TrimSpace(gen(1, "csv")), "\n")
	last := strings.Split(csvLines[len(csvLines)-1], ",")
	seq := gen(1, "geojsonseq")
	assert.Contains(t, seq, `"timestamp":"`+last[4]+`"`)
	assert.Contains(t, seq, `"x29":"`+last[len(last)-1]+`"}}`)
}

func TestErrors(t *testing.T) {
	cases := []struct {
		name string
		args []string
		code int
	}{
		{"unknown shape", []string{"-shape", "boat", "-n", "1"}, 1},
		{"unknown format", []string{"-format", "xml", "-n", "1"}, 1},
		{"parquet on stdout", []string{"-format", "parquet", "-n", "1"}, 1},
		{"bad compression", []string{"-format", "parquet", "-compression", "lz9", "-n", "1", "-o", filepath.Join(t.TempDir(), "x.parquet")}, 1},
		{"bad flag", []string{"-rows", "3"}, 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var stderr bytes.Buffer
			assert.Equal(t, c.code, run(c.args, io.Discard, &stderr))
			assert.NotEmpty(t, stderr.String())
		})
	}
}

// TestParquetLayout checks the Parquet writer's settings in the file: row
// groups of -rowgroup rows, zstd, float columns without a dictionary, and a
// timestamp adjusted to UTC for camera rows only.
func TestParquetLayout(t *testing.T) {
	for _, shape := range []string{"crash", "camera"} {
		t.Run(shape, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), shape+".parquet")
			c := config{n: 2500, shape: shape, wide: true, seed: 1, format: "parquet",
				parquet: parquetOptions{batch: 1000, rowGroup: 2048, compression: "zstd"}}
			require.NoError(t, generateFile(path, nil, c))
			pf, err := file.OpenParquetFile(path, false)
			require.NoError(t, err)
			defer pf.Close()
			md := pf.MetaData()
			require.Equal(t, 2, md.NumRowGroups())
			assert.EqualValues(t, 2048, md.RowGroup(0).NumRows())
			assert.EqualValues(t, 452, md.RowGroup(1).NumRows())
			sc := md.Schema
			floats := 0
			for i := range sc.NumColumns() {
				col := sc.Column(i)
				cc, err := md.RowGroup(0).ColumnChunk(i)
				require.NoError(t, err)
				assert.Equal(t, compress.Codecs.Zstd, cc.Compression(), col.Name())
				if col.PhysicalType() == pq.Types.Double {
					floats++
					assert.False(t, cc.HasDictionaryPage(), "%s has a dictionary", col.Name())
				}
				if col.Name() == "timestamp" {
					ts, ok := col.LogicalType().(interface{ IsAdjustedToUTC() bool })
					require.True(t, ok, "timestamp is %s", col.LogicalType())
					assert.Equal(t, shape == "camera", ts.IsAdjustedToUTC())
				}
			}
			assert.Equal(t, 2+6, floats, "lat, lon and the six wide decimal columns")
		})
	}
}
