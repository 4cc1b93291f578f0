package main

// End-to-end GeoJSON benchmarks, in process, on the generated
// 1,000,000-feature camera-shape FeatureCollection (about 200 MB, written
// once to benchmarks/data/camera_1000000.geojson, which git ignores, and
// shared with benchmarks/run.sh):
//
//	go test -run '^$' -bench GeoJSON1M -benchtime 1x ./benchmarks/gen/
//
// Beside the enrichment they time a passthrough (heliotag's reader and
// writer with no sun columns: a plain decode and encode of the same file)
// and a naive baseline that decodes every feature into orb's
// geojson.Feature and encodes it again with encoding/json. Each reports
// features/s, the CPU time per feature (user + system, all goroutines: on a
// shared machine it shows the work done where wall time shows the share of
// the cores the run got) and the peak resident memory of the run (VmHWM,
// reset before the run through /proc/self/clear_refs; it includes the test
// binary).

import (
	"bufio"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	ogeojson "github.com/paulmach/orb/geojson"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/io/geojson"
)

const benchFeatures = 1000000

var (
	dataOnce sync.Once
	dataPath string
	dataErr  error
)

// benchData returns the path of the generated collection, making it once.
func benchData(b *testing.B) string {
	dataOnce.Do(func() {
		dir := filepath.Join("..", "data")
		if dataErr = os.MkdirAll(dir, 0o755); dataErr != nil {
			return
		}
		dataPath = filepath.Join(dir, fmt.Sprintf("camera_%d.geojson", benchFeatures))
		if _, err := os.Stat(dataPath); err == nil {
			return
		}
		dataErr = generateFile(dataPath, nil, config{n: benchFeatures, shape: "camera", seed: 1, format: "geojson"})
	})
	if dataErr != nil {
		b.Fatal(dataErr)
	}
	return dataPath
}

// resetPeak resets the process's peak resident set size (Linux).
func resetPeak() { _ = os.WriteFile("/proc/self/clear_refs", []byte("5"), 0) }

// peakMiB reads the peak resident set size since the last reset, MiB.
func peakMiB() float64 {
	b, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	for _, line := range strings.Split(string(b), "\n") {
		if rest, ok := strings.CutPrefix(line, "VmHWM:"); ok {
			kb, _ := strconv.ParseFloat(strings.TrimSuffix(strings.TrimSpace(rest), " kB"), 64)
			return kb / 1024
		}
	}
	return 0
}

// cpuSeconds returns the process's user and system CPU time so far: on a
// shared machine it shows the work done, which wall time does not.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano()).Seconds()
}

// countWriter counts what is written to it and drops it.
type countWriter struct{ n int64 }

func (c *countWriter) Write(p []byte) (int, error) { c.n += int64(len(p)); return len(p), nil }

// enrichFile enriches the file with plan groups add ("none" for the passthrough).
func enrichFile(b *testing.B, path, add string, workers int) int64 {
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	st, _ := f.Stat()
	rd, err := geojson.NewReader(bufio.NewReaderSize(f, 1<<16), st.Size(), geojson.Options{})
	if err != nil {
		b.Fatal(err)
	}
	plan, err := enrich.NewPlan(enrich.PlanOptions{Add: add, Input: rd.Columns()})
	if err != nil {
		b.Fatal(err)
	}
	var out countWriter
	w, err := geojson.NewWriter(&out, rd, plan, geojson.WriterOptions{})
	if err != nil {
		b.Fatal(err)
	}
	sum, err := enrich.Run(context.Background(), rd, w, enrich.Options{Plan: plan, Workers: workers})
	if err == nil {
		err = w.Close()
	}
	if err != nil {
		b.Fatal(err)
	}
	if sum.Written != benchFeatures {
		b.Fatalf("%d features written", sum.Written)
	}
	return out.n
}

// naive decodes each feature into orb's geojson.Feature and encodes it back.
func naive(b *testing.B, path string) int64 {
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	dec := json.NewDecoder(bufio.NewReaderSize(f, 1<<16))
	var out countWriter
	w := bufio.NewWriterSize(&out, 1<<20)
	var n int64
	for {
		tok, err := dec.Token()
		if err != nil {
			b.Fatal(err)
		}
		if tok == "features" {
			break
		}
	}
	if _, err := dec.Token(); err != nil {
		b.Fatal(err)
	}
	w.WriteString(`{"type":"FeatureCollection","features":[`)
	for dec.More() {
		var ft ogeojson.Feature
		if err := dec.Decode(&ft); err != nil {
			b.Fatal(err)
		}
		enc, err := json.Marshal(&ft)
		if err != nil {
			b.Fatal(err)
		}
		if n > 0 {
			w.WriteByte(',')
		}
		w.Write(enc)
		n++
	}
	w.WriteString("]}\n")
	w.Flush()
	if n != benchFeatures {
		b.Fatalf("%d features", n)
	}
	return out.n
}

func BenchmarkGeoJSON1M(b *testing.B) {
	path := benchData(b)
	st, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	cases := []struct {
		name string
		f    func() int64
	}{
		{"enrich/workers=2", func() int64 { return enrichFile(b, path, "", 2) }},
		{"passthrough/workers=2", func() int64 { return enrichFile(b, path, "none", 2) }},
		{"naive-orb-decode-encode", func() int64 { return naive(b, path) }},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			b.SetBytes(st.Size())
			var peak float64
			var outBytes int64
			cpu0 := cpuSeconds()
			for b.Loop() {
				resetPeak()
				outBytes = c.f()
				peak = max(peak, peakMiB())
			}
			cpu := cpuSeconds() - cpu0
			b.ReportMetric(float64(benchFeatures*b.N)/b.Elapsed().Seconds(), "features/s")
			b.ReportMetric(cpu/float64(benchFeatures*b.N)*1e6, "CPU-µs/feature")
			b.ReportMetric(peak, "peak-RSS-MiB")
			b.ReportMetric(float64(outBytes)/1e6, "out-MB")
		})
	}
}

var _ io.Writer = (*countWriter)(nil)
