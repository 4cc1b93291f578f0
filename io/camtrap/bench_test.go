package camtrap

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/heliotag/heliotag/enrich"
)

// BenchmarkReader reads and joins observations (Next and Extract, the
// package's own share of a run) from a generated package of n rows.
func BenchmarkReader(b *testing.B) {
	for _, n := range []int{10000, 100000} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			dir := b.TempDir()
			var deps, obs strings.Builder
			deps.WriteString("deploymentID,latitude,longitude,deploymentStart,deploymentEnd,cameraHeading,timestampIssues\n")
			for d := range 50 {
				fmt.Fprintf(&deps, "dep-%02d,%.4f,%.4f,2024-01-01T00:00:00+01:00,2024-12-31T00:00:00+01:00,%d,false\n", d, 40+float64(d)/10, -3+float64(d)/20, d*7)
			}
			obs.WriteString("observationID,deploymentID,mediaID,eventID,eventStart,eventEnd,observationLevel,observationType,scientificName,count\n")
			base := time.Date(2024, 1, 2, 0, 0, 0, 0, time.FixedZone("", 3600))
			for i := range n {
				t := base.Add(time.Duration(i) * 97 * time.Second).Format(time.RFC3339)
				fmt.Fprintf(&obs, "obs-%07d,dep-%02d,,ev-%07d,%s,%s,event,animal,Vulpes vulpes,1\n", i, i%50, i, t, t)
			}
			desc := `{"profile": "` + ProfilePrefix + `1.0/camtrap-dp-profile.json", "resources": [
				{"name": "deployments", "path": "deployments.csv"}, {"name": "media", "path": "media.csv"},
				{"name": "observations", "path": "observations.csv"}]}`
			for name, content := range map[string]string{DescriptorName: desc, "deployments.csv": deps.String(),
				"media.csv": "mediaID,deploymentID,timestamp\n", "observations.csv": obs.String()} {
				if err := os.WriteFile(filepath.Join(dir, name), []byte(content), 0o644); err != nil {
					b.Fatal(err)
				}
			}
			p, err := Open(dir)
			if err != nil {
				b.Fatal(err)
			}
			ds, err := p.LoadDeployments(Options{})
			if err != nil {
				b.Fatal(err)
			}
			in := new(enrich.Inputs)
			b.ReportAllocs()
			b.ResetTimer()
			for range b.N {
				rd, err := p.NewReader(TableObservations, ds, Options{})
				if err != nil {
					b.Fatal(err)
				}
				for {
					c, err := rd.Next(context.Background(), enrich.DefaultBatchRows)
					if err == io.EOF {
						break
					}
					if err != nil {
						b.Fatal(err)
					}
					in.Reset(c.Len())
					c.Extract(in)
				}
				rd.Close()
			}
			b.ReportMetric(float64(n*b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}
