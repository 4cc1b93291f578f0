package main

import (
	"bytes"
	"compress/gzip"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestBadInputCatalogue runs every file of testdata/bad (plus two made here:
// a 10 MB field and a truncated gzip) through the command under each
// policy. A row problem stops the run under fail (exit 2, no output, a
// message naming the row, the column and what would be valid), goes to the
// rejects file under skip (exit 1) and into sun_error under keep (exit 1).
// A file problem is fatal under every policy (exit 2, no output) with a
// message naming the place (line or byte offset) and what would be valid.
func TestBadInputCatalogue(t *testing.T) {
	type entry struct {
		file  string
		flags []string
		kind  string   // "row", "file" or "ok"
		msg   []string // substrings of the message under fail
	}
	cat := []entry{
		{"latitude_91.csv", nil, "row", []string{"row 2 (line 3)", `column "lat"`, "91", "[-90, 90]"}},
		{"longitude_200.csv", nil, "row", []string{"row 2 (line 3)", `column "lon"`, "200", "[-180, 180]"}},
		{"nan.csv", nil, "row", []string{"row 2 (line 3)", `column "lat"`, "NaN", "[-90, 90]"}},
		{"empty_time.csv", nil, "row", []string{"row 2 (line 3)", `column "timestamp"`, "empty", "expected a timestamp such as"}},
		{"garbage_time.csv", nil, "row", []string{"row 2 (line 3)", `column "timestamp"`, "half past nine", "expected RFC 3339"}},
		{"spring_forward_gap.csv", []string{"--tz", "America/New_York"}, "row", []string{"row 2 (line 3)", `column "timestamp"`, "does not exist in America/New_York", "02:00 to 03:00"}},
		{"unknown_zone.csv", []string{"--tz-column", "zone"}, "row", []string{"row 2 (line 3)", `column "zone"`, "America/Gotham", "IANA name"}},
		{"invalid_utf8.csv", nil, "row", []string{"row 2 (line 3)", `column "lat"`, `\xff`, "decimal degrees"}},
		{"missing_column.csv", nil, "file", []string{"no latitude column", "--lat", `"latitude_x"`}},
		{"wrong_delimiter.csv", nil, "file", []string{"one column", "--delimiter ;"}},
		{"unterminated_quote.csv", nil, "file", []string{"line 3", "close it"}},
		{"empty.csv", nil, "file", []string{"empty", "first line must name the columns"}},
		{"duplicate_header.csv", nil, "file", []string{`"lat" twice`, "columns 2 and 4", "unique"}},
		{"truncated.parquet", nil, "file", []string{"truncated.parquet", "complete Parquet file"}},
		{"cut_collection.geojson", nil, "file", []string{"byte offset 234", "feature 2", "cut off"}},
		{"deep_nesting.geojson", nil, "file", []string{"byte offset", "feature 2", "depth"}},
		{"header_only.csv", nil, "ok", nil},
		{"big_field.csv", nil, "ok", nil},
		{"truncated.csv.gz", nil, "file", []string{"unexpected EOF"}},
	}
	src, err := filepath.Abs("../../testdata/bad")
	require.NoError(t, err)
	dir := t.TempDir()
	copyDir(t, src, dir)
	// A 10 MB field: read, carried through unchanged, no error.
	big := "id,lat,lon,timestamp,blob\n1,10,10,2024-06-21T12:00:00Z," + strings.Repeat("x", 10<<20) + "\n"
	require.NoError(t, os.WriteFile(filepath.Join(dir, "big_field.csv"), []byte(big), 0o644))
	// A gzip file cut in the middle.
	var hdr bytes.Buffer
	zw := gzip.NewWriter(&hdr)
	_, _ = zw.Write([]byte("id,lat,lon,timestamp\n" + strings.Repeat("1,10,10,2024-06-21T12:00:00Z\n", 2000)))
	require.NoError(t, zw.Close())
	require.NoError(t, os.WriteFile(filepath.Join(dir, "truncated.csv.gz"), hdr.Bytes()[:hdr.Len()/2], 0o644))

	t.Chdir(dir)
	for _, e := range cat {
		for _, policy := range []string{"fail", "skip", "keep"} {
			t.Run(e.file+"/"+policy, func(t *testing.T) {
				ext := filepath.Ext(strings.TrimSuffix(e.file, ".gz"))
				base := strings.TrimSuffix(strings.TrimSuffix(e.file, ".gz"), ext)
				out := base + "-out-" + policy + ext
				rejects := base + "-rejects-" + policy + ".csv"
				args := append([]string{"enrich", e.file, "--on-bad-row", policy, "-o", out, "--force"}, e.flags...)
				if policy == "skip" {
					args = append(args, "--rejects", rejects)
				}
				var stdout, stderr bytes.Buffer
				code := run(context.Background(), args, nil, &stdout, &stderr)
				switch {
				case e.kind == "ok":
					assert.Equal(t, 0, code, stderr.String())
					assert.FileExists(t, out)
				case e.kind == "file" || policy == "fail":
					assert.Equal(t, 2, code, stderr.String())
					for _, m := range e.msg {
						assert.Contains(t, stderr.String(), m)
					}
					assert.NoFileExists(t, out)
					assert.NoFileExists(t, rejects)
				case policy == "skip":
					assert.Equal(t, 1, code, stderr.String())
					rows := readCSV(t, rejects)
					require.Len(t, rows, 2, "the rejects file holds the bad row")
					assert.Equal(t, "2", rows[1][0], "row number")
					assert.Contains(t, rows[1][1], e.msg[1][len("column "):], "reason names the column")
					original := readCSV(t, e.file)
					assert.Equal(t, original[2], rows[1][2:], "the row's original values")
				case policy == "keep":
					assert.Equal(t, 1, code, stderr.String())
					rows := readCSV(t, out)
					require.Len(t, rows, 3)
					errCol := indexOf(t, rows[0], "sun_error")
					assert.Empty(t, rows[1][errCol])
					assert.NotEmpty(t, rows[2][errCol])
				}
				if e.file == "big_field.csv" {
					b, err := os.ReadFile(out)
					require.NoError(t, err)
					assert.Contains(t, string(b), strings.Repeat("x", 10<<20), "the 10 MB field is written back whole")
				}
			})
		}
	}
}

func copyDir(t *testing.T, from, to string) {
	t.Helper()
	entries, err := os.ReadDir(from)
	require.NoError(t, err)
	for _, e := range entries {
		b, err := os.ReadFile(filepath.Join(from, e.Name()))
		require.NoError(t, err)
		require.NoError(t, os.WriteFile(filepath.Join(to, e.Name()), b, 0o644))
	}
}
