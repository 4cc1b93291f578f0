package geojson_test

import (
	"bytes"
	"compress/gzip"
	"context"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"testing"

	"github.com/heliotag/heliotag/job"
)

const jobFeature = `{"type":"Feature","geometry":{"type":"Point","coordinates":[13.405,52.52]},"properties":{"time":"2024-06-21T12:00:00Z"}}`

// TestJobFormats runs GeoJSON through the job as the command does: by
// extension, gzipped, from stdin with --from, and with --rs.
func TestJobFormats(t *testing.T) {
	dir := t.TempDir()
	coll := `{"type":"FeatureCollection","features":[` + jobFeature + `,` + jobFeature + `]}`
	seq := "\x1e" + jobFeature + "\n\x1e" + jobFeature + "\n"
	write := func(name string, b []byte) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write([]byte(coll))
	zw.Close()

	tests := []struct {
		name  string
		o     job.Options
		stdin string
		want  func(out string) bool
	}{
		{"collection by extension", job.Options{Input: write("a.geojson", []byte(coll))},
			"", func(s string) bool { return strings.Count(s, `"sun_phase":"day"`) == 2 }},
		{"json extension", job.Options{Input: write("a.json", []byte(coll))},
			"", func(s string) bool { return strings.HasPrefix(s, `{"type":"FeatureCollection","features":[`) }},
		{"gzipped collection", job.Options{Input: write("b.geojson.gz", gz.Bytes())},
			"", func(s string) bool { return strings.Count(s, `"sun_phase":"day"`) == 2 }},
		{"sequence from stdin", job.Options{Input: "-", From: "geojsonseq"},
			seq, func(s string) bool { return strings.Count(s, "\n") == 2 && !strings.Contains(s, "\x1e") }},
		{"sequence with --rs", job.Options{Input: write("c.geojsonl", []byte(seq)), RS: true},
			"", func(s string) bool { return strings.Count(s, "\x1e{") == 2 }},
		{"ndjson extension", job.Options{Input: write("d.ndjson", []byte(jobFeature+"\n"))},
			"", func(s string) bool { return strings.Count(s, "\n") == 1 }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var out bytes.Buffer
			res, err := job.Enrich(context.Background(), tc.o, strings.NewReader(tc.stdin), &out)
			if err != nil || res.ExitCode(err) != 0 {
				t.Fatalf("%v (exit %d)", err, res.ExitCode(err))
			}
			if !tc.want(out.String()) {
				t.Errorf("output:\n%q", out.String())
			}
		})
	}
	// --rs on a collection is a usage problem.
	if _, err := job.Enrich(context.Background(), job.Options{Input: filepath.Join(dir, "a.geojson"), RS: true}, nil, new(bytes.Buffer)); !job.IsUsage(err) {
		t.Errorf("--rs on a collection: %v, want a usage error", err)
	}
}

// TestJobProgress: progress is reported from the writing goroutine while the
// reader reads (run under -race), and ends at the input's size.
func TestJobProgress(t *testing.T) {
	var b strings.Builder
	b.WriteString(`{"type":"FeatureCollection","features":[`)
	for i := range 5000 {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(jobFeature)
	}
	b.WriteString("]}\n")
	path := filepath.Join(t.TempDir(), "p.geojson")
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	var last, lastTotal, calls atomic.Int64
	o := job.Options{Input: path, Output: filepath.Join(t.TempDir(), "out.geojson"), Workers: 2, BatchRows: 100,
		OnProgress: func(rows, done, total int64) { calls.Add(1); last.Store(done); lastTotal.Store(total) }}
	if _, err := job.Enrich(context.Background(), o, nil, nil); err != nil {
		t.Fatal(err)
	}
	if calls.Load() < 50 || last.Load() != int64(b.Len()) || lastTotal.Load() != int64(b.Len()) {
		t.Errorf("%d progress calls, last %d of %d; want 50 and the whole file (%d bytes)", calls.Load(), last.Load(), lastTotal.Load(), b.Len())
	}
}
