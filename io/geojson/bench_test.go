package geojson

import (
	"fmt"
	"strconv"
	"strings"
	"testing"
	"time"
)

// benchInput returns n Point features as a collection or a sequence.
func benchInput(n int, seq bool) string {
	var b strings.Builder
	if !seq {
		b.WriteString(`{"type":"FeatureCollection","features":[` + "\n")
	}
	t0 := time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC)
	for i := range n {
		if !seq && i > 0 {
			b.WriteString(",\n")
		}
		lon := float64(i%36000)/100 - 180
		lat := float64(i%13000)/100 - 60
		fmt.Fprintf(&b, `{"type":"Feature","id":%d,"geometry":{"type":"Point","coordinates":[%s,%s]},"properties":{"time":"%s","count":%d}}`,
			i+1, strconv.FormatFloat(lon, 'f', 6, 64), strconv.FormatFloat(lat, 'f', 6, 64),
			t0.Add(time.Duration(i)*97*time.Second).Format(time.RFC3339), i%20)
		if seq {
			b.WriteByte('\n')
		}
	}
	if !seq {
		b.WriteString("\n]}\n")
	}
	return b.String()
}

func BenchmarkEnrich(b *testing.B) {
	for _, seq := range []bool{false, true} {
		for _, add := range []string{"", "none"} {
			for _, n := range []int{1000, 100000} {
				in := benchInput(n, seq)
				kind := map[bool]string{false: "collection", true: "sequence"}[seq]
				what := map[string]string{"": "enrich", "none": "passthrough"}[add]
				b.Run(fmt.Sprintf("%s/%s/n=%d", kind, what, n), func(b *testing.B) {
					b.ReportAllocs()
					b.SetBytes(int64(len(in)))
					for b.Loop() {
						if _, _, err := enrichText(b, in, runOpts{read: Options{Sequence: seq}, add: add, workers: 2}); err != nil {
							b.Fatal(err)
						}
					}
					b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "features/s")
				})
			}
		}
	}
}

// BenchmarkLocation compares the Point fast path with orb's decoding, and
// shows a polygon through orb.
func BenchmarkLocation(b *testing.B) {
	point := []byte(`{"type":"Point","coordinates":[-105.178612,39.742476]}`)
	poly := []byte(`{"type":"Polygon","coordinates":[[[100.0,0.0],[101.0,0.0],[101.0,1.0],[100.0,1.0],[100.0,0.0]]]}`)
	for _, c := range []struct {
		name string
		f    func([]byte) error
		g    []byte
	}{
		{"point/fast-path", func(g []byte) error { _, err := location(g); return err }, point},
		{"point/orb", func(g []byte) error { _, err := orbLocation(g); return err }, point},
		{"polygon/orb", func(g []byte) error { _, err := location(g); return err }, poly},
	} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if err := c.f(c.g); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "geometries/s")
		})
	}
}
