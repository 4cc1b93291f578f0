package geojson

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"

	"github.com/heliotag/heliotag/enrich"
	"github.com/heliotag/heliotag/solar"
)

// runOpts configures one enrichment in a test.
type runOpts struct {
	read    Options
	write   WriterOptions
	policy  enrich.Policy
	add     string
	prefix  string
	workers int
	batch   int
	rejects *bytes.Buffer
	solar   solar.Options
}

// enrichText runs the whole enrichment of input and returns the output.
func enrichText(t testing.TB, input string, o runOpts) (string, enrich.Summary, error) {
	t.Helper()
	rd, err := NewReader(strings.NewReader(input), int64(len(input)), o.read)
	if err != nil {
		return "", enrich.Summary{}, err
	}
	plan, err := enrich.NewPlan(enrich.PlanOptions{
		Add: o.add, Prefix: o.prefix, Input: rd.Columns(),
		TimeNote:    o.read.Select.ZoneMode(),
		Heading:     o.read.Select.HasHeading(),
		ErrorColumn: o.policy == enrich.PolicyKeep,
	})
	if err != nil {
		return "", enrich.Summary{}, err
	}
	var out bytes.Buffer
	w, err := NewWriter(&out, rd, plan, o.write)
	if err != nil {
		return "", enrich.Summary{}, err
	}
	eo := enrich.Options{Plan: plan, Policy: o.policy, Workers: o.workers, BatchRows: o.batch, Solar: o.solar}
	if o.rejects != nil {
		eo.Rejects = o.rejects
	}
	sum, err := enrich.Run(context.Background(), rd, w, eo)
	if cerr := w.Close(); err == nil {
		err = cerr
	}
	return out.String(), sum, err
}

// mustEnrich is enrichText that fails the test on an error.
func mustEnrich(t testing.TB, input string, o runOpts) string {
	t.Helper()
	out, _, err := enrichText(t, input, o)
	if err != nil {
		t.Fatalf("enrich: %v", err)
	}
	return out
}

// features returns the features of a collection or a sequence, decoded.
func decodeFeatures(t testing.TB, out string, seq bool) []map[string]any {
	t.Helper()
	var fs []map[string]any
	if seq {
		for _, line := range strings.Split(strings.TrimRight(out, "\n"), "\n") {
			line = strings.TrimPrefix(line, "\x1e")
			if line == "" {
				continue
			}
			var f map[string]any
			if err := json.Unmarshal([]byte(line), &f); err != nil {
				t.Fatalf("output record %q: %v", line, err)
			}
			fs = append(fs, f)
		}
		return fs
	}
	var fc struct {
		Features []map[string]any `json:"features"`
	}
	if err := json.Unmarshal([]byte(out), &fc); err != nil {
		t.Fatalf("output is not JSON: %v\n%s", err, out)
	}
	return fc.Features
}

// props returns a decoded feature's properties.
func props(t testing.TB, f map[string]any) map[string]any {
	t.Helper()
	p, ok := f["properties"].(map[string]any)
	if !ok {
		t.Fatalf("feature has no properties object: %v", f)
	}
	return p
}

func within(a, b, tol float64) bool { return a-b <= tol && b-a <= tol }
